"""Integral-cycle (burst) control: Rashid's on–off controller example, the spectrum against
an FFT of the sampled burst waveform, and the stage option through the engine."""

from __future__ import annotations

import numpy as np
import pytest

from checks import burst


def test_on_off_controller_example():
    # Rashid, on–off AC controller [from memory: 3rd ed. Ex 11.1]: 120 V, 60 Hz, R = 10 Ω,
    # on n = 25 cycles, off m = 75. Answers [recomputed]: k = 0.25, V_o = Vs·√k = 60 V,
    # PF = √k = 0.5; per SCR IT(AV) = k·Vm/(πR) = 1.350 A, IT(RMS) = √k·Vm/(2R) = 4.243 A.
    o = burst.burst_output(p_full=120.0**2 / 10, vs=120.0, n_on=25, n_lo=25, n_hi=25,
                           period=100, req_lo=np.nan, req_hi=np.nan, quantity="voltage")
    assert float(o["vrms"]) == pytest.approx(60.0)
    assert float(o["load_power"]) == pytest.approx(60.0**2 / 10)
    assert float(o["power_step"]) == pytest.approx(14.4)
    vm = 120 * np.sqrt(2)
    nu, comp = burst.burst_spectrum(n_on=np.array([25.0]), period=100, i_peak=vm / 10)
    i1 = comp[0, 100]
    total = np.sqrt(np.sum(comp[0] ** 2) + comp[0, 0] ** 2)  # the DC counted once more
    assert i1 == pytest.approx(0.25 * vm / 10 / np.sqrt(2), rel=1e-9)  # (N/M)·I
    # the power factor P/(V·I) = I_1/I_rms with I_rms = √k·Vm/(√2·R): 0.5
    assert i1 / (np.sqrt(0.25) * vm / 10 / np.sqrt(2)) == pytest.approx(0.5, rel=1e-9)
    assert total == pytest.approx(np.sqrt(0.25) * vm / 10 / np.sqrt(2), rel=2e-2)  # ≤ 40th
    assert 0.25 * vm / (np.pi * 10) == pytest.approx(1.350, rel=5e-4)
    assert np.sqrt(0.25) * vm / 20 == pytest.approx(4.243, rel=5e-4)


@pytest.mark.parametrize("n_on,period", [(3, 10), (7, 20), (1, 4)])
def test_spectrum_against_fft(n_on, period):
    """The closed-form components at p·f/M agree with an FFT of the sampled waveform over one
    control period; the line harmonics (p = hM, h ≥ 2) vanish."""
    samples = 4096 * period
    th = np.linspace(0.0, 2 * np.pi * period, samples, endpoint=False)
    wave = np.where(th < 2 * np.pi * n_on, np.sin(th), 0.0)
    fft = np.fft.rfft(wave) / samples
    ref = np.abs(fft) * np.sqrt(2.0)
    ref[0] = abs(fft[0].real)
    nu, comp = burst.burst_spectrum(n_on=np.array([float(n_on)]), period=period, i_peak=1.0)
    got = comp[0]
    np.testing.assert_allclose(got, ref[:got.size], atol=1e-6)
    assert np.all(got[[h * period for h in range(2, 41)]] < 1e-9)


# ------------------------------------------------------------------------------------------
# Burst control of an R–L load: the switch-on transient at a voltage zero and the gate pulse.

def switch_on(phi: float, cycles: float = 1.5) -> tuple[np.ndarray, np.ndarray]:
    """Per unit (Vm = 1, Z = 1, θ = ωt): L·di/dθ = sin θ − R·i from i(0) = 0 (solve_ivp),
    R = cos φ, ωL = sin φ, with no switch in the loop (the first half-cycle's SCR conducts
    until the current's first zero). Returns a fine grid of θ and i."""
    from scipy.integrate import solve_ivp

    r, x = np.cos(phi), np.sin(phi)
    sol = solve_ivp(lambda th, y: [(np.sin(th) - r * y[0]) / x], (0.0, 2 * np.pi * cycles),
                    [0.0], rtol=1e-11, atol=1e-13, dense_output=True, max_step=1e-3)
    th = np.linspace(0.0, 2 * np.pi * cycles, 400_001)
    return th, sol.sol(th)[0]


@pytest.mark.parametrize("phi_deg", [10.0, 37.0, 60.0, 77.0, 88.0])
def test_first_current_zero_and_peak_against_solve_ivp(phi_deg):
    phi = np.radians(phi_deg)
    th, i = switch_on(phi)
    after = th > 0.1
    k = int(np.argmax(after & (i <= 0.0)))  # the first zero after the start
    lag_ivp = th[k] - np.pi
    assert float(burst.first_zero_lag(phi=phi)) == pytest.approx(lag_ivp, rel=5e-3, abs=1e-4)
    assert lag_ivp > phi  # later than the steady lag: the first half-cycle is asymmetric
    o = burst.pulse_check(phi=phi, omega=2 * np.pi * 50, pulse=1.0, limits={})
    assert float(o.values["inrush_factor"]) == pytest.approx(float(np.max(i[:k])), rel=5e-3)


def test_pure_inductance_limit_closed_form():
    """Pure L switched on at a voltage zero (any circuits text, e.g. Hayt & Kemmerly, from
    memory): i = (Vm/ωL)·(1 − cos ωt), peak 2·Vm/ωL at ωt = π, zero again at 2π, so the
    first zero lags the voltage zero by π and the peak is twice the steady peak."""
    phi = np.radians(89.999)
    o = burst.pulse_check(phi=phi, omega=2 * np.pi * 50, pulse=1.0, limits={})
    assert float(o.values["inrush_factor"]) == pytest.approx(2.0, rel=2e-3)
    # the zero is a tangency as φ → 90°, so the lag approaches π slowly (3.1268 here)
    assert float(o.values["first_zero_lag"]) == pytest.approx(np.pi, rel=5e-3)


def burst_pair(phi: float, pulse: float, cycles: int = 6) -> dict[str, float]:
    """Antiparallel SCRs, each pulsed at its own voltage zero (θ = 2πn and 2πn + π) for
    ``pulse`` rad, an R–L load from rest (solve_ivp, per unit). An SCR fires while its
    pulse lasts and its anode is positive, i.e. once the other SCR's current has ended;
    it conducts until its current's zero. Returns the mean load current over the burst and
    how many half-cycles each SCR conducted."""
    from scipy.integrate import solve_ivp

    r, x = np.cos(phi), np.sin(phi)
    t, end = 0.0, 2 * np.pi * cycles
    area, fired = 0.0, {1: 0, -1: 0}
    while t < end - 1e-9:
        # the next pulse that finds no current flowing: pulses start at multiples of π
        n = int(np.ceil(t / np.pi - 1e-9))
        start = None
        for m in (n - 1, n):
            if m >= 0 and m * np.pi <= t + 1e-12 < m * np.pi + pulse:
                start, sign = t, (1.0 if m % 2 == 0 else -1.0)
                break
        if start is None:
            t, sign = n * np.pi, (1.0 if n % 2 == 0 else -1.0)
            if t >= end:
                break
        def rhs(th, y, s=sign):
            return [(s * np.sin(th) - r * y[0]) / x]

        def zero(th, y):
            return y[0] + 1e-12
        zero.terminal, zero.direction = True, -1
        sol = solve_ivp(rhs, (t, min(t + 2 * np.pi, end)), [0.0], events=[zero],
                        rtol=1e-10, atol=1e-12, dense_output=True, max_step=2e-3)
        tt = np.linspace(t, sol.t[-1], 20001)
        area += sign * np.trapezoid(np.maximum(sol.sol(tt)[0], 0.0), tt)
        fired[int(sign)] += 1
        t = float(sol.t[-1])
    return {"mean": area / (2 * np.pi * cycles), "forward": fired[1], "reverse": fired[-1]}


@pytest.mark.parametrize("phi_deg", [60.0, 80.0])
def test_a_pulse_shorter_than_the_first_current_zero_gives_dc(phi_deg):
    """The check's rule against a simulation of the pair: a pulse 5 % short of the required
    width (yet longer than the steady lag φ) is missed, one SCR conducts alone and the load
    carries DC; 5 % longer, both conduct every half-cycle and what mean is left is the first
    cycle's decaying asymmetry."""
    phi = np.radians(phi_deg)
    w = 2 * np.pi * 50
    need = float(burst.first_zero_lag(phi=phi))
    assert 0.95 * need > phi
    short, wide = burst_pair(phi, 0.95 * need), burst_pair(phi, 1.05 * need)
    assert short["reverse"] == 0 and short["mean"] > 0.2
    assert wide["reverse"] == wide["forward"] == 6
    assert abs(wide["mean"]) < 0.3 * short["mean"]
    o = burst.pulse_check(phi=phi, omega=w, pulse=np.array([0.95, 1.05]) * need / w,
                          limits={"fail_below": 1.0})
    assert o.status.tolist() == [2, 0]


def test_unknown_pulse_fails():
    o = burst.pulse_check(phi=np.radians(40.0), omega=2 * np.pi * 50, pulse=np.nan,
                          limits={"fail_below": 1.0})
    assert o.status.tolist() == 2
