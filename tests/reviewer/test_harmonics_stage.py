"""``power.harmonics`` through the engine on the demo projects: an estimate that warns (or,
when a checklist asks, fails), switched off by a checklist, not applied to a transformer
winding."""

from __future__ import annotations

from pathlib import Path

from reviewer.checklist import standard
from reviewer.engine import evaluate
from reviewer.project import load_project

PROJECTS = Path(__file__).resolve().parents[2] / "projects"


def result(name: str, checklist=None):
    project = load_project(PROJECTS / name)
    stage = next(s.id for s in project.stages.values() if s.kind == "phase-control")
    res = evaluate(project, checklist, only=[(stage, "power.harmonics")], strict=True).results
    assert len(res) == 1
    return res[0]


def test_phase_controlled_heater_is_over_the_class_a_table_and_says_it_is_an_estimate():
    r = result("kiln-230.toml")
    assert r.status == "marginal"  # advisory by default: an estimate, not a compliance test
    assert "exceeds the Class A limit" in r.summary and "never a compliance test" in r.summary
    assert r.values["power_factor"].min < 0.5 < r.values["power_factor"].max
    assert r.values["i_h3"].max > 2.30


def test_a_checklist_can_make_it_fail_or_switch_it_off():
    cl = standard()
    cl.limits["power.harmonics"] = {"advisory": 0.0}
    assert result("kiln-230.toml", cl).status == "fail"
    cl = standard()
    cl.disabled["power.harmonics"] = "the product is professional equipment above 1 kW"
    r = result("kiln-230.toml", cl)
    assert r.status == "not-applicable" and "switched off" in r.summary


def test_not_applied_to_a_transformer_winding():
    r = result("charger-12v.toml")
    assert r.status == "not-applicable" and "turns ratio" in r.summary


def test_motor_drive_orientation():
    r = result("motor-dc.toml")
    assert r.status in ("pass", "marginal")
    assert 0 < r.values["displacement_factor"].min <= r.values["displacement_factor"].max <= 1
