"""Extinction angle of the R–L load against the β table, worked examples, limits and an
independent time-domain integration of the circuit."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from checks.rl import extinction_angle, load_angle, rl_current

W60 = 2 * np.pi * 60

# β of the half-wave R–L circuit [deg] [recomputed] (power-stage.md §1.2 table): rows α, cols φ.
ALPHAS = [0, 30, 60, 90, 120, 150]
PHIS = [10, 30, 45, 60, 75, 85]
BETA_TABLE = [
    [190.0, 210.1, 225.8, 244.2, 270.8, 303.8],
    [190.0, 210.0, 225.5, 243.3, 268.4, 298.0],
    [190.0, 209.7, 224.2, 240.0, 260.8, 282.5],
    [190.0, 208.6, 220.9, 233.2, 247.9, 261.2],
    [189.9, 205.7, 214.3, 221.9, 230.0, 236.3],
    [189.2, 198.5, 202.1, 204.9, 207.4, 209.1],
]


def test_beta_table_all_rows_at_once():
    a, p = np.meshgrid(np.radians(ALPHAS), np.radians(PHIS), indexing="ij")
    beta = np.degrees(extinction_angle(alpha=a, phi=p))
    assert beta.shape == (6, 6)
    # The table is printed to 0.1°: agreement within half a unit of the last digit.
    np.testing.assert_allclose(beta, BETA_TABLE, atol=0.051)


def test_worked_examples():
    # Hart P7 [memory inputs; recomputed answer]: 120 V, 60 Hz, 20 Ω, 40 mH, α = 45° → 216.87°.
    phi = load_angle(r=20.0, l=40e-3, omega=W60)
    assert np.degrees(extinction_angle(alpha=np.radians(45), phi=phi)) == pytest.approx(
        216.87, abs=0.05)
    # Hart P6 [memory inputs; recomputed]: 100 Ω, 0.1 H, 60 Hz, α = 0 → 200.66° (3.5021 rad).
    phi = load_angle(r=100.0, l=0.1, omega=W60)
    assert float(extinction_angle(alpha=0.0, phi=phi)) == pytest.approx(3.5021, abs=1e-4)
    # Rashid 4e Ex 11.2 load [book inputs; recomputed]: 2.5 Ω, 6.5 mH, α = 90° → 220.41°.
    phi = load_angle(r=2.5, l=6.5e-3, omega=W60)
    assert np.degrees(extinction_angle(alpha=np.pi / 2, phi=phi)) == pytest.approx(
        220.41, abs=0.05)


def test_limits():
    alpha = np.radians([0.0, 20.0, 60.0, 100.0, 170.0])
    # φ → 0: β = π.
    np.testing.assert_allclose(extinction_angle(alpha=alpha, phi=1e-9), np.pi, atol=1e-6)
    np.testing.assert_allclose(extinction_angle(alpha=alpha, phi=0.0), np.pi, atol=1e-12)
    # φ → 90°: β = 2π − α (pure inductance: equal volt-seconds). α = 0 excluded: the root
    # there is a double one and approaches 2π only as √(R/ωL).
    a = alpha[1:]
    np.testing.assert_allclose(extinction_angle(alpha=a, phi=np.pi / 2 - 1e-7),
                               2 * np.pi - a, atol=1e-4)
    # No conduction at α = π.
    assert float(extinction_angle(alpha=np.pi, phi=0.5)) == pytest.approx(np.pi)


def test_current_is_zero_at_beta_and_positive_before():
    a, p = np.meshgrid(np.radians(np.arange(0, 180, 7.5)), np.radians(np.arange(1, 90, 4)),
                       indexing="ij")
    beta = extinction_angle(alpha=a, phi=p)
    i_beta = rl_current(theta=beta, alpha=a, phi=p, vm=1.0, z=1.0)
    np.testing.assert_allclose(i_beta, 0.0, atol=1e-9)
    inside = a[..., None] + (beta - a)[..., None] * np.linspace(0.01, 0.99, 50)
    i_in = rl_current(theta=inside, alpha=a[..., None], phi=p[..., None], vm=1.0, z=1.0)
    assert (i_in > 0).all()


@pytest.mark.parametrize("alpha_deg", [0.0, 25.0, 60.0, 90.0, 135.0, 160.0])
@pytest.mark.parametrize("phi_deg", [5.0, 30.0, 55.0, 80.0, 88.0])
def test_against_solve_ivp(alpha_deg, phi_deg):
    """Ideal SCR on an R–L load: conducts from α until the current returns to zero."""
    alpha, phi = np.radians(alpha_deg), np.radians(phi_deg)
    r, x = np.cos(phi), np.sin(phi)  # per unit: Vm = 1, Z = 1

    def rhs(th, y):
        return [(np.sin(th) - r * y[0]) / x]

    def zero(th, y):
        return y[0] if th > alpha + 1e-9 else 1.0
    zero.terminal, zero.direction = True, -1
    sol = solve_ivp(rhs, (alpha, alpha + 2 * np.pi), [0.0], events=zero, rtol=1e-11,
                    atol=1e-13, max_step=0.01)
    beta_ref = sol.t_events[0][0]
    beta = float(extinction_angle(alpha=alpha, phi=phi))
    assert np.degrees(beta) == pytest.approx(np.degrees(beta_ref), abs=0.05)
