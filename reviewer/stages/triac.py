"""Triac stages (an AC switch with one triac, its gate drive) and the ``triac.*`` checks.

A triac stage is its own kind, not a ``device`` choice on ``phase-control``: its checks read
different part keys (one VDRM for both polarities, gate data per quadrant, the commutating
ratings) and carry both half-cycles in one die, so sharing the SCR checks would change their
inputs and with them every SCR sign-off's inputs hash.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

import numpy as np

from checks import power, triac
from checks import snubber as snubber_mod
from checks.core import Outcome, cold_value
from reviewer.fmt import at_least, at_most, eng, span
from reviewer.model import Part, Value
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
from reviewer.schema import TRIAC
from reviewer.stages import diac as diac_stage
from reviewer.stages.power import (
    BURST,
    bind_burst_firing,
    bind_burst_pulse,
    burst_pulse_outcome,
    sum_burst_pulse,
)

V = "value"
KIND = TRIAC
GATE_KIND = ("triac-gate",)
#: Gate stages that may fire a triac stage: the drive below, or an RC–diac trigger.
GATE_KINDS = ("triac-gate", "diac-rc")

LOAD = {
    "r": Param(V, "resistance", required=True),
    "l": Param(V, "inductance", allow_zero=True),
    "cold_r": Param(V, "resistance"),
    "hold_current": Param(V, "current"),
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

TRIAC_STAGE = register_kind(StageKind("triac-phase-control", {
    "triac": Param("part", required=True, part_type="triac"),
    "gate": Param("stage", stage_kinds=GATE_KINDS),
    "firing": Param(V, "angle", allow_zero=True),
    "load": Param("table", required=True, fields=LOAD),
    "heatsink": Param("table", fields=HEATSINK),
    "fuse": Param("table", fields=FUSE),
    "required": Param("required"),
    "control": Param("choice", choices=("phase", "burst")),
    "burst": Param("table", fields=BURST),
}, "one triac switching an AC load by firing angle"))

TRIAC_GATE = register_kind(StageKind("triac-gate", {
    "triac": Param("part", required=True, part_type="triac"),
    "mode": Param("choice", required=True, choices=tuple(triac.MODES)),
    "drive": Param(V, "voltage", required=True),
    "drive_drop": Param(V, "voltage", allow_zero=True),
    "series_r": Param(V, "resistance", required=True),
    "gate_cathode_r": Param(V, "resistance"),
}, "a DC or AC (opto-triac) gate drive for a triac"))

HALF_PI = math.pi / 2
FIRING_SWEEP = 13  # 15° steps: the commutation step and the latching current peak inside


# --------------------------------------------------------------------------------------------
# Binding helpers

def _part(ctx: Context) -> Part:
    part = ctx.part("triac")
    assert part is not None  # the loader checks the link
    return part


def _sp(ctx: Context, key: str) -> str:
    return ctx.stage_path(key)


def _pp(ctx: Context, key: str) -> str:
    return f"parts.{_part(ctx).ref}.{key}"


def _ratings(ctx: Context, b: Bound, names: dict[str, str]) -> bool:
    """Read part ratings (input name → key); incomplete, naming each missing key."""
    missing = [k for n, k in names.items() if ctx.want(b, n, _pp(ctx, k)) is None]
    return not missing


def _line(ctx: Context, b: Bound) -> None:
    ctx.need(b, "vs", "supply.voltage")
    ctx.need(b, "freq", "supply.frequency")


def _load(ctx: Context, b: Bound, *, r_name: str = "r") -> None:
    ctx.need(b, r_name, _sp(ctx, "load.r"))
    ctx.read(b, "l", _sp(ctx, "load.l"), default=0.0, dim="inductance", unit="H")
    b.notes[:] = [n for n in b.notes if not n.startswith("l not given")]


def _firing(ctx: Context, b: Bound, *, sweep: int = 0,
            extra: tuple[float, ...] = ()) -> bool:
    """The firing range ``alpha`` (swept) with ``alpha_lo``/``alpha_hi``; incomplete without."""
    fv = ctx.stage.get("firing")
    path = _sp(ctx, "firing")
    if _burst(ctx):
        bind_burst_firing(ctx, b)
        return True
    if not isinstance(fv, Value):
        gate = ctx.linked_stage("gate")
        if gate is not None and gate.kind == "diac-rc":
            diac_stage.bind_firing(ctx, b, gate, sweep=sweep, extra=extra)
            return True
        b.missing.append(path + (f" (the range `{gate.id}` fires over)" if gate else ""))
        return False
    b.add("alpha", path, fv, sweep=sweep if fv.varies else 0, extra=extra)
    b.add("alpha_lo", path + "#min", fv.at(fv.lo))
    b.add("alpha_hi", path + "#max", fv.at(fv.hi))
    return True


def _burst(ctx: Context) -> bool:
    return ctx.stage.get("control") == "burst"


def _snubber(ctx: Context) -> Any:
    snubs = ctx.stages_of(("rc-snubber",), "across", ctx.stage.id)
    return snubs[0] if snubs else None


def _omega(kw: dict[str, Any]) -> np.ndarray:
    return 2 * np.pi * np.asarray(kw.pop("freq"), dtype=float)


def _pop_range(kw: dict[str, Any]) -> tuple[Any, Any, Any]:
    if "diac_trigger" in kw:  # the running firing range of a diac-rc gate stage
        return diac_stage.firing_from(kw)
    return kw.pop("alpha"), kw.pop("alpha_lo", None), kw.pop("alpha_hi", None)


def _deg(x: float) -> str:
    return eng(x, "deg")


LOST = ("α < φ at some corners: control is lost, taken with narrow gate pulses (the worst "
        "case: one polarity conducts and DC flows in the load; see triac.control)")


def _lost_note(kw: Mapping[str, Any], alpha: Any, omega: Any) -> str:
    phi = np.arctan2(np.asarray(omega) * np.asarray(kw["l"]), np.asarray(kw["r"]))
    return LOST if np.any(np.asarray(alpha) < phi - 1e-12) else ""


def _with_line(core: Any) -> Any:
    """Wrap a pure check: the firing inputs and the frequency become α and ω."""
    def fn(**kw: Any) -> Outcome:
        a, _, _ = _pop_range(kw)
        w = _omega(kw)
        out: Outcome = core(alpha=a, omega=w, **kw)
        note = _lost_note(kw, a, w) if "l" in kw else ""
        if note:
            out.notes.append(note)
        return out
    return fn


def _lost_text(r: Reduced) -> str:
    return "; " + LOST if LOST in r.notes else ""


# --------------------------------------------------------------------------------------------
# triac.output

def _bind_output(ctx: Context) -> Bound:
    b = Bound()
    _line(ctx, b)
    _load(ctx, b)
    if not _firing(ctx, b, sweep=7):
        return b
    if _burst(ctx):
        burst = ctx.stage.get("burst")
        assert isinstance(burst, dict)  # the loader requires it with control = "burst"
        b.options["burst_period"] = int(burst["period"])
        on = ctx.need(b, "n_on", _sp(ctx, "burst.on"))
        b.add("n_lo", _sp(ctx, "burst.on") + "#min", on.at(on.lo))
        b.add("n_hi", _sp(ctx, "burst.on") + "#max", on.at(on.hi))
    req = ctx.stage.get("required")
    path = _sp(ctx, "required")
    if not isinstance(req, Value):
        b.options["quantity"] = "power"
        nan = Value.fixed(float("nan"), "power", "W")
        b.add("req_hi", path + "#none", nan)
        b.add("req_lo", path + "#none-min", nan)
        return b
    if req.dim == "current":
        b.not_applicable = ("`required` as a current is for a battery or motor load on an SCR "
                            "stage; give a power or a voltage (the load's RMS) for a triac")
        return b
    b.options["quantity"] = "power" if req.dim == "power" else "voltage"
    b.add("req_hi", path + "#max", req.at(req.hi))
    b.add("req_lo", path + "#min", req.at(req.lo) if req.varies
          else Value.fixed(float("nan"), req.dim, req.unit))
    return b


def _fn_output(**kw: Any) -> Outcome:
    a, lo, hi = _pop_range(kw)
    w = _omega(kw)
    if "burst_period" in kw:
        from checks import burst

        full = power.stage_values(topology="ac-switch", freewheel=False, vs=kw["vs"],
                                  r=kw["r"], l=kw["l"], omega=w, alpha=a, peak=False)
        out = burst.burst_output_check(
            p_full=full["load_power"], vs=kw["vs"], n_on=kw["n_on"], n_lo=kw["n_lo"],
            n_hi=kw["n_hi"], period=kw["burst_period"], req_lo=kw["req_lo"],
            req_hi=kw["req_hi"], quantity=kw["quantity"], limits=kw["limits"])
        out.values["conduction_angle"] = full["conduction"]
        return out
    out = power.output_check(topology="ac-switch", freewheel=False, alpha=a, alpha_lo=lo,
                             alpha_hi=hi, omega=w, **kw)
    note = _lost_note(kw, a, w)
    if note:
        out.notes.append(note)
    return out


def _sum_output(r: Reduced) -> str:
    if "burst_period" in r.bound.options:
        from reviewer.stages.power import _sum_burst

        return _sum_burst(r)
    q = r.bound.options.get("quantity", "power")
    unit, name = ("W", "load power") if q == "power" else ("V", "load V_rms")
    text = (f"{name} {span(r.lo['output_at_max'], r.hi['output_at_min'], unit)} over the firing "
            f"range (nominal {eng(r.nom['output_at_min'], unit)} at full output)")
    req_hi = r.bound.inputs["req_hi"].value.nom
    req_lo = r.bound.inputs["req_lo"].value.nom
    if req_hi != req_hi and req_lo != req_lo:
        text += "; no `required` range given: reported, not judged"
    if r.status != "pass":
        fixes = []
        if r.lo["output_at_min"] < req_hi:
            fixes.append(f"full output {eng(r.lo['output_at_min'], unit)} at low line is short of "
                         f"{eng(req_hi, unit)}: needs a smaller α_min")
        if req_lo == req_lo and r.hi["output_at_max"] > req_lo:
            fixes.append(f"minimum output {eng(r.hi['output_at_max'], unit)} at high line is "
                         f"above {eng(req_lo, unit)}: needs a later α_max")
        text += "; fails: " + "; ".join(fixes)
    if r.hi.get("load_angle", 0.0) > 0:
        text += (f"; current runs on to β = "
                 f"{span(r.lo['extinction_angle'], r.hi['extinction_angle'], 'deg')}")
    return text + _lost_text(r)


register(CheckDef(
    id="triac.output", kinds=KIND,
    question="What does the load get over the firing range, and does it meet `required`?",
    method="The ac-switch waveform (R: closed form; R–L: i(θ) from α to β): full output "
           "(α_min, low line) must reach required.max; the least (α_max, high line) must be at "
           "or below required.min.",
    source="Rashid 4e §11 (Ex 11.1, 11.2)",
    fn=_fn_output, bind=_bind_output,
    units={"vdc": "V", "vrms": "V", "load_power": "W", "extinction_angle": "deg",
           "conduction_angle": "deg", "shortcut_error": "1", "load_angle": "deg",
           "power_step": "W"},
    summarise=_sum_output,
    fix="Widen the firing range (smaller α_min for more output, later α_max for less).",
    optional=frozenset({"shortcut_error"}),
))


# --------------------------------------------------------------------------------------------
# triac.blocking

def _bind_blocking(ctx: Context) -> Bound:
    b = Bound()
    ctx.need(b, "vdrm", _pp(ctx, "vdrm"))
    ctx.need(b, "vs", "supply.voltage")
    sn = _snubber(ctx)
    if sn is not None:
        b.options["snubber"] = sn.id
        # Off, the line reaches the snubber through the load (and the supply's L): a divider
        # whose gain can exceed 1, and after each current zero the step rings above the line.
        # Read in triac.commutation's order, so that both checks have the same corner rows
        # and a diac trigger's firing angles, solved for one, are shared with the other.
        ctx.need(b, "freq", "supply.frequency")
        _load(ctx, b)
        ctx.need(b, "snub_r", ctx.stage_path("r", sn))
        ctx.need(b, "snub_c", ctx.stage_path("c", sn))
        if ctx.read(b, "snub_l", ctx.stage_path("inductance", sn)) is None:
            ctx.read(b, "snub_l", "supply.inductance", default=0.0, dim="inductance", unit="H")
        step = sn.get("step", "line")
        if isinstance(step, Value):
            b.add("snub_e", ctx.stage_path("step", sn), step)
        ctx.read(b, "l_s", "supply.inductance", default=0.0, dim="inductance", unit="H")
        b.notes[:] = [n for n in b.notes if not n.startswith("l_s not given")]
        gate = ctx.linked_stage("gate")
        if isinstance(ctx.stage.get("firing"), Value) or (gate is not None
                                                           and gate.kind == "diac-rc"):
            _firing(ctx, b, sweep=FIRING_SWEEP)
        else:
            b.options["no_firing"] = True
    return b


def _fn_blocking(*, vs: Any, vdrm: Any, limits: Mapping[str, float], snubber: str = "",
                 snub_r: Any = None, snub_c: Any = None, snub_l: Any = None,
                 snub_e: Any = None, no_firing: bool = False, **kw: Any) -> Outcome:
    v_line = np.sqrt(2.0) * np.asarray(vs, dtype=float)
    v = v_line
    extra: dict[str, Any] = {}
    if snubber:
        e = v_line if snub_e is None else snub_e
        v_snub, _ = snubber_mod.step_peak(e=e, r=snub_r, l=snub_l, c=snub_c)
        kw["vs"] = vs
        a = None if no_firing else _pop_range(kw)[0]
        l_loop = np.asarray(kw.pop("l"), dtype=float) + np.asarray(kw.pop("l_s", 0.0),
                                                                   dtype=float)
        off = triac.offstate_peak(vs=vs, r=kw.pop("r"), l=l_loop, omega=_omega(kw),
                                  snub_r=snub_r, snub_c=snub_c, alpha=a)
        v = np.maximum(np.maximum(v_line, v_snub), off["peak"])
        extra = {"divider_gain": off["divider_gain"], "ringing_peak": off["ringing_peak"],
                 "firing_step_peak": np.asarray(v_snub, dtype=float)}
    # One VDRM for both polarities: the triac blocks the line's peak each way.
    out = power.blocking_check(vdrm=vdrm, vrrm=vdrm, v_fwd=v, v_rev=v, limits=limits)
    zero = 0 * out.values["peak_voltage"]
    out.values["line_peak"] = v_line + zero
    for k, x in extra.items():
        out.values[k] = x + zero
    return out


def _sum_blocking(r: Reduced) -> str:
    vdrm = r.bound.inputs["vdrm"].value.nom
    sn = r.bound.options.get("snubber")
    if sn:
        src = (f"the largest of √2·V_s, the line through load and snubber `{sn}` (gain up to "
               f"{r.hi['divider_gain']:.3f}), the ringing after the current zero (up to "
               f"{eng(r.hi['ringing_peak'], 'V')}) and the line-step overshoot")
    else:
        src = "√2·V_s"
    text = (f"VDRM {eng(vdrm, 'V')} against {eng(r.hi['peak_voltage'], 'V')} ({src}, high "
            f"line), both polarities: ratio {r.worst['blocking_ratio']:.2f}")
    if r.bound.options.get("no_firing"):
        text += "; no firing range given: the current zero taken at the line's peak"
    if r.status != "pass":
        k = r.limits.get("marginal_below", 2.0)
        text += (f"; {r.status}: needs VDRM ≥ {at_least(k * r.hi['peak_voltage'], 'V')} for "
                 f"{k:g}×")
        w = r.worst
        if sn and w["peak_voltage"] > 1.001 * w["line_peak"]:
            if w["ringing_peak"] >= w["peak_voltage"] * (1 - 1e-9):
                text += (", or more damping in the snubber (ζ = (R + R_s)/2·√(C/L) towards "
                         "1: a larger C, as triac.commutation's dv/dt holds R_s down)")
            elif w["divider_gain"] * w["line_peak"] >= w["peak_voltage"] * (1 - 1e-9):
                text += (", or a smaller snubber C (the load's L and C are near resonance at "
                         "the line's frequency)")
    return text


register(CheckDef(
    id="triac.blocking", kinds=KIND,
    question="Is VDRM above the peak off-state voltage in both directions, with margin?",
    method="blocking_ratio = VDRM/V with V = √2·V_s,max; with a snubber across the stage the "
           "largest of that, the steady off state √2·V_s·|H| (H = Z_snub/(Z_load + Z_snub), "
           "the load's L with the supply's), the ringing after the current zero as "
           "triac.commutation bounds it (over the firing range; at the line's peak without "
           "one) and the snubber's line-step overshoot; ≥ 2.0 passes, 1.5–2.0 marginal.",
    source="Bimbhra, Power Electronics ch. 4 (voltage safety factor); Rashid 4e §17.6; the "
           "series R–L–R_s–C circuit in sinusoidal steady state",
    fn=_fn_blocking, bind=_bind_blocking,
    units={"peak_voltage": "V", "blocking_ratio": "1", "line_peak": "V", "divider_gain": "1",
           "ringing_peak": "V", "firing_step_peak": "V"},
    summarise=_sum_blocking,
    fix="A higher voltage class, or a better-damped snubber.",
    cautions=("A triac that breaks over fires itself (it is not damaged by one breakover, but "
              "the load is switched on unasked): the line's surges need a clamp (a varistor).",),
))


# --------------------------------------------------------------------------------------------
# triac.rms-current, triac.junction

def _bind_rms(ctx: Context) -> Bound:
    b = Bound()
    if _ratings(ctx, b, {"it_rms_rating": "it_rms"}):
        _line(ctx, b)
        _load(ctx, b)
        _firing(ctx, b)
    return b


def _sum_rms(r: Reduced) -> str:
    rating = r.bound.inputs["it_rms_rating"].value.nom
    text = (f"IT(RMS) {span(r.lo['it_rms'], r.hi['it_rms'], 'A')} (both half-cycles in one "
            f"triac) against {eng(rating, 'A')}")
    if r.status != "pass":
        text += f"; fails: needs IT(RMS) ≥ {at_least(r.hi['it_rms'], 'A')}"
    return text + _lost_text(r)


register(CheckDef(
    id="triac.rms-current", kinds=KIND,
    question="Is the triac's RMS current within IT(RMS)?",
    method="The ac-switch waveform (R: closed form; R–L: i(θ) from α to β) at high line and R "
           "at its low end; the triac carries both half-cycles: I = √2·I_SCR (one polarity "
           "only where α < φ, fired with narrow pulses).",
    source="Rashid 4e §11 (Ex 11.1, 11.2, 11.8)",
    fn=_with_line(triac.rms_current_check), bind=_bind_rms,
    units={"it_rms": "A"}, summarise=_sum_rms,
    fix="A triac with a higher IT(RMS), or a smaller load current.",
))


def _bind_junction(ctx: Context) -> Bound:
    b = Bound()
    hs = ctx.stage.get("heatsink")
    if not isinstance(hs, dict):
        b.missing.append(_sp(ctx, "heatsink") + " (its rth_sa)")
        return b
    if not _ratings(ctx, b, {"vt0": "vt0", "rt": "rt", "rth_jc": "rth_jc", "tj_max": "tj_max"}):
        return b
    ctx.need(b, "rth_sa", _sp(ctx, "heatsink.rth_sa"))
    ctx.read(b, "rth_cs", _sp(ctx, "heatsink.rth_cs"), default=0.0,
             dim="thermal_resistance", unit="K/W")
    b.options["devices"] = int(hs.get("devices", 1))
    ctx.ambient_max(b, "t_max")
    _line(ctx, b)
    _load(ctx, b)
    _firing(ctx, b, sweep=7)
    return b


def _sum_junction(r: Reduced) -> str:
    tj_max = r.bound.inputs["tj_max"].value.nom
    n = r.bound.options.get("devices", 1)
    text = (f"Tj {eng(r.hi['junction_temperature'], 'degC')} at maximum ambient with "
            f"{eng(r.hi['device_loss'], 'W')} in the triac"
            + (f" ({n} on the heatsink)" if n > 1 else "") + f", against {eng(tj_max, 'degC')}")
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
    id="triac.junction", kinds=KIND,
    question="Steady junction temperature at maximum ambient, high line, worst firing angle.",
    method="P = VT0·mean|i| + rT·I_RMS² (both half-cycles); Tj = Ta,max + ΔT_enc + "
           "n·P·Rth(s-a) + P·(Rth(j-c) + Rth(c-s)); Tj ≤ tj_max − 25 K passes, ≤ tj_max "
           "marginal.",
    source="Rashid 4e §17 (cooling); Bimbhra ch. 4 (thyristor losses)",
    fn=_with_line(triac.junction_check), bind=_bind_junction,
    units={"device_loss": "W", "junction_temperature": "degC", "rth_sa_required": "K/W",
           "it_rms": "A"},
    summarise=_sum_junction,
    fix="A heatsink with a lower Rth(s-a), or a triac with less on-state drop.",
    cautions=("The mounting tab of most plastic triacs is joined to MT2: without an insulating "
              "pad the heatsink is at line potential.",),
))


# --------------------------------------------------------------------------------------------
# triac.surge, triac.fuse

def _bind_surge(ctx: Context) -> Bound:
    b = Bound()
    if not _ratings(ctx, b, {"itsm": "itsm"}):
        return b
    ctx.read(b, "t_sm", _pp(ctx, "itsm_duration"), default=0.01, dim="time", unit="s")
    _line(ctx, b)
    if ctx.read(b, "r_cold", _sp(ctx, "load.cold_r")) is None:
        ctx.need(b, "r_cold", _sp(ctx, "load.r"))
        b.notes.append("cold_r not given: the running load R is used for the inrush")
    ctx.read(b, "l", _sp(ctx, "load.l"), default=0.0, dim="inductance", unit="H")
    b.notes[:] = [n for n in b.notes if not n.startswith("l not given")]
    _firing(ctx, b, sweep=7, extra=(HALF_PI,))
    return b


def _fn_surge(**kw: Any) -> Outcome:
    a, _, _ = _pop_range(kw)
    return power.surge_check(topology="ac-switch", alpha=a, omega=_omega(kw), **kw)


def _sum_surge(r: Reduced) -> str:
    text = (f"cold-load inrush peak {eng(r.hi['inrush_peak'], 'A')} against ITSM "
            f"{eng(r.lo['itsm_at_line'], 'A')} (at the line's half-cycle)")
    if r.status != "pass":
        text += (f"; fails: needs ITSM ≥ {at_least(r.hi['inrush_peak'], 'A')}, a soft start "
                 "(α_min later), or an inrush limiter")
    return text


register(CheckDef(
    id="triac.surge", kinds=KIND,
    question="Is the worst inrush (cold load, first half-cycle at high line) within ITSM?",
    method="R load: √2·V_s,max/R_cold when the range reaches 90° (else at α_min); R–L: the peak "
           "of i(θ) with R_cold. ITSM converted to the line's half-cycle by I^N·t = const.",
    source="Rashid 4e §17; Bimbhra ch. 4 (surge rating)",
    fn=_fn_surge, bind=_bind_surge,
    units={"inrush_peak": "A", "itsm_at_line": "A"}, summarise=_sum_surge,
    fix="A triac with a higher ITSM, a soft start, or an inrush limiter.",
))


def _bind_fuse(ctx: Context) -> Bound:
    b = Bound()
    if not isinstance(ctx.stage.get("fuse"), dict):
        b.not_applicable = "no `fuse` given"
        return b
    ctx.need(b, "fuse_i2t", _sp(ctx, "fuse.i2t"))
    ctx.read(b, "t_sm", _pp(ctx, "itsm_duration"), default=0.01, dim="time", unit="s")
    if ctx.read(b, "i2t", _pp(ctx, "i2t")) is None:
        if ctx.read(b, "itsm", _pp(ctx, "itsm")) is None:
            b.missing.append(_pp(ctx, "i2t") + " (or itsm)")
            return b
        b.notes.append("i2t not given: ITSM²·t_sm/2 of the surge half-sine used")
    if ctx.read(b, "t_base", _sp(ctx, "fuse.clearing_time")) is not None:
        b.options["base"] = "the fuse's clearing time"
    else:
        ctx.need(b, "freq", "supply.frequency")
        b.options["base"] = "the line's half-cycle"
    return b


def _fn_fuse(*, fuse_i2t: Any, t_sm: Any, limits: Mapping[str, float], base: str = "",
             i2t: Any = None, itsm: Any = None, t_base: Any = None, freq: Any = None) -> Outcome:
    t_sm = np.asarray(t_sm, dtype=float)
    dev = i2t if i2t is not None else np.asarray(itsm, dtype=float) ** 2 * t_sm / 2
    tb = t_base if t_base is not None else 0.5 / np.asarray(freq, dtype=float)
    out = power.fuse_check(fuse_i2t=fuse_i2t, i2t=dev, t_sm=t_sm, t_base=tb, limits=limits)
    out.values["t_base"] = np.asarray(tb, dtype=float) + 0 * out.values["device_i2t"]
    return out


def _sum_fuse(r: Reduced) -> str:
    text = (f"fuse clearing I²t {eng(r.hi['fuse_i2t'], 'A^2*s')} against the triac's "
            f"{eng(r.lo['device_i2t'], 'A^2*s')} at {eng(r.worst['t_base'], 's')} "
            f"({r.bound.options.get('base', '')})")
    if r.status != "pass":
        text += (f"; fails: needs a fuse with clearing I²t < "
                 f"{at_most(r.lo['device_i2t'], 'A^2*s')} or a triac with more I²t")
    return text


register(CheckDef(
    id="triac.fuse", kinds=KIND,
    question="Does the fuse clear before the triac's I²t is spent?",
    method="device I²t converted to the fuse's clearing time (else the line's half-cycle) by "
           "I²t(t) = I²t(t_sm)·(t/t_sm)^((N−2)/N), N = 4 below t_sm, 2 above; pass when the "
           "fuse's total clearing I²t is smaller.",
    source="Rashid 4e §17 (Ex 17.6, fuse coordination); Bimbhra ch. 4",
    fn=_fn_fuse, bind=_bind_fuse,
    units={"fuse_i2t": "A^2*s", "device_i2t": "A^2*s", "t_base": "s"}, summarise=_sum_fuse,
    fix="A faster semiconductor-protection fuse, or a triac with a larger I²t.",
))


# --------------------------------------------------------------------------------------------
# triac.latching, triac.holding

def _bind_cold(ctx: Context, b: Bound, key: str) -> bool:
    part = _part(ctx)
    if part.params.get(key) is None:
        b.missing.append(_pp(ctx, key))
        return False
    ctx.cold(b, key, part, key)
    ctx.ambient_min(b)
    return True


def _cold_of(kw: dict[str, Any], key: str) -> np.ndarray:
    return cold_value(kw.pop(key), kw.pop("t_min"), v_cold=kw.pop(key + "_cold"),
                      t_cold=kw.pop(key + "_cold_at"), k=2.0)


def _bind_latching(ctx: Context) -> Bound:
    b = Bound()
    if _bind_cold(ctx, b, "il"):
        _line(ctx, b)
        _load(ctx, b)
        _firing(ctx, b)
    return b


def _fn_latching(**kw: Any) -> Outcome:
    il = _cold_of(kw, "il")
    a, lo, hi = _pop_range(kw)
    return power.latching_check(kind="ac", il_cold=il, alpha=a, alpha_lo=lo, alpha_hi=hi,
                                omega=_omega(kw), **kw)


def _sum_latching(r: Reduced) -> str:
    il = r.worst["il"]
    amax = r.lo["max_firing_angle"]
    text = (f"load current after firing reaches {eng(r.lo['reach_current'], 'A')} at the ends "
            f"of the firing range against IL {eng(il, 'A')} (cold, low line)")
    if amax == amax:
        text += f"; latest firing that latches {at_most(amax, 'deg')}"
    if r.status != "pass":
        text += (f"; fails: needs α_max ≤ {at_most(amax, 'deg')}" if amax == amax else
                 f"; fails: even full output stays below IL: needs load R ≤ "
                 f"{at_most(r.bound.inputs['r'].value.lo * r.lo['reach_current'] / il, 'ohm')}")
    return text + "; the same IL taken for both polarities"


register(CheckDef(
    id="triac.latching", kinds=KIND,
    question="Does the load current reach IL at the extremes of the firing range (cold IL)?",
    method="The largest current after firing at α_min and α_max (R: Vm·sin(max(α, 90°))/R; "
           "R–L: the peak of i(θ)) ≥ IL_c at low line; max_firing_angle = π − asin(IL_c·R/Vm).",
    source="Rashid 4e §7 (latching current); Bimbhra ch. 4",
    fn=_fn_latching, bind=_bind_latching,
    units={"anode_current_at_fire": "A", "il": "A", "max_firing_angle": "deg",
           "reach_current": "A"},
    summarise=_sum_latching,
    fix="Limit α_max, lower the load R, or add a bleeder resistor across the load.",
    cautions=("IL of a triac differs between quadrants (highest in II): a short gate pulse "
              "with the largest IL is the case to check on the bench.",),
    optional=frozenset({"max_firing_angle", "time_to_il", "reach_current"}),
))


# --------------------------------------------------------------------------------------------
# triac.latch-time (a short gate pulse: the current when it ends)

def _bind_latch_time(ctx: Context) -> Bound:
    b = Bound()
    gate = ctx.linked_stage("gate")
    if gate is None or gate.kind != "diac-rc":
        b.not_applicable = ("the gate is driven for as long as the drive is on, not by a short "
                            "pulse" if gate is not None else "no gate stage named")
        return b
    if not _bind_cold(ctx, b, "il"):
        return b
    _line(ctx, b)
    _load(ctx, b)
    ctx.read(b, "l_s", "supply.inductance", default=0.0, dim="inductance", unit="H")
    b.notes[:] = [n for n in b.notes if not n.startswith("l_s not given")]
    sn = _snubber(ctx)
    if sn is not None:
        b.options["snubber"] = sn.id
        ctx.need(b, "snub_r", ctx.stage_path("r", sn))
        ctx.need(b, "snub_c", ctx.stage_path("c", sn))
    pulse = diac_stage.bind_pulse(Context(ctx.project, gate))
    b.missing += pulse.missing
    for name, inp in pulse.inputs.items():
        if name != "t_min":  # the same ambient as the IL above
            b.inputs["p_" + name] = inp
    b.options["pulse_from"] = gate.id
    b.depends.append((gate.id, "diac.gate-pulse"))
    _firing(ctx, b, sweep=5)
    return b


def _fn_latch_time(*, limits: Mapping[str, float], snubber: str = "", pulse_from: str = "",
                   **kw: Any) -> Outcome:
    pulse = {k[2:]: kw.pop(k) for k in list(kw) if k.startswith("p_")}
    pulse["t_min"] = kw["t_min"]
    width = diac_stage.pulse_outcome(**pulse, limits={}).values["width"]
    il = _cold_of(kw, "il")
    a, _, _ = _pop_range(kw)
    l_tot = np.asarray(kw.pop("l"), dtype=float) + np.asarray(kw.pop("l_s", 0.0), dtype=float)
    return triac.latch_time_check(vs=kw["vs"], omega=_omega(kw), r=kw["r"], l=l_tot, alpha=a,
                                  width=width, il_cold=il, limits=limits,
                                  snub_r=kw.get("snub_r", np.nan),
                                  snub_c=kw.get("snub_c", np.nan))


def _sum_latch_time(r: Reduced) -> str:
    gate = r.bound.options.get("pulse_from", "")
    sn = r.bound.options.get("snubber")
    text = (f"when the pulse from `{gate}` ends (above IGT for as little as "
            f"{eng(r.lo['pulse_width'], 's')}) the main current has reached "
            f"{eng(r.lo['current_at_end'], 'A')} at worst, against IL {eng(r.hi['il'], 'A')} "
            "(cold, low line)")
    text += f", the snubber `{sn}` discharge included" if sn else ", the load alone"
    if r.status != "pass":
        text += (f"; {r.status}: the triac may not latch (it fires and drops out, or fires "
                 "late): a longer pulse (a larger capacitor at the diac, a larger gate "
                 "resistor within diac.gate-pulse), an R–C snubber whose discharge carries "
                 "the current past IL, or a triac with a lower IL")
    return text


register(CheckDef(
    id="triac.latch-time", kinds=KIND,
    question="Has the main current reached IL (cold) when the diac's short gate pulse ends?",
    method="Pulse width above IGT as diac.gate-pulse works it out (R·C·ln(I/IGT), cold); the "
           "current then: the R–L load's rise from zero after firing at α, "
           "(Vm/Z)·[sin(α + ωt − φ) − sin(α − φ)·e^(−tR/L)], with the supply inductance in "
           "series, plus the snubber's discharge v_C(α)/R_s·e^(−t/R_sC_s) from its steady "
           "off-state voltage; over the firing range, against IL_c at low line.",
    source="GE SCR Manual 6th ed. ch. 1 and 4 (latching current, gate pulse width) — from "
           "memory; Rashid 4e §11 (R–L AC controller current)",
    fn=_fn_latch_time, bind=_bind_latch_time,
    units={"current_at_end": "A", "il": "A", "pulse_width": "s"},
    summarise=_sum_latch_time,
    fix="A longer gate pulse, an R–C snubber across the triac, or a triac with a lower IL.",
    cautions=("An inductive load with a diac trigger and no snubber is the classic case of a "
              "triac that fires and drops out: check it on the bench at the coldest ambient.",),
))


def _bind_holding(ctx: Context) -> Bound:
    b = Bound()
    if _bind_cold(ctx, b, "ih"):
        _line(ctx, b)
        _load(ctx, b)
        _firing(ctx, b)
    return b


def _fn_holding(**kw: Any) -> Outcome:
    ih = _cold_of(kw, "ih")
    a, _, _ = _pop_range(kw)
    return power.holding_check(kind="ac", ih_cold=ih, alpha=a, omega=_omega(kw), **kw)


def _sum_holding(r: Reduced) -> str:
    text = (f"the load current falls to IH {eng(r.worst['ih'], 'A')} (cold) at "
            f"{span(r.lo['dropout_angle'], r.hi['dropout_angle'], 'deg')}")
    if r.status != "pass":
        text += (f"; fails: the current never reaches IH at some corner (peak "
                 f"{eng(r.lo['load_current'], 'A')}): needs a lower load R or an earlier α_max")
    return text + "; the triac as an ideal switch"


register(CheckDef(
    id="triac.holding", kinds=KIND,
    question="Where in each half-cycle does the load current fall below IH?",
    method="Dropout angle π − asin(IH_c·R/Vm) (R), or where i(θ) falls to IH_c before β (R–L); "
           "fails where the current never reaches IH.",
    source="Rashid 4e §7; Singhal & Gupta, Introduction to Electric Drives ch. 1",
    fn=_fn_holding, bind=_bind_holding,
    units={"load_current": "A", "ih": "A", "dropout_angle": "deg"}, summarise=_sum_holding,
    fix="Lower the load R, or an earlier α_max.",
    optional=frozenset({"dropout_angle"}),
))


# --------------------------------------------------------------------------------------------
# triac.didt (at turn-on)

def _bind_didt(ctx: Context) -> Bound:
    b = Bound()
    if not _ratings(ctx, b, {"didt_rating": "didt"}):
        return b
    ctx.need(b, "vs", "supply.voltage")
    ls = ctx.read(b, "l_s", "supply.inductance")
    ll = ctx.read(b, "l", _sp(ctx, "load.l"))
    if ls is None and ll is None:
        b.missing.append("supply.inductance (or " + _sp(ctx, "load.l") + ")")
        return b
    sn = _snubber(ctx)
    if sn is not None:
        b.options["snubber"] = sn.id
        if ctx.read(b, "snub_ld", ctx.stage_path("discharge_inductance", sn)) is None:
            ctx.read(b, "t_on", _pp(ctx, "tgt"), default=1e-6, dim="time", unit="s")
        # The capacitor discharges from the triac's voltage at firing, which the load and the
        # snubber can lift above the line's (their divider, the ringing after the zero): it
        # is taken at triac.blocking's off-state bound.
        ctx.need(b, "snub_r", ctx.stage_path("r", sn))
        ctx.need(b, "snub_c", ctx.stage_path("c", sn))
        ctx.need(b, "r", _sp(ctx, "load.r"))
        ctx.need(b, "freq", "supply.frequency")
    _firing(ctx, b, sweep=7, extra=(HALF_PI,))
    return b


def _fn_didt(*, didt_rating: Any, limits: Mapping[str, float], l_s: Any = 0.0,
             l: Any = 0.0, snubber: str = "", snub_ld: Any = None,  # noqa: E741
             snub_r: Any = None, t_on: Any = None, snub_c: Any = None, r: Any = None,
             **kw: Any) -> Outcome:
    a, _, _ = _pop_range(kw)  # the line stays in kw: a diac-rc trigger's range reads it
    vs = kw["vs"]
    v = np.sqrt(2.0) * np.asarray(vs, dtype=float) * np.sin(a)
    l_tot = np.asarray(l_s, dtype=float) + np.asarray(l, dtype=float)
    snub: Any = 0.0
    v_fire: Any = None
    if snubber:
        off = triac.offstate_peak(vs=vs, r=r, l=l_tot, omega=_omega(kw), snub_r=snub_r,
                                  snub_c=snub_c, alpha=a)
        v_fire = np.maximum(np.abs(v), off["peak"])
        with np.errstate(divide="ignore"):
            snub = v_fire / snub_ld if snub_ld is not None else (v_fire / snub_r) / t_on
    out = power.didt_check(kind="ac", vs=vs, l_tot=l_tot, alpha=a, snub_didt=snub,
                           didt_rating=didt_rating, limits=limits)
    if v_fire is not None:
        out.values["snubber_voltage"] = v_fire + 0 * out.values["didt"]
    return out


def _sum_didt(r: Reduced) -> str:
    rating = r.bound.inputs["didt_rating"].value.nom
    text = f"di/dt at firing up to {eng(r.hi['didt'], 'A/s')} against {eng(rating, 'A/s')}"
    sn = r.bound.options.get("snubber")
    if sn:
        text += (f", with the snubber `{sn}` discharge from up to "
                 f"{eng(r.hi['snubber_voltage'], 'V')} (triac.blocking's off-state bound)")
    if r.status != "pass":
        ls = sum(r.bound.inputs[k].value.lo for k in ("l_s", "l") if k in r.bound.inputs)
        text += (f"; fails: needs the loop inductance ≥ {at_least(ls * r.hi['didt'] / rating, 'H')}"
                 " (a series choke), or a larger snubber resistor")
    return text


register(CheckDef(
    id="triac.didt", kinds=KIND,
    question="Rate of rise of on-state current at firing, including the snubber's discharge.",
    method="V_m,max·sin α*/(L_s + L), α* = 90° where the range spans it, else the end nearest "
           "it; plus the snubber discharge V/L_d, or (V/R_sn)/t_gt without L_d, V the "
           "triac's voltage at firing bounded as triac.blocking's off-state peak (the line "
           "through load and snubber, the ringing after the current zero).",
    source="Rashid 4e §17 (di/dt protection)",
    fn=_fn_didt, bind=_bind_didt,
    units={"didt": "A/s", "snubber_voltage": "V"}, summarise=_sum_didt,
    fix="A series choke L ≥ V_m,max/(di/dt)cr, or a larger snubber resistor.",
))


# --------------------------------------------------------------------------------------------
# triac.control

def _bind_control(ctx: Context) -> Bound:
    b = Bound()
    ll = ctx.read(b, "l", _sp(ctx, "load.l"))
    if ll is None or ll.hi == 0:
        b.not_applicable = "a resistive load: no load angle"
        return b
    ctx.need(b, "r", _sp(ctx, "load.r"))
    ctx.need(b, "freq", "supply.frequency")
    _firing(ctx, b)
    if _burst(ctx):
        bind_burst_pulse(ctx, b, lambda: _held_gate(ctx))
    return b


def _held_gate(ctx: Context) -> str | None:
    """A DC gate drive holds the gate while it is on ("held"); an opto-triac (AC) drive may
    be a zero-crossing one, which does not fire again at an inductive load's current zero
    (the voltage then is well past its window): not known (None)."""
    gate = ctx.linked_stage("gate")
    if gate is not None and gate.kind == "triac-gate" and gate.get("mode") != "ac":
        return "held"
    return None


def _fn_control(**kw: Any) -> Outcome:
    _, lo, _ = _pop_range(kw)
    if "burst_pulse" in kw:
        return burst_pulse_outcome(kw, _omega(kw))
    return triac.control_check(alpha_lo=lo, omega=_omega(kw), **kw)


def _sum_control(r: Reduced) -> str:
    if "burst_pulse" in r.bound.options:
        return sum_burst_pulse(r, device="triac")
    phi = r.hi["load_angle"]
    # Judged corner by corner: a trigger that follows the load fires later where φ is larger,
    # so the range's extremes come from different corners; the closest corner says it.
    text = (f"earliest firing {_deg(r.worst['alpha_min'])} against the load angle φ "
            f"{_deg(r.worst['load_angle'])} at the closest corner (φ up to {_deg(phi)}, the "
            f"earliest firing {_deg(r.lo['alpha_min'])}, over all corners)")
    if r.status != "pass":
        text += (f"; fails: needs α_min ≥ {at_least(phi, 'deg')}, or a gate drive that stays "
                 "on through the half-cycle (a short pulse is missed and DC flows in the load)")
    return text


register(CheckDef(
    id="triac.control", kinds=KIND,
    question="Inductive load: is the earliest firing at or after the load angle?",
    method="φ = atan(ωL/R) at L max, R min, f max; pass when α_min ≥ φ.",
    source="Rashid 4e §11 (AC voltage controllers with R–L loads, Ex 11.2)",
    fn=_fn_control, bind=_bind_control,
    units={"load_angle": "deg", "alpha_min": "deg", "first_zero_lag": "deg",
           "required_width": "s", "steady_lag_time": "s", "pulse_width": "s"},
    summarise=_sum_control,
    fix="Raise α_min to at least φ, or keep the gate driven through each half-cycle (burst "
        "control: a gate pulse lasting past the first current zero).",
))


# --------------------------------------------------------------------------------------------
# triac.commutation

def _bind_commutation(ctx: Context) -> Bound:
    b = Bound()
    if not _ratings(ctx, b, {"dvdt_c": "dvdt_c", "didt_c": "didt_c", "vdrm": "vdrm"}):
        return b
    _line(ctx, b)
    _load(ctx, b)
    sn = _snubber(ctx)
    if sn is not None:
        b.options["snubber"] = sn.id
        ctx.need(b, "snub_r", ctx.stage_path("r", sn))
        ctx.need(b, "snub_c", ctx.stage_path("c", sn))
    _firing(ctx, b, sweep=FIRING_SWEEP)
    return b


def _fn_commutation(*, snubber: str = "", **kw: Any) -> Outcome:
    a, _, _ = _pop_range(kw)
    w = _omega(kw)
    out = triac.commutation_check(alpha=a, omega=w, **kw)
    note = _lost_note(kw, a, w)
    if note:
        out.notes.append(note)
    return out


def _sum_commutation(r: Reduced) -> str:
    o = r.bound.options
    rating_dv = r.bound.inputs["dvdt_c"].value.lo
    rating_di = r.bound.inputs["didt_c"].value.lo
    inductive = r.hi["load_angle"] > 0
    text = (f"at the current zero (β up to {_deg(r.hi['commutation_angle'])}) the current falls "
            f"at up to {eng(r.hi['didt_zero'], 'A/s')} against (di/dt)c "
            f"{eng(rating_di, 'A/s')}, and the line's {eng(r.hi['step_voltage'], 'V')} is "
            "reapplied")
    sn = o.get("snubber")
    if not inductive:
        text += (f"; a resistive load: the voltage rises with the line, "
                 f"{eng(r.hi['dvdt_reapplied'], 'V/s')} against (dv/dt)c {eng(rating_dv, 'V/s')}")
    elif not sn and r.hi["load_angle"] <= triac.NEAR_RESISTIVE:
        text += (f"; no snubber across the triac: a nearly resistive load (φ up to "
                 f"{_deg(r.hi['load_angle'])}) steps by only {eng(r.hi['step_voltage'], 'V')}, "
                 "but at a rate only the triac's own capacitance sets, which no input gives: "
                 f"no rate can be shown against (dv/dt)c {eng(rating_dv, 'V/s')} (confirm on "
                 "the bench at Tj,max, or add a snubber and the check can judge it)")
    elif not sn:
        text += ("; no snubber across the triac: the voltage steps at once (only the triac's own "
                 f"capacitance slows it), far above (dv/dt)c {eng(rating_dv, 'V/s')}: the triac "
                 "does not turn off on an inductive load")
    else:
        text += (f"; with the snubber `{sn}` it rises at up to "
                 f"{eng(r.hi['dvdt_reapplied'], 'V/s')} (ζ down to {r.lo['damping']:.2f}) "
                 f"against (dv/dt)c {eng(rating_dv, 'V/s')}, ringing to "
                 f"{eng(r.hi['reapplied_peak'], 'V')}")
    if r.status == "pass":
        return text
    k = float(r.limits.get("marginal_below", 1.5))
    fixes = []
    if r.lo["didt_ratio"] < k:
        need_l = r.bound.inputs["l"].value.lo * r.hi["didt_zero"] * k / rating_di
        fixes.append(f"the (dv/dt)c rating holds only at or below its (di/dt)c and the current "
                     f"falls faster: a triac rated for ≥ {at_least(k * r.hi['didt_zero'], 'A/s')}"
                     f" at commutation, or a load choke raising L to ≥ {at_least(need_l, 'H')}")
    near_r = not sn and inductive and r.hi["load_angle"] <= triac.NEAR_RESISTIVE
    if r.lo["dvdt_ratio"] < k and near_r:
        fixes.append("an R–C snubber across the triac, so that the rate of the small step is "
                     "one this check can compute (the full-step sizing does not apply here)")
    elif r.lo["dvdt_ratio"] < k and inductive:
        # The step is bounded by the line's peak; with C ≥ L/R_s² the response is damped
        # (ζ ≥ 0.5, R_s·(R + R_s)·C ≥ L) and dv/dt is largest at once: R_s·E/L.
        e = math.sqrt(2.0) * r.bound.inputs["vs"].value.hi
        l_lo, l_hi = r.bound.inputs["l"].value.lo, r.bound.inputs["l"].value.hi
        allowed = rating_dv / k
        r_s = allowed * l_lo / e
        c_s = l_hi / r_s**2 if r_s > 0 else math.inf
        fixes.append(f"needs dv/dt ≤ {at_most(allowed, 'V/s')}: an R–C snubber across the triac "
                     f"with R ≤ {at_most(r_s, 'ohm')} and C ≥ {at_least(c_s, 'F')} at their "
                     f"ends of tolerance (for the load's L of {eng(l_lo, 'H')} – "
                     f"{eng(l_hi, 'H')}), or a triac with a higher (dv/dt)c")
    elif r.lo["dvdt_ratio"] < k:
        fixes.append(f"needs (dv/dt)c ≥ {at_least(k * r.hi['dvdt_reapplied'], 'V/s')}")
    if r.lo.get("vdrm_ratio", math.inf) < k:
        fixes.append(f"the ringing peak {eng(r.hi['reapplied_peak'], 'V')} is close to VDRM: "
                     "more damping (a larger C)")
    if fixes:
        text += f"; {r.status}: " + "; ".join(fixes)
    return text + _lost_text(r)


register(CheckDef(
    id="triac.commutation", kinds=KIND,
    question="Does the triac turn off at the load current's zero, or fire again in the other "
             "direction?",
    method="β = the R–L extinction angle for α (β = π + φ at α = φ); at the zero L·di/dt = "
           "Vm·sin β, so |di/dt| = Vm·|sin β|/L (ω·Vm/R on a resistive load), and the step "
           "E = Vm·|sin β| is reapplied. With an rc-snubber across the stage: the R–L–C "
           "response of the load (L, R) and the snubber (R_s, C_s) to the line from rest, "
           "bounded: dv/dt ≤ E·max h' + ω·Vm·TV(h) (h the unit step response; Duhamel's "
           "integral), or the steady state's ω·Vm·|H| plus the natural response's largest "
           "rate, the smaller; without one an inductive load's step has no finite rate: fail "
           "(φ ≤ 5°: marginal, the step below 0.09·Vm). Pass when dv/dt ≤ (dv/dt)c/1.5 and "
           "|di/dt| ≤ (di/dt)c/1.5 and the ringing peak ≤ VDRM/1.5; a di/dt above (di/dt)c "
           "fails whatever the dv/dt (the rating does not apply). Worst corner over high "
           "line, α (swept), L and R and the snubber's spread.",
    source="Rashid 4e §11 (R–L extinction angle), §17.6 (snubber step response); Mohan, "
           "Undeland & Robbins 3rd ed. ch. 20 (triac commutation); the series R–L–C circuit's "
           "steady state and natural response (any circuits text)",
    fn=_fn_commutation, bind=_bind_commutation,
    units={"commutation_angle": "deg", "step_voltage": "V", "didt_zero": "A/s",
           "dvdt_reapplied": "V/s", "dvdt_time": "s", "damping": "1", "reapplied_peak": "V",
           "dvdt_ratio": "1", "didt_ratio": "1", "load_angle": "deg", "vdrm_ratio": "1"},
    summarise=_sum_commutation,
    fix="An R–C snubber across the triac (R_s ≈ S·L/E for a rate S, C_s ≈ L/R_s²), a "
        "triac rated for a higher (dv/dt)c at the circuit's (di/dt)c, or a snubberless triac.",
    cautions=("(dv/dt)c is rated at Tj,max: a hot triac commutates worst.",
              "The test takes the load's L alone: supply inductance in series lowers the rate.",
              "A motor's L falls as it speeds up and its back EMF shifts the zero: check at "
              "stall and at full speed."),
    optional=frozenset({"dvdt_reapplied", "dvdt_time", "damping", "reapplied_peak",
                        "vdrm_ratio"}),
))


# --------------------------------------------------------------------------------------------
# triac.gate-trigger (on a triac-gate stage)

def _bind_gate_trigger(ctx: Context) -> Bound:
    b = Bound()
    mode = str(ctx.stage.get("mode"))
    used = triac.quadrants(mode)
    b.options["used"] = used
    part = _part(ctx)
    for q in used:
        for key in (f"igt_{q}", f"vgt_{q}"):
            if part.params.get(key) is None:
                b.missing.append(f"parts.{part.ref}.{key} (quadrant {triac.ROMAN[q]}, which a "
                                 f'mode = "{mode}" drive fires in)')
    if b.missing:
        return b
    nan = Value.fixed(float("nan"), "", "")
    at = part.cold.get("at")
    for q in used:
        for key in (f"igt_{q}", f"vgt_{q}"):
            ctx.need(b, key, f"parts.{part.ref}.{key}")
            cv = part.cold.get(key)
            if cv is not None and at is not None:
                b.add(key + "_cold", f"parts.{part.ref}.cold.{key}", cv)
            else:
                b.add(key + "_cold", f"parts.{part.ref}.cold.{key}#none", nan)
    if at is not None:
        b.add("cold_at", f"parts.{part.ref}.cold.at", at)
    else:
        b.add("cold_at", f"parts.{part.ref}.cold.at#none", nan)
    ctx.ambient_min(b)
    ctx.need(b, "drive", _sp(ctx, "drive"))
    ctx.read(b, "drop", _sp(ctx, "drive_drop"), default=0.0, dim="voltage", unit="V")
    b.notes[:] = [n for n in b.notes if not n.startswith("drive_drop not given")]
    ctx.need(b, "series_r", _sp(ctx, "series_r"))
    ctx.read(b, "r_gk", _sp(ctx, "gate_cathode_r"))
    return b


def _fn_gate_trigger(*, used: tuple[str, ...], **kw: Any) -> Outcome:
    per = {k: {q: kw.pop(f"{k}_{q}") for q in used} for k in ("igt", "vgt")}
    cold = {k: {q: kw.pop(f"{k}_{q}_cold") for q in used} for k in ("igt", "vgt")}
    return triac.gate_trigger_check(used=used, igt=per["igt"], vgt=per["vgt"],
                                    igt_cold=cold["igt"], vgt_cold=cold["vgt"], **kw)


def _sum_gate_trigger(r: Reduced) -> str:
    used = r.bound.options["used"]
    q = used[int(r.worst["quadrant"])]
    names = " and ".join(triac.ROMAN[u] for u in used)
    text = (f"gate current {eng(r.lo['gate_current'], 'A')} at the worst corner (lowest drive, "
            f"highest R_S, coldest) against IGT {eng(r.worst['igt'], 'A')} of quadrant "
            f"{triac.ROMAN[q]} (cold), the worst of {names} the drive fires in")
    if r.status != "pass":
        k = float(r.limits.get("marginal_below", 1.5))
        rv = r.bound.inputs["series_r"].value
        need = r.lo["series_r_max"] * (rv.nom / rv.hi if rv.hi else 1.0)
        text += (f"; {r.status}: needs R_S ≤ {at_most(need, 'ohm')} (nominal) for {k:g}× IGT, "
                 "a higher drive voltage, or a triac with a lower IGT in that quadrant")
    if "q4" in used:
        text += "; quadrant IV is the least sensitive: a negative drive (II, III) is usual"
    return text


register(CheckDef(
    id="triac.gate-trigger", kinds=GATE_KIND,
    question="Is the gate current at the worst corner above the cold IGT of the worst quadrant "
             "the drive fires in?",
    method="Quadrants from the drive's mode (ac: I, III; negative-dc: II, III; positive-dc: I, "
           "IV); i_G = (V_drive − V_drop − VGT)/R_S − VGT/R_GK at the lowest drive, highest R_S "
           "and the cold VGT of the quadrant with the highest cold IGT; pass ≥ 1.5×, marginal "
           "1–1.5×.",
    source="Sen, Power Electronics ch. 2 (triac quadrants); Rashid 4e §7 (gate circuit); cold "
           "factors common practice",
    fn=_fn_gate_trigger, bind=_bind_gate_trigger,
    units={"gate_current": "A", "igt": "A", "vgt": "V", "quadrant": "1", "series_r_max": "ohm"},
    summarise=_sum_gate_trigger,
    fix="A smaller series R, a higher drive voltage, or a drive that avoids quadrant IV.",
    cautions=("An AC (opto-triac) drive takes its gate current from the line through R_S: its "
              "drive voltage is the line's at the firing instant, and the gate circuit is at "
              "mains potential.",),
))


# --------------------------------------------------------------------------------------------
# triac.gate-power

def _bind_gate_power(ctx: Context) -> Bound:
    b = Bound()
    if ctx.stage.get("mode") == "ac":
        b.not_applicable = ("an AC drive conducts only until the triac fires (a few µs): its "
                            "peak current is the driver's own rating, a manual check")
        return b
    if not _ratings(ctx, b, {"pg_av": "pg_av"}):
        return b
    ctx.need(b, "drive", _sp(ctx, "drive"))
    ctx.read(b, "drop", _sp(ctx, "drive_drop"), default=0.0, dim="voltage", unit="V")
    b.notes[:] = [n for n in b.notes if not n.startswith("drive_drop not given")]
    ctx.need(b, "series_r", _sp(ctx, "series_r"))
    return b


def _sum_gate_power(r: Reduced) -> str:
    rating = r.bound.inputs["pg_av"].value.lo
    text = (f"gate dissipation at most {eng(r.hi['gate_power'], 'W')} (V²/4R_S, highest drive, "
            f"lowest R_S: a bound for any gate) against PG(AV) {eng(rating, 'W')}")
    if r.status != "pass":
        v = r.bound.inputs["drive"].value.hi
        rv = r.bound.inputs["series_r"].value
        need = v**2 / (4 * rating) * (rv.nom / rv.lo if rv.lo else 1.0)
        text += f"; fails: needs R_S ≥ {at_least(need, 'ohm')} (nominal), or a pulsed drive"
    return text + "; a DC drive holds the gate on for as long as it is enabled"


register(CheckDef(
    id="triac.gate-power", kinds=GATE_KIND,
    question="Can a DC drive, holding the gate on, overheat the gate?",
    method="P_G ≤ (V_drive − V_drop)²/(4·R_S) at the highest drive and lowest R_S (the most a "
           "source behind R_S can deliver into any load), against PG(AV).",
    source="Rashid 4e §7 (gate circuit: the gate power limit); maximum power transfer",
    fn=triac.gate_power_check, bind=_bind_gate_power,
    units={"gate_power": "W"}, summarise=_sum_gate_power,
    fix="A larger R_S (keeping triac.gate-trigger's margin), or pulse the drive.",
))
