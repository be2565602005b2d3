"""Trigger oscillator stages (UJT and PUT relaxation oscillators) and the ``osc.*`` checks."""

from __future__ import annotations

import math
from typing import Any

from checks import oscillator
from checks.core import Outcome
from reviewer.errors import ProjectError
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
from reviewer.schema import OSC

V = "value"
_COMMON = {
    "supply": Param(V, "voltage", required=True),
    "timing_r": Param(V, "resistance", required=True),
    "timing_c": Param(V, "capacitance", required=True),
    "sync": Param("choice", choices=("free", "line")),
    "zener": Param(V, "voltage"),
    "target": Param("target"),
    "supply_ripple": Param(V, "voltage", allow_zero=True),
    "leakage": Param(V, "current", allow_zero=True),
}

UJT_OSC = register_kind(StageKind("ujt-oscillator", {
    "ujt": Param("part", required=True, part_type="ujt"),
    "base1_r": Param(V, "resistance", required=True),
    "base2_r": Param(V, "resistance", allow_zero=True),
    **_COMMON,
}, "relaxation oscillator with a unijunction transistor"))

PUT_OSC = register_kind(StageKind("put-oscillator", {
    "put": Param("part", required=True, part_type="put"),
    "gate_r_upper": Param(V, "resistance", required=True),
    "gate_r_lower": Param(V, "resistance", required=True),
    "cathode_r": Param(V, "resistance", required=True),
    **_COMMON,
}, "relaxation oscillator with a programmable unijunction transistor"))


def device_of(kind: str) -> str:
    """``ujt`` or ``put`` for an oscillator stage kind."""
    return "ujt" if kind == "ujt-oscillator" else "put"


def bind_device(ctx: Context, b: Bound, stage: Stage | None = None) -> str:
    """Add the oscillator's supply and device inputs shared by the ``osc.*`` checks.

    With ``sync = "line"`` the oscillator runs from the clamp plateau, so ``v1`` is the Zener
    voltage. Returns the device (``ujt`` or ``put``), also set as option ``device``.
    """
    st = stage or ctx.stage
    dev = device_of(st.kind)
    b.options["device"] = dev
    if st.get("sync") == "line":
        ctx.need(b, "v1", ctx.stage_path("zener", st))
    else:
        ctx.need(b, "v1", ctx.stage_path("supply", st))
    part = ctx.part(dev, st)
    assert part is not None  # the loader checks the link
    pre = f"parts.{part.ref}."
    for key in ("vv", "ip"):
        ctx.need(b, key, pre + key)
    if dev == "ujt":
        for key in ("eta", "rbb", "vd"):
            ctx.need(b, key, pre + key)
        ctx.need(b, "r1", ctx.stage_path("base1_r", st))
        ctx.read(b, "r2", ctx.stage_path("base2_r", st), default=0.0, dim="resistance",
                 unit="ohm")
    else:
        ctx.need(b, "offset", pre + "offset")
        ctx.need(b, "r_upper", ctx.stage_path("gate_r_upper", st))
        ctx.need(b, "r_lower", ctx.stage_path("gate_r_lower", st))
    return dev


# --------------------------------------------------------------------------- binding helpers

def _part(ctx: Context) -> Part:
    part = ctx.part(device_of(ctx.stage.kind))
    assert part is not None  # the loader checks the link
    return part


def _bind_v1(ctx: Context, b: Bound) -> None:
    """The oscillator supply: the clamp plateau with line sync, else the stage supply."""
    key = "zener" if ctx.stage.get("sync") == "line" else "supply"
    ctx.need(b, "v1", ctx.stage_path(key))


def _bind_peak(ctx: Context, b: Bound, dev: str, part: Part) -> None:
    """Exactly the inputs of the peak point (without the supply)."""
    pre = f"parts.{part.ref}."
    if dev == "ujt":
        for key in ("eta", "rbb", "vd"):
            ctx.need(b, key, pre + key)
        ctx.need(b, "r1", ctx.stage_path("base1_r"))
        ctx.read(b, "r2", ctx.stage_path("base2_r"), default=0.0, dim="resistance", unit="ohm")
    else:
        ctx.need(b, "offset", pre + "offset")
        ctx.need(b, "r_upper", ctx.stage_path("gate_r_upper"))
        ctx.need(b, "r_lower", ctx.stage_path("gate_r_lower"))


def _bind_discharge_r(ctx: Context, b: Bound, dev: str, part: Part) -> None:
    """UJT: r_on (0 when not given, said); PUT: the cathode resistor."""
    if dev == "ujt":
        if ctx.read(b, "rb1_on", f"parts.{part.ref}.rb1_on") is None:
            b.add("rb1_on", f"parts.{part.ref}.rb1_on#assumed", Value.fixed(0.0, "resistance"))
            b.notes.append("rb1_on not given: r_on = 0 Ω assumed")
    else:
        ctx.need(b, "cathode_r", ctx.stage_path("cathode_r"))


def _direct_gates(ctx: Context) -> list[Stage]:
    return [s for s in ctx.stages_of(("gate-drive",), "source", ctx.stage.id)
            if s.get("coupling") == "direct"]


def _pinned(b: Bound, name: str, path: str, v: Value, x: float) -> None:
    b.add(name, path, v.at(x))


def _adjustable(v: Value) -> bool:
    """An R_T written as a range table (a fixed resistor plus a potentiometer)."""
    return v.varies and v.is_range


def _at(r: Reduced, name: str) -> float:
    """An input at the worst corner (its nominal when it does not vary)."""
    if name in r.worst_inputs:
        return r.worst_inputs[name]
    return r.bound.inputs[name].value.nom


def _with_r_dis(kw: dict[str, Any]) -> dict[str, Any]:
    """Add ``r_discharge`` (UJT r_on + R1, PUT R_K) from the bound inputs."""
    if kw["device"] == "ujt":
        kw["r_discharge"] = kw.pop("rb1_on") + kw["r1"]
    else:
        kw["r_discharge"] = kw.pop("cathode_r")
    return kw


# --------------------------------------------------------------------------- osc.window

def _bind_window(ctx: Context) -> Bound:
    b = Bound()
    dev = bind_device(ctx, b)
    part = _part(ctx)
    if ctx.read(b, "iv", f"parts.{part.ref}.iv") is None:
        b.add("iv", f"parts.{part.ref}.iv#none", Value.fixed(float("nan"), "current", "A"))
    if dev == "put":
        ctx.read(b, "rg", f"parts.{part.ref}.rg")
    ctx.need(b, "rt", ctx.stage_path("timing_r"))
    return b


def _sum_window(r: Reduced) -> str:
    rt = r.bound.inputs["rt"].value
    if math.isnan(r.hi["r_min"]):
        return (f"timing R {span(rt.lo, rt.hi, 'ohm')}: fails, no guaranteed valley current at "
                f"this R_G (turn-off is not assured; r_max {eng(r.lo['r_max'], 'ohm')}); enter "
                "the part's IV for this R_G, or lower R_G until one is guaranteed")
    text = (f"timing R {span(rt.lo, rt.hi, 'ohm')} against the oscillation window "
            f"{eng(r.hi['r_min'], 'ohm')} – {eng(r.lo['r_max'], 'ohm')} over every corner "
            f"(VP {span(r.lo['peak_voltage'], r.hi['peak_voltage'], 'V')})")
    if r.status == "fail":
        if r.worst["timing_r"] <= r.worst["r_min"]:
            text += (f"; fails: R_T must exceed {at_least(r.hi['r_min'], 'ohm')} (device stays on "
                     "past the valley)")
        else:
            k = r.limits.get("fail_below", 1.2)
            text += f"; fails: needs R_T ≤ {at_most(r.lo['r_max'] / k, 'ohm')} (device never fires)"
    elif r.status == "marginal":
        k = r.limits.get("marginal_below", 2.0)
        text += f"; marginal: R_T ≤ {at_most(r.lo['r_max'] / k, 'ohm')} would pass"
    return text + "; IP and IV are 25 °C limits"


register(CheckDef(
    id="osc.window", kinds=OSC,
    question="Does it oscillate at every corner? The timing R must supply more than IP at the "
             "peak point and less than IV at the valley.",
    method="r_min = (V1 − VV)/IV < R_T < r_max = (V1 − VP)/IP at every corner, with R_T,max "
           "inside r_max by 1.2 (fail) / 2 (marginal); VP includes the external base resistors.",
    source="Rashid, Power Electronics 4th ed. §9 (UJT/PUT triggers); Boylestad & Nashelsky ch. 17",
    fn=oscillator.window_check, bind=_bind_window,
    units={"peak_voltage": "V", "r_min": "ohm", "r_max": "ohm", "timing_r": "ohm"},
    summarise=_sum_window,
    cautions=("For a PUT, IP and IV depend on R_G: enter the values for this circuit's R_G.",),
    fix="Choose R_T between r_min and r_max/2, or change C_T to move the frequency instead.",
))


# --------------------------------------------------------------------------- osc.timing

def _bind_timing(ctx: Context) -> Bound:
    b = Bound()
    b.depends.append((ctx.stage.id, "osc.window"))  # it never fires or latches on
    st = ctx.stage
    dev = device_of(st.kind)
    part = _part(ctx)
    line = st.get("sync") == "line"
    b.options.update(device=dev, sync="line" if line else "free")
    _bind_v1(ctx, b)
    ctx.need(b, "vv", f"parts.{part.ref}.vv")
    _bind_peak(ctx, b, dev, part)
    _bind_discharge_r(ctx, b, dev, part)
    rt = ctx.need(b, "rt", ctx.stage_path("timing_r"))
    ctx.need(b, "ct", ctx.stage_path("timing_c"))
    adjustable = _adjustable(rt)
    b.options["adjustable"] = adjustable
    if adjustable:
        _pinned(b, "rt_lo", ctx.stage_path("timing_r") + "#min", rt, rt.lo)
        _pinned(b, "rt_hi", ctx.stage_path("timing_r") + "#max", rt, rt.hi)
    if line:
        if ctx.project.supply.get("kind") != "ac":
            raise ProjectError('sync = "line" needs an ac supply (the line the clamp follows)',
                               st.where)
        ctx.need(b, "line_v", "supply.voltage")
        ctx.need(b, "line_f", "supply.frequency")
    target = st.get("target")
    if isinstance(target, Value):
        want = "angle" if line else "frequency"
        if target.dim != want:
            raise ProjectError(f"`target` must be a {'firing-angle' if line else 'frequency'} "
                               f"range with sync = \"{'line' if line else 'free'}\", e.g. "
                               + ('{ min = "30 deg", max = "150 deg" }' if line
                                  else '{ min = "40 Hz", max = "120 Hz" }'), st.where)
        _pinned(b, "target_lo", ctx.stage_path("target") + "#min", target, target.lo)
        _pinned(b, "target_hi", ctx.stage_path("target") + "#max", target, target.hi)
    ctx.read(b, "ripple", ctx.stage_path("supply_ripple"))
    return b


def _timing_fn(**kw: Any) -> Outcome:
    return oscillator.timing_check(**_with_r_dis(kw))


def _ripple_text(r: Reduced, line: bool) -> str:
    if "ripple_shift" not in r.hi:
        return ""
    dv = r.bound.inputs["ripple"].value.hi
    dt = r.hi["ripple_shift"]
    if line:
        w = 2 * math.pi * r.bound.inputs["line_f"].value.nom
        return f"; {eng(dv, 'V')} of supply ripple moves the firing by {eng(w * dt, 'deg')}"
    return (f"; {eng(dv, 'V')} of supply ripple moves the firing instant by {eng(dt, 's')} "
            f"({dt / r.nom['period'] * 100:.2g} % of the period)")


def _sum_timing(r: Reduced) -> str:
    line = r.bound.options["sync"] == "line"
    adjustable = r.bound.options["adjustable"]
    has_target = "target_lo" in r.bound.inputs
    ron = "" if "rb1_on#assumed" not in " ".join(i.path for i in r.bound.inputs.values()) \
        else "; r_on = 0 assumed"
    if line:
        return _sum_line(r, adjustable, has_target) + _ripple_text(r, True) + ron
    f_nom, p_nom, a_nom = r.nom["frequency"], r.nom["period"], r.nom["approx_period"]
    if math.isnan(r.worst["period"]):
        return ("fails: the capacitor never reaches the peak point at some corners (VP ≥ V1): "
                "lower the peak point below the supply")
    text = (f"period {eng(p_nom, 's')} ({eng(f_nom, 'Hz')}) nominal, "
            f"{span(r.lo['frequency'], r.hi['frequency'], 'Hz')} over the corners "
            f"(charge from VV {eng(r.nom['charge_time'], 's')} + discharge "
            f"{eng(r.nom['discharge_time'], 's')}); shortcut R·C·ln[1/(1−η)] gives "
            f"{eng(a_nom, 's')} ({pct(a_nom / p_nom - 1)})")
    if not has_target:
        return text + "; no target given" + _ripple_text(r, False) + ron
    t_lo = r.bound.inputs["target_lo"].value.nom
    t_hi = r.bound.inputs["target_hi"].value.nom
    tgt = span(t_lo, t_hi, "Hz")
    if adjustable:
        rt = r.bound.inputs["rt"].value
        slow, fast = r.hi["covered_lo"], r.lo["covered_hi"]
        text += f"; the R_T span covers {span(slow, fast, 'Hz')} at worst against target {tgt}"
        if r.status != "pass":
            fixes = []
            if not fast >= t_hi:
                fixes.append(f"R_T,min ≤ about {at_most(rt.lo * fast / t_hi, 'ohm')}")
            if not slow <= t_lo:
                fixes.append(f"R_T,max ≥ about {at_least(rt.hi * slow / t_lo, 'ohm')}")
            text += "; fails: needs " + " and ".join(fixes or ["a wider R_T span"])
    else:
        text += f"; target {tgt}"
        if r.status != "pass":
            f_lo, f_hi = r.lo["frequency"], r.hi["frequency"]
            rt_nom = r.bound.inputs["rt"].value.nom
            centre = math.sqrt(t_lo * t_hi)
            need = (f"R_T ≈ {eng(rt_nom * f_nom / centre, 'ohm')} to centre it"
                    if f_hi / f_lo <= t_hi / t_lo else
                    f"a spread within {t_hi / t_lo:.3g}:1 (it is {f_hi / f_lo:.3g}:1): tighter "
                    "tolerances or an adjustable R_T")
            text += f"; fails: the spread {span(f_lo, f_hi, 'Hz')} leaves it; needs {need}"
    return text + _ripple_text(r, False) + ron


def _sum_line(r: Reduced, adjustable: bool, has_target: bool) -> str:
    a_nom = r.nom["firing_angle"]
    sc = r.nom["firing_angle_shortcut"]
    text = (f"first pulse at {eng(a_nom, 'deg')} nominal, "
            f"{span(r.lo['firing_angle'], r.hi['firing_angle'], 'deg')} over the corners "
            f"(clamp onset {eng(r.nom['clamp_onset'], 'deg')}; the shortcut θz + ωt1 gives "
            f"{eng(sc, 'deg')}, {eng(sc - a_nom, 'deg')} late); pulses then repeat every "
            f"{eng(r.nom['period'], 's')} on the plateau")
    if math.isnan(a_nom):
        text = "no firing in this half-cycle at the nominal (the late-collapse pulse, if any, " \
               "is the only one)"
    if not has_target:
        if r.status == "fail":
            return text + "; fails: no firing in this half-cycle at some corners: lower R_T·C_T"
        return text + "; no target given"
    t_lo = r.bound.inputs["target_lo"].value.nom
    t_hi = r.bound.inputs["target_hi"].value.nom
    tgt = span(t_lo, t_hi, "deg")
    half = r.nom["clamp_onset"] / 2

    def scale(x: float, a_from: float, a_to: float) -> float:
        # α ≈ θz/2 + ω·t1 with t1 ∝ R_T: scale the charging part
        return x * (a_to - half) / (a_from - half)

    if adjustable:
        rt = r.bound.inputs["rt"].value
        early, late = r.hi["covered_lo"], r.lo["covered_hi"]
        text += f"; the R_T span covers {span(early, late, 'deg')} at worst against target {tgt}"
        if r.status != "pass":
            fixes = []
            if not early <= t_lo:
                fixes.append(f"R_T,min ≤ about {at_most(scale(rt.lo, early, t_lo), 'ohm')}"
                             if math.isfinite(early) else "a smaller R_T,min (no pulse now)")
            if not late >= t_hi:
                fixes.append(f"R_T,max ≥ about {at_least(scale(rt.hi, late, t_hi), 'ohm')}")
            text += "; fails: needs " + " and ".join(fixes or ["a wider R_T span"])
    else:
        text += f"; target {tgt}"
        if r.status != "pass":
            rt_nom = r.bound.inputs["rt"].value.nom
            mid = 0.5 * (t_lo + t_hi)
            text += (f"; fails: the firing angle leaves the target; R_T ≈ "
                     f"{eng(scale(rt_nom, a_nom, mid), 'ohm')} would centre it")
    return text


register(CheckDef(
    id="osc.timing", kinds=OSC,
    question="What frequency or firing delay does it give, and does it meet the target?",
    method="Free-running: t1 = R_T·C_T·ln[(V1 − VV)/(V1 − VP)] (steady state from VV), t2 = "
           "R_dis·C_T·ln(VP/VV), T = t1 + t2, against the shortcut R_T·C_T·ln[1/(1 − η)]. Line "
           "sync: the capacitor charges from 0 V at each zero crossing from min(Vm·|sin ωt|, VZ) "
           "and fires where it first reaches the instantaneous peak point (solved exactly).",
    source="Rashid, Power Electronics 4th ed. §9; Boylestad & Nashelsky ch. 17; "
           "Chattopadhyay & Rakshit ch. 16 (shortcut)",
    fn=_timing_fn, bind=_bind_timing,
    units={"period": "s", "frequency": "Hz", "charge_time": "s", "discharge_time": "s",
           "firing_angle": "deg", "approx_period": "s"},
    summarise=_sum_timing,
    cautions=("Timing capacitors should be C0G or film; class-2 ceramics and electrolytics "
              "drift with temperature, bias and age.",),
    fix="Change R_T (span) or C_T; for line sync the angle also moves with VZ and the line.",
))


# --------------------------------------------------------------------------- osc.idle-gate

def _bind_idle(ctx: Context) -> Bound:
    b = Bound()
    dev = device_of(ctx.stage.kind)
    b.options["device"] = dev
    gates = _direct_gates(ctx)
    if not gates:
        others = ctx.stages_of(("gate-drive",), "source", ctx.stage.id)
        b.not_applicable = ("no directly coupled gate-drive stage takes its pulse from this "
                            "oscillator" + (" (transformer coupling blocks the idle voltage)"
                                            if others else ""))
        return b
    gd = gates[0]
    scrs = ctx.parts("scr", gd)
    missing = [p.ref for p in scrs if not isinstance(p.params.get("vgd"), Value)]
    if missing:
        b.missing.extend(f"parts.{m}.vgd" for m in missing)
        return b
    scr = min(scrs, key=lambda p: p.params["vgd"].nom)
    ctx.need(b, "vgd", f"parts.{scr.ref}.vgd")
    ctx.need(b, "series_r", ctx.stage_path("series_r", gd))
    ctx.read(b, "gate_cathode_r", ctx.stage_path("gate_cathode_r", gd))
    part = _part(ctx)
    if dev == "ujt":
        _bind_v1(ctx, b)
        ctx.need(b, "rbb", f"parts.{part.ref}.rbb")
        ctx.need(b, "r1", ctx.stage_path("base1_r"))
        ctx.read(b, "r2", ctx.stage_path("base2_r"), default=0.0, dim="resistance", unit="ohm")
    else:
        ctx.need(b, "ip", f"parts.{part.ref}.ip")
        ctx.need(b, "cathode_r", ctx.stage_path("cathode_r"))
    b.options["scr"] = scr.ref
    if len(gates) > 1:
        b.notes.append(f"judged at gate-drive {gd.id}; {len(gates) - 1} more also coupled "
                       "directly")
    return b


def _idle_fn(*, scr: str, **kw: Any) -> Outcome:
    del scr  # for the summary only
    return oscillator.idle_gate_check(**kw)


def _sum_idle(r: Reduced) -> str:
    dev = r.bound.options["device"]
    scr = r.bound.options["scr"]
    v, vgd = r.hi["idle_voltage"], r.lo["vgd"]
    how = "R1·V1/(R1 + RBB + R2)" if dev == "ujt" else "IP·R_K"
    text = (f"idle gate voltage up to {eng(v, 'V')} ({how}) against VGD {eng(vgd, 'V')} of "
            f"{scr} at tj_max")
    if r.status == "pass":
        return text
    k = r.limits.get("marginal_below", 1.25)
    goal = vgd / k
    if dev == "ujt":
        rbb, r2, v1 = _at(r, "rbb"), _at(r, "r2"), _at(r, "v1")
        div = r.worst["idle_voltage"] / r.worst["open_voltage"]
        want = goal / div
        r1 = want * (rbb + r2) / (v1 - want) if v1 > want else float("nan")
        fix = (f"needs R1 ≤ {at_most(r1, 'ohm')}, or a pulse transformer, a series capacitor or a "
               "series diode with a gate–cathode resistor")
    else:
        rk = _at(r, "cathode_r") * goal / r.worst["idle_voltage"]
        fix = f"needs R_K ≤ {at_most(rk, 'ohm')} or a gate–cathode resistor"
    verdict = "fails" if r.status == "fail" else "marginal"
    return f"{text}; {verdict}: {fix} (idle ≤ {at_most(goal, 'V')})"


register(CheckDef(
    id="osc.idle-gate", kinds=OSC,
    question="With the oscillator idle, is the voltage it leaves on a directly coupled gate "
             "below the SCR's non-trigger voltage?",
    method="UJT: V_idle = R1·V1/(R1 + RBB + R2), divided by R_GKx/(R1∥(RBB + R2) + R_S + R_GKx) "
           "when a gate–cathode resistor is fitted; PUT: IP·R_K. Against VGD at tj_max: fail at "
           "≥ VGD, marginal at ≥ 0.8·VGD.",
    source="Rashid, Power Electronics 4th ed. §9 (UJT trigger circuit)",
    fn=_idle_fn, bind=_bind_idle,
    units={"idle_voltage": "V", "vgd": "V"},
    summarise=_sum_idle,
    fix="Lower R1, couple through a pulse transformer or capacitor, or add a series diode.",
))


# --------------------------------------------------------------------------- osc.discharge

def _bind_discharge(ctx: Context) -> Bound:
    b = Bound()
    b.depends.append((ctx.stage.id, "osc.window"))  # it never fires or latches on
    dev = device_of(ctx.stage.kind)
    part = _part(ctx)
    b.options["device"] = dev
    pre = f"parts.{part.ref}."
    ratings = ("ie_peak",) if dev == "ujt" else ("itrm", "energy")
    given = [k for k in ratings if isinstance(part.params.get(k), Value)]
    if not given:
        b.missing.append(" or ".join(pre + k for k in ratings))
        return b
    _bind_v1(ctx, b)
    ctx.need(b, "ct", ctx.stage_path("timing_c"))
    _bind_peak(ctx, b, dev, part)
    if dev == "ujt":
        if ctx.read(b, "rb1_on", pre + "rb1_on") is None:
            b.notes.append("rb1_on not given: r_on = 0 Ω assumed (conservative)")
        ctx.need(b, "current_rating", pre + "ie_peak")
    else:
        ctx.need(b, "cathode_r", ctx.stage_path("cathode_r"))
        ctx.need(b, "vf", pre + "vf")
        for k, name in (("itrm", "current_rating"), ("energy", "energy_rating")):
            if k in given:
                ctx.need(b, name, pre + k)
            else:
                b.notes.append(f"no {k} rating given: not judged")
    gates = ctx.stages_of(("gate-drive",), "source", ctx.stage.id)
    if gates:
        gd = gates[0]
        ctx.need(b, "series_r", ctx.stage_path("series_r", gd))
        if gd.get("coupling") == "transformer":
            ctx.read(b, "turns", ctx.stage_path("turns_ratio", gd), default=1.0,
                     dim="dimensionless", unit="1")
            b.notes.append(f"the gate of stage {gd.id} loads the pulse resistor through its "
                           "transformer: taken as a short through n²·series_r (conservative)")
        else:
            b.notes.append(f"the gate of stage {gd.id} is DC-coupled: taken as a short "
                           "through series_r across the pulse resistor (conservative)")
    return b


def _discharge_fn(**kw: Any) -> Outcome:
    kw["r_pulse"] = kw["r1"] if kw["device"] == "ujt" else kw.pop("cathode_r")
    return oscillator.discharge_check(**kw)


def _sum_discharge(r: Reduced) -> str:
    dev = r.bound.options["device"]
    ins = r.bound.inputs
    text = f"peak discharge current up to {eng(r.hi['peak_current'], 'A')}"
    if "current_rating" in ins:
        text += f" against {eng(ins['current_rating'].value.lo, 'A')}"
    text += f"; pulse energy ½·C·VP² up to {eng(r.hi['pulse_energy'], 'J')}"
    if "energy_rating" in ins:
        text += f" against {eng(ins['energy_rating'].value.lo, 'J')}"
    if r.status == "pass":
        return text
    fixes = []
    i_rat = ins["current_rating"].value.lo if "current_rating" in ins else float("nan")
    if r.hi["peak_current"] > i_rat:
        vp = r.worst["peak_voltage"]
        if dev == "ujt":
            ron = _at(r, "rb1_on") if "rb1_on" in ins else 0.0
            need = (vp - _at(r, "vd")) / i_rat - ron
            fixes.append(f"R1 ≥ {at_least(need, 'ohm')}")
        else:
            fixes.append(f"R_K ≥ {at_least((vp - _at(r, 'vf')) / i_rat, 'ohm')}")
    if "energy_rating" in ins and r.hi["pulse_energy"] > ins["energy_rating"].value.lo:
        vp = r.hi["peak_voltage"]
        fixes.append(f"C_T ≤ {at_most(2 * ins['energy_rating'].value.lo / vp ** 2, 'F')}")
    return f"{text}; fails: needs " + " and ".join(fixes or ["a lower peak point"])


register(CheckDef(
    id="osc.discharge", kinds=OSC,
    question="Is the capacitor discharge within the device's peak current (UJT) or pulse "
             "energy (PUT) rating?",
    method="UJT i_pk = (VP − VD)/(r_on + R1′) ≤ ie_peak; PUT i_pk = (VP − VF)/R_K′ ≤ itrm and "
           "½·C_T·VP² ≤ energy; R′ includes the gate as a short through series_r (n²·series_r "
           "through a pulse transformer of ratio n).",
    source="Rashid, Power Electronics 4th ed. §9",
    fn=_discharge_fn, bind=_bind_discharge,
    units={"peak_current": "A", "pulse_energy": "J"},
    summarise=_sum_discharge,
    cautions=("UJT peak-current ratings are stated for a maximum discharge capacitance and "
              "voltage; check C_T and VP against that condition.",),
    fix="Raise R1 or R_K, or use a smaller C_T with a larger R_T.",
))


# --------------------------------------------------------------------------- osc.dissipation

def _bind_dissipation(ctx: Context) -> Bound:
    b = Bound()
    dev = device_of(ctx.stage.kind)
    part = _part(ctx)
    b.options["device"] = dev
    if not isinstance(part.params.get("pd"), Value):
        b.missing.append(f"parts.{part.ref}.pd")
        return b
    _bind_v1(ctx, b)
    pre = f"parts.{part.ref}."
    if dev == "ujt":
        ctx.need(b, "rbb", pre + "rbb")
        ctx.need(b, "r1", ctx.stage_path("base1_r"))
        ctx.read(b, "r2", ctx.stage_path("base2_r"), default=0.0, dim="resistance", unit="ohm")
    else:
        _bind_peak(ctx, b, dev, part)
        for key in ("vv", "vf"):
            ctx.need(b, key, pre + key)
        ctx.need(b, "rt", ctx.stage_path("timing_r"))
        ctx.need(b, "ct", ctx.stage_path("timing_c"))
        ctx.need(b, "cathode_r", ctx.stage_path("cathode_r"))
    ctx.need(b, "pd", pre + "pd")
    ctx.ambient_max(b)
    return b


def _dissipation_fn(**kw: Any) -> Outcome:
    if kw["device"] == "put":
        kw["r_discharge"] = kw.pop("cathode_r")
    return oscillator.dissipation_check(**kw)


def _sum_dissipation(r: Reduced) -> str:
    dev = r.bound.options["device"]
    ins = r.bound.inputs
    t_hot = ins["t_max_ambient"].value.nom + ins["t_max_rise"].value.nom
    what = "interbase dissipation I_BB²·R_BB" if dev == "ujt" else "device dissipation"
    text = (f"{what} up to {eng(r.hi['dissipation'], 'W')} against "
            f"{eng(r.lo['allowed_power'], 'W')} allowed at {eng(t_hot, 'degC')} "
            f"(pd {eng(ins['pd'].value.lo, 'W')} derated linearly to zero at 125 °C from 25 °C, "
            "assumed)")
    if dev == "put":
        text += f"; the gate divider takes {eng(r.hi['divider_power'], 'W')} in its resistors"
    else:
        text += f"; the whole interbase circuit takes {eng(r.hi['circuit_power'], 'W')}"
    if r.status == "pass":
        return text
    pa = r.lo["allowed_power"]
    if dev == "ujt" and pa > 0:
        rbb, r1, v1 = _at(r, "rbb"), _at(r, "r1"), _at(r, "v1")
        r2 = v1 * math.sqrt(rbb / pa) - rbb - r1
        return f"{text}; fails: needs R2 ≥ {at_least(r2, 'ohm')} or V1 ≤ " \
               f"{at_most(v1 * math.sqrt(pa / r.hi['dissipation']), 'V')}"
    if pa <= 0:
        return f"{text}; fails: the ambient is above the 125 °C derating end"
    return f"{text}; fails: needs f·C_T reduced by {r.hi['dissipation'] / pa:.2g}×"


register(CheckDef(
    id="osc.dissipation", kinds=OSC,
    question="Is the interbase (UJT) or divider and device dissipation within rating at "
             "maximum ambient?",
    method="UJT P = I_BB²·R_BB, I_BB = V1/(RBB + R1 + R2); PUT P ≈ f·VF·C_T·(VP − VV); against pd "
           "derated linearly from 25 °C to zero at 125 °C at T_a,max + enclosure rise.",
    source="Rashid, Power Electronics 4th ed. §9; derating: common practice",
    fn=_dissipation_fn, bind=_bind_dissipation,
    units={"dissipation": "W"},
    summarise=_sum_dissipation,
    fix="Raise R2 or lower V1 (UJT); lower the pulse rate or C_T (PUT).",
))


# --------------------------------------------------------------------------- osc.leakage

def _bind_leakage(ctx: Context) -> Bound:
    b = Bound()
    dev = device_of(ctx.stage.kind)
    part = _part(ctx)
    b.options["device"] = dev
    _bind_v1(ctx, b)
    _bind_peak(ctx, b, dev, part)
    ctx.need(b, "ip", f"parts.{part.ref}.ip")
    ctx.need(b, "rt", ctx.stage_path("timing_r"))
    ctx.need(b, "ct", ctx.stage_path("timing_c"))
    given = ctx.read(b, "leakage", ctx.stage_path("leakage")) is not None
    if not given:
        b.add("leakage", ctx.stage_path("leakage") + "#none", Value.fixed(0.0, "current", "A"))
    b.options["leakage_given"] = given
    return b


def _sum_leakage(r: Reduced) -> str:
    leak = r.hi["leakage"]
    text = (f"charging current at the peak point down to {eng(r.lo['charge_current'], 'A')} "
            f"(R_T max) against IP {eng(r.hi['ip'], 'A')}"
            + (f" + leakage {eng(leak, 'A')}" if r.bound.options["leakage_given"]
               else " (no leakage data)")
            + f": ratio {(r.margin + 1) * r.limits.get('fail_below', 1.0):.3g}")
    if r.status == "pass":
        return text
    k = r.limits.get("marginal_below", 2.0)
    i_need = k * (r.worst["ip"] + r.worst["leakage"])
    rt_need = (r.worst["charge_current"] * _at(r, "rt")) / i_need
    text += (f"; {r.status}: needs R_T,max ≤ {at_most(rt_need, 'ohm')} (a charging current ≥ "
             f"{at_least(i_need, 'A')}), with a larger C_T to keep the timing")
    return text


register(CheckDef(
    id="osc.leakage", kinds=OSC,
    question="Is the charging current at the peak point well above IP plus leakage?",
    method="(V1 − VP)/R_T ≥ 2 × (IP + leakage) at every corner; leakage is the stage's "
           "`leakage` (0 when not given, said).",
    source="Rashid, Power Electronics 4th ed. §9; Boylestad & Nashelsky ch. 17",
    fn=oscillator.leakage_check, bind=_bind_leakage,
    units={"charge_current": "A", "ip": "A"},
    summarise=_sum_leakage,
    cautions=("An aluminium electrolytic timing capacitor leaks about 0.01·C·V µA or 3 µA; give "
              "`leakage` for it.",),
    fix="Lower R_T,max (with a larger C_T) or use a low-leakage film capacitor.",
))


# --------------------------------------------------------------------------- osc.temp-comp

def _bind_temp_comp(ctx: Context) -> Bound:
    b = Bound()
    part = _part(ctx)
    pre = f"parts.{part.ref}."
    eta = part.params["eta"]
    b.add("eta", pre + "eta#nominal", eta.at(eta.nom))
    _bind_v1(ctx, b)
    if ctx.read(b, "r2", ctx.stage_path("base2_r")) is None:
        b.add("r2", ctx.stage_path("base2_r") + "#none", Value.fixed(0.0, "resistance", "ohm"))
        b.notes.append("no base-2 resistor: no temperature compensation")
    if isinstance(part.params.get("rbb_tempco"), Value):
        ctx.need(b, "tc_bb", pre + "rbb_tempco")
        ctx.need(b, "rbb", pre + "rbb")
        ctx.need(b, "r1", ctx.stage_path("base1_r"))
    return b


def _sum_temp_comp(r: Reduced) -> str:
    lo_k, hi_k = r.limits.get("low", 0.3), r.limits.get("high", 3.0)
    rule_lo, rule_hi = r.lo["base2_r_rule"], r.hi["base2_r_rule"]
    text = (f"base-2 resistor {span(r.lo['base2_r'], r.hi['base2_r'], 'ohm')} against the rule "
            f"10⁴/(η·V1) = {span(rule_lo, rule_hi, 'ohm')} (nominal η; {lo_k:g}–{hi_k:g}× "
            "passes)")
    if "base2_r_physical" in r.nom:
        text += (f"; physical estimate {eng(r.nom['base2_r_physical'], 'ohm')} from the R_BB "
                 "tempco and 2 mV/K")
    if r.status != "pass":
        text += (f"; marginal (advisory): choose R2 within {eng(lo_k * rule_hi, 'ohm')} – "
                 f"{eng(hi_k * rule_lo, 'ohm')}")
    return text


register(CheckDef(
    id="osc.temp-comp", kinds=("ujt-oscillator",),
    question="UJT only: is the base-2 resistor near what temperature compensation asks for? "
             "(advisory: marginal at worst)",
    method="R2 within 0.3–3 × R2,rule = 10⁴/(η·V1) at the nominal η; the physical form "
           "η·R2 − (1 − η)·R1 = k_D·(RBB + R1 + R2)²/(V1·TC_BB·RBB) is shown when the R_BB "
           "tempco is given.",
    source="Rashid, Power Electronics 4th ed. Ex 9.5 (rule of thumb)",
    fn=oscillator.temp_comp_check, bind=_bind_temp_comp,
    units={"base2_r": "ohm", "base2_r_rule": "ohm"},
    summarise=_sum_temp_comp,
    fix="Choose R2 near 10⁴/(η·V1) Ω.",
))
