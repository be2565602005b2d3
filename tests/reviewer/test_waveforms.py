"""The waveform adapter (reviewer/waveforms.py) feeds the checks layer the right design point:
power-stage load waveforms at both firing-range ends and the line's turn-off interval."""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from reviewer.engine import evaluate
from reviewer.project import load_project
from reviewer.waveforms import picture

ROOT = Path(__file__).resolve().parents[2]


def _variant(demo_copy: Path, name: str, swaps: list[tuple[str, str]]) -> Path:
    text = (demo_copy / "kiln-230.toml").read_text()
    for old, new in swaps:
        assert old in text, old
        text = text.replace(old, new, 1)
    path = demo_copy / name
    path.write_text(text)
    return path


@pytest.fixture
def rashid_rl(demo_copy: Path) -> Path:
    """The kiln's power stage on the inputs of Rashid 4e Ex 11.2: 120 V, 60 Hz, R = 2.5 Ω,
    L = 6.5 mH, ac-switch fired at 90° [book: Rashid 4e Ex 11.2]."""
    return _variant(demo_copy, "rashid-11-2.toml", [
        ('voltage = "230 V +10% -10%"', 'voltage = "120 V"'),
        ('frequency = "50 Hz"', 'frequency = "60 Hz"'),
        ('load = { r = "26.5 ohm ±5%", cold_r = "24 ohm" }',
         'load = { r = "2.5 ohm", l = "6.5 mH" }'),
        ('topology = "ac-switch"\ngate = "gate"\n',
         'topology = "ac-switch"\nfiring = "90 deg"\n')])


def _pic(path: Path, stage: str, check: str):
    project = load_project(path)
    result = evaluate(project).by_key()[(stage, check)]
    return result, picture(result, project)


def test_the_adapter_imports_no_textual():
    """reviewer.waveforms is pure data preparation: importing it loads no Textual."""
    code = "import sys, reviewer.waveforms; print('textual' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=ROOT, check=True)
    assert out.stdout.strip() == "False"


def test_power_check_draws_both_firing_range_ends(demo_copy):
    """With firing 30°–150° the load voltage is the line after each end's firing and zero
    before it, one curve per end (α_min solid, α_max dotted)."""
    path = _variant(demo_copy, "kiln-firing.toml", [
        ('topology = "ac-switch"\ngate = "gate"\n',
         'topology = "ac-switch"\nfiring = { min = "30 deg", max = "150 deg" }\n')])
    result, pic = _pic(path, "power", "power.junction")
    assert pic.plots, pic.reason
    volts = pic.plots[0]
    assert [s.dotted for s in volts.series] == [False, True]
    omega = 2 * math.pi * 50
    marks = dict((label, t) for t, label in volts.marks)
    assert marks["α_min"] * omega == pytest.approx(math.radians(30))
    assert marks["α_max"] * omega == pytest.approx(math.radians(150))
    ev = result.evaluation
    vm = math.sqrt(2) * float(ev.inputs["vs"][ev.worst_row])
    theta = volts.t * omega
    for series, alpha in zip(volts.series, (30, 150), strict=True):
        a = math.radians(alpha)
        on = (theta > a + 0.02) & (theta < math.pi - 0.02)
        off = (theta > 0.02) & (theta < a - 0.02)
        assert series.y[on] == pytest.approx(vm * np.sin(theta[on]), rel=1e-9)
        assert np.all(series.y[off] == 0)


def test_power_waveform_of_an_rl_ac_switch_matches_the_worked_example(rashid_rl):
    """The drawn load current's RMS, integrated over the samples, is 21.31 A."""
    _, pic = _pic(rashid_rl, "power", "power.output")
    amps = pic.plots[1]
    i = amps.series[0].y
    rms = math.sqrt(np.trapezoid(i ** 2, amps.t) / amps.t[-1])
    assert rms == pytest.approx(21.31, rel=1e-3)  # [recomputed] from Rashid 4e Ex 11.2 inputs


def test_line_commutation_marks_the_turn_off_interval(rashid_rl):
    """The SCR's current zero is at β = 220.41° and t_c = π/ω = 8.333 ms follows it; the drawn
    current changes sign at that mark (read from the samples, independently of the mark)."""
    _, pic = _pic(rashid_rl, "commutation", "turnoff.time")
    assert pic.plots, pic.reason
    omega = 2 * math.pi * 60
    marks = {label: t for t, label in pic.plots[1].marks}
    beta = math.degrees(marks["current zero"] * omega)
    t_c = marks["forward voltage"] - marks["current zero"]
    assert beta == pytest.approx(220.41, abs=0.01)  # [recomputed] from Rashid 4e Ex 11.2 inputs
    assert t_c == pytest.approx(8.333e-3, rel=1e-3)  # [recomputed] π/ω at 60 Hz
    t, i = pic.plots[1].t, pic.plots[1].series[0].y
    crossing = t[np.flatnonzero((i[:-1] > 0) & (i[1:] <= 0))[0] + 1]
    assert crossing == pytest.approx(marks["current zero"], abs=2 * (t[1] - t[0]))
    assert "turn-off interval t_c = 8.33 ms" in " ".join(pic.plots[0].notes)


@pytest.fixture
def kiln(demo_copy: Path) -> Path:
    return demo_copy / "kiln-230.toml"


def test_line_commutation_of_a_resistive_load_leaves_half_a_cycle(kiln):
    """Kiln, R load at 50 Hz: t_c = π/ω = 10 ms from the current zero at 180°."""
    _, pic = _pic(kiln, "commutation", "turnoff.time")
    assert pic.plots, pic.reason
    marks = {label: t for t, label in pic.plots[0].marks}
    assert marks["current zero"] == pytest.approx(10e-3)  # [recomputed] π/ω at 50 Hz
    assert marks["forward voltage"] == pytest.approx(20e-3)


def test_dc_switch_says_why_there_is_no_cycle(demo_copy):
    """A DC switch's power checks give the reason instead of a plot."""
    _, pic = _pic(demo_copy / "flasher-dc.toml", "lamp", "power.junction")
    assert not pic.plots and "line cycle" in pic.reason
