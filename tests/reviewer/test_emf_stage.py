"""Back-EMF loads (battery, DC motor) through the engine: the load table, power.control's
θ1 rule, power.output's charge/armature current and voltage, and the checks that read the
load current; circuits built for the test (invented values, no real parts)."""

from __future__ import annotations

import math

import pytest

from reviewer.engine import evaluate
from reviewer.errors import ProjectError
from reviewer.project import load_project_text

BASE = """
[project]
name = "test charger"
revision = "A"

[conditions]
ambient = {{ min = "0 degC", max = "40 degC" }}

[supply]
kind = "ac"
voltage = "24 V ±10%"
frequency = "50 Hz"
inductance = "400 uH"

[parts.Q1]
type = "scr"
vdrm = "{vdrm}"
vrrm = "{vdrm}"
it_rms = "25 A"
it_av = "16 A"
itsm = "300 A"
itsm_duration = "10 ms"
vt0 = "0.9 V"
rt = "15 mohm"
rth_jc = "1.2 K/W"
tj_max = "125 degC"
igt = "25 mA"
vgt = "1.5 V"
ih = "40 mA"
il = "{il}"
didt = "100 A/us"

[stages.power]
kind = "phase-control"
scr = "Q1"
topology = "{topology}"
{freewheel}
firing = {{ min = "{amin}", max = "{amax}" }}
load = {{ r = "0.6 ohm ±10%", l = "0.3 mH"{e}{type} }}
heatsink = {{ rth_cs = "0.3 K/W", rth_sa = "1.5 K/W", devices = 1 }}
{required}
"""

DEFAULTS = dict(vdrm="200 V", il="80 mA", topology="half-wave", freewheel="", amin="35 deg",
                amax="150 deg", e=', e = { min = "11.5 V", max = "14.4 V" }',
                type=', type = "battery"', required='required = { min = "0.5 A", max = "4 A" }')


def project(**over: str):
    return load_project_text(BASE.format(**{**DEFAULTS, **over}), "test.toml")


def run(check: str, **over: str):
    res = evaluate(project(**over), only=[("power", check)], strict=True).results
    assert len(res) == 1
    return res[0]


def test_control_fails_when_the_range_starts_below_theta1():
    """θ1 = asin(E_max/Vm_min) = asin(14.4/(√2·21.6)) = 28.1°: α_min 35° passes, 20° fails
    and says what to do."""
    r = run("power.control")
    assert r.status == "pass", r.summary
    assert r.values["emf_angle"].max == pytest.approx(28.12, abs=0.01)
    r = run("power.control", amin="20 deg")
    assert r.status == "fail"
    assert "does nothing" in r.summary and "α_min ≥ 28.1°" in r.summary
    r = run("power.control", amax="160 deg")
    assert "no current at all" in r.summary


def test_output_compares_the_mean_charge_current():
    r = run("power.output")
    assert r.status == "pass", r.summary
    assert "charge current" in r.summary and "θ1" in r.summary
    r = run("power.output", required='required = { min = "0.5 A", max = "6 A" }')
    assert r.status == "fail" and "short of 6 A" in r.summary and "E = 14.4 V" in r.summary
    r = run("power.output", amax="100 deg")
    assert r.status == "fail" and "later α_max" in r.summary


def test_current_required_without_emf_is_not_applicable():
    r = run("power.output", e="", type="")
    assert r.status == "not-applicable" and "battery or motor" in r.summary


def test_reverse_blocking_adds_the_emf():
    """Reverse stress √2·26.4 V + 14.4 V = 51.73 V; 100 V parts give 1.93 (marginal)."""
    r = run("power.blocking", vdrm="100 V")
    assert r.values["peak_voltage"].max == pytest.approx(51.73, rel=1e-3)
    assert r.status == "marginal"
    assert run("power.blocking", vdrm="100 V", e="", type="").status == "pass"


def test_current_checks_follow_the_emf():
    """A larger E leaves less current: IT(RMS) falls, and its maximum is at the lowest E."""
    lo = run("power.rms-current", e=', e = "11.5 V"').values["it_rms"].max
    hi = run("power.rms-current", e=', e = "14.4 V"').values["it_rms"].max
    ranged = run("power.rms-current").values["it_rms"].max
    assert hi < lo and ranged == pytest.approx(lo, rel=1e-9)
    for check in ("power.average-current", "power.junction", "power.surge", "power.latching",
                  "power.holding", "power.didt"):
        r = run(check)
        assert r.status in ("pass", "marginal"), (check, r.summary)


def test_latching_fails_when_the_current_after_firing_stays_below_il():
    r = run("power.latching", il="2 A")
    assert r.status == "fail" and "α_max ≤" in r.summary


def test_motor_surge_is_the_stall_current():
    """A motor at standstill has no back EMF at the first firing: the surge is the same as
    for E = 0, and larger than with the battery's lowest E."""
    motor = run("power.surge", type=', type = "motor"')
    no_e = run("power.surge", e=', e = "0 V"', type=', type = "battery"')
    battery = run("power.surge")
    assert motor.values["inrush_peak"].max == pytest.approx(no_e.values["inrush_peak"].max)
    assert battery.values["inrush_peak"].max < motor.values["inrush_peak"].max
    assert "standstill" in " ".join(motor.notes)


def test_half_controlled_bridge_runs():
    r = run("power.output", topology="bridge", freewheel="freewheel = true")
    assert r.values["vdc"].max > 14.4


@pytest.mark.parametrize("over,match", [
    (dict(topology="ac-switch"), "back EMF `load.e` is for a half-wave or bridge"),
    (dict(e=""), 'needs the back EMF `e`'),
])
def test_bad_emf_loads_are_rejected(over, match):
    with pytest.raises(ProjectError, match=match):
        project(**over)


def test_demos_review_cleanly():
    """The two back-EMF demos: no check fails and none errors."""
    from pathlib import Path

    from reviewer.engine import run_project

    root = Path(__file__).resolve().parents[2] / "projects"
    for name in ("charger-12v.toml", "motor-dc.toml"):
        statuses = {r.check: r.status for r in run_project(root / name).results}
        assert "fail" not in statuses.values() and "error" not in statuses.values(), statuses


def test_reports_carry_the_load_cautions_only_where_they_apply(tmp_path):
    """A motor project's report warns of stall current and the inductive kick; a charger's of
    hydrogen and the short-circuit current; a heater's neither."""
    import shutil
    from pathlib import Path

    from reviewer.report import gather, to_markdown

    root = Path(__file__).resolve().parents[2] / "projects"
    for name in ("motor-dc.toml", "charger-12v.toml", "kiln-230.toml"):
        shutil.copy(root / name, tmp_path / name)
    motor = to_markdown(gather(tmp_path / "motor-dc.toml", plots=False))
    charger = to_markdown(gather(tmp_path / "charger-12v.toml", plots=False))
    kiln = to_markdown(gather(tmp_path / "kiln-230.toml", plots=False))
    assert "stall current" in motor and "hydrogen" not in motor
    assert "hydrogen" in charger and "short-circuit current" in charger
    assert "hydrogen" not in kiln and "stall current" not in kiln


MOTOR = """
[project]
name = "test drive"
revision = "A"

[conditions]
ambient = { min = "0 degC", max = "40 degC" }

[supply]
kind = "ac"
voltage = "230 V"
frequency = "50 Hz"
inductance = "LS"

[parts.Q1]
type = "scr"
vdrm = "1200 V"
vrrm = "1200 V"
igt = "25 mA"
vgt = "1.5 V"

[stages.drive]
kind = "phase-control"
scr = "Q1"
topology = "bridge"
firing = { min = "30 deg", max = "120 deg" }
load = { r = "5 ohm", l = "300 mH", e = "100 V", type = "motor" }
required = { min = "150 V", max = "REQ" }
"""


def test_full_bridge_overlap_costs_output():
    """A continuous full bridge at α = 30° gives (2Vm/π)·cos 30° = 179.3 V without source
    inductance; 2 mH takes ΔV = (2/π)·ωL_s·I_d with I_d = (179.3 − 100)/(5 + 0.4) = 14.69 A:
    5.87 V (ripple-free; the check takes the current at the transfer). A requirement of
    177 V passes without L_s and fails with it, saying why."""
    def out(ls: str, req: str):
        p = load_project_text(MOTOR.replace("LS", ls).replace("REQ", req), "m.toml")
        return evaluate(p, only=[("drive", "power.output")], strict=True).results[0]

    assert out("0 uH", "177 V").status == "pass"
    r = out("2 mH", "177 V")
    assert r.status == "fail" and "overlap" in r.summary
    # The reported drop and μ come from the current at the transfer (the waveform's, lowered
    # by the drop), a little under the ripple-free I_d here: within 8 % of the formula (the
    # circuit solved in time, tests/checks/test_rle_output.py, gives μ 5.58°).
    assert r.values["overlap_drop"].max == pytest.approx(4 * 50 * 2e-3 * 14.687, rel=0.08)
    assert r.values["overlap_angle"].max == pytest.approx(5.58, rel=0.01)
    assert out("2 mH", "170 V").status == "pass"


def test_half_controlled_bridge_overlap_costs_output():
    """A continuous half-controlled bridge at α = 30° gives (Vm/π)·(1 + cos 30°) = 193.2 V
    without source inductance; 2 mH takes ΔV = ωL_s·I_d/π (two transfers of I_d: half the
    full bridge's) with I_d = (193.2 − 100)/(5 + 0.2) = 17.92 A: 3.585 V, so the full output
    is 189.6 V; the diode leg's transfer at the line zero lasts acos(1 − ωL_s·I_d/Vm) =
    15.12° and the firing's μ from cos(30° + μ) = cos 30° − ωL_s·I_d/Vm is 3.76° (ripple-free
    figures; the check takes the currents at the transfers)."""
    text = MOTOR.replace('topology = "bridge"\n', 'topology = "bridge"\nfreewheel = true\n')

    def out(ls: str, req: str):
        p = load_project_text(text.replace("LS", ls).replace("REQ", req), "m.toml")
        return evaluate(p, only=[("drive", "power.output")], strict=True).results[0]

    assert out("0 uH", "190 V").status == "pass"
    r = out("2 mH", "190 V")
    assert r.status == "fail" and "overlap" in r.summary and "diode leg" in r.summary
    i_d = (2**0.5 * 230 / math.pi * (1 + math.cos(math.pi / 6)) - 100) / (5 + 0.2)
    x = 100 * math.pi * 2e-3 * i_d / (2**0.5 * 230)
    # From the currents at the transfers (the waveform's at α and at π), not the ripple-free
    # I_d: within 8 % of the ripple-free formulae.
    assert r.values["overlap_drop"].max == pytest.approx(100 * 2e-3 * i_d, rel=0.08)
    assert r.values["overlap_diode"].max == pytest.approx(math.degrees(math.acos(1 - x)),
                                                          rel=0.08)
    assert r.values["overlap_angle"].max == pytest.approx(
        math.degrees(math.acos(math.cos(math.pi / 6) - x)) - 30.0, rel=0.08)
    assert out("2 mH", "189 V").status == "pass"


def test_full_armature_voltage_is_taken_where_the_current_runs_continuously():
    """The motor demo (half-controlled bridge, α_min 40°, E 80–150 V, R 8 Ω ±10 %, 207 V low
    line): the least mean armature voltage at α_min is (Vm/π)(1 + cos 40°) = 164.6 V, with
    the overlap a little less, at E = 80 V where the current runs continuously; at E = 150 V
    the zero-current intervals at E lift it to 172.8 V. A requirement of 168 V fails."""
    from pathlib import Path

    text = (Path(__file__).parents[2] / "projects" / "motor-dc.toml").read_text()

    def out(req: str):
        p = load_project_text(text.replace('max = "160 V" }', f'max = "{req}" }}'), "m.toml")
        return evaluate(p, only=[("armature", "power.output")], strict=True).results[0]

    r = out("160 V")
    assert r.status == "pass"
    vm = 2**0.5 * 207
    assert r.margin == pytest.approx(vm / math.pi * (1 + math.cos(math.radians(40))) / 160 - 1,
                                     abs=2e-3)
    r = out("168 V")
    assert r.status == "fail" and "E = 80 V" in r.summary and "R = 7.2 Ω" in r.summary


def test_control_below_theta1_is_kept_by_a_continuous_current():
    """Full bridge, E 100 V on 230 V (θ1 = 17.9°), L 300 mH: fired from 10° the armature
    current never stops, so the incoming pair fires at α even from a narrow pulse: marginal
    (not from rest), not a fail; with L 3 mH the current stops and control below θ1 is lost."""
    def ctl(l: str):
        text = MOTOR.replace("LS", "0 uH").replace("REQ", "170 V").replace(
            'min = "30 deg"', 'min = "10 deg"').replace('l = "300 mH"', f'l = "{l}"')
        p = load_project_text(text, "m.toml")
        return evaluate(p, only=[("drive", "power.control")], strict=True).results[0]

    r = ctl("300 mH")
    assert r.status == "marginal" and "narrow pulse" in r.summary and "from rest" in r.summary
    r = ctl("3 mH")
    assert r.status == "fail" and "does nothing" in r.summary
