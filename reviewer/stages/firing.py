"""Interior points for a firing angle taken from a line-synchronised oscillator.

The firing angle is then a function of the swept timing R (and of the other inputs at their
ends), so ``Input.extra`` in angle units cannot be used. Instead the timing R at which each
combination of the other inputs' ends fires exactly at the wanted angle (α = 90°, where the
discharge currents, di/dt and losses peak) is solved and added to the sweep: every corner's
firing range then holds its interior extreme exactly, not only near it.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Mapping

import numpy as np

from reviewer.registry import Bound


def rt_at_angles(b: Bound, rt_name: str, others: Iterable[str],
                 angle_of: Callable[[Mapping[str, np.ndarray], np.ndarray], np.ndarray],
                 angles: Iterable[float]) -> tuple[float, ...]:
    """The timing R values inside the range of input ``rt_name`` that fire at ``angles``.

    ``others`` are the inputs the angle depends on besides R; ``angle_of(grid, rt)`` gives the
    angle [rad] for rows of their values, rising with R (NaN: no firing in the half-cycle).
    """
    names = list(others)
    ends = [np.unique([b.inputs[n].value.lo, b.inputs[n].value.hi]) for n in names]
    grid = dict(zip(names, (g.ravel() for g in np.meshgrid(*ends, indexing="ij")),
                    strict=True))
    rt = b.inputs[rt_name].value
    shape = next(iter(grid.values())).shape if grid else (1,)
    out: list[float] = []
    for target in angles:
        lo = np.full(shape, math.log(rt.lo))
        hi = np.full(shape, math.log(rt.hi))
        for _ in range(48):  # vectorised bisection in log R: the angle rises with R
            mid = 0.5 * (lo + hi)
            with np.errstate(all="ignore"):
                late = ~(angle_of(grid, np.exp(mid)) < target)
            hi = np.where(late, mid, hi)
            lo = np.where(late, lo, mid)
        inside = (lo > math.log(rt.lo) + 1e-12) & (hi < math.log(rt.hi) - 1e-12)
        out += [float(x) for x in np.exp(0.5 * (lo + hi))[inside]]
    return tuple(sorted(set(out)))
