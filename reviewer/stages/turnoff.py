"""Turn-off network stages (line, capacitor and resonant commutation) and ``turnoff.*`` checks."""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from checks import turnoff
from reviewer.fmt import at_least, at_most, eng, span
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
from reviewer.schema import POWER, TURNOFF
from reviewer.stages.power import gate_pulse

V = "value"

LINE = register_kind(StageKind("line-commutation", {
    "for": Param("stage", required=True, stage_kinds=("phase-control",)),
}, "natural turn-off on an AC supply"))

CAPACITOR = register_kind(StageKind("capacitor-commutation", {
    "for": Param("stage", required=True, stage_kinds=("dc-switch",)),
    "c": Param(V, "capacitance", required=True),
    "c_voltage": Param(V, "voltage"),
    "c_current": Param(V, "current"),
    "charge_voltage": Param(V, "voltage"),
    "load_model": Param("choice", choices=("resistive", "constant-current")),
}, "a charged capacitor switched across the conducting SCR"))

RESONANT = register_kind(StageKind("resonant-commutation", {
    "for": Param("stage", required=True, stage_kinds=POWER),
    "c": Param(V, "capacitance", required=True),
    "l": Param(V, "inductance", required=True),
    "c_voltage": Param(V, "voltage"),
    "c_current": Param(V, "current"),
    "charge_voltage": Param(V, "voltage"),
    "diode": Param("bool"),
}, "an L–C circuit rings a current pulse against the load current"))

NETWORK = {"line-commutation": "line", "capacitor-commutation": "capacitor",
           "resonant-commutation": "resonant"}
FIRING_SWEEP = 37  # 5° steps over a 0–180° range: t_c and |sin β| are not monotonic in α


# --------------------------------------------------------------------------------------------
# Binding
# --------------------------------------------------------------------------------------------

def _power(ctx: Context) -> tuple[Stage, Part]:
    pw = ctx.linked_stage("for")
    assert pw is not None  # the loader checks the link
    scr = ctx.part("scr", pw)
    assert scr is not None
    return pw, scr


def _start(ctx: Context) -> tuple[Bound, Stage, Part]:
    b = Bound()
    b.options["network"] = NETWORK[ctx.stage.kind]
    pw, scr = _power(ctx)
    b.options["power_stage"] = pw.id
    return b, pw, scr


def _has_inductance(ctx: Context, pw: Stage) -> bool:
    lv = ctx.project.lookup(ctx.stage_path("load.l", pw))
    return lv is not None and lv.hi > 0


def _bind_firing(ctx: Context, b: Bound, pw: Stage) -> None:
    """The firing range: the power stage's ``firing`` (swept), else a line-synchronised
    oscillator behind its gate drive. Sets ``not_applicable`` when neither gives one."""
    path = ctx.stage_path("firing", pw)
    fv = ctx.project.lookup(path)
    if pw.get("control") == "burst":  # integral-cycle control: fired at the voltage zero
        b.add("alpha", ctx.stage_path("control", pw) + "#burst",
              Value.fixed(0.0, "angle", "rad"))
        return
    if fv is not None:
        extra = [math.pi / 2]
        r = ctx.project.lookup(ctx.stage_path("load.r", pw))
        lv = ctx.project.lookup(ctx.stage_path("load.l", pw))
        f = ctx.project.lookup("supply.frequency")
        if r is not None and lv is not None and f is not None:
            extra.append(math.atan2(2 * math.pi * f.nom * lv.nom, r.nom))  # nominal φ
        ctx.need(b, "alpha", path, sweep=FIRING_SWEEP, extra=tuple(extra))
        return
    gate = ctx.linked_stage("gate", pw)
    osc = ctx.linked_stage("source", gate) if gate is not None else None
    if osc is None or osc.get("sync") != "line":  # no line-synchronised trigger to take it from
        b.missing.append(f"stages.{pw.id}.firing")
        return
    dev = "ujt" if osc.kind == "ujt-oscillator" else "put"
    part = ctx.part(dev, osc)
    assert part is not None
    b.options["osc_device"] = dev
    if "v_s" not in b.inputs:  # the oscillator runs from the rectified line
        ctx.need(b, "v_s", "supply.voltage")
    b.notes.append(f"firing angle from the line-synchronised oscillator `{osc.id}`")
    b.depends.append((osc.id, "osc.window"))  # no firing angle unless it oscillates
    ctx.need(b, "osc_vz", ctx.stage_path("zener", osc))
    ctx.need(b, "osc_rt", ctx.stage_path("timing_r", osc))
    ctx.need(b, "osc_ct", ctx.stage_path("timing_c", osc))
    pre = f"parts.{part.ref}."
    if dev == "ujt":
        for key in ("eta", "rbb", "vd"):
            ctx.need(b, "osc_" + key, pre + key)
        ctx.need(b, "osc_r1", ctx.stage_path("base1_r", osc))
        ctx.read(b, "osc_r2", ctx.stage_path("base2_r", osc), default=0.0, dim="resistance",
                 unit="ohm")
    else:
        ctx.need(b, "osc_offset", pre + "offset")
        ctx.need(b, "osc_r_upper", ctx.stage_path("gate_r_upper", osc))
        ctx.need(b, "osc_r_lower", ctx.stage_path("gate_r_lower", osc))


def _bind_line(ctx: Context, b: Bound, pw: Stage, *, for_dvdt: bool) -> None:
    """Line commutation reads only what can change its answer: with a resistive load or a
    freewheeling diode, t_c = π/ω and the reapplied rate is the line's slope."""
    if ctx.project.supply.get("kind") != "ac":
        b.not_applicable = "line commutation needs an AC supply"
        return
    if ctx.want(b, "f", "supply.frequency") is None:
        return
    topology = pw.get("topology", "half-wave")
    freewheel = bool(pw.get("freewheel", False))
    b.options.update(topology=topology, freewheel=freewheel)
    inductive = _has_inductance(ctx, pw) and not freewheel
    if not for_dvdt and not freewheel and _has_emf(ctx, pw):
        _bind_line_emf(ctx, b, pw, topology)
        return
    if for_dvdt:
        ctx.need(b, "v_s", "supply.voltage")
        if not (inductive and topology in ("ac-switch", "bridge")):
            return
    elif not inductive:
        return
    ctx.need(b, "r", ctx.stage_path("load.r", pw))
    ctx.need(b, "l", ctx.stage_path("load.l", pw))
    _bind_firing(ctx, b, pw)
    pulse = None if for_dvdt else gate_pulse(ctx, pw)
    if pulse is not None:  # what happens when fired before φ (as the current checks take it)
        b.options["gate_pulse"] = pulse
    if topology == "bridge" and not for_dvdt:
        ctx.need(b, "v_s", "supply.voltage")
        ctx.read(b, "l_s", "supply.inductance", default=0.0, dim="inductance", unit="H")


def _has_emf(ctx: Context, pw: Stage) -> bool:
    load = pw.get("load")
    return isinstance(load, dict) and isinstance(load.get("e"), Value)


def _bind_line_emf(ctx: Context, b: Bound, pw: Stage, topology: str) -> None:
    """A back-EMF load: the SCR stays reverse-biased after its current ends until the line
    exceeds E again, so t_c reads E, the line voltage and the R–L–E current's inputs."""
    ctx.need(b, "r", ctx.stage_path("load.r", pw))
    ctx.read(b, "l", ctx.stage_path("load.l", pw), default=0.0, dim="inductance", unit="H")
    b.notes[:] = [n for n in b.notes if not n.startswith("l not given")]
    ctx.need(b, "e", ctx.stage_path("load.e", pw))
    ctx.need(b, "v_s", "supply.voltage")
    _bind_firing(ctx, b, pw)
    if topology == "bridge":
        ctx.read(b, "l_s", "supply.inductance", default=0.0, dim="inductance", unit="H")


def _bind_network(ctx: Context, b: Bound, pw: Stage) -> None:
    """Capacitor and resonant networks: C (and L), load R, supply, charge voltage."""
    st = ctx.stage
    ctx.need(b, "c", ctx.stage_path("c"))
    ctx.need(b, "r", ctx.stage_path("load.r", pw))
    ctx.need(b, "v_s", "supply.voltage")
    ac = ctx.project.supply.get("kind") == "ac"
    if ctx.read(b, "v_c0", ctx.stage_path("charge_voltage")) is None:
        b.notes.append("charge_voltage not given: the capacitor is taken as charged to the "
                       + ("line peak √2·V" if ac else "supply"))
    if st.kind == "resonant-commutation":
        ctx.need(b, "l", ctx.stage_path("l"))
        b.options["ac"] = ac
        if ac:
            b.notes.append("load current taken as the line peak over R, V_m/R, the most the "
                           "load carries at any instant")
    else:
        model = st.get("load_model")
        if model is None:
            model = "constant-current" if _has_inductance(ctx, pw) else "resistive"
            b.notes.append(f"load_model not given: {model} assumed from the load")
        b.options["model"] = model


def _bind_time(ctx: Context) -> Bound:
    b, pw, scr = _start(ctx)
    if ctx.want(b, "tq", f"parts.{scr.ref}.tq") is None:  # its turn-off time at Tj,max
        return b
    if b.options["network"] == "line":
        _bind_line(ctx, b, pw, for_dvdt=False)
    else:
        _bind_network(ctx, b, pw)
        if b.options["network"] == "resonant":
            d = ctx.stage.get("diode")
            b.options["diode"] = "unknown" if d is None else ("yes" if d else "no")
            if d is not True and _has_inductance(ctx, pw):
                # Without a diode the load's inductance sets how the current flows on once
                # the SCR is off (without one given, a resistive load).
                ctx.need(b, "l_load", ctx.stage_path("load.l", pw))
    return b


def _bind_capacitor(ctx: Context) -> Bound:
    b, pw, _ = _start(ctx)
    if ctx.want(b, "c_voltage", ctx.stage_path("c_voltage")) is None:
        return b
    ctx.read(b, "c_current", ctx.stage_path("c_current"))  # the peak (pulse) current rating
    _bind_network(ctx, b, pw)
    return b


def _bind_peak(ctx: Context) -> Bound:
    b, pw, _ = _start(ctx)
    _bind_network(ctx, b, pw)
    del b.options["network"]
    return b


def _bind_dvdt(ctx: Context) -> Bound:
    b, pw, scr = _start(ctx)
    if ctx.want(b, "dvdt", f"parts.{scr.ref}.dvdt") is None:  # the rating at Tj,max
        return b
    if b.options["network"] != "line":
        _bind_network(ctx, b, pw)
        return b
    _bind_line(ctx, b, pw, for_dvdt=True)
    if b.not_applicable or b.missing or "l" not in b.inputs:
        return b
    snubbers = ctx.stages_of(("rc-snubber",), "across", pw.id)
    if not snubbers:
        b.options["snubber"] = ""
        return b
    sn = snubbers[0]
    b.options["snubber"] = sn.id
    ctx.need(b, "snubber_r", ctx.stage_path("r", sn))
    ctx.need(b, "snubber_c", ctx.stage_path("c", sn))
    if ctx.read(b, "snubber_l", ctx.stage_path("inductance", sn)) is None \
            and ctx.read(b, "snubber_l", "supply.inductance") is None:
        b.missing.append(ctx.stage_path("inductance", sn) + " (or supply.inductance)")
    return b


def _strip(fn: object) -> object:
    """Drop the options the summaries read but the pure functions do not take."""
    def call(**kw: object) -> turnoff.Outcome:
        for key in ("power_stage", "snubber"):
            kw.pop(key, None)
        return fn(**kw)  # type: ignore[operator]
    return call


# --------------------------------------------------------------------------------------------
# Summaries
# --------------------------------------------------------------------------------------------

def _c_needed(r: Reduced, key: str) -> str:
    """The nominal C (same tolerance) that brings every corner to the limit: C_nom × max scale."""
    c = r.bound.inputs["c"].value
    return at_least(c.nom * r.hi[key], "F")


def _sum_time(r: Reduced) -> str:
    net = r.bound.options["network"]
    k_fail = r.limits.get("fail_below", 1.2)
    k_pass = r.limits.get("marginal_below", k_fail)
    tc_lo, tq = r.lo["turnoff_time"], r.worst["tq"]
    text = (f"circuit turn-off time {span(tc_lo, r.hi['turnoff_time'], 's')} against tq "
            f"{eng(tq, 's')}: at least {tc_lo / tq:.3g} × tq")
    if net == "line":
        o = r.bound.options
        if o["freewheel"]:
            text += " (freewheeling diode: π/ω)"
        elif "l" not in r.bound.inputs:
            text += " (resistive load: π/ω)"
        elif o["topology"] == "ac-switch":
            fl = span(r.lo["full_line_time"], r.hi["full_line_time"], "s")
            text += (f"; the full line is across it for {fl}, (π + α − β)/ω, the partner "
                     "SCR's drop for the rest")
            if r.hi.get("lost_control", 0.0) > 0:
                text += ("; fired before the load angle at some corners: control is lost "
                         "(power.control), taken as half-wave, (2π − β)/ω")
        elif "e" in r.bound.inputs:
            text += (f" (back EMF: reverse-biased from β until the line exceeds E again, "
                     f"β up to {eng(r.hi['beta'], 'deg')})")
            if r.hi.get("continuous", 0.0) > 0:
                text += "; continuous conduction at some corners: (π − α − μ)/ω"
        elif o["topology"] == "bridge" and r.hi.get("continuous", 0.0) > 0:
            text += "; continuous conduction at some corners: (π − α − μ)/ω"
        else:
            text += f" ((2π − β)/ω, β up to {eng(r.hi['beta'], 'deg')})"
        if r.status != "pass":
            text += (f"; needs an SCR with tq ≤ {at_most(tc_lo / k_fail, 's')} "
                     f"(≤ {at_most(tc_lo / k_pass, 's')} to pass)")
        return text
    if net == "resonant":
        d = r.bound.options["diode"]
        if d == "unknown":
            text += (f"; diode not stated: the smaller of the diode interval "
                     f"{eng(r.lo['t_diode'], 's')} and the hold time through the load "
                     f"{eng(r.lo['t_hold'], 's')}")
        text += f" at load current up to {eng(r.hi['load_current'], 'A')}"
    if r.status == "fail":
        text += (f"; fails: needs C ≥ {_c_needed(r, 'c_scale_fail')} to reach {k_fail:g} × tq, "
                 f"C ≥ {_c_needed(r, 'c_scale_pass')} to pass")
    elif r.status == "marginal":
        text += f"; marginal: C ≥ {_c_needed(r, 'c_scale_pass')} would pass"
    return text


def _fn_capacitor(**kw: Any) -> Any:
    """turnoff.capacitor, with the capacitor's peak current rating ``c_current`` when given:
    the metric is the smaller of the voltage and the current ratios."""
    c_current = kw.pop("c_current", None)
    out = _strip(turnoff.capacitor_check)(**kw)  # type: ignore[operator]
    if c_current is None:
        return out
    from checks.core import Outcome, grade

    cur = out.values["capacitor_current"]
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio_v = np.asarray(kw["c_voltage"], dtype=float) / out.values["capacitor_peak"]
        ratio_i = np.asarray(c_current, dtype=float) / cur
    margin, status = grade(np.minimum(ratio_v, ratio_i), kw["limits"])
    values = dict(out.values, c_current=np.asarray(c_current, dtype=float) + 0 * cur)
    return Outcome(values, margin, status, out.notes)


def _sum_capacitor(r: Reduced) -> str:
    pk = r.hi["capacitor_peak"]
    rated = "c_current" in r.bound.inputs
    text = (f"capacitor peak {eng(pk, 'V')} against its {eng(r.lo['c_voltage'], 'V')} "
            f"rating; peak current {eng(r.hi['capacitor_current'], 'A')}"
            + (f" against its {eng(r.lo['c_current'], 'A')} rating" if rated else
               " (no current rating in the project: reported only)"))
    if rated and r.hi["capacitor_current"] > r.lo["c_current"]:
        text += ("; fails: needs a capacitor rated for "
                 f"≥ {at_least(r.hi['capacitor_current'], 'A')}")
    if r.status == "fail" and pk > r.lo["c_voltage"]:
        text += f"; fails: needs c_voltage ≥ {at_least(pk, 'V')}"
        if "c_scale_overcharge" in r.hi and math.isfinite(r.hi["c_scale_overcharge"]):
            text += (f", or C ≥ {_c_needed(r, 'c_scale_overcharge')} to hold the overcharge "
                     "within the rating")
    return text


def _sum_peak(r: Reduced) -> str:
    k = r.limits.get("fail_below", 1.5)
    ratio = r.worst["ring_peak"] / r.worst["load_current"]
    text = (f"ring peak {span(r.lo['ring_peak'], r.hi['ring_peak'], 'A')} against load "
            f"current up to {eng(r.hi['load_current'], 'A')}: at least {ratio:.3g} ×; the "
            f"SCRs carry I_o + I_p up to {eng(r.hi['scr_peak'], 'A')}")
    if r.status != "pass":
        lv = r.bound.inputs["l"].value
        text += (f"; fails: needs ≥ {k:g} × load current, C ≥ "
                 f"{_c_needed(r, 'c_scale_fail')} or "
                 f"L ≤ {at_most(lv.nom / r.hi['c_scale_fail'], 'H')}")
    return text


def _sum_dvdt(r: Reduced) -> str:
    o = r.bound.options
    rate = r.hi["reapplied_dvdt"]
    rating = r.lo["dvdt"]
    if o["network"] == "line" and r.hi.get("stepped", 0.0) > 0 and not o.get("snubber"):
        return (f"no snubber across `{o['power_stage']}`: forward voltage returns as a step of "
                f"up to {eng(r.hi['step_voltage'], 'V')} when the partner SCR turns off the "
                "inductive current, at a rate bounded only by stray capacitance; fit an "
                f"rc-snubber that keeps it below {eng(rating, 'V/s')}")
    text = f"reapplied dv/dt up to {eng(rate, 'V/s')} against the {eng(rating, 'V/s')} rating"
    if o["network"] == "line":
        if r.hi.get("stepped", 0.0) > 0:
            text += (f" (a step of up to {eng(r.hi['step_voltage'], 'V')} through snubber "
                     f"`{o['snubber']}`)")
        else:
            text += " (the line's slope at its zero crossing)"
        if r.status == "fail":
            text += "; fails: a larger snubber capacitor or a higher-rated SCR is needed"
        return text
    if r.status == "fail":
        text += f"; fails: needs C ≥ {_c_needed(r, 'c_scale_fail')}"
    return text


# --------------------------------------------------------------------------------------------
# The checks
# --------------------------------------------------------------------------------------------

_SRC = ("Bimbhra, Power Electronics ch. 5 and 7 (commutation examples); Rashid, Power "
        "Electronics 4th ed. §10–11, §17")

register(CheckDef(
    id="turnoff.time", kinds=TURNOFF,
    question="Circuit turn-off time against the SCR's tq, at minimum charge voltage and "
             "maximum load current.",
    method="line: π/ω, (2π − β)/ω or (π − α − μ)/ω by topology and load over the firing range "
           "(a back EMF E: reverse-biased from the R–L–E extinction β until the line exceeds E "
           "again, (2π + θ1 − β)/ω, θ1 = asin(E/V_m)); "
           "capacitor: R·C·ln(1 + V_c0/V_s) or C·V_c0/I_o; resonant: (π − 2·asin x)·√(LC) with "
           "a diode; without, the loop (supply, load R and L, the commutating L and C) from the "
           "current zero, C at V_c0·√(1 − x²), until the SCR's voltage returns to zero "
           "(C·V_c0·√(1 − x²)/I_o when a load choke holds the current); "
           "t_c ≥ 1.2 tq (fail) / 1.5 tq (marginal)",
    source=_SRC, fn=_strip(turnoff.time_check), bind=_bind_time,  # type: ignore[arg-type]
    units={"turnoff_time": "s", "tq": "s"}, summarise=_sum_time,
    cautions=("tq grows with junction temperature, current, di/dt and reapplied dv/dt: use the "
              "value at Tj,max",),
    fix="Raise C (or the charge voltage), lower the load current at the current limit, or use "
        "a faster SCR.",
    optional=frozenset({"full_line_time"}),
))

register(CheckDef(
    id="turnoff.capacitor", kinds=("capacitor-commutation", "resonant-commutation"),
    question="Commutating capacitor peak voltage (including resonant overcharge) and current "
             "against its ratings.",
    method="capacitor: max(V_c0, V_s), current (V_s + V_c0)/R or I_o; resonant: "
           "V_s + √(L/C)·I_o or V_c0, current I_p",
    source=_SRC, fn=_fn_capacitor, bind=_bind_capacitor,
    units={"capacitor_peak": "V", "capacitor_current": "A"}, summarise=_sum_capacitor,
    cautions=("the capacitor swings both ways: a non-polar film type",),
    fix="A capacitor rated above the peak (or, resonant, a larger C to cut the overcharge).",
))

register(CheckDef(
    id="turnoff.peak-current", kinds=("resonant-commutation",),
    question="Resonant only: the ring current must exceed the load current; the SCRs must "
             "carry the sum.",
    method="I_p = V_c0·√(C/L) ≥ 1.5 × I_o at V_c0,min, C,min, L,max and I_o,max",
    source=_SRC, fn=_strip(turnoff.peak_current_check), bind=_bind_peak,  # type: ignore
    units={"ring_peak": "A", "load_current": "A"}, summarise=_sum_peak,
    fix="Raise C or lower L (I_p ∝ √(C/L)); check the SCRs' surge rating against I_o + I_p.",
))

register(CheckDef(
    id="turnoff.reapplied-dvdt", kinds=TURNOFF,
    question="The rate at which forward voltage returns after commutation, against dv/dt.",
    method="capacitor: V_s/(R·C) at the voltage zero (resistive), I_o/C (constant current, "
           "resonant); line: ω·V_m, or the snubber's step response to V_m·|sin β|",
    source=_SRC, fn=_strip(turnoff.dvdt_check), bind=_bind_dvdt,  # type: ignore[arg-type]
    units={"reapplied_dvdt": "V/s"}, summarise=_sum_dvdt,
    fix="A larger commutating (or snubber) capacitor, or an SCR with a higher dv/dt rating.",
))
