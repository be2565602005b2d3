"""Integral-cycle (burst) control of a heater: whole line cycles switched on at the voltage zero,
N on out of every M, instead of phase control.

The load sees whole sine cycles, so every on-cycle carries the full current (the SCRs' RMS,
average and junction stress are those of full conduction), the mean power is (N/M)·P_full in
steps of P_full/M, and each burst starts at a voltage zero with the cold-load current. Over
the control period the line current is i(θ) = I·sin θ for 0 ≤ θ < 2πN and 0 up to 2πM, whose
Fourier series has components at p·f/M: the line-frequency harmonics (p = hM, h ≥ 2) vanish
(whole cycles), and what remains is the fundamental (N/M)·I and sub- and interharmonics of the
control period around it. Those modulate the supply voltage: with short control periods the
lamps on the same supply flicker (IEC 61000-3-3 governs voltage fluctuations; a long period
and small steps soften it).

With an R–L load the current lags: fired from rest at a voltage zero, the first half-cycle's
current i = (Vm/Z)·[sin(θ − φ) + sin φ·e^(−θ/tan φ)] is asymmetric (its peak approaches twice
the steady peak as φ → 90°) and ends at β(0, φ) > π + φ; in steady state the current's zero
lags the voltage zero by φ. While one SCR still conducts, the other (pulsed at the voltage
zero) is not forward-biased, so its gate pulse must last until the current zero; a shorter
pulse is missed and one SCR conducts alone: a half-wave, DC in the load (a transformer or a
motor saturates) [1, §11], [3].

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §11 (on–off
    control of AC voltage controllers: duty, output power, input power factor √(N/M)).
[2] IEC 61000-3-2 (harmonic current limits, Class A) and IEC 61000-3-3 (voltage fluctuations
    and flicker), for what the estimate stands against; neither is checked here.
[3] The R–L switch-on transient in any circuits text, e.g. W. H. Hayt, J. E. Kemmerly,
    *Engineering Circuit Analysis*, (complete response of an R–L circuit to a sinusoidal
    source): i(t) = (Vm/Z)·[sin(ωt − φ) + sin φ·e^(−t·R/L)] switched on at the voltage zero.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from checks.core import MARGINAL, Outcome, cap_status, grade
from checks.rl import extinction_angle


def _a(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


def burst_power(*, p_full: np.ndarray, n_on: np.ndarray, period: np.ndarray) -> np.ndarray:
    """Mean power (N/M)·P_full [W]  [1, §11]; p_full [W] at full conduction, n_on and period
    [cycles].

    >>> float(burst_power(p_full=2000.0, n_on=7, period=20))
    700.0
    """
    return _a(p_full) * _a(n_on) / _a(period)


def burst_spectrum(*, n_on: np.ndarray, period: int, i_peak: np.ndarray,
                   max_order: int = 40) -> tuple[np.ndarray, np.ndarray]:
    """Line-current components of burst control at frequencies p·f/M, p = 0 … max_order·M.

    Returns (ν = p/M [multiples of the line frequency], RMS current [A] per component). The
    coefficient of component ν of i = I·sin θ on [0, 2πN), period 2πM, is
    c = (1/πM)·∫_0^(2πN) sin θ·e^(−jνθ) dθ = (1/πM)·[F(1 − ν) − F(−1 − ν)]/2j with
    F(m) = ∫_0^(2πN) e^(jmθ) dθ (2πN where m = 0); RMS = |c|/√2, the mean c/2.
    n_on [cycles] rows; period M [cycles] (one per call); i_peak [A] full-conduction peak.

    >>> nu, i = burst_spectrum(n_on=np.array([5.0]), period=10, i_peak=10.0, max_order=3)
    >>> round(float(i[0, 10]), 4), round(float(i[0, 20]), 12), round(float(i[0, 30]), 12)
    (3.5355, 0.0, 0.0)
    """
    m = int(period)
    p = np.arange(0, max_order * m + 1)
    nu = p / m
    n = _a(n_on)[..., None]
    span = 2 * np.pi * n

    def f(k: np.ndarray) -> np.ndarray:
        with np.errstate(divide="ignore", invalid="ignore"):
            val = (np.exp(1j * k * span) - 1.0) / (1j * k)
        return np.where(np.abs(k) < 1e-12, span + 0j, val)

    c = (f(1 - nu) - f(-1 - nu)) / 2j / (np.pi * m)
    rms = np.abs(c) / np.sqrt(2.0)
    rms[..., 0] = np.abs(c[..., 0].real) / 2
    return nu, rms * _a(i_peak)[..., None]


def burst_output_check(*, p_full: np.ndarray, vs: np.ndarray, n_on: np.ndarray,
                       n_lo: np.ndarray, n_hi: np.ndarray, period: int, req_lo: np.ndarray,
                       req_hi: np.ndarray, quantity: str,
                       limits: Mapping[str, float]) -> Outcome:
    """``power.output`` of burst control: :func:`burst_output` graded with ``fail_below``.

    >>> o = burst_output_check(p_full=1440.0, vs=120.0, n_on=25, n_lo=25, n_hi=25, period=100,
    ...                        req_lo=np.nan, req_hi=300.0, quantity="power", limits={})
    >>> o.status.tolist(), float(o.values["output_at_min"])
    (0, 360.0)
    """
    v = burst_output(p_full=p_full, vs=vs, n_on=n_on, n_lo=n_lo, n_hi=n_hi, period=period,
                     req_lo=req_lo, req_hi=req_hi, quantity=quantity)
    metric = v.pop("metric")
    margin, status = grade(metric, limits)
    return Outcome(v, np.where(np.isinf(metric), np.inf, margin), status)


def burst_output(*, p_full: np.ndarray, vs: np.ndarray, n_on: np.ndarray, n_lo: np.ndarray,
                 n_hi: np.ndarray, period: int, req_lo: np.ndarray, req_hi: np.ndarray,
                 quantity: str) -> dict[str, np.ndarray]:
    """``power.output`` of burst control: ``load_power`` (N/M)·P_full [W], ``vrms`` the
    equivalent Vs·√(N/M) [V], ``power_step`` P_full/M [W] (the resolution), and the full
    (N = n_hi) and minimum (N = n_lo) outputs ``output_at_min``, ``output_at_max`` with the
    metric min(out(n_hi)/req_hi, req_lo/out(n_lo)) (NaN requirements: that side not asked).

    >>> o = burst_output(p_full=1440.0, vs=120.0, n_on=25, n_lo=25, n_hi=25, period=100,
    ...                  req_lo=np.nan, req_hi=np.nan, quantity="voltage")
    >>> float(o["vrms"]), float(o["load_power"])
    (60.0, 360.0)
    """
    m = float(period)

    def out(n: np.ndarray) -> np.ndarray:
        if quantity == "power":
            return _a(p_full) * _a(n) / m
        return _a(vs) * np.sqrt(_a(n) / m)

    y_lo, y_hi = out(n_hi), out(n_lo)
    with np.errstate(divide="ignore", invalid="ignore"):
        m_full = np.where(np.isnan(req_hi), np.inf, y_lo / _a(req_hi))
        m_min = np.where(np.isnan(req_lo), np.inf, np.where(y_hi > 0, _a(req_lo) / y_hi,
                                                             np.inf))
    return {"load_power": burst_power(p_full=p_full, n_on=n_on, period=m),
            "vrms": _a(vs) * np.sqrt(_a(n_on) / m), "power_step": _a(p_full) / m,
            "output_at_min": y_lo, "output_at_max": y_hi, "metric": np.minimum(m_full, m_min)}


def burst_harmonics_check(*, n_on: np.ndarray, period: int, i_peak: np.ndarray,
                          phi: np.ndarray, line_hz: np.ndarray,
                          limits: Mapping[str, float]) -> Outcome:
    """``power.harmonics`` of burst control: the spectrum of :func:`burst_spectrum` (whole
    cycles: N rounded), the line-frequency orders against class_factor × the IEC 61000-3-2
    Class A table (they vanish for whole cycles, so the table is met), and the largest sub- or
    interharmonic (``interharmonic_current`` [A], ``interharmonic_frequency`` [Hz]) for the
    flicker caution. Displacement factor cos φ, distortion factor √(N/M), power factor their
    product  [1, §11]. i_peak [A] full-conduction peak; phi [rad]; line_hz [Hz].

    >>> o = burst_harmonics_check(n_on=np.array([25.0]), period=100, i_peak=16.97, phi=0.0,
    ...                           line_hz=60.0, limits={})
    >>> round(float(o.values["power_factor"][0]), 4), o.status.tolist()
    (0.5, [0])
    """
    from checks.harmonics import ORDERS, class_a_limits

    n = np.round(_a(n_on))  # whole cycles
    frac = n / float(period)
    shape = np.broadcast_shapes(frac.shape, np.shape(i_peak), np.shape(phi))
    n = np.broadcast_to(n, shape)
    nu, comp = burst_spectrum(n_on=n, period=period, i_peak=np.broadcast_to(_a(i_peak), shape))
    line = ORDERS * int(period)
    h = comp[..., line]
    lim = class_a_limits() * float(limits.get("class_factor", 1.0))
    with np.errstate(divide="ignore", invalid="ignore"):
        ratios = np.where(h > 1e-9, lim / h, np.inf)
    ratios[..., :2] = np.inf
    inter = comp.copy()
    inter[..., line] = 0.0
    k = np.argmax(inter, axis=-1)
    frac = np.broadcast_to(frac, shape)
    disp = np.broadcast_to(np.cos(_a(phi)), shape)
    metric = np.min(ratios, axis=-1)
    margin, status = grade(metric, limits)
    margin = np.where(np.isinf(metric), np.inf, margin)
    if float(limits.get("advisory", 1.0)) >= 0.5:
        status = cap_status(status, MARGINAL)
    with np.errstate(divide="ignore", invalid="ignore"):
        thd = np.sqrt(np.sum(h[..., 2:] ** 2, axis=-1)) / h[..., 1]
    values = {"line_current": _a(i_peak) / np.sqrt(2.0) * np.sqrt(frac), "thd": thd,
              "displacement_factor": disp, "distortion_factor": np.sqrt(frac),
              "power_factor": disp * np.sqrt(frac),
              "limit_ratio": np.where(np.isfinite(metric), metric, np.nan),
              "worst_order": np.argmin(ratios, axis=-1).astype(float),
              "in_scope": np.ones(shape),
              "interharmonic_current": np.take_along_axis(inter, k[..., None], -1)[..., 0],
              "interharmonic_frequency": nu[k] * _a(line_hz)}
    values.update({f"i_h{o}": h[..., o] for o in ORDERS})
    return Outcome(values, margin, status)


def first_zero_lag(*, phi: np.ndarray) -> np.ndarray:
    """How far the first current zero lags the voltage zero after a switch-on at a voltage
    zero from rest [rad]: β(0, φ) − π, β the root of sin(β − φ) + sin φ·e^(−β/tan φ) = 0
    (:func:`checks.rl.extinction_angle`); at least φ, the steady lag, and up to π as φ → 90°
    (a pure inductance conducts a whole cycle from a voltage-zero start). phi [rad].

    >>> round(float(np.degrees(first_zero_lag(phi=np.radians(60.0)))), 2)
    64.24
    """
    phi = _a(phi)
    return np.where(phi > 0, extinction_angle(alpha=0.0 * phi, phi=phi) - np.pi, 0.0)


def pulse_check(*, phi: np.ndarray, omega: np.ndarray, pulse: np.ndarray,
                limits: Mapping[str, float]) -> Outcome:
    """``power.control`` of burst control with an R–L load: each SCR is pulsed at its voltage
    zero, but while the other still conducts it is not forward-biased, so the pulse must last
    past the current zero. The latest current zero is the first of a burst, which starts from
    rest: :func:`first_zero_lag` λ1 = β(0, φ) − π after the voltage zero (steady state: φ).
    Metric = t_pulse/(λ1/ω), graded with ``fail_below``; an unknown pulse (NaN) fails.
    Values: ``required_width`` λ1/ω [s], ``steady_lag_time`` φ/ω [s], ``pulse_width`` [s],
    ``first_zero_lag`` λ1 [rad], ``load_angle`` φ [rad], ``inrush_factor`` the first
    half-cycle's peak over the steady peak Vm/Z [–]  [1, §11], [3].
    phi [rad] load angle; omega [rad/s]; pulse [s] the shortest gate pulse (NaN: unknown).

    >>> o = pulse_check(phi=np.radians([60.0, 60.0]), omega=2 * np.pi * 50,
    ...                 pulse=np.array([3e-3, 5e-3]), limits={})
    >>> o.status.tolist(), round(float(o.values["required_width"][0]) * 1e3, 3)
    ([2, 0], 3.569)
    """
    from checks.power import _segment_peak

    phi, omega, pulse = np.broadcast_arrays(_a(phi), _a(omega), _a(pulse))
    lag = first_zero_lag(phi=phi)
    need = lag / omega
    with np.errstate(divide="ignore", invalid="ignore"):
        metric = np.where(need > 0, pulse / need, np.where(np.isnan(pulse), np.nan, np.inf))
    margin, status = grade(metric, limits)
    margin = np.where(np.isinf(metric), np.inf, margin)
    peak = _segment_peak(0.0 * phi, np.pi + lag, phi, np.sin(phi))
    return Outcome({"required_width": need, "steady_lag_time": phi / omega,
                    "pulse_width": pulse + 0.0, "first_zero_lag": lag, "load_angle": phi,
                    "inrush_factor": peak}, margin, status)
