"""RC snubber stages and the ``snubber.*`` checks.

A snubber stage names the power stage it sits across (``across``). The step checks
(``snubber.dvdt``, ``snubber.peak-voltage``, ``snubber.capacitor``) read the step E (``step``:
``line`` = √2·V at each supply corner, ``dc`` = the bus, or a value), the loop inductance
(``inductance``, else the supply's) and R, C; the firing-angle checks read the power stage's
firing range with α = 90° added as an interior point, since the voltage at firing peaks there.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

import numpy as np

from checks import snubber
from checks.core import Outcome
from reviewer.fmt import at_least, at_most, eng
from reviewer.model import Part, Stage, Value
from reviewer.registry import (
    Bound,
    CheckDef,
    Context,
    Param,
    Reduced,
    StageKind,
    register,
    register_kind,
)
from reviewer.schema import ACROSS
from reviewer.stages.firing import rt_at_angles
from reviewer.stages.oscillator import bind_device

V = "value"
KINDS = ("rc-snubber",)
HALF_PI = math.pi / 2
# Discharge peak above this share of ITSM is worth a look [common practice: "a few percent"].
DISCHARGE_SHARE = 0.05

RC_SNUBBER = register_kind(StageKind("rc-snubber", {
    "across": Param("stage", required=True, stage_kinds=ACROSS),
    "r": Param(V, "resistance", required=True),
    "c": Param(V, "capacitance", required=True),
    "r_power": Param(V, "power"),
    "c_voltage": Param(V, "voltage"),
    "inductance": Param(V, "inductance"),
    "discharge_inductance": Param(V, "inductance"),
    "step": Param("step", dim="voltage", choices=("line", "dc")),
}, "series R–C across the SCR(s) of a power stage"))


# ---------------------------------------------------------------- binding helpers


def _is_ac(ctx: Context) -> bool:
    return str(ctx.project.supply.get("kind", "ac")) == "ac"


def _power(ctx: Context) -> Stage:
    power = ctx.linked_stage("across")
    assert power is not None  # the loader checks the link
    return power


def _device(ctx: Context, power: Stage) -> Part:
    """The thyristor the snubber protects: the power stage's SCR, or its triac."""
    part = ctx.part("scr", power) or ctx.part("triac", power)
    assert part is not None  # the loader checks the link
    return part


def _bind_rc(ctx: Context, b: Bound) -> None:
    ctx.need(b, "r", ctx.stage_path("r"))
    ctx.need(b, "c", ctx.stage_path("c"))


def _bind_step(ctx: Context, b: Bound, *, supply_too: bool = False) -> None:
    """Add R, C, the loop inductance ``l`` and the step (``v`` or ``e_given``, option mode)."""
    _bind_rc(ctx, b)
    ac = _is_ac(ctx)
    b.options["ac"] = ac
    step: Any = ctx.stage.get("step")
    if isinstance(step, Value):
        b.options["mode"] = "value"
        b.add("e_given", ctx.stage_path("step"), step)
        if supply_too:
            ctx.need(b, "v", "supply.voltage")
    else:
        mode = str(step) if step in ("line", "dc") else ("line" if ac else "dc")
        if step is None:
            b.notes.append(f"step not given: `{mode}` assumed for {'an AC' if ac else 'a DC'} "
                           "supply")
        b.options["mode"] = mode
        ctx.need(b, "v", "supply.voltage")
    lv = ctx.read(b, "l", ctx.stage_path("inductance"))
    if lv is None:
        lv = ctx.read(b, "l", "supply.inductance")
    if lv is None:  # the R–L–C step needs the wiring inductance, a few µH at least
        b.missing.append(ctx.stage_path("inductance") + " (or supply.inductance)")
    elif lv.lo <= 0.0:
        b.not_applicable = ("the loop inductance is 0, where the step would appear at once "
                            "across R_sn: give the wiring inductance (a few µH at least)")


def _scr_value(ctx: Context, b: Bound, name: str, key: str, what: str) -> bool:
    """Add the SCR's ``key`` (its ``what``) as input ``name``; False (and incomplete) when not
    given."""
    part = _device(ctx, _power(ctx))
    return ctx.want(b, name, f"parts.{part.ref}.{key}") is not None


def _bind_alpha(ctx: Context, b: Bound, power: Stage) -> None:
    """The firing range of an AC stage, with α = 90° as an interior point.

    From the power stage's ``firing``; else from a line-synchronised oscillator behind its
    gate drive (the timing R swept so that the angles in between, 90° among them, are seen);
    else the whole half-cycle, the worst case for every value that peaks at 90°.
    """
    firing = power.get("firing")
    if isinstance(firing, Value):
        ctx.need(b, "alpha", ctx.stage_path("firing", power), extra=(HALF_PI,))
        return
    gate = ctx.linked_stage("gate", power)
    osc = ctx.linked_stage("source", gate) if gate is not None else None
    freq = ctx.project.lookup("supply.frequency")
    if osc is not None and osc.get("sync") == "line" and isinstance(freq, Value):
        b.depends.append((osc.id, "osc.window"))  # no firing angle unless it oscillates
        bind_device(ctx, b, osc)
        for unused in ("vv", "ip"):
            b.inputs.pop(unused, None)
        rt = ctx.need(b, "osc_rt", ctx.stage_path("timing_r", osc), sweep=OSC_SWEEP)
        ctx.need(b, "osc_ct", ctx.stage_path("timing_c", osc))
        ctx.need(b, "v", "supply.voltage")
        ctx.need(b, "f", "supply.frequency")
        if rt.varies:
            dev = "ujt" if osc.kind == "ujt-oscillator" else "put"
            peak = [k for k in _OSC_KEYS if k in b.inputs]

            def angle_of(g: Mapping[str, np.ndarray], r_t: np.ndarray) -> np.ndarray:
                return snubber.osc_firing_angle(device=dev, v=g["v"], f=g["f"], rt=r_t,
                                                ct=g["osc_ct"], **{k: g[k] for k in peak})

            b.inputs["osc_rt"].extra = rt_at_angles(b, "osc_rt", peak + ["osc_ct", "v", "f"],
                                                    angle_of, (HALF_PI,),
                                                    key=("osc_firing_angle", dev, tuple(peak)))
        b.options["alpha_from"] = "osc"
        b.notes.append(f"firing angle from the line-synchronised oscillator `{osc.id}` "
                       f"(timing R swept at {OSC_SWEEP} points)")
        return
    b.notes.append("firing range not given on the power stage: 0–180° assumed (worst case)")
    b.add("alpha", ctx.stage_path("firing", power) + "#assumed",
          Value(HALF_PI, 0.0, math.pi, "angle", "deg"), extra=(HALF_PI,))


OSC_SWEEP = 41
_OSC_KEYS = ("v1", "eta", "rbb", "vd", "r1", "r2", "offset", "r_upper", "r_lower")


def _with_firing(fn: Any, *, keep_f: bool) -> Any:
    """Wrap a check so that α comes from the oscillator's inputs when bound that way."""

    def wrapped(**kw: Any) -> Outcome:
        alpha = None
        if kw.pop("alpha_from", "") == "osc":
            peak = {k: kw.pop(k) for k in _OSC_KEYS if k in kw}
            alpha = snubber.osc_firing_angle(device=kw.pop("device"), v=kw["v"], f=kw["f"],
                                             rt=kw.pop("osc_rt"), ct=kw.pop("osc_ct"), **peak)
            kw["alpha"] = alpha
            if not keep_f:
                kw.pop("f")
        out: Outcome = fn(**kw)
        if alpha is not None:
            out.values["alpha"] = alpha
        return out

    return wrapped


def _load(ctx: Context, power: Stage, key: str) -> str:
    return ctx.stage_path(f"load.{key}", power)


def _tol(v: Value, end: str) -> float:
    """The ratio nominal/end of a value (1 when it has no spread): scales a corner value back
    to the nominal a designer would write."""
    x = v.lo if end == "lo" else v.hi
    return v.nom / x if x else 1.0


def _alpha_text(r: Reduced) -> str:
    a = r.worst.get("alpha", r.worst_inputs.get("alpha"))
    if a is None and "alpha" in r.bound.inputs:
        a = r.bound.inputs["alpha"].value.nom
    return f" at α {eng(a, 'deg')}" if a is not None else ""


# ---------------------------------------------------------------- a back-EMF load

EMF_SWEEP = 25  # firing angles sampled for the current zero of an R–L–E load


def _has_emf(ctx: Context, power: Stage) -> bool:
    load = power.get("load")
    return (_is_ac(ctx) and power.kind == "phase-control" and isinstance(load, dict)
            and isinstance(load.get("e"), Value))


def _bind_emf(ctx: Context, b: Bound, *, only_line: bool = True) -> None:
    """With a back-EMF load on the power stage, the inputs of :func:`checks.snubber.emf_steps`:
    the EMF over its range, the load, the frequency and the firing range (swept)."""
    power = _power(ctx)
    if not _has_emf(ctx, power) or (only_line and b.options.get("mode") != "line"):
        return
    ctx.need(b, "e_load", _load(ctx, power, "e"))
    for name, key in (("r_load", "r"), ("l_load", "l")):
        if name not in b.inputs:
            if key == "l":
                ctx.read(b, name, _load(ctx, power, key), default=0.0, dim="inductance",
                         unit="H")
                b.notes[:] = [n for n in b.notes if not n.startswith("l_load not given")]
            else:
                ctx.need(b, name, _load(ctx, power, key))
    if "f" not in b.inputs:
        ctx.need(b, "f", "supply.frequency")
    if "v" not in b.inputs:
        ctx.need(b, "v", "supply.voltage")
    if "alpha" not in b.inputs and "osc_rt" not in b.inputs:
        _bind_alpha(ctx, b, power)
    if "alpha" in b.inputs and b.inputs["alpha"].value.varies:
        av = b.inputs["alpha"].value
        b.inputs["alpha"].sweep = max(b.inputs["alpha"].sweep, EMF_SWEEP)
        # Refined between the sampled angles: the step peaks sharply where the current
        # turns continuous.
        b.options["emf_alpha_range"] = (av.lo, av.hi, 0.5 * (av.hi - av.lo) / (EMF_SWEEP - 1))
    b.options["emf_topology"] = str(power.get("topology", "half-wave"))
    b.options["emf_freewheel"] = bool(power.get("freewheel", False))
    b.notes.append("back-EMF load: the step at the current zero (the line minus E), the "
                   "freewheel's end and the steady V_m + E count, over the EMF's range "
                   f"and the firing range ({EMF_SWEEP} angles)")


def _with_emf(fn: Any, *, shared: tuple[str, ...] = ()) -> Any:
    """Wrap a check so that a bound back EMF becomes its ``emf`` steps; the inputs only the
    steps read are taken out, those in ``shared`` are passed on too."""

    def wrapped(**kw: Any) -> Outcome:
        if "e_load" in kw:
            args = dict(topology=kw.pop("emf_topology"), freewheel=kw.pop("emf_freewheel"),
                        v=kw["v"], f=kw["f"], r_load=kw["r_load"], l_load=kw["l_load"],
                        alpha=kw["alpha"], e_load=kw.pop("e_load"))
            emf = snubber.emf_steps_rows(alpha_range=kw.pop("emf_alpha_range", None), **args)
            for k in ("f", "r_load", "l_load", "alpha"):
                if k not in shared:
                    kw.pop(k)
            kw["emf"] = emf
        out: Outcome = fn(**kw)
        return out

    return wrapped


# ---------------------------------------------------------------- snubber.dvdt


def _bind_dvdt(ctx: Context) -> Bound:
    b = Bound()
    _bind_step(ctx, b)
    if b.not_applicable is None:
        _scr_value(ctx, b, "rating", "dvdt", "dv/dt rating")
        _bind_emf(ctx, b)
    return b


def _sum_dvdt(r: Reduced) -> str:
    w = r.worst
    rating = r.bound.inputs["rating"].value.lo
    when = "at t = 0" if w["dvdt_time"] == 0 else f"at {eng(w['dvdt_time'], 's')}"
    text = (f"max dv/dt {eng(r.hi['dvdt_max'], 'V/s')} (ζ {w['damping']:.2f}, {when}) against "
            f"{eng(rating, 'V/s')} at Tj,max, read as the instantaneous maximum (linear-ramp "
            f"definition; the exponential 0→63 % chord is {eng(r.hi['dvdt_chord'], 'V/s')})")
    if r.status in ("fail", "marginal"):
        k = float(r.limits.get("fail_below" if r.status == "fail" else "marginal_below", 1.0))
        allowed = rating / k
        lv, rv, cv = (r.bound.inputs[n].value for n in ("l", "r", "c"))
        r_new = allowed * lv.lo / r.hi["step"] * _tol(rv, "hi")
        c_new = lv.hi / (r_new / _tol(rv, "lo")) ** 2 * _tol(cv, "lo")
        text += (f"; {r.status}: needs ≤ {at_most(allowed, 'V/s')}: "
                 f"R ≤ {at_most(r_new, 'ohm')} with C ≥ {at_least(c_new, 'F')} (ζ ≥ 0.5 at "
                 f"every corner), or an SCR rated ≥ {at_least(k * r.hi['dvdt_max'], 'V/s')}")
        if r.hi["dvdt_chord"] * k <= rating:
            text += " (the exponential chord is within it: confirm the rating's definition)"
    return text


register(CheckDef(
    id="snubber.dvdt", kinds=KINDS,
    question="The maximum dv/dt the step puts across the SCR (series R–L–C step response), on "
             "the same definition as the rating.",
    method="Step E through the loop inductance into R_sn–C_sn from rest; v = v_C + R·i. "
           "(dv/dt)max = 2ζ·ω0·E at t = 0 for ζ ≥ 0.5, else E·ω0·e^(−σ·t_m) with "
           "ω0·t_m = (π/2 − 3·asin ζ)/√(1 − ζ²). Compared as the instantaneous maximum (a "
           "linear-ramp rating; conservative for an exponential 0.632·V/τ rating, whose chord "
           "is given too). Pass ≤ rating/2, marginal ≤ rating.",
    source="Rashid, Power Electronics 4th ed. §17.6, eqs. 17.34–17.35, Ex. 17.4",
    fn=_with_firing(_with_emf(snubber.dvdt_check), keep_f=True), bind=_bind_dvdt,
    units={"dvdt_max": "V/s", "damping": "1"},
    summarise=_sum_dvdt,
    cautions=("dv/dt is rated at Tj,max with the gate open; a gate-cathode resistor raises it.",
              "A load resistance in the loop adds damping: leaving it out is conservative."),
    fix="R_sn = S·L/E with S = rating/2, then C_sn = 4ζ²·L/R_sn² with ζ = 0.5–1.",
))


# ---------------------------------------------------------------- snubber.peak-voltage


def _bind_peak(ctx: Context) -> Bound:
    b = Bound()
    _bind_step(ctx, b)
    if b.not_applicable is None:
        _scr_value(ctx, b, "vdrm", "vdrm", "VDRM")
        _bind_emf(ctx, b)
    return b


def _sum_peak(r: Reduced) -> str:
    vdrm = r.bound.inputs["vdrm"].value.lo
    w = r.worst
    text = (f"peak {eng(r.hi['peak_voltage'], 'V')} across the SCR (ζ {w['damping']:.2f}, "
            f"step {eng(w['step'], 'V')}) against VDRM {eng(vdrm, 'V')}")
    steady = w.get("steady_peak", math.nan)
    if not math.isnan(steady):
        what = ("the steady line peak plus the back EMF, V_m + E"
                if steady >= w["peak_voltage"] else
                "the freewheel's end (E on top of the line)"
                if w.get("freewheel_peak", 0.0) >= w["peak_voltage"] else
                "the ringing of the step at the current zero (the line minus E)")
        text += f"; with the back EMF the worst is {what}"
    if r.status in ("fail", "marginal"):
        k = float(r.limits.get("fail_below" if r.status == "fail" else "marginal_below", 1.0))
        ratio = vdrm / (k * r.hi["step"])
        need_v = f"VDRM ≥ {at_least(k * r.hi['peak_voltage'], 'V')}"
        if ratio <= 1.0:
            text += f"; {r.status}: no snubber keeps it below VDRM/{k:g}: needs {need_v}"
        else:
            zeta = float(snubber.damping_for_overshoot(ratio=np.array(ratio)))
            lv, rv, cv = (r.bound.inputs[n].value for n in ("l", "r", "c"))
            with np.errstate(all="ignore"):  # a vanishing R gives ∞, not a division error
                c_new = float(np.float64(4 * zeta**2 * lv.hi) / np.float64(rv.lo) ** 2
                              * _tol(cv, "lo"))
            r_new = 2 * zeta * math.sqrt(lv.hi / cv.lo) * _tol(rv, "lo")
            zeta_up = math.ceil(zeta * 100) / 100
            text += (f"; {r.status}: needs ζ ≥ {zeta_up:.2f}: C ≥ {at_least(c_new, 'F')} or "
                     f"R ≥ {at_least(r_new, 'ohm')}, or {need_v}")
    return text


register(CheckDef(
    id="snubber.peak-voltage", kinds=KINDS,
    question="The overshoot peak against VDRM.",
    method="V_pk = E·(1 + e^(−σ·t_1)) exactly for every damping, with ω0·t_1 = 2·acos ζ/√(1−ζ²) "
           "(ζ < 1, i.e. ω_d·t_1 = π − 2·atan(σ/ω_d)), 2 (ζ = 1), 2·acosh ζ/√(ζ²−1) (ζ > 1). "
           "Pass ≤ VDRM/1.2, marginal ≤ VDRM.",
    source="Rashid, Power Electronics 4th ed. §17.6, eq. 17.33 (peak-time quadrant corrected), "
           "Ex. 17.4",
    fn=_with_firing(_with_emf(snubber.peak_check), keep_f=True), bind=_bind_peak,
    units={"peak_voltage": "V"},
    summarise=_sum_peak,
    cautions=("An overdamped snubber still overshoots, through the R_sn·i term.",
              "A recovery current already in the loop inductance raises the peak further."),
    fix="Raise ζ (larger C_sn, or larger R_sn at the cost of dv/dt), or a higher-VDRM SCR.",
))


# ---------------------------------------------------------------- snubber.discharge


def _bind_discharge(ctx: Context) -> Bound:
    b = Bound()
    power = _power(ctx)
    ac = _is_ac(ctx)
    b.options["ac"] = ac
    ctx.need(b, "v", "supply.voltage")
    ctx.need(b, "r", ctx.stage_path("r"))
    lv = ctx.project.lookup(_load(ctx, power, "l"))
    inductive = isinstance(lv, Value) and lv.nom > 0.0
    b.options["inductive"] = inductive
    if inductive:
        b.notes.append("inductive load: the current at firing starts from zero, so the "
                       "discharge is the whole initial current (its di/dt is power.didt)")
    else:
        ctx.need(b, "r_load", _load(ctx, power, "r"))
    if power.kind != "dc-switch":
        _bind_alpha(ctx, b, power)
    part = _device(ctx, power)
    if ctx.read(b, "itsm", f"parts.{part.ref}.itsm") is None:
        b.notes.append(f"{part.ref} has no ITSM: the surge limit is not checked")
        b.add("itsm", f"parts.{part.ref}.itsm#none", Value.fixed(float("nan"), "current", "A"))
    b.options["share"] = DISCHARGE_SHARE
    return b


def _sum_discharge(r: Reduced) -> str:
    w = r.worst
    itsm = r.bound.inputs["itsm"].value.lo
    text = f"discharge peak {eng(r.hi['discharge_peak'], 'A')}{_alpha_text(r)}"
    if not r.bound.options.get("inductive"):
        text += f" (with {eng(w['load_current_at_fire'], 'A')} load current at firing)"
    if not math.isnan(itsm):
        text += f" against ITSM {eng(itsm, 'A')}"
    rv = r.bound.inputs["r"].value
    vf = r.hi["firing_voltage"]
    if r.status == "fail":
        room = itsm - w["load_current_at_fire"]
        need = vf / room * _tol(rv, "lo") if room > 0 else math.inf
        text += f"; fails: needs R_sn ≥ {at_least(need, 'ohm')}"
    elif r.status == "marginal":
        need = 0.0
        if not math.isnan(itsm):
            need = vf / (r.bound.options["share"] * itsm)
        if not r.bound.options.get("inductive"):
            need = max(need, r.bound.inputs["r_load"].value.hi)
        pct = f"{r.bound.options['share'] * 100:g} %"
        what = f"{pct} of ITSM" if r.bound.options.get("inductive") else \
            f"the load current at firing and {pct} of ITSM"
        if math.isnan(itsm):
            what = "the load current at firing"
        text += (f"; marginal: R_sn ≥ {at_least(need * _tol(rv, 'lo'), 'ohm')} would keep it below "
                 f"{what}")
    return text


register(CheckDef(
    id="snubber.discharge", kinds=KINDS,
    question="The capacitor's discharge current into the SCR at firing.",
    method="discharge_peak = V_m·sin α/R_sn (DC: V/R_sn), nominal at α_nom, maximum over the "
           "firing range including α = 90°. Fails when the load current at firing plus the "
           "discharge exceeds ITSM; marginal above the load current at firing (resistive load) "
           "or 5 % of ITSM.",
    source="Rashid, Power Electronics 4th ed. §9 (Ex. 9.4); Bimbhra, Power Electronics ch. 5 "
           "(Ex. 5.8)",
    fn=_with_firing(snubber.discharge_check, keep_f=False), bind=_bind_discharge,
    units={"discharge_peak": "A"},
    summarise=_sum_discharge,
    cautions=("R_sn·C_sn should be short against the minimum on-time (a tenth is common).",
              "The rise rate of this current is checked by power.didt."),
    fix="Raise R_sn (it also raises dv/dt: re-run snubber.dvdt).",
))


# ---------------------------------------------------------------- snubber.resistor-power


def _resistor_power(*, dc: bool, limits: Any, **kw: Any) -> Outcome:
    """Dispatch to the AC or the DC-switch form of the resistor dissipation."""
    if dc:
        return snubber.dc_resistor_power_check(limits=limits, **kw)
    check = _with_emf(snubber.resistor_power_check, shared=("f", "r_load", "l_load", "alpha"))
    return _with_firing(check, keep_f=True)(limits=limits, **kw)


def _bind_rpower(ctx: Context) -> Bound:
    b = Bound()
    power = _power(ctx)
    _bind_rc(ctx, b)
    ctx.need(b, "v", "supply.voltage")
    if ctx.want(b, "rating", ctx.stage_path("r_power")) is None:
        return b
    dc = power.kind == "dc-switch"
    b.options["dc"] = dc
    if dc:
        ctx.need(b, "r_load", _load(ctx, power, "r"))
        gate = ctx.linked_stage("gate", power)
        osc = ctx.linked_stage("source", gate) if gate is not None else None
        if osc is None or osc.get("sync") == "line":
            # The switching rate comes from a free-running oscillator behind the gate drive.
            b.missing.append(ctx.stage_path("gate", power) + " (a gate drive fed by a "
                             "free-running oscillator, for the switching rate)")
            return b
        bind_device(ctx, b, osc)
        del b.inputs["ip"]  # the rate needs only the peak point and the valley
        ctx.need(b, "rt", ctx.stage_path("timing_r", osc))
        ctx.need(b, "ct", ctx.stage_path("timing_c", osc))
        b.notes.append("switching rate from the oscillator's charge time (discharge time "
                       "neglected, so the rate errs high)")
        return b
    if ctx.want(b, "f", "supply.frequency") is None:
        return b
    _bind_alpha(ctx, b, power)
    # A triac conducts both half-cycles: the snubber works as across an ac-switch.
    b.options["topology"] = ("ac-switch" if power.kind == "triac-phase-control"
                             else str(power.get("topology", "half-wave")))
    b.options["freewheel"] = bool(power.get("freewheel", False))
    lv = ctx.project.lookup(_load(ctx, power, "l"))
    if _has_emf(ctx, power):
        _bind_emf(ctx, b, only_line=False)
    elif isinstance(lv, Value) and lv.nom > 0.0 and not b.options["freewheel"]:
        ctx.need(b, "l_load", _load(ctx, power, "l"))
        ctx.need(b, "r_load", _load(ctx, power, "r"))
        b.notes.append("inductive load: ½·C·(V_m·sin φ)² per turn-off added, all in R_sn")
    return b


def _sum_rpower(r: Reduced) -> str:
    rating = r.bound.inputs["rating"].value.lo
    p = r.hi["resistor_power"]
    if r.bound.options.get("dc"):
        text = (f"R_sn dissipates {eng(p, 'W')} at up to {eng(r.hi['switching_rate'], 'Hz')} "
                f"switching (discharge + charging share)")
    else:
        parts = f"firing {eng(r.worst['firing_part'], 'W')}"
        if r.worst.get("turnoff_part", 0.0) > 0.0:
            parts += f", turn-off {eng(r.worst['turnoff_part'], 'W')}"
        parts += f", off-state {eng(r.worst['offstate_part'], 'W')}"
        text = f"R_sn dissipates {eng(p, 'W')}{_alpha_text(r)} ({parts})"
    text += f" against its {eng(rating, 'W')} rating"
    if r.status in ("fail", "marginal"):
        k = float(r.limits.get("fail_below" if r.status == "fail" else "marginal_below", 1.0))
        cv = r.bound.inputs["c"].value
        c_new = cv.nom * rating / (k * p)
        text += (f"; {r.status}: needs a resistor rated ≥ {at_least(k * p, 'W')}, or C ≤ "
                 f"{at_most(c_new, 'F')}")
    return text + "; pulse-rated, non-inductive"


register(CheckDef(
    id="snubber.resistor-power", kinds=KINDS,
    question="Resistor dissipation from charge and discharge every half-cycle at the worst "
             "firing angle.",
    method="AC: n·½·C·(V_m·sin α)²·f per firing (n = 2 for an ac-switch, 1 for half-wave and "
           "per SCR of a bridge), plus n·½·C·(V_m·sin φ)²·f at an inductive load's turn-off and "
           "the off-state (V·ω·C)²·R_sn; worst α over the range including 90°. DC switch: "
           "½·C·V²·f_sw·(1 + R_sn/(R_sn + R)). Pass ≤ rating/2, marginal ≤ rating.",
    source="Rashid, Power Electronics 4th ed. §9 (Ex. 9.4); Mohan, Undeland & Robbins ch. 27",
    fn=_resistor_power, bind=_bind_rpower,
    units={"resistor_power": "W"},
    summarise=_sum_rpower,
    cautions=("Charging C through R dissipates ½·C·V² whatever R is: a smaller R does not help.",
              "The resistor must be non-inductive and pulse-rated for ½·C·V_m² per pulse."),
    fix="A higher-rated resistor, or a smaller C_sn (with a higher-dv/dt SCR).",
))


# ---------------------------------------------------------------- snubber.capacitor


def _bind_cap(ctx: Context) -> Bound:
    b = Bound()
    _bind_step(ctx, b, supply_too=True)
    if b.not_applicable is None and not b.missing:
        ctx.want(b, "rating", ctx.stage_path("c_voltage"))
        _bind_emf(ctx, b)
    return b


def _sum_cap(r: Reduced) -> str:
    rating = r.bound.inputs["rating"].value.lo
    text = (f"capacitor peak {eng(r.hi['capacitor_peak'], 'V')} against its "
            f"{eng(rating, 'V')} rating")
    if r.status == "fail":
        text += f"; fails: needs c_voltage ≥ {at_least(r.hi['capacitor_peak'], 'V')}"
    return text + " (a peak or DC rating; across the mains use a safety-class film capacitor)"


register(CheckDef(
    id="snubber.capacitor", kinds=KINDS,
    question="Capacitor voltage rating against the peak.",
    method="capacitor_peak = max(V_m (V on DC), v_C,pk) with v_C,pk = E·(1 + e^(−πζ/√(1−ζ²))) "
           "for ζ < 1, E for ζ ≥ 1 — the capacitor's own peak, not the device's.",
    source="Rashid, Power Electronics 4th ed. §17.6; Bimbhra, Power Electronics ch. 5",
    fn=_with_firing(_with_emf(snubber.capacitor_check), keep_f=True), bind=_bind_cap,
    units={"capacitor_peak": "V"},
    summarise=_sum_cap,
    cautions=("Enter an AC (RMS) rating at its peak equivalent only if its maker allows that "
              "use.",),
    fix="A capacitor rated at or above the peak.",
))


# ---------------------------------------------------------------- snubber.leakage


def _bind_leak(ctx: Context) -> Bound:
    b = Bound()
    if not _is_ac(ctx):
        b.not_applicable = "DC supply: the capacitor passes no steady off-state current"
        return b
    power = _power(ctx)
    ctx.need(b, "v", "supply.voltage")
    ctx.need(b, "c", ctx.stage_path("c"))
    if ctx.want(b, "f", "supply.frequency") is None:
        return b
    ctx.read(b, "hold", _load(ctx, power, "hold_current"))
    return b


def _sum_leak(r: Reduced) -> str:
    i = r.hi["leakage_current"]
    touch = float(r.limits.get("touch_current", 0.5e-3))
    text = f"off-state current {eng(i, 'A')} through the snubber (V·ω·C, an upper bound)"
    hold = r.bound.inputs.get("hold")
    over = []
    if i > touch:
        over.append(f"the {eng(touch, 'A')} touch current: an \"off\" load is live")
    if hold is not None and i > hold.value.lo:
        over.append(f"the load's {eng(hold.value.lo, 'A')} hold current: it may stay on")
    if over:
        limit = r.lo["leakage_limit"]
        cv = r.bound.inputs["c"].value
        text += (f"; above {' and '.join(over)}; C ≤ {at_most(cv.nom * limit / i, 'F')} keeps it "
                 f"below {eng(limit, 'A')}")
    else:
        text += f"; below the {eng(r.lo['leakage_limit'], 'A')} limit"
    return text


register(CheckDef(
    id="snubber.leakage", kinds=KINDS,
    question="Off-state current through the snubber (V·ω·C): can it hold a light load on, or "
             "shock someone at an \"off\" load?",
    method="leakage_current = V·ω·C at every corner (the bound of V/|Z_load + R_sn + 1/jωC|); "
           "advisory: marginal above the load's hold_current or the 0.5 mA touch current.",
    source="Rashid, Power Electronics 4th ed. §17.6; IEC 60990 touch-current measurement "
           "(the 0.5 mA figure is a common appliance limit)",
    fn=snubber.leakage_check, bind=_bind_leak,
    units={"leakage_current": "A"},
    summarise=_sum_leak,
    cautions=("An SCR that is off does not isolate: the load stays connected to the mains "
              "through the snubber.",),
    fix="A smaller C_sn (with a higher-dv/dt SCR), or isolate the load with a switch.",
))
