"""IEC 60063 preferred numbers (E-series) and the nearest preferred values in a range.

The short series E3–E24 are hard-coded because several of their values predate the standard
and differ from the rounded geometric formula (2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2 in
E24). E48, E96 and E192 are round(10^(i/n), 3 significant digits) with one published
exception (E192 i = 185 is 9.20, not 9.19).

References
----------
[1] IEC 60063:2015, *Preferred number series for resistors and capacitors*.
"""

from __future__ import annotations

import math

import numpy as np

_SHORT = {
    3: (10, 22, 47),
    6: (10, 15, 22, 33, 47, 68),
    12: (10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82),
    24: (10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68,
         75, 82, 91),
}


def mantissas(n: int) -> tuple[int, ...]:
    """Integer mantissas of series E``n`` (two digits for E3–E24, three for E48–E192).

    >>> mantissas(12)[:4]
    (10, 12, 15, 18)
    >>> mantissas(96)[:5]
    (100, 102, 105, 107, 110)
    >>> mantissas(192)[185]
    920
    """
    if n in _SHORT:
        return _SHORT[n]
    if n not in (48, 96, 192):
        raise ValueError(f"no E{n} series")
    # Round halves up on the decimal mantissa, as the standard does.
    vals = [int(math.floor(10 ** (i / n) * 100 + 0.5)) for i in range(n)]
    if n == 192:
        vals[185] = 920
    return tuple(vals)


def series_for_tolerance(tol: float) -> int:
    """The series a part's relative tolerance suggests: ≤1 % E96, ≤2 % E48, ≤5 % E24,
    ≤10 % E12, ≤20 % E6, wider E3 [1].

    >>> series_for_tolerance(0.05), series_for_tolerance(0.01), series_for_tolerance(0.1)
    (24, 96, 12)
    """
    for limit, n in ((0.005, 192), (0.01, 96), (0.02, 48), (0.05, 24), (0.10, 12), (0.20, 6)):
        if tol <= limit + 1e-12:
            return n
    return 3


def values_between(lo: float, hi: float, n: int) -> np.ndarray:
    """Every value of E``n`` (any decade) within [lo, hi], ascending.

    >>> values_between(4000, 6000, 12).tolist()
    [4700.0, 5600.0]
    """
    if not (lo > 0 and hi >= lo):
        return np.array([])
    m = np.array(mantissas(n), dtype=float)
    digits = 1 if n <= 24 else 2
    out = []
    for dec in range(math.floor(math.log10(lo)) - 1, math.floor(math.log10(hi)) + 2):
        vals = m * 10.0 ** (dec - digits)
        out.append(vals[(vals >= lo * (1 - 1e-12)) & (vals <= hi * (1 + 1e-12))])
    return np.unique(np.concatenate(out)) if out else np.array([])


def nearest(x: float, n: int) -> float:
    """The E``n`` value nearest to ``x`` on a logarithmic scale, across decade boundaries.

    >>> nearest(9.6, 24), nearest(4650, 12), nearest(0.47e-6, 6)
    (10.0, 4700.0, 4.7e-07)
    """
    cands = values_between(x / 10, x * 10, n)
    return float(cands[np.argmin(np.abs(np.log(cands / x)))])
