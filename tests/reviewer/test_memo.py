"""Shared solutions: identical inputs are solved once inside a block, and results never change."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from checks import memo, oscillator
from reviewer.engine import run_project
from reviewer.tolerance import monte_carlo, monte_carlo_all

ROOT = Path(__file__).resolve().parents[2]
KW = dict(device="ujt", vm=230 * 2 ** 0.5, omega=2 * np.pi * 50, vz=20.0, ct=0.1e-6,
          eta=0.63, rbb=7e3, r1=0.0, r2=0.0, vd=0.5)


def _counting(monkeypatch):
    """Count real solves (the crossing search runs once per solve)."""
    calls = []
    inner = oscillator._first_crossing

    def spy(*a, **kw):
        calls.append(1)
        return inner(*a, **kw)

    monkeypatch.setattr(oscillator, "_first_crossing", spy)
    return calls


def test_same_values_are_solved_once_and_each_caller_gets_its_own_copy():
    rt = np.array([10e3, 22e3, 47e3])
    with memo.shared():
        a = oscillator.line_sync_firing_angle(rt=rt, **KW)
        b = oscillator.line_sync_firing_angle(rt=rt.copy(), **KW)
        a[:] = 0.0  # a caller scribbling on its result must not reach the next caller
        c = oscillator.line_sync_firing_angle(rt=rt.copy(), **KW)
    assert b.tolist() == c.tolist()
    # Rashid-style line-sync values (the function's own doctest): 20.95°, 43.92°, 91.8°
    assert np.degrees(c).round(2).tolist() == [20.95, 43.92, 91.8]


def test_a_changed_input_is_a_new_solution():
    rt = np.linspace(10e3, 47e3, 64)
    with memo.shared():
        a = oscillator.line_sync_firing_angle(rt=rt, **KW)
        rt2 = rt.copy()
        rt2[37] *= 1.01  # not one of the fingerprint's sampled elements
        b = oscillator.line_sync_firing_angle(rt=rt2, **KW)
    assert a[37] != b[37]
    assert b[37] == oscillator.line_sync_firing_angle(rt=rt2, **KW)[37]


def test_outside_a_block_nothing_is_kept():
    rt = np.array([22e3])
    oscillator.line_sync_firing_angle(rt=rt, **KW)
    assert memo._STORE.get() is None


def test_monte_carlo_all_gives_the_per_check_yields(tmp_path):
    run = run_project(ROOT / "projects" / "kiln-230.toml")
    together = monte_carlo_all(run.results, 5000, seed=4, chunk=1500)
    for r in run.results:
        alone = monte_carlo(r, 5000, seed=4, chunk=1500)
        if alone is None:
            assert (r.stage, r.check) not in together
            continue
        y = together[(r.stage, r.check)]
        assert (y.fail_fraction, y.marginal_fraction) == (alone.fail_fraction,
                                                          alone.marginal_fraction), r.check
        assert y.sampled_inputs == alone.sampled_inputs


def test_the_engine_shares_the_firing_angle_between_checks(monkeypatch):
    calls = _counting(monkeypatch)
    run = run_project(ROOT / "projects" / "kiln-230.toml")
    solved = len(calls)
    calls.clear()
    with monkeypatch.context() as m:
        m.setattr(memo, "shared", _no_sharing)
        again = run_project(ROOT / "projects" / "kiln-230.toml")
    assert 0 < solved < len(calls)
    assert [r.as_dict() for r in run.results] == [r.as_dict() for r in again.results]


class _no_sharing:
    def __enter__(self):
        return None

    def __exit__(self, *exc):
        return False
