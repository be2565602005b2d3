"""Monte Carlo yield, sensitivity ranking and design aids against closed-form answers."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from checks.core import FAIL, PASS, Outcome
from reviewer.aids import passing_range, suggest_text
from reviewer.engine import evaluate, evaluate_check
from reviewer.model import Project, Stage, Value
from reviewer.project import load_project, load_project_text
from reviewer.registry import CHECKS, STAGE_KINDS, Bound, CheckDef, Param, StageKind
from reviewer.tolerance import monte_carlo, sensitivity, wilson

PROJECTS = Path(__file__).resolve().parents[2] / "projects"


def _threshold(*, r, a, b, limits):
    """Test check: fails when r < 1 kΩ; margin also moves with a (strongly) and b (weakly)."""
    r = np.asarray(r, dtype=float)
    margin = r / 1000.0 - 1.0 + 10.0 * (np.asarray(a) - 1.0) + 0.1 * (np.asarray(b) - 1.0)
    status = np.where(r < 1000.0, FAIL, PASS).astype(np.int8)
    return Outcome({"r": r}, margin, status)


@pytest.fixture
def threshold_check():
    kind = StageKind("test-threshold", {"r": Param("value", "resistance")})
    STAGE_KINDS[kind.name] = kind

    def bind(ctx):
        b = Bound()
        ctx.need(b, "r", "stages.s.r")
        ctx.need(b, "a", "stages.s.a")
        ctx.need(b, "b", "stages.s.b")
        return b

    defn = CheckDef("test.threshold", (kind.name,), "q", "m", "s", _threshold, bind,
                    {"r": "ohm"}, lambda red: red.status)
    CHECKS[defn.id] = defn
    yield defn
    del CHECKS[defn.id]
    del STAGE_KINDS[kind.name]


def _project(r: Value) -> Project:
    a = Value(1.0, 0.9, 1.1, "dimensionless")
    b = Value(1.0, 0.9, 1.1, "dimensionless")
    st = Stage("s", "test-threshold", {"r": r, "a": a, "b": b})
    amb = Value(298.15, 298.15, 298.15, "temperature")
    return Project("t.toml", "t", "1", "", "standard", {"ambient": amb},
                   {"kind": "dc", "voltage": Value.fixed(24, "voltage")}, {}, {"s": st})


def _result(defn, r: Value):
    p = _project(r)
    from reviewer.checklist import standard

    return evaluate_check(defn, p, p.stages["s"], standard(), strict=True)


def test_uniform_failing_fraction_matches_closed_form(threshold_check):
    """r uniform on 950–1150 Ω fails below 1 kΩ with probability 50/200 = 0.25 (exact)."""
    res = _result(threshold_check, Value(1050.0, 950.0, 1150.0, "resistance", "ohm"))
    y = monte_carlo(res, 200_000, seed=7, distribution="uniform")
    assert y.fail_fraction == pytest.approx(0.25, abs=0.005)
    lo, hi = y.fail_interval
    assert lo < 0.25 < hi


def test_normal_failing_fraction_matches_closed_form(threshold_check):
    """Tolerance as 3σ: P(r < 1000) = Φ((1000 − 1050)/(100/3)) = Φ(−1.5) = 0.0668."""
    res = _result(threshold_check, Value(1050.0, 950.0, 1150.0, "resistance", "ohm"))
    y = monte_carlo(res, 400_000, seed=3, distribution="normal")
    expected = 0.5 * math.erfc(1.5 / math.sqrt(2))   # standard normal CDF at −1.5
    assert y.fail_fraction == pytest.approx(expected, abs=0.002)


def test_seed_reproduces_and_chunking_does_not_matter(threshold_check):
    """The same seed gives the same counts whatever the chunk size; another seed differs."""
    res = _result(threshold_check, Value(1050.0, 950.0, 1150.0, "resistance", "ohm"))
    a = monte_carlo(res, 50_000, seed=11, distribution="uniform")
    b = monte_carlo(res, 50_000, seed=11, distribution="uniform", chunk=7_000)
    c = monte_carlo(res, 50_000, seed=12, distribution="uniform")
    assert a.fail_fraction == b.fail_fraction
    assert a.fail_fraction != c.fail_fraction


def test_wilson_interval_reference_values():
    """Wilson 95 % interval for 10/100: 0.0552–0.1744 (Agresti & Coull, Am. Stat. 1998, the
    score interval; recomputed)."""
    lo, hi = wilson(10, 100)
    assert lo == pytest.approx(0.05523, abs=1e-4) and hi == pytest.approx(0.17437, abs=1e-4)


def test_sensitivity_ranks_the_dominant_input_first(threshold_check):
    """Margin = … + 10·(a − 1) + 0.1·(b − 1): a dominates b, r in between."""
    res = _result(threshold_check, Value(1050.0, 950.0, 1150.0, "resistance", "ohm"))
    ranked = sensitivity(res)
    assert [i.path for i in ranked] == ["stages.s.a", "stages.s.r", "stages.s.b"]
    # Main effects of a two-level factorial: 10 × 0.2, 0.2, 0.1 × 0.2.
    assert ranked[0].effect == pytest.approx(2.0)
    assert ranked[1].effect == pytest.approx(0.2)
    assert sum(i.share for i in ranked) == pytest.approx(1.0)


def test_passing_range_is_solved_exactly(threshold_check):
    """r = 900 Ω ±5 % fails; it passes once its low end reaches 1 kΩ: nominal ≥ 1000/0.95."""
    res = _result(threshold_check, Value(900.0, 855.0, 945.0, "resistance", "ohm", "900 ohm ±5%"))
    assert res.status == "fail"
    aid = passing_range(res, "r")
    assert aid.low == pytest.approx(1000 / 0.95, rel=1e-6)
    assert aid.high is None
    assert aid.series == 24 and aid.preferred[0] == pytest.approx(1100.0)


def test_suggested_value_passes_when_applied(tmp_path):
    """On a demo with too large a timing R, the suggested E-series value passes when tried."""
    text = (PROJECTS / "flasher-dc.toml").read_text(encoding="utf-8")
    bad = text.replace('timing_r = "1 Mohm ±5%"', 'timing_r = "4.7 Mohm ±5%"')
    path = tmp_path / "f.toml"
    path.write_text(bad, encoding="utf-8")
    run = evaluate(load_project(path), only=[("blink", "osc.window")])
    res = run.results[0]
    assert res.status == "fail"
    aid = passing_range(res, "rt")
    assert aid is not None and aid.preferred
    value = load_project(path).stages["blink"].params["timing_r"]
    new_text = suggest_text(value, aid.preferred[0])
    fixed = bad.replace('"4.7 Mohm ±5%"', f'"{new_text}"')
    again = evaluate(load_project_text(fixed, path), only=[("blink", "osc.window")])
    assert again.results[0].status == "pass"
