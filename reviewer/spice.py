"""One stage as a SPICE netlist, for the engineer's own circuit simulator.

The netlist holds the stage's R, C, L, sources and switches in plain SPICE syntax (R, C, L, V,
E, H, S, D and K elements, ``.model SW``/``D``, ``.tran``, ``.print``) that general-purpose
simulators read. Values are taken at the project's nominal, or at the worst corner of the
stage's most critical check (``corner="worst"``: that check's worst row for every input it
reads, the nominal for the rest). The devices are generic models, each described in comments:

* SCR: a voltage-controlled switch with hysteresis. Its control is the gate pulse plus a
  current-controlled voltage proportional to the anode current (VS_ sense source, H_ feedback):
  the gate turns it on, the anode current above IH holds it on, and it opens when the current
  falls below IH, so it blocks reverse current as a thyristor does.
* UJT: a comparator-controlled switch. An unloaded copy of the interbase divider (R2, the bar
  split at η, R1) gives the emitter's reference; the switch from emitter to base 1 closes when
  the emitter rises VD above it (the peak point) and opens when the emitter falls to VV.
* PUT: the same switch from anode to cathode, closing when the anode rises ``offset`` above
  the gate divider and opening at VV.
* Diac: two switches with hysteresis controlled by the capacitor voltage, on at VBO and off
  once the capacitor has fallen by the breakback; triac: a switch whose control is the gate
  current over IGT plus the main current (either sign) over IH.

A line-synchronised oscillator's supply, the full-wave rectified line clipped at the Zener,
is a behavioural source (B element). Nothing here runs a simulator.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from typing import Any

from reviewer import TOOL
from reviewer.errors import ProjectError
from reviewer.model import Project, Stage, Value

CORNERS = ("nominal", "worst")


def ident(text: object) -> str:
    """A designator or id as a SPICE element or node name: letters, digits and ``_`` only.

    >>> ident("Q1"), ident("Q<b>&1"), ident("U 2")
    ('Q1', 'Q_b__1', 'U_2')
    """
    return re.sub(r"\W", "_", str(text), flags=re.ASCII) or "X"


_ASCII = {"µ": "u", "μ": "u", "Ω": "ohm", "±": "+/-", "α": "alpha", "β": "beta", "×": "x",
          "–": "-", "—": "-", "−": "-", "°": " deg", "²": "^2", "·": "*", "’": "'"}


def ascii_text(text: str) -> str:
    """A line as printable 7-bit ASCII, which every simulator reads: the report's symbols
    spelt out, anything else (control characters too) as ``?``.

    >>> ascii_text("kiln 4.7 kΩ ±5% at 60°, 2 µs – “x”")
    'kiln 4.7 kohm +/-5% at 60 deg, 2 us - ?x?'
    """
    return "".join(_ASCII.get(ch, ch if 32 <= ord(ch) < 127 else "?") for ch in text)


def num(x: float) -> str:
    """A number as SPICE reads it everywhere: no unit suffix (``M`` would be milli).

    >>> num(4700.0), num(1e-7), num(0.5)
    ('4700', '1e-07', '0.5')
    """
    return f"{x:.6g}"


@dataclass
class Netlist:
    """Lines of a netlist under construction, with its comments."""

    title: str
    lines: list[str] = field(default_factory=list)
    models: list[str] = field(default_factory=list)
    prints: list[str] = field(default_factory=list)
    tran: tuple[float, float] = (1e-6, 1e-3)
    uic: bool = False
    #: The largest internal step (0: the output step).
    tmax: float = 0.0

    def add(self, line: str, note: str = "") -> None:
        """An element line, with a trailing comment when ``note`` is given."""
        note = " ".join(note.split())  # one line, whatever the user's ids hold
        self.lines.append(f"{line:<44} ; {note}" if note else line)

    def comment(self, text: str) -> None:
        """A comment line (SPICE ``*``)."""
        self.lines.extend(f"* {t}" if t else "*" for t in text.split("\n"))

    def text(self) -> str:
        """The whole netlist: title, elements, models, analysis, prints, ``.end``."""
        step, stop = self.tran
        out = [f"* {' '.join(self.title.split())}", *self.lines, "*", *self.models,
               f".tran {num(step)} {num(stop)} 0 {num(self.tmax or step)}"
               + (" uic" if self.uic else "")]
        out += [f".print tran {p}" for p in self.prints]
        return "\n".join(ascii_text(line) for line in out + [".end", ""])


class _Values:
    """Stage values at the chosen corner (floats in SI)."""

    def __init__(self, project: Project, worst: dict[str, float]) -> None:
        self.project = project
        self.worst = worst
        self.used: dict[str, float] = {}

    def __call__(self, path: str, default: float | None = None) -> float:
        if path in self.worst:
            x = self.worst[path]
        else:
            v = self.project.lookup(path)
            if isinstance(v, Value):
                x = v.nom
            elif default is not None:
                x = default
            else:
                raise ProjectError(f"the netlist needs `{path}`; give it in the project")
        self.used[path] = x
        return x

    def has(self, path: str) -> bool:
        return path in self.worst or isinstance(self.project.lookup(path), Value)


def _worst_corner(run: Any, stage: Stage) -> tuple[dict[str, float], str]:
    """Input path → value at the worst row of the stage's most critical check."""
    cands = [r for r in run.results if r.stage == stage.id and r.evaluation is not None
             and r.margin is not None and math.isfinite(r.margin)]
    if not cands:
        return {}, ""
    r = min(cands, key=lambda x: x.margin)
    ev = r.evaluation
    out: dict[str, float] = {}
    for name, inp in ev.bound.inputs.items():
        if name in ev.inputs:
            x = float(ev.inputs[name][ev.worst_row])
            if math.isfinite(x):
                out[inp.path] = x
    return out, r.check


# ------------------------------------------------------------------------------ devices

def scr(n: Netlist, ref: str, anode: str, cathode: str, project: Project, v: _Values, *,
        fire: float, width: float, period: float = 0.0, suffix: str = "") -> None:
    """A thyristor as a latching switch with hysteresis (see the module docstring)."""
    name = f"{ident(ref)}{suffix}"
    ih = v(f"parts.{ref}.ih", 1e-3) if f"parts.{ref}" in _part_paths(project) else 1e-3
    rm = 0.1 / ih  # the control falls to 0.1 V (the switch's off level) at I = IH
    n.comment(f"{name}: SCR as a switch with hysteresis, on above 0.9 V of control, off below "
              f"0.1 V; the gate pulse (1 V) turns it on,\n  the anode current holds it on "
              f"while above IH = {num(ih)} A (H_{name}: {num(rm)} V/A). On-state drop (vt0, rt) "
              "not modelled.")
    n.add(f"VS_{name} {anode} {anode}_{name} DC 0", "senses the anode current")
    n.add(f"S_{name} {anode}_{name} {cathode} ctl_{name} 0 SCRSW")
    n.add(f"H_{name} ctl_{name} g_{name} VS_{name} {num(rm)}", "latching feedback")
    pulse = f"PULSE(0 1 {num(fire)} 1e-09 1e-09 {num(width)}"
    n.add(f"VG_{name} g_{name} 0 {pulse}{' ' + num(period) if period else ''})",
          f"gate pulse at {num(fire)} s")
    n.add(f"RG_{name} g_{name} 0 1e9", "keeps the gate node defined")
    if not any(m.startswith(".model SCRSW") for m in n.models):
        n.models.append(".model SCRSW SW(VT=0.5 VH=0.4 RON=0.001 ROFF=1e9)")


def _part_paths(project: Project) -> set[str]:
    return {f"parts.{r}" for r in project.parts}


# --------------------------------------------------------------------------- oscillators

def _osc_supply(n: Netlist, stage: Stage, project: Project, v: _Values) -> tuple[float, float]:
    """The oscillator's supply node ``vcc``; returns (plateau voltage, the line period or 0)."""
    sp = f"stages.{stage.id}."
    if stage.get("sync") == "line":
        vz = v(sp + "zener")
        vline = v("supply.voltage")
        f = v("supply.frequency")
        vm = math.sqrt(2) * vline
        n.comment(f"Supply: the full-wave rectified line ({num(vline)} V RMS, {num(f)} Hz) "
                  f"clipped by the Zener at {num(vz)} V, as a behavioural source.")
        n.add(f"B_SUP vcc 0 V = min(abs({num(vm)}*sin({num(2 * math.pi * f)}*time)), "
              f"{num(vz)})")
        return vz, 0.5 / f
    v1 = v(sp + "supply")
    n.add(f"V_SUP vcc 0 DC {num(v1)}", "interbase / divider supply V1")
    return v1, 0.0


def _switch(n: Netlist, ref: str, model: str, *, close: str, to: str, above: str, on: float,
            off: float, note: str) -> None:
    """A UJT or PUT as a comparator-controlled switch from node ``close`` to ``to``: it closes
    when ``close`` rises ``on`` volts above node ``above`` and opens when it falls to ``off``
    above it (the valley), by a voltage switch with that hysteresis."""
    n.add(f"E_{ident(ref)} ctl_{ident(ref)} 0 {close} {above} 1", note)
    n.add(f"S_{ident(ref)} {close} {to} ctl_{ident(ref)} 0 {model}")
    n.models.append(f".model {model} SW(VT={num((on + off) / 2)} VH={num((on - off) / 2)} "
                    "RON=0.001 ROFF=1e12)")


def _oscillator(n: Netlist, stage: Stage, project: Project, v: _Values) -> None:
    sp = f"stages.{stage.id}."
    v1, half = _osc_supply(n, stage, project, v)
    rt, ct = v(sp + "timing_r"), v(sp + "timing_c")
    n.add(f"R_T vcc e {num(rt)}", "timing_r")
    n.add(f"C_T e 0 {num(ct)} IC=0", "timing_c, discharged at the start")
    n.uic = True
    if stage.kind == "ujt-oscillator":
        ref = str(stage.get("ujt"))
        pp = f"parts.{ref}."
        eta, rbb, vd, vv = v(pp + "eta"), v(pp + "rbb"), v(pp + "vd"), v(pp + "vv")
        r1, r2 = v(sp + "base1_r"), v(sp + "base2_r", 0.0)
        ron = v(pp + "rb1_on", 0.0)
        ref_v = v1 * (eta * rbb + r1) / (rbb + r1 + r2)
        n.comment(f"{ref}: UJT, a comparator-controlled switch from emitter to base 1. The "
                  f"unloaded divider below (x nodes)\n  gives the emitter reference "
                  f"({num(ref_v)} V at {num(v1)} V): on at reference + VD = "
                  f"{num(ref_v + vd)} V (the peak point), off at VV = {num(vv)} V.")
        n.add(f"R_B2 vcc b2 {num(max(r2, 1e-3))}", "base2_r")
        n.add(f"R_BB2 b2 ni {num((1 - eta) * rbb)}", f"{ref} bar above the emitter, (1-eta)*rbb")
        n.add(f"R_BB1 ni b1 {num(eta * rbb)}", f"{ref} bar below the emitter, eta*rbb")
        n.add(f"R_B1 b1 0 {num(r1)}", "base1_r: the pulse is taken here")
        n.add(f"R_X2 vcc xi {num(max(r2, 1e-3) + (1 - eta) * rbb)}", "reference divider copy")
        n.add(f"R_X1 xi 0 {num(eta * rbb + r1)}", "reference divider copy")
        _switch(n, ref, "UJTSW", close="e", to="eb1", above="xi", on=vd, off=vv - ref_v,
                note="emitter above the reference")
        n.add(f"R_ON eb1 b1 {num(max(ron, 1e-3))}", "rb1_on")
        n.prints.append("v(e) v(b1)")
        r_dis = max(ron, 1e-3) + r1
    else:
        ref = str(stage.get("put"))
        pp = f"parts.{ref}."
        offset, vv = v(pp + "offset"), v(pp + "vv")
        ra, rk_ = v(sp + "gate_r_upper"), v(sp + "gate_r_lower")
        rk = v(sp + "cathode_r")
        vg = v1 * rk_ / (ra + rk_)
        n.comment(f"{ref}: PUT, a comparator-controlled switch from anode to cathode: on when "
                  f"the anode rises offset = {num(offset)} V\n  above the gate divider "
                  f"({num(vg)} V at {num(v1)} V), off when it falls to VV = {num(vv)} V. The "
                  "gate current is not modelled.")
        n.add(f"R_GA vcc g {num(ra)}", "gate_r_upper")
        n.add(f"R_GK g 0 {num(rk_)}", "gate_r_lower")
        _switch(n, ref, "PUTSW", close="e", to="k", above="g", on=offset, off=vv - vg,
                note="anode above the gate")
        n.add(f"R_K k 0 {num(rk)}", "cathode_r: the pulse is taken here")
        n.prints.append("v(e) v(k)")
        r_dis = rk
    tau = rt * ct
    if half:
        stop = half
    else:
        # Two full periods after the first pulse (checks.oscillator's closed forms say when).
        from checks.oscillator import charge_time, discharge_time

        vp = (ref_v + vd) if stage.kind == "ujt-oscillator" else vg + offset
        first = float(charge_time(r=rt, c=ct, v1=v1, v0=0.0, vp=vp))
        period = float(charge_time(r=rt, c=ct, v1=v1, v0=vv, vp=vp)
                       + discharge_time(r_discharge=r_dis, c=ct, vp=vp, vv=vv))
        stop = first + 2.2 * period if math.isfinite(first + period) else 4 * tau
    # Steps fine enough that the switch opens close to VV at the end of the discharge.
    n.tran = (min(stop / 4000, r_dis * ct / 4), stop)


# ------------------------------------------------------------------------- power stages

def _firing(stage: Stage, project: Project, run: Any, corner: str,
            check: str = "") -> tuple[float, str]:
    """The firing angle to simulate: α_min (full output) from the stage or its oscillator, at
    the row of ``check`` (the check that sets the worst corner) or of power.output."""
    from reviewer.waveforms import firing_range

    mine = [r for r in run.results if r.stage == stage.id]
    res = (next((r for r in mine if r.check == check), None)
           or next((r for r in mine if r.check == "power.output"), None)
           or (mine[0] if mine else None))
    if res is None:
        raise ProjectError(f"stage `{stage.id}` has no results to take a firing angle from")
    try:
        a_lo, _, where = firing_range(res, project, corner)
    except ValueError as exc:
        raise ProjectError(str(exc)) from None
    return a_lo, where


def _load(n: Netlist, stage: Stage, v: _Values, top: str, bottom: str) -> None:
    sp = f"stages.{stage.id}.load."
    r = v(sp + "r")
    node = top
    if v.has(sp + "l") and v(sp + "l") > 0:
        n.add(f"R_LOAD {node} ld1 {num(r)}", "load.r")
        n.add(f"L_LOAD ld1 ld2 {num(v(sp + 'l'))} IC=0", "load.l")
        node = "ld2"
    else:
        n.add(f"R_LOAD {node} ld2 {num(r)}", "load.r")
        node = "ld2"
    if v.has(sp + "e"):
        n.add(f"V_EMF {node} {bottom} DC {num(v(sp + 'e'))}", "load.e, back EMF")
    else:
        n.add(f"V_ILOAD {node} {bottom} DC 0", "senses the load current")


def _phase_control(n: Netlist, stage: Stage, project: Project, v: _Values, run: Any,
                   corner: str, check: str = "") -> None:
    vs, f = v("supply.voltage"), v("supply.frequency")
    vm, period = math.sqrt(2) * vs, 1.0 / f
    alpha, where = _firing(stage, project, run, corner, check)
    t_fire = alpha / (2 * math.pi * f)
    width = min(0.5e-3, 0.25 * period)
    ref = str(stage.get("scr"))
    topo = stage.get("topology")
    n.comment(f"Line {num(vs)} V RMS, {num(f)} Hz; fired at alpha = {math.degrees(alpha):.4g} "
              f"deg ({where}), t = {num(t_fire)} s after each zero crossing.")
    if stage.get("fuse"):
        n.comment("The fuse is not modelled.")
    n.add(f"V_LINE line 0 SIN(0 {num(vm)} {num(f)})")
    if topo == "bridge":
        n.comment("Full-wave bridge of four SCRs: A and D conduct in the positive half-cycle, "
                  "B and C in the negative.")
        scr(n, ref, "line", "p", project, v, fire=t_fire, width=width, period=period,
            suffix="A")
        scr(n, ref, "0", "p", project, v, fire=t_fire + period / 2, width=width,
            period=period, suffix="B")
        scr(n, ref, "m", "line", project, v, fire=t_fire + period / 2, width=width,
            period=period, suffix="C")
        scr(n, ref, "m", "0", project, v, fire=t_fire, width=width, period=period, suffix="D")
        _load(n, stage, v, "p", "m")
        if stage.get("freewheel"):
            n.add("D_FW m p DIDEAL", "freewheeling diode")
    else:
        scr(n, ref, "line", "out", project, v, fire=t_fire, width=width, period=period,
            suffix="A" if topo == "ac-switch" else "")
        if topo == "ac-switch":
            scr(n, ref, "out", "line", project, v, fire=t_fire + period / 2, width=width,
                period=period, suffix="B")
        _load(n, stage, v, "out", "0")
        if stage.get("freewheel") and topo != "ac-switch":
            n.add("D_FW 0 out DIDEAL", "freewheeling diode")
    if stage.get("freewheel"):
        n.models.append(".model DIDEAL D(IS=1e-12 N=0.05)")
    sp = f"stages.{stage.id}.load."
    tau = v(sp + "l") / v(sp + "r") if v.has(sp + "l") else 0.0
    stop = max(2 * period, period * math.ceil((5 * tau) / period) + period)
    n.tran = (period / 7200, stop)
    probe = "i(V_EMF)" if v.has(sp + "e") else "i(V_ILOAD)"
    n.prints.append(f"v(line) {probe}")


def _triac_phase_control(n: Netlist, stage: Stage, project: Project, v: _Values) -> None:
    """A triac as two antiparallel SCR switches (its IH), fired at α_min in each half-cycle,
    with the R–C snubber across it when the project has one."""
    vs, f = v("supply.voltage"), v("supply.frequency")
    vm, period = math.sqrt(2) * vs, 1.0 / f
    firing = stage.get("firing")
    if not isinstance(firing, Value):
        raise ProjectError(f"stage `{stage.id}` gives no `firing` range to simulate: add "
                           'firing = { min = "…", max = "…" }')
    alpha = firing.lo
    t_fire = alpha / (2 * math.pi * f)
    width = min(0.5e-3, 0.25 * period)
    ref = str(stage.get("triac"))
    n.comment(f"Line {num(vs)} V RMS, {num(f)} Hz; fired at alpha = {math.degrees(alpha):.4g} "
              f"deg (the earliest firing, full output), t = {num(t_fire)} s after each zero\n"
              f"  crossing. {ref} is a generic triac: two antiparallel SCR switches. The switch "
              "model opens at IH whatever the reapplied dv/dt:\n  it cannot show a failed "
              "commutation (triac.commutation checks that).")
    if stage.get("fuse"):
        n.comment("The fuse is not modelled.")
    n.add(f"V_LINE line 0 SIN(0 {num(vm)} {num(f)})")
    scr(n, ref, "line", "out", project, v, fire=t_fire, width=width, period=period, suffix="A")
    scr(n, ref, "out", "line", project, v, fire=t_fire + period / 2, width=width,
        period=period, suffix="B")
    snubs = [s for s in project.stages.values()
             if s.kind == "rc-snubber" and s.get("across") == stage.id]
    if snubs:
        sp = f"stages.{snubs[0].id}."
        n.add(f"R_SN line sn {num(v(sp + 'r'))}", f"{snubs[0].id}.r")
        n.add(f"C_SN sn out {num(v(sp + 'c'))} IC=0", f"{snubs[0].id}.c")
    _load(n, stage, v, "out", "0")
    sp = f"stages.{stage.id}.load."
    tau = v(sp + "l") / v(sp + "r") if v.has(sp + "l") else 0.0
    stop = max(2 * period, period * math.ceil((5 * tau) / period) + period)
    n.tran = (period / 7200, stop)
    n.prints.append("v(line) v(out) i(V_ILOAD)")


def _dc_switch(n: Netlist, stage: Stage, project: Project, v: _Values) -> None:
    vbus = v("supply.voltage")
    ref = str(stage.get("scr"))
    n.add(f"V_BUS bus 0 DC {num(vbus)}", "supply.voltage")
    if stage.get("fuse"):
        n.comment("The fuse is not modelled; the turn-off network is its own stage.")
    sp = f"stages.{stage.id}.load."
    tau = v(sp + "l") / v(sp + "r") if v.has(sp + "l") else 0.0
    t_fire = 1e-6
    _load(n, stage, v, "bus", "a")
    scr(n, ref, "a", "0", project, v, fire=t_fire, width=max(10 * tau, 1e-4))
    stop = t_fire + max(8 * tau, 1e-4)
    n.tran = (min(stop / 8000, max(tau, 1e-6) / 400), stop)
    n.prints.append("v(a) i(V_ILOAD)" if not v.has(sp + "e") else "v(a) i(V_EMF)")


# --------------------------------------------------------------------- snubber, gate, turn-off

def _snubber(n: Netlist, stage: Stage, project: Project, v: _Values) -> None:
    from checks.snubber import damping

    sp = f"stages.{stage.id}."
    step = stage.get("step", "line")
    if isinstance(step, Value):
        e = v(sp + "step")
        what = "the step given"
    elif step == "line" and project.supply.get("kind") == "ac":
        e = math.sqrt(2) * v("supply.voltage")
        what = "the peak line voltage, at the worst instant"
    else:
        e = v("supply.voltage")
        what = "the DC bus"
    ind_path = sp + "inductance" if "inductance" in stage.params else "supply.inductance"
    ind, r, c = v(ind_path), v(sp + "r"), v(sp + "c")
    n.comment(f"A step of {num(e)} V ({what}) through the loop inductance into the R-C across "
              f"the SCR, which is off\n  (an open switch, not drawn). zeta = "
              f"{float(damping(r=r, l=ind, c=c)):.4g}.")
    n.add(f"V_STEP in 0 PWL(0 0 1e-12 {num(e)})", "the step")
    n.add(f"L_LOOP in a {num(ind)} IC=0", ind_path.split(".", 2)[-1])
    n.add(f"R_S a m {num(r)}", "r")
    n.add(f"C_S m 0 {num(c)} IC=0", "c")
    n.uic = True
    w0 = 1 / math.sqrt(ind * c)
    n.tran = (1 / w0 / 2000, 12 / w0)
    n.prints.append("v(a)")


def _gate(n: Netlist, stage: Stage, project: Project, v: _Values) -> None:
    from checks.oscillator import peak_voltage

    osc = project.stages.get(str(stage.get("source")))
    if osc is None:
        raise ProjectError(f"stage `{stage.id}` names no oscillator in `source`")
    sp, op = f"stages.{stage.id}.", f"stages.{osc.id}."
    refs = stage.get("scr")
    ref = str(refs[0] if isinstance(refs, list) else refs)
    ct = v(op + "timing_c")
    v1 = v(op + "zener") if osc.get("sync") == "line" else v(op + "supply")
    if osc.kind == "ujt-oscillator":
        dev = str(osc.get("ujt"))
        pp = f"parts.{dev}."
        vp = float(peak_voltage(device="ujt", v1=v1, eta=v(pp + "eta"), rbb=v(pp + "rbb"),
                                r1=v(op + "base1_r"), r2=v(op + "base2_r", 0.0),
                                vd=v(pp + "vd")))
        r_on, r_pulse = max(v(pp + "rb1_on", 0.0), 1e-3), v(op + "base1_r")
    else:
        dev = str(osc.get("put"))
        pp = f"parts.{dev}."
        vp = float(peak_voltage(device="put", v1=v1, r_upper=v(op + "gate_r_upper"),
                                r_lower=v(op + "gate_r_lower"), offset=v(pp + "offset")))
        r_on, r_pulse = 1e-3, v(op + "cathode_r")
    igt, vgt = v(f"parts.{ref}.igt"), v(f"parts.{ref}.vgt")
    n_e = 2.0
    i_s = igt / math.exp(vgt / (n_e * 0.025852))
    n.comment(f"The pulse: {osc.id}'s timing capacitor, charged to the peak point {num(vp)} V, "
              f"discharges through {dev}\n  (switch S_DIS, closed at t = 0) into the pulse "
              f"resistor. {ref}'s gate-cathode junction is a diode through (VGT, IGT) = "
              f"({num(vgt)} V, {num(igt)} A).")
    n.add(f"C_T c 0 {num(ct)} IC={num(vp)}", f"{osc.id}.timing_c at the peak point")
    n.add("S_DIS c p ctl 0 DISSW", f"{dev} conducting")
    n.add("V_CTL ctl 0 DC 1")
    n.add(f"R_ON p pr {num(r_on)}", f"{dev} on-resistance")
    n.add(f"R_P pr 0 {num(r_pulse)}", "the pulse resistor")
    n.models.append(".model DISSW SW(VT=0.5 VH=0 RON=0.001 ROFF=1e12)")
    node = "pr"
    if stage.get("coupling") == "transformer":
        ratio = v(sp + "turns_ratio")
        lm = 1e-3
        n.comment(f"Pulse transformer {num(ratio)}:1 as coupled inductors (k = 0.999); the "
                  f"magnetising inductance {num(lm)} H is assumed: the project does not give it.")
        n.add(f"L_PRI pr 0 {num(lm)}")
        n.add(f"L_SEC s 0 {num(lm / ratio ** 2)}")
        n.add("K_T L_PRI L_SEC 0.999")
        node = "s"
    n.add(f"R_SER {node} g {num(v(sp + 'series_r'))}", "series_r")
    if v.has(sp + "gate_cathode_r"):
        n.add(f"R_GK g 0 {num(v(sp + 'gate_cathode_r'))}", "gate_cathode_r")
    n.add("D_GK g 0 DGATE", f"{ref} gate-cathode junction")
    n.models.append(f".model DGATE D(IS={num(i_s)} N={num(n_e)})")
    n.uic = True
    tau = (r_on + r_pulse) * ct
    n.tran = (tau / 2000, 8 * tau)
    n.prints.append("v(c) v(g)")


def _commutation(n: Netlist, stage: Stage, project: Project, v: _Values) -> None:
    target = project.stages.get(str(stage.get("for", "")))
    if target is None:
        raise ProjectError(f"stage `{stage.id}` names no stage in `for`")
    sp = f"stages.{stage.id}."
    vbus = v("supply.voltage")
    vc0 = v(sp + "charge_voltage", vbus)
    c = v(sp + "c")
    ref = str(target.get("scr"))
    r = v(f"stages.{target.id}.load.r")
    t_fire, t_off = 1e-6, 0.0
    lp = f"stages.{target.id}.load.l"
    tau_load = v(lp) / r if v.has(lp) else 0.0
    t_off = t_fire + max(5 * tau_load, 20e-6)
    n.comment(f"{target.id}: the bus, the load and {ref} (fired at {num(t_fire)} s); at "
              f"{num(t_off)} s the auxiliary switch puts the\n  capacitor, charged to "
              f"{num(vc0)} V with its positive plate at the cathode, across {ref}.")
    n.add(f"V_BUS bus 0 DC {num(vbus)}")
    _load(n, target, v, "bus", "a")
    # The gate pulse ends well before the capacitor is switched in: a gated switch would
    # otherwise conduct the reverse current that turns the SCR off.
    scr(n, ref, "a", "0", project, v, fire=t_fire, width=(t_off - t_fire) / 2)
    if stage.kind == "resonant-commutation":
        n.add("S_AUX a x auxc 0 AUXSW", "auxiliary switch")
        n.add(f"L_R x y {num(v(sp + 'l'))} IC=0", "l")
        n.add(f"C_C y 0 {num(c)} IC={num(-vc0)}", "c, charged negative at the anode side")
        if stage.get("diode") is not False:
            n.add("D_AP 0 a DIDEAL", f"diode across {ref}")
            n.models.append(".model DIDEAL D(IS=1e-12 N=0.05)")
        w = 1 / math.sqrt(v(sp + "l") * c)
        span = 10 / w
    else:
        n.add("S_AUX a x auxc 0 AUXSW", "auxiliary switch")
        n.add(f"C_C x 0 {num(c)} IC={num(-vc0)}", "c, charged negative at the anode side")
        span = 5 * r * c
    n.add(f"V_AUX auxc 0 PULSE(0 1 {num(t_off)} 1e-09 1e-09 1)")
    n.models.append(".model AUXSW SW(VT=0.5 VH=0 RON=0.01 ROFF=1e12)")
    n.uic = True
    stop = t_off + span
    n.tran = (min(span, stop) / 4000, stop)
    n.prints.append("v(a)")


# ------------------------------------------------------------------------------ diac-RC

def _diac_rc(n: Netlist, stage: Stage, project: Project, v: _Values) -> None:
    sp = f"stages.{stage.id}."
    vs, f = v("supply.voltage"), v("supply.frequency")
    vm, period = math.sqrt(2) * vs, 1.0 / f
    d, t = str(stage.get("diac")), str(stage.get("triac"))
    dp, tp = f"parts.{d}.", f"parts.{t}."
    vbo, dv = v(dp + "vbo"), v(dp + "breakback")
    q = "q3" if v(tp + "igt_q3") >= v(tp + "igt_q1") else "q1"  # a diac fires I and III
    igt, vgt = v(tp + f"igt_{q}"), v(tp + f"vgt_{q}")
    ih = v(tp + "ih", 1e-3) if project.parts[t].params.get("ih") is not None else 1e-3
    r1 = v(sp + "pot") + v(sp + "series_r", 0.0)
    r_load = v(sp + "load_r", 100.0)
    r_path = max(v(sp + "gate_r", 0.0) + v(dp + "r_on", 0.0), 1.0)
    n.comment(f"Line {num(vs)} V RMS, {num(f)} Hz, through the load into the triac (MT2 node "
              "mt2, MT1 node 0);\nthe RC network across the triac, pot at the value shown "
              "(change R_1 to move it).")
    n.add(f"V_LINE line 0 SIN(0 {num(vm)} {num(f)})")
    n.add(f"R_LOAD line mt2 {num(r_load)}",
          "load_r" if v.has(sp + "load_r") else "a stand-in load (no load_r given)")
    n.comment(f"{ident(t)}: triac as a switch with hysteresis, on above 0.9 V of control, off "
              f"below 0.1 V; gate current at IGT = {num(igt)} A\n  (worse of quadrants I, "
              f"III) gives 1 V, the main current holds it on above IH = {num(ih)} A, in "
              "either direction. On-state drop not modelled.")
    n.add(f"VS_{ident(t)} mt2 mt2s DC 0", "senses the main current")
    n.add(f"S_{ident(t)} mt2s 0 tctl 0 TRIACSW")
    n.add(f"B_{ident(t)} tctl 0 V = abs(i(V_GATE))*{num(1 / igt)} + "
          f"abs(i(VS_{ident(t)}))*{num(0.1 / ih)}", "gate and latching control")
    n.add(f"R_1 mt2 n1 {num(r1)}", "pot + series_r")
    n.add(f"C_1 n1 0 {num(v(sp + 'c'))} IC=0", "c")
    cap = "n1"
    if v.has(sp + "r2"):
        n.add(f"R_2 n1 n2 {num(v(sp + 'r2'))}", "r2")
        n.add(f"C_2 n2 0 {num(v(sp + 'c2'))} IC=0", "c2")
        cap = "n2"
    n.comment(f"{ident(d)}: diac as two switches with hysteresis controlled by the capacitor "
              f"voltage: on at VBO = {num(vbo)} V,\n  off once the capacitor has fallen by "
              f"the breakback {num(dv)} V; the gate as VGT/IGT = {num(vgt / igt)} ohm.")
    n.add(f"S_{ident(d)}P {cap} g {cap} 0 DIACSW", "positive half-cycles")
    n.add(f"S_{ident(d)}N g {cap} 0 {cap} DIACSW", "negative half-cycles")
    n.add(f"R_GATE g gk {num(r_path)}", "gate_r + the diac's r_on (at least 1 ohm)")
    n.add(f"R_GK gk gx {num(vgt / igt)}", "the gate at its trigger point")
    n.add("V_GATE gx 0 DC 0", "senses the gate current")
    n.models.append(f".model DIACSW SW(VT={num(vbo - dv / 2)} VH={num(dv / 2)} RON=1 "
                    "ROFF=1e12)")
    n.models.append(".model TRIACSW SW(VT=0.5 VH=0.4 RON=0.001 ROFF=1e9)")
    n.uic = True
    n.tran = (period / 10000, 10 * period)
    n.tmax = period / 100000  # the diac's discharge lasts microseconds
    n.prints.append(f"v(line) v(mt2) v({cap})")


# ----------------------------------------------------------------------------- entry point

def netlist(run: Any, stage_id: str, corner: str = "nominal") -> str:
    """The SPICE netlist of stage ``stage_id`` of a computed project (``run``)."""
    project: Project = run.project
    stage = project.stages.get(stage_id)
    if stage is None:
        known = ", ".join(project.stages) or "none"
        raise ProjectError(f"no stage `{stage_id}` in {project.path}; the stages are: {known}")
    if corner not in CORNERS:
        raise ProjectError(f"unknown corner `{corner}`; use nominal or worst")
    worst, check = _worst_corner(run, stage) if corner == "worst" else ({}, "")
    v = _Values(project, worst)
    where = (f"the worst corner of {check} (its worst row for the inputs it reads, the "
             "nominal for the rest)" if check else "the nominal values")
    n = Netlist(f"{project.name} rev {project.revision}: stage {stage.id} ({stage.kind})")
    n.comment(f"Written by {TOOL}. Values at {where}; SI units, no suffixes.\nGeneric device "
              "models, described beside each; a check of the circuit, not of the devices.\n"
              "Mains circuit: simulate, do not build from this.")
    if corner == "worst" and not check:
        n.comment("No check of this stage has a worst corner: the nominal values are used.")
    kind = stage.kind
    if kind in ("ujt-oscillator", "put-oscillator"):
        _oscillator(n, stage, project, v)
    elif kind == "phase-control":
        _phase_control(n, stage, project, v, run, corner, check)
    elif kind == "line-commutation":
        target = project.stages.get(str(stage.get("for", "")))
        if target is None or target.kind != "phase-control":
            raise ProjectError(f"stage `{stage.id}` names no phase-control stage in `for`")
        n.comment(f"Natural turn-off: the circuit of {target.id}; the line reverse-biases the "
                  "SCR after its current falls to zero.")
        _phase_control(n, target, project, v, run, corner)
    elif kind == "dc-switch":
        _dc_switch(n, stage, project, v)
    elif kind == "rc-snubber":
        _snubber(n, stage, project, v)
    elif kind == "gate-drive":
        _gate(n, stage, project, v)
    elif kind in ("capacitor-commutation", "resonant-commutation"):
        _commutation(n, stage, project, v)
    elif kind == "triac-phase-control":
        _triac_phase_control(n, stage, project, v)
    elif kind == "triac-gate":
        raise ProjectError(f"no netlist for a triac-gate stage (`{stage.id}`): it is a source "
                           "and a resistor into the gate; export the triac-phase-control stage "
                           "it fires instead")
    elif kind == "diac-rc":
        _diac_rc(n, stage, project, v)
    else:
        raise ProjectError(f"no netlist for a {kind} stage")
    return n.text()
