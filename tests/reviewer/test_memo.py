"""Shared solutions: identical inputs are solved once inside a block, and results never change."""

from __future__ import annotations

import json
import re
from pathlib import Path

import numpy as np
import pytest

from checks import memo, oscillator, power
from reviewer import cli
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


WAVE = dict(topology="ac-switch", freewheel=False, vs=230.0, r=np.array([20.0, 30.0]),
            l=np.array([0.02, 0.05]), omega=2 * np.pi * 50, alpha=np.radians(70.0))


def test_a_waveform_dict_is_shared_and_every_caller_gets_its_own_arrays(monkeypatch):
    calls = []
    inner = power.waveform_pu
    monkeypatch.setattr(power, "waveform_pu", lambda **kw: calls.append(1) or inner(**kw))
    alone = power.stage_values(**WAVE)
    with memo.shared():
        a = power.stage_values(**WAVE)
        a["irms"][:] = -1.0  # scribbling on one result must not reach the next caller
        a["extra"] = 0.0
        b = power.stage_values(**WAVE | {"r": WAVE["r"].copy()})
    assert len(calls) == 2  # once outside the block, once inside for both callers
    assert "extra" not in b and set(b) == set(alone)
    for k in alone:
        assert np.array_equal(b[k], alone[k]), k
    # Rashid 4e Ex 11.1 (from memory): 120 V, 10 Ω, α = 90° gives 84.85 V RMS on the load
    ex = power.stage_values(topology="ac-switch", freewheel=False, vs=120.0, r=10.0, l=0.0,
                            omega=2 * np.pi * 60, alpha=np.pi / 2)
    assert round(float(ex["vrms"]), 2) == 84.85


def test_a_block_keeps_at_most_its_byte_budget_oldest_first(monkeypatch):
    calls = _counting(monkeypatch)
    rts = [np.linspace(10e3, 47e3, 50) * (1 + i / 100) for i in range(6)]
    with memo.shared():
        first = [oscillator.line_sync_firing_angle(rt=rt, **KW) for rt in rts]
        store = memo._STORE.get()
        one = store.nbytes / len(rts)  # the same size for every entry here
        monkeypatch.setattr(memo, "MAX_BYTES", int(2.5 * one))
        calls.clear()
        again = oscillator.line_sync_firing_angle(rt=rts[0].copy(), **KW)  # a lookup: kept
        assert len(calls) == 0 and len(store.order) == 6
        oscillator.line_sync_firing_angle(rt=rts[1] * 1.5, **KW)  # a new one: evicts
        assert store.nbytes <= memo.MAX_BYTES and len(store.order) == 2
        calls.clear()
        late = oscillator.line_sync_firing_angle(rt=rts[5].copy(), **KW)  # still kept
        assert len(calls) == 0
        early = oscillator.line_sync_firing_angle(rt=rts[2].copy(), **KW)  # evicted: solved
        assert len(calls) == 1
    assert again.tolist() == first[0].tolist() and late.tolist() == first[5].tolist()
    assert early.tolist() == first[2].tolist()


def test_absent_is_not_nan_and_a_choice_is_not_a_number():
    """``e=None`` (no back EMF) and ``e=NaN`` must not share one entry, nor True and 1.0."""
    assert memo._fingerprint("f", memo._canon({"e": None})) != \
        memo._fingerprint("f", memo._canon({"e": float("nan")}))
    assert not memo._same(memo._canon({"e": None}), memo._canon({"e": float("nan")}))
    assert not memo._same(memo._canon({"peak": True}), memo._canon({"peak": 1.0}))
    assert memo._same(memo._canon({"peak": True, "e": None}),
                      memo._canon({"peak": True, "e": None}))


LINE = sorted(str(p.relative_to(ROOT)) for p in (ROOT / "projects" / "kiln-line").glob("*.toml")
              if not p.name.endswith((".review.toml", ".checklist.toml")))
DEMOS = [(str(p.relative_to(ROOT)),) for p in sorted((ROOT / "projects").glob("*.toml"))] + [
    tuple(LINE)]


def _check(capsys, *args: str) -> str:
    capsys.readouterr()
    cli.main(["check", *args])
    # the run's own duration is the one line that may differ
    return re.sub(r"\(\d+ project\(s\) in [0-9.]+ s\)", "", capsys.readouterr().out)


def _close(a, b, path=""):
    if isinstance(a, dict):
        assert a.keys() == b.keys(), path
        for k in a:
            _close(a[k], b[k], f"{path}/{k}")
    elif isinstance(a, list):
        assert len(a) == len(b), path
        for i, (x, y) in enumerate(zip(a, b, strict=True)):
            _close(x, y, f"{path}[{i}]")
    elif isinstance(a, float) and isinstance(b, float):
        assert a == pytest.approx(b, rel=1e-12, abs=1e-12), path
    else:
        assert a == b, path


@pytest.mark.parametrize("demo", DEMOS, ids=lambda d: d[0] if len(d) == 1 else "kiln-line")
def test_sharing_changes_no_result_of_any_demo(demo, capsys, monkeypatch):
    """Every demo's `latchbook check` text is byte for byte, and its JSON to 1e-12, the same
    with the shared solutions as with every solution worked where it is asked for (the
    product line's projects in one command, as its README runs them)."""
    monkeypatch.chdir(ROOT)
    monkeypatch.setenv("COLUMNS", "100")
    text, doc = _check(capsys, *demo), json.loads(_check(capsys, *demo, "--json"))
    with monkeypatch.context() as m:
        m.setattr(memo, "shared", _no_sharing)
        text_alone = _check(capsys, *demo)
        doc_alone = json.loads(_check(capsys, *demo, "--json"))
    assert len(doc["projects"]) == len(demo) and not any(p.get("error") for p in doc["projects"])
    assert text.count("\n") > 5  # something was checked
    assert text == text_alone
    _close(doc, doc_alone)
