"""Interior points for a firing angle taken from a line-synchronised oscillator.

The firing angle is then a function of the swept timing R (and of the other inputs at their
ends), so ``Input.extra`` in angle units cannot be used. Instead the timing R at which each
combination of the other inputs' ends fires exactly at the wanted angle (α = 90°, where the
discharge currents, di/dt and losses peak) is solved and added to the sweep: every corner's
firing range then holds its interior extreme exactly, not only near it.

The root is found in log R by a bracketed secant (regula falsi with the Illinois weighting),
falling back to halving the bracket whenever the secant does not shrink it fast enough or the
angle is undefined (no firing in the half-cycle): about 8 angle solutions per root where plain
halving to the same width takes 48.
"""

from __future__ import annotations

import math
import threading
from collections import OrderedDict
from collections.abc import Callable, Hashable, Iterable, Mapping

import numpy as np

from reviewer.registry import Bound

#: Stop when the angle is this close to the target [rad], or the bracket in ln R this narrow.
_ANGLE_TOL = 1e-13
_WIDTH = 1e-14
_STEPS = 100  # at most; halving alone gets from a bracket of e^±20 to _WIDTH in 52 steps


def solve_log_r(angle_at: Callable[[np.ndarray], np.ndarray], lo: float, hi: float,
                target: float, rows: int) -> tuple[np.ndarray, np.ndarray]:
    """ln R, per row, where ``angle_at(R)`` reaches ``target``, and whether it lies inside.

    ``angle_at`` gives the angle [rad] for one R per row, rising with R; NaN (no firing) is
    late. Rows already at or past the target at ``lo``, or still early at ``hi``, have no
    root inside (False). The root returned is the end of the final bracket nearer the target.
    """
    a = np.full(rows, lo)
    b = np.full(rows, hi)

    def gap(x: np.ndarray) -> np.ndarray:
        with np.errstate(all="ignore"):
            return np.asarray(angle_at(np.exp(x)), dtype=float) - target  # NaN: late

    fa, fb = gap(a), gap(b)
    inside = (fa < 0.0) & ~(fb < 0.0)
    ga, gb = fa.copy(), fb.copy()  # the secant's weights (Illinois-halved copies)
    side = np.zeros(rows, dtype=np.int8)  # which end moved last: -1 lo, +1 hi
    for _ in range(_STEPS):
        open_ = inside & ((b - a) > _WIDTH) & ~(np.abs(fa) <= _ANGLE_TOL) & \
            ~(np.abs(fb) <= _ANGLE_TOL)
        if not open_.any():
            break
        with np.errstate(all="ignore"):
            sec = b - gb * (b - a) / (gb - ga)
        # The secant while both ends have an angle and it lands inside; else halve.
        use = np.isfinite(sec) & (sec > a) & (sec < b)
        x = np.where(open_, np.where(use, sec, 0.5 * (a + b)), a)
        fx = gap(x)
        late = ~(fx < 0.0)
        move_hi, move_lo = open_ & late, open_ & ~late
        # Illinois: an end kept twice in a row has its weight halved, so the secant moves it.
        ga = np.where(move_hi & (side == 1), 0.5 * ga, np.where(move_lo, fx, ga))
        gb = np.where(move_lo & (side == -1), 0.5 * gb, np.where(move_hi, fx, gb))
        b, fb = np.where(move_hi, x, b), np.where(move_hi, fx, fb)
        a, fa = np.where(move_lo, x, a), np.where(move_lo, fx, fa)
        side = np.where(move_hi, 1, np.where(move_lo, -1, side)).astype(np.int8)
    nearer_b = np.abs(fb) < np.abs(fa)  # NaN at b compares False: a
    return np.where(nearer_b, b, a), inside


#: Solved points by (the caller's name for its angle function, every input's ends, the R
#: range, the angles): several checks bind the same oscillator, and an edit elsewhere in the
#: project rebinds them all with the same values.
_SOLVED: OrderedDict[Hashable, tuple[float, ...]] = OrderedDict()
_KEEP = 512
_LOCK = threading.Lock()  # the workbook binds in worker threads


def rt_at_angles(b: Bound, rt_name: str, others: Iterable[str],
                 angle_of: Callable[[Mapping[str, np.ndarray], np.ndarray], np.ndarray],
                 angles: Iterable[float], *, key: Hashable = None) -> tuple[float, ...]:
    """The timing R values inside the range of input ``rt_name`` that fire at ``angles``.

    ``others`` are the inputs the angle depends on besides R; ``angle_of(grid, rt)`` gives the
    angle [rad] for rows of their values, rising with R (NaN: no firing in the half-cycle).
    ``key`` (optional) names ``angle_of`` with everything it depends on besides the inputs
    (device, option values): calls with the same key and the same inputs' values are solved
    once.
    """
    names = list(others)
    angles = tuple(angles)
    ends = [sorted({b.inputs[n].value.lo, b.inputs[n].value.hi}) for n in names]
    rt = b.inputs[rt_name].value
    memo_key = None
    if key is not None:
        memo_key = (key, tuple(names), tuple(tuple(e) for e in ends), rt.lo, rt.hi, angles)
        with _LOCK:
            hit = _SOLVED.get(memo_key)
            if hit is not None:
                _SOLVED.move_to_end(memo_key)
                return hit
    found = _solve_points(names, ends, rt.lo, rt.hi, angle_of, angles)
    if memo_key is not None:
        with _LOCK:
            _SOLVED[memo_key] = found
            while len(_SOLVED) > _KEEP:
                _SOLVED.popitem(last=False)
    return found


def _solve_points(names: list[str], ends: list[list[float]], rt_lo: float, rt_hi: float,
                  angle_of: Callable[[Mapping[str, np.ndarray], np.ndarray], np.ndarray],
                  angles: tuple[float, ...]) -> tuple[float, ...]:
    grid = dict(zip(names, (g.ravel() for g in np.meshgrid(*ends, indexing="ij")),
                    strict=True))
    rows = next(iter(grid.values())).size if grid else 1
    log_lo, log_hi = math.log(rt_lo), math.log(rt_hi)
    out: list[float] = []
    for target in angles:
        root, inside = solve_log_r(lambda r: angle_of(grid, r), log_lo, log_hi, target, rows)
        inside &= (root > log_lo + 1e-12) & (root < log_hi - 1e-12)
        out += [float(x) for x in np.exp(root[inside])]
    return tuple(sorted(set(out)))
