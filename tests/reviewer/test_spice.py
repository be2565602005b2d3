"""SPICE netlists of a stage, cross-checked with ngspice against the closed forms of checks/.

ngspice (an independent circuit simulator) integrates the exported netlist; the snubber step,
the oscillator's charge and an R–L load behind an ideal switch must agree with Latchbook's
closed forms within 0.5 %. Tests that need ngspice skip where it is not installed.
"""

from __future__ import annotations

import math
import re
import shutil
import subprocess
from pathlib import Path

import numpy as np
import pytest

from checks.gate import required_width_dc
from checks.oscillator import charge_time, free_running, put_peak_voltage, ujt_peak_voltage
from checks.rl import extinction_angle, load_angle, rl_current
from checks.snubber import step_max_dvdt, step_peak, step_response
from reviewer.cli import main
from reviewer.engine import run_project
from reviewer.spice import netlist

ROOT = Path(__file__).resolve().parents[2] / "projects"
NGSPICE = shutil.which("ngspice")
needs_ngspice = pytest.mark.skipif(
    NGSPICE is None, reason="ngspice is not installed (apt-get install ngspice)")
TOL = 0.005


def simulate(text: str, vectors: str, tmp_path: Path) -> np.ndarray:
    """Run ``text`` in ngspice batch mode; the columns time, v1, v2 … of ``vectors``."""
    data = tmp_path / "out.dat"
    deck = tmp_path / "deck.cir"
    control = (f".control\nset wr_singlescale\nrun\nwrdata {data} {vectors}\nquit\n.endc\n"
               ".end\n")
    deck.write_text(text.replace("\n.end\n", "\n" + control), encoding="utf-8")
    p = subprocess.run([NGSPICE, "-b", str(deck)], capture_output=True, text=True, timeout=300,
                       cwd=tmp_path)
    log = p.stdout + p.stderr
    assert p.returncode == 0 and "aborted" not in log and "rror" not in log, log[-2000:]
    return np.loadtxt(data)


def _write(tmp_path: Path, name: str, text: str) -> Path:
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def _first_cross(t: np.ndarray, y: np.ndarray, level: float, rising: bool = True) -> float:
    """Time of the first crossing of ``level`` (linear interpolation between samples)."""
    hit = np.flatnonzero(y >= level) if rising else np.flatnonzero(y <= level)
    k = int(hit[0])
    assert k > 0
    return float(np.interp(level, [y[k - 1], y[k]], [t[k - 1], t[k]]) if rising else
                 np.interp(-level, [-y[k - 1], -y[k]], [t[k - 1], t[k]]))


@needs_ngspice
def test_snubber_step_matches_closed_forms(tmp_path):
    """Kiln snubber: ngspice's step across the R–C agrees with step_response, the peak
    (value and time) with step_peak, the steepest slope with step_max_dvdt, within 0.5 %."""
    run = run_project(ROOT / "kiln-230.toml")
    d = simulate(netlist(run, "snubber"), "v(a)", tmp_path)
    t, v = d[:, 0], d[:, 1]
    e, r, ind, c = 230 * math.sqrt(2), 33.0, 200e-6, 100e-9
    ref = step_response(e=e, r=r, l=ind, c=c, t=t)
    assert np.max(np.abs(v - ref)) < TOL * e
    v_pk, t_pk = (float(x) for x in step_peak(e=e, r=r, l=ind, c=c))
    k = int(np.argmax(v))
    assert v[k] == pytest.approx(v_pk, rel=TOL)
    assert t[k] == pytest.approx(t_pk, rel=TOL)
    slope, t_m = (float(x) for x in step_max_dvdt(e=e, r=r, l=ind, c=c))
    dv = np.gradient(v, t)
    assert float(np.max(dv[t > 1e-8])) == pytest.approx(slope, rel=TOL)


@needs_ngspice
def test_put_oscillator_charge_matches_closed_forms(tmp_path):
    """Flasher PUT oscillator: the first pulse comes when C_T, charged from 0 through R_T,
    reaches VP (charge_time, put_peak_voltage); the next after charging from VV to VP
    (free_running's period), both within 0.5 %."""
    run = run_project(ROOT / "flasher-dc.toml")
    d = simulate(netlist(run, "blink"), "v(e) v(k)", tmp_path)
    t, ve, vk = d[:, 0], d[:, 1], d[:, 2]
    vp = put_peak_voltage(v1=24.0, r_upper=20e3, r_lower=20e3, offset=0.6)
    t1 = float(charge_time(r=1e6, c=1e-6, v1=24.0, v0=0.0, vp=vp))
    pulses = t[1:][(vk[1:] > 1.0) & (vk[:-1] <= 1.0)]
    assert pulses.size >= 2
    assert pulses[0] == pytest.approx(t1, rel=TOL)
    assert float(np.max(ve[t < pulses[0]])) == pytest.approx(float(vp), rel=TOL)
    period = float(free_running(device="put", v1=24.0, rt=1e6, ct=1e-6, vv=0.8,
                                r_discharge=100.0, r_upper=20e3, r_lower=20e3,
                                offset=0.6)["period"])
    assert pulses[1] - pulses[0] == pytest.approx(period, rel=TOL)


@needs_ngspice
def test_ujt_oscillator_charge_matches_closed_forms(tmp_path):
    """A free-running UJT oscillator (the bench kiln's trigger on a 20 V supply): first pulse at
    charge_time from 0 to VP (ujt_peak_voltage, the divider with R1 and R2), within 0.5 %."""
    text = (ROOT / "kiln-230.toml").read_text("utf-8")
    text = text.replace('sync = "line"', 'sync = "free"').replace(
        'target = { min = "30 deg", max = "150 deg" }', "").replace(
        'timing_r = { min = "5.6 kohm", max = "155.6 kohm" }', 'timing_r = "47 kohm"')
    text = text.replace('eta = { min = 0.56, max = 0.75 }', "eta = 0.65").replace(
        'rbb = { min = "4.7 kohm", max = "9.1 kohm" }', 'rbb = "6.8 kohm"').replace(
        'zener = "20 V ±5%"\n', "").replace(
        'topology = "ac-switch"\ngate = "gate"\n',
        'topology = "ac-switch"\nfiring = { min = "30 deg", max = "150 deg" }\n')
    run = run_project(_write(tmp_path, "free.toml", text))
    d = simulate(netlist(run, "trigger"), "v(e) v(b1)", tmp_path)
    t, ve = d[:, 0], d[:, 1]
    vp = float(ujt_peak_voltage(v1=20.0, eta=0.65, rbb=6.8e3, r1=47.0, r2=470.0, vd=0.55))
    t1 = float(charge_time(r=47e3, c=100e-9, v1=20.0, v0=0.0, vp=vp))
    k = int(np.argmax(np.diff(ve) < -0.5))  # the first sharp fall: the UJT fires
    assert t[k] == pytest.approx(t1, rel=TOL)
    assert ve[k] == pytest.approx(vp, rel=TOL)


@needs_ngspice
def test_dc_rl_load_behind_ideal_switch(tmp_path):
    """Flasher lamp (24 V, 12 Ω, 50 µH): the time for the current to reach 30, 60 and 90 % of
    V/R after firing agrees with required_width_dc (−τ·ln(1 − R·I/V)) within 0.5 %."""
    run = run_project(ROOT / "flasher-dc.toml")
    text = netlist(run, "lamp")
    t_fire = float(re.search(r"PULSE\(0 1 (\S+) ", text).group(1))
    d = simulate(text, "i(V_ILOAD)", tmp_path)
    t, i = d[:, 0], d[:, 1]
    for k in (0.3, 0.6, 0.9):
        want = float(required_width_dc(il=k * 2.0, r=12.0, l=50e-6, v=24.0, tgt=0.0))
        assert _first_cross(t, i, k * 2.0) - t_fire == pytest.approx(want, rel=TOL)


@needs_ngspice
def test_ac_rl_load_current_and_extinction(tmp_path):
    """A half-wave SCR into 10 Ω + 30 mH on 230 V 50 Hz, fired at α: the current follows
    rl_current and falls to zero at extinction_angle, within 0.5 % (of the peak current, and of
    the angle)."""
    text = (ROOT / "kiln-230.toml").read_text("utf-8")
    text = text.replace('topology = "ac-switch"', 'topology = "half-wave"').replace(
        'load = { r = "26.5 ohm ±5%", cold_r = "24 ohm" }', 'load = { r = "10 ohm", l = "30 mH" }')
    run = run_project(_write(tmp_path, "rl.toml", text))
    net = netlist(run, "power")
    t_fire = float(re.search(r"VG_Q1 \S+ 0 PULSE\(0 1 (\S+) ", net).group(1))
    d = simulate(net, "i(V_ILOAD)", tmp_path)
    t, i = d[:, 0], d[:, 1]
    omega, vm = 2 * math.pi * 50, 230 * math.sqrt(2)
    alpha = omega * t_fire
    phi = float(load_angle(r=10.0, l=30e-3, omega=omega))
    z = math.hypot(10.0, omega * 30e-3)
    beta = float(extinction_angle(alpha=alpha, phi=phi))
    first = (t > t_fire) & (t < beta / omega)
    ref = rl_current(theta=omega * t[first], alpha=alpha, phi=phi, vm=vm, z=z)
    assert np.max(np.abs(i[first] - ref)) < TOL * float(np.max(ref))
    off = t[(t > t_fire + 1e-4) & (t < 1 / 50) & (i <= 0.0)]
    assert omega * float(off[0]) == pytest.approx(beta, rel=TOL)


@needs_ngspice
@pytest.mark.parametrize("name", ["kiln-230", "kiln-120", "flasher-dc"])
def test_every_demo_stage_runs_in_ngspice(name, tmp_path):
    """Each stage of each demo project, at both corners, is a netlist ngspice runs to the end
    with finite results."""
    run = run_project(ROOT / f"{name}.toml")
    for sid in run.project.stages:
        for corner in ("nominal", "worst"):
            text = netlist(run, sid, corner)
            first = re.search(r"^\.print tran (.+)$", text, re.M).group(1)
            d = simulate(text, first, tmp_path)
            assert d.shape[0] > 10 and np.isfinite(d).all(), (sid, corner)


def test_netlist_is_plain_spice():
    """Every element line starts with a SPICE element letter; numbers carry no suffix (SPICE
    reads "M" as milli); the netlist ends with .end; the device models are explained."""
    run = run_project(ROOT / "kiln-230.toml")
    for sid in run.project.stages:
        text = netlist(run, sid)
        assert text.rstrip().endswith(".end") and ".tran" in text
        for line in text.splitlines()[1:]:
            if not line or line[0] in "*.":
                continue
            assert line[0] in "RCLVEHSDKB", line
            fields = line.split(";")[0].split()
            assert not any(re.fullmatch(r"[\d.]+(meg|[kmunpfg])", f, re.I) for f in fields)
    trig = netlist(run, "trigger")
    assert "UJT, a comparator-controlled switch" in trig
    assert "SCR as a switch with hysteresis" in netlist(run, "power")


def test_worst_corner_differs_and_says_which_check():
    """--corner worst takes the stage's most critical check's worst row and names it."""
    run = run_project(ROOT / "kiln-230.toml")
    nom, worst = netlist(run, "trigger"), netlist(run, "trigger", "worst")
    assert nom != worst and "the worst corner of osc." in worst


def test_cli_export(tmp_path, capsys):
    """`latchbook export --spice STAGE PROJECT -o FILE` writes the netlist; an unknown stage
    names the stages and exits 2."""
    out = tmp_path / "snub.cir"
    assert main(["export", "--spice", "snubber", str(ROOT / "kiln-230.toml"), "-o",
                 str(out)]) == 0
    assert out.read_text("utf-8").startswith("* Bench kiln element controller")
    assert main(["export", "--spice", "nope", str(ROOT / "kiln-230.toml")]) == 2
    err = capsys.readouterr().err
    assert "no stage `nope`" in err and "snubber" in err and "Traceback" not in err


@needs_ngspice
def test_odd_designators_still_give_a_netlist(tmp_path):
    """A designator with markup, spaces or a line break becomes a plain SPICE name; comments
    stay on one line; ngspice runs the result."""
    text = (ROOT / "kiln-230.toml").read_text("utf-8").replace(
        "[parts.Q1]", '[parts."Q<b> &\\n1"]').replace('scr = "Q1"', 'scr = "Q<b> &\\n1"')
    run = run_project(_write(tmp_path, "odd.toml", text))
    net = netlist(run, "power")
    assert "S_Q_b____1A" in net and "\nQ" not in net and "\n1" not in net
    d = simulate(net, "i(V_ILOAD)", tmp_path)
    assert np.isfinite(d).all() and np.max(np.abs(d[:, 1])) > 1.0


@needs_ngspice
def test_capacitor_commutation_turnoff_time(tmp_path):
    """The flasher's turn-off network on a resistive load (12 Ω, 10 µF charged to the 24 V bus):
    the SCR is reverse-biased for R·C·ln 2 after the capacitor is switched in
    (resistive_turnoff_time), within 0.5 %."""
    from checks.turnoff import resistive_turnoff_time

    text = (ROOT / "flasher-dc.toml").read_text("utf-8").replace(
        'load = { r = "12 ohm", l = "50 uH" }', 'load = { r = "12 ohm" }')
    run = run_project(_write(tmp_path, "res.toml", text))
    d = simulate(netlist(run, "turnoff"), "v(a)", tmp_path)
    t, va = d[:, 0], d[:, 1]
    neg = np.flatnonzero(va < 0.0)
    start = _first_cross(t, va, 0.0, rising=False)
    end = _first_cross(t[neg[0]:], va[neg[0]:], 0.0)
    want = float(resistive_turnoff_time(r=12.0, c=10e-6, v_s=24.0, v_c0=24.0))
    assert end - start == pytest.approx(want, rel=TOL)


@needs_ngspice
def test_bridge_average_output(tmp_path):
    """A fully controlled bridge into the kiln's 26.5 Ω: the load current flows one way only,
    in both half-cycles, and its mean times R is (Vm/π)·(1 + cos α), the resistive-load full
    converter's average output (common practice; e.g. Rashid, Power Electronics, 4th ed.,
    ch. 10, from memory), within 0.5 %."""
    text = (ROOT / "kiln-230.toml").read_text("utf-8").replace(
        'topology = "ac-switch"', 'topology = "bridge"').replace(
        'load = { r = "26.5 ohm ±5%", cold_r = "24 ohm" }', 'load = { r = "26.5 ohm" }')
    net = netlist(run_project(_write(tmp_path, "bridge.toml", text)), "power")
    t_fire = float(re.search(r"VG_Q1A \S+ 0 PULSE\(0 1 (\S+) ", net).group(1))
    d = simulate(net, "i(V_ILOAD)", tmp_path)
    t, i = d[:, 0], d[:, 1]
    vm, omega = 230 * math.sqrt(2), 2 * math.pi * 50
    alpha = omega * t_fire
    last = t >= t[-1] - 0.02
    assert i.min() > -1e-3 * i.max()
    first_half = last & (np.mod(t, 0.02) < 0.01)
    assert np.max(i[first_half]) > 0.5 * i.max() and np.max(i[last & ~first_half]) > 0.5 * i.max()
    mean = float(np.trapezoid(i[last], t[last]) / (t[last][-1] - t[last][0]))
    assert mean * 26.5 == pytest.approx(vm / math.pi * (1 + math.cos(alpha)), rel=TOL)


def test_netlist_is_ascii(tmp_path):
    """A project named with the report's symbols still gives a 7-bit ASCII netlist."""
    text = (ROOT / "kiln-230.toml").read_text("utf-8").replace(
        'name = "Bench kiln element controller"', 'name = "Kiln 4k7 Ω ±5% – µ"')
    run = run_project(_write(tmp_path, "u.toml", text))
    for sid in run.project.stages:
        net = netlist(run, sid)
        assert net.isascii() and net.startswith("* Kiln 4k7 ohm +/-5% - u rev C")
