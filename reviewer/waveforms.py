"""Waveforms to draw beside a check: the checks layer computes them, this module only feeds it.

Pure data preparation (numpy, no UI): the workbook draws the plots in braille, the report as
SVG, from the same :class:`Picture`. Each waveform helper of :mod:`checks` takes one design
point in SI. The point is the check's own corner (its worst row, or row 0, the nominal) from
``Result.evaluation``; a value the check does not read is taken at its nominal from the
project, and the plot says which ones were. A stage without the data gives no plot and a
reason ("no waveform for this check (needs …)").
"""

from __future__ import annotations

import importlib
import math
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from checks.oscillator import line_sync_firing_angle
from checks.power import load_waveform
from checks.turnoff import line_turnoff
from reviewer.engine import Result
from reviewer.fmt import eng
from reviewer.model import Project, Stage, Value

NO_WAVEFORM = "no waveform for this check"


@dataclass(eq=False)  # arrays inside: compared by identity
class Series:
    """One curve: its name, samples in SI and unit; ``dotted`` draws it thinner (references)."""

    name: str
    y: np.ndarray
    unit: str
    dotted: bool = False


@dataclass(eq=False)
class Plot:
    """One chart: an x axis (time unless ``x_unit`` says otherwise), curves of one unit,
    marked x positions and notes; ``bars`` draws the first curve as filled columns (a
    histogram); ``y_label`` names the quantity on the y axis ("capacitor voltage")."""

    title: str
    t: np.ndarray
    series: list[Series]
    marks: list[tuple[float, str]] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    x_unit: str = "s"
    bars: bool = False
    y_label: str = ""


@dataclass
class Picture:
    """What the waveform view shows for one check: one or more charts, or the reason for none."""

    plots: list[Plot] = field(default_factory=list)
    reason: str = ""
    corner: str = "worst"
    nominal_used: list[str] = field(default_factory=list)


class _Missing(Exception):
    """A value the waveform needs is not in the result nor in the project."""


class _Point:
    """The values of one row of a check's corner table, with the project as the fallback."""

    def __init__(self, result: Result, project: Project, corner: str) -> None:
        ev = result.evaluation
        self.project = project
        self.vals: dict[str, float] = {}
        self.options: dict[str, Any] = dict(ev.bound.options) if ev is not None else {}
        if ev is not None:
            row = ev.worst_row if corner == "worst" else 0
            for name, arr in ev.inputs.items():
                x = float(np.asarray(arr)[row])
                if math.isfinite(x):
                    self.vals[name] = x
        self.nominal_used: list[str] = []

    def get(self, names: tuple[str, ...], path: str | None = None,
            default: float | None = None) -> float:
        for n in names:
            if n in self.vals:
                return self.vals[n]
        if path is not None:
            v = self.project.lookup(path)
            if isinstance(v, Value) and math.isfinite(v.nom):
                self.nominal_used.append(path)
                return v.nom
        if default is not None:
            return default
        raise _Missing(path or names[0])

    def end(self, names: tuple[str, ...], path: str, which: str) -> float:
        """An input's low or high end (``which`` "lo"/"hi"): the row's value, else the project's."""
        for n in names:
            if n in self.vals:
                return self.vals[n]
        v = self.project.lookup(path)
        if isinstance(v, Value):
            x = v.lo if which == "lo" else v.hi
            if math.isfinite(x):
                self.nominal_used.append(f"{path} ({'min' if which == 'lo' else 'max'})")
                return x
        raise _Missing(path)


def _helper(module: str, name: str) -> Callable[..., Any] | None:
    try:
        mod = importlib.import_module(module)
    except ImportError:
        return None
    fn = getattr(mod, name, None)
    return fn if callable(fn) else None


# ------------------------------------------------------------------------------ oscillator

def _oscillator(stage: Stage, p: _Point) -> list[Plot]:
    fn = _helper("checks.oscillator", "capacitor_waveform")
    if fn is None:
        raise _Missing("checks.oscillator.capacitor_waveform")
    sp = f"stages.{stage.id}."
    dev = "ujt" if stage.kind == "ujt-oscillator" else "put"
    ref = stage.get(dev)
    pp = f"parts.{ref}."
    kw: dict[str, Any] = {
        "device": dev,
        "rt": p.get(("rt", "timing_r"), sp + "timing_r"),
        "ct": p.get(("ct", "timing_c"), sp + "timing_c"),
        "vv": p.get(("vv",), pp + "vv"),
    }
    if dev == "ujt":
        peak = {"eta": p.get(("eta",), pp + "eta"), "rbb": p.get(("rbb",), pp + "rbb"),
                "r1": p.get(("r1",), sp + "base1_r"),
                "r2": p.get(("r2",), sp + "base2_r", default=0.0),
                "vd": p.get(("vd",), pp + "vd")}
        kw["r_discharge"] = p.get(("rb1_on",), pp + "rb1_on", default=0.0) + peak["r1"]
    else:
        peak = {"r_upper": p.get(("r_upper",), sp + "gate_r_upper"),
                "r_lower": p.get(("r_lower",), sp + "gate_r_lower"),
                "offset": p.get(("offset",), pp + "offset")}
        kw["r_discharge"] = p.get(("rk", "cathode_r"), sp + "cathode_r")
    if stage.get("sync") == "line":
        vz = p.get(("vz", "v1"), sp + "zener")
        vline = p.get(("line_v", "v_line", "v_supply", "vs"), "supply.voltage")
        f = p.get(("line_f", "f", "frequency"), "supply.frequency")
        kw.update(vm=math.sqrt(2) * vline, omega=2 * math.pi * f, vz=vz)
    else:
        kw["v1"] = p.get(("v1",), sp + "supply")
    w = fn(**kw, **peak)
    t = np.asarray(w["t"])
    marks = [(float(x), "pulse") for x in np.asarray(w["pulse_times"])]
    series = [Series("capacitor", np.asarray(w["v_c"]), "V"),
              Series("peak point", np.asarray(w["v_peak_point"]), "V", dotted=True),
              Series("supply", np.asarray(w["supply"]), "V", dotted=True)]
    title = "timing capacitor voltage" + (" over one half-cycle" if "vm" in kw else "")
    return [Plot(title, t, series, marks, y_label="capacitor voltage")]


# ------------------------------------------------------------------------------- snubber

def _supply_volts(p: _Point) -> float:
    return p.get(("line_v", "v_line", "v_supply", "vs", "v"), "supply.voltage")


def _snubber(stage: Stage, p: _Point, project: Project) -> list[Plot]:
    fn = _helper("checks.snubber", "step_waveform")
    if fn is None:
        raise _Missing("checks.snubber.step_waveform")
    sp = f"stages.{stage.id}."
    step = stage.get("step", "line")
    if isinstance(step, Value):
        e = p.get(("e", "step"), sp + "step")
    elif step == "line" and project.supply.get("kind") == "ac":
        e = p.get(("e",), None, default=math.sqrt(2) * _supply_volts(p))
    else:
        e = p.get(("e",), None, default=_supply_volts(p))
    if "inductance" in stage.params:
        ind = p.get(("l", "inductance"), sp + "inductance")
    else:
        ind = p.get(("l", "inductance"), "supply.inductance")
    if ind <= 0:
        raise _Missing("a loop inductance above zero")
    r = p.get(("r", "rs"), sp + "r")
    c = p.get(("c", "cs"), sp + "c")
    w = fn(e=e, r=r, l=ind, c=c)
    t, v = np.asarray(w.t).reshape(-1), np.asarray(w.v).reshape(-1)
    marks = [(float(np.asarray(w.t_peak)), "peak"), (float(np.asarray(w.t_slope)), "steepest")]
    return [Plot("voltage across the SCR after the step", t,
                 [Series("device voltage", v, "V"),
                  Series("step", np.full_like(t, e), "V", dotted=True)], marks,
                 y_label="voltage across the SCR")]


# ------------------------------------------------------------------------------ turn-off

def _turnoff(stage: Stage, p: _Point, project: Project) -> list[Plot]:
    if stage.kind == "line-commutation":
        return _line_commutation(stage, p, project)
    fn = _helper("checks.turnoff", "commutation_waveform")
    if fn is None:
        raise _Missing("checks.turnoff.commutation_waveform")
    sp = f"stages.{stage.id}."
    target = stage.get("for")
    v_s = _supply_volts(p)
    v_c0 = p.get(("v_c0", "charge_voltage"), sp + "charge_voltage", default=v_s)
    r = p.get(("r", "r_load"), f"stages.{target}.load.r")
    c = p.get(("c",), sp + "c")
    kw: dict[str, Any] = {"c": c, "v_c0": v_c0, "v_s": v_s, "r": r,
                          "i_o": p.get(("i_o", "i_load"), None, default=v_s / r)}
    if stage.kind == "resonant-commutation":
        kw["network"] = "resonant"
        kw["l"] = p.get(("l",), sp + "l")
        diode = stage.get("diode")
        kw["diode"] = "no" if diode is False else "yes"
    else:
        kw["network"] = stage.get("load_model", "resistive")
    w = fn(**kw)
    t = np.asarray(w.t)
    on = np.asarray(w.turnoff, dtype=bool)
    marks = []
    if on.any():
        idx = np.flatnonzero(on)
        marks = [(float(t[idx[0]]), "turn-off starts"), (float(t[idx[-1]]), "ends")]
    return [Plot("commutating capacitor voltage", t,
                 [Series("capacitor", np.asarray(w.v_c), "V"),
                  Series("zero", np.zeros_like(t), "V", dotted=True)], marks,
                 y_label="capacitor voltage"),
            Plot("capacitor current", t, [Series("current", np.asarray(w.i_c), "A")],
                 y_label="capacitor current")]


# --------------------------------------------------------------------------------- power

def _deg(x: float) -> str:
    return f"{math.degrees(x):.0f}°"


def _line_osc(stage: Stage, project: Project) -> Stage | None:
    """The line-synchronised oscillator behind a power stage's gate drive, if there is one."""
    gate = project.stages.get(str(stage.get("gate", "")))
    osc = project.stages.get(str(gate.get("source", ""))) if gate is not None else None
    return osc if osc is not None and osc.get("sync") == "line" else None


def _osc_angle(osc: Stage, p: _Point, project: Project, rt: float, vm: float,
               omega: float) -> float:
    """The firing angle the oscillator gives with timing resistance ``rt`` (checks.oscillator)."""
    sp = f"stages.{osc.id}."
    dev = "ujt" if osc.kind == "ujt-oscillator" else "put"
    pp = f"parts.{osc.get(dev)}."
    if dev == "ujt":
        peak = {"eta": p.get(("osc_eta",), pp + "eta"), "rbb": p.get(("osc_rbb",), pp + "rbb"),
                "vd": p.get(("osc_vd",), pp + "vd"), "r1": p.get(("osc_r1",), sp + "base1_r"),
                "r2": p.get(("osc_r2",), sp + "base2_r", default=0.0)}
    else:
        peak = {"offset": p.get(("osc_offset",), pp + "offset"),
                "r_upper": p.get(("osc_r_upper",), sp + "gate_r_upper"),
                "r_lower": p.get(("osc_r_lower",), sp + "gate_r_lower")}
    vz, ct = p.get(("osc_vz",), sp + "zener"), p.get(("osc_ct",), sp + "timing_c")
    with np.errstate(all="ignore"):  # a corner that never fires gives NaN, said below
        a = line_sync_firing_angle(device=dev, vm=vm, omega=omega, vz=vz, rt=rt, ct=ct, **peak)
    x = float(np.asarray(a).reshape(-1)[0])
    if not math.isfinite(x):
        raise _Missing(f"a firing angle: `{osc.id}` does not fire in the half-cycle")
    return x


def _firing_ends(stage: Stage, p: _Point, project: Project, vm: float,
                 omega: float) -> tuple[float, float, str]:
    """(α_min, α_max, where they came from) of a phase-control stage at this design point."""
    if "alpha_lo" in p.vals and "alpha_hi" in p.vals:
        return p.vals["alpha_lo"], p.vals["alpha_hi"], "the firing range the check read"
    path = f"stages.{stage.id}.firing"
    if isinstance(stage.get("firing"), Value):
        return p.end(("alpha_lo",), path, "lo"), p.end(("alpha_hi",), path, "hi"), "`firing`"
    osc = _line_osc(stage, project)
    if osc is None:
        raise _Missing(f"a firing range: give `firing` in [stages.{stage.id}], or a gate "
                       "whose oscillator is line-synchronised")
    rt_path = f"stages.{osc.id}.timing_r"
    a_lo = _osc_angle(osc, p, project, p.end(("osc_rt_lo",), rt_path, "lo"), vm, omega)
    a_hi = _osc_angle(osc, p, project, p.end(("osc_rt_hi",), rt_path, "hi"), vm, omega)
    return a_lo, a_hi, f"the timing R ends of `{osc.id}`"


def _load_point(stage: Stage, p: _Point, project: Project) -> dict[str, Any]:
    """The load and line of a phase-control stage: the keywords of checks.power.load_waveform."""
    if project.supply.get("kind") != "ac":
        raise _Missing("an AC supply (the load waveform is one line cycle)")
    sp = f"stages.{stage.id}."
    topology = ("ac-switch" if stage.kind == "triac-phase-control"  # both halves, one die
                else p.options.get("topology") or stage.get("topology"))
    freewheel = bool(p.options.get("freewheel", stage.get("freewheel", False)))
    if topology == "ac-switch":
        freewheel = False  # an ac-switch load sees AC: no freewheeling
    f = p.get(("freq", "f", "line_f"), "supply.frequency")
    kw = {"topology": topology, "freewheel": freewheel,
          "vs": p.get(("vs", "v_s", "line_v"), "supply.voltage"),
          "r": p.get(("r",), sp + "load.r"), "l": p.get(("l",), sp + "load.l", default=0.0),
          "omega": 2 * math.pi * f}
    load = stage.get("load")
    if isinstance(load, dict) and "e" in load:  # a battery or motor: the back EMF
        kw["e"] = p.get(("e",), sp + "load.e")
    return kw


def firing_range(result: Result, project: Project, corner: str = "nominal"
                 ) -> tuple[float, float, str]:
    """(α_min, α_max [rad], where they came from) of the phase-control stage of ``result`` at
    the result's nominal row or worst corner; ValueError naming what is missing."""
    stage = project.stages[result.stage]
    point = _Point(result, project, corner)
    try:
        kw = _load_point(stage, point, project)
        return _firing_ends(stage, point, project, math.sqrt(2) * kw["vs"], kw["omega"])
    except _Missing as exc:
        raise ValueError(f"no firing angle for `{stage.id}` (needs {exc})") from None


def _cycle_plots(kw: dict[str, Any], angles: list[tuple[str, float]],
                 extra_marks: list[tuple[float, str]], notes: list[str]) -> list[Plot]:
    """Load voltage and current over one cycle, one curve per firing angle."""
    omega = kw["omega"]
    t: np.ndarray | None = None
    volts, amps, marks = [], [], []
    for k, (label, alpha) in enumerate(angles):
        theta, v, i = load_waveform(**kw, alpha=alpha)
        t = np.asarray(theta) / omega
        name = f"{label} {_deg(alpha)}"
        volts.append(Series(name, np.asarray(v), "V", dotted=k > 0))
        amps.append(Series(name, np.asarray(i), "A", dotted=k > 0))
        marks.append((alpha / omega, label))
    assert t is not None
    marks += extra_marks
    return [Plot("load voltage over one cycle", t, volts, marks, notes, y_label="load voltage"),
            Plot("load current over one cycle", t, amps, marks, [], y_label="load current")]


def _triac_commutation(stage: Stage, p: _Point, project: Project) -> list[Plot]:
    """The voltage reapplied across the triac after the current zero, with its snubber."""
    from checks.triac import snubbed_waveform

    if "snub_r" not in p.vals:
        raise _Missing("a snubber across the triac: without one the voltage steps at once")
    sp = f"stages.{stage.id}."
    l_load = p.get(("l",), sp + "load.l", default=0.0)
    if l_load <= 0:
        raise _Missing("an inductive load: a resistive one's voltage follows the line")
    from checks.triac import commutation_check

    r_load = p.get(("r",), sp + "load.r")
    r_s, c = p.vals["snub_r"], p.get(("snub_c",), None)
    vs = p.get(("vs",), "supply.voltage")
    omega = 2 * math.pi * p.get(("freq",), "supply.frequency")
    alpha = p.get(("alpha",), None)
    out = commutation_check(vs=np.array([vs]), r=r_load, l=l_load, omega=omega, alpha=alpha,
                            dvdt_c=1.0, didt_c=1.0, limits={}, snub_r=r_s, snub_c=c)
    e = float(out.values["step_bound"][0])
    t, v = snubbed_waveform(e=e, r_load=r_load, l=l_load, r_s=r_s, c=c)
    return [Plot("voltage across the triac after the current zero", t,
                 [Series("triac voltage", v, "V"), Series("step", np.full_like(t, e), "V",
                                                          dotted=True)],
                 [(float(t[int(np.argmax(v))]), "peak")],
                 ["the step is the largest line value while the snubber rings (a bound)"],
                 y_label="voltage across the triac")]


def _power(stage: Stage, p: _Point, project: Project) -> list[Plot]:
    if stage.kind not in ("phase-control", "triac-phase-control"):
        raise _Missing("a line cycle: a DC switch's load sees the bus whenever it conducts")
    kw = _load_point(stage, p, project)
    vm = math.sqrt(2) * kw["vs"]
    a_lo, a_hi, where = _firing_ends(stage, p, project, vm, kw["omega"])
    note = (f"firing-range ends α_min = {_deg(a_lo)} (full output) and α_max = {_deg(a_hi)} "
            f"(least output), from {where}")
    return _cycle_plots(kw, [("α_min", a_lo), ("α_max", a_hi)], [], [note])


def _line_commutation(stage: Stage, p: _Point, project: Project) -> list[Plot]:
    """The load waveform of the commutated stage with the turn-off interval the line leaves."""
    pw = project.stages.get(str(stage.get("for", "")))
    if pw is None or pw.kind != "phase-control":
        raise _Missing("a phase-control stage to commutate (`for`)")
    kw = _load_point(pw, p, project)
    vm = math.sqrt(2) * kw["vs"]
    omega = kw["omega"]
    if "alpha" in p.vals:
        angles, where = [("α", p.vals["alpha"])], "the firing angle of this corner"
    elif "osc_rt" in p.vals and _line_osc(pw, project) is not None:
        osc = _line_osc(pw, project)
        assert osc is not None
        angles = [("α", _osc_angle(osc, p, project, p.vals["osc_rt"], vm, omega))]
        where = f"`{osc.id}` at this corner's timing R"
    else:
        a_lo, a_hi, src = _firing_ends(pw, p, project, vm, omega)
        angles, where = [("α_min", a_lo), ("α_max", a_hi)], src
    l_s = p.get(("l_s",), "supply.inductance", default=0.0) if kw["topology"] == "bridge" \
        else 0.0
    out = line_turnoff(topology=kw["topology"], freewheel=kw["freewheel"],
                       alpha=angles[0][1], omega=omega, r=kw["r"], l=kw["l"], vm=vm, l_s=l_s)
    t_c = float(np.asarray(out.turnoff_time).reshape(-1)[0])
    # t_c runs from the SCR's current zero (β; π where a freewheeling diode takes the
    # current) until forward voltage returns.
    beta = math.pi if kw["freewheel"] else float(np.asarray(out.beta).reshape(-1)[0])
    notes = [f"firing at {', '.join(f'{n} = {_deg(a)}' for n, a in angles)} ({where})"]
    marks: list[tuple[float, str]] = []
    if math.isfinite(t_c) and t_c > 0 and math.isfinite(beta):
        marks = [(beta / omega, "current zero"), (beta / omega + t_c, "forward voltage")]
        tq = p.vals.get("tq")
        against = f" against tq = {eng(tq, 's')}" if tq is not None else ""
        notes.append(f"turn-off interval t_c = {eng(t_c, 's')} for the SCR fired at "
                     f"{_deg(angles[0][1])}: from its current zero at {_deg(beta)} to forward "
                     f"voltage{against}")
    else:
        notes.append("no turn-off interval: the current does not fall to zero before forward "
                     "voltage returns (commutation fails)")
    return _cycle_plots(kw, angles, marks, notes)


# ------------------------------------------------------------------------------ diac-RC

def _diac(stage: Stage, p: _Point) -> list[Plot]:
    """The firing angle over the pot's travel: starting (from off) and running (once on)."""
    from checks.diac import angle_curve

    sp = f"stages.{stage.id}."
    pp = f"parts.{stage.get('diac')}."
    two = isinstance(stage.get("r2"), Value)
    c = angle_curve(
        vm=math.sqrt(2) * p.get(("vs",), "supply.voltage"),
        omega=2 * math.pi * p.get(("freq",), "supply.frequency"),
        pot_lo=p.end(("pot_lo",), sp + "pot", "lo"), pot_hi=p.end(("pot_hi",), sp + "pot", "hi"),
        series_r=p.get(("series_r",), sp + "series_r", default=0.0),
        c1=p.get(("c1",), sp + "c"), vbo=p.get(("vbo",), pp + "vbo"),
        breakback=p.get(("breakback",), pp + "breakback"),
        r2=p.get(("r2",), sp + "r2") if two else math.nan,
        c2=p.get(("c2",), sp + "c2") if two else math.nan)
    pot_k = c["pot"] / 1e3
    marks = []
    for key, label in (("pot_on", "snaps on"), ("pot_off", "drops out")):
        x = float(c[key]) / 1e3
        if math.isfinite(x) and pot_k[0] <= x <= pot_k[-1]:
            marks.append((x, label))
    series = [Series("starting (from off)", np.degrees(c["starting"]), "deg"),
              Series("running (once on)", np.degrees(c["running"]), "deg", dotted=True)]
    notes = [] if np.isfinite(c["starting"]).all() else [
        "no firing from off where the starting curve is missing"]
    return [Plot("firing angle over the pot's travel", pot_k, series, marks, notes,
                 x_unit="kohm", y_label="firing angle")]


_DIAC = {"diac.firing-range", "diac.snap-on"}
_OSC = {"osc.window", "osc.timing", "osc.idle-gate", "osc.discharge", "osc.leakage"}
_SNUB = {"snubber.dvdt", "snubber.peak-voltage", "snubber.capacitor", "snubber.discharge"}
_TURN = {"turnoff.time", "turnoff.capacitor", "turnoff.reapplied-dvdt", "turnoff.peak-current"}


def has_waveform(check: str) -> bool:
    """True for the checks a picture helps with (every power-stage check: its load waveform)."""
    return (check in _OSC | _SNUB | _TURN | _DIAC or check.startswith("power.")
            or (check.startswith("triac.") and check != "triac.gate-trigger"))


def picture(result: Result, project: Project, corner: str = "worst") -> Picture:
    """The charts for one check at its worst corner or its nominal, or the reason there are none.

    Calls only the checks layer's waveform helpers; never raises for missing data.
    """
    stage = project.stages.get(result.stage)
    if stage is None or not has_waveform(result.check):
        return Picture(reason=NO_WAVEFORM, corner=corner)
    if result.evaluation is None:
        corner = "nominal"
    point = _Point(result, project, corner)
    try:
        if result.check in _OSC:
            plots = _oscillator(stage, point)
        elif result.check in _SNUB:
            plots = _snubber(stage, point, project)
        elif result.check in _TURN:
            plots = _turnoff(stage, point, project)
        elif result.check == "triac.commutation":
            plots = _triac_commutation(stage, point, project)
        elif result.check in _DIAC:
            plots = _diac(stage, point)
        else:
            plots = _power(stage, point, project)
    except _Missing as exc:
        return Picture(reason=f"{NO_WAVEFORM} (needs {exc})", corner=corner)
    except (ValueError, ZeroDivisionError, FloatingPointError, TypeError) as exc:
        return Picture(reason=f"{NO_WAVEFORM}: the waveform could not be drawn ({exc})",
                       corner=corner)
    used = list(dict.fromkeys(point.nominal_used))
    return Picture(plots, corner=corner, nominal_used=used)


def histogram(samples: np.ndarray, unit: str, *, bins: int = 48,
              marks: list[tuple[float, str]] | None = None, title: str = "") -> Plot:
    """A histogram of Monte Carlo samples (already in the report unit ``unit``) as a bar Plot.

    The x range covers the samples and every mark, so a limit outside the spread still shows.
    """
    x = np.asarray(samples, dtype=float)
    x = x[np.isfinite(x)]
    marks = [(float(m), s) for m, s in (marks or []) if math.isfinite(m)]
    lo = min([float(x.min())] + [m for m, _ in marks]) if x.size else 0.0
    hi = max([float(x.max())] + [m for m, _ in marks]) if x.size else 1.0
    if hi - lo < 1e-12 * max(1.0, abs(hi)):
        lo, hi = lo - 0.5 * max(abs(lo), 1e-12), hi + 0.5 * max(abs(hi), 1e-12)
    counts, edges = np.histogram(x, bins=bins, range=(lo, hi))
    centres = 0.5 * (edges[:-1] + edges[1:])
    return Plot(title or "samples", centres, [Series("samples", counts.astype(float), "")],
                marks, [], x_unit=unit, bars=True)
