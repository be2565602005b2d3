"""The fast single-section running solution against the general code it replaced, at many
random rows, and its extinction angle against the R–L one.

The reference for the firing angle is the general path of checks.diac: the 2×2 network
(Sylvester's exp(A·θ)) in :func:`checks.diac.running_excess`, its first root on the same
96-point grid by :func:`checks.diac._root_in`, the R–L extinction angle solved inside every
evaluation. Both are checked against solve_ivp of the circuit elsewhere (test_diac.py,
test_diac_rl.py); here the two solvers must agree row by row.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from checks import diac, diac_single, memo, rl


def _rows(seed: int, n: int) -> dict[str, np.ndarray]:
    rng = np.random.default_rng(seed)
    return {
        "vm": 230 * math.sqrt(2) * rng.uniform(0.85, 1.15, n),
        "omega": 2 * np.pi * rng.choice([50.0, 60.0], n),
        "r1": np.exp(rng.uniform(np.log(5e3), np.log(600e3), n)),
        "c1": rng.uniform(22e-9, 330e-9, n),
        "vbo": rng.uniform(26.0, 40.0, n),
        "breakback": rng.uniform(3.0, 12.0, n),
        # a fifth resistive, the rest R–L loads from nearly resistive to nearly inductive
        "phi": np.where(rng.uniform(size=n) < 0.2, 0.0, rng.uniform(0.02, 1.5, n)),
    }


def _general(kw: dict[str, np.ndarray]) -> np.ndarray:
    """The first root of running_excess on the grid, as checks.diac solved it before."""
    shape = np.shape(kw["r1"])

    def c(x: np.ndarray) -> np.ndarray:
        return np.broadcast_to(x, shape)[..., None]

    def g(a: np.ndarray) -> np.ndarray:
        return diac.running_excess(vm=c(kw["vm"]), omega=c(kw["omega"]), r1=c(kw["r1"]),
                                   c1=c(kw["c1"]), vbo=c(kw["vbo"]),
                                   breakback=c(kw["breakback"]), alpha=a, phi=c(kw["phi"]))

    floor = np.where(kw["phi"] > 0, kw["phi"] + 1e-9, 0.0)
    with np.errstate(all="ignore"):
        alpha = diac._root_in(g, floor, np.full(shape, np.pi * (1 - 1e-12)), grid=96)
        dead = (kw["phi"] > 0) & (g(floor[..., None])[..., 0] >= 0)
    return np.where(dead, np.nan, alpha)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_running_angle_matches_the_general_solver_at_random_rows(seed):
    kw = _rows(seed, 1500)
    fast = diac.firing_angle(running=True, **kw)
    ref = _general(kw)
    assert np.array_equal(np.isfinite(fast), np.isfinite(ref))  # the same rows fire
    fin = np.isfinite(ref)
    assert fin.sum() > 1000 and (kw["phi"][fin] > 0).sum() > 800
    assert np.max(np.abs(fast[fin] - ref[fin]) / ref[fin]) < 1e-9


def test_shared_rows_give_the_same_angles_as_one_call():
    """Inside a shared block rows seen by an earlier call are taken from it: the answer
    must not depend on which call solved a row, nor on the order of the rows."""
    kw = _rows(4, 400)
    alone = diac.firing_angle(running=True, **kw)
    half = {k: v[:200] for k, v in kw.items()}
    rev = {k: v[::-1] for k, v in kw.items()}
    with memo.shared():
        first = diac.firing_angle(running=True, **half)
        again = diac.firing_angle(running=True, **rev)[::-1]
    assert np.allclose(first, alone[:200], rtol=1e-12, equal_nan=True)
    assert np.allclose(again, alone, rtol=1e-12, equal_nan=True)


def test_limit_r_matches_a_bisection_on_the_general_excess():
    kw = _rows(5, 60)
    del kw["r1"]
    fast = diac.limit_r(running=True, **kw)
    th = np.linspace(0.0, 1.0, 97)[1:-1]
    floor = np.where(kw["phi"] > 0, kw["phi"] + 1e-9, 0.0)[:, None]
    grid = floor + (np.pi - floor) * th

    def fires(r: np.ndarray) -> np.ndarray:
        with np.errstate(all="ignore"):
            g = diac.running_excess(**{k: v[:, None] for k, v in kw.items()}, r1=r[:, None],
                                    alpha=grid)
        return (g >= 0).any(axis=-1)

    lo, hi = np.zeros(60), np.full(60, np.log(1e9))
    for _ in range(44):
        mid = 0.5 * (lo + hi)
        f = fires(np.exp(mid))
        lo, hi = np.where(f, mid, lo), np.where(f, hi, mid)
    ref = np.where(fires(np.ones(60)), np.exp(0.5 * (lo + hi)), np.nan)
    assert np.array_equal(np.isfinite(fast), np.isfinite(ref))
    fin = np.isfinite(ref)
    assert fin.sum() > 40
    assert np.max(np.abs(fast[fin] / ref[fin] - 1)) < 1e-9


def test_extinction_angle_against_brentq_on_the_current():
    """β from the warm-started iteration against scipy's brentq on the load current itself
    (i ∝ sin(θ − φ) − sin(α − φ)·e^(−(θ − α)/tan φ), written here), over α below and
    above φ."""
    rng = np.random.default_rng(6)
    phi = rng.uniform(0.01, np.pi / 2 - 1e-6, 300)
    alpha = rng.uniform(0.0, np.pi - 0.02, 300)
    got = diac_single.extinction(alpha, phi)
    for a, p, b in zip(alpha, phi, got, strict=True):
        def cur(t: float, a: float = a, p: float = p) -> float:
            return math.sin(t - p) - math.sin(a - p) * math.exp(-(t - a) / math.tan(p))
        ref = brentq(cur, max(a, math.pi) + 1e-12, 2 * math.pi - a, xtol=1e-15)
        assert b == pytest.approx(ref, abs=1e-11)
    assert np.allclose(got, rl.extinction_angle(alpha=alpha, phi=phi), atol=1e-11)


def test_shared_pair_rows_keep_their_types_and_values():
    kw = {"vm": 325.0, "omega": 2 * np.pi * 50, "c1": 100e-9, "v_pos": 32.0, "v_neg": 30.0,
          "breakback": 6.0, "phi": 0.5}
    alone = diac.running_pair(r1=np.array([1e5, 2e5, 3e5]), **kw)
    with memo.shared():
        diac.running_pair(r1=np.array([1e5, 2e5]), **kw)
        again = diac.running_pair(r1=np.array([1e5, 2e5, 3e5]), **kw)  # two rows remembered
    assert again[2].dtype == bool and again[2].all()
    for x, y in zip(alone, again, strict=True):
        assert np.allclose(x, y, rtol=1e-12)
