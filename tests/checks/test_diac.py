"""The diac–RC trigger against independent numerical solutions and textbook formulas.

The reference is scipy's solve_ivp of the network itself: the line through R1 (and R2) into
the capacitors, the diac's breakback taken off the capacitor at each firing, the network
shorted while the triac conducts (to the line zero), the diac firing again whenever the
capacitor gets back to VBO in that time (a second section's C1 can bring C2 back up).
Nothing of checks.diac is used to build it. Common-practice part values: VBO about 28–36 V,
breakback about 5–10 V.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from checks import diac

VM = 230.0 * math.sqrt(2.0)
F = 50.0
W = 2 * math.pi * F


def _rhs(vm: float, r1: float, c1: float, r2: float | None, c2: float | None, on: bool):
    def f(t: float, x: np.ndarray) -> list[float]:
        vs = 0.0 if on else vm * math.sin(W * t)
        if r2 is None:
            return [(vs - x[0]) / (r1 * c1)]
        v1, v2 = x
        return [((vs - v1) / r1 - (v1 - v2) / r2) / c1, (v1 - v2) / (r2 * c2)]
    return f


def simulate(r1: float, c1: float, *, v_pos: float, v_neg: float, dv: float,
             r2: float | None = None, c2: float | None = None, cycles: int = 40,
             x0: np.ndarray | None = None, vm: float = VM,
             refires: dict[int, int] | None = None) -> list[tuple[int, float]]:
    """(half-cycle index, firing angle from that half's zero [rad]) of every half-cycle's
    first firing; ``refires`` collects the further firings per half-cycle."""
    refires = {} if refires is None else refires
    k_diac = 0 if r2 is None else 1
    x = np.zeros(1 if r2 is None else 2) if x0 is None else np.array(x0, dtype=float)
    half = 1 / (2 * F)
    out = []
    for k in range(2 * cycles):
        sign = 1 if k % 2 == 0 else -1
        level = v_pos if sign > 0 else v_neg

        def event(t: float, y: np.ndarray, s: int = sign, lv: float = level) -> float:
            return s * y[k_diac] - lv
        event.terminal = True  # type: ignore[attr-defined]
        event.direction = 1  # type: ignore[attr-defined]
        t0, t1 = k * half, (k + 1) * half
        s = solve_ivp(_rhs(vm, r1, c1, r2, c2, False), (t0, t1), x, events=[event],
                      rtol=1e-11, atol=1e-11, method="LSODA")
        if s.status == 1:
            te = s.t_events[0][0]
            x = s.y_events[0][0].copy()
            x[k_diac] -= sign * dv
            out.append((k, W * te - k * math.pi))
            while True:  # shorted by the triac; C1 may bring C2 back up: it fires again
                s = solve_ivp(_rhs(vm, r1, c1, r2, c2, True), (te + 1e-12, t1), x,
                              events=[event], rtol=1e-11, atol=1e-11, method="LSODA")
                if s.status != 1:
                    break
                te = s.t_events[0][0]
                x = s.y_events[0][0].copy()
                x[k_diac] -= sign * dv
                refires[k] = refires.get(k, 0) + 1
        x = s.y[:, -1].copy()
    return out


def _last(events: list[tuple[int, float]], parity: int) -> float:
    return [a for k, a in events if k % 2 == parity][-1]


NETS = [  # (r1, c1, r2, c2)
    (100e3, 100e-9, None, None),
    (220e3, 47e-9, None, None),
    (20e3, 220e-9, None, None),
    (100e3, 100e-9, 15e3, 47e-9),
    (150e3, 68e-9, 22e3, 47e-9),
    (3.3e3, 100e-9, 15e3, 47e-9),
]


def _nan(x: float | None) -> float:
    return math.nan if x is None else x


@pytest.mark.parametrize("r1,c1,r2,c2", NETS)
def test_starting_angle_against_solve_ivp(r1, c1, r2, c2):
    """No firing yet: 30 cycles from rest reach the steady state; the first crossing of VBO in
    the last positive half-cycle against the closed form, within 0.5 % (it is far closer)."""
    s = solve_ivp(_rhs(VM, r1, c1, r2, c2, False), (0, 30 / F),
                  np.zeros(1 if r2 is None else 2), rtol=1e-11, atol=1e-11, method="LSODA",
                  dense_output=True)
    k = 0 if r2 is None else 1
    th = np.linspace(0, math.pi, 200001)
    v = s.sol(29 / F + th / W)[k]
    i = int(np.argmax(v >= 32.0))
    ref = th[i - 1] + (32.0 - v[i - 1]) / (v[i] - v[i - 1]) * (th[i] - th[i - 1])
    got = float(diac.firing_angle(vm=VM, omega=W, r1=r1, c1=c1, vbo=32.0, r2=_nan(r2),
                                  c2=_nan(c2)))
    assert got == pytest.approx(ref, rel=5e-3)
    assert got == pytest.approx(ref, rel=1e-6)


@pytest.mark.parametrize("dv", [3.0, 6.0, 10.0])
@pytest.mark.parametrize("r1,c1,r2,c2", NETS)
def test_running_angle_against_solve_ivp(r1, c1, r2, c2, dv):
    """Firing every half-cycle: the periodic state after 40 cycles of the switched network
    (a breakback of 3, 6 and 10 V) against the running firing angle, within 0.5 %."""
    ev = simulate(r1, c1, v_pos=32.0, v_neg=32.0, dv=dv, r2=r2, c2=c2)
    ref = _last(ev, 0)
    assert _last(ev, 1) == pytest.approx(ref, rel=1e-7)  # symmetric
    got = float(diac.firing_angle(vm=VM, omega=W, r1=r1, c1=c1, vbo=32.0, breakback=dv,
                                  running=True, r2=_nan(r2), c2=_nan(c2)))
    assert got == pytest.approx(ref, rel=5e-3)
    assert got == pytest.approx(ref, rel=1e-6)


def test_running_fires_earlier_than_starting():
    """The hysteresis: once running, every network fires earlier than it started."""
    for r1, c1, r2, c2 in NETS:
        kw = {"vm": VM, "omega": W, "r1": r1, "c1": c1, "vbo": 32.0, "r2": _nan(r2),
              "c2": _nan(c2)}
        assert diac.firing_angle(breakback=6.0, running=True, **kw) < diac.firing_angle(**kw)


@pytest.mark.parametrize("r1,c1,r2,c2,v_neg", [
    (300e3, 100e-9, None, None, 30.0),
    (120e3, 100e-9, 15e3, 47e-9, 28.0),
    (352e3, 100e-9, None, None, 30.0),  # beyond where the symmetric 32 V state drops out
    (40e3, 100e-9, 15e3, 47e-9, 30.0),
])
def test_asymmetric_pair_against_solve_ivp(r1, c1, r2, c2, v_neg):
    """+VBO = 32 V, −VBO = v_neg: the two running angles against the simulation within
    0.5 %, and the mean load voltage against a fine-grid integration of the simulated
    load waveform over a cycle."""
    ev = simulate(r1, c1, v_pos=32.0, v_neg=v_neg, dv=6.0, r2=r2, c2=c2, cycles=60)
    ref_p, ref_n = _last(ev, 0), _last(ev, 1)
    a, b, ok, dc = diac.running_pair(vm=VM, omega=W, r1=r1, c1=c1, v_pos=32.0,
                                     v_neg=v_neg, breakback=6.0, r2=_nan(r2), c2=_nan(c2))
    assert ok and float(dc) == pytest.approx(float(diac.dc_fraction(a, b)), rel=1e-12)
    assert float(a) == pytest.approx(ref_p, rel=5e-3)
    assert float(b) == pytest.approx(ref_n, rel=5e-3)
    th = np.linspace(0, 2 * math.pi, 2_000_001)
    on = np.where(th < math.pi, th >= ref_p, th - math.pi >= ref_n)
    mean = np.trapezoid(np.where(on, np.sin(th), 0.0), th) / (2 * math.pi)
    assert float(diac.dc_fraction(a, b)) == pytest.approx(mean, rel=2e-3)


def test_refiring_second_section_against_solve_ivp():
    """103.3 k, 100 nF, then 15 k, 47 nF: after each firing C1 brings C2 back to VBO twice
    more within the half-cycle (the simulation counts them); the running angle with the
    refirings followed is 88.95°, not the 91.29° of one firing per half-cycle."""
    refires: dict[int, int] = {}
    ev = simulate(103.3e3, 100e-9, v_pos=32.0, v_neg=32.0, dv=6.0, r2=15e3, c2=47e-9,
                  refires=refires)
    assert refires[len(ev) - 1] == 2
    got = float(diac.firing_angle(vm=VM, omega=W, r1=103.3e3, c1=100e-9, vbo=32.0,
                                  breakback=6.0, running=True, r2=15e3, c2=47e-9))
    assert got == pytest.approx(_last(ev, 0), rel=1e-6)
    assert math.degrees(got) == pytest.approx(88.95, abs=0.01)


def test_pattern_longer_than_a_cycle_against_solve_ivp():
    """66.6 k with the second section and VBO 32/30 V: the refirings alternate 2, 3, 3, 3
    from cycle to cycle (the simulation shows it); the mean load voltage is the mean over the
    pattern, against 60 simulated cycles."""
    refires: dict[int, int] = {}
    ev = simulate(66.6e3, 100e-9, v_pos=32.0, v_neg=30.0, dv=6.0, r2=15e3, c2=47e-9,
                  cycles=100, refires=refires)
    assert len({refires.get(k, 0) for k in range(150, 200)}) > 1
    pos = [a for k, a in ev if k % 2 == 0][-60:]
    neg = [a for k, a in ev if k % 2 == 1][-60:]
    ref = float(np.mean([diac.dc_fraction(p, q) for p, q in zip(pos, neg, strict=True)]))
    _, _, ok, dc = diac.running_pair(vm=VM, omega=W, r1=66.6e3, c1=100e-9, v_pos=32.0,
                                     v_neg=30.0, breakback=6.0, r2=15e3, c2=47e-9)
    assert ok and float(dc) == pytest.approx(ref, rel=1e-3)
    # With 32 V in both halves the same network repeats every cycle: one angle again.
    assert np.isfinite(diac.firing_angle(vm=VM, omega=W, r1=66.6e3, c1=100e-9, vbo=32.0,
                                         breakback=6.0, running=True, r2=15e3, c2=47e-9))


def test_no_state_when_it_dies_out():
    """Far beyond the drop-out the simulation stops firing after a few half-cycles and the
    solver finds no running state in either half."""
    ev = simulate(380e3, 100e-9, v_pos=32.0, v_neg=30.0, dv=6.0, cycles=40)
    assert not ev or ev[-1][0] < 20
    a, b, ok, _ = diac.running_pair(vm=VM, omega=W, r1=380e3, c1=100e-9, v_pos=32.0,
                                    v_neg=30.0, breakback=6.0)
    assert np.isnan(a) and np.isnan(b) and ok


def test_dc_fraction_half_wave():
    """One half missing: the mean of a half-wave fired at α is Vm·(1 + cos α)/(2π) (Rashid,
    Power Electronics 4th ed. §10, the single-phase half-wave controller, from memory)."""
    a = math.radians(60.0)
    assert float(diac.dc_fraction(a, math.nan)) == pytest.approx((1 + math.cos(a)) /
                                                                 (2 * math.pi), rel=1e-12)
    assert float(diac.dc_fraction(a, a)) == 0.0


def test_starting_limit_closed_form_and_simulation():
    """Single section: the capacitor's crest Vm/√(1 + (ωRC)²) equals VBO at
    ωRC = √((Vm/VBO)² − 1) (the RC low-pass in the sinusoidal steady state, any circuits
    text). Just below it the network starts firing from rest, just above it does not (the
    steady state without firing as the start: a switch-on from 0 V can overshoot)."""
    c1 = 100e-9
    r_on = float(diac.limit_r(vm=VM, omega=W, c1=c1, vbo=32.0))
    assert r_on == pytest.approx(math.sqrt((VM / 32.0) ** 2 - 1) / (W * c1), rel=1e-9)
    for f, fires in ((0.99, True), (1.01, False)):
        ev = simulate(r_on * f, c1, v_pos=32.0, v_neg=32.0, dv=6.0, cycles=10,
                      x0=_resting_start(r_on * f, c1))
        assert bool(ev) is fires


@pytest.mark.parametrize("r2,c2", [(None, None), (15e3, 47e-9)])
def test_hysteresis_band_against_solve_ivp(r2, c2):
    """Between R_on and R_off it depends on the history: from rest it never fires, from a
    running state it keeps firing; above R_off it dies out even from a running state."""
    kw = {"vm": VM, "omega": W, "c1": 100e-9, "vbo": 32.0, "r2": _nan(r2), "c2": _nan(c2)}
    r_on = float(diac.limit_r(**kw))
    r_off = float(diac.limit_r(breakback=6.0, running=True, **kw))
    assert r_off > r_on * 1.02
    mid = 0.5 * (r_on + r_off)
    assert not simulate(mid, 100e-9, v_pos=32.0, v_neg=32.0, dv=6.0, r2=r2, c2=c2, cycles=10,
                        x0=_resting_start(mid, 100e-9, r2, c2))
    # Start running at R_on·0.9, then hold the running state's end as the start at `mid`.
    ev_run = simulate(mid, 100e-9, v_pos=32.0, v_neg=32.0, dv=6.0, r2=r2, c2=c2, cycles=30,
                      x0=_running_start(r_on * 0.9, r2, c2))
    assert ev_run and ev_run[-1][0] >= 58
    ev_off = simulate(r_off * 1.02, 100e-9, v_pos=32.0, v_neg=32.0, dv=6.0, r2=r2, c2=c2,
                      cycles=30, x0=_running_start(r_on * 0.9, r2, c2))
    assert not ev_off or ev_off[-1][0] < 50


def _resting_start(r1: float, c1: float, r2: float | None = None,
                   c2: float | None = None) -> np.ndarray:
    """The state at a line zero after 30 cycles with the diac never firing (simulated): a
    pot turned slowly from the off end, not a switch-on transient."""
    s = solve_ivp(_rhs(VM, r1, c1, r2, c2, False), (0, 30 / F),
                  np.zeros(1 if r2 is None else 2), rtol=1e-11, atol=1e-11, method="LSODA")
    return s.y[:, -1].copy()


def _running_start(r1: float, r2: float | None, c2: float | None) -> np.ndarray:
    """The network's state at a line zero after 30 cycles of running at r1 (simulated)."""
    k_diac = 0 if r2 is None else 1
    x = np.zeros(1 if r2 is None else 2)
    half = 1 / (2 * F)
    for k in range(60):
        sign = 1 if k % 2 == 0 else -1

        def event(t: float, y: np.ndarray, s: int = sign) -> float:
            return s * y[k_diac] - 32.0
        event.terminal = True  # type: ignore[attr-defined]
        event.direction = 1  # type: ignore[attr-defined]
        s = solve_ivp(_rhs(VM, r1, 100e-9, r2, c2, False), (k * half, (k + 1) * half), x,
                      events=[event], rtol=1e-10, atol=1e-10, method="LSODA")
        while s.status == 1:
            x = s.y_events[0][0].copy()
            x[k_diac] -= sign * 6.0
            s = solve_ivp(_rhs(VM, r1, 100e-9, r2, c2, True), (s.t_events[0][0] + 1e-12,
                          (k + 1) * half), x, events=[event], rtol=1e-10, atol=1e-10,
                          method="LSODA")
        x = s.y[:, -1].copy()
    return x


def test_double_time_constant_reduces_the_snap_on():
    """The second section restores most of what the firing takes from the diac's capacitor
    (GE SCR Manual 6th ed. ch. 9, from memory): the jump at the snap-on is far smaller."""
    lim = {"max_jump_deg": 35.0, "marginal_fraction": 0.8}
    common = {"vs": 230.0, "freq": F, "c1": 100e-9, "vbo": 32.0, "breakback": 6.0,
              "series_r": 0.0, "limits": lim}
    single = diac.snap_on_check(**common)
    double = diac.snap_on_check(r2=15e3, c2=47e-9, **common)
    j1, j2 = float(single.values["jump"]), float(double.values["jump"])
    assert j2 < 0.5 * j1
    assert single.status.item() == 2 and double.status.item() == 0
    # The jump is the starting angle less the running one, both at R_on (solve_ivp above).
    assert float(single.values["alpha_start"]) == pytest.approx(
        math.atan(W * float(single.values["pot_on"]) * 100e-9) + math.pi / 2, abs=1e-4)


def test_snap_power_is_the_ac_switch_output():
    """The fraction of full power a resistive load gets fired at α: 1 − α/π + sin 2α/(2π)
    (Rashid, Power Electronics 4th ed. §11, the single-phase AC voltage controller's RMS
    output squared, from memory), against a fine-grid integration of sin²."""
    out = diac.snap_on_check(vs=230.0, freq=F, c1=100e-9, vbo=32.0, breakback=6.0,
                             series_r=0.0, limits={})
    a = float(out.values["alpha_run"])
    th = np.linspace(a, math.pi, 1_000_001)
    ref = np.trapezoid(np.sin(th) ** 2, th) / (math.pi / 2)
    assert float(out.values["snap_power"]) == pytest.approx(ref, rel=1e-9)


def test_gate_pulse_values():
    """ΔV = 6 V, VGT 1.3 V through 47 Ω: 100 mA peak; the capacitor's RC discharge stays above
    IGT for R·C·ln(I/IGT) (the exponential decay, checked with solve_ivp). Quadrant III's IGT
    is the larger, so its VGT is the one taken."""
    nan = math.nan
    kw = {"c_diac": 100e-9, "breakback": 6.0, "r_path": 47.0, "igt_q1": 10e-3,
          "igt_q3": 15e-3, "vgt_q1": 1.0, "vgt_q3": 1.3, "t_min": 298.15, "igt_q1_cold": nan,
          "igt_q3_cold": nan, "vgt_q1_cold": nan, "vgt_q3_cold": nan, "cold_at": nan,
          "limits": {"fail_below": 1.0, "marginal_below": 2.0}}
    out = diac.gate_pulse_check(**kw)
    assert float(out.values["peak_current"]) == pytest.approx(4.7 / 47.0, rel=1e-12)
    assert float(out.values["igt_cold"]) == 15e-3 and float(out.values["quadrant"]) == 3.0
    assert float(out.values["charge"]) == pytest.approx(0.6e-6, rel=1e-12)
    s = solve_ivp(lambda t, i: [-i[0] / (47.0 * 100e-9)], (0, 1e-4), [0.1], rtol=1e-12,
                  atol=1e-15, dense_output=True,
                  events=lambda t, i: i[0] - 15e-3)
    assert float(out.values["width"]) == pytest.approx(s.t_events[0][0], rel=1e-6)
    assert out.status.item() == 0
    # −40 °C: IGT ×2, VGT ×1.5 (common practice): (6 − 1.95) V/100 Ω = 40.5 mA against
    # 30 mA is 1.35×: marginal
    cold = diac.gate_pulse_check(**{**kw, "t_min": 233.15, "r_path": 100.0})
    assert float(cold.values["igt_cold"]) == pytest.approx(30e-3)
    assert float(cold.values["peak_current"]) == pytest.approx((6 - 1.95) / 100.0)
    assert cold.status.item() == 1
    # A cold table at −40 °C is used instead of the factors.
    table = diac.gate_pulse_check(**{**kw, "t_min": 233.15, "igt_q3_cold": 60e-3,
                                     "vgt_q3_cold": 2.0, "cold_at": 233.15})
    assert float(table.values["igt_cold"]) == pytest.approx(60e-3)
    assert float(table.values["peak_current"]) == pytest.approx(4.0 / 47.0)
    weak = diac.gate_pulse_check(**{**kw, "r_path": 470.0})
    assert weak.status.item() == 2
    over = diac.gate_pulse_check(**{**kw, "r_path": 1.0, "i_pulse": 2.0})
    assert over.status.item() == 2  # 4.7 A peak against a 2 A rating


def test_gate_pulse_takes_the_quadrant_with_the_smaller_ratio_each_with_its_vgt():
    """Quadrant III has the larger IGT (12 mA) but I, with a 3.2 V VGT, gets less: by Ohm's
    law (4 − 3.2) V / 100 Ω = 8 mA against 10 mA, 0.8×, a fail; III alone would give
    (4 − 0.8)/100 = 32 mA, 2.67×, a pass."""
    nan = math.nan
    out = diac.gate_pulse_check(c_diac=100e-9, breakback=4.0, r_path=100.0, igt_q1=10e-3,
                                igt_q3=12e-3, vgt_q1=3.2, vgt_q3=0.8, t_min=298.15,
                                igt_q1_cold=nan, igt_q3_cold=nan, vgt_q1_cold=nan,
                                vgt_q3_cold=nan, cold_at=nan,
                                limits={"fail_below": 1.0, "marginal_below": 2.0})
    assert out.status.item() == 2
    assert float(out.values["quadrant"]) == 1.0
    assert float(out.values["peak_current"]) == pytest.approx(8e-3)
    assert float(out.values["drive_ratio"]) == pytest.approx(0.8)


def test_symmetric_diac_has_no_dc():
    out = diac.symmetry_check(vs=230.0, freq=F, r_lo=3.3e3, r_hi=203.3e3, c1=100e-9,
                              vbo=32.0, asymmetry=0.0, breakback=6.0,
                              limits={"max_dc_fraction": 0.01})
    assert float(out.values["dc_fraction"]) == pytest.approx(0.0, abs=1e-12)
    assert out.status.item() == 0
