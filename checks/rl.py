"""Current of an R–L load switched onto a sine by an SCR fired at angle α.

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §10–11
    (controlled rectifiers and AC voltage controllers with R–L loads).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np


def load_angle(*, r: np.ndarray, l: np.ndarray, omega: np.ndarray) -> np.ndarray:  # noqa: E741
    """φ = atan(ωL/R) [rad]; r [Ω], l [H], omega [rad/s].

    >>> round(float(np.degrees(load_angle(r=10.0, l=10e-3, omega=2 * np.pi * 60))), 3)
    20.656
    """
    return np.arctan2(omega * l, r)


def rl_current(*, theta: np.ndarray, alpha: np.ndarray, phi: np.ndarray, vm: np.ndarray,
               z: np.ndarray) -> np.ndarray:
    """Current from zero at α while the SCR conducts [A]  [1]:

    i(θ) = (Vm/Z)·[sin(θ − φ) − sin(α − φ)·exp(−(θ − α)/tan φ)]

    theta, alpha, phi [rad]; vm [V] peak line voltage; z [Ω] = √(R² + ω²L²). For φ → 0 the
    exponential term vanishes (a resistive load). Valid from α until the current returns to zero.

    >>> round(float(rl_current(theta=np.pi / 2, alpha=0.0, phi=0.0, vm=100.0, z=10.0)), 6)
    10.0
    """
    tan_phi = np.tan(phi)
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        decay = np.where(tan_phi > 1e-12, np.exp(-(theta - alpha) / np.where(tan_phi > 1e-12,
                                                                               tan_phi, 1.0)), 0.0)
    return (vm / z) * (np.sin(theta - phi) - np.sin(alpha - phi) * decay)


_NEWTON_MAX = 60  # safeguarded Newton steps at most (each row stops far sooner)
_NEWTON_TOL = 4e-15  # stopping step [rad]: a few spacings of doubles near 2π


def _g(b: np.ndarray, alpha: np.ndarray, k0: np.ndarray,
       inv_tan: np.ndarray, phi: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """g(b) = sin(b − φ) − sin(α − φ)·exp(−(b − α)/tan φ) and dg/db, for tan φ > 0
    (k0 = sin(α − φ), inv_tan = 1/tan φ)."""
    with np.errstate(over="ignore", under="ignore"):
        k = k0 * np.exp(-np.maximum(b - alpha, 0.0) * inv_tan)
    x = b - phi
    return np.sin(x) - k, np.cos(x) + k * inv_tan


def extinction_angle(*, alpha: np.ndarray, phi: np.ndarray) -> np.ndarray:
    """Extinction angle β [rad] of an R–L load fed from a sine by an SCR fired at α  [1], [2]:

    the first root after α of sin(β − φ) = sin(α − φ)·exp(−(β − α)/tan φ),

    the angle at which the current from zero at α (:func:`rl_current`) returns to zero, with
    the SCR conducting as long as the current flows (half-wave, no freewheeling diode).

    alpha [rad] firing angle, 0 ≤ α ≤ π; phi [rad] load angle atan(ωL/R), 0 ≤ φ ≤ π/2.
    Limits: φ → 0 gives β = π; φ → π/2 gives β = 2π − α; α ≥ π gives β = α (no conduction).
    β always lies in [max(α, π), 2π − α]: the current cannot reach zero while the line is
    positive (di/dt would be positive there), and over the conduction L·Δi = 0 gives
    ∫v dθ = R·∫i dθ ≥ 0, i.e. cos β ≤ cos α. The upper end also excludes the spurious second
    root of the formula after β.

    Method: on (π, 2π) the line is negative, so L·di/dt = v − R·i < 0 while the current flows:
    the current falls monotonically and g has exactly one sign change in the bracket. A
    resistive load (tan φ ≤ 1e-12) gives β = π exactly. Inductive rows: a safeguarded Newton
    iteration on g inside [max(α, π), 2π − α], bisecting whenever a step would leave the
    bracket, for every row at once, until every row's step is below 4e-15 rad.

    References: [1] Rashid 4e §10 (half-wave R–L extinction angle); [2] Hart, *Power
    Electronics*, §3 (half-wave rectifier with R–L load).

    >>> round(float(np.degrees(extinction_angle(alpha=np.radians(45), phi=np.arctan(
    ...     2 * np.pi * 60 * 40e-3 / 20)))), 2)
    216.87
    >>> np.degrees(extinction_angle(alpha=np.radians([0.0, 90.0]), phi=np.radians([0.0, 90.0]))
    ...            ).round(6).tolist()
    [180.0, 270.0]
    """
    alpha_b, phi_b = np.broadcast_arrays(np.asarray(alpha, dtype=float),
                                         np.asarray(phi, dtype=float))
    a = alpha_b
    p = np.clip(phi_b, 0.0, np.pi / 2)
    tp = np.tan(p)
    # A resistive current is the line's: zero at π (NaN inputs stay NaN).
    out = np.where(a >= np.pi, a, np.pi + 0.0 * (a + p))
    rl = (tp > 1e-12) & (a < np.pi)
    if rl.any():
        out = np.array(out, dtype=float)
        out[rl] = _extinction_rl(a[rl], p[rl], tp[rl])
    return out


def root_falling(lo: np.ndarray, hi: np.ndarray,
                 f: Callable[[np.ndarray, np.ndarray], tuple[np.ndarray, np.ndarray]]
                 ) -> np.ndarray:
    """The root of a function that falls through zero once on [lo, hi] (f(lo) > 0 ≥ f(hi)),
    every row at once [rad]: Newton steps, bisecting whenever a step would leave the bracket,
    until every row's step (or bracket) is below 4e-15 rad. ``f(b, rows)`` returns (value,
    slope) at ``b`` for the rows of the 1-D arrays ``lo``, ``hi`` selected by the index array
    ``rows`` (rows that converged early leave the iteration).

    >>> round(float(root_falling(np.array([0.0]), np.array([3.0]),
    ...                          lambda b, rows: (np.cos(b), -np.sin(b)))[0]), 12)
    1.570796326795
    """
    lo, hi = np.array(lo, dtype=float), np.array(hi, dtype=float)
    rows = np.arange(lo.size)
    b = 0.5 * (lo + hi)
    out = b.copy()
    for _ in range(_NEWTON_MAX):
        g, dg = f(b, rows)
        pos = g > 0.0
        lo = np.where(pos, b, lo)
        hi = np.where(pos, hi, b)
        with np.errstate(divide="ignore", invalid="ignore"):
            step = b - g / dg
        inside = (step >= lo) & (step <= hi) & np.isfinite(step)
        b_new = np.where(g == 0.0, b, np.where(inside, step, 0.5 * (lo + hi)))
        done = (np.abs(b_new - b) <= _NEWTON_TOL) | (hi - lo <= _NEWTON_TOL)
        b = b_new
        n_done = int(np.count_nonzero(done))
        if n_done == done.size:
            break
        if 4 * n_done >= done.size:  # enough rows converged: iterate on the rest only
            out[rows[done]] = b[done]
            keep = ~done
            rows, b, lo, hi = rows[keep], b[keep], lo[keep], hi[keep]
    out[rows] = b
    return out


def _extinction_rl(a: np.ndarray, p: np.ndarray, tp: np.ndarray) -> np.ndarray:
    """:func:`extinction_angle` for 1-D inductive rows with α < π (tan φ > 0)."""
    lo = np.maximum(a, np.pi)
    hi = np.maximum(2 * np.pi - a, lo)
    k0, inv = np.sin(a - p), 1.0 / tp
    g_lo, _ = _g(lo, a, k0, inv, p)
    g_hi, _ = _g(hi, a, k0, inv, p)
    # A bracket without a sign change collapses onto the end the bisection would reach.
    fixed = np.where(g_lo <= 0.0, lo, np.where(g_hi > 0.0, hi, np.nan))
    out = np.array(fixed)
    idx = np.flatnonzero(np.isnan(fixed))  # rows to iterate
    if idx.size:
        a, k0, inv, p = (x[idx] for x in (a, k0, inv, p))
        out[idx] = root_falling(lo[idx], hi[idx],
                                lambda b, rows: _g(b, a[rows], k0[rows], inv[rows], p[rows]))
    return out
