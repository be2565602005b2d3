"""Loads with a back EMF (battery, DC motor armature) on half-wave, fully and half-controlled
bridges: worked examples from textbooks, and a time-domain simulation (scipy solve_ivp) of the
R–L–E circuit with ideal switches, continuous and discontinuous."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from checks import rle

W50, W60 = 2 * np.pi * 50, 2 * np.pi * 60
REL = 5e-3  # numerical integrals and book values to 3–4 figures: 0.5 %


# ------------------------------------------------------------------------------------------
# Time-domain simulation: per unit (Vm = 1, Z = 1), R = cos φ, ωL = sin φ, E = m.

def simulate(topology: str, freewheel: bool, alpha: float, phi: float, m: float,
             periods: int = 50) -> dict[str, float]:
    """Integrate L·di/dθ = v − R·i − E with ideal SCRs (and diodes) from rest; a gate pulse
    that comes before the line exceeds E lasts until it does (a wide pulse). Measures the last
    2π: load mean/RMS current and voltage, and SCR 1's mean/RMS current, by integrating each
    piece of the solution on a 4001-point grid."""
    r, x = np.cos(phi), np.sin(phi)
    th1 = np.arcsin(min(m, 1.0))
    step = 2 * np.pi if topology == "half-wave" else np.pi
    n_int = int(periods * 2 * np.pi / step)
    window = (alpha + (n_int - int(2 * np.pi / step)) * step, alpha + n_int * step)
    acc = dict(i1=0.0, i2=0.0, v1=0.0, v2=0.0, s1=0.0, s2=0.0)
    i, mode = 0.0, "off"

    def add(tt, ii, vv, scr):
        if tt[0] < window[0] - 1e-9:
            return
        for key, y in (("i1", ii), ("i2", ii**2), ("v1", vv), ("v2", vv**2),
                       ("s1", ii * scr), ("s2", (ii * scr) ** 2)):
            acc[key] += np.trapezoid(y, tt)

    for n in range(n_int):
        t0 = alpha + n * step
        t1 = t0 + step
        s = 1.0 if (topology == "half-wave" or n % 2 == 0) else -1.0
        half0 = n * step  # where this pair's positive half-cycle starts
        t = t0
        if i > 0:
            mode = "scr"  # continuous: the incoming pair takes over at once
        else:
            start = max(t0, half0 + th1)
            if m >= 1 or start >= half0 + np.pi - th1:
                start = t1
            if start > t:
                tt = np.linspace(t, start, 50)
                add(tt, 0 * tt, m + 0 * tt, 0 * tt)
                t = start
            mode = "scr" if t < t1 else "off"
        while t < t1 - 1e-12:
            if mode == "scr":
                def rhs(th, y, s=s):
                    return [(s * np.sin(th) - r * y[0] - m) / x]

                def zero(th, y):
                    return y[0]
                zero.terminal, zero.direction = True, -1

                def vzero(th, y, s=s):
                    return s * np.sin(th)
                vzero.terminal, vzero.direction = True, -1
                sol = solve_ivp(rhs, (t, t1), [max(i, 0.0)],
                                events=[zero, vzero] if freewheel else [zero],
                                rtol=1e-10, atol=1e-12, dense_output=True, max_step=0.01)
                tt = np.linspace(t, sol.t[-1], 4001)
                ii = np.maximum(sol.sol(tt)[0], 0.0)
                add(tt, ii, s * np.sin(tt), np.full_like(tt, 1.0 if s > 0 else 0.0))
                t, i = sol.t[-1], max(float(sol.y[0][-1]), 0.0)
                if sol.status == 1:
                    if freewheel and sol.t_events[1].size and i > 1e-12:
                        mode = "fw"
                    else:
                        i, mode = 0.0, "off"
            elif mode == "fw":
                def rhs_fw(th, y):
                    return [(-r * y[0] - m) / x]

                def zero_fw(th, y):
                    return y[0]
                zero_fw.terminal, zero_fw.direction = True, -1
                sol = solve_ivp(rhs_fw, (t, t1), [i], events=[zero_fw], rtol=1e-10,
                                atol=1e-12, dense_output=True, max_step=0.01)
                tt = np.linspace(t, sol.t[-1], 4001)
                add(tt, np.maximum(sol.sol(tt)[0], 0.0), 0 * tt, 0 * tt)
                t, i = sol.t[-1], max(float(sol.y[0][-1]), 0.0)
                if sol.status == 1:
                    i, mode = 0.0, "off"
            else:
                tt = np.linspace(t, t1, 50)
                add(tt, 0 * tt, m + 0 * tt, 0 * tt)
                t = t1
    w = 2 * np.pi
    return {"idc": acc["i1"] / w, "irms": np.sqrt(acc["i2"] / w), "vdc": acc["v1"] / w,
            "vrms": np.sqrt(acc["v2"] / w), "it_av": acc["s1"] / w,
            "it_rms": np.sqrt(acc["s2"] / w)}


CASES = [
    # (topology, freewheel, α°, φ°, m): discontinuous, continuous, firing before θ1, freewheel
    ("half-wave", False, 30.0, 40.0, 0.3), ("half-wave", False, 10.0, 70.0, 0.5),
    ("half-wave", False, 90.0, 20.0, 0.2), ("half-wave", False, 0.0, 3.0, 0.4),
    ("bridge", False, 60.0, 30.0, 0.4), ("bridge", False, 30.0, 75.0, 0.3),
    ("bridge", False, 10.0, 80.0, 0.4), ("bridge", False, 100.0, 60.0, 0.1),
    ("half-wave", True, 40.0, 60.0, 0.2), ("half-wave", True, 20.0, 85.0, 0.05),
    ("bridge", True, 50.0, 40.0, 0.3), ("bridge", True, 30.0, 80.0, 0.2),
    ("bridge", True, 120.0, 85.0, 0.05),
]


@pytest.mark.parametrize("topology,freewheel,alpha_deg,phi_deg,m", CASES)
def test_against_solve_ivp(topology, freewheel, alpha_deg, phi_deg, m):
    alpha, phi = np.radians(alpha_deg), np.radians(phi_deg)
    ref = simulate(topology, freewheel, alpha, phi, m)
    w = rle.waveform_pu(topology=topology, freewheel=freewheel, alpha=alpha, phi=phi, m=m)
    for key in ("idc", "irms", "vdc", "vrms", "it_av", "it_rms"):
        assert float(w[key]) == pytest.approx(ref[key], rel=REL, abs=1e-5), key


def test_cases_cover_both_conduction_modes():
    """The simulated cases include continuous and discontinuous rows of every topology."""
    seen = set()
    for topology, freewheel, a, p, m in CASES:
        w = rle.waveform_pu(topology=topology, freewheel=freewheel, alpha=np.radians(a),
                            phi=np.radians(p), m=m)
        seen.add((topology, freewheel, bool(w["continuous"])))
    assert {("bridge", False, True), ("bridge", False, False), ("bridge", True, True),
            ("bridge", True, False), ("half-wave", True, True),
            ("half-wave", False, False)} <= seen


def test_mean_voltage_is_e_plus_r_times_mean_current():
    """Steady state: the mean of L·di/dt is zero, so V_dc = E + R·I_dc (R = cos φ per unit)."""
    a, p, m = np.meshgrid(np.radians([0, 20, 60, 110, 150]), np.radians([0, 30, 60, 85]),
                          [0.0, 0.1, 0.4, 0.8], indexing="ij")
    for topology in ("half-wave", "bridge"):
        for fw in (False, True):
            w = rle.waveform_pu(topology=topology, freewheel=fw, alpha=a, phi=p, m=m)
            np.testing.assert_allclose(w["vdc"], m + np.cos(p) * w["idc"], atol=1e-9)


# ------------------------------------------------------------------------------------------
# Worked examples

def test_full_converter_rle_rashid_ex_10_2():
    # Rashid 4e Ex 10.2 [book inputs]: 120 V, 60 Hz, R = 0.5 Ω, L = 6.5 mH, E = 10 V, α = 60°.
    # Answers [recomputed] (power-stage.md P4): I_Lo = 49.34 A, IT(AV) = 44.02 A,
    # IT(RMS) = 63.70 A, load RMS 90.08 A, I_dc = 88.04 A; continuous.
    v = rle.stage_values(topology="bridge", freewheel=False, vs=120.0, r=0.5, l=6.5e-3,
                         omega=W60, alpha=np.pi / 3, e=10.0)
    assert float(v["continuous"]) == 1.0
    i_lo = (float(v["seg_c"]) + np.sin(np.pi / 3 - float(v["phi"])) - float(v["offset"])) * \
        float(v["vm"]) / np.hypot(0.5, W60 * 6.5e-3)
    assert i_lo == pytest.approx(49.34, rel=2e-4)
    assert float(v["it_av"]) == pytest.approx(44.02, rel=2e-4)
    assert float(v["it_rms"]) == pytest.approx(63.70, rel=2e-4)
    assert float(v["irms"]) == pytest.approx(90.08, rel=2e-4)
    assert float(v["idc"]) == pytest.approx(88.04, rel=2e-4)
    # The critical angle α_c = 73.23° [recomputed]: continuous just below, not just above.
    for a, cont in ((73.0, 1.0), (73.5, 0.0)):
        v = rle.stage_values(topology="bridge", freewheel=False, vs=120.0, r=0.5, l=6.5e-3,
                             omega=W60, alpha=np.radians(a), e=10.0)
        assert float(v["continuous"]) == cont


def test_battery_charger_conduction_from_theta1():
    # Rashid 4e, the battery charger of ch. 3 [from memory: example number not recorded]:
    # 120 V primary, 2:1 transformer (Vs = 60 V, Vm = 84.85 V), E = 12 V, charging current
    # 5 A. Answers [book, from memory]: conduction from 8.13° to 171.87° (163.74°),
    # R = 4.26 Ω, I_rms = 8.2 A, P_R = 286.4 W, efficiency 17.32 %. An SCR fired at or before
    # θ1 behaves as the book's diode.
    vs, e = 60.0, 12.0
    th1 = float(rle.emf_angle(vm=np.sqrt(2) * vs, e=e))
    assert np.degrees(th1) == pytest.approx(8.13, abs=0.005)
    # The book solves R for 5 A: I_dc = [2·Vm·cos θ1 − E·(π − 2θ1)]/(2πR).
    r = (2 * np.sqrt(2) * vs * np.cos(th1) - e * (np.pi - 2 * th1)) / (2 * np.pi * 5.0)
    assert r == pytest.approx(4.26, rel=2e-3)
    v = rle.stage_values(topology="half-wave", freewheel=False, vs=vs, r=r, l=0.0, omega=W60,
                         alpha=0.0, e=e)
    assert np.degrees(float(v["alpha_eff"])) == pytest.approx(8.13, abs=0.005)
    assert np.degrees(float(v["beta"])) == pytest.approx(171.87, abs=0.005)
    assert float(v["idc"]) == pytest.approx(5.0, rel=1e-9)
    assert float(v["irms"]) == pytest.approx(8.2, rel=REL)
    assert float(v["irms"]) ** 2 * r == pytest.approx(286.4, rel=REL)
    eff = e * 5.0 / (e * 5.0 + float(v["irms"]) ** 2 * r)
    assert eff == pytest.approx(0.1732, rel=REL)
    # Firing later than θ1 controls the current: the book's method for an SCR charger,
    # I_dc = [Vm(cos α − cos β) − E(β − α)]/(2πR) with β = π − θ1 (R–E, no L).
    a = np.radians(45)
    v = rle.stage_values(topology="half-wave", freewheel=False, vs=vs, r=r, l=0.0, omega=W60,
                         alpha=a, e=e)
    vm = np.sqrt(2) * vs
    expect = (vm * (np.cos(a) + np.cos(th1)) - e * (np.pi - th1 - a)) / (2 * np.pi * r)
    assert float(v["idc"]) == pytest.approx(expect, rel=1e-9)


def test_motor_on_full_converter_rashid_ex_15_3():
    # Rashid 4e Ex 15.3 [from memory]: separately excited motor on a single-phase full
    # converter, 440 V, 60 Hz, Ra = 0.25 Ω, Kv = 1.4 V/(A·rad/s), TL = 45 N·m at 800 rpm,
    # ripple-free armature current. Book answers [from memory]: If = 2.26 A, Eg = 265.1 V,
    # Ia = 14.2 A, Va = 268.7 V, αa = 47.3°. With a large armature inductance (continuous)
    # the bridge at α = αa on E = Eg must give I_dc = Ia and V_dc = Va.
    vm = np.sqrt(2) * 440
    i_f = (2 * vm / np.pi) / 175.0
    eg = 1.4 * i_f * 800 * 2 * np.pi / 60
    ia = 45.0 / (1.4 * i_f)
    va = eg + ia * 0.25
    alpha = np.arccos(va * np.pi / (2 * vm))
    assert i_f == pytest.approx(2.26, rel=REL)
    assert eg == pytest.approx(265.1, rel=REL)
    assert ia == pytest.approx(14.2, rel=REL)
    assert np.degrees(alpha) == pytest.approx(47.3, abs=0.1)
    v = rle.stage_values(topology="bridge", freewheel=False, vs=440.0, r=0.25, l=0.5,
                         omega=W60, alpha=alpha, e=eg)
    assert float(v["continuous"]) == 1.0
    assert float(v["idc"]) == pytest.approx(ia, rel=1e-9)
    assert float(v["vdc"]) == pytest.approx(va, rel=1e-9)


def test_motor_on_semiconverter_rashid_ex_15_2():
    # Rashid 4e Ex 15.2 [from memory]: separately excited motor on a single-phase
    # semiconverter, 208 V, 60 Hz, Ra = 0.25 Ω, Rf = 147 Ω, Kv = 0.7032 V/(A·rad/s),
    # TL = 45 N·m at 1000 rpm, ripple-free. Book answers [from memory]: If = 1.274 A,
    # Ia = 50.23 A, Eg = 93.82 V, Va = 106.38 V, αa = 82.2°. The half-controlled bridge
    # (freewheeling diode leg) at α = αa on E = Eg must give I_dc = Ia, V_dc = Va.
    vm = np.sqrt(2) * 208
    i_f = (2 * vm / np.pi) / 147.0
    ia = 45.0 / (0.7032 * i_f)
    eg = 0.7032 * i_f * 1000 * 2 * np.pi / 60
    va = eg + ia * 0.25
    alpha = np.arccos(va * np.pi / vm - 1)
    assert i_f == pytest.approx(1.274, rel=REL)
    assert ia == pytest.approx(50.23, rel=REL)
    assert eg == pytest.approx(93.82, rel=REL)
    assert va == pytest.approx(106.38, rel=REL)
    assert np.degrees(alpha) == pytest.approx(82.2, abs=0.1)
    v = rle.stage_values(topology="bridge", freewheel=True, vs=208.0, r=0.25, l=0.5,
                         omega=W60, alpha=alpha, e=eg)
    assert float(v["continuous"]) == 1.0
    assert float(v["idc"]) == pytest.approx(ia, rel=1e-9)
    assert float(v["vdc"]) == pytest.approx(va, rel=1e-9)
    # The SCR carries α..π of each half-cycle: IT(AV) = Ia·(π − α)/2π (ripple-free limit).
    v = rle.stage_values(topology="bridge", freewheel=True, vs=208.0, r=0.25, l=20.0,
                         omega=W60, alpha=alpha, e=eg)
    assert float(v["it_av"]) == pytest.approx(ia * (np.pi - alpha) / (2 * np.pi), rel=2e-3)


def test_no_current_outside_the_window_and_when_e_exceeds_the_peak():
    w = rle.waveform_pu(topology="half-wave", freewheel=False,
                        alpha=np.radians([160.0, 30.0]), phi=np.radians(40), m=[0.5, 1.2])
    assert w["idc"].tolist() == [0.0, 0.0]
    np.testing.assert_allclose(w["vdc"], [0.5, 1.2])  # the terminals sit at E


def test_e_zero_matches_the_rl_stage():
    """With E = 0 the back-EMF forms reduce to the R–L forms of checks.power."""
    from checks import power
    a, p = np.meshgrid(np.radians([5, 45, 100, 150]), np.radians([0, 25, 60, 85]),
                       indexing="ij")
    for topology in ("half-wave", "bridge"):
        for fw in (False, True):
            w0 = power.waveform_pu(topology=topology, freewheel=fw, alpha=a, phi=p)
            w1 = rle.waveform_pu(topology=topology, freewheel=fw, alpha=a, phi=p, m=0.0)
            for key in ("vdc", "vrms", "idc", "irms", "it_av", "it_rms", "it_peak"):
                np.testing.assert_allclose(w1[key], w0[key], rtol=1e-7, atol=1e-9,
                                           err_msg=f"{topology} fw={fw} {key}")


@pytest.mark.parametrize("topology,freewheel,alpha_deg,l,e", [
    ("half-wave", False, 40.0, 0.3e-3, 13.0), ("bridge", True, 60.0, 80e-3, 120.0),
    ("bridge", False, 30.0, 300e-3, 100.0), ("bridge", False, 70.0, 5e-3, 60.0)])
def test_plotted_waveform_means_match_the_averages(topology, freewheel, alpha_deg, l, e):
    """The workbook's waveform (one cycle) integrates to the closed-form means and RMS."""
    vs = 24.0 if e < 20 else 230.0
    r = 0.6 if e < 20 else 8.0
    kw = dict(topology=topology, freewheel=freewheel, vs=vs, r=r, l=l, omega=W50,
              alpha=np.radians(alpha_deg), e=e)
    th, v, i = rle.load_waveform(points=200_001, **kw)
    ref = rle.stage_values(**kw)
    m = 2 * np.pi
    assert np.trapezoid(i, th) / m == pytest.approx(float(ref["idc"]), rel=REL)
    assert np.sqrt(np.trapezoid(i * i, th) / m) == pytest.approx(float(ref["irms"]), rel=REL)
    assert np.trapezoid(v, th) / m == pytest.approx(float(ref["vdc"]), rel=REL)


def _first_peak_ivp(vs: float, r: float, l: float, omega: float, e: float,  # noqa: E741
                    alpha: float) -> float:
    """The peak of the R–L–E current fired at α from rest, by solve_ivp in θ (ideal SCR)."""
    vm = np.sqrt(2.0) * vs
    start = max(alpha, np.arcsin(min(e / vm, 1.0)))

    def rhs(th, y):
        return [(vm * np.sin(th) - r * y[0] - e) / (omega * l)]

    def zero(th, y):
        return y[0] + (1e-12 if th < start + 1e-6 else 0.0)

    zero.terminal, zero.direction = True, -1
    sol = solve_ivp(rhs, (start, start + 2 * np.pi), [0.0], events=zero, rtol=1e-11,
                    atol=1e-13, max_step=1e-3)
    return float(sol.y[0].max())


def test_max_firing_angle_against_solve_ivp_and_repeated_rows_bit_for_bit():
    """The latest firing whose first current peak still reaches IL: at that α solve_ivp's
    peak is IL, 0.5° later it is below. A table that repeats rows (as corner tables do) gives
    every row exactly the answer it gets alone."""
    kw = dict(vs=15.0, r=0.5, l=2e-3, omega=2 * np.pi * 50, e=12.0)
    il = 0.5 * _first_peak_ivp(alpha=np.pi / 2, **kw)
    a = float(rle.max_firing_angle(il=il, **kw))
    assert np.pi / 2 < a < np.pi
    assert _first_peak_ivp(alpha=a, **kw) == pytest.approx(il, rel=1e-5)
    assert _first_peak_ivp(alpha=a + np.radians(0.5), **kw) < il
    vs = np.array([15.0, 14.0, 15.0, 16.0, 14.0, 15.0])
    ils = np.array([il, il, il, 2 * il, il, 2 * il])
    rows = rle.max_firing_angle(vs=vs, r=0.5, l=2e-3, omega=2 * np.pi * 50, e=12.0, il=ils)
    alone = [float(rle.max_firing_angle(vs=v, r=0.5, l=2e-3, omega=2 * np.pi * 50, e=12.0,
                                        il=i)) for v, i in zip(vs, ils, strict=True)]
    assert rows.shape == vs.shape and rows.tolist() == alone
