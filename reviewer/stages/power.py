"""Power stages (phase control on AC, DC switch) and the ``power.*`` checks."""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from typing import Any

import numpy as np

from checks import oscillator, power, rle
from checks import snubber as snubber_mod
from checks.core import Outcome, cold_value, grade
from checks.rl import extinction_angle
from reviewer.fmt import at_least, at_most, eng, pct, span
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
from reviewer.schema import POWER
from reviewer.stages import oscillator as osc_stage_mod
from reviewer.stages.firing import rt_at_angles

V = "value"

LOAD = {
    "r": Param(V, "resistance", required=True),
    "l": Param(V, "inductance", allow_zero=True),
    "cold_r": Param(V, "resistance"),
    "hold_current": Param(V, "current"),
    "e": Param(V, "voltage", allow_zero=True),
    "type": Param("choice", choices=("battery", "motor")),
}
HEATSINK = {
    "rth_cs": Param(V, "thermal_resistance", allow_zero=True),
    "rth_sa": Param(V, "thermal_resistance", required=True),
    "devices": Param("number"),
}
FUSE = {
    "rating": Param(V, "current", required=True),
    "i2t": Param(V, "i2t", required=True),
    "clearing_time": Param(V, "time"),
}

#: Integral-cycle control's keys, shared with the triac stage: the period and the on-cycles
#: [cycles], and the gate pulse at each voltage zero (its width; a gate held through each
#: half-cycle is a pulse of half a cycle), which an inductive load needs to outlast.
BURST = {"period": Param("number", required=True),
         "on": Param(V, "dimensionless", required=True),
         "pulse": Param(V, "time")}

PHASE_CONTROL = register_kind(StageKind("phase-control", {
    "scr": Param("part", required=True, part_type="scr"),
    "topology": Param("choice", required=True, choices=("half-wave", "bridge", "ac-switch")),
    "gate": Param("stage", stage_kinds=("gate-drive",)),
    "firing": Param(V, "angle", allow_zero=True),
    "load": Param("table", required=True, fields=LOAD),
    "freewheel": Param("bool"),
    "heatsink": Param("table", fields=HEATSINK),
    "fuse": Param("table", fields=FUSE),
    "required": Param("required"),
    "control": Param("choice", choices=("phase", "burst")),
    "burst": Param("table", fields=BURST),
}, "SCRs controlling power from an AC supply by firing angle"))

DC_SWITCH = register_kind(StageKind("dc-switch", {
    "scr": Param("part", required=True, part_type="scr"),
    "gate": Param("stage", stage_kinds=("gate-drive",)),
    "load": Param("table", required=True, fields=LOAD),
    "heatsink": Param("table", fields=HEATSINK),
    "fuse": Param("table", fields=FUSE),
    "duty": Param(V, "dimensionless"),
}, "an SCR switching a DC load, turned off by a turn-off network"))


# --------------------------------------------------------------------------------------------
# Binding helpers: every check reads exactly what it uses.

def _is_dc(ctx: Context) -> bool:
    return ctx.stage.kind == "dc-switch"


def _scr(ctx: Context) -> Part:
    part = ctx.part("scr")
    assert part is not None  # the loader checks the link
    return part


def _sp(ctx: Context, key: str) -> str:
    return ctx.stage_path(key)


def bind_burst_firing(ctx: Context, b: Bound) -> None:
    """Integral-cycle control: whole cycles switched at the voltage zero; every on-cycle
    carries the full current, so the device checks see full conduction (α = 0)."""
    zero = Value.fixed(0.0, "angle", "rad")
    for name in ("alpha", "alpha_lo", "alpha_hi"):
        b.add(name, _sp(ctx, "control") + "#burst", zero)
    b.notes.append("integral-cycle control: whole cycles fired at the voltage zero, each "
                   "on-cycle at full current")


def _bind_supply(ctx: Context, b: Bound, *, freq: bool = True) -> None:
    ctx.need(b, "vs", "supply.voltage")
    if freq and not _is_dc(ctx):
        ctx.need(b, "freq", "supply.frequency")


def _bind_load(ctx: Context, b: Bound, *, l_needed: bool = True) -> None:
    ctx.need(b, "r", _sp(ctx, "load.r"))
    if l_needed:
        ctx.read(b, "l", _sp(ctx, "load.l"), default=0.0, dim="inductance", unit="H")
        # A missing inductance is the resistive case, not an assumption worth a note.
        b.notes[:] = [n for n in b.notes if not n.startswith("l not given")]
    _bind_emf(ctx, b)


def _emf_type(ctx: Context) -> str | None:
    """"battery", "motor" or "emf" for a load with a back EMF `e`; None without one."""
    load = ctx.stage.get("load")
    if not isinstance(load, dict) or not isinstance(load.get("e"), Value):
        return None
    return str(load.get("type", "emf"))


def _bind_emf(ctx: Context, b: Bound) -> None:
    """A back EMF (battery, motor armature): input ``e`` and option ``emf`` (its type)."""
    kind = _emf_type(ctx)
    if kind is not None and not _is_dc(ctx):
        ctx.need(b, "e", _sp(ctx, "load.e"))
        b.options["emf"] = kind


def _bind_stage_options(ctx: Context, b: Bound) -> None:
    if _is_dc(ctx):
        b.options["kind"] = "dc"
        return
    b.options["kind"] = "ac"
    b.options["topology"] = ctx.stage.get("topology")
    fw = bool(ctx.stage.get("freewheel", False))
    if fw and ctx.stage.get("topology") == "ac-switch":
        b.notes.append("freewheel ignored: an ac-switch load sees AC")
        fw = False
    b.options["freewheel"] = fw
    pulse = gate_pulse(ctx, ctx.stage)
    if pulse is not None:
        b.options["gate_pulse"] = pulse


def gate_pulse(ctx: Context, stage: Stage) -> float | None:
    """The shortest gate pulse of an inductive ac-switch's gate drive [s] (None: not known).

    It decides what happens when the switch is fired before the load angle: a pulse that
    outlasts the other SCR's current fires it at φ (control kept, the steady sine); a shorter
    one is missed (one SCR conducts a half-wave). Taken from gate.latch-time's pulse width
    above IGT at the coldest corner.
    """
    load = stage.get("load")
    lv = load.get("l") if isinstance(load, dict) else None
    gate = ctx.linked_stage("gate", stage)
    if stage.get("topology") != "ac-switch" or not isinstance(lv, Value) or lv.hi <= 0 \
            or gate is None:
        return None
    from reviewer.checklist import standard
    from reviewer.engine import evaluate_check  # the engine imports the stages: late import
    from reviewer.registry import CHECKS

    res = evaluate_check(CHECKS["gate.latch-time"], ctx.project, gate, standard())
    width = res.values.get("pulse_width")
    if res.status not in ("pass", "marginal", "fail") or width is None:
        return None
    return width.min if width.min is not None and math.isfinite(width.min) else None


def _osc_stage(ctx: Context) -> Stage | None:
    gate = ctx.linked_stage("gate")
    return ctx.linked_stage("source", gate) if gate is not None else None


def _bind_firing(ctx: Context, b: Bound, *, sweep: int = 0,
                 extra: tuple[float, ...] = ()) -> bool:
    """Add the firing range: ``alpha`` (per row) with ``alpha_lo``/``alpha_hi`` (its ends).

    From ``firing`` when given; else from the gate's line-synchronised oscillator (its
    timing resistor sets the angle, so it is swept; the other oscillator values are corners).
    Returns False (with ``not_applicable`` set) when no firing range can be had.
    """
    fv = ctx.stage.get("firing")
    path = _sp(ctx, "firing")
    if ctx.stage.get("control") == "burst":
        bind_burst_firing(ctx, b)
        return True
    if isinstance(fv, Value):
        if _osc_stage(ctx) is not None:
            b.notes.append("firing range taken from `firing`, not from the gate's oscillator")
        b.add("alpha", path, fv, sweep=sweep if fv.varies else 0, extra=extra)
        b.add("alpha_lo", path + "#min", fv.at(fv.lo))
        b.add("alpha_hi", path + "#max", fv.at(fv.hi))
        return True
    osc = _osc_stage(ctx)
    if osc is None or osc.get("sync") != "line":
        # No line-synchronised oscillator (or a free-running one, not tied to the line).
        b.missing.append(path)
        return False
    b.depends.append((osc.id, "osc.window"))  # no firing angle unless it oscillates
    tmp = Bound()
    dev = osc_stage_mod.bind_device(ctx, tmp, stage=osc)
    keys = ("eta", "rbb", "vd", "r1", "r2") if dev == "ujt" else ("offset", "r_upper", "r_lower")
    for k in keys:
        b.inputs["osc_" + k] = tmp.inputs[k]
    b.notes.extend(tmp.notes)
    b.options["osc_device"] = dev
    rt = ctx.need(b, "osc_rt", ctx.stage_path("timing_r", osc), sweep=max(sweep, 2) if sweep
                  else 0)
    b.add("osc_rt_lo", ctx.stage_path("timing_r", osc) + "#min", rt.at(rt.lo))
    b.add("osc_rt_hi", ctx.stage_path("timing_r", osc) + "#max", rt.at(rt.hi))
    ctx.need(b, "osc_ct", ctx.stage_path("timing_c", osc))
    ctx.need(b, "osc_vz", ctx.stage_path("zener", osc))
    # The oscillator runs from the line: its angle depends on the line voltage and frequency.
    ctx.need(b, "vs", "supply.voltage")
    if "freq" not in b.inputs:
        ctx.need(b, "freq", "supply.frequency")
        b.options["firing_freq_only"] = True
    b.notes.append(f"firing range from the line-synchronised oscillator `{osc.id}`")
    if sweep and extra and rt.varies:
        pkeys = [k for k in keys if "osc_" + k in b.inputs]

        def angle_of(g: Mapping[str, np.ndarray], r_t: np.ndarray) -> np.ndarray:
            return oscillator.line_sync_firing_angle(
                device=dev, vm=np.sqrt(2.0) * g["vs"], omega=2 * np.pi * g["freq"],
                vz=g["osc_vz"], rt=r_t, ct=g["osc_ct"], **{k: g["osc_" + k] for k in pkeys})

        b.inputs["osc_rt"].extra = rt_at_angles(
            b, "osc_rt", ["osc_" + k for k in pkeys] + ["osc_vz", "osc_ct", "vs", "freq"],
            angle_of, extra, key=("line_sync_firing_angle", dev, tuple(pkeys)))
    return True



def _angles(kw: dict[str, Any], vs: Any = None,
            freq: Any = None) -> Callable[[str], np.ndarray]:
    """Pop the firing inputs from ``kw``; return ``angle(end)`` [rad] for ``end`` in
    ``alpha`` (per row), ``lo`` and ``hi`` (the firing range's ends).

    With a line-synchronised oscillator an angle is solved from its inputs on the line
    ``vs``/``freq`` (taken from ``kw`` unless given; ``freq`` is popped when only the
    oscillator needed it) when it is asked for: a check that reads only α solves only α.
    """
    if "osc_device" not in kw:
        given = {"alpha": kw.pop("alpha"), "lo": kw.pop("alpha_lo"), "hi": kw.pop("alpha_hi")}
        return given.__getitem__
    dev = kw.pop("osc_device")
    osc = {k[4:]: kw.pop(k) for k in list(kw) if k.startswith("osc_")}
    vm = np.sqrt(2.0) * np.asarray(kw["vs"] if vs is None else vs, dtype=float)
    if kw.pop("firing_freq_only", False):
        freq = kw.pop("freq")
    elif freq is None:
        freq = kw["freq"]
    omega = 2 * np.pi * np.asarray(freq, dtype=float)
    params = {k: osc[k] for k in ("eta", "rbb", "vd", "r1", "r2", "offset", "r_upper",
                                  "r_lower") if k in osc}
    rts = {"alpha": osc["rt"], "lo": osc["rt_lo"], "hi": osc["rt_hi"]}

    def angle(end: str) -> np.ndarray:
        return oscillator.line_sync_firing_angle(device=dev, vm=vm, omega=omega, vz=osc["vz"],
                                                 rt=rts[end], ct=osc["ct"], **params)

    return angle


def _firing(kw: dict[str, Any], vs: Any = None,
            freq: Any = None) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Pop the firing inputs from ``kw``: (α per row, α_lo, α_hi) [rad] (see :func:`_angles`)."""
    angle = _angles(kw, vs, freq)
    return angle("alpha"), angle("lo"), angle("hi")


def _omega(kw: dict[str, Any]) -> np.ndarray:
    return 2 * np.pi * np.asarray(kw.pop("freq"), dtype=float)


def _hot_or_na(ctx: Context, b: Bound, names: dict[str, str]) -> bool:
    """Read part ratings ``names`` (input name → part key); incomplete when one is missing."""
    part = _scr(ctx)
    missing = [key for name, key in names.items()
               if ctx.want(b, name, f"parts.{part.ref}.{key}") is None]
    return not missing


def _deg(x: float) -> str:
    return eng(x, "deg")


# --------------------------------------------------------------------------------------------
# power.output

def _bind_output(ctx: Context) -> Bound:
    b = Bound()
    if _is_dc(ctx):
        b.not_applicable = "a DC switch has no firing angle"
        return b
    _bind_stage_options(ctx, b)
    _bind_supply(ctx, b)
    _bind_load(ctx, b)
    if not _bind_firing(ctx, b, sweep=7):
        return b
    req = ctx.stage.get("required")
    path = _sp(ctx, "required")
    ls = ctx.project.supply.get("inductance")
    if ctx.stage.get("topology") == "bridge" and isinstance(ls, Value) and ls.hi > 0:
        ctx.need(b, "l_s", "supply.inductance")  # the commutation overlap
    if "e" in b.inputs:
        ev = b.inputs["e"].value
        b.add("e_full", _sp(ctx, "load.e") + "#max", ev.at(ev.hi))
        b.add("e_least", _sp(ctx, "load.e") + "#min", ev.at(ev.lo))
        rv = b.inputs["r"].value  # the worst corner is sought over the R range too
        b.add("r_min", _sp(ctx, "load.r") + "#min", rv.at(rv.lo))
        b.add("r_max", _sp(ctx, "load.r") + "#max", rv.at(rv.hi))
    if not isinstance(req, Value):
        # The values are always reported; only the pass/fail needs a `required` range.
        b.options["quantity"] = "power"
        nan = Value.fixed(float("nan"), "power", "W")
        b.add("req_hi", path + "#none", nan)
        b.add("req_lo", path + "#none-min", nan)
        return b
    b.options["quantity"] = {"power": "power", "current": "current"}.get(req.dim, "voltage")
    if ctx.stage.get("control") == "burst":
        _bind_burst(ctx, b)
    if req.dim == "current" and "e" not in b.inputs:
        b.not_applicable = ("`required` as a current is for a battery or motor load (give "
                            "`load.e`); give a power or a voltage for this load")
        return b
    b.add("req_hi", path + "#max", req.at(req.hi))
    b.add("req_lo", path + "#min", req.at(req.lo) if req.varies
          else Value.fixed(float("nan"), req.dim, req.unit))
    return b


def _bind_burst(ctx: Context, b: Bound) -> None:
    """Burst control's on-cycles (a range: the control's span) and its period in cycles."""
    burst = ctx.stage.get("burst")
    assert isinstance(burst, dict)  # the loader requires it with control = "burst"
    b.options["burst_period"] = int(burst["period"])
    on = ctx.need(b, "n_on", _sp(ctx, "burst.on"))
    b.add("n_lo", _sp(ctx, "burst.on") + "#min", on.at(on.lo))
    b.add("n_hi", _sp(ctx, "burst.on") + "#max", on.at(on.hi))


def _fn_burst_output(**kw: Any) -> Outcome:
    from checks import burst

    a = _angles(kw)("alpha")
    omega = _omega(kw)
    full = power.stage_values(topology=kw["topology"], freewheel=False, vs=kw["vs"],
                              r=kw["r"], l=kw["l"], omega=omega, alpha=a, peak=False)
    out = burst.burst_output_check(
        p_full=full["load_power"], vs=kw["vs"], n_on=kw["n_on"], n_lo=kw["n_lo"],
        n_hi=kw["n_hi"], period=kw["burst_period"], req_lo=kw["req_lo"], req_hi=kw["req_hi"],
        quantity=kw["quantity"], limits=kw["limits"])
    out.values["conduction_angle"] = full["conduction"]
    return out


def _fn_output(**kw: Any) -> Outcome:
    if "burst_period" in kw:
        return _fn_burst_output(**kw)
    a, lo, hi = _firing(kw)
    kw.pop("kind", None)
    kw.pop("emf", None)
    l_s = kw.pop("l_s", None)
    r_min, r_max = kw.pop("r_min", None), kw.pop("r_max", None)
    w = _omega(kw)
    pulse = kw.get("gate_pulse")
    a, note = _pulses(kw, a, w)
    lo, _ = _pulses(kw | {"gate_pulse": pulse}, lo, w)
    out = power.output_check(alpha=a, alpha_lo=lo, alpha_hi=hi, omega=w, **kw)
    if note:
        out.notes.append(note)
    if r_min is not None:
        # A back EMF: the full and minimum outputs are the worst over the E range (the state
        # of charge or the speed: it varies in operation) from the exact waveform (the
        # overlap taken off at each point), not a fixed pairing. R is a part value: a row at
        # an end of its tolerance stands for the whole range (the power can peak inside it);
        # a row inside it (nominal, a Monte Carlo sample) is that unit's own R.
        r = np.asarray(kw["r"], dtype=float)
        at_end = np.isclose(r, r_min, rtol=1e-12) | np.isclose(r, r_max, rtol=1e-12)
        ext = rle.output_extremes(
            topology=kw["topology"], freewheel=kw["freewheel"], quantity=kw["quantity"],
            vs=kw["vs"], r_lo=np.where(at_end, r_min, r), r_hi=np.where(at_end, r_max, r),
            l=kw["l"], omega=w, alpha_lo=lo,
            alpha_hi=hi, e_lo=kw["e_least"], e_hi=kw["e_full"], l_s=l_s)
        out = rle.output_check(outcome=out, extremes=ext, req_lo=kw["req_lo"],
                               req_hi=kw["req_hi"], limits=kw["limits"])
    if l_s is not None:
        out = _overlap(out, kw, a, lo, w, l_s, emf=r_min is not None)
    return out


def _overlap(out: Outcome, kw: dict[str, Any], a: Any, lo: Any, omega: Any,
             l_s: Any, emf: bool = False) -> Outcome:
    """A bridge with source inductance: the overlap and the full output it costs (a
    half-controlled bridge's diode leg freewheels: two transfers of I_d a half-cycle).
    With a back EMF the overlap at each row comes from the waveform's current at the
    transfer (a hand-over included), and the full output already has it taken off."""
    from checks import bridge

    semi = bool(kw.get("freewheel"))
    common = dict(topology="bridge", freewheel=semi, vs=kw["vs"], r=kw["r"], l=kw["l"],
                  omega=omega, peak=False, e=kw.get("e"))
    cont = power.stage_values(alpha=a, **common)["continuous"]
    cont_lo = power.stage_values(alpha=lo, **common)["continuous"]
    transfer = None
    if emf:
        # The waveform with L_s in series (outside the overlaps it carries the load current).
        l_tot = np.asarray(kw["l"], dtype=float) + np.asarray(l_s, dtype=float)
        v = rle.stage_values(alpha=a, **(common | {"l": l_tot}))
        ib = v["vm"] / np.hypot(np.asarray(kw["r"], dtype=float), omega * l_tot)
        transfer = {"i_t": rle.transfer_current(v, v["phi"]) * ib, "i_pi": v["i_pi"] * ib,
                    "l": kw["l"], "e": kw["e"]}
        cont = v["continuous"]
    e_full = kw.get("e_full", kw.get("e"))
    return bridge.overlap_check(
        outcome=out, quantity=kw["quantity"], vs=kw["vs"], r=kw["r"], omega=omega, l_s=l_s,
        alpha=a, alpha_lo=lo, e=0.0 if e_full is None else e_full, continuous=cont,
        continuous_lo=cont_lo, req_hi=kw["req_hi"], semi=semi, transfer=transfer,
        lower=not emf)


def _sum_burst(r: Reduced) -> str:
    m = r.bound.options["burst_period"]
    on = r.bound.inputs["n_on"].value
    q = r.bound.options.get("quantity", "power")
    unit = "W" if q == "power" else "V"
    text = (f"integral-cycle control, {on.lo:g}–{on.hi:g} of every {m} cycles on: "
            f"{'load power' if q == 'power' else 'V_rms'} "
            f"{span(r.lo['output_at_max'], r.hi['output_at_min'], unit)}, in steps of "
            f"{span(r.lo['power_step'], r.hi['power_step'], 'W')} (1/{m} of full power)")
    if r.status != "pass":
        text += "; fails: the on-cycles do not cover `required`: change the period, the range "
        text += "of on-cycles or the load"
    return text + ("; each burst starts at a voltage zero with the cold-load current; short "
                   "control periods make lamps on the same supply flicker")


def _sum_output(r: Reduced) -> str:
    if "burst_period" in r.bound.options:
        return _sum_burst(r)
    q = r.bound.options.get("quantity", "power")
    topo = r.bound.options.get("topology")
    emf = r.bound.options.get("emf")
    unit = {"power": "W", "current": "A"}.get(q, "V")
    name = "load power" if q == "power" else ("V_rms" if topo == "ac-switch" else "V_dc")
    if q == "current":
        name = {"battery": "charge current", "motor": "armature current"}.get(emf,
                                                                              "load current")
    worst = " at the worst E" if emf else ""
    text = (f"{name} {span(r.lo['output_at_max'], r.hi['output_at_min'], unit)} over the firing "
            f"range (nominal {eng(r.nom['output_at_min'], unit)} at full output{worst})")
    req_hi = r.bound.inputs["req_hi"].value.nom
    req_lo = r.bound.inputs["req_lo"].value.nom
    if r.status != "pass":
        fixes = []
        if r.lo["output_at_min"] < req_hi:
            short = (f"full output {eng(r.lo['output_at_min'], unit)} at low line is short of "
                     f"{eng(req_hi, unit)}: needs a smaller α_min")
            if q == "power":
                # P ∝ 1/R at a given α and line: the load R that would just reach it.
                r_need = r.bound.inputs["r"].value.hi * r.lo["output_at_min"] / req_hi
                short += f", or load R ≤ {at_most(r_need, 'ohm')}"
            if emf:
                short += (f" (the worst corner: E = {eng(r.worst['e_at_full'], 'V')}, R = "
                          f"{eng(r.worst['r_at_full'], 'ohm')})")
            fixes.append(short)
        if req_lo == req_lo and r.hi["output_at_max"] > req_lo:
            fixes.append(f"minimum output {eng(r.hi['output_at_max'], unit)} at high line is above "
                         f"{eng(req_lo, unit)}: needs a later α_max")
        text += "; fails: " + "; ".join(fixes)
    if req_hi != req_hi and req_lo != req_lo:
        text += "; no `required` range given: reported, not judged"
    err_hi = r.hi.get("shortcut_error", float("nan"))
    inductive = r.hi.get("load_angle", 0.0) > 0 and not r.bound.options.get("freewheel")
    alpha_hi = r.hi.get("conduction_angle", 0.0)
    if err_hi == err_hi and (abs(err_hi) > 0.10 or inductive or alpha_hi < math.pi / 2):
        text += f"; the conduction-angle shortcut is off by up to {pct(err_hi)}"
    if inductive:
        beta = span(r.lo["extinction_angle"], r.hi["extinction_angle"], "deg")
        text += f"; current runs on to β = {beta}"
    if emf:
        text += _emf_output_text(r, emf)
    mu = r.hi.get("overlap_angle", float("nan"))
    if mu == mu:
        text += (f"; the supply inductance overlaps the commutation by μ up to {_deg(mu)}, "
                 f"taking up to {eng(r.hi['overlap_drop'], 'V')} of the mean output "
                 "(counted in the full output)")
        mu_d = r.hi.get("overlap_diode", float("nan"))
        if mu_d == mu_d:
            text += (f"; the diode leg takes the current over at the line zero in up to "
                     f"{_deg(mu_d)}")
    if r.hi.get("overlap_short", 0.0) > 0:
        text += "; the overlap's drop is what makes the full output fall short"
    return text + _lost_text(r)


def _emf_output_text(r: Reduced, emf: str) -> str:
    """What a back-EMF load adds to the output summary: current, voltage, θ1, conduction."""
    what = {"battery": "charge current", "motor": "armature current"}.get(emf, "load current")
    q = r.bound.options.get("quantity")
    text = ""
    if q != "current":
        text += f"; {what} {span(r.lo['load_current'], r.hi['load_current'], 'A')} (mean)"
    if q != "voltage":
        text += f"; V_dc {span(r.lo['vdc'], r.hi['vdc'], 'V')} at the terminals"
    text += (f"; the line exceeds E from θ1 = {span(r.lo['emf_angle'], r.hi['emf_angle'], 'deg')}"
             " (earlier firing does nothing: see power.control)")
    cont = r.hi.get("continuous", 0.0)
    if cont > 0:
        text += ("; conduction is continuous at some corners" if r.lo.get("continuous", 0) == 0
                 else "; conduction is continuous")
    else:
        text += "; conduction is discontinuous"
    return text


register(CheckDef(
    id="power.output", kinds=("phase-control",),
    question="What does the load get over the firing range, and does it meet `required`?",
    method="Exact waveforms: R load closed forms; R–L from i(θ) = (Vm/Z)[sin(θ−φ) − "
           "sin(α−φ)e^(−(θ−α)/tanφ)] up to β, steady state where continuous or freewheeling. "
           "Bridges with supply.inductance: the commutation overlap's drop, (2/π)·ωL_s·I_d "
           "(fully controlled) or ωL_s·I_d/π (half-controlled), comes off the full output. "
           "Full output (α_min, low line) must reach required.max; minimum (α_max, high line) "
           "must be at or below required.min. A back EMF: both are the worst over the E range "
           "and, at a corner at an end of R's tolerance, over R (a 17 × 5 grid refined about "
           "its worst point) of the exact R–L–E waveform, "
           "the overlap taken off where a current flows at the firing; the minimum voltage at "
           "E min (V_dc ≥ E).",
    source="Rashid, Power Electronics 4th ed. §10–11 (Ex 10.1, 11.1, 11.2); Hart, Power "
           "Electronics §3",
    fn=_fn_output, bind=_bind_output,
    units={"vdc": "V", "vrms": "V", "load_power": "W", "extinction_angle": "deg",
           "conduction_angle": "deg", "shortcut_error": "1", "load_current": "A",
           "overlap_angle": "deg", "overlap_drop": "V", "overlap_diode": "deg",
           "power_step": "W", "e_at_full": "V", "r_at_full": "ohm", "e_at_least": "V",
           "r_at_least": "ohm"},
    summarise=_sum_output,
    fix="Widen the firing range (smaller α_min for more output, later α_max for less), or "
        "change the load or topology.",
    optional=frozenset({"shortcut_error", "overlap_angle", "overlap_drop", "overlap_diode"}),
))


# --------------------------------------------------------------------------------------------
# power.blocking

def _bind_blocking(ctx: Context) -> Bound:
    b = Bound()
    part = _scr(ctx)
    ctx.need(b, "vdrm", f"parts.{part.ref}.vdrm")
    ctx.need(b, "vrrm", f"parts.{part.ref}.vrrm")
    ctx.need(b, "vs", "supply.voltage")
    b.options["kind"] = "dc" if _is_dc(ctx) else "ac"
    if _emf_type(ctx) is not None:
        # The back EMF adds to the line in reverse: an SCR blocks up to Vm + E.
        ctx.need(b, "emf_e", _sp(ctx, "load.e"))
    snubs = ctx.stages_of(("rc-snubber",), "across", ctx.stage.id)
    if snubs:
        sn = snubs[0]
        b.options["snubber"] = sn.id
        ctx.need(b, "snub_r", ctx.stage_path("r", sn))
        ctx.need(b, "snub_c", ctx.stage_path("c", sn))
        if ctx.read(b, "snub_l", ctx.stage_path("inductance", sn)) is None:
            ctx.read(b, "snub_l", "supply.inductance", default=0.0, dim="inductance", unit="H")
        step = sn.get("step", "line")
        if isinstance(step, Value):
            b.options["step"] = "value"
            b.add("snub_e", ctx.stage_path("step", sn), step)
        else:
            b.options["step"] = step
    if _is_dc(ctx):
        nets = ctx.stages_of(("capacitor-commutation", "resonant-commutation"), "for",
                             ctx.stage.id)
        if nets:
            b.options["reverse_from"] = nets[0].id
            if nets[0].get("diode") is True:
                # An antiparallel diode conducts as soon as the SCR is reverse-biased.
                b.options["diode_clamp"] = DIODE_DROP
            else:
                ctx.read(b, "v_c0", ctx.stage_path("charge_voltage", nets[0]))
    return b


#: The reverse voltage an antiparallel diode leaves across the SCR [V] (its forward drop,
#: common practice for a silicon power diode).
DIODE_DROP = 1.0


def _fn_blocking(*, kind: str, vs: np.ndarray, vdrm: np.ndarray, vrrm: np.ndarray,
                 limits: Mapping[str, float], snubber: str = "", step: str = "",
                 snub_r: Any = None, snub_c: Any = None, snub_l: Any = None,
                 snub_e: Any = None, reverse_from: str = "", v_c0: Any = None,
                 diode_clamp: float | None = None, emf_e: Any = None) -> Outcome:
    vs = np.asarray(vs, dtype=float)
    v_line = vs if kind == "dc" else np.sqrt(2.0) * vs
    v_fwd = v_line
    if snubber:
        e = {"line": np.sqrt(2.0) * vs, "dc": vs}.get(step, snub_e)
        v_snub, _ = snubber_mod.step_peak(e=e, r=snub_r, l=snub_l, c=snub_c)
        # The overshoot adds to the picture; a step smaller than the line never lowers it.
        v_fwd = np.maximum(v_line, v_snub)
    if kind == "dc":
        if not reverse_from:
            v_rev = 0.0 * vs
        elif diode_clamp is not None:
            v_rev = diode_clamp + 0.0 * vs
        else:
            v_rev = v_c0 if v_c0 is not None else vs
    else:
        v_rev = v_fwd
    if emf_e is not None:
        # Reverse, the line and the back EMF add: a step of up to Vm + E (snubbed, its
        # overshoot on that step).
        if snubber and step == "line":
            e_rev = np.sqrt(2.0) * vs + np.asarray(emf_e, dtype=float)
            v_snub, _ = snubber_mod.step_peak(e=e_rev, r=snub_r, l=snub_l, c=snub_c)
            v_rev = np.maximum(e_rev, v_snub)
        else:
            v_rev = v_rev + np.asarray(emf_e, dtype=float)
    out = power.blocking_check(vdrm=vdrm, vrrm=vrrm, v_fwd=v_fwd, v_rev=v_rev, limits=limits)
    out.values["line_peak"] = v_line + 0 * out.values["peak_voltage"]
    return out


def _sum_blocking(r: Reduced) -> str:
    vdrm = r.bound.inputs["vdrm"].value.nom
    vrrm = r.bound.inputs["vrrm"].value.nom
    sn = r.bound.options.get("snubber")
    line = "V_s" if r.bound.options["kind"] == "dc" else "√2·V_s"
    src = f"the larger of {line} and the snubber `{sn}` overshoot peak" if sn else line
    text = (f"VDRM {eng(vdrm, 'V')} / VRRM {eng(vrrm, 'V')} against "
            f"{eng(r.hi['peak_voltage'], 'V')} ({src}, high line): ratio "
            f"{r.worst['blocking_ratio']:.2f}")
    if "emf_e" in r.bound.inputs:
        text += "; reverse stress includes the back EMF (Vm + E)"
    if r.bound.options["kind"] == "dc" and not r.bound.options.get("reverse_from"):
        text += "; no turn-off network reverse-biases it, so VRRM is not stressed"
    elif r.bound.options.get("diode_clamp") is not None:
        text += (f"; the antiparallel diode of `{r.bound.options['reverse_from']}` clamps the "
                 f"reverse voltage to about {eng(r.bound.options['diode_clamp'], 'V')}")
    if r.status != "pass":
        k = r.limits.get("marginal_below", 2.0)
        text += (f"; {r.status}: needs VDRM and VRRM ≥ {at_least(k * r.hi['peak_voltage'], 'V')} "
                 f"for {k:g}×")
    return text


register(CheckDef(
    id="power.blocking", kinds=POWER,
    question="Are VDRM and VRRM above the peak voltage at high line, with margin?",
    method="blocking_ratio = min(VDRM/V_fwd, VRRM/V_rev) with V = √2·V_s,max (AC), V_s,max "
           "(DC forward), the commutating charge voltage (DC reverse), or the snubber's "
           "overshoot peak when a snubber is across the stage; ≥ 2.0 passes, 1.5–2.0 marginal.",
    source="Bimbhra, Power Electronics ch. 4 (voltage safety factor); Rashid 4e §17.6",
    fn=_fn_blocking, bind=_bind_blocking,
    units={"peak_voltage": "V", "blocking_ratio": "1"},
    summarise=_sum_blocking,
    fix="Choose a higher voltage class, or damp the snubber overshoot.",
    cautions=("The non-repetitive ratings must also cover the clamped line surge; that is a "
              "manual checklist item.",),
))


# --------------------------------------------------------------------------------------------
# power.rms-current, power.average-current, power.junction: the current and loss family

def _bind_currents(ctx: Context, b: Bound, *, sweep: int = 0,
                   extra: tuple[float, ...] = ()) -> bool:
    _bind_stage_options(ctx, b)
    _bind_supply(ctx, b)
    if _is_dc(ctx):
        ctx.need(b, "r", _sp(ctx, "load.r"))
        ctx.read(b, "duty", _sp(ctx, "duty"), default=1.0, dim="dimensionless", unit="1")
        return True
    _bind_load(ctx, b)
    return _bind_firing(ctx, b, sweep=sweep, extra=extra)


#: Said wherever an ac-switch is fired before its load angle at some corner.
LOST_NOTE = ("α < φ at some corners: control is lost, taken with narrow gate pulses (the worst "
             "case: one SCR conducts a half-wave and DC flows in the load), as turnoff.time does")


WIDE_NOTE = ("α < φ at some corners: the gate pulse outlasts the other SCR's current, so it "
             "fires at φ (control kept: the steady sine)")


def _pulses(kw: dict[str, Any], alpha: Any, omega: Any) -> tuple[np.ndarray, str]:
    """The angle each SCR conducts from on an ac-switch fired before φ, and what was taken.

    Narrow pulses (the worst case) keep α: the second SCR misses its pulse and the first one
    conducts a half-wave. A gate pulse known to last past the first SCR's current
    (ω·t_pulse ≥ β(α) − π − α, β the half-wave extinction angle) fires the second one as
    soon as the first stops, which is firing at φ.
    """
    pulse = kw.pop("gate_pulse", None)
    alpha = np.asarray(alpha, dtype=float)
    if kw.get("topology") != "ac-switch" or "l" not in kw:
        return alpha, ""
    phi = np.arctan2(np.asarray(omega) * np.asarray(kw["l"]), np.asarray(kw["r"]))
    lost = alpha < phi - 1e-12
    if not np.any(lost):
        return alpha, ""
    if pulse is None:
        return alpha, LOST_NOTE
    beta = extinction_angle(alpha=np.minimum(alpha, phi), phi=phi)
    wide = lost & (np.asarray(omega) * pulse >= beta - np.pi - alpha)
    if np.all(wide[lost]):
        return np.where(wide, phi, alpha), WIDE_NOTE
    return np.where(wide, phi, alpha), LOST_NOTE


def _lost_text(r: Reduced) -> str:
    said = [n for n in (LOST_NOTE, WIDE_NOTE) if n in r.notes]
    return "; " + said[0] if said else ""


def _fn_currents(core: Any) -> Any:
    def fn(**kw: Any) -> Outcome:
        kw.pop("emf", None)
        if kw.get("kind") == "ac":
            a = _angles(kw)("alpha")
            kw["omega"] = _omega(kw)
            kw["alpha"], note = _pulses(kw, a, kw["omega"])
            out = core(**kw)
            if note:
                out.notes.append(note)
            return out
        return core(**kw)
    return fn


def _bind_rms(ctx: Context) -> Bound:
    b = Bound()
    if _hot_or_na(ctx, b, {"it_rms_rating": "it_rms"}):
        _bind_currents(ctx, b)
    return b


def _sum_rms(r: Reduced) -> str:
    rating = r.bound.inputs["it_rms_rating"].value.nom
    text = (f"IT(RMS) {span(r.lo['it_rms'], r.hi['it_rms'], 'A')} per SCR against "
            f"{eng(rating, 'A')}")
    if r.status != "pass":
        text += f"; fails: needs IT(RMS) rating ≥ {at_least(r.hi['it_rms'], 'A')}"
    return text + _lost_text(r)


register(CheckDef(
    id="power.rms-current", kinds=POWER,
    question="Is IT(RMS) within rating?",
    method="IT(RMS) per SCR from the exact waveform at high line, α_min and R at its low end "
           "(DC: √D·V_s/R).",
    source="Rashid 4e §11 (Ex 11.8); Bimbhra ch. 4",
    fn=_fn_currents(power.rms_current_check), bind=_bind_rms,
    units={"it_rms": "A"}, summarise=_sum_rms,
    fix="Choose a part with a higher IT(RMS), or limit the load current.",
))


def _bind_avg(ctx: Context) -> Bound:
    b = Bound()
    if not _hot_or_na(ctx, b, {"it_av_rating": "it_av"}):
        return b
    part = _scr(ctx)
    vt0 = ctx.read(b, "vt0", f"parts.{part.ref}.vt0")
    rt = ctx.read(b, "rt", f"parts.{part.ref}.rt")
    if vt0 is None or rt is None:
        b.inputs.pop("vt0", None)
        b.inputs.pop("rt", None)
        b.notes.append("no vt0/rt: the equal-RMS derating bound is used (conservative)")
    _bind_currents(ctx, b)
    return b


def _sum_avg(r: Reduced) -> str:
    rating = r.bound.inputs["it_av_rating"].value.nom
    text = (f"IT(AV) {span(r.lo['it_av'], r.hi['it_av'], 'A')} against {eng(rating, 'A')} "
            f"derated to {eng(r.worst['it_av_allowed'], 'A')} at form factor "
            f"{r.worst['form_factor']:.3g}")
    if r.status != "pass":
        need = rating * r.worst["it_av"] / r.worst["it_av_allowed"]
        text += f"; fails: needs an IT(AV) rating of about {at_least(need, 'A')}"
    return text + _lost_text(r)


register(CheckDef(
    id="power.average-current", kinds=POWER,
    question="Is IT(AV) within the rating derated for the conduction angle (form factor)?",
    method="it_av_allowed solves rT·FF²·I² + VT0·I = VT0·IT(AV),r + rT·(π/2)²·IT(AV),r² "
           "(equal loss with the 180° half-sine rating); without VT0/rT the equal-RMS bound "
           "IT(AV),r·(π/2)/FF.",
    source="Bimbhra, Power Electronics ch. 4 (form factor, current derating)",
    fn=_fn_currents(power.average_current_check), bind=_bind_avg,
    units={"it_av": "A", "form_factor": "1", "it_av_allowed": "A"}, summarise=_sum_avg,
    fix="Choose a part with a higher IT(AV), or widen the conduction angle at full load.",
))


def _bind_junction(ctx: Context) -> Bound:
    b = Bound()
    hs = ctx.stage.get("heatsink")
    if not isinstance(hs, dict):
        b.missing.append(_sp(ctx, "heatsink") + " (its rth_sa)")
        return b
    if not _hot_or_na(ctx, b, {"vt0": "vt0", "rt": "rt", "rth_jc": "rth_jc",
                               "tj_max": "tj_max"}):
        return b
    ctx.need(b, "rth_sa", _sp(ctx, "heatsink.rth_sa"))
    ctx.read(b, "rth_cs", _sp(ctx, "heatsink.rth_cs"), default=0.0,
             dim="thermal_resistance", unit="K/W")
    b.options["devices"] = int(hs.get("devices", 1))
    ctx.ambient_max(b, "t_max")
    _bind_currents(ctx, b, sweep=7, extra=(math.pi / 2,))
    return b


def _sum_junction(r: Reduced) -> str:
    tj_max = r.bound.inputs["tj_max"].value.nom
    n = r.bound.options.get("devices", 1)
    text = (f"Tj {eng(r.hi['junction_temperature'], 'degC')} at maximum ambient with "
            f"{eng(r.hi['device_loss'], 'W')} per SCR"
            + (f" ({n} on the heatsink)" if n > 1 else "")
            + f", against {eng(tj_max, 'degC')}")
    if r.status != "pass":
        h = r.limits.get("headroom_marginal", 25.0)
        need = r.lo["rth_sa_required"]
        fix = (f"needs Rth(s-a) ≤ {at_most(need, 'K/W')}" if need > 0 else
               "no heatsink is enough: less loss or a lower Rth(j-c) + Rth(c-s) is needed")
        text += f"; {r.status} ({h:g} K headroom wanted): {fix}"
    else:
        text += f"; Rth(s-a) up to {at_most(r.lo['rth_sa_required'], 'K/W')} would do"
    return text + "; steady state only" + _lost_text(r)


register(CheckDef(
    id="power.junction", kinds=POWER,
    question="Steady junction temperature at maximum ambient, high line, worst firing angle.",
    method="P = VT0·IT(AV) + rT·IT(RMS)²; Tj = Ta,max + ΔT_enc + n·P·Rth(s-a) + "
           "P·(Rth(j-c) + Rth(c-s)); Tj ≤ tj_max − 25 K passes, ≤ tj_max marginal.",
    source="Rashid 4e §17 (cooling); Bimbhra ch. 4 (thyristor losses)",
    fn=_fn_currents(power.junction_check), bind=_bind_junction,
    units={"device_loss": "W", "junction_temperature": "degC", "rth_sa_required": "K/W"},
    summarise=_sum_junction,
    fix="A heatsink with a lower Rth(s-a), fewer devices on it, or a part with less drop.",
    cautions=("Rth(s-a) is normally quoted for free air, vertical fins and sea level; derate it "
              "for the installation.",),
))


# --------------------------------------------------------------------------------------------
# power.surge

def _bind_surge(ctx: Context) -> Bound:
    b = Bound()
    if not _hot_or_na(ctx, b, {"itsm": "itsm"}):
        return b
    part = _scr(ctx)
    _bind_supply(ctx, b)
    ctx.read(b, "t_sm", f"parts.{part.ref}.itsm_duration", default=0.01, dim="time", unit="s")
    if ctx.read(b, "r_cold", _sp(ctx, "load.cold_r")) is None:
        ctx.need(b, "r_cold", _sp(ctx, "load.r"))
        b.notes.append("cold_r not given: the running load R is used for the inrush")
    ctx.read(b, "l", _sp(ctx, "load.l"), default=0.0, dim="inductance", unit="H")
    b.notes[:] = [n for n in b.notes if not n.startswith("l not given")]
    b.options["topology"] = ctx.stage.get("topology")
    if ctx.stage.get("freewheel") and ctx.stage.get("topology") != "ac-switch":
        b.options["freewheel"] = True
    _bind_surge_emf(ctx, b)
    _bind_firing(ctx, b, sweep=7, extra=(math.pi / 2,))
    return b


def _bind_surge_emf(ctx: Context, b: Bound) -> None:
    """The back EMF at the first firing: none for a motor at standstill (or an EMF of unknown
    kind), the lowest for a battery (deeply discharged)."""
    kind = _emf_type(ctx)
    if kind is None:
        return
    b.options["emf"] = kind
    if kind == "battery":
        e = ctx.project.lookup(_sp(ctx, "load.e"))
        b.add("e_start", _sp(ctx, "load.e") + "#min", e.at(e.lo))
        b.notes.append("the battery at its lowest E for the first firing")
    else:
        b.add("e_start", _sp(ctx, "load.e") + "#start", Value.fixed(0.0, "voltage", "V"))
        b.notes.append("no back EMF at the first firing (a motor at standstill: the stall "
                       "current)")


def _fn_surge(**kw: Any) -> Outcome:
    a, lo, hi = _firing(kw)
    freewheel = bool(kw.pop("freewheel", False))
    topology = kw["topology"]
    omega = _omega(kw)
    e = kw.get("e_start")
    if e is not None:
        for k in ("topology", "emf"):
            kw.pop(k)
        out = rle.surge_check(alpha=a, omega=omega, **kw)
    else:
        out = power.surge_check(alpha=a, omega=omega, **kw)
    if topology != "bridge" and not freewheel:
        return out  # the current starts from zero every cycle: the first one is the worst
    # A bridge (or a freewheeling diode) can carry the current on from one half-cycle into the
    # next: from rest it builds up over the first cycles, into the still cold load or the
    # still stalled motor, to the steady current, whose peak is then the inrush.
    steady = power.stage_values(topology=topology, freewheel=freewheel, vs=kw["vs"],
                                r=kw["r_cold"], l=kw["l"], omega=omega, alpha=a, peak=True,
                                e=e)["it_peak"]
    first = out.values["inrush_peak"]
    peak = np.maximum(first, steady)
    rating = out.values["itsm_at_line"]
    with np.errstate(divide="ignore"):
        margin, status = grade(rating / peak, kw["limits"])
    values = dict(out.values, inrush_peak=peak, first_peak=first + 0 * peak)
    return Outcome(values, margin, status, out.notes)


def _sum_surge(r: Reduced) -> str:
    rating = r.lo["itsm_at_line"]
    text = (f"cold-load inrush peak {eng(r.hi['inrush_peak'], 'A')} against ITSM "
            f"{eng(rating, 'A')} (at the line's half-cycle)")
    first = r.worst.get("first_peak", float("nan"))
    if first == first and r.worst["inrush_peak"] > first * (1 + 1e-6):
        text += (f"; the current builds up from {eng(first, 'A')} in the first half-cycle to "
                 "the steady current of the cold (or stalled) load within a few cycles")
    if r.status != "pass":
        text += (f"; fails: needs ITSM ≥ {at_least(r.hi['inrush_peak'], 'A')}, a soft start "
                 "(α_min later), or an inrush limiter")
    if r.bound.inputs["r_cold"].path.endswith("cold_r"):
        text += "; a cold lamp's inrush lasts several cycles and ITSM covers one"
    return text


register(CheckDef(
    id="power.surge", kinds=("phase-control",),
    question="Is the worst inrush (cold load, first half-cycle at high line) within ITSM?",
    method="R load: √2·V_s,max/R_cold when the range reaches 90° (else at α_min); R–L: the peak "
           "of i(θ) with R_cold; a bridge or a freewheeling stage: the larger of that and the "
           "steady current's peak with R_cold (and the starting E), which the first cycles "
           "build up to. ITSM converted to the line's half-cycle by I^N·t = const "
           "(N = 4 below t_sm, 2 above).",
    source="Rashid 4e §17; Bimbhra ch. 4 (surge rating)",
    fn=_fn_surge, bind=_bind_surge,
    units={"inrush_peak": "A", "first_peak": "A"}, summarise=_sum_surge,
    fix="A part with a higher ITSM, a soft start, or an inrush limiter.",
))


# --------------------------------------------------------------------------------------------
# power.fuse (and power.fault): the SCR's I²t

def bind_device_i2t(ctx: Context, b: Bound) -> bool:
    """Read the SCR's surge duration t_sm and its I²t, or its ITSM (unless already read) for
    ITSM²·t_sm/2; False (a missing key named) when neither is given."""
    part = _scr(ctx)
    ctx.read(b, "t_sm", f"parts.{part.ref}.itsm_duration", default=0.01, dim="time", unit="s")
    if ctx.read(b, "i2t", f"parts.{part.ref}.i2t") is not None:
        return True
    if "itsm" not in b.inputs and ctx.read(b, "itsm", f"parts.{part.ref}.itsm") is None:
        b.missing.append(f"parts.{part.ref}.i2t (or itsm)")
        return False
    b.notes.append("i2t not given: ITSM²·t_sm/2 of the surge half-sine used")
    return True


def device_i2t(*, i2t: Any, itsm: Any, t_sm: Any) -> Any:
    """The SCR's I²t [A²s]: as given, else ITSM²·t_sm/2 of the surge half-sine."""
    if i2t is not None:
        return i2t
    return np.asarray(itsm, dtype=float) ** 2 * np.asarray(t_sm, dtype=float) / 2


def _bind_fuse(ctx: Context) -> Bound:
    b = Bound()
    fuse = ctx.stage.get("fuse")
    if not isinstance(fuse, dict):
        b.not_applicable = "no `fuse` given"
        return b
    ctx.need(b, "fuse_i2t", _sp(ctx, "fuse.i2t"))
    if not bind_device_i2t(ctx, b):
        return b
    if ctx.read(b, "t_base", _sp(ctx, "fuse.clearing_time")) is not None:
        b.options["base"] = "the fuse's clearing time"
    elif _is_dc(ctx):
        b.inputs["t_base"] = b.inputs["t_sm"]
        b.options["base"] = "t_sm (DC supply)"
    else:
        ctx.need(b, "freq", "supply.frequency")
        b.options["base"] = "the line's half-cycle"
    return b


def _fn_fuse(*, fuse_i2t: Any, t_sm: Any, limits: Mapping[str, float], base: str = "",
             i2t: Any = None, itsm: Any = None, t_base: Any = None, freq: Any = None) -> Outcome:
    t_sm = np.asarray(t_sm, dtype=float)
    dev = device_i2t(i2t=i2t, itsm=itsm, t_sm=t_sm)
    tb = t_base if t_base is not None else 0.5 / np.asarray(freq, dtype=float)
    out = power.fuse_check(fuse_i2t=fuse_i2t, i2t=dev, t_sm=t_sm, t_base=tb, limits=limits)
    out.values["t_base"] = np.asarray(tb, dtype=float) + 0 * out.values["device_i2t"]
    return out


def _sum_fuse(r: Reduced) -> str:
    text = (f"fuse clearing I²t {eng(r.hi['fuse_i2t'], 'A^2*s')} against the SCR's "
            f"{eng(r.lo['device_i2t'], 'A^2*s')} at {eng(r.worst['t_base'], 's')} "
            f"({r.bound.options.get('base', '')})")
    if r.status != "pass":
        text += (f"; fails: needs a fuse with clearing I²t < {at_most(r.lo['device_i2t'], 'A^2*s')}"
                 " or an SCR with more I²t")
    return text


register(CheckDef(
    id="power.fuse", kinds=POWER,
    question="Does the fuse clear before the SCR's I²t is spent?",
    method="device I²t converted to the fuse's clearing time (else the line half-cycle; DC: "
           "t_sm) by I²t(t) = I²t(t_sm)·(t/t_sm)^((N−2)/N), N = 4 below t_sm, 2 above; pass when "
           "the fuse's total clearing I²t is smaller.",
    source="Rashid 4e §17 (Ex 17.6, fuse coordination); Bimbhra ch. 4",
    fn=_fn_fuse, bind=_bind_fuse,
    units={"fuse_i2t": "A^2*s", "device_i2t": "A^2*s"}, summarise=_sum_fuse,
    fix="A faster semiconductor-protection fuse, or an SCR with a larger I²t.",
    cautions=("Fuse class, voltage rating, arc voltage and current rating are manual checklist "
              "questions.",),
))


# --------------------------------------------------------------------------------------------
# power.latching, power.holding

def _bind_cold(ctx: Context, b: Bound, key: str) -> bool:
    part = _scr(ctx)
    if part.params.get(key) is None:
        b.missing.append(f"parts.{part.ref}.{key}")
        return False
    ctx.cold(b, key, part, key)
    ctx.ambient_min(b)
    return True


def _cold_of(kw: dict[str, Any], key: str) -> np.ndarray:
    v = kw.pop(key)
    return cold_value(v, kw.pop("t_min"), v_cold=kw.pop(key + "_cold"),
                      t_cold=kw.pop(key + "_cold_at"), k=2.0)


def _bind_latching(ctx: Context) -> Bound:
    b = Bound()
    if not _bind_cold(ctx, b, "il"):
        return b
    b.options["kind"] = "dc" if _is_dc(ctx) else "ac"
    ctx.need(b, "vs", "supply.voltage")
    _bind_load(ctx, b)
    if not _is_dc(ctx):
        ctx.need(b, "freq", "supply.frequency")
        _bind_firing(ctx, b)
    return b


def _fn_latching(**kw: Any) -> Outcome:
    il = _cold_of(kw, "il")
    if kw["kind"] == "dc":
        l_load = kw.pop("l")
        out = power.latching_check(il_cold=il, **kw)
        with np.errstate(divide="ignore", invalid="ignore"):
            x = np.asarray(il * kw["r"] / kw["vs"], dtype=float)
            t_il = np.where(x < 1, -np.asarray(l_load) / kw["r"] * np.log1p(-np.minimum(x, 1)),
                            np.nan)
        out.values["time_to_il"] = t_il + 0 * out.margin
        return out
    a, lo, hi = _firing(kw)
    if "e" in kw:
        kw.pop("kind")
        kw.pop("emf")
        return rle.latching_check(il_cold=il, alpha=a, alpha_lo=lo, alpha_hi=hi,
                                  omega=_omega(kw), **kw)
    return power.latching_check(il_cold=il, alpha=a, alpha_lo=lo, alpha_hi=hi,
                                omega=_omega(kw), **kw)


def _sum_latching(r: Reduced) -> str:
    il = r.worst["il"]
    if r.bound.options["kind"] == "dc":
        text = (f"load current {eng(r.lo['anode_current_at_fire'], 'A')} at low line against "
                f"IL {eng(il, 'A')} (cold)")
        t = r.hi.get("time_to_il", float("nan"))
        if t == t and t > 0:
            text += f"; the inductive load needs {eng(t, 's')} to reach IL (see gate.latch-time)"
        if r.status != "pass":
            r_need = r.bound.inputs["vs"].value.lo / il
            text += f"; fails: needs load R ≤ {at_most(r_need, 'ohm')}"
        return text + "; on-state drop not subtracted"
    amax = r.lo["max_firing_angle"]
    text = (f"anode current after firing reaches {eng(r.lo['reach_current'], 'A')} at the ends "
            f"of the firing range against IL {eng(il, 'A')} (cold, low line)")
    if amax == amax:
        text += f"; latest firing that latches {at_most(amax, 'deg')}"
    if r.status != "pass":
        text += (f"; fails: needs α_max ≤ {at_most(amax, 'deg')}" if amax == amax else
                 f"; fails: even full output stays below IL: needs load R ≤ "
                 f"{at_most(r.bound.inputs['r'].value.lo * r.lo['reach_current'] / il, 'ohm')}")
    return text + "; the SCR as an ideal switch"


register(CheckDef(
    id="power.latching", kinds=POWER,
    question="Does the anode current reach IL at the extremes of the firing range (cold IL)?",
    method="AC: the largest current after firing at α_min and α_max (R: Vm·sin(max(α, 90°))/R; "
           "R–L: the peak of i(θ)) ≥ IL_c at low line; max_firing_angle = π − asin(IL_c·R/Vm). "
           "DC: V_s,min/R ≥ IL_c.",
    source="Rashid 4e §7 (latching current); Bimbhra ch. 4",
    fn=_fn_latching, bind=_bind_latching,
    units={"anode_current_at_fire": "A", "il": "A", "max_firing_angle": "deg"},
    summarise=_sum_latching,
    fix="Limit α_max, lower the load R, or add a bleeder resistor across the load.",
    optional=frozenset({"max_firing_angle", "time_to_il", "reach_current"}),
))


def _bind_holding(ctx: Context) -> Bound:
    b = Bound()
    if not _bind_cold(ctx, b, "ih"):
        return b
    b.options["kind"] = "dc" if _is_dc(ctx) else "ac"
    ctx.need(b, "vs", "supply.voltage")
    if _is_dc(ctx):
        ctx.need(b, "r", _sp(ctx, "load.r"))
        return b
    _bind_load(ctx, b)
    ctx.need(b, "freq", "supply.frequency")
    _bind_firing(ctx, b)
    if "e" in b.inputs:
        _bind_stage_options(ctx, b)
    return b


def _fn_holding(**kw: Any) -> Outcome:
    ih = _cold_of(kw, "ih")
    if kw["kind"] == "dc":
        return power.holding_check(ih_cold=ih, **kw)
    a = _angles(kw)("alpha")
    if "e" in kw:
        for k in ("kind", "emf"):
            kw.pop(k)
        return rle.holding_check(ih_cold=ih, alpha=a, omega=_omega(kw), **kw)
    return power.holding_check(ih_cold=ih, alpha=a, omega=_omega(kw), **kw)


def _sum_holding(r: Reduced) -> str:
    ih = r.worst["ih"]
    if r.bound.options["kind"] == "dc":
        text = (f"load current {eng(r.lo['load_current'], 'A')} at low line against IH "
                f"{eng(ih, 'A')} (cold)")
        if r.status != "pass":
            k = r.limits.get("marginal_below", 2.0)
            vs = r.bound.inputs["vs"].value.lo
            text += f"; {r.status}: needs load R ≤ {at_most(vs / (k * ih), 'ohm')} for {k:g}×IH"
        return text + "; on-state drop not subtracted"
    text = (f"the anode current falls to IH {eng(ih, 'A')} (cold) at "
            f"{span(r.lo['dropout_angle'], r.hi['dropout_angle'], 'deg')}")
    if r.status != "pass":
        text += (f"; fails: the current never reaches IH at some corner (peak "
                 f"{eng(r.lo['load_current'], 'A')}): needs a lower load R or an earlier α_max")
    return text + "; the SCR as an ideal switch"


register(CheckDef(
    id="power.holding", kinds=POWER,
    question="DC switch: does the load current stay above IH? AC: where does it drop out?",
    method="DC: V_s,min/R against IH_c (pass ≥ 2×, marginal 1–2×). AC: dropout angle π − "
           "asin(IH_c·R/Vm) (R), or where i(θ) falls to IH_c before β (R–L); reported.",
    source="Singhal & Gupta, Introduction to Electric Drives ch. 1 (Ex 1_3); Rashid 4e §7",
    fn=_fn_holding, bind=_bind_holding,
    units={"load_current": "A", "ih": "A", "dropout_angle": "deg"}, summarise=_sum_holding,
    fix="Lower the load R (or add a bleeder) so the current stays above IH.",
    optional=frozenset({"dropout_angle"}),
))


# --------------------------------------------------------------------------------------------
# power.didt

def _bind_didt(ctx: Context) -> Bound:
    b = Bound()
    if not _hot_or_na(ctx, b, {"didt_rating": "didt"}):
        return b
    b.options["kind"] = "dc" if _is_dc(ctx) else "ac"
    ctx.need(b, "vs", "supply.voltage")
    ls = ctx.read(b, "l_s", "supply.inductance")
    ll = ctx.read(b, "l", _sp(ctx, "load.l"))
    if ls is None and ll is None:  # di/dt is then bounded only by the wiring
        b.missing.append("supply.inductance (or " + _sp(ctx, "load.l") + ")")
        return b
    if _emf_type(ctx) is not None:
        ctx.need(b, "e", _sp(ctx, "load.e"))
    if not _is_dc(ctx) and _carries_at_firing(ctx) and ll is not None and ll.hi > 0:
        # The load current may still flow when the SCR fires: it then moves over through the
        # supply inductance alone (the load's L holds it), so that inductance must be known.
        given = "inductance" in (ctx.project.raw.get("supply") or {})
        if ls is None or (ls.hi <= 0 and not given):
            b.missing.append("supply.inductance (a bridge's or freewheeling load's current "
                             "moves to the firing SCR through it alone)")
            return b
        b.options["topology"] = ctx.stage.get("topology")
        b.options["freewheel"] = bool(ctx.stage.get("freewheel", False))
        if "e" in b.inputs:
            b.options["emf"] = _emf_type(ctx)
        ctx.need(b, "r", _sp(ctx, "load.r"))
        ctx.need(b, "freq", "supply.frequency")
    snubs = ctx.stages_of(("rc-snubber",), "across", ctx.stage.id)
    if snubs:
        sn = snubs[0]
        b.options["snubber"] = sn.id
        if ctx.read(b, "snub_ld", ctx.stage_path("discharge_inductance", sn)) is None:
            ctx.need(b, "snub_r", ctx.stage_path("r", sn))
            part = _scr(ctx)
            ctx.read(b, "t_on", f"parts.{part.ref}.tgt", default=1e-6, dim="time", unit="s")
    if not _is_dc(ctx):
        _bind_firing(ctx, b, sweep=7, extra=(math.pi / 2,))
    return b


def _carries_at_firing(ctx: Context) -> bool:
    """A fully controlled bridge (continuous conduction) or a freewheeling diode can still
    carry the load current when the SCR fires."""
    return ctx.stage.get("topology") == "bridge" or (
        ctx.stage.get("topology") != "ac-switch" and bool(ctx.stage.get("freewheel", False)))


def _continuous_at(kw: dict[str, Any], omega: Any, e: Any, alpha: Any) -> np.ndarray:
    v = power.stage_values(topology=kw["topology"], freewheel=kw["freewheel"], vs=kw["vs"],
                           r=kw["r"], l=kw["l"], omega=omega, alpha=alpha, peak=False,
                           e=None if e is None else e)
    return np.asarray(v["continuous"]) > 0


def _handover_didt(kw: dict[str, Any], a: Any, lo: Any, hi: Any, e: Any) -> tuple[np.ndarray,
                                                                                 np.ndarray]:
    """di/dt where the load current still flows at firing [A/s], and the angle it is at
    (−1 where it never flows at firing).

    The incoming SCR takes the current over from the outgoing pair (full bridge: all four on,
    the bridge shorts its DC side, L_s·di_s/dt = v_s and each incoming SCR carries
    (i_s + I_d)/2) or from the freewheeling diode (load held at 0 V: L_s·di/dt = v_s), so
    the load's L and E are out of that loop  (Mohan, Undeland, Robbins, Power Electronics
    3e, §5-3 and §6-3, from memory). Within the firing range, the largest sin α of an angle
    that still finds the current flowing: the continuity boundary is found per row on a
    33-point grid of [α_lo, α_hi] and refined by 30 bisection steps; 0 A/s where the current
    is never flowing at firing.
    """
    omega = 2 * np.pi * np.asarray(kw["freq"], dtype=float)
    vs = np.asarray(kw["vs"], dtype=float)
    shape = np.broadcast(a, lo, hi, vs, kw["r"], kw["l"], omega,
                         0.0 if e is None else e).shape
    lo_, hi_ = (np.broadcast_to(np.asarray(x, dtype=float), shape).ravel() for x in (lo, hi))
    row = {n: np.broadcast_to(np.asarray(kw[n], dtype=float), shape).ravel()
           for n in ("vs", "r", "l")}
    om = np.broadcast_to(omega, shape).ravel()
    ee = None if e is None else np.broadcast_to(np.asarray(e, dtype=float), shape).ravel()
    sub = {"topology": kw["topology"], "freewheel": kw["freewheel"], **row}
    frac = np.linspace(0.0, 1.0, 33)
    grid = lo_[:, None] + (hi_ - lo_)[:, None] * frac
    bc = {n: x[:, None] for n, x in row.items()}
    cont = _continuous_at(sub | bc, om[:, None], None if ee is None else ee[:, None], grid)
    # The last grid angle at which the current still flows, and the next one up.
    any_c = cont.any(axis=1)
    last = np.where(any_c, 32 - np.argmax(cont[:, ::-1], axis=1), 0)
    t_lo = lo_ + (hi_ - lo_) * np.minimum(last, 32) / 32
    t_hi = np.minimum(t_lo + (hi_ - lo_) / 32, hi_)
    for _ in range(30):
        mid = 0.5 * (t_lo + t_hi)
        c = _continuous_at(sub, om, ee, mid)
        t_lo = np.where(c, mid, t_lo)
        t_hi = np.where(c, t_hi, mid)
    # Over [α_lo, boundary] the largest sin α: at 90° when it lies inside, else the end
    # nearest it.
    at = np.clip(np.pi / 2, lo_, t_lo)
    factor = 1.0 if kw["freewheel"] else 2.0  # a full bridge shares the rise over two SCRs
    rate = np.sqrt(2.0) * row["vs"] * np.sin(at) / (factor * np.broadcast_to(
        np.asarray(kw["l_s"], dtype=float), shape).ravel())
    rate = np.where(any_c, rate, 0.0)
    return rate.reshape(shape), np.where(any_c, at, -1.0).reshape(shape)


def _fn_didt(*, kind: str, vs: Any, didt_rating: Any, limits: Mapping[str, float],
             l_s: Any = 0.0, l: Any = 0.0, snubber: str = "", snub_ld: Any = None,  # noqa: E741
             snub_r: Any = None, t_on: Any = None, e: Any = 0.0, **kw: Any) -> Outcome:
    handover = "topology" in kw
    if kind == "ac":
        a, lo, hi = _firing(kw, vs=vs)
    else:
        a = np.pi / 2
    v = np.asarray(vs, dtype=float) if kind == "dc" else np.sqrt(2.0) * np.asarray(vs) * np.sin(a)
    snub = 0.0
    if snubber:
        with np.errstate(divide="ignore"):
            snub = v / snub_ld if snub_ld is not None else (v / snub_r) / t_on
    l_tot = np.asarray(l_s) + np.asarray(l)
    if not handover:
        return power.didt_check(kind=kind, vs=vs, l_tot=l_tot, alpha=a, snub_didt=snub,
                                didt_rating=didt_rating, limits=limits, e=e)
    kw.update(vs=vs, l=l, l_s=l_s)
    e_in = e if "emf" in kw else None  # the back EMF's option is only bound with `load.e`
    omega = 2 * np.pi * np.asarray(kw["freq"], dtype=float)
    # At the row's own angle: through L_s alone when the current flows, else from zero
    # through L_s + L against E; then the worst angle of the range that still finds it
    # flowing (the continuity boundary is an interior extreme the sweep does not hold).
    flowing = _continuous_at(kw, omega, e_in, a)
    factor = 1.0 if kw["freewheel"] else 2.0
    l_row = np.where(flowing, factor * np.asarray(l_s, dtype=float), l_tot)
    e_row = np.where(flowing, 0.0, np.asarray(e, dtype=float))
    out = power.didt_check(kind=kind, vs=vs, l_tot=l_row, alpha=a, snub_didt=snub,
                           didt_rating=didt_rating, limits=limits, e=e_row)
    worst, at = _handover_didt(kw, a, lo, hi, e_in)
    snub_at = 0.0
    if snubber:
        v_at = np.sqrt(2.0) * np.asarray(vs, dtype=float) * np.sin(np.maximum(at, 0.0))
        with np.errstate(divide="ignore"):
            snub_at = v_at / snub_ld if snub_ld is not None else (v_at / snub_r) / t_on
        snub_at = np.where(at < 0, 0.0, snub_at)
    rate = np.maximum(out.values["didt"], worst + snub_at)
    with np.errstate(divide="ignore"):
        margin, status = grade(np.asarray(didt_rating, dtype=float) / rate, limits)
    out = Outcome({"didt": rate, "handover_angle": at + 0 * rate}, margin, status)
    return out


def _sum_didt(r: Reduced) -> str:
    rating = r.bound.inputs["didt_rating"].value.nom
    sn = r.bound.options.get("snubber")
    text = f"di/dt at firing up to {eng(r.hi['didt'], 'A/s')} against {eng(rating, 'A/s')}"
    if sn:
        text += (f", with the snubber `{sn}` discharge"
                 + ("" if "snub_ld" in r.bound.inputs else
                    " (estimated over the turn-on time: no discharge_inductance given)"))
    at = r.worst.get("handover_angle", -1.0)
    if at >= 0:
        text += (f"; the load current is still flowing when the SCR fires (up to α = "
                 f"{_deg(at)}) and moves over through the supply inductance alone")
    if r.status != "pass" and at >= 0:
        ls = r.bound.inputs["l_s"].value.lo
        need = ls * r.hi["didt"] / rating
        text += (f"; fails: needs the line inductance ≥ {at_least(need, 'H')} (add a series "
                 "line reactor, then re-run the snubber checks)")
    elif r.status != "pass":
        ls = sum(r.bound.inputs[k].value.lo for k in ("l_s", "l") if k in r.bound.inputs)
        need = ls * r.hi["didt"] / rating
        text += (f"; fails: needs the loop inductance ≥ {at_least(need, 'H')} (add a series "
                 "inductor, then re-run the snubber checks)")
    return text + "; the rating assumes a hard, fast gate drive"


register(CheckDef(
    id="power.didt", kinds=POWER,
    question="Rate of rise of on-state current at firing, including the snubber's discharge.",
    method="V_m,max·sin α*/(L_s + L), α* = 90° where the range spans it, else the end nearest "
           "it (DC: V_s,max/L_tot); plus the snubber discharge V/L_d, or (V/R_sn)/t_on without "
           "L_d.",
    source="Rashid 4e §17 (di/dt protection)",
    fn=_fn_didt, bind=_bind_didt,
    units={"didt": "A/s"}, summarise=_sum_didt,
    fix="Add a series inductor L ≥ V_m,max/(di/dt)cr, or a larger snubber resistor.",
))


# --------------------------------------------------------------------------------------------
# power.control

def _bind_control(ctx: Context) -> Bound:
    b = Bound()
    if _emf_type(ctx) is not None:
        return _bind_control_emf(ctx, b)
    if ctx.stage.get("topology") != "ac-switch":
        b.not_applicable = "only an ac-switch loses control below the load angle"
        return b
    ll = ctx.read(b, "l", _sp(ctx, "load.l"))
    if ll is None or ll.hi == 0:
        b.not_applicable = "a resistive load: no load angle"
        return b
    ctx.need(b, "r", _sp(ctx, "load.r"))
    ctx.need(b, "freq", "supply.frequency")
    _bind_firing(ctx, b)
    if ctx.stage.get("control") == "burst":
        bind_burst_pulse(ctx, b, lambda: gate_pulse(ctx, ctx.stage))
    return b


def bind_burst_pulse(ctx: Context, b: Bound, from_gate: Any = None) -> None:
    """Burst control fires at the voltage zero, before an inductive load's current zero: the
    question is whether the gate pulse outlasts it. The pulse is `burst.pulse` when given,
    else what ``from_gate()`` knows of the gate drive's pulse (None: not known)."""
    burst = ctx.stage.get("burst")
    given = burst.get("pulse") if isinstance(burst, dict) else None
    if isinstance(given, Value):
        ctx.need(b, "pulse", _sp(ctx, "burst.pulse"))
        b.options["burst_pulse"] = "burst.pulse"
        return
    width = from_gate() if from_gate is not None else None
    b.options["burst_pulse"] = width  # the gate drive's width [s], "held", or None


def _bind_control_emf(ctx: Context, b: Bound) -> Bound:
    """A back-EMF load: control starts where the line first exceeds E (θ1 = asin(E/Vm))."""
    b.options["emf"] = _emf_type(ctx)
    ctx.need(b, "vs", "supply.voltage")
    ctx.need(b, "e", _sp(ctx, "load.e"))
    if ctx.stage.get("topology") in rle.TOPOLOGIES:
        # The load decides whether a current still flows at a firing below θ1.
        b.options["topology"] = ctx.stage.get("topology")
        b.options["freewheel"] = bool(ctx.stage.get("freewheel", False))
        ctx.need(b, "r", _sp(ctx, "load.r"))
        ctx.read(b, "l", _sp(ctx, "load.l"), default=0.0, dim="inductance", unit="H")
        b.notes[:] = [n for n in b.notes if not n.startswith("l not given")]
        ctx.need(b, "freq", "supply.frequency")
    _bind_firing(ctx, b)
    return b


def _fn_control(**kw: Any) -> Outcome:
    if "emf" in kw:
        kw.pop("emf")
        angle = _angles(kw)
        lo, hi = angle("lo"), angle("hi")
        if "topology" in kw:
            kw["omega"] = _omega(kw)
        kw.pop("freq", None)
        return rle.control_check(alpha_lo=lo, alpha_hi=hi, **kw)
    lo = _angles(kw)("lo")
    kw.pop("vs", None)
    if "burst_pulse" in kw:
        return burst_pulse_outcome(kw, _omega(kw))
    return power.control_check(alpha_lo=lo, omega=_omega(kw), **kw)


def burst_pulse_outcome(kw: dict[str, Any], omega: Any) -> Outcome:
    """burst.pulse_check for a bound burst stage (``r``, ``l``, and the pulse)."""
    from checks import burst

    phi = np.arctan2(omega * np.asarray(kw["l"], dtype=float), np.asarray(kw["r"], dtype=float))
    opt = kw["burst_pulse"]
    if "pulse" in kw:
        pulse = kw["pulse"]
    elif opt == "held":  # a gate held while the drive is on: through every half-cycle
        pulse = np.pi / np.asarray(omega, dtype=float)
    else:
        pulse = float("nan") if opt is None else opt
    return burst.pulse_check(phi=phi, omega=omega, pulse=pulse, limits=kw["limits"])


def _sum_control(r: Reduced) -> str:
    if "emf" in r.bound.options:
        return _sum_control_emf(r)
    if "burst_pulse" in r.bound.options:
        return sum_burst_pulse(r)
    phi = r.hi["load_angle"]
    text = f"load angle φ up to {_deg(phi)} against the earliest firing"
    if r.status != "pass":
        text += (f"; fails: needs α_min ≥ {at_least(phi, 'deg')}, or wide gate pulses / a "
                 "pulse train (else one SCR can miss its pulse and DC flows in the load)")
    return text


def sum_burst_pulse(r: Reduced, device: str = "SCR") -> str:
    """The summary of a burst stage's pulse against its R–L load's current zero."""
    need = r.hi["required_width"]
    text = (f"integral-cycle control fires at the voltage zero; with φ up to "
            f"{_deg(r.hi['load_angle'])} the current's zero lags it by "
            f"{span(r.lo['steady_lag_time'], r.hi['steady_lag_time'], 's')} in steady state and "
            f"by up to {eng(need, 's')} ({_deg(r.hi['first_zero_lag'])}) after the first "
            f"half-cycle of a burst, whose current peaks at up to "
            f"{r.hi['inrush_factor']:.2f}× the steady peak (power.surge grades that peak)")
    src = r.bound.options["burst_pulse"]
    if src is None:
        text += ("; the gate pulse width is not known: give burst.pulse, how long the gate "
                 "is driven from each voltage zero (a zero-crossing opto driver fires only "
                 "near the voltage zero, so it cannot follow a lagging current)")
    elif src == "held":
        text += "; the DC gate drive holds the gate through every half-cycle of a burst"
    else:
        text += (f"; gate pulse {span(r.lo['pulse_width'], r.hi['pulse_width'], 's')}"
                 + (" (burst.pulse)" if src == "burst.pulse" else " (the gate drive's)"))
    other = "the other SCR's" if device == "SCR" else "the previous half-cycle's"
    if r.status != "pass":
        text += (f"; fails: a pulse that ends before {other} current zero is missed, one "
                 f"polarity conducts alone and DC flows in the load (a transformer or motor "
                 f"saturates): give a gate pulse ≥ {at_least(need, 's')} from the voltage "
                 f"zero (burst.pulse = \"{at_least(need, 's')}\"), or hold the gate (a pulse "
                 f"train) through every half-cycle of the burst (burst.pulse = half a cycle), "
                 f"or fire at the current zero instead")
    return text


def _sum_control_emf(r: Reduced) -> str:
    th1 = r.hi["emf_angle"]
    text = (f"the line exceeds the back EMF from θ1 = asin(E/Vm) = "
            f"{span(r.lo['emf_angle'], th1, 'deg')}; the earliest firing is "
            f"{_deg(r.lo['alpha_min'])}")
    kept = r.hi.get("kept_by_current", 0.0) > 0
    if r.status == "fail":
        text += (f"; fails: firing before {_deg(th1)} does nothing (a short gate pulse misses "
                 f"the half-cycle, a long one fires at θ1), so the range loses control below "
                 f"it: needs α_min ≥ {_deg(th1)}, or a gate pulse lasting past θ1")
        if kept:
            text += ("; at some corners the current still flows at α_min, which keeps "
                     "control there")
    elif kept:
        text += (f"; below θ1 = {_deg(th1)} control holds only while the current runs on "
                 "from the previous half-cycle (continuous conduction: the incoming SCR is "
                 "forward-biased at α_min and a narrow pulse fires it); from rest, or once "
                 "the current has stopped, a narrow pulse there does nothing: marginal, start "
                 f"from α ≥ {_deg(th1)} (a soft start) or hold the gate past θ1")
    last = r.lo["last_angle"]
    if r.hi["alpha_max"] >= last:
        text += (f"; above π − θ1 = {_deg(last)} the line never exceeds E again: no current "
                 "at all there")
    return text


register(CheckDef(
    id="power.control", kinds=("phase-control",),
    question="AC switch with an inductive load: is the minimum firing angle at or above the "
             "load angle?",
    method="φ = atan(ωL/R) at L max, R min, f max; pass when α_min ≥ φ. Burst control: the "
           "gate pulse against the first current zero after a voltage-zero start, "
           "(β(0, φ) − π)/ω. A back EMF: pass when α_min ≥ θ1 = asin(E/Vm); below it, "
           "marginal where the R–L–E current still flows at α_min (continuous: the incoming "
           "SCR is forward-biased, control holds while running but not from rest), else fail.",
    source="Rashid 4e §11 (AC voltage controllers with R–L loads, Ex 11.2)",
    fn=_fn_control, bind=_bind_control,
    units={"load_angle": "deg", "emf_angle": "deg", "first_zero_lag": "deg",
           "kept_by_current": "1",
           "required_width": "s", "steady_lag_time": "s", "pulse_width": "s"},
    summarise=_sum_control,
    fix="Raise α_min to at least φ, or drive the gates with wide pulses or a pulse train "
        "(burst control: a gate pulse lasting past the first current zero, a gate held "
        "through the burst, or firing at the current zero).",
))
