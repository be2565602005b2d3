"""Commutation overlap of a full bridge with source inductance: textbook examples and a
time-domain simulation (scipy solve_ivp) of the bridge, its source inductance and an R–L–E
load with ideal SCRs."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from checks import bridge
from checks.turnoff import overlap_angle

W50, W60 = 2 * np.pi * 50, 2 * np.pi * 60


def test_diode_bridge_with_source_inductance():
    # Mohan, Undeland & Robbins, single-phase diode bridge with L_s [from memory: Example
    # 5-1]: 120 V, 60 Hz, L_s = 1 mH, I_d = 10 A. Book answers [from memory]: μ = 17.1°,
    # V_d = 105.6 V. A bridge of SCRs fired at α = 0 is that diode bridge.
    mu = overlap_angle(alpha=0.0, omega=W60, l_s=1e-3, i_d=10.0, vm=120 * np.sqrt(2))
    assert np.degrees(float(mu)) == pytest.approx(17.1, abs=0.05)
    vd = 2 * np.sqrt(2) * 120 / np.pi - bridge.overlap_drop(omega=W60, l_s=1e-3, i_d=10.0)
    assert float(vd) == pytest.approx(105.6, rel=5e-4)


def test_overlap_values_of_the_primer():
    # power-stage.md / turn-off.md T12 [recomputed]: 230 V, 50 Hz, L_s = 1 mH, I_d = 20 A:
    # α = 30°: μ = 4.17°, V_dc = 175.3 V; α = 150°: μ = 4.78°, V_dc = −183.3 V.
    vm = 230 * np.sqrt(2)
    for a, mu_deg, vdc in ((30.0, 4.17, 175.3), (150.0, 4.78, -183.3)):
        mu = overlap_angle(alpha=np.radians(a), omega=W50, l_s=1e-3, i_d=20.0, vm=vm)
        assert np.degrees(float(mu)) == pytest.approx(mu_deg, abs=0.005)
        v = 2 * vm / np.pi * np.cos(np.radians(a)) - bridge.overlap_drop(omega=W50, l_s=1e-3,
                                                                         i_d=20.0)
        assert float(v) == pytest.approx(vdc, abs=0.05)


def simulate_overlap(vs, freq, l_s, i_d, alpha):
    """One commutation of the bridge carrying a ripple-free current I_d (the load current
    source): from the firing of the incoming pair the output is shorted and
    L_s·di_s/dt = v drives the line current from −I_d to +I_d (solve_ivp, with an event at
    +I_d); then v_d = v until the next firing. Returns μ and the mean output over the
    half-cycle by a 10⁵-point trapezoid."""
    w = 2 * np.pi * freq
    vm = np.sqrt(2) * vs

    def ov(th, y):
        return [vm * np.sin(th) / (w * l_s)]

    def done(th, y):
        return y[0] - i_d
    done.terminal, done.direction = True, 1
    sol = solve_ivp(ov, (alpha, alpha + np.pi), [-i_d], events=done, rtol=1e-12, atol=1e-12)
    end = float(sol.t_events[0][0])
    th = np.linspace(alpha, alpha + np.pi, 100_001)
    vd = np.where(th < end, 0.0, vm * np.sin(th))
    return {"mu": end - alpha, "vdc": np.trapezoid(vd, th) / np.pi}


@pytest.mark.parametrize("alpha_deg,e", [(0.0, 0.0), (30.0, 0.0), (45.0, 100.0),
                                         (60.0, 50.0), (150.0, -190.0)])
def test_overlap_against_solve_ivp(alpha_deg, e):
    """The overlap and the mean output of the closed forms agree with the integrated
    commutation at the current they give (within 0.5 %), and that current is the mean the
    R–E load draws from that output (V_dc = E + R·I_d: the mean of L·di/dt is zero)."""
    alpha = np.radians(alpha_deg)
    o = bridge.overlap_output(vs=230.0, r=5.0, omega=W50, l_s=2e-3, alpha=alpha, e=e)
    ref = simulate_overlap(230.0, 50.0, 2e-3, float(o["i_d"]), alpha)
    assert float(o["mu"]) == pytest.approx(ref["mu"], rel=5e-3)
    assert float(o["vdc"]) == pytest.approx(ref["vdc"], rel=5e-3)
    assert float(o["vdc"]) == pytest.approx(e + 5.0 * float(o["i_d"]), rel=1e-9)
