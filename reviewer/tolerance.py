"""Tolerance analysis beyond the corners: Monte Carlo yield and sensitivity ranking.

Monte Carlo draws every production spread (part tolerances and part-to-part spreads) and holds
the operating conditions (ambient, supply, adjustable ranges such as a pot or the firing range)
at the worst corner the corner analysis found, so a sample "fails" when that unit fails at the
worst operating point. Each input path has its own seeded stream, so a part value is the same
sample in every check that reads it, and a run is reproducible with ``--seed``.
"""

from __future__ import annotations

import math
import zlib
from dataclasses import dataclass

import numpy as np

from checks.core import FAIL, MARGINAL
from reviewer.engine import Result
from reviewer.registry import CHECKS, Input

CHUNK = 8192  # rows per call: small enough that the working arrays stay in cache
Z95 = 1.959963984540054


@dataclass
class Yield:
    """Monte Carlo outcome of one check."""

    samples: int
    fail_fraction: float
    marginal_fraction: float
    fail_interval: tuple[float, float]
    marginal_interval: tuple[float, float]
    sampled_inputs: list[str]
    values: np.ndarray | None = None   # the checked value's samples (first value name), for plots

    def as_dict(self) -> dict[str, object]:
        """The JSON form added to a result."""
        return {"samples": self.samples, "fail_fraction": self.fail_fraction,
                "marginal_fraction": self.marginal_fraction,
                "fail_interval": list(self.fail_interval),
                "marginal_interval": list(self.marginal_interval)}


def wilson(k: int, n: int, z: float = Z95) -> tuple[float, float]:
    """Wilson score interval for k successes in n trials (95 % by default).

    >>> [round(x, 4) for x in wilson(10, 100)]
    [0.0552, 0.1744]
    """
    if n == 0:
        return (0.0, 1.0)
    p = k / n
    den = 1 + z * z / n
    centre = (p + z * z / (2 * n)) / den
    half = z * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n)) / den
    return (max(0.0, centre - half), min(1.0, centre + half))


def is_production(inp: Input) -> bool:
    """True for a part tolerance or spread; False for an operating condition or setting."""
    path = inp.path
    if inp.sweep or path.startswith(("conditions.", "supply.")) or "#" in path:
        return False
    if path.startswith("stages.") and inp.value.is_range:
        return False  # an adjustable range (a pot, a firing range, a target)
    return inp.value.varies


def _draw(rng: np.random.Generator, inp: Input, n: int, distribution: str) -> np.ndarray:
    v = inp.value
    if distribution == "uniform":
        return rng.uniform(v.lo, v.hi, n)
    z = rng.standard_normal(n)
    # Split normal: the tolerance on each side is 3σ of that side (in place: nom + z·side/3).
    z *= np.where(z >= 0, v.hi - v.nom, v.nom - v.lo)
    z /= 3
    z += v.nom
    return z


def monte_carlo(result: Result, n: int, *, seed: int = 0, distribution: str = "normal",
                chunk: int = CHUNK, keep_values: bool = False) -> Yield | None:
    """Draw ``n`` samples of the check's production spreads and count failing samples."""
    ev = result.evaluation
    if ev is None:
        return None
    defn = CHECKS[result.check]
    prod = [k for k, inp in ev.bound.inputs.items() if is_production(inp)]
    gens = {k: np.random.default_rng([seed, zlib.crc32(ev.bound.inputs[k].path.encode())])
            for k in prod}
    fixed = {k: ev.inputs[k][ev.worst_row] for k in ev.names if k not in prod}
    fails = marg = 0
    kept: list[np.ndarray] = []
    first_value = next(iter(defn.units), None)
    done = 0
    while done < n:
        m = min(chunk, n - done)
        arrays = {k: np.full(m, x) for k, x in fixed.items()}
        for k in prod:
            arrays[k] = _draw(gens[k], ev.bound.inputs[k], m, distribution)
        out = ev.call(defn, arrays)
        fails += int(np.count_nonzero(out.status == FAIL))
        marg += int(np.count_nonzero(out.status == MARGINAL))
        if keep_values and first_value in out.values:
            kept.append(np.asarray(out.values[first_value], dtype=float).copy())
        done += m
    return Yield(n, fails / n, marg / n, wilson(fails, n), wilson(marg, n),
                 [ev.bound.inputs[k].path for k in prod],
                 np.concatenate(kept) if kept else None)


@dataclass
class Influence:
    """How much one input moves a check's margin across the corners."""

    path: str
    effect: float    # mean margin with the input at its high end minus at its low end
    share: float     # |effect| as a fraction of the sum over inputs


def sensitivity(result: Result) -> list[Influence]:
    """Rank the varying inputs by their main effect on the margin over the corner table.

    For each input, the mean margin over the corners where it sits at its highest point minus
    the mean where it sits at its lowest (a two-level factorial main effect).
    """
    ev = result.evaluation
    if ev is None or not ev.varying:
        return []
    margin = np.clip(np.asarray(ev.outcome.margin[1:], dtype=float), -10.0, 10.0)
    ok = np.isfinite(margin)
    effects = []
    for name in ev.varying:
        col = ev.inputs[name][1:]
        hi, lo = col == col.max(), col == col.min()
        a, b = margin[hi & ok], margin[lo & ok]
        e = float(a.mean() - b.mean()) if a.size and b.size else 0.0
        effects.append((ev.bound.inputs[name].path, e))
    total = sum(abs(e) for _, e in effects) or 1.0
    out = [Influence(p, e, abs(e) / total) for p, e in effects]
    return sorted(out, key=lambda i: -i.share)
