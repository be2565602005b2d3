"""Firing angles from a line-synchronised oscillator: a check solves only the ends it reads,
and what it reads is the same angle as before (the per-row α and the range's ends)."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from checks import oscillator
from reviewer.engine import evaluate, run_project
from reviewer.project import load_project
from reviewer.registry import CHECKS
from reviewer.stages import power as pw

ROOT = Path(__file__).resolve().parents[2]
KILN = ROOT / "projects" / "kiln-230.toml"


def _kw(check: str) -> dict:
    """The keyword arguments the engine hands ``check`` of kiln-230's power stage."""
    run = run_project(KILN)
    r = next(x for x in run.results if x.stage == "power" and x.check == check)
    ev = r.evaluation
    assert ev is not None and "osc_device" in ev.bound.options
    return {**ev.inputs, **ev.bound.options}


def test_angles_on_demand_equal_the_three_angles_bit_for_bit():
    kw = _kw("power.output")
    a, lo, hi = pw._firing(dict(kw))
    angle = pw._angles(dict(kw))
    for end, want in (("hi", hi), ("alpha", a), ("lo", lo)):  # any order
        assert np.array_equal(angle(end), want, equal_nan=True), end
    assert np.any(lo != hi)  # the ends differ: the test can tell them apart


def test_angles_pop_the_firing_inputs_as_before():
    kw = _kw("power.output")
    one, other = dict(kw), dict(kw)
    pw._firing(one)
    pw._angles(other)
    assert one.keys() == other.keys()
    assert not any(k.startswith("osc_") for k in other)


def test_a_check_that_reads_only_alpha_solves_only_alpha(monkeypatch):
    rts = []
    inner = oscillator.line_sync_firing_angle

    def spy(**kw):
        rts.append(np.asarray(kw["rt"], dtype=float).copy())
        return inner(**kw)

    monkeypatch.setattr(oscillator, "line_sync_firing_angle", spy)
    kw = _kw("power.harmonics")
    rows = len(kw["osc_rt"])
    project = load_project(KILN)
    run = evaluate(project, only=[("power", "power.harmonics")])
    assert [r.check for r in run.results] == ["power.harmonics"]
    assert run.results[0].status in ("pass", "marginal", "fail")
    # The harmonics solve α per row; the range's ends (constant columns of the corner
    # table, which the check never reads) are not solved for it.
    per_row = [rt for rt in rts if rt.size == rows]
    assert per_row and all(np.array_equal(rt, kw["osc_rt"]) for rt in per_row)
    assert not any(rt.size == rows and np.array_equal(rt, kw["osc_rt_lo"]) for rt in rts)
    assert CHECKS["power.harmonics"].fn is not None
