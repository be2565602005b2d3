"""Tests of checks.oscillator against published worked examples and independent integration.

Printed [book] values are checked to 0.5 %; [recomputed] values, printed to 4–5 figures, to half
a unit in their last printed digit (the closed forms themselves agree with the independent
solutions below to solver precision). Independent checks integrate the circuit with scipy's
solve_ivp, solve the resistor networks by nodal analysis, or take numerical derivatives.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad, solve_ivp
from scipy.optimize import brentq

from checks import oscillator as osc
from checks.core import FAIL, MARGINAL, PASS

BOOK = 5e-3  # 0.5 % relative, for book values printed to 3–4 significant figures
LIM_WINDOW = {"fail_below": 1.2, "marginal_below": 2.0}
LIM_RATIO = {"fail_below": 1.0, "marginal_below": 1.0}
LIM_IDLE = {"fail_below": 1.0, "marginal_below": 1.25}
LIM_LEAK = {"fail_below": 1.0, "marginal_below": 2.0}


def printed(text: str) -> object:
    """pytest.approx for a value printed as ``text``: half a unit in its last digit."""
    decimals = len(text.split(".")[1]) if "." in text else 0
    return pytest.approx(float(text), abs=0.5 * 10 ** -decimals * 1.0001)


def book(x: float) -> object:
    return pytest.approx(x, rel=BOOK)


# --------------------------------------------------------------------------- O1

O1 = {"v1": 30.0, "eta": 0.51, "ip": 10e-6, "vv": 3.5, "iv": 10e-3, "vd": 0.5, "ct": 0.5e-6}
O1_RBB = (5e3, 7e3, 10e3)  # assumed R_BB spread
O1_R1, O1_R2, O1_RON = 100.0, 654.0, 10.0


def _o1_ujt(rbb: float, r1: float = O1_R1, r2: float = O1_R2) -> dict[str, float]:
    return {"eta": O1["eta"], "rbb": rbb, "r1": r1, "r2": r2, "vd": O1["vd"]}


def test_o1_book_values() -> None:
    # Shortcut peak point η·V1 + VD (external resistors left out)
    vp = osc.peak_voltage(device="ujt", v1=30.0, **_o1_ujt(7e3, 0.0, 0.0))
    assert float(vp) == book(15.8)  # Rashid 4e Ex 9.5 [book]
    r_min, r_max = osc.window(v1=30.0, vp=15.8, vv=3.5, ip=10e-6, iv=10e-3)
    assert float(r_min) == book(2.65e3)  # Rashid 4e Ex 9.5 [book]
    assert float(r_max) == book(1.42e6)  # Rashid 4e Ex 9.5 [book]
    # R_T from the shortcut for 60 Hz: approx_period(R_T) = 1/60 s
    fr = osc.free_running(device="ujt", v1=30.0, rt=46.7e3, ct=0.5e-6, vv=3.5,
                          r_discharge=O1_R1, **_o1_ujt(7e3, 0.0, 0.0))
    assert float(fr["approx_period"]) == book(1 / 60)  # Rashid 4e Ex 9.5 [book]: 46.7 kΩ
    assert float(osc.base2_rule(eta=0.51, v1=30.0)) == book(654.0)  # Rashid 4e Ex 9.5 [book]
    # pulse width R1·C_T = 50 µs
    assert O1_R1 * O1["ct"] == book(50e-6)  # Rashid 4e Ex 9.5 [book]


def test_o1_recomputed_shortcut_timing() -> None:
    rt = 1 / (60 * 0.5e-6 * math.log(1 / 0.49))
    assert rt / 1e3 == printed("46.728")  # [recomputed] from Rashid 4e Ex 9.5 inputs
    t1 = osc.charge_time(r=rt, c=0.5e-6, v1=30.0, v0=3.5, vp=15.8)
    assert float(t1) * 1e3 == printed("14.577")  # [recomputed] from Rashid 4e Ex 9.5 inputs
    assert 1 / float(t1) == printed("68.6")  # [recomputed] from Rashid 4e Ex 9.5 inputs
    t_first = osc.charge_time(r=rt, c=0.5e-6, v1=30.0, v0=0.0, vp=15.8)
    assert float(t_first) * 1e3 == printed("17.475")  # [recomputed] from Rashid 4e Ex 9.5
    r60 = (1 / 60) / (0.5e-6 * math.log((30 - 3.5) / (30 - 15.8)))
    assert r60 / 1e3 == printed("53.43")  # [recomputed] from Rashid 4e Ex 9.5 inputs
    assert float(osc.base2_rule(eta=0.51, v1=30.0)) == printed("653.6")  # [recomputed]


@pytest.mark.parametrize(("rbb", "vp", "t1_ms", "t2_us", "f"), [
    (5e3, "14.316", "12.255", "77.5", "81.09"),
    (7e3, "14.699", "12.832", "78.9", "77.45"),
    (10e3, "15.006", "13.306", "80.1", "74.70"),
])
def test_o1_recomputed_with_divider(rbb: float, vp: str, t1_ms: str, t2_us: str, f: str) -> None:
    # [recomputed] from Rashid 4e Ex 9.5 inputs with R1 = 100 Ω, R2 = 654 Ω, r_on = 10 Ω assumed
    rt = 1 / (60 * 0.5e-6 * math.log(1 / 0.49))
    out = osc.free_running(device="ujt", v1=30.0, rt=rt, ct=0.5e-6, vv=3.5,
                           r_discharge=O1_RON + O1_R1, **_o1_ujt(rbb))
    assert float(out["peak_voltage"]) == printed(vp)
    assert float(out["charge_time"]) * 1e3 == printed(t1_ms)
    assert float(out["discharge_time"]) * 1e6 == printed(t2_us)
    assert float(out["frequency"]) == printed(f)


@pytest.mark.parametrize(("rbb", "idle", "p_bar", "p_all", "i_pk", "w_uj"), [
    (5e3, "0.521", "0.136", "0.156", "125.6", "51.24"),
    (7e3, "0.387", "0.105", "0.116", "129.1", "54.02"),
    (10e3, "0.279", "0.078", "0.084", "131.9", "56.30"),
])
def test_o1_recomputed_checks(rbb: float, idle: str, p_bar: str, p_all: str, i_pk: str,
                              w_uj: str) -> None:
    # [recomputed] from Rashid 4e Ex 9.5 inputs (R_BB, r_on = 10 Ω, VGD = 0.2 V assumed)
    ig = osc.idle_gate_check(device="ujt", vgd=0.2, series_r=0.0, v1=30.0, rbb=rbb, r1=O1_R1,
                             r2=O1_R2, limits=LIM_IDLE)
    assert float(ig.values["idle_voltage"]) == printed(idle)
    assert int(ig.status) == FAIL  # all exceed VGD = 0.2 V
    dis = osc.dissipation_check(device="ujt", v1=30.0, pd=0.3, t_max_ambient=328.15,
                                t_max_rise=0.0, limits=LIM_RATIO, **_o1_ujt(rbb))
    assert float(dis.values["dissipation"]) == printed(p_bar)
    assert float(dis.values["circuit_power"]) == printed(p_all)
    assert float(dis.values["allowed_power"]) == printed("0.21")
    assert int(dis.status) == PASS
    dc = osc.discharge_check(device="ujt", v1=30.0, ct=0.5e-6, r_pulse=O1_R1, rb1_on=O1_RON,
                             current_rating=2.0, limits=LIM_RATIO, **_o1_ujt(rbb))
    assert float(dc.values["peak_current"]) * 1e3 == printed(i_pk)
    assert float(dc.values["pulse_energy"]) * 1e6 == printed(w_uj)


def test_o1_energy_with_shortcut_peak() -> None:
    w = osc.discharge_check(device="ujt", v1=30.0, ct=0.5e-6, r_pulse=O1_R1,
                            limits=LIM_RATIO, **_o1_ujt(7e3, 0.0, 0.0)).values["pulse_energy"]
    assert float(w) * 1e6 == printed("62.4")  # [recomputed] from Rashid 4e Ex 9.5 inputs


def test_o1_temp_comp() -> None:
    # [recomputed] from Rashid 4e Ex 9.5 inputs, R_BB = 7 kΩ and TC_BB = 0.5 %/K assumed
    small = 0.4 * 7e3 / (0.51 * 30) + 0.49 * 100 / 0.51
    assert small == printed("279")
    exact = osc.base2_physical(eta=0.51, rbb=7e3, r1=100.0, v1=30.0, tc_bb=0.005)
    assert float(exact) == printed("301")
    out = osc.temp_comp_check(eta=0.51, v1=30.0, r2=654.0, limits={"low": 0.3, "high": 3.0})
    assert int(out.status) == PASS


def test_temp_comp_physical_by_numerical_derivative() -> None:
    # independent: the R2 at which a numerical dVP/dT vanishes (VD −2 mV/K, R_BB +0.5 %/K)
    def dvp_dt(r2: float) -> float:
        def vp(dt: float) -> float:
            return float(osc.ujt_peak_voltage(v1=30.0, eta=0.51, rbb=7e3 * (1 + 0.005 * dt),
                                              r1=100.0, r2=r2, vd=0.5 - 2e-3 * dt))
        return (vp(1e-3) - vp(-1e-3)) / 2e-3

    r2 = brentq(dvp_dt, 100.0, 1000.0, xtol=1e-9)
    exact = osc.base2_physical(eta=0.51, rbb=7e3, r1=100.0, v1=30.0, tc_bb=0.005)
    assert float(exact) == pytest.approx(r2, rel=1e-6)


def test_o1_idle_and_dissipation_by_nodal_analysis() -> None:
    # independent: solve the V1–R2–bar–R1 network for its node voltages
    for rbb in O1_RBB:
        g = np.array([[1 / O1_R2 + 1 / rbb, -1 / rbb], [-1 / rbb, 1 / rbb + 1 / O1_R1]])
        b2, b1 = np.linalg.solve(g, np.array([30.0 / O1_R2, 0.0]))
        ig = osc.idle_gate_check(device="ujt", vgd=0.2, series_r=0.0, v1=30.0, rbb=rbb,
                                 r1=O1_R1, r2=O1_R2, limits=LIM_IDLE)
        assert float(ig.values["idle_voltage"]) == pytest.approx(b1, rel=1e-9)
        dis = osc.dissipation_check(device="ujt", v1=30.0, pd=0.3, t_max_ambient=300.0,
                                    t_max_rise=0.0, limits=LIM_RATIO, **_o1_ujt(rbb))
        assert float(dis.values["dissipation"]) == pytest.approx((b2 - b1) ** 2 / rbb, rel=1e-9)


def test_idle_gate_with_gate_cathode_resistor_by_nodal_analysis() -> None:
    # independent: node B1 loaded by R_S + R_GKx to common; v_GK across R_GKx
    rbb, r1, r2, rs, rgk, v1 = 6e3, 100.0, 470.0, 47.0, 1e3, 24.0
    g = np.array([[1 / r2 + 1 / rbb, -1 / rbb], [-1 / rbb, 1 / rbb + 1 / r1 + 1 / (rs + rgk)]])
    _, b1 = np.linalg.solve(g, np.array([v1 / r2, 0.0]))
    out = osc.idle_gate_check(device="ujt", vgd=0.2, series_r=rs, gate_cathode_r=rgk, v1=v1,
                              rbb=rbb, r1=r1, r2=r2, limits=LIM_IDLE)
    assert float(out.values["idle_voltage"]) == pytest.approx(b1 * rgk / (rs + rgk), rel=1e-9)


# --------------------------------------------------------------------------- O2

O2 = {"eta": 0.6, "rbb": 5e3, "r1": 100.0, "r2": 0.0, "vd": 0.7}


def test_o2_book_values() -> None:
    out = osc.free_running(device="ujt", v1=12.0, rt=50e3, ct=0.1e-6, vv=1.0,
                           r_discharge=100.0 + 100.0, **O2)
    assert float(out["peak_voltage"]) == book(8.0)  # Boylestad ch. 17 [book]
    r_min, r_max = osc.window(v1=12.0, vp=out["peak_voltage"], vv=1.0, ip=10e-6, iv=10e-3)
    assert float(r_min) == book(1.1e3)  # Boylestad ch. 17 [book]
    assert float(r_max) == book(400e3)  # Boylestad ch. 17 [book]
    assert float(out["charge_time"]) == book(5.05e-3)  # Boylestad ch. 17 [book]
    assert float(out["discharge_time"]) == book(41.6e-6)  # Boylestad ch. 17 [book]
    assert float(out["period"]) == book(5.092e-3)  # Boylestad ch. 17 [book]
    assert float(out["frequency"]) == book(196.0)  # Boylestad ch. 17 [book]
    assert 1 / float(out["approx_period"]) == book(218.0)  # Boylestad ch. 17 [book]


def test_o2_recomputed() -> None:
    # [recomputed] from Boylestad ch. 17 inputs
    out = osc.free_running(device="ujt", v1=12.0, rt=50e3, ct=0.1e-6, vv=1.0,
                           r_discharge=200.0, **O2)
    assert float(out["peak_voltage"]) == printed("7.9941")
    _, r_max = osc.window(v1=12.0, vp=out["peak_voltage"], vv=1.0, ip=10e-6, iv=10e-3)
    assert float(r_max) / 1e3 == printed("400.6")
    assert float(out["charge_time"]) * 1e3 == printed("5.0507")
    assert float(out["discharge_time"]) * 1e6 == printed("41.57")
    assert float(out["period"]) * 1e3 == printed("5.0922")
    assert float(out["frequency"]) == printed("196.38")
    assert 1 / float(out["approx_period"]) == printed("218.27")
    assert (out["frequency"] / (1 / out["approx_period"]) - 1) == pytest.approx(-0.1003, abs=5e-4)
    ig = osc.idle_gate_check(device="ujt", vgd=0.2, series_r=0.0, v1=12.0, rbb=5e3, r1=100.0,
                             r2=0.0, limits=LIM_IDLE)
    assert float(ig.values["idle_voltage"]) == printed("0.235")
    assert int(ig.status) == FAIL
    dc = osc.discharge_check(device="ujt", v1=12.0, ct=0.1e-6, r_pulse=100.0, rb1_on=100.0,
                             current_rating=1.0, limits=LIM_RATIO, **O2)
    assert float(dc.values["peak_current"]) * 100.0 == printed("3.647")


# --------------------------------------------------------------------------- O3, O4 (PUT)

def test_o3_book_values() -> None:
    p = {"r_upper": 60e3, "r_lower": 30e3, "offset": 0.0}
    vp = osc.peak_voltage(device="put", v1=30.0, **p)
    assert float(vp) == book(10.0)  # Rashid 4e Ex 9.6 [book]
    assert float(osc.divider_ratio(device="put", **p)) == book(1 / 3)  # Rashid 4e Ex 9.6 [book]
    assert book(20e3) == 60e3 * 30e3 / 90e3  # Rashid 4e Ex 9.6 [book]: R_G
    fr = osc.free_running(device="put", v1=30.0, rt=82.2e3, ct=0.5e-6, vv=1.0,
                          r_discharge=100.0, **p)
    assert float(fr["approx_period"]) == book(1 / 60)  # Rashid 4e Ex 9.6 [book]: R_T 82.2 kΩ


def test_o3_recomputed() -> None:
    # [recomputed] from Rashid 4e Ex 9.6 inputs (V_V = 1 V, I_V = 100 µA assumed)
    p = {"r_upper": 60e3, "r_lower": 30e3, "offset": 0.0}
    rt = 1 / (60 * 0.5e-6 * math.log(1.5))
    assert rt / 1e3 == printed("82.210")
    dc = osc.discharge_check(device="put", v1=30.0, ct=0.5e-6, r_pulse=100.0, vf=1.0,
                             energy_rating=1e-3, limits=LIM_RATIO, **p)
    assert float(dc.values["pulse_energy"]) * 1e6 == printed("25.0")
    lk = osc.leakage_check(device="put", v1=30.0, rt=rt, ip=5e-6, leakage=0.0, ct=0.5e-6,
                           limits=LIM_LEAK, **p)
    assert float(lk.values["charge_current"]) * 1e6 == printed("243")
    assert (30 - 1) / rt * 1e6 == printed("353")
    w = osc.window_check(device="put", v1=np.array([30.0]), rt=np.array([rt]), vv=1.0,
                         ip=5e-6, iv=100e-6, limits=LIM_WINDOW, **p)
    assert float(w.values["r_min"][0]) / 1e3 == printed("290")
    assert int(w.status[0]) == FAIL  # the PUT would stay on


def test_o4_recomputed() -> None:
    # [recomputed] from Boylestad PUT-example inputs recalled [memory]
    p = {"r_upper": 5e3, "r_lower": 10e3, "offset": 0.7}
    assert float(osc.divider_ratio(device="put", **p)) == printed("0.6667")
    vp = osc.peak_voltage(device="put", v1=12.0, **p)
    assert float(vp) == printed("8.7")
    r_min, r_max = osc.window(v1=12.0, vp=vp, vv=1.0, ip=100e-6, iv=5.5e-3)
    assert float(r_max) / 1e3 == printed("33")
    assert float(r_min) / 1e3 == printed("2")
    first = osc.charge_time(r=20e3, c=1e-6, v1=12.0, v0=0.0, vp=vp)
    assert float(first) * 1e3 == printed("25.82")
    assert 1 / float(first) == printed("38.73")
    steady = osc.free_running(device="put", v1=12.0, rt=20e3, ct=1e-6, vv=1.0,
                              r_discharge=100.0, **p)["charge_time"]
    assert float(steady) * 1e3 == printed("24.08")


# --------------------------------------------------------------------------- O5

def test_o5_one_liners() -> None:
    vp = osc.peak_voltage(device="ujt", v1=20.0, eta=0.6, rbb=10e3, r1=0.0, r2=0.0, vd=0.7)
    assert float(vp) == book(12.7)  # EDC Ex 9.1–9.3 [book]
    fr = osc.free_running(device="ujt", v1=20.0, rt=100e3, ct=1000e-12, vv=1.0, r_discharge=1.0,
                          eta=0.5, rbb=10e3, r1=0.0, r2=0.0, vd=0.7)
    assert float(fr["approx_period"]) == book(69.31e-6)  # EDC Ex 9.1–9.3 [book]
    assert float(fr["approx_period"]) * 1e6 == printed("69.315")  # [recomputed]
    fr = osc.free_running(device="ujt", v1=40.0, rt=50e3, ct=2000e-12, vv=1.0, r_discharge=1.0,
                          eta=0.375, rbb=10e3, r1=0.0, r2=0.0, vd=0.0)
    assert float(fr["approx_period"]) == book(47e-6)  # Chattopadhyay & Rakshit ch. 16 Ex 1
    assert float(fr["approx_period"]) * 1e6 == printed("47.00")  # [recomputed]
    vp = osc.peak_voltage(device="ujt", v1=12.0, eta=0.75, rbb=6e3, r1=0.0, r2=0.0, vd=0.7)
    assert float(vp) == book(9.7)  # Sedha Ex 12.3 [book]
    # r_B1 = 4 kΩ, r_B2 = 2.5 kΩ: η = r_B1/R_BB
    vp = osc.peak_voltage(device="ujt", v1=15.0, eta=4e3 / 6.5e3, rbb=6.5e3, r1=0.0, r2=0.0,
                          vd=0.7)
    assert book(0.615) == 4e3 / 6.5e3  # Sedha Ex 12.4 [book]
    assert float(vp) == book(9.93)  # Sedha Ex 12.4 [book]
    assert float(vp) == printed("9.931")  # [recomputed]


# --------------------------------------------------------------------------- O6, O7

LINE = {"vm": 230 * math.sqrt(2), "omega": 2 * math.pi * 50, "vz": 20.0}
O6_UJT = {"eta": 0.63, "rbb": 7e3, "r1": 0.0, "r2": 0.0, "vd": 0.5}


def test_o6_recomputed() -> None:
    # [recomputed], all inputs assumed
    rt = np.array([10e3, 22e3, 47e3])
    assert math.degrees(float(osc.clamp_onset(vm=LINE["vm"], vz=20.0))) == printed("3.525")
    assert float(osc.peak_voltage(device="ujt", v1=20.0, **O6_UJT)) == printed("13.1")
    alpha = np.degrees(osc.line_sync_firing_angle(device="ujt", rt=rt, ct=0.1e-6, **LINE,
                                                  **O6_UJT))
    assert alpha.tolist() == pytest.approx([20.95, 43.92, 91.80], abs=5.001e-3)
    short = np.degrees(osc.firing_angle_shortcut(rt=rt, ct=0.1e-6, vp=13.1, **LINE))
    assert short.tolist() == pytest.approx([22.68, 45.67, 93.56], abs=5e-3)
    assert np.all((short - alpha > 1.7) & (short - alpha < 1.8))


def test_o7_recomputed() -> None:
    # [recomputed] from Rashid 4e Ex 9.5 inputs, shortcut VP = 15.8 V
    rt, ct = 46.728e3, 0.5e-6
    for v1, text in ((27.0, "0.6130"), (30.0, "0.6239"), (33.0, "0.6326")):
        vp = 0.51 * v1 + 0.5
        t1 = osc.charge_time(r=rt, c=ct, v1=v1, v0=3.5, vp=vp)
        assert float(t1) / (rt * ct) == printed(text)
    assert (30 - 15.8) / (rt * ct) == printed("607.8")
    dt = osc.ripple_shift(v1=30.0, vp=15.8, rt=rt, ct=ct, a=0.51, ripple=1.0)
    assert float(dt) * 1e3 == printed("0.839")
    assert float(dt) * 360 * 60 == printed("18.1")


# --------------------------------------------------------------------------- independent

def _ivp_charge(rt: float, ct: float, v1: float, v0: float, vp: float) -> float:
    ev = lambda t, v: v[0] - vp  # noqa: E731
    ev.terminal, ev.direction = True, 1
    sol = solve_ivp(lambda t, v: [(v1 - v[0]) / (rt * ct)], (0, 50 * rt * ct), [v0],
                    events=ev, rtol=1e-10, atol=1e-12)
    return float(sol.t_events[0][0])


def _ivp_discharge(r: float, ct: float, vp: float, vv: float) -> float:
    ev = lambda t, v: v[0] - vv  # noqa: E731
    ev.terminal, ev.direction = True, -1
    sol = solve_ivp(lambda t, v: [-v[0] / (r * ct)], (0, 50 * r * ct), [vp], events=ev,
                    rtol=1e-10, atol=1e-12)
    return float(sol.t_events[0][0])


FREE_GRID = [
    ("ujt", 12.0, 50e3, 0.1e-6, 1.0, 200.0, O2),
    ("ujt", 30.0, 46.728e3, 0.5e-6, 3.5, 110.0, _o1_ujt(5e3)),
    ("ujt", 30.0, 10e3, 0.5e-6, 3.5, 110.0, _o1_ujt(10e3)),
    ("ujt", 24.0, 220e3, 47e-9, 2.0, 60.0, {"eta": 0.8, "rbb": 9e3, "r1": 47.0, "r2": 330.0,
                                           "vd": 0.6}),
    ("ujt", 15.0, 4.7e3, 1e-6, 2.5, 30.0, {"eta": 0.55, "rbb": 4e3, "r1": 22.0, "r2": 1e3,
                                          "vd": 0.4}),
    ("put", 12.0, 20e3, 1e-6, 1.0, 100.0, {"r_upper": 5e3, "r_lower": 10e3, "offset": 0.7}),
    ("put", 30.0, 82.21e3, 0.5e-6, 1.0, 100.0, {"r_upper": 60e3, "r_lower": 30e3,
                                               "offset": 0.5}),
    ("put", 48.0, 1e6, 10e-9, 0.8, 470.0, {"r_upper": 100e3, "r_lower": 330e3, "offset": 1.2}),
]


@pytest.mark.parametrize(("device", "v1", "rt", "ct", "vv", "r_dis", "p"), FREE_GRID)
def test_free_running_against_solve_ivp(device: str, v1: float, rt: float, ct: float, vv: float,
                                        r_dis: float, p: dict[str, float]) -> None:
    out = osc.free_running(device=device, v1=v1, rt=rt, ct=ct, vv=vv, r_discharge=r_dis, **p)
    vp = float(out["peak_voltage"])
    t1 = _ivp_charge(rt, ct, v1, vv, vp)
    t2 = _ivp_discharge(r_dis, ct, vp, vv)
    assert float(out["charge_time"]) == pytest.approx(t1, rel=5e-3)
    assert float(out["discharge_time"]) == pytest.approx(t2, rel=5e-3)
    assert float(out["period"]) == pytest.approx(t1 + t2, rel=5e-3)


def _ivp_line(device: str, vm: float, omega: float, vz: float, rt: float, ct: float,
              p: dict[str, float]) -> float:
    """First firing angle by integration of R·C·dv/dt = min(Vm|sin ωt|, VZ) − v [rad]."""
    if device == "ujt":
        a = (p["eta"] * p["rbb"] + p["r1"]) / (p["rbb"] + p["r1"] + p["r2"])
        d = p["vd"]
    else:
        a, d = p["r_lower"] / (p["r_upper"] + p["r_lower"]), p["offset"]

    def vb(t: float) -> float:
        return min(vm * abs(math.sin(omega * t)), vz)

    ev = lambda t, v: v[0] - (a * vb(t) + d)  # noqa: E731
    ev.terminal, ev.direction = True, 1
    sol = solve_ivp(lambda t, v: [(vb(t) - v[0]) / (rt * ct)], (0, math.pi / omega), [0.0],
                    events=ev, rtol=1e-10, atol=1e-12, max_step=math.pi / omega / 4000)
    return float(sol.t_events[0][0]) * omega if sol.t_events[0].size else float("nan")


LINE_GRID = [
    ("ujt", 230.0, 50.0, 20.0, 10e3, 0.1e-6, O6_UJT),
    ("ujt", 230.0, 50.0, 20.0, 22e3, 0.1e-6, O6_UJT),
    ("ujt", 230.0, 50.0, 20.0, 47e3, 0.1e-6, O6_UJT),
    ("ujt", 230.0, 50.0, 20.0, 200e3, 0.1e-6, O6_UJT),  # fires in the supply's fall
    ("ujt", 120.0, 60.0, 24.0, 33e3, 0.22e-6, {"eta": 0.72, "rbb": 7e3, "r1": 47.0,
                                              "r2": 470.0, "vd": 0.6}),
    ("ujt", 24.0, 50.0, 18.0, 15e3, 0.47e-6, {"eta": 0.6, "rbb": 5e3, "r1": 100.0,
                                             "r2": 330.0, "vd": 0.5}),  # long ramp (θz 48.6°)
    ("ujt", 12.0, 50.0, 20.0, 4.7e3, 1e-6, {"eta": 0.55, "rbb": 6e3, "r1": 0.0, "r2": 0.0,
                                           "vd": 0.5}),  # no clamp: VZ above the peak
    ("ujt", 12.0, 50.0, 12.0, 1e3, 10e-9, {"eta": 0.5, "rbb": 6e3, "r1": 0.0, "r2": 0.0,
                                          "vd": 0.5}),  # fires on the ramp
    ("put", 230.0, 50.0, 15.0, 68e3, 0.1e-6, {"r_upper": 20e3, "r_lower": 20e3,
                                             "offset": 0.7}),
    ("put", 230.0, 50.0, 30.0, 10e3, 0.47e-6, {"r_upper": 47e3, "r_lower": 100e3,
                                              "offset": 0.5}),
]


@pytest.mark.parametrize(("device", "v_rms", "f", "vz", "rt", "ct", "p"), LINE_GRID)
def test_line_sync_against_solve_ivp(device: str, v_rms: float, f: float, vz: float, rt: float,
                                     ct: float, p: dict[str, float]) -> None:
    vm, omega = v_rms * math.sqrt(2), 2 * math.pi * f
    ref = _ivp_line(device, vm, omega, vz, rt, ct, p)
    got = float(osc.line_sync_firing_angle(device=device, vm=vm, omega=omega, vz=vz, rt=rt,
                                           ct=ct, **p))
    assert math.isfinite(ref)
    assert abs(math.degrees(got - ref)) <= max(0.05, 0.005 * math.degrees(ref))


def test_line_sync_no_firing_is_nan() -> None:
    # peak point 0.9·VZ + 1.5 V out of reach through 1 MΩ × 1 µF: no event, NaN
    p = {"r_upper": 10e3, "r_lower": 90e3, "offset": 1.5}
    ref = _ivp_line("put", 230 * math.sqrt(2), 2 * math.pi * 50, 20.0, 1e6, 1e-6, p)
    got = osc.line_sync_firing_angle(device="put", rt=1e6, ct=1e-6, **LINE, **p)
    assert math.isnan(ref)
    assert math.isnan(float(got))


def test_line_sync_vectorised_matches_rowwise() -> None:
    rng = np.random.default_rng(1)
    n = 64
    rows = {"vm": rng.uniform(0.9, 1.1, n) * 325.0, "vz": rng.uniform(15, 25, n),
            "rt": rng.uniform(5e3, 100e3, n), "eta": rng.uniform(0.55, 0.8, n)}
    base = {"omega": 2 * math.pi * 50, "ct": 0.1e-6, "rbb": 7e3, "r1": 47.0, "r2": 330.0,
            "vd": 0.5}
    together = osc.line_sync_firing_angle(device="ujt", **rows, **base)
    one_by_one = [float(osc.line_sync_firing_angle(device="ujt", **{k: v[i] for k, v in
                                                                     rows.items()}, **base))
                  for i in range(n)]
    np.testing.assert_allclose(together, one_by_one, rtol=1e-12)
    # and against integration for a few rows
    for i in range(0, n, 16):
        p = {"eta": rows["eta"][i], "rbb": 7e3, "r1": 47.0, "r2": 330.0, "vd": 0.5}
        ref = _ivp_line("ujt", rows["vm"][i], base["omega"], rows["vz"][i], rows["rt"][i],
                        0.1e-6, p)
        assert abs(math.degrees(together[i] - ref)) <= 0.05


def test_pulse_energy_by_integration() -> None:
    # independent: the energy dissipated discharging C from VP through R equals ½·C·VP²
    out = osc.discharge_check(device="put", v1=30.0, ct=0.5e-6, r_pulse=100.0, vf=1.0,
                              energy_rating=1e-3, limits=LIM_RATIO, r_upper=60e3,
                              r_lower=30e3, offset=0.0)
    tau = 100.0 * 0.5e-6
    energy, _ = quad(lambda t: (10.0 * math.exp(-t / tau)) ** 2 / 100.0, 0, 60 * tau)
    assert float(out.values["pulse_energy"]) == pytest.approx(energy, rel=1e-6)


# --------------------------------------------------------------------------- waveform

def test_capacitor_waveform_free_running() -> None:
    w = osc.capacitor_waveform(device="ujt", v1=12.0, rt=50e3, ct=0.1e-6, vv=1.0,
                               r_discharge=200.0, **O2)
    fr = osc.free_running(device="ujt", v1=12.0, rt=50e3, ct=0.1e-6, vv=1.0,
                          r_discharge=200.0, **O2)
    assert np.diff(w["pulse_times"]) == pytest.approx(float(fr["period"]), rel=1e-12)
    assert w["pulse_times"][0] == pytest.approx(float(fr["charge_time"]), rel=1e-12)
    assert w["v_c"].max() <= float(fr["peak_voltage"]) + 1e-9
    assert w["v_c"].min() >= 1.0 - 1e-9
    assert set(w) == {"t", "v_c", "v_peak_point", "supply", "pulse_times"}


def test_capacitor_waveform_line_sync() -> None:
    w = osc.capacitor_waveform(device="ujt", rt=22e3, ct=0.1e-6, vv=2.0, r_discharge=100.0,
                               **LINE, **O6_UJT)
    alpha = osc.line_sync_firing_angle(device="ujt", rt=22e3, ct=0.1e-6, **LINE, **O6_UJT)
    assert w["pulse_times"][0] * LINE["omega"] == pytest.approx(float(alpha), rel=1e-12)
    assert np.all(np.diff(w["pulse_times"]) > 0)
    assert w["supply"].max() == pytest.approx(20.0)
    assert np.all(np.isfinite(w["v_c"]))
    # before the first pulse the waveform follows the integrated charge
    t = w["t"][(w["t"] > 0) & (w["t"] < w["pulse_times"][0])]
    sol = solve_ivp(lambda tt, v: [(min(LINE["vm"] * abs(math.sin(LINE["omega"] * tt)), 20.0)
                                    - v[0]) / 2.2e-3], (0, t[-1]), [0.0], t_eval=t, rtol=1e-10,
                    atol=1e-12, max_step=1e-5)
    np.testing.assert_allclose(w["v_c"][(w["t"] > 0) & (w["t"] < w["pulse_times"][0])],
                               sol.y[0], rtol=5e-3, atol=1e-4)


# --------------------------------------------------------------------------- check functions

def test_window_missing_iv_fails() -> None:
    out = osc.window_check(device="put", v1=np.array([30.0]), rt=np.array([100e3]), vv=1.0,
                           ip=2e-6, iv=np.nan, r_upper=200e3, r_lower=100e3, offset=0.5,
                           limits=LIM_WINDOW)
    assert int(out.status[0]) == FAIL
    assert any("no guaranteed valley current at this R_G" in n for n in out.notes)


def test_window_put_rg_mismatch_note() -> None:
    kw = {"device": "put", "v1": np.array([30.0]), "rt": np.array([100e3]), "vv": 1.0,
          "ip": 2e-6, "iv": 100e-6, "r_upper": 60e3, "r_lower": 30e3, "offset": 0.5,
          "limits": LIM_WINDOW}
    assert any("R_G" in n for n in osc.window_check(rg=100e3, **kw).notes)
    assert not osc.window_check(rg=20e3, **kw).notes


def test_window_grades() -> None:
    kw = {"device": "ujt", "v1": np.array([12.0] * 4), "vv": 1.0, "ip": 10e-6, "iv": 10e-3,
          "limits": LIM_WINDOW, **O2}
    out = osc.window_check(rt=np.array([1e3, 100e3, 300e3, 500e3]), **kw)
    assert out.status.tolist() == [FAIL, PASS, MARGINAL, FAIL]


def test_timing_coverage_free_and_line() -> None:
    kw = {"device": "ujt", "v1": np.array([12.0]), "ct": 0.1e-6, "vv": 1.0,
          "r_discharge": 200.0, "limits": LIM_RATIO, **O2}
    ok = osc.timing_check(rt=50e3, adjustable=True, rt_lo=10e3, rt_hi=200e3, target_lo=100.0,
                          target_hi=500.0, **kw)
    assert int(ok.status[0]) == PASS
    short = osc.timing_check(rt=50e3, adjustable=True, rt_lo=30e3, rt_hi=200e3,
                             target_lo=100.0, target_hi=500.0, **kw)
    assert int(short.status[0]) == FAIL
    line = {"device": "ujt", "v1": np.array([20.0]), "ct": 0.1e-6, "vv": 2.0,
            "r_discharge": 100.0, "limits": LIM_RATIO, "sync": "line", "line_v": 230.0,
            "line_f": 50.0, **O6_UJT}
    ok = osc.timing_check(rt=22e3, adjustable=True, rt_lo=10e3, rt_hi=47e3,
                          target_lo=math.radians(30), target_hi=math.radians(90), **line)
    assert int(ok.status[0]) == PASS
    assert math.degrees(float(ok.values["firing_angle"][0])) == pytest.approx(43.92, abs=5e-3)
    bad = osc.timing_check(rt=22e3, adjustable=True, rt_lo=10e3, rt_hi=47e3,
                           target_lo=math.radians(15), target_hi=math.radians(90), **line)
    assert int(bad.status[0]) == FAIL


def test_leakage_and_dissipation_and_temp_comp_grades() -> None:
    kw = {"device": "ujt", "v1": 12.0, "ip": 10e-6, "ct": 0.1e-6, "limits": LIM_LEAK, **O2}
    assert int(osc.leakage_check(rt=50e3, leakage=0.0, **kw).status) == PASS
    assert int(osc.leakage_check(rt=50e3, leakage=35e-6, **kw).status) == MARGINAL
    assert int(osc.leakage_check(rt=50e3, leakage=100e-6, **kw).status) == FAIL
    dis = {"device": "ujt", "v1": 30.0, "pd": 0.3, "t_max_rise": 0.0, "limits": LIM_RATIO,
           **_o1_ujt(5e3, 100.0, 0.0)}
    assert int(osc.dissipation_check(t_max_ambient=298.15, **dis).status) == PASS
    assert int(osc.dissipation_check(t_max_ambient=358.15, **dis).status) == FAIL
    tc = {"eta": 0.6, "v1": 12.0, "limits": {"low": 0.3, "high": 3.0}}
    assert int(osc.temp_comp_check(r2=1.4e3, **tc).status) == PASS
    assert int(osc.temp_comp_check(r2=100.0, **tc).status) == MARGINAL
    assert int(osc.temp_comp_check(r2=0.0, **tc).status) == MARGINAL  # advisory: never fails
