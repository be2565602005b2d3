"""Gate-drive computations against published worked examples and independent integrations.

Oracles: printed book answers ([book: ...]), values recomputed from book inputs
([recomputed], each also confirmed here by a second method), and scipy ``solve_ivp``
integrations of the circuits themselves.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from checks import gate

BOOK = 5e-3  # printed to 3–4 significant figures
NUM = 5e-3  # numerical integrals
EXACT = 1e-6

# G9 inputs (all assumed; the oscillator is Rashid 4e Ex 9.5's with its shortcut VP given)
G9 = dict(vp=15.8, vd=0.5, r_on=10.0, r1=100.0, series_r=47.0, c=0.5e-6, vv=3.5)
G9_RGK = 1e3
G9_IGT_C = 10e-3 * (1 + (2 - 1) * 35 / 65)   # IGT ×2 at −40 °C pro rata, at −10 °C
G9_VGT_C = 1.0 * (1 + (1.5 - 1) * 35 / 65)


def rel(x: float, y: float) -> float:
    return abs(x - y) / abs(y)


# ------------------------------------------------------------------ G9: UJT driving a gate

def test_g9_cold_values():
    # [recomputed] conventions.md §4.1: factors 1.5385 (IGT) and 1.2692 (VGT) at −10 °C
    from checks.core import cold_value
    igt_c = cold_value(10e-3, 263.15, v_cold=np.nan, t_cold=np.nan, k=gate.K_IGT)
    vgt_c = cold_value(1.0, 263.15, v_cold=np.nan, t_cold=np.nan, k=gate.K_VGT)
    assert float(igt_c) == pytest.approx(15.385e-3, rel=1e-4)   # [recomputed]
    assert float(vgt_c) == pytest.approx(1.2692, rel=1e-4)      # [recomputed]
    assert float(igt_c) + float(vgt_c) / G9_RGK == pytest.approx(16.654e-3, rel=1e-4)


def test_g9_thevenin_and_trigger_current():
    e_g, r_src, e_th, r_th = gate.thevenin(vp=15.8, vd=0.5, r_on=10.0, r1=100.0,
                                           series_r=47.0, r_gk=G9_RGK)
    assert float(e_g) == pytest.approx(13.909, rel=1e-4)     # [recomputed] G9
    assert float(r_src) == pytest.approx(56.09, rel=1e-4)    # [recomputed] G9
    assert float(e_th) == pytest.approx(13.170, rel=1e-4)    # [recomputed] G9
    assert float(r_th) == pytest.approx(53.11, rel=1e-4)     # [recomputed] G9
    i_g = gate.gate_current(e_g=e_g, r_src=r_src, vgt=G9_VGT_C, r_gk=G9_RGK)
    assert float(i_g) == pytest.approx(224.1e-3, rel=1e-3)   # [recomputed] G9, k = 14.6
    assert float(i_g) / G9_IGT_C == pytest.approx(14.6, abs=0.05)
    # the load line at IGT_eff,c: 12.975 V ≥ VGT_c  [recomputed] G9
    igt_eff = G9_IGT_C + G9_VGT_C / G9_RGK
    assert float(e_g - r_src * igt_eff) == pytest.approx(12.975, rel=1e-4)
    # Independent: nodal solution of the same circuit at t = 0 (capacitor as a source VP)
    g = np.array([[1 / 10 + 1 / 100 + 1 / 47, -1 / 47], [-1 / 47, 1 / 47]])
    # node 2 is the gate node, held at VGT_c: solve for node 1, then the branch current
    v1 = ((15.8 - 0.5) / 10 + G9_VGT_C / 47) / g[0, 0]
    i_branch = (v1 - G9_VGT_C) / 47
    assert float(i_g) == pytest.approx(i_branch - G9_VGT_C / G9_RGK, rel=1e-9)


def test_g9_peak_power_bound():
    _, _, e_th, r_th = gate.thevenin(vp=15.8, vd=0.5, r_on=10.0, r1=100.0, series_r=47.0,
                                     r_gk=G9_RGK)
    assert float(gate.peak_power_bound(e_th=e_th, r_th=r_th)) == pytest.approx(0.816, abs=5e-4)
    e_g, r_src, _, _ = gate.thevenin(vp=15.8, vd=0.5, r_on=10.0, r1=100.0, series_r=47.0)
    # R_GK's share ignored: 0.862 W  [recomputed] G9
    assert float(gate.peak_power_bound(e_th=e_g, r_th=r_src)) == pytest.approx(0.862, abs=5e-4)
    # Independent: the largest v·i over any gate voltage on the Thevenin load line
    v = np.linspace(0, float(e_th), 200001)
    assert float(np.max(v * (float(e_th) - v) / float(r_th))) == pytest.approx(
        float(gate.peak_power_bound(e_th=e_th, r_th=r_th)), rel=1e-8)


def test_g9_pulse_model():
    p = gate.discharge_pulse(**G9, vgt=G9_VGT_C)
    assert float(p.tau) == pytest.approx(20.99e-6, rel=5e-4)     # [recomputed] G9
    assert float(p.i_c0) == pytest.approx(0.3440, rel=5e-4)      # [recomputed] G9
    assert float(p.t_end) == pytest.approx(40.1e-6, rel=2e-3)    # [recomputed] G9
    i_node0 = p.r1 / (p.r1 + p.rs_p) * (p.i_c0 - p.vgt_p / p.r1)
    assert float(i_node0) == pytest.approx(0.2253, rel=5e-4)     # [recomputed] G9
    # time above IGT_eff,c without the valley cap: 46.7 µs  [recomputed] G9
    uncapped = p._replace(t_end=np.asarray(np.inf))
    t_above = gate.pulse_width(pulse=uncapped, igt=G9_IGT_C, vgt=G9_VGT_C, r_gk=G9_RGK)
    assert float(t_above) == pytest.approx(46.7e-6, rel=2e-3)
    t_w = gate.pulse_width(pulse=p, igt=G9_IGT_C, vgt=G9_VGT_C, r_gk=G9_RGK)
    assert float(t_w) == pytest.approx(40.1e-6, rel=2e-3)       # capped at the valley
    # with r_on = 0: 30.5 µs  [recomputed] G9
    p0 = gate.discharge_pulse(**{**G9, "r_on": 0.0}, vgt=G9_VGT_C)
    t0 = gate.pulse_width(pulse=p0, igt=G9_IGT_C, vgt=G9_VGT_C, r_gk=G9_RGK)
    assert float(t0) == pytest.approx(30.5e-6, rel=2e-3)


def _ujt_gate_ivp(*, vp: float, vd: float, r_on: float, r1: float, rs: float, c: float,
                  vgt: float, r_gk: float, igt: float, vv: float, n: float = 1.0,
                  n_gates: int = 1) -> tuple[float, float, float]:
    """Integrate the capacitor through r_on into R1 ∥ (R_S + gate) by nodal analysis.

    The gate node is a VGT source with R_GK across it; a transformer (ratio n) sits between
    the base-1 node and R_S. Returns (time the gate current stays ≥ IGT, time v_C reaches VV,
    ∫v_B1 dt to that time).
    """
    def node(v_c: float) -> tuple[float, float]:
        # base-1 node voltage u: (v_c − VD − u)/r_on = u/R1 + (u/n − VGT)/(n·R_S)
        g = 1 / r_on + 1 / r1 + 1 / (n * n * rs)
        u = ((v_c - vd) / r_on + vgt / (n * rs)) / g
        i_gate = ((u / n - vgt) / rs) / n_gates - vgt / r_gk
        return u, i_gate

    def rhs(t: float, y: np.ndarray) -> list[float]:
        u, _ = node(y[0])
        return [-(y[0] - vd - u) / r_on / c, u]

    def below_igt(t: float, y: np.ndarray) -> float:
        return node(y[0])[1] - igt
    below_igt.terminal = False

    def at_valley(t: float, y: np.ndarray) -> float:
        return y[0] - vv
    at_valley.terminal = True

    sol = solve_ivp(rhs, (0, 1e-2), [vp, 0.0], events=[below_igt, at_valley], rtol=1e-10,
                    atol=1e-13, max_step=c * r_on / 20)
    t_igt = sol.t_events[0][0] if sol.t_events[0].size else np.inf
    t_vv = sol.t_events[1][0]
    return min(t_igt, t_vv), t_vv, float(sol.y_events[1][0][1])


@pytest.mark.parametrize("case", [
    dict(G9, vgt=G9_VGT_C, r_gk=G9_RGK, igt=G9_IGT_C),                   # capped at the valley
    dict(G9, vgt=G9_VGT_C, r_gk=G9_RGK, igt=0.12),                        # ends on IGT
    dict(G9, vgt=1.5, r_gk=330.0, igt=40e-3, n_gates=2),                  # two gates share it
    dict(G9, vgt=1.2, r_gk=1e3, igt=30e-3, n=2.0, series_r=10.0),         # through 2:1
])
def test_pulse_width_against_ivp(case):
    """Independent: scipy solve_ivp of the gate-loaded discharge, width within 0.5 %."""
    case = dict(case)
    n, n_gates = case.pop("n", 1.0), case.pop("n_gates", 1)
    igt, r_gk = case.pop("igt"), case.pop("r_gk")
    p = gate.discharge_pulse(vp=case["vp"], vd=case["vd"], r_on=case["r_on"], r1=case["r1"],
                             series_r=case["series_r"], c=case["c"], vgt=case["vgt"],
                             vv=case["vv"], n=n)
    t_w = float(gate.pulse_width(pulse=p, igt=igt, vgt=case["vgt"], r_gk=r_gk,
                                 n_gates=n_gates))
    t_ivp, t_vv, vs_ivp = _ujt_gate_ivp(vp=case["vp"], vd=case["vd"], r_on=case["r_on"],
                                        r1=case["r1"], rs=case["series_r"], c=case["c"],
                                        vgt=case["vgt"], r_gk=r_gk, igt=igt, vv=case["vv"],
                                        n=n, n_gates=n_gates)
    assert rel(t_w, t_ivp) < NUM
    assert rel(float(p.t_end), t_vv) < NUM
    assert rel(float(gate.primary_volt_seconds(pulse=p)), vs_ivp) < NUM


def test_volt_seconds_shortcut_factor():
    # [recomputed] gate-drive.md: E·t overstates the exponential pulse by 1.58 at t = τ_g
    p = gate.Pulse(tau=np.asarray(1.0), i_c0=np.asarray(15.0), t_end=np.asarray(1.0),
                   r_p=np.asarray(1.0), v_x=np.asarray(0.0), rs_p=np.asarray(1.0),
                   vgt_p=np.asarray(0.0), r1=np.asarray(1.0), n=np.asarray(1.0))
    vs = float(gate.primary_volt_seconds(pulse=p))
    assert 15.0 * 1.0 / vs == pytest.approx(1.58, abs=5e-3)
    # Independent: trapezoid integral of 15·e^(−t) on a fine grid
    t = np.linspace(0, 1, 200001)
    assert vs == pytest.approx(np.trapezoid(15 * np.exp(-t), t), rel=1e-8)


def test_g9_latch_time_resistive():
    # 100 Ω, IL = 40 mA at 25 °C → IL_c = 61.5 mA, 207 V low line  [recomputed] G9
    il_c = 40e-3 * (1 + 35 / 65)
    vm = 207 * np.sqrt(2)
    w = 2 * np.pi * 50
    t_req, lim = gate.required_width_resistive(alpha=0.0, il=il_c, r=100.0, vm=vm, omega=w,
                                               tgt=2e-6)
    assert float(np.degrees(np.pi - lim)) == pytest.approx(1.205, abs=1e-3)
    assert float(np.degrees(lim)) == pytest.approx(178.80, abs=5e-3)
    # a single 40.1 µs pulse latches for every α ≥ 0.52°
    alpha = np.radians(np.array([0.50, 0.54]))
    t_req, _ = gate.required_width_resistive(alpha=alpha, il=il_c, r=100.0, vm=vm, omega=w,
                                             tgt=2e-6)
    assert (t_req > 40.1e-6).tolist() == [True, False]
    # Independent: the instant the sine current reaches IL, by bisection on Vm·sin(θ)/R
    lo, hi = 0.0, np.pi / 2
    for _ in range(100):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if vm * np.sin(mid) / 100 < il_c else (lo, mid)
    t0, _ = gate.required_width_resistive(alpha=0.0, il=il_c, r=100.0, vm=vm, omega=w, tgt=0.0)
    assert float(t0) == pytest.approx(lo / w, rel=1e-9)


def test_g9_average_power():
    # at 100 pulses/s: δ = τ_g·f = 0.0021, average ≤ 1.71 mW  [recomputed] G9
    p = gate.discharge_pulse(**G9, vgt=G9_VGT_C)
    duty = float(p.tau) * 100
    assert duty == pytest.approx(0.0021, abs=5e-5)
    assert 0.816 * duty == pytest.approx(1.71e-3, abs=1e-5)


# ------------------------------------------------------------------ book examples

def test_g1_rashid_10_11_rl_pulse_width():
    vm, w, r, l, alpha, il = 120 * np.sqrt(2), 2 * np.pi * 60, 10.0, 10e-3, np.radians(30), 0.5
    # the shortcut as printed: Vm sin α = 84.85 V, di/dt = 8485 A/s, t1 = 58.93 µs
    assert vm * np.sin(alpha) == pytest.approx(84.85, rel=BOOK)    # Rashid 4e Ex 10.11 [book]
    t_short = l * il / (vm * np.sin(alpha))
    assert t_short == pytest.approx(58.93e-6, rel=BOOK)            # Rashid 4e Ex 10.11 [book]
    assert t_short + 1.5e-6 == pytest.approx(60.43e-6, rel=BOOK)   # Rashid 4e Ex 10.11 [book]
    t = float(gate.time_to_current_rl(alpha=alpha, r=r, l=l, vm=vm, omega=w, i_target=il))
    assert t == pytest.approx(59.53e-6, rel=1e-4)   # [recomputed] from Rashid 4e Ex 10.11 inputs
    assert t + 1.5e-6 == pytest.approx(61.03e-6, rel=1e-4)
    assert 1 - t_short / t == pytest.approx(0.010, abs=1e-3)       # the shortcut 1.0 % short


def _rl_ivp_time(*, vm: float, w: float, r: float, l: float, alpha: float,  # noqa: E741
                 il: float) -> float:
    """Independent: L·di/dt = Vm·sin(ωt) − R·i from i = 0 at ωt = α, until i = il."""
    def hit(t: float, y: np.ndarray) -> float:
        return y[0] - il
    hit.terminal = True
    t0 = alpha / w
    sol = solve_ivp(lambda t, y: [(vm * np.sin(w * t) - r * y[0]) / l], (t0, t0 + 1 / 60),
                    [0.0], events=hit, rtol=1e-11, atol=1e-14, max_step=1e-6)
    return float(sol.t_events[0][0] - t0) if sol.t_events[0].size else np.inf


@pytest.mark.parametrize("r, l, alpha_deg, il", [
    (10.0, 10e-3, 30.0, 0.5),      # Rashid 4e Ex 10.11 inputs
    (10.0, 10e-3, 150.0, 0.5),     # late in the half-cycle
    (50.0, 0.5, 5.0, 0.2),         # strongly inductive, early
    (2e3, 1e-3, 5.0, 40e-3),       # nearly resistive: the current follows the sine
    (20.0, 0.1, 90.0, 1.5),
])
def test_rl_time_against_ivp(r, l, alpha_deg, il):  # noqa: E741
    vm, w = 230 * np.sqrt(2), 2 * np.pi * 50
    if (r, l) == (10.0, 10e-3):
        vm, w = 120 * np.sqrt(2), 2 * np.pi * 60
    t = float(gate.time_to_current_rl(alpha=np.radians(alpha_deg), r=r, l=l, vm=vm, omega=w,
                                      i_target=il))
    assert rel(t, _rl_ivp_time(vm=vm, w=w, r=r, l=l, alpha=np.radians(alpha_deg), il=il)) < NUM


def test_rl_time_never_and_vectorised():
    vm, w = 230 * np.sqrt(2), 2 * np.pi * 50
    alpha = np.radians([30.0, 60.0, 179.0])
    t = gate.time_to_current_rl(alpha=alpha, r=100.0, l=0.1, vm=vm, omega=w, i_target=0.5)
    each = [float(gate.time_to_current_rl(alpha=a, r=100.0, l=0.1, vm=vm, omega=w,
                                          i_target=0.5)) for a in alpha]
    assert t.tolist() == each
    assert np.isinf(t[2])  # fired at 179°: the current dies out before 0.5 A


def test_rl_latch_limit_against_ivp():
    """The latest α that still latches: at it, the current's peak equals IL (solve_ivp)."""
    vm, w, r, l, il = 230 * np.sqrt(2), 2 * np.pi * 50, 200.0, 0.3, 0.6  # noqa: E741
    lim = float(gate.latch_limit_rl(r=r, l=l, vm=vm, omega=w, i_target=il))
    t0 = lim / w

    def off(t: float, y: np.ndarray) -> float:  # the SCR stops conducting at current zero
        return y[0]
    off.terminal, off.direction = True, -1
    sol = solve_ivp(lambda t, y: [(vm * np.sin(w * t) - r * y[0]) / l], (t0, t0 + 0.02),
                    [0.0], events=off, rtol=1e-11, atol=1e-14, max_step=2e-6)
    assert sol.status == 1  # ended at the current zero
    assert rel(float(sol.y[0].max()), il) < NUM
    # and the first-crossing time is finite just before the limit, infinite just after
    t = gate.time_to_current_rl(alpha=np.array([lim - 1e-3, lim + 1e-3]), r=r, l=l, vm=vm,
                                omega=w, i_target=il)
    assert np.isfinite(t[0]) and np.isinf(t[1])


def test_g2_bimbhra_dc_latching():
    t = [float(gate.required_width_dc(il=0.1, r=r, l=l, v=200.0, tgt=0.0))
         for r, l in ((0.0, 0.2), (20.0, 0.2), (20.0, 2.0))]
    assert t[0] == pytest.approx(100e-6, rel=BOOK)     # Bimbhra ch. 4 (a) [book]
    assert t[1] == pytest.approx(100.5e-6, rel=BOOK)   # Bimbhra ch. 4 (b) [book]
    assert t[2] == pytest.approx(1.005e-3, rel=BOOK)   # Bimbhra ch. 4 (c) [book]
    assert t == pytest.approx([100.00e-6, 100.50e-6, 1.0050e-3], rel=1e-4)  # [recomputed]
    # Independent: L·di/dt = E − R·i from zero until i = IL
    def hit(t: float, y: np.ndarray) -> float:
        return y[0] - 0.1
    hit.terminal = True
    sol = solve_ivp(lambda t, y: [(200.0 - 20.0 * y[0]) / 0.2], (0, 1e-2), [0.0], events=hit,
                    rtol=1e-11, atol=1e-14)
    assert rel(t[1], float(sol.t_events[0][0])) < NUM
    assert np.isinf(gate.required_width_dc(il=0.1, r=2e3, l=0.2, v=200.0, tgt=0.0))


def test_g3_singhal_gupta_dc_l_load():
    t = float(gate.required_width_dc(il=80e-3, r=0.0, l=10.0, v=100.0, tgt=0.0))
    assert t == pytest.approx(8e-3, rel=BOOK)   # Singhal & Gupta Ex 1_5 [book]; [recomputed]


def test_g4_bimbhra_linear_gate():
    i, v = gate.gate_point_at_power(p=0.5, v0=0.0, r_g=130.0)
    assert float(i) == pytest.approx(62.0e-3, rel=BOOK)    # Bimbhra ch. 4 [book]
    assert float(v) == pytest.approx(8.06, rel=BOOK)       # Bimbhra ch. 4 [book]
    rs = (15.0 - v) / i
    assert float(rs) == pytest.approx(111.9, rel=BOOK)     # Bimbhra ch. 4 [book]
    assert float(i) == pytest.approx(62.017e-3, rel=1e-4)  # [recomputed]
    assert float(rs) == pytest.approx(111.87, rel=1e-4)    # [recomputed]
    # the bound E²/(4R_S) = 0.5028 W [recomputed], above the 0.5 W design point
    bound = float(gate.peak_power_bound(e_th=15.0, r_th=rs))
    assert bound == pytest.approx(0.5028, rel=1e-4) and bound > 0.5


def test_g5_bimbhra_load_line_points():
    hi, lo = gate.load_line_power_points(e=15.0, r_src=120.0, p=0.4)
    assert float(hi) == pytest.approx(86.4e-3, rel=BOOK)           # Bimbhra ch. 4 [book]
    assert float(lo) == pytest.approx(38.6e-3, rel=BOOK)           # Bimbhra ch. 4 [book]
    assert float(15 - 120 * hi) == pytest.approx(4.63, rel=BOOK)   # Bimbhra ch. 4 [book]
    assert float(15 - 120 * lo) == pytest.approx(10.37, rel=BOOK)  # Bimbhra ch. 4 [book]
    assert float(hi) == pytest.approx(86.436e-3, rel=1e-4)         # [recomputed]
    assert float(lo) == pytest.approx(38.564e-3, rel=1e-4)         # [recomputed]
    # Independent: both points dissipate 0.4 W on the load line
    for i in (hi, lo):
        assert float(i * (15 - 120 * i)) == pytest.approx(0.4, rel=1e-9)


def test_g6_bimbhra_pulse_frequency_and_duty():
    i, v = gate.gate_point_at_power(p=5.0, v0=1.0, r_g=10.0)
    assert float(i) == pytest.approx(0.659, rel=BOOK)               # Bimbhra ch. 4 [book]
    assert float(v) == pytest.approx(7.59, rel=BOOK)                # Bimbhra ch. 4 [book]
    assert float((15 - v) / i) == pytest.approx(11.25, rel=BOOK)    # Bimbhra ch. 4 [book]
    f = float(gate.max_pulse_rate(pg_av=0.3, peak_power=5.0, width=20e-6))
    assert f == pytest.approx(3000.0, rel=BOOK)                     # Bimbhra ch. 4 [book]
    assert f * 20e-6 == pytest.approx(0.06, rel=BOOK)               # Bimbhra ch. 4 [book]
    assert float(i) == pytest.approx(0.65887, rel=1e-4)             # [recomputed]
    assert float((15 - v) / i) == pytest.approx(11.248, rel=1e-4)   # [recomputed]
    assert float(v * i) == pytest.approx(5.0, rel=1e-12)            # independent: P = v·i


def test_g7_singhal_gupta_trigger_source():
    # smallest E that passes at k = 1: 0.75 + 7 mA × 2 kΩ = 14.75 V  [book: Singhal & Gupta 1_3]
    i = gate.gate_current(e_g=np.array([14.70, 14.75, 14.80]), r_src=2e3, vgt=0.75)
    from checks.core import grade
    _, status = grade(i / 7e-3, {"fail_below": 1.0, "marginal_below": 1.0})
    assert status.tolist() == [2, 0, 0]
    assert float(i[1]) == pytest.approx(7e-3, rel=1e-9)


def test_g8_singhal_gupta_half_cycle_gate_signal():
    # δ = 0.5 and PG(AV) = 0.6 W: peak 1.2 W [book: Singhal & Gupta Ex 1_4]
    p_peak = 0.6 / 0.5
    assert p_peak == pytest.approx(1.2, rel=BOOK)
    i, v = gate.gate_point_at_power(p=p_peak, v0=1.0, r_g=9.0)
    assert float(i) == pytest.approx(0.314, rel=BOOK)             # [book: Singhal & Gupta]
    assert float(v) == pytest.approx(3.824, rel=BOOK)             # [book: Singhal & Gupta]
    assert float((25 - v) / i) == pytest.approx(67.48, rel=BOOK)  # [book: Singhal & Gupta]
    assert float(i) == pytest.approx(0.31379, rel=1e-4)           # [recomputed]
    assert float((25 - v) / i) == pytest.approx(67.483, rel=1e-4)


def test_g10_light_resistive_load():
    w, il_c = 2 * np.pi * 50, 40e-3
    for vs, onset, need in ((230.0, 14.24, 0.513e-3), (207.0, 15.86, 0.603e-3)):
        t, lim = gate.required_width_resistive(alpha=np.radians(5.0), il=il_c, r=2e3,
                                               vm=vs * np.sqrt(2), omega=w, tgt=0.0)
        assert float(np.degrees(np.pi - lim)) == pytest.approx(onset, abs=5e-3)  # [recomputed]
        assert float(t) == pytest.approx(need, rel=1e-3)                          # [recomputed]
        # Independent: solve_ivp of a (nearly) resistive R–L load from α = 5°
        t_ivp = _rl_ivp_time(vm=vs * np.sqrt(2), w=w, r=2e3, l=1e-4, alpha=np.radians(5.0),
                             il=il_c)
        assert rel(float(t), t_ivp) < NUM
    _, lim = gate.required_width_resistive(alpha=0.0, il=il_c, r=2e3, vm=230 * np.sqrt(2),
                                           omega=w, tgt=0.0)
    assert float(np.degrees(lim)) == pytest.approx(165.76, abs=5e-3)  # [recomputed] G10
    lim_rl = gate.latch_limit_rl(r=2e3, l=1e-6, vm=230 * np.sqrt(2), omega=w, i_target=il_c)
    assert float(lim_rl) == pytest.approx(float(lim), abs=1e-5)        # R–L → R limit
    # R = 10 kΩ: peak 32.5 mA < IL_c, never latches  [recomputed] G10
    t, lim = gate.required_width_resistive(alpha=np.radians(5.0), il=il_c, r=10e3,
                                           vm=230 * np.sqrt(2), omega=w, tgt=0.0)
    assert np.isinf(t) and np.isnan(lim)
    # α beyond the latch limit: no width helps
    t, _ = gate.required_width_resistive(alpha=np.radians(170.0), il=il_c, r=2e3,
                                         vm=230 * np.sqrt(2), omega=w, tgt=0.0)
    assert np.isinf(t)


def test_g11_transformer_common_mode_noise():
    lim = {"fail_below": 1.0, "marginal_below": 1.0}
    out = gate.noise_check(device="ujt", coupling="transformer", series_r=10.0, vgd=0.2,
                           r_gk=1e3, c_cc=20e-12, dvdt=200e6, limits=lim)
    assert float(out.values["coupled_current"]) == pytest.approx(4e-3, rel=EXACT)  # G11
    assert float(out.values["noise_voltage"]) == pytest.approx(4.0, rel=EXACT)     # G11
    assert int(out.status) == 2
    assert float(out.values["r_gk_max"]) == pytest.approx(50.0, rel=EXACT)        # G11 ≤ 50 Ω
    hot = gate.noise_check(device="ujt", coupling="transformer", series_r=10.0, vgd=0.2,
                           r_gk=1e3, c_cc=20e-12, dvdt=1000e6, limits=lim)
    assert float(hot.values["coupled_current"]) == pytest.approx(20e-3, rel=EXACT)  # G11
    # no gate–cathode resistor with a coupled current: undefined, fails
    bare = gate.noise_check(device="ujt", coupling="transformer", series_r=10.0, vgd=0.2,
                            c_cc=20e-12, dvdt=200e6, limits=lim)
    assert np.isnan(bare.values["noise_voltage"]) and int(bare.status) == 2


def test_o1_idle_voltage_at_the_gate():
    # Rashid 4e Ex 9.5 (O1) with R_BB = 5 / 7 / 10 kΩ: V_idle = 0.521 / 0.387 / 0.279 V
    # [recomputed]; with no R_GK the gate sees V_idle
    out = gate.noise_check(device="ujt", coupling="direct", series_r=47.0, vgd=0.2,
                           v1=30.0, r1=100.0, r2=654.0, rbb=np.array([5e3, 7e3, 10e3]),
                           limits={"fail_below": 1.0, "marginal_below": 1.25})
    assert out.values["noise_voltage"].round(3).tolist() == [0.521, 0.387, 0.279]
    assert out.status.tolist() == [2, 2, 2]
    # with R_GK = 1 kΩ the divider applies; the fix R_GK brings it to VGD/1.25 exactly
    fixed = gate.noise_check(device="ujt", coupling="direct", series_r=47.0, vgd=0.2,
                             r_gk=1e3, v1=30.0, r1=100.0, r2=654.0, rbb=7e3,
                             limits={"fail_below": 1.0, "marginal_below": 1.25})
    r_max = float(fixed.values["r_gk_max"])
    at_fix = gate.noise_check(device="ujt", coupling="direct", series_r=47.0, vgd=0.2,
                              r_gk=r_max, v1=30.0, r1=100.0, r2=654.0, rbb=7e3,
                              limits={"fail_below": 1.0, "marginal_below": 1.25})
    assert float(at_fix.values["noise_voltage"]) == pytest.approx(0.16, rel=1e-9)
    # independent: the divider by hand, R1∥(RBB + R2) + R_S in series with R_GK
    r_out = 100 * 7654 / 7754
    v_idle = 100 * 30 / 7754
    assert float(fixed.values["noise_voltage"]) == pytest.approx(
        v_idle * 1e3 / (r_out + 47 + 1e3), rel=1e-12)


def test_o2_boylestad_pulse_rate():
    # Boylestad ch. 17 (O2): f = 196 Hz [book]; 196.38 Hz [recomputed]
    out = gate.average_power_check(device="ujt", v1=12.0, eta=0.6, rbb=5e3, r1=100.0, r2=0.0,
                                   vd=0.7, r_on=100.0, series_r=47.0, c=0.1e-6, rt=50e3,
                                   vv=1.0, pg_av=0.5,
                                   limits={"fail_below": 1.0, "marginal_below": 1.0})
    assert float(out.values["pulse_rate"]) == pytest.approx(196.38, rel=1e-4)
    assert float(out.values["pulse_rate"]) == pytest.approx(196, rel=BOOK)
    # duty = τ_g·f, average = peak·duty
    assert float(out.values["average_power"]) == pytest.approx(
        float(out.values["peak_power"] * out.values["tau"] * out.values["pulse_rate"]),
        rel=1e-12)


def test_o2_boylestad_pulse_amplitude():
    # peak across R1 with the gate absent: R1·(VP − 0.7)/(R1 + r_on) = 3.647 V [recomputed] O2
    e_g, _, _, _ = gate.thevenin(vp=7.9941, vd=0.7, r_on=100.0, r1=100.0, series_r=0.0)
    assert float(e_g) == pytest.approx(3.647, rel=5e-4)


def test_put_trigger_current():
    # checks.md: for a PUT, i_G = (VP − VF − VGT)/series_r (no R_GK)
    lim = {"fail_below": 1.0, "marginal_below": 2.0}
    out = gate.trigger_check(device="put", v1=24.0, r_upper=20e3, r_lower=20e3, offset=0.6,
                             vf=1.2, r_k=100.0, series_r=220.0, igt=200e-6,
                             igt_cold=np.nan, igt_cold_at=np.nan, vgt=0.8, vgt_cold=np.nan,
                             vgt_cold_at=np.nan, t_min=298.15, limits=lim)
    assert float(out.values["gate_current"]) == pytest.approx((12.6 - 1.2 - 0.8) / 220,
                                                              rel=1e-12)


def test_trigger_fix_is_the_boundary():
    """series_r_max is the R_S at which i_G = k·IGT_c exactly (k = marginal_below)."""
    kw = dict(device="ujt", v1=30.0, eta=0.51, rbb=7e3, r1=100.0, r2=654.0, vd=0.5,
              r_on=10.0, r_gk=1e3, igt=10e-3, igt_cold=np.nan, igt_cold_at=np.nan, vgt=1.0,
              vgt_cold=np.nan, vgt_cold_at=np.nan, t_min=263.15,
              limits={"fail_below": 1.0, "marginal_below": 2.0})
    out = gate.trigger_check(series_r=1e3, **kw)
    assert int(out.status) == 2
    rs = float(out.values["series_r_max"])
    at = gate.trigger_check(series_r=rs, **kw)
    assert float(at.values["gate_current"] / at.values["required_current"]) == pytest.approx(
        2.0, rel=1e-12)


def test_peak_power_fix_is_the_boundary():
    kw = dict(device="ujt", v1=30.0, eta=0.51, rbb=7e3, r1=100.0, r2=654.0, vd=0.5,
              r_on=10.0, r_gk=1e3, pgm=0.5, limits={"fail_below": 1.0, "marginal_below": 1.0})
    rs = float(gate.peak_power_check(series_r=47.0, **kw).values["series_r_min"])
    assert float(gate.peak_power_check(series_r=rs, **kw).values["peak_power"]) == \
        pytest.approx(0.5, rel=1e-12)


def test_latch_check_vectorised_over_rows():
    """One call over many rows equals the rows one at a time (no per-row state)."""
    kw = dict(device="ujt", load="ac", v1=30.0, eta=0.51, rbb=7e3, r1=100.0, r2=654.0,
              vd=0.5, r_on=10.0, series_r=47.0, r_gk=1e3, c=0.5e-6, vv=3.5, igt=10e-3,
              igt_cold=np.nan, igt_cold_at=np.nan, vgt=1.0, vgt_cold=np.nan,
              vgt_cold_at=np.nan, il=40e-3, il_cold=np.nan, il_cold_at=np.nan, t_min=263.15,
              tgt=2e-6, f=50.0, r_load=100.0, limits={"fail_below": 1.0, "marginal_below": 1.0})
    alpha = np.radians([0.0, 0.3, 10.0, 90.0, 170.0])
    l_load = np.array([0.0, 0.0, 0.05, 0.05, 0.0])
    v_s = np.array([207.0, 230.0, 207.0, 253.0, 207.0])
    out = gate.latch_time_check(alpha=alpha, l_load=l_load, v_s=v_s, **kw).broadcast(5)
    for k in range(alpha.size):
        one = gate.latch_time_check(alpha=alpha[k], l_load=l_load[k], v_s=v_s[k], **kw)
        for name in ("pulse_width", "required_width", "latch_limit_angle"):
            assert float(one.values[name]) == pytest.approx(float(out.values[name][k]),
                                                            rel=1e-9, nan_ok=True)
        assert int(one.status) == int(out.status[k])
