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
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from checks import memo
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


class _Sampler:
    """The Monte Carlo state of one check: its input streams and its running counts."""

    def __init__(self, result: Result, n: int, seed: int, distribution: str,
                 keep_values: bool) -> None:
        ev = result.evaluation
        assert ev is not None
        self.ev, self.n, self.distribution = ev, n, distribution
        self.defn = CHECKS[result.check]
        self.prod = [k for k, inp in ev.bound.inputs.items() if is_production(inp)]
        self.gens = {k: np.random.default_rng([seed, zlib.crc32(ev.bound.inputs[k].path.encode())])
                     for k in self.prod}
        self.fixed = {k: ev.inputs[k][ev.worst_row] for k in ev.names if k not in self.prod}
        self.fails = self.marg = self.done = 0
        self.kept: list[np.ndarray] = []
        self.first_value = next(iter(self.defn.units), None) if keep_values else None

    def step(self, m: int, drawn: dict[tuple[object, ...], np.ndarray] | None = None) -> None:
        """Draw and evaluate the next ``m`` samples. ``drawn`` holds this chunk's samples by
        input path: every check reading a path draws the same stream (same seed), so the
        samples one check drew serve the others."""
        arrays = {k: np.full(m, x) for k, x in self.fixed.items()}
        for k in self.prod:
            inp = self.ev.bound.inputs[k]
            key = (inp.path, inp.value.lo, inp.value.nom, inp.value.hi)
            if drawn is None:
                arrays[k] = _draw(self.gens[k], inp, m, self.distribution)
            elif key in drawn:
                arrays[k] = drawn[key].copy()
            else:
                drawn[key] = _draw(self.gens[k], inp, m, self.distribution)
                arrays[k] = drawn[key].copy()
        out = self.ev.call(self.defn, arrays)
        self.fails += int(np.count_nonzero(out.status == FAIL))
        self.marg += int(np.count_nonzero(out.status == MARGINAL))
        if self.first_value in out.values:
            self.kept.append(np.asarray(out.values[self.first_value], dtype=float).copy())
        self.done += m

    def result(self) -> Yield:
        n, ev = self.n, self.ev
        return Yield(n, self.fails / n, self.marg / n, wilson(self.fails, n),
                     wilson(self.marg, n), [ev.bound.inputs[k].path for k in self.prod],
                     np.concatenate(self.kept) if self.kept else None)


def monte_carlo(result: Result, n: int, *, seed: int = 0, distribution: str = "normal",
                chunk: int = CHUNK, keep_values: bool = False) -> Yield | None:
    """Draw ``n`` samples of the check's production spreads and count failing samples."""
    if result.evaluation is None:
        return None
    s = _Sampler(result, n, seed, distribution, keep_values)
    while s.done < n:
        s.step(min(chunk, n - s.done))
    return s.result()


def monte_carlo_all(results: list[Result], n: int, *, seed: int = 0,
                    distribution: str = "normal", chunk: int = CHUNK,
                    keep_values: bool = False,
                    progress: Callable[[int], bool] | None = None
                    ) -> dict[tuple[str, str], Yield]:
    """:func:`monte_carlo` for every result that has an evaluation, giving the same yields.

    The checks advance chunk by chunk together, so a part value's samples are drawn once per
    chunk for every check that reads it, a solution several checks need from the same samples
    (the line-synchronised firing angle) is solved once per chunk (:mod:`checks.memo`), and
    only one chunk's draws and solutions are held at a time. ``progress(samples_done)`` is
    called after every chunk; when it returns False the run stops and gives nothing.
    """
    samplers = {(r.stage, r.check): _Sampler(r, n, seed, distribution, keep_values)
                for r in results if r.evaluation is not None}
    done = 0
    with memo.shared():
        while done < n:
            m = min(chunk, n - done)
            drawn: dict[tuple[object, ...], np.ndarray] = {}
            for s in samplers.values():
                s.step(m, drawn)
            memo.clear()
            done += m
            if progress is not None and not progress(done):
                return {}
    return {k: s.result() for k, s in samplers.items()}


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
