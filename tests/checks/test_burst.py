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
