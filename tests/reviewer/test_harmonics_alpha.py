"""``power.harmonics`` finds the worst firing angle between the sampled ones.

The graded Class A ratio is not monotonic in α; with an R–L load its least lies between the
13 sampled angles. The engine's result must be at or below the least of a 2001-point grid of
the same closed-form spectrum, and the harmonic it names must match an FFT of the line
current integrated by scipy ``solve_ivp`` at that angle (written here, no helper of the
module under test).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from checks import harmonics, power
from reviewer.engine import evaluate
from reviewer.project import load_project_text

R, L, V, F = 15.0, 5e-3, 230.0, 50.0
LO, HI = math.radians(30.0), math.radians(150.0)

PROJECT = f"""
[project]
name = "alpha sweep"
revision = "A"

[conditions]
ambient = {{ min = "0 degC", max = "40 degC" }}

[supply]
kind = "ac"
voltage = "{V:g} V"
frequency = "{F:g} Hz"

[parts.Q1]
type = "scr"
vdrm = "800 V"
vrrm = "800 V"
igt = "10 mA"
vgt = "1.5 V"

[stages.power]
kind = "phase-control"
scr = "Q1"
topology = "ac-switch"
firing = {{ min = "30 deg", max = "150 deg" }}
load = {{ r = "{R:g} ohm", l = "{L * 1e3:g} mH" }}
"""


def grid_ratio(alpha: np.ndarray) -> np.ndarray:
    w = 2 * np.pi * F
    v = power.stage_values(topology="ac-switch", freewheel=False, vs=V, r=R, l=L, omega=w,
                           alpha=alpha, peak=False)
    v["z"] = np.hypot(R, w * L)
    return harmonics.harmonics_check(waveform=v, topology="ac-switch", freewheel=False,
                                     limits={}).values["limit_ratio"]


def fft_harmonics(alpha: float, n_samples: int = 8192) -> np.ndarray:
    """RMS line-current harmonics 0..40 from an FFT of the integrated current [A]."""
    w = 2 * np.pi * F
    vm = math.sqrt(2) * V

    def rhs(t: float, y: np.ndarray) -> list[float]:
        return [(vm * math.sin(w * t) - R * y[0]) / L]

    def zero(t: float, y: np.ndarray) -> float:
        return y[0]

    zero.terminal, zero.direction = True, -1
    t0 = alpha / w
    sol = solve_ivp(rhs, (t0, t0 + 1 / F), [0.0], events=zero, dense_output=True,
                    rtol=1e-11, atol=1e-12, max_step=1e-5)
    t_end = float(sol.t_events[0][0])
    period = 1 / F
    t = np.arange(n_samples) * period / n_samples
    # Positive half from α to the current zero; the other SCR gives the mirror image.
    pos = np.where((t >= t0) & (t <= t_end), 1.0, 0.0)
    i_pos = np.where(pos > 0, sol.sol(np.clip(t, t0, t_end))[0], 0.0)
    t_neg = (t - period / 2) % period
    neg = (t_neg >= t0) & (t_neg <= t_end)
    i_neg = np.where(neg, -sol.sol(np.clip(t_neg, t0, t_end))[0], 0.0)
    spec = np.fft.rfft(i_pos + i_neg) / n_samples
    amp = np.abs(spec[:41]) * 2 / math.sqrt(2)
    amp[0] = abs(spec[0].real)
    return amp


def test_worst_alpha_between_the_samples_is_found():
    res = evaluate(load_project_text(PROJECT, "a.toml"), only=[("power", "power.harmonics")],
                   strict=True).results[0]
    fine = grid_ratio(np.linspace(LO, HI, 2001))
    coarse = grid_ratio(np.linspace(LO, HI, 13))
    least = float(np.nanmin(fine))
    assert float(np.nanmin(coarse)) > least * 1.01  # the 13 samples alone read 1 % high
    reported = res.values["limit_ratio"].min
    assert reported <= least * (1 + 1e-9)
    assert reported == pytest.approx(least, rel=1e-4)
    assert "worst firing angle" in res.summary


def test_the_worst_harmonic_matches_an_fft_of_the_integrated_current():
    res = evaluate(load_project_text(PROJECT, "a.toml"), only=[("power", "power.harmonics")],
                   strict=True).results[0]
    fine_alpha = np.linspace(LO, HI, 2001)
    a_worst = float(fine_alpha[np.nanargmin(grid_ratio(fine_alpha))])
    amp = fft_harmonics(a_worst)
    lim = harmonics.class_a_limits()
    with np.errstate(divide="ignore", invalid="ignore"):
        ratios = lim[2:] / amp[2:]
    fft_least = float(np.nanmin(ratios))
    assert res.values["limit_ratio"].min == pytest.approx(fft_least, rel=5e-3)
