"""``power.harmonics`` through the engine on the demo projects: an estimate that warns (or,
when a checklist asks, fails), switched off by a checklist, not applied to a transformer
winding."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from checks import harmonics, power
from reviewer.checklist import standard
from reviewer.engine import evaluate
from reviewer.project import load_project, load_project_text

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


INDUCTIVE = """
[project]
name = "interior R"
revision = "A"

[conditions]
ambient = { min = "0 degC", max = "40 degC" }

[supply]
kind = "ac"
voltage = "230 V"
frequency = "50 Hz"

[parts.Q1]
type = "scr"
vdrm = "800 V"
vrrm = "800 V"
igt = "10 mA"
vgt = "1.5 V"

[stages.power]
kind = "phase-control"
scr = "Q1"
topology = "ac-switch"
firing = "90 deg"
load = { r = { min = "3.333 ohm", max = "40 ohm" }, l = "33.33 mH" }
"""


def scan_limit_ratio(r: np.ndarray) -> np.ndarray:
    """The least Class A ratio at each R of a dense scan (the closed-form spectrum, which
    tests/checks/test_harmonics.py holds to an FFT of the integrated current)."""
    w = 2 * np.pi * 50
    v = power.stage_values(topology="ac-switch", freewheel=False, vs=230.0, r=r, l=33.33e-3,
                           omega=w, alpha=np.pi / 2, peak=False)
    v["z"] = np.hypot(r, w * 33.33e-3)
    return harmonics.harmonics_check(waveform=v, topology="ac-switch", freewheel=False,
                                     limits={}).values["limit_ratio"]


def test_an_interior_load_r_worse_than_both_ends_is_found():
    """Fired at 90° into 33.3 mH, the harmonics are worst near R = 10.2 Ω, inside the range
    3.33–40 Ω: a dense scan (4001 R values) has its least ratio there, 0.91, below both
    ends' (1.19 and 1.51). Taking R at its ends read a pass; the check must read the
    interior's marginal, and no scanned R may read worse than the result."""
    r = np.linspace(3.333, 40.0, 4001)
    scan = scan_limit_ratio(r)
    k = int(np.nanargmin(scan))
    assert 0 < k < r.size - 1 and scan[k] < 1.0 < min(scan[0], scan[-1])
    res = evaluate(load_project_text(INDUCTIVE, "h.toml"), only=[("power", "power.harmonics")],
                   strict=True).results[0]
    assert res.status == "marginal"
    reported = res.values["limit_ratio"].min
    assert reported <= float(np.nanmin(scan)) * (1 + 1e-9)
    assert reported == pytest.approx(float(np.nanmin(scan)), rel=1e-4)
    assert res.values["worst_load_r"].min <= r[k] + 0.01 and "worst load R" in res.summary
