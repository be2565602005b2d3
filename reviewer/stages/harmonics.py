"""``power.harmonics``: the line current's harmonics and power factor of a phase-control
stage over its firing range, against the IEC 61000-3-2 Class A table (an estimate)."""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

import numpy as np

from checks import harmonics, power
from checks.core import Outcome
from reviewer.fmt import eng, span
from reviewer.registry import Bound, CheckDef, Context, Reduced, register
from reviewer.safety import HARMONICS
from reviewer.stages import power as pw

FIRING_SWEEP = 13
R_SWEEP = 9


def _bind(ctx: Context) -> Bound:
    b = Bound()
    pw._bind_stage_options(ctx, b)
    ctx.need(b, "vs", "supply.voltage")
    ctx.need(b, "freq", "supply.frequency")
    pw._bind_load(ctx, b)
    extra = [math.pi / 2]
    r, lv, f = (ctx.project.lookup(p) for p in (pw._sp(ctx, "load.r"), pw._sp(ctx, "load.l"),
                                                 "supply.frequency"))
    if r is not None and lv is not None and f is not None:
        extra.append(math.atan2(2 * math.pi * f.nom * lv.nom, r.nom))  # nominal φ
    if not pw._bind_firing(ctx, b, sweep=FIRING_SWEEP, extra=tuple(extra)):
        return b
    if ctx.stage.get("control") == "burst":
        pw._bind_burst(ctx, b)
        b.inputs["n_on"].sweep = 9
    elif "alpha" in b.inputs and b.inputs["alpha"].value.varies:
        # The harmonic currents are not monotonic in α: refined between the sampled angles.
        av = b.inputs["alpha"].value
        b.options["alpha_range"] = (av.lo, av.hi, 0.5 * (av.hi - av.lo) / (FIRING_SWEEP - 1))
    vs = ctx.project.supply["voltage"]
    if vs.nom < 100.0:
        b.not_applicable = (f"the supply is {eng(vs.nom, 'V')}, not the mains (a transformer "
                            "winding): the mains-side harmonics are these scaled by the turns "
                            "ratio, and the limits table applies to those")
        return b
    if not 200.0 <= vs.nom <= 250.0:
        b.notes.append(f"the Class A table is for 220–240 V systems; on {eng(vs.nom, 'V')} it "
                       "is shown for orientation only")
    if b.inputs["l"].value.hi > 0 and "burst_period" not in b.options:
        # With inductance the harmonic currents are not monotonic in R (the conduction angle
        # and phase move with it): R is sampled across its range, not taken at its ends.
        b.inputs["r"].sweep = R_SWEEP
        rv = b.inputs["r"].value
        if rv.varies:
            b.options["r_range"] = (rv.lo, rv.hi, 0.5 * (rv.hi - rv.lo) / (R_SWEEP - 1))
    return b


def _fn_burst(*, topology: str, limits: Mapping[str, float], burst_period: int,
              **kw: Any) -> Outcome:
    from checks import burst

    pw._angles(kw)  # pops the firing inputs; burst control needs no angle
    omega = pw._omega(kw)
    r, l_ = np.asarray(kw["r"], dtype=float), np.asarray(kw["l"], dtype=float)
    ipk = np.sqrt(2.0) * np.asarray(kw["vs"], dtype=float) / np.hypot(r, omega * l_)
    return burst.burst_harmonics_check(n_on=kw["n_on"], period=burst_period, i_peak=ipk,
                                       phi=np.arctan2(omega * l_, r), line_hz=omega / (2 * np.pi),
                                       limits=limits)


def _fn(*, topology: str, freewheel: bool, limits: Mapping[str, float], kind: str = "ac",
        emf: str = "", **kw: Any) -> Outcome:
    pulse = kw.pop("gate_pulse", None)
    if "burst_period" in kw:
        kw.pop("quantity", None)
        return _fn_burst(topology=topology, limits=limits, **kw)
    a = pw._angles(kw)("alpha")
    omega = pw._omega(kw)
    e = kw.pop("e", None)
    r_range = kw.pop("r_range", None)
    a_range = kw.pop("alpha_range", None)

    def at(r: Any, alpha: Any = None) -> Outcome:
        # An ac-switch fired before φ: the gate pulse decides (power's _pulses) between the
        # steady sine (fired at φ) and one SCR alone, whose line current is a half-wave's
        # (a DC part and even orders), not the symmetric pair.
        a_r, note = pw._pulses({"topology": topology, "l": kw["l"], "r": r,
                                "gate_pulse": pulse}, a if alpha is None else alpha, omega)
        v = power.stage_values(topology=topology, freewheel=freewheel, alpha=a_r, omega=omega,
                               e=e, peak=False, **(kw | {"r": r}))
        v["z"] = np.hypot(np.asarray(r, dtype=float), omega * np.asarray(kw["l"]))
        out = harmonics.harmonics_check(waveform=v, topology=topology, freewheel=freewheel,
                                        limits=limits)
        if not note:
            return out
        phi = np.arctan2(omega * np.asarray(kw["l"], dtype=float), np.asarray(r, dtype=float))
        lost = np.asarray(a_r < phi - 1e-12)
        half = harmonics.harmonics_check(waveform=v, topology="half-wave", freewheel=False,
                                         limits=limits)
        shape = np.broadcast(out.margin, lost).shape
        lost = np.broadcast_to(lost, shape)
        vals = {k: np.where(lost, np.broadcast_to(half.values[k], shape),
                            np.broadcast_to(out.values[k], shape)) for k in out.values}
        return Outcome(vals, np.where(lost, half.margin, out.margin),
                       np.where(lost, half.status, out.status).astype(np.int8), [note])

    out = at(kw["r"])
    if r_range is None and a_range is None:
        return out
    # The graded ratio at its least within half a sweep step of each row's α, then of its R
    # (at that α), so no angle or R between the sampled ones reads worse than the result.
    shape = np.shape(out.margin)
    n = int(np.prod(shape))

    def flat(x: Any) -> np.ndarray:
        return np.broadcast_to(np.asarray(x, dtype=float), shape).ravel()

    a_w = np.broadcast_to(np.asarray(a, dtype=float), shape)
    if a_range is not None:
        def ratio_a(x: np.ndarray) -> np.ndarray:
            return flat(at(kw["r"], x.reshape(shape)).values["limit_ratio"])[:n]

        lo, hi, half = a_range
        best, _ = harmonics.refine_min(ratio_a, flat(a)[:n], lo, hi, half, points=3,
                                       steps=18)
        a_w = best.reshape(shape)
    r_w = np.broadcast_to(np.asarray(kw["r"], dtype=float), shape)
    if r_range is not None:
        def ratio_r(x: np.ndarray) -> np.ndarray:
            return flat(at(x.reshape(shape), a_w).values["limit_ratio"])[:n]

        lo, hi, half = r_range
        best, _ = harmonics.refine_min(ratio_r, flat(kw["r"])[:n], lo, hi, half)
        r_w = best.reshape(shape)
    worst = at(r_w, a_w)
    order = np.broadcast_to(worst.values["worst_order"], shape).astype(int)
    h = np.stack([np.broadcast_to(worst.values[f"i_h{k}"], shape) for k in range(41)], axis=-1)
    out.values.update(limit_ratio=worst.values["limit_ratio"], worst_order=order.astype(float),
                      worst_harmonic=np.take_along_axis(h, order[..., None], axis=-1)[..., 0])
    if r_range is not None:
        out.values["worst_load_r"] = r_w
    if a_range is not None:
        out.values["worst_alpha"] = a_w
    return Outcome(out.values, worst.margin, worst.status, out.notes or worst.notes)

def _summarise(r: Reduced) -> str:
    if "burst_period" in r.bound.options:
        return (f"integral-cycle control: no line harmonics (whole cycles), line current "
                f"{span(r.lo['line_current'], r.hi['line_current'], 'A')} RMS, power factor "
                f"{r.lo['power_factor']:.2f}–{r.hi['power_factor']:.2f}; sub- and "
                f"interharmonics of the {r.bound.options['burst_period']}-cycle period up to "
                f"{eng(r.hi['interharmonic_current'], 'A')} (largest near "
                f"{eng(r.worst['interharmonic_frequency'], 'Hz')}): the supply voltage dips "
                "with every burst, so short periods make lamps on it flicker (IEC 61000-3-3 "
                "governs that); an engineering estimate, never a compliance test")
    n = int(r.worst["worst_order"])
    lim = harmonics.class_a_limits()[n] * r.limits.get("class_factor", 1.0)
    cls = "Class A" if r.limits.get("class_factor", 1.0) == 1.0 else (
        f"{r.limits.get('class_factor', 1.0):g} × Class A")
    text = (f"line current {span(r.lo['line_current'], r.hi['line_current'], 'A')} RMS, THD "
            f"up to {r.hi['thd'] * 100:.0f} %, power factor down to {r.lo['power_factor']:.2f} "
            f"(displacement {r.lo['displacement_factor']:.2f}, distortion "
            f"{r.lo['distortion_factor']:.2f}) over the firing range")
    if r.lo["in_scope"] == 0:
        text += ("; above 16 A per phase at some corners, where the table is out of its scope "
                 "(graded against it all the same)")
    worst_i = r.worst.get("worst_harmonic", r.worst[f"i_h{n}"])
    if "worst_alpha" in r.worst:
        text += f"; the worst firing angle {eng(r.worst['worst_alpha'], 'deg')}"
    if "worst_load_r" in r.worst:
        text += f"; the worst load R within its range {eng(r.worst['worst_load_r'], 'ohm')}"
    if r.status != "pass":
        text += (f"; estimated harmonic {n} of {eng(worst_i, 'A')} exceeds the {cls} limit "
                 f"{eng(lim, 'A')} (ratio {r.worst['limit_ratio']:.2f}): a line filter or "
                 "choke, a smaller load per stage, or integral-cycle control for a heater")
    else:
        text += (f"; every harmonic within the {cls} table, closest harmonic {n} at "
                 f"{eng(worst_i, 'A')} against {eng(lim, 'A')}")
    return text + "; an engineering estimate that shows where the design stands, never a " \
        "compliance test"


UNITS = {"line_current": "A", "thd": "1", "displacement_factor": "1",
         "distortion_factor": "1", "power_factor": "1", "limit_ratio": "1", "worst_order": "1"}
UNITS.update({f"i_h{n}": "A" for n in range(0, 41)})
UNITS.update(interharmonic_current="A", interharmonic_frequency="Hz", worst_harmonic="A",
             worst_load_r="ohm", worst_alpha="deg")

register(CheckDef(
    id="power.harmonics", kinds=("phase-control",),
    question="What harmonics and power factor does the line see over the firing range, and "
             "where do they stand against the IEC 61000-3-2 Class A table?",
    method="Exact Fourier coefficients of the line current's conduction segments (closed-form "
           "integrals of the sine, the exponential and the back EMF) up to the 40th, at every "
           "corner of the firing range; displacement factor cos φ1, distortion factor I1/I, "
           "PF their product, THD over orders 2–40; each order against class_factor × the "
           "Class A limit. Advisory: at worst marginal unless the checklist sets advisory = 0.",
    source="Rashid 4e §11 (Fourier analysis, Ex 11.1); Mohan, Undeland & Robbins ch. 5–6; "
           "IEC 61000-3-2 Table 1 (Class A limits)",
    fn=_fn, bind=_bind, units=UNITS, summarise=_summarise,
    fix="A line choke or filter, a smaller load per stage, or integral-cycle (burst) control "
        "for a heater.",
    cautions=(f"{HARMONICS[0]}: {HARMONICS[1]}",),
    # Undefined where no current flows (the end of a firing range, no on-cycles) or where no
    # harmonic flows at all (whole cycles): the limit ratio is then unbounded.
    optional=frozenset({"thd", "displacement_factor", "distortion_factor", "power_factor",
                        "limit_ratio"}),
))
