"""Integral-cycle (burst) control on a triac stage, through the loader and the engine: whole
cycles at full conduction, the power steps, and the gate pulse against an R–L load's current
zero (the figures written out here from the closed forms of the R load and the switch-on
transient, which tests/checks/test_burst.py holds against solve_ivp)."""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from reviewer.engine import evaluate
from reviewer.errors import ProjectError
from reviewer.project import load_project_text

FAN = (Path(__file__).resolve().parents[1] / "data" / "fan-triac.toml").read_text("utf-8")


def heater(load: str = 'load = { r = "220 ohm ±10%", l = "1 H ±10%" }',
           burst: str = "burst = { period = 50, on = { min = 5, max = 50 } }",
           extra: str = "") -> str:
    text = FAN.replace('firing = { min = "65 deg", max = "150 deg" }\n',
                       f'control = "burst"\n{burst}\n{extra}')
    return text.replace('load = { r = "220 ohm ±10%", l = "1 H ±10%" }', load)


def result(text: str, check: str):
    p = load_project_text(text, "t.toml")
    return evaluate(p, only=[("power", check)], strict=True).results[0]


R_LOAD = 'load = { r = "220 ohm ±10%" }'


def test_output_in_whole_cycles_resistive():
    """R = 220 Ω ±10 %: full power (207 V)²/242 Ω = 177.1 W at low line; 5 of 50 at high
    line (253 V)²/198 Ω × 0.1 = 32.3 W; steps of 1/50 of full power; the power over the
    corners from 207²/242 × 0.1 = 17.7 W to 253²/198 = 323.3 W."""
    r = result(heater(load=R_LOAD, extra='required = { min = "40 W", max = "170 W" }\n'),
               "triac.output")
    assert r.status == "pass"
    assert r.values["load_power"].min == pytest.approx(207.0**2 / 242.0 * 0.1, rel=1e-6)
    assert r.values["load_power"].max == pytest.approx(253.0**2 / 198.0, rel=1e-6)
    assert r.values["power_step"].max == pytest.approx(253.0**2 / 198.0 / 50, rel=1e-6)
    assert "of every 50 cycles" in r.summary
    # 177.1 W full output at low line is short of 180 W; 32.3 W at 5 of 50 is above 30 W
    for req in ('{ min = "40 W", max = "180 W" }', '{ min = "30 W", max = "170 W" }'):
        r = result(heater(load=R_LOAD, extra=f"required = {req}\n"), "triac.output")
        assert r.status == "fail", req


def test_full_conduction_currents():
    """Every on-cycle is a whole sine: IT(RMS) = V/R, at most 253/198 = 1.278 A."""
    r = result(heater(load=R_LOAD), "triac.rms-current")
    assert r.values["it_rms"].max == pytest.approx(253.0 / 198.0, rel=1e-6)


def test_inductive_burst_needs_the_pulse():
    """220 Ω, 1 H ±10 % at 50 Hz: φ up to atan(345.6/198) = 60.2°; the first current zero
    after a voltage-zero start lags by β(0, φ) − π. The test's DC gate drive holds the gate
    while on: pass. An opto-triac (AC) drive without a pulse width: fail, naming the key;
    burst.pulse of a held gate (10 ms): pass; 2 ms: fail."""
    from checks import burst

    r = result(heater(), "triac.control")
    assert r.status == "pass" and "holds the gate" in r.summary
    phi = math.atan2(2 * math.pi * 50 * 1.1, 198.0)
    need = float(burst.first_zero_lag(phi=phi)) / (2 * math.pi * 50)
    assert r.values["required_width"].max == pytest.approx(need, rel=1e-9)
    opto = heater().replace('mode = "negative-dc"', 'mode = "ac"')
    r = result(opto, "triac.control")
    assert r.status == "fail" and "burst.pulse" in r.summary and "not known" in r.summary
    held = opto.replace("burst = { period = 50, on = { min = 5, max = 50 } }",
                        'burst = { period = 50, on = { min = 5, max = 50 }, pulse = "10 ms" }')
    assert result(held, "triac.control").status == "pass"
    short = held.replace('pulse = "10 ms"', 'pulse = "2 ms"')
    r = result(short, "triac.control")
    assert r.status == "fail" and "DC flows in the load" in r.summary


def test_diac_gate_refused_for_burst():
    fan = (Path(__file__).resolve().parents[2] / "projects" / "fan-230-bare.toml").read_text(
        "utf-8")
    assert 'kind = "diac-rc"' in fan
    text = fan.replace('kind = "triac-phase-control"\n',
                       'kind = "triac-phase-control"\ncontrol = "burst"\n'
                       "burst = { period = 50, on = { min = 5, max = 50 } }\n")
    assert text != fan
    with pytest.raises(ProjectError, match="diac–RC network"):
        load_project_text(text, "t.toml")


def test_phase_control_unchanged_without_burst():
    p = load_project_text(FAN, "t.toml")
    r = evaluate(p, only=[("power", "triac.control")], strict=True).results[0]
    assert "earliest firing" in r.summary


@pytest.mark.parametrize("burst,extra,match", [
    ("", "", "needs burst = "),
    ("burst = { period = 50, on = { min = 5, max = 60 } }", "", "whole cycles"),
])
def test_bad_burst_tables(burst, extra, match):
    with pytest.raises(ProjectError, match=match):
        load_project_text(heater(burst=burst, extra=extra), "t.toml")


def test_burst_table_without_control():
    text = FAN.replace('firing = { min = "65 deg", max = "150 deg" }\n',
                       'firing = { min = "65 deg", max = "150 deg" }\n'
                       "burst = { period = 50, on = { min = 5, max = 50 } }\n")
    with pytest.raises(ProjectError, match='needs control = "burst"'):
        load_project_text(text, "t.toml")
