"""Waveforms to draw beside a check: the checks layer computes them, this module only feeds it.

Each waveform helper of :mod:`checks` takes one design point in SI. The point is the check's
own corner (its worst row, or row 0, the nominal) from ``Result.evaluation``; a value the check
does not read is taken at its nominal from the project, and the plot says which ones were.
A helper that is not in this version yet, or a stage without the data, gives no plot and a
reason ("no waveform for this check").
"""

from __future__ import annotations

import importlib
import math
from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from reviewer.engine import Result
from reviewer.model import Project, Stage, Value

NO_WAVEFORM = "no waveform for this check"


@dataclass
class Series:
    """One curve: its name, samples in SI and unit; ``dotted`` draws it thinner (references)."""

    name: str
    y: np.ndarray
    unit: str
    dotted: bool = False


@dataclass
class Plot:
    """One chart: a time axis, curves of one unit, marked instants and notes."""

    title: str
    t: np.ndarray
    series: list[Series]
    marks: list[tuple[float, str]] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)


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
    return [Plot(title, t, series, marks)]


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
                  Series("step", np.full_like(t, e), "V", dotted=True)], marks)]


# ------------------------------------------------------------------------------ turn-off

def _turnoff(stage: Stage, p: _Point, project: Project) -> list[Plot]:
    if stage.kind == "line-commutation":
        raise _Missing("a commutating network (line commutation has none to draw)")
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
                  Series("zero", np.zeros_like(t), "V", dotted=True)], marks),
            Plot("capacitor current", t, [Series("current", np.asarray(w.i_c), "A")])]


# --------------------------------------------------------------------------------- power

def _power(stage: Stage, p: _Point, project: Project) -> list[Plot]:
    fn = _helper("checks.power", "load_waveform")
    if fn is None:
        raise _Missing("checks.power.load_waveform (not in this version yet)")
    raise _Missing("checks.power.load_waveform is new: the workbook does not feed it yet")


_OSC = {"osc.window", "osc.timing", "osc.idle-gate", "osc.discharge", "osc.leakage"}
_SNUB = {"snubber.dvdt", "snubber.peak-voltage", "snubber.capacitor", "snubber.discharge"}
_TURN = {"turnoff.time", "turnoff.capacitor", "turnoff.reapplied-dvdt", "turnoff.peak-current"}
_POWER = {"power.output", "power.holding", "power.latching"}


def has_waveform(check: str) -> bool:
    """True for the checks a picture helps with."""
    return check in _OSC | _SNUB | _TURN | _POWER


def picture(result: Result, project: Project, corner: str = "worst") -> Picture:
    """The charts for one check at its worst corner or its nominal, or the reason there are none.

    Calls only the checks layer's waveform helpers; never raises for missing data.
    """
    stage = project.stages.get(result.stage)
    if stage is None or not has_waveform(result.check):
        return Picture(reason=NO_WAVEFORM, corner=corner)
    if result.status == "not-applicable" and result.evaluation is None and \
            result.summary.startswith("this check is not available"):
        corner = "nominal"
    point = _Point(result, project, corner)
    try:
        if result.check in _OSC:
            plots = _oscillator(stage, point)
        elif result.check in _SNUB:
            plots = _snubber(stage, point, project)
        elif result.check in _TURN:
            plots = _turnoff(stage, point, project)
        else:
            plots = _power(stage, point, project)
    except _Missing as exc:
        return Picture(reason=f"{NO_WAVEFORM} (needs {exc})", corner=corner)
    except (ValueError, ZeroDivisionError, FloatingPointError) as exc:
        return Picture(reason=f"{NO_WAVEFORM}: the waveform could not be drawn ({exc})",
                       corner=corner)
    used = list(dict.fromkeys(point.nominal_used))
    return Picture(plots, corner=corner, nominal_used=used)
