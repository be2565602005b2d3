"""What the workbook shows from the tolerance analysis and the design aids (no Textual here).

The numbers come from :mod:`reviewer.tolerance` (Monte Carlo yield, sensitivity ranking) and
:mod:`reviewer.aids` (passing range, preferred values); this module only picks what to ask
them and turns their answers into a histogram, a limit line and the text of an edit.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from reviewer.aids import Aid, designer_chooses, suggest_text
from reviewer.engine import Result
from reviewer.fmt import DIM_UNIT, to_report
from reviewer.model import Value
from reviewer.registry import CHECKS
from reviewer.tolerance import Influence, Yield, sensitivity
from reviewer.waveforms import Plot, histogram

SAMPLES = 20_000
SEED = 0
DISTRIBUTION = "normal"


@dataclass(frozen=True)
class AidInput:
    """An input the design aid can vary: its name in the check, its path and its share."""

    name: str
    path: str
    share: float


def first_value(result: Result) -> tuple[str, str] | None:
    """The value Monte Carlo keeps the samples of (the check's first value) and its unit."""
    defn = CHECKS.get(result.check)
    if defn is None or not defn.units:
        return None
    name = next(iter(defn.units))
    return name, defn.units[name]


def value_limit(result: Result) -> tuple[float, int] | None:
    """The first value at which the check's margin is zero (SI), and which side fails.

    The engine's margin is metric/limit − 1 (checks.core.grade). Where the metric is the first
    value (or its inverse) over a fixed reference, value/(1 + margin)^s is the same on every
    corner row, for s = +1 (higher is better: fails below) or −1 (fails above). Returns
    (limit, s) only when that holds on every row while the value varies; else None (the limit
    is not a fixed value of it, e.g. a window whose edges move with the corner).
    """
    ev = result.evaluation
    fv = first_value(result)
    if ev is None or fv is None or fv[0] not in ev.outcome.values:
        return None
    v = np.asarray(ev.outcome.values[fv[0]], dtype=float).reshape(-1)
    m = np.broadcast_to(np.asarray(ev.outcome.margin, dtype=float), v.shape)
    ok = np.isfinite(v) & np.isfinite(m) & (v > 0) & (1 + m > 0)
    if ok.sum() < 2:
        return None
    v, m = v[ok], m[ok]
    if v.max() <= v.min() * (1 + 1e-9):
        return None
    for s in (1, -1):
        cand = v / (1 + m) ** s
        if cand.max() <= cand.min() * (1 + 1e-6):
            return float(np.median(cand)), s
    return None


def yield_plot(result: Result, y: Yield) -> Plot | None:
    """The histogram of the kept samples against the limit and the corner analysis' worst."""
    fv = first_value(result)
    ev = result.evaluation
    if fv is None or y.values is None or ev is None or not np.isfinite(y.values).any():
        return None
    name, unit = fv
    samples = to_report(np.asarray(y.values, dtype=float), unit)
    marks: list[tuple[float, str]] = []
    lim = value_limit(result)
    if lim is not None:
        marks.append((float(to_report(lim[0], unit)), "limit"))
    if name in ev.outcome.values:
        col = np.asarray(ev.outcome.values[name], dtype=float).reshape(-1)
        worst = float(col[ev.worst_row] if col.size > ev.worst_row else col[0])
        if math.isfinite(worst):
            marks.append((float(to_report(worst, unit)), "worst corner"))
    plot = histogram(samples, unit, marks=marks, title=f"{name}: {y.samples} samples")
    if lim is None:
        plot.notes.append(f"the limit is not a fixed value of {name}: the fail fraction counts "
                          "the samples the check fails")
    else:
        side = "below" if lim[1] > 0 else "above"
        plot.notes.append(f"fails {side} the limit line")
    return plot


def ranking(result: Result) -> list[Influence]:
    """The sensitivity ranking of a result (reviewer.tolerance.sensitivity)."""
    return sensitivity(result)


def aid_inputs(result: Result) -> list[AidInput]:
    """The inputs the check reads that a designer chooses (reviewer.aids.designer_chooses),
    once per path, largest sensitivity share first. A value read under two names (both ends
    of a range, a temperature two limits are given at) is one input: the first name."""
    ev = result.evaluation
    if ev is None:
        return []
    shares = {i.path: i.share for i in ranking(result)}
    out: dict[str, AidInput] = {}
    for name, inp in ev.bound.inputs.items():
        v = inp.value
        if inp.path in out or not designer_chooses(inp.path, v.dim) or \
                not (v.nom > 0 and math.isfinite(v.nom)):
            continue
        out[inp.path] = AidInput(name, inp.path, shares.get(inp.path, 0.0))
    return sorted(out.values(), key=lambda a: -a.share)


def default_aid_input(result: Result) -> str | None:
    """The input with the largest sensitivity share (None when there is none to vary)."""
    cands = aid_inputs(result)
    return cands[0].name if cands else None


def try_value(aid: Aid, value: Value) -> float | None:
    """The nominal "try this value" proposes: the nearest passing preferred value, else the
    present value moved just inside the passing range (2 %), else None."""
    if aid.preferred:
        return aid.preferred[0]
    lo = aid.low * 1.02 if aid.low is not None else None
    hi = aid.high / 1.02 if aid.high is not None else None
    if lo is not None and hi is not None and lo > hi:
        return math.sqrt(aid.low * aid.high)  # type: ignore[operator]
    x = value.nom
    if lo is not None and x < lo:
        return lo
    if hi is not None and x > hi:
        return hi
    return None


def edit_text(value: Value, new_nom: float) -> str:
    """The text of the edit: the tolerance kept (reviewer.aids.suggest_text); a range
    ``{ min, max }`` is scaled as a whole, as the aid scaled it."""
    if not value.is_range:
        return suggest_text(value, new_nom)
    scale = new_nom / value.nom
    unit = DIM_UNIT.get(value.dim, "")

    def end(x: float) -> str:
        return suggest_text(Value(x, x, x, value.dim, unit, ""), x)

    return f'{{ min = "{end(value.lo * scale)}", max = "{end(value.hi * scale)}" }}'
