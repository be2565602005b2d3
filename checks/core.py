"""The shape every check evaluation returns, and the grading rule shared by most checks.

A check function receives its inputs as broadcastable arrays (one row per corner or sample) and
a mapping of limits from the checklist, and returns an :class:`Outcome`: named values, a margin
per row and a status per row. Status codes are small integers so that whole samples can be
counted with numpy.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

PASS = 0
MARGINAL = 1
FAIL = 2

STATUS_NAMES = {PASS: "pass", MARGINAL: "marginal", FAIL: "fail"}


@dataclass
class Outcome:
    """The result of one check evaluated on n rows (corners or samples).

    ``values`` maps each reported value name to an array in SI units; ``margin`` is the distance
    to the fail limit as a fraction of it (negative fails); ``status`` holds PASS, MARGINAL or
    FAIL per row. ``notes`` are assumptions the computation made (said in the summary).
    """

    values: dict[str, np.ndarray]
    margin: np.ndarray
    status: np.ndarray
    notes: list[str] = field(default_factory=list)

    def broadcast(self, n: int) -> Outcome:
        """Return a copy with every array broadcast to shape (n,)."""
        vals = {k: np.broadcast_to(np.asarray(v, dtype=float), (n,))
                for k, v in self.values.items()}
        margin = np.broadcast_to(np.asarray(self.margin, dtype=float), (n,))
        status = np.broadcast_to(np.asarray(self.status, dtype=np.int8), (n,))
        return Outcome(vals, margin, status, list(self.notes))


def grade(metric: np.ndarray, limits: Mapping[str, float]) -> tuple[np.ndarray, np.ndarray]:
    """Grade a higher-is-better ratio against ``fail_below`` and ``marginal_below``.

    Returns ``(margin, status)`` where margin = metric / fail_below − 1. A NaN metric (a
    computation with no valid answer at that row) fails.

    >>> m, s = grade(np.array([0.9, 1.5, 3.0]), {"fail_below": 1.0, "marginal_below": 2.0})
    >>> m.round(2).tolist(), s.tolist()
    ([-0.1, 0.5, 2.0], [2, 1, 0])
    """
    metric = np.asarray(metric, dtype=float)
    fail_below = float(limits.get("fail_below", 1.0))
    marginal_below = float(limits.get("marginal_below", fail_below))
    margin = metric / fail_below - 1.0
    status = np.where(
        ~(metric >= fail_below), FAIL, np.where(metric < marginal_below, MARGINAL, PASS)
    ).astype(np.int8)
    margin = np.where(np.isnan(metric), -1.0, margin)
    return margin, status


def cap_status(status: np.ndarray, worst: int) -> np.ndarray:
    """Limit an advisory check's status to ``worst`` (e.g. MARGINAL)."""
    return np.minimum(np.asarray(status, dtype=np.int8), worst).astype(np.int8)


def cold_factor(t_min: np.ndarray, k: float) -> np.ndarray:
    """Common-practice cold multiplier for an SCR gate or holding parameter, pro rata.

    factor(T) = 1 + (k − 1)·(25 − T)/65 with T in °C, applied only below 25 °C (above it, no
    reduction is taken). ``t_min`` is the minimum ambient in kelvin.

    >>> float(cold_factor(np.array(263.15), 2.0).round(3))
    1.538
    >>> float(cold_factor(np.array(263.15), 1.5).round(3))
    1.269
    """
    t_c = np.asarray(t_min, dtype=float) - 273.15
    return 1.0 + (k - 1.0) * np.clip(25.0 - t_c, 0.0, None) / 65.0


def cold_value(
    v25: np.ndarray, t_min: np.ndarray, *, v_cold: np.ndarray | float, t_cold: np.ndarray | float,
    k: float,
) -> np.ndarray:
    """A part value at the coldest ambient ``t_min`` [K].

    With data at ``t_cold`` (``v_cold`` not NaN) interpolate linearly between 25 °C and
    ``t_cold`` (extrapolating the same line beyond it); without data (NaN) apply the
    common-practice factor ``k`` at −40 °C, pro rata. Above 25 °C the 25 °C value is kept.

    >>> round(float(cold_value(10e-3, 253.15, v_cold=np.nan, t_cold=np.nan, k=2.0) * 1e3), 3)
    16.923
    >>> round(float(cold_value(10e-3, 253.15, v_cold=30e-3, t_cold=233.15, k=2.0) * 1e3), 3)
    23.846
    """
    v25 = np.asarray(v25, dtype=float)
    t_min = np.asarray(t_min, dtype=float)
    v_cold = np.asarray(v_cold, dtype=float)
    t_cold = np.asarray(t_cold, dtype=float)
    t25 = 298.15
    with np.errstate(invalid="ignore", divide="ignore"):
        frac = np.clip(t25 - t_min, 0.0, None) / (t25 - t_cold)
        interp = v25 + (v_cold - v25) * frac
    assumed = v25 * cold_factor(t_min, k)
    return np.where(np.isnan(v_cold), assumed, interp)


def as_array(x: object) -> np.ndarray:
    """Return ``x`` as a float array (no copy when it already is one)."""
    return np.asarray(x, dtype=float)


def distinct_rows(*arrays: np.ndarray | float) -> tuple[list[np.ndarray], np.ndarray]:
    """The distinct rows of broadcast ``arrays`` (columns of the distinct rows) and, per
    original row, the index of its distinct row; the original shape is kept by the index.

    Corner tables repeat a row many times over for the inputs a quantity does not read (a
    segment's harmonics, a bisection): work each distinct row once, then ``result[index]``.

    >>> cols, back = distinct_rows(np.array([1.0, 2.0, 1.0]), 0.5)
    >>> [c.tolist() for c in cols], back.tolist()
    ([[1.0, 2.0], [0.5, 0.5]], [0, 1, 0])
    """
    full = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in arrays))
    shape = full[0].shape
    flat = [x.ravel() for x in full]
    if flat[0].size <= 1:
        return flat, np.zeros(shape, dtype=np.intp)
    order = np.lexsort(flat[::-1])
    ranked = [x[order] for x in flat]
    # rows differ where any column differs (NaN rows are never merged: NaN != NaN)
    new = np.ones(order.size, dtype=bool)
    new[1:] = np.any(np.stack([r[1:] != r[:-1] for r in ranked]), axis=0)
    back = np.empty(order.size, dtype=np.intp)
    back[order] = np.cumsum(new) - 1
    return [r[new] for r in ranked], back.reshape(shape)
