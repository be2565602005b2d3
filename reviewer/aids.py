"""Design aids: the range of one input that makes a check pass, and preferred values in it.

An aid is offered only on what a designer chooses (:func:`designer_chooses`): component values
(resistors, capacitors, inductors of a stage) and the ratings of what is bought (a capacitor's
voltage, a resistor's power, a zener voltage, a transformer's ratio, a heatsink, a fuse, an
SCR's voltage and current ratings). Never the operating conditions, the supply, the load, or a
part's datasheet characteristics (a UJT's η, an SCR's IGT): those are not the designer's to
set, and "passes at supply ≤ 181 V" on a 230 V product helps nobody.

The range is solved, not guessed: the check is evaluated on a grid of scale factors applied
to the chosen input (its tolerance band scales with it) across every corner at once, and the
edges of the passing interval are refined by bisection.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

import numpy as np

from checks.core import FAIL, PASS
from checks.eseries import series_for_tolerance, values_between
from reviewer.engine import Result
from reviewer.fmt import DIM_UNIT, eng
from reviewer.model import Value
from reviewer.registry import CHECKS

SPAN = (0.02, 50.0)
GRID = 161

#: Dimensions of the component values a stage is built from.
COMPONENT_DIMS = frozenset({"resistance", "capacitance", "inductance"})
#: Keys of a stage that are ratings of a part to buy (whatever their dimension).
STAGE_RATINGS = frozenset({"zener", "turns_ratio", "r_power", "c_voltage", "volt_seconds",
                           "isolation", "heatsink.rth_sa", "fuse.rating", "fuse.i2t"})
#: Keys of a stage table that describe what the stage drives or meets, not what it is built of.
STAGE_GIVEN = ("load.",)
#: Ratings of an SCR part (its maximum-ratings table), which the designer buys to.
PART_RATINGS = frozenset({"vdrm", "vrrm", "it_rms", "it_av", "itsm", "i2t"})


def designer_chooses(path: str, dim: str) -> bool:
    """Whether the value at ``path`` (dimension ``dim``) is the designer's choice.

    >>> designer_chooses("stages.trigger.timing_r", "resistance")
    True
    >>> [designer_chooses(p, d) for p, d in (("supply.voltage", "voltage"),
    ...  ("parts.U1.eta", "dimensionless"), ("stages.power.load.r", "resistance"),
    ...  ("parts.Q1.vdrm", "voltage"), ("parts.Q1.cold.il#none", ""))]
    [False, False, False, True, False]
    """
    if "#" in path:
        return False
    head, _, rest = path.partition(".")
    if head == "stages":
        _, _, key = rest.partition(".")
        if any(key.startswith(g) for g in STAGE_GIVEN):
            return False
        return key in STAGE_RATINGS or (dim in COMPONENT_DIMS and "." not in key)
    if head == "parts":
        _, _, key = rest.partition(".")
        return key in PART_RATINGS
    return False


@dataclass
class Aid:
    """What would make one check pass by changing one input."""

    path: str
    current: float
    low: float | None          # smallest passing nominal (None: open below the search span)
    high: float | None         # largest passing nominal (None: open above)
    series: int | None = None
    preferred: list[float] = field(default_factory=list)
    dim: str = ""

    def text(self) -> str:
        """One line for a summary or the workbook."""
        unit = DIM_UNIT.get(self.dim, "")
        if self.low is None and self.high is None:
            rng = "any value in the searched span"
        elif self.low is None:
            rng = f"≤ {eng(self.high, unit)}"
        elif self.high is None:
            rng = f"≥ {eng(self.low, unit)}"
        else:
            rng = f"{eng(self.low, unit)} – {eng(self.high, unit)}"
        pref = ""
        if self.preferred:
            pref = f"; E{self.series}: " + ", ".join(eng(x, unit) for x in self.preferred)
        return f"{self.path.split('#')[0]} passes at {rng}{pref}"

    def share_of(self) -> str:
        """How the passing range reads beside the present value."""
        return eng(self.current, DIM_UNIT.get(self.dim, ""))


def _worst_status(result: Result, name: str, scales: np.ndarray) -> np.ndarray:
    """Worst status over the corners for each scale factor of input ``name``."""
    ev = result.evaluation
    assert ev is not None
    defn = CHECKS[result.check]
    corners = {k: v[1:] for k, v in ev.inputs.items()}
    m = len(next(iter(corners.values())))
    arrays = {k: np.tile(v, len(scales)) for k, v in corners.items()}
    arrays[name] = arrays[name] * np.repeat(scales, m)
    out = ev.call(defn, arrays)
    status = np.asarray(out.status).reshape(len(scales), m)
    return status.max(axis=1)


def passing_range(result: Result, name: str, *, iterations: int = 40) -> Aid | None:
    """The nominal range of input ``name`` over which the check passes at every corner."""
    ev = result.evaluation
    if ev is None or name not in ev.bound.inputs:
        return None
    inp = ev.bound.inputs[name]
    v = inp.value
    if v.nom <= 0 or not designer_chooses(inp.path, v.dim):
        return None
    scales = np.geomspace(*SPAN, GRID)
    ok = _worst_status(result, name, scales) == PASS
    if not ok.any():
        return None
    # The passing run nearest to the present value (scale 1).
    idx = np.flatnonzero(ok)
    here = int(idx[np.argmin(np.abs(np.log(scales[idx])))])
    lo_i = hi_i = here
    while lo_i > 0 and ok[lo_i - 1]:
        lo_i -= 1
    while hi_i < GRID - 1 and ok[hi_i + 1]:
        hi_i += 1
    low = None if lo_i == 0 else _edge(result, name, scales[lo_i - 1], scales[lo_i], iterations)
    high = None if hi_i == GRID - 1 else _edge(result, name, scales[hi_i + 1], scales[hi_i],
                                                 iterations)
    aid = Aid(inp.path, v.nom, None if low is None else low * v.nom,
              None if high is None else high * v.nom, dim=v.dim)
    if v.dim in ("resistance", "capacitance"):
        _preferred(result, name, v, aid)
    return aid


def _edge(result: Result, name: str, bad: float, good: float, iterations: int) -> float:
    """Bisect (in log scale) between a failing and a passing scale; return the passing end."""
    lb, lg = np.log(bad), np.log(good)
    for _ in range(iterations):
        mid = 0.5 * (lb + lg)
        if _worst_status(result, name, np.array([np.exp(mid)]))[0] == PASS:
            lg = mid
        else:
            lb = mid
    return float(np.exp(lg))


def _preferred(result: Result, name: str, v: Value, aid: Aid) -> None:
    rel = max(v.hi - v.nom, v.nom - v.lo) / v.nom if v.nom else 0.0
    series = series_for_tolerance(rel if rel > 0 else 0.05)
    lo = aid.low if aid.low is not None else v.nom * SPAN[0]
    hi = aid.high if aid.high is not None else v.nom * SPAN[1]
    cands = values_between(lo, hi, series)
    if cands.size == 0:
        return
    order = np.argsort(np.abs(np.log(cands / v.nom)))[:6]
    cands = cands[order]
    status = _worst_status(result, name, cands / v.nom)
    aid.series = series
    aid.preferred = [float(c) for c, s in zip(cands, status, strict=True) if s == PASS][:3]


def suggest_text(v: Value, new_nom: float) -> str:
    """The value text for a project edit: the new nominal with the tolerance as written.

    >>> from reviewer.model import Value
    >>> suggest_text(Value(47e3, 44.65e3, 49.35e3, "resistance", "kohm", "47 kohm ±5%"), 56e3)
    '56 kohm ±5%'
    """
    unit = DIM_UNIT.get(v.dim, "")
    body = eng(new_nom, unit, digits=4).replace("Ω", "ohm").replace("µ", "u")
    m = re.search(r"(±|\+/-|\+-|\s\+\d).*$", v.text)
    return f"{body} {m.group(0).strip()}" if m else body


def failing(result: Result) -> bool:
    """Whether a design aid is worth offering for this result."""
    ev = result.evaluation
    return ev is not None and int(np.asarray(ev.outcome.status).max()) >= FAIL - 1
