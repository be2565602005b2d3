"""Gate-drive stages (oscillator pulse to SCR gate) and the ``gate.*`` checks."""

from __future__ import annotations

import math

import numpy as np

from checks import gate
from checks.core import cold_value
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
from reviewer.schema import OSC, POWER
from reviewer.stages.oscillator import bind_device

V = "value"

GATE_DRIVE = register_kind(StageKind("gate-drive", {
    "source": Param("stage", required=True, stage_kinds=OSC),
    "scr": Param("parts", required=True, part_type="scr"),
    "coupling": Param("choice", required=True, choices=("direct", "transformer")),
    "series_r": Param(V, "resistance", required=True),
    "gate_cathode_r": Param(V, "resistance"),
    "turns_ratio": Param(V, "dimensionless"),
    "volt_seconds": Param(V, "volt_seconds"),
    "isolation": Param(V, "voltage"),
    "required_isolation": Param(V, "voltage"),
    "coupling_capacitance": Param(V, "capacitance", allow_zero=True),
}, "from an oscillator's pulse to one or more SCR gates"))

KIND = ("gate-drive",)
TGT_ASSUMED = 3e-6  # the top of the typical 1–3 µs [common practice]
_COLD_K = {"igt": gate.K_IGT, "vgt": gate.K_VGT, "il": gate.K_IL}


# --------------------------------------------------------------------------- binding helpers

def _osc(ctx: Context) -> Stage:
    osc = ctx.linked_stage("source")
    assert osc is not None  # the loader checks the link
    return osc


def _transformer(ctx: Context) -> bool:
    return ctx.stage.get("coupling") == "transformer"


def _bind_source(ctx: Context, b: Bound, *, pulse: bool) -> str:
    """The oscillator as a pulse source, and this stage's R_S, R_GK and turns ratio.

    ``pulse`` adds what the discharge's time course needs (C_T, VV, IV); without it only the
    t = 0 Thevenin source is read. Returns the device (``ujt`` or ``put``).
    """
    osc = _osc(ctx)
    b.depends.append((osc.id, "osc.window"))  # no pulse at all unless it oscillates
    dev = bind_device(ctx, b, stage=osc)
    b.inputs.pop("ip", None)  # the peak-point current plays no part in the pulse
    if not pulse:
        b.inputs.pop("vv", None)
    part = ctx.part(dev, osc)
    assert part is not None
    pre = f"parts.{part.ref}."
    if dev == "ujt":
        if isinstance(part.params.get("rb1_on"), Value):
            ctx.need(b, "r_on", pre + "rb1_on")
        else:
            b.add("r_on", pre + "rb1_on#assumed", Value.fixed(0.0, "resistance", "ohm"))
            b.notes.append("rb1_on not given: r_on = 0 assumed (conservative for power and "
                           "pulse width, optimistic for the trigger current)")
    else:
        ctx.need(b, "vf", pre + "vf")
        ctx.need(b, "r_k", ctx.stage_path("cathode_r", osc))
    if pulse:
        ctx.need(b, "c", ctx.stage_path("timing_c", osc))
        ctx.read(b, "iv", pre + "iv")
    ctx.need(b, "series_r", ctx.stage_path("series_r"))
    ctx.read(b, "r_gk", ctx.stage_path("gate_cathode_r"))
    if _transformer(ctx):
        ctx.read(b, "n", ctx.stage_path("turns_ratio"), default=1.0, dim="dimensionless",
                 unit="1")
    return dev


def _cold_nominal(ctx: Context, part: Part, key: str) -> float:
    """A part's value at the coldest ambient, nominal (for choosing among several SCRs)."""
    v = part.params.get(key)
    if not isinstance(v, Value):
        return -math.inf
    amb: Value = ctx.project.conditions["ambient"]
    cv, at = part.cold.get(key), part.cold.get("at")
    return float(cold_value(v.nom, amb.lo, v_cold=cv.nom if cv and at else np.nan,
                            t_cold=at.nom if cv and at else np.nan, k=_COLD_K[key]))


def _scr(ctx: Context, b: Bound, key: str, *, lowest: bool = False) -> Part:
    """The SCR that decides the check among those this stage fires.

    With several SCRs, the one with the highest cold ``key`` (``lowest``: the lowest rating)
    is read for all of them, and a note says which.
    """
    parts = ctx.parts("scr")
    assert parts
    if len(parts) == 1:
        return parts[0]
    if lowest:
        def score(p: Part) -> float:
            v = p.params.get(key)
            return -v.nom if isinstance(v, Value) else math.inf
    else:
        def score(p: Part) -> float:
            return _cold_nominal(ctx, p, key)
    best = max(parts, key=score)
    b.notes.append(f"{len(parts)} SCRs fired by one pulse: {best.ref} has the "
                   f"{'lowest' if lowest else 'highest cold'} {key} and is used for all")
    return best


def _gates(ctx: Context, b: Bound) -> None:
    n = len(ctx.parts("scr"))
    if n > 1:
        b.options["n_gates"] = n
        b.notes.append(f"the source current is shared by {n} gates (divided by {n})")


def _rating(ctx: Context, b: Bound, name: str, part: Part, key: str) -> bool:
    """Read a part rating; incomplete (naming the key) when the part does not give it."""
    return ctx.want(b, name, f"parts.{part.ref}.{key}") is not None


def _cold_text(r: Reduced, names: tuple[str, ...]) -> str:
    """Say where the cold values came from: the part's table or the assumed factors."""
    t_min = r.bound.inputs["t_min"].value.nom
    if t_min >= 298.15:
        return "no cold increase taken (coldest ambient at or above 25 °C)"
    ref = r.bound.inputs[names[0]].path.split(".")[1]
    table = [n.upper() for n in names if not r.bound.inputs[n + "_cold"].path.endswith("#none")]
    assumed = [n for n in names if r.bound.inputs[n + "_cold"].path.endswith("#none")]
    parts = []
    if table:
        parts.append(f"{', '.join(table)} from {ref}'s cold table")
    if assumed:
        facs = ", ".join(f"{n.upper()} ×{_COLD_K[n]:g}" for n in assumed)
        parts.append(f"{facs} at −40 °C pro rata assumed (common practice)")
    text = f"cold values at {eng(t_min, 'degC')}: " + "; ".join(parts)
    if t_min < 233.15:
        text += " (extrapolated below −40 °C)"
    return text


_SAID = ("rb1_on", "SCRs fired", "shared by", "turns_ratio not given", "tgt not given")


def _notes(r: Reduced, *more: str) -> str:
    """The notes a summary repeats: the assumptions shared by the gate checks, and ``more``."""
    picked = [n for n in r.notes if any(k in n for k in _SAID + more)]
    return "".join(f"; {n}" for n in picked)


def _k(r: Reduced) -> float:
    return float(r.limits.get("marginal_below", r.limits.get("fail_below", 1.0)))


# --------------------------------------------------------------------------- gate.trigger

def _bind_trigger(ctx: Context) -> Bound:
    b = Bound()
    _bind_source(ctx, b, pulse=False)
    part = _scr(ctx, b, "igt")
    ctx.cold(b, "igt", part, "igt")
    ctx.cold(b, "vgt", part, "vgt")
    ctx.ambient_min(b)
    _gates(ctx, b)
    return b


def _sum_trigger(r: Reduced) -> str:
    igt_c = r.worst["required_current"]
    ratio = r.worst["gate_current"] / igt_c
    text = (f"gate current {span(r.lo['gate_current'], r.hi['gate_current'], 'A')} against "
            f"IGT {eng(igt_c, 'A')} cold (×{ratio:.3g} at the worst corner), pulse "
            f"{span(r.lo['gate_voltage'], r.hi['gate_voltage'], 'V')} open-circuit at the gate")
    if "r_gk" in r.bound.inputs:
        text += f", IGT_eff {eng(r.worst['igt_eff'], 'A')} with R_GK's share"
    if r.status in ("fail", "marginal"):
        k = _k(r)
        rs_max = r.worst["series_r_max"]
        if rs_max > 0:
            text += f"; {r.status}: for {k:g} × IGT needs series R ≤ {at_most(rs_max, 'ohm')}"
        else:
            text += (f"; {r.status}: even with no series R the source is too weak: needs "
                     f"E_G ≥ {at_least(r.worst['e_g_needed'], 'V')} "
                     f"(now {eng(r.worst['e_g'], 'V')})")
    text += "; " + _cold_text(r, ("igt", "vgt"))
    return text + _notes(r)


register(CheckDef(
    id="gate.trigger", kinds=KIND,
    question="Does the pulse deliver enough gate current and voltage at the coldest ambient?",
    method="i_G = (E_G − VGT_c)/R_src/N − VGT_c/R_GK from the oscillator's discharge source "
           "at t = 0 (E_G = (VP − VD)·R1/(R1 + r_on)/n, R_src = (R1∥r_on)/n² + R_S); pass when "
           "i_G ≥ 2·IGT_c, fail below IGT_c; the load line then passes (VGT_c, IGT_eff,c).",
    source="Rashid, Power Electronics 4th ed. §9 (gate trigger circuits); Singhal & Gupta, "
           "Introduction to Electric Drives, Ex 1_3",
    fn=gate.trigger_check, bind=_bind_trigger,
    units={"gate_current": "A", "required_current": "A", "gate_voltage": "V"},
    summarise=_sum_trigger,
    cautions=("A pass at 2 × IGT is a minimum: 2–5 × IGT is normal, up to 10 × with a fast "
              "rise where high di/dt, surge or cold operation is expected (common practice).",
              "Several gates from one pulse: give each its own series resistor against current "
              "hogging (common practice)."),
    fix="Lower the series resistor, raise the oscillator supply (higher VP), or use a larger "
        "base-1/cathode resistor so that the pulse source is stiffer.",
))


# --------------------------------------------------------------------------- gate.peak-power

def _bind_peak_power(ctx: Context) -> Bound:
    b = Bound()
    _bind_source(ctx, b, pulse=False)
    part = _scr(ctx, b, "pgm", lowest=True)
    _rating(ctx, b, "pgm", part, "pgm")
    return b


def _sum_peak_power(r: Reduced) -> str:
    text = (f"peak gate power ≤ {eng(r.hi['peak_power'], 'W')} (E_th²/4R_th, the most any gate "
            f"can draw) against PGM {eng(r.worst['pgm'], 'W')}")
    if r.status in ("fail", "marginal"):
        text += f"; {r.status}: needs series R ≥ {at_least(r.hi['series_r_min'], 'ohm')}"
    return text + _notes(r)


register(CheckDef(
    id="gate.peak-power", kinds=KIND,
    question="Is the instantaneous gate power within PGM?",
    method="peak_power = E_th²/(4·R_th), the maximum-power-transfer bound of the gate circuit's "
           "Thevenin equivalent with R_GK included, against PGM.",
    source="Bimbhra, Power Electronics ch. 4 (gate power and load line); Rashid 4e §9",
    fn=gate.peak_power_check, bind=_bind_peak_power,
    units={"peak_power": "W"},
    summarise=_sum_peak_power,
    cautions=("PGM is rated for a maximum pulse width; for longer pulses the allowed peak is "
              "min(PGM, PG(AV)/duty).",),
    fix="Raise the series resistor, or lower the oscillator's pulse amplitude.",
))


# --------------------------------------------------------------------------- gate.average-power

def _bind_average_power(ctx: Context) -> Bound:
    b = Bound()
    _bind_source(ctx, b, pulse=True)
    b.inputs.pop("iv", None)  # the rectangular-equivalent width τ_g does not need it
    osc = _osc(ctx)
    ctx.need(b, "rt", ctx.stage_path("timing_r", osc))
    if osc.get("sync") == "line":
        b.notes.append("line sync: free-running rate inside the clamp window, every "
                       "half-cycle (counting the pulses per half-cycle gives a slightly lower "
                       "long-run average)")
    part = _scr(ctx, b, "pg_av", lowest=True)
    _rating(ctx, b, "pg_av", part, "pg_av")
    return b


def _sum_average_power(r: Reduced) -> str:
    text = (f"average gate power ≤ {eng(r.hi['average_power'], 'W')} at duty "
            f"{span(r.lo['duty'], r.hi['duty'], '1')} (τ_g {eng(r.worst['tau'], 's')} × "
            f"{eng(r.worst['pulse_rate'], 'Hz')}) against PG(AV) "
            f"{eng(r.bound.inputs['pg_av'].value.lo, 'W')}")
    if r.status in ("fail", "marginal"):
        text += (f"; {r.status}: needs pulse rate ≤ {at_most(r.lo['rate_max'], 'Hz')} at "
                 "this pulse energy, or a larger series R")
    return text + _notes(r, "line sync")


register(CheckDef(
    id="gate.average-power", kinds=KIND,
    question="Is the average gate power within PG(AV) at the pulse duty?",
    method="average_power = peak_power × duty, duty = τ_g × pulse rate (τ_g = C_T·(r_on + "
           "R1∥R_S) the exponential pulse's rectangular-equivalent width; rate the steady "
           "free-running frequency, with V1 = VZ under line sync).",
    source="Bimbhra, Power Electronics ch. 4 (pulse frequency and duty); Singhal & Gupta Ex 1_4",
    fn=gate.average_power_check, bind=_bind_average_power,
    units={"average_power": "W", "duty": "1"},
    summarise=_sum_average_power,
    fix="Lower the pulse rate (larger R_T·C_T), shorten the pulse, or raise the series R.",
))


# --------------------------------------------------------------------------- gate.latch-time

def _power_stage(ctx: Context, b: Bound) -> Stage | None:
    stages = ctx.stages_of(POWER, "gate", ctx.stage.id)
    if not stages:
        b.not_applicable = "no phase-control or dc-switch stage names this gate drive as `gate`"
        return None
    if len(stages) > 1:
        b.notes.append(f"{len(stages)} power stages use this gate drive: `{stages[0].id}` read")
    return stages[0]


def _bind_latch_time(ctx: Context) -> Bound:
    b = Bound()
    power = _power_stage(ctx, b)
    if power is None:
        return b
    _bind_source(ctx, b, pulse=True)
    osc = _osc(ctx)
    part = _scr(ctx, b, "il")
    if not isinstance(part.params.get("il"), Value):
        b.missing.append(f"parts.{part.ref}.il")
        return b
    for key in ("igt", "vgt", "il"):
        ctx.cold(b, key, part, key)
    ctx.ambient_min(b)
    ctx.read(b, "tgt", f"parts.{part.ref}.tgt", default=TGT_ASSUMED, dim="time", unit="s")
    _gates(ctx, b)
    ctx.need(b, "v_s", "supply.voltage")
    ctx.need(b, "r_load", ctx.stage_path("load.r", power))
    ctx.read(b, "l_load", ctx.stage_path("load.l", power))
    if power.kind == "dc-switch":
        b.options["load"] = "dc"
        return b
    b.options["load"] = "ac"
    ctx.need(b, "f", "supply.frequency")
    load = power.get("load")
    if isinstance(load, dict) and isinstance(load.get("e"), Value):
        # A battery or motor: the anode current starts only where the line exceeds E, and
        # rises against it.
        ctx.need(b, "e", ctx.stage_path("load.e", power))
    firing = power.get("firing")
    if power.get("control") == "burst":
        # Integral-cycle control fires at the voltage zero: the anode current rises from zero
        # with the line, the slowest start of all, so the pulse must last until it reaches IL.
        b.add("alpha", ctx.stage_path("control", power) + "#burst",
              Value.fixed(0.0, "angle", "rad"))
        b.notes.append("integral-cycle control: fired at the voltage zero, where the anode "
                       "current rises from zero with the line")
    elif isinstance(firing, Value):
        ctx.need(b, "alpha", ctx.stage_path("firing", power), sweep=7 if firing.varies else 0)
    elif osc.get("sync") == "line":
        ctx.need(b, "rt", ctx.stage_path("timing_r", osc))
        b.notes.append(f"firing angle from the line-synchronised oscillator `{osc.id}`")
    else:  # a free-running oscillator's pulses are not tied to the line
        b.missing.append(ctx.stage_path("firing", power))
    return b


def _sum_latch_time(r: Reduced) -> str:
    req_hi = r.hi["required_width"]
    need = (span(r.lo["required_width"], req_hi, "s") if math.isfinite(req_hi)
            else f"{eng(r.lo['required_width'], 's')} up to never")
    text = (f"gate held {span(r.lo['pulse_width'], r.hi['pulse_width'], 's')} above IGT(cold) "
            f"against {need} needed for the anode current to reach IL "
            f"{eng(r.worst['il_cold'], 'A')} (cold, low line)")
    alpha = r.bound.inputs.get("alpha")
    if alpha is not None and alpha.path.endswith("#burst"):
        text += " at the voltage zero (integral-cycle control: the current rises with the line)"
    elif not math.isnan(r.nom["firing_angle"]):
        text += (f" over α {span(r.lo['firing_angle'], r.hi['firing_angle'], 'deg')}; "
                 f"latch limit {at_most(r.lo['latch_limit_angle'], 'deg')}")
    if r.status in ("fail", "marginal"):
        worst_req = r.worst["required_width"]
        fa, lim = r.worst["firing_angle"], r.worst["latch_limit_angle"]
        if r.bound.options.get("load") == "ac" and math.isnan(fa):
            text += f"; {r.status}: the oscillator does not fire in the half-cycle at some corners"
        elif math.isinf(worst_req) and (math.isnan(lim) or math.isnan(fa)):
            text += (f"; {r.status}: the anode current never reaches IL at the worst corner "
                     "(load too light for this SCR)")
        elif math.isinf(worst_req):
            text += (f"; {r.status}: no pulse can latch at α = {eng(fa, 'deg', 4)}: end the "
                     f"firing range before {at_most(lim, 'deg')}")
        else:
            k = _k(r)
            text += (f"; {r.status}: needs ≥ {at_least(k * worst_req, 's')} above IGT: C_T ≥ "
                     f"{at_least(k * r.worst['c_needed'], 'F')}, or a pulse train")
    return text + _notes(r, "firing angle from")


register(CheckDef(
    id="gate.latch-time", kinds=KIND,
    question="Is the gate current held long enough for the anode current to reach IL, over "
             "the whole firing range?",
    method="pulse width = time the gate-loaded discharge keeps i_G ≥ IGT_c (capped at the "
           "valley); required = time for the anode current from zero at α to reach IL_c at "
           "low line (R: the sine; R–L: first crossing of the exact current; DC: "
           "−(L/R)·ln(1 − R·IL/V)) plus tgt; at every α of the firing range (integral-cycle "
           "control: α = 0, the current from zero with the line, asin(IL·R/Vm)/ω for R).",
    source="Rashid 4e Ex 10.11 (minimum gate pulse width); Bimbhra ch. 4; Singhal & Gupta "
           "Ex 1_5",
    fn=gate.latch_time_check, bind=_bind_latch_time,
    units={"pulse_width": "s", "required_width": "s", "latch_limit_angle": "deg"},
    summarise=_sum_latch_time,
    cautions=("The shortcut L·IL/(Vm·sin α) is slightly short of the exact R–L time (1 % in "
              "Rashid's Ex 10.11).",),
    fix="Lengthen the pulse (larger C_T or base-1/cathode resistor, lower series R), use a "
        "pulse train, or end the firing range before the latch limit.",
    optional=frozenset({"latch_limit_angle", "firing_angle"}),
))


# --------------------------------------------------------------------------- gate.noise

def _bind_noise(ctx: Context) -> Bound:
    b = Bound()
    osc = _osc(ctx)
    part = _scr(ctx, b, "vgd", lowest=True)
    if not _rating(ctx, b, "vgd", part, "vgd"):
        return b
    ctx.need(b, "series_r", ctx.stage_path("series_r"))
    ctx.read(b, "r_gk", ctx.stage_path("gate_cathode_r"))
    tmp = Bound()
    dev = bind_device(ctx, tmp, stage=osc)
    b.options["device"] = dev
    if not _transformer(ctx):
        b.options["coupling"] = "direct"
        keep = ("v1", "r1", "r2", "rbb") if dev == "ujt" else ("ip",)
        for key in keep:
            b.inputs[key] = tmp.inputs[key]
        b.notes.extend(tmp.notes)
        if dev == "put":
            ctx.need(b, "r_k", ctx.stage_path("cathode_r", osc))
        return b
    b.options["coupling"] = "transformer"
    if ctx.read(b, "c_cc", ctx.stage_path("coupling_capacitance")) is None:
        b.not_applicable = ("transformer coupling blocks the oscillator's idle voltage; no "
                            "`coupling_capacitance` is given, so the common-mode current "
                            "cannot be assessed")
        return b
    if ctx.want(b, "dvdt", f"parts.{part.ref}.dvdt") is None:
        return b
    ctx.need(b, "igt", f"parts.{part.ref}.igt")
    b.notes.append(f"dv/dt taken at {part.ref}'s rating (the most it is rated to see)")
    return b


def _sum_noise(r: Reduced) -> str:
    vgd = r.worst["vgd"]
    if r.bound.options.get("coupling") == "transformer":
        i_cm = r.hi["coupled_current"]
        what = f"common-mode current C_cc·dv/dt = {eng(i_cm, 'A')} through R_GK"
        if "r_gk" not in r.bound.inputs:
            return (f"fail: no gate–cathode resistor; coupled current {eng(i_cm, 'A')} flows "
                    f"into the gate: fit R_GK ≤ {at_most(r.lo['r_gk_max'], 'ohm')}")
    else:
        what = "idle voltage of the DC-coupled oscillator"
    text = (f"noise at the gate ≤ {eng(r.hi['noise_voltage'], 'V')} ({what}) against VGD "
            f"{eng(vgd, 'V')} at Tj,max")
    if r.status in ("fail", "marginal"):
        text += f"; {r.status}: needs R_GK ≤ {at_most(r.lo['r_gk_max'], 'ohm')}"
        if r.bound.options.get("coupling") == "direct":
            text += ", or a smaller base-1/cathode R, a series diode or transformer coupling"
    if r.bound.options.get("coupling") == "transformer":
        igt = r.lo["igt"]
        if r.hi["coupled_current"] > igt:
            text += (f"; the coupled current exceeds IGT {eng(igt, 'A')}: a sensitive gate can "
                     "fire on the current alone")
    return text + _notes(r, "dv/dt taken")


register(CheckDef(
    id="gate.noise", kinds=KIND,
    question="Is every steady or coupled voltage at the gate below VGD?",
    method="noise_voltage = the idle voltage a DC-coupled oscillator leaves at the gate (with "
           "R_GK's divider), or C_cc·dv/dt·R_GK through a pulse transformer (dv/dt at the "
           "SCR's rating), against VGD at Tj,max.",
    source="Rashid 4e §9 (UJT trigger circuit, interbase current through R1)",
    fn=gate.noise_check, bind=_bind_noise,
    units={"noise_voltage": "V"},
    summarise=_sum_noise,
    cautions=("An RC filter at the gate helps, but its time constant must stay well below the "
              "gate current's required rise time.",),
    fix="Fit or lower the gate–cathode resistor; for DC coupling, a smaller base-1/cathode "
        "resistor or a series diode.",
    optional=frozenset({"r_gk_max", "igt"}),
))


# --------------------------------------------------------------------------- gate.reverse

def _flag(ctx: Context, b: Bound) -> None:
    """Note when pulses reach a gate while its anode is negative."""
    osc = _osc(ctx)
    for power in ctx.stages_of(POWER, "gate", ctx.stage.id):
        if power.kind != "phase-control":
            continue
        if osc.get("sync") != "line":
            b.notes.append("pulses also arrive while the anode is negative (a free-running "
                           "train over the whole cycle): raises reverse leakage and dissipation")
        elif power.get("topology") == "half-wave":
            b.notes.append("pulses also arrive while the anode is negative (full-wave sync on "
                           "a half-wave SCR): raises reverse leakage and dissipation")
        return


def _bind_reverse(ctx: Context) -> Bound:
    b = Bound()
    part = _scr(ctx, b, "vrgm", lowest=True)
    if not _rating(ctx, b, "vrgm", part, "vrgm"):
        return b
    _flag(ctx, b)
    if _transformer(ctx):
        b.options["coupling"] = "transformer"
        _bind_source(ctx, b, pulse=False)
        b.inputs.pop("r_gk", None)  # the open-circuit backswing is taken, R_GK aside
    else:
        b.options["coupling"] = "direct"
        b.options["device"] = "ujt" if _osc(ctx).kind == "ujt-oscillator" else "put"
    return b


def _sum_reverse(r: Reduced) -> str:
    vrgm = r.worst["vrgm"]
    if r.bound.options.get("coupling") == "direct":
        text = (f"direct coupling: no reverse gate source (0 V against VRGM {eng(vrgm, 'V')}); "
                "ringing from gate-lead inductance is not modelled")
    else:
        text = (f"backswing taken as the forward secondary amplitude "
                f"{eng(r.hi['reverse_voltage'], 'V')} (no clamp declared) against VRGM "
                f"{eng(vrgm, 'V')}")
        if r.status in ("fail", "marginal"):
            text += (f"; {r.status}: add a diode in series with the gate or across "
                     f"gate–cathode, or raise the turns ratio to ≥ {r.hi['n_min']:.3g}")
    return text + _notes(r, "pulses also arrive")


register(CheckDef(
    id="gate.reverse", kinds=KIND,
    question="Is the reverse gate voltage within VRGM?",
    method="Direct coupling: no reverse source (0 V). Pulse transformer with no clamp: the "
           "backswing is taken equal to the forward secondary amplitude E_G (conservative).",
    source="Rashid 4e §9 (gate characteristics); the backswing rule is common practice",
    fn=gate.reverse_check, bind=_bind_reverse,
    units={"reverse_voltage": "V"},
    summarise=_sum_reverse,
    fix="A diode in series with the gate, or a diode across gate–cathode with R_GK.",
    optional=frozenset({"n_min"}),
))


# --------------------------------------------------------------------------- gate.transformer

def _bind_transformer(ctx: Context) -> Bound:
    b = Bound()
    if not _transformer(ctx):
        b.not_applicable = "direct coupling: there is no pulse transformer"
        return b
    have_vs = ctx.read(b, "vs_rating", ctx.stage_path("volt_seconds")) is not None
    iso = ctx.read(b, "isolation", ctx.stage_path("isolation"))
    req = ctx.read(b, "required_isolation", ctx.stage_path("required_isolation"))
    if not have_vs and (iso is None or req is None):
        b.missing.append(ctx.stage_path("volt_seconds") + " (or isolation with "
                         "required_isolation)")
        return b
    if iso is None or req is None:
        b.inputs.pop("isolation", None)
        b.inputs.pop("required_isolation", None)
        b.notes.append("isolation not assessed (needs both `isolation` and "
                       "`required_isolation`)")
    if not have_vs:
        b.notes.append("volt-seconds not assessed (no `volt_seconds` rating)")
    _bind_source(ctx, b, pulse=True)
    b.inputs.pop("r_gk", None)  # the gate node is clamped at VGT: R_GK does not change v_pri
    part = _scr(ctx, b, "vgt")
    ctx.cold(b, "vgt", part, "vgt")
    ctx.ambient_min(b)
    return b


def _sum_transformer(r: Reduced) -> str:
    bits = []
    if "vs_rating" in r.bound.inputs:
        rating = r.bound.inputs["vs_rating"].value.lo
        bits.append(f"primary {eng(r.hi['volt_seconds'], 'V*s')} per pulse (exact for the "
                    f"exponential pulse; E·t shortcut {eng(r.hi['vs_shortcut'], 'V*s')}) "
                    f"against {eng(rating, 'V*s')}")
        if not r.hi["vs_ratio"] >= _k(r):
            bits.append(f"needs a core rated ≥ {at_least(_k(r) * r.hi['volt_seconds'], 'V*s')}")
    if "isolation" in r.bound.inputs:
        iso, req = r.worst["isolation"], r.worst["required_isolation"]
        bits.append(f"isolation {eng(iso, 'V')} against {eng(req, 'V')} required")
        if iso < _k(r) * req:
            bits.append(f"needs isolation ≥ {at_least(_k(r) * req, 'V')}")
    text = "; ".join(bits)
    if r.status in ("fail", "marginal"):
        text = f"{r.status}: " + text
    if "vs_rating" in r.bound.inputs:
        text += ("; magnetising current and leakage inductance neglected (optimistic for pulse "
                 "width and amplitude); core reset not assessed")
    return text + _notes(r, "isolation not", "volt-seconds not")


register(CheckDef(
    id="gate.transformer", kinds=KIND,
    question="Transformer coupling only: volt-seconds and isolation.",
    method="∫v_pri dt over the gate-loaded discharge (exact integral of the exponential pulse "
           "plus the gate's clamp level, to the valley) against `volt_seconds`; `isolation` ≥ "
           "`required_isolation` (the requirement is the project's, not derived).",
    source="Rashid 4e §9 (pulse-transformer gate drive); the isolation requirement comes from "
           "the applicable safety standard",
    fn=gate.transformer_check, bind=_bind_transformer,
    units={"volt_seconds": "V*s", "isolation": "V"},
    summarise=_sum_transformer,
    cautions=("The core resets only if V_reset·t_off ≥ V·t_p; a diode–Zener reset limits the "
              "duty to V_reset/(V + V_reset).",),
    fix="A transformer with a larger volt-seconds rating, a shorter pulse (smaller C_T), or "
        "one with the required isolation.",
))
