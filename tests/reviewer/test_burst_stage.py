"""Integral-cycle (burst) control as a phase-control option, through the engine: the power
range and its steps, full-conduction device stress, no line harmonics, the flicker caution."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from reviewer.engine import evaluate
from reviewer.errors import ProjectError
from reviewer.project import load_project_text

KILN = (Path(__file__).resolve().parents[2] / "projects" / "kiln-230.toml").read_text("utf-8")


def burst_kiln(on: str = "{ min = 2, max = 45 }", period: str = "50",
               required: str = 'required = { min = "100 W", max = "1.4 kW" }') -> str:
    text = KILN.replace('required = { min = "100 W", max = "1.4 kW" }',
                        f'control = "burst"\nburst = {{ period = {period}, on = {on} }}\n'
                        + required)
    return text


def result(text: str, check: str):
    p = load_project_text(text, "k.toml")
    return evaluate(p, only=[("power", check)], strict=True).results[0]


def test_power_range_and_resolution():
    """26.5 Ω ±5 % on 230 V ±10 %: full power at low line 207²/27.8 = 1541 W × 45/50 =
    1387 W — short of 1.4 kW; 46 of 50 gives 1418 W, and 1 of 50 at high line
    253²/25.2/50 = 50.8 W is below 100 W (2 of 50, 101.6 W, is not): that passes; the step
    is P_full/50."""
    r = result(burst_kiln(), "power.output")
    assert r.status == "fail" and "integral-cycle" in r.summary
    assert result(burst_kiln(on="{ min = 2, max = 46 }"), "power.output").status == "fail"
    r = result(burst_kiln(on="{ min = 1, max = 46 }"), "power.output")
    assert r.status == "pass", r.summary
    assert r.values["power_step"].min == pytest.approx(207.0**2 / (26.5 * 1.05) / 50, rel=1e-6)
    assert "flicker" in r.summary


def test_devices_see_full_conduction():
    """Every on-cycle is a whole cycle: IT(RMS) is that of α = 0, whatever N."""
    r = result(burst_kiln(), "power.rms-current")
    assert r.values["it_rms"].max == pytest.approx(253.0 / (26.5 * 0.95) / 2**0.5, rel=1e-6)
    assert any("integral-cycle" in n for n in r.notes)


def test_no_line_harmonics_but_subharmonics():
    r = result(burst_kiln(), "power.harmonics")
    assert r.status == "pass" and "flicker" in r.summary and "estimate" in r.summary
    assert r.values["i_h3"].max < 1e-9 and r.values["interharmonic_current"].max > 0.1


@pytest.mark.parametrize("on,period,match", [
    ("{ min = 2, max = 60 }", "50", "whole cycles within 0"),
    ("{ min = 2.5, max = 45 }", "50", "whole cycles within 0"),
    ("{ min = 2, max = 45 }", "0", "whole number")])
def test_bad_burst_tables(on, period, match):
    with pytest.raises(ProjectError, match=match):
        load_project_text(burst_kiln(on=on, period=period), "k.toml")


def latch(text: str):
    p = load_project_text(text, "k.toml")
    return evaluate(p, only=[("gate", "gate.latch-time")], strict=True).results[0]


def test_latch_time_at_the_voltage_zero_resistive_closed_form():
    """Fired at the voltage zero the anode current Vm·sin(ωt)/R rises from zero: it reaches
    IL at t = asin(IL·R/Vm)/ω ≈ IL·R/(Vm·ω), plus tgt (closed form, every corner). The
    demo's UJT pulse (a few µs) is far too short for that at low line."""
    r = latch(burst_kiln())
    ev = r.evaluation
    x = ev.inputs
    vm, rl, w = np.sqrt(2) * x["v_s"], x["r_load"], 2 * np.pi * x["f"]
    il = ev.outcome.values["il_cold"]
    t = np.arcsin(il * rl / vm) / w + x["tgt"]
    assert np.allclose(ev.outcome.values["required_width"], t, rtol=1e-9)
    assert np.all(np.abs(t - (il * rl / (vm * w) + x["tgt"])) < 1e-3 * t)  # ≈ IL·R/(Vm·ω)
    assert r.status == "fail" and "integral-cycle" in " ".join(r.notes)
    assert "stages.power.control#burst" in r.snapshot["inputs"]


def test_latch_time_at_the_voltage_zero_inductive_against_solve_ivp():
    """R–L: L·di/dt = Vm·sin ωt − R·i from zero at t = 0 (solve_ivp) until i = IL."""
    text = burst_kiln().replace('load = { r = "26.5 ohm ±5%"',
                                'load = { r = "26.5 ohm ±5%", l = "60 mH"')
    r = latch(text)
    ev = r.evaluation
    x = ev.inputs
    il = ev.outcome.values["il_cold"]
    for row in (0, ev.worst_row):
        vm, rl, ll = np.sqrt(2) * x["v_s"][row], x["r_load"][row], x["l_load"][row]
        w = 2 * np.pi * x["f"][row]

        def hit(t, y, target=il[row]):
            return y[0] - target
        hit.terminal = True
        def rhs(t, y, vm=vm, w=w, rl=rl, ll=ll):
            return [(vm * np.sin(w * t) - rl * y[0]) / ll]
        sol = solve_ivp(rhs, (0.0, 0.5 / 50), [0.0], events=[hit], rtol=1e-10, atol=1e-12,
                        max_step=1e-6)
        t_ivp = sol.t_events[0][0] + x["tgt"][row]
        assert ev.outcome.values["required_width"][row] == pytest.approx(t_ivp, rel=5e-3)
    # the inductance slows the rise: more than the resistive time
    assert r.values["required_width"].max > latch(burst_kiln()).values["required_width"].max


def rl_burst_kiln(l: str = "200 mH") -> str:
    return burst_kiln().replace('load = { r = "26.5 ohm ±5%"',
                                f'load = {{ r = "26.5 ohm ±5%", l = "{l}"')


def test_inductive_burst_short_pulse_fails_with_the_fix():
    """The kiln's gate pulse (µs) against an R–L load's first current zero (ms): missed."""
    from checks import burst

    r = result(rl_burst_kiln(), "power.control")
    assert r.status == "fail"
    assert "gate pulse ≥" in r.summary and "pulse train" in r.summary
    assert "current zero" in r.summary
    ev = r.evaluation
    x = ev.inputs
    row = ev.worst_row
    w = 2 * np.pi * x["freq"][row]
    phi = np.arctan2(w * x["l"][row], x["r"][row])
    assert ev.outcome.values["required_width"][row] == pytest.approx(
        float(burst.first_zero_lag(phi=phi)) / w, rel=1e-9)


def test_inductive_burst_wide_pulse_passes_and_unknown_fails(monkeypatch):
    import reviewer.stages.power as pw

    monkeypatch.setattr(pw, "gate_pulse", lambda ctx, stage: 6e-3)  # a 6 ms pulse
    assert result(rl_burst_kiln(), "power.control").status == "pass"
    monkeypatch.setattr(pw, "gate_pulse", lambda ctx, stage: 3e-3)  # 3 ms < 4.3 ms needed
    assert result(rl_burst_kiln(), "power.control").status == "fail"
    monkeypatch.setattr(pw, "gate_pulse", lambda ctx, stage: None)
    r = result(rl_burst_kiln(), "power.control")
    assert r.status == "fail" and "not known" in r.summary


def test_resistive_burst_has_no_control_question():
    assert result(burst_kiln(), "power.control").status == "not-applicable"


def test_burst_pulse_key_sets_the_pulse():
    """`burst.pulse` (a gate held through the half-cycle: 10 ms at 50 Hz) passes; a 2 ms
    pulse against the ≈4.3 ms first current zero fails and says the width to type."""
    held = rl_burst_kiln().replace("burst = { period = 50,",
                                   'burst = { pulse = "10 ms", period = 50,')
    r = result(held, "power.control")
    assert r.status == "pass" and "(burst.pulse)" in r.summary
    assert "stages.power.burst.pulse" in r.snapshot["inputs"]
    short = held.replace('pulse = "10 ms"', 'pulse = "2 ms"')
    r = result(short, "power.control")
    assert r.status == "fail" and 'burst.pulse = "4.' in r.summary
