"""The diac–RC network fed through an R–L load while the triac is off: separate off-state and
on-state network matrices, one or two RC sections, an optional R–C snubber across the triac.

While the triac is off the network's (and a snubber's) current flows through the load, so
the node across the triac is v_A = v − R·i − L·di/dt, not the line; while it conducts v_A = 0
and the network decays on its own. The state, in θ = ωt, is x = (u, v1, v2, vs): u = R1·i the
load's current scaled by R1 (so every state is in volts), v1 and v2 the two capacitors (v2 an
undriven dummy for a single section, the diac then across C1), vs the snubber's capacitor (a
dummy without one). With g_s = 1/R_s (0 without a snubber) and g2 = 1/R2 (0: single):

    v_A = (u + v1 + g_s·R1·vs)/(1 + g_s·R1),  i_R1 = (v_A − v1)/R1,  i_s = g_s·(v_A − vs),
    du/dθ = R1·(Vm·sin θ − R·u/R1 − v_A)/(ωL),  dv1/dθ = (i_R1 − g2·(v1 − v2))/(ωC1),
    dv2/dθ = g2·(v1 − v2)/(ωC2),  dvs/dθ = i_s/(ωC_s).

On: v_A = 0 in the same equations (the load's current is the R–L closed form and ends at
β, :func:`checks.rl.extinction_angle`, where u restarts from 0). Dummy states decay at rate 1
and stay 0. exp(A·θ) by one eigen-decomposition per row (complex where a snubber rings with
the load's L); the running state closes a half-cycle in closed form, as in
:func:`checks.diac.running_excess`.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import numpy as np

from checks.core import as_array

N = 4  # states: u, v1, v2, vs (those no row uses are dropped)


def _given(x: np.ndarray) -> np.ndarray:
    return np.isfinite(x) & (x > 0)


def system(*, vm: Any, omega: Any, r1: Any, c1: Any, rl_r: Any, rl_l: Any,
           r2: Any = np.nan, c2: Any = np.nan, rs: Any = np.nan,
           cs: Any = np.nan) -> dict[str, np.ndarray]:
    """Both matrices' eigen-decompositions, the off-state's steady phasor X (x_ss(θ) =
    Im(X·e^(jθ)), per state) and the diac's state index, per row (broadcast inputs; SI)."""
    arrs = [as_array(x) for x in (vm, omega, r1, c1, rl_r, rl_l, r2, c2, rs, cs)]
    shape = np.broadcast_shapes(*(a.shape for a in arrs))
    vm, w, r1, c1, rr, ll, r2, c2, rs, cs = (np.broadcast_to(a, shape).astype(float)
                                              for a in arrs)
    r1 = np.maximum(r1, 1.0)  # a pot at 0 Ω with no series R: keep the matrices finite
    dbl = _given(r2) & _given(c2)
    snub = _given(rs) & _given(cs)
    g2 = np.where(dbl, 1.0 / np.where(dbl, r2, 1.0), 0.0)
    c2s = np.where(dbl, c2, 1.0)
    gs = np.where(snub, 1.0 / np.where(snub, rs, 1.0), 0.0)
    css = np.where(snub, cs, 1.0)
    k = 1.0 / (1.0 + gs * r1)
    # v_A as a row over (u, v1, v2, vs), off state
    va = np.stack([k, k, 0 * k, gs * r1 * k], axis=-1)
    a_off = np.zeros(shape + (N, N))
    a_on = np.zeros(shape + (N, N))
    wl, wc1 = w * ll, w * c1
    a_off[..., 0, :] = -(r1 / wl)[..., None] * va
    a_off[..., 0, 0] -= rr / wl
    for a, v in ((a_off, va), (a_on, np.zeros_like(va))):
        i_r1 = v / r1[..., None]
        i_r1[..., 1] -= 1.0 / r1
        a[..., 1, :] = i_r1 / wc1[..., None]
        a[..., 1, 1] -= g2 / wc1
        a[..., 1, 2] += g2 / wc1
        i_s = gs[..., None] * v
        i_s[..., 3] -= gs
        a[..., 3, :] = i_s / (w * css)[..., None]
        a[..., 2, 1] = g2 / (w * c2s)
        a[..., 2, 2] = np.where(dbl, -g2 / (w * c2s), -1.0)
        a[..., 3, 3] = np.where(snub, a[..., 3, 3], -1.0)
    a_on[..., 0, 0] = -1.0
    b = np.zeros(shape + (N,))
    b[..., 0] = vm * r1 / wl
    # Only the states some row uses (a dummy state of every row is dropped): fewer to work.
    keep = [0, 1] + ([2] if dbl.any() else []) + ([3] if snub.any() else [])
    a_off = a_off[..., keep, :][..., :, keep]
    a_on = a_on[..., keep, :][..., :, keep]
    b = b[..., keep]
    n = len(keep)
    x_ss = np.linalg.solve(1j * np.eye(n) - a_off, b.astype(complex)[..., None])[..., 0]
    out: dict[str, np.ndarray] = {"x_ss": x_ss, "diac": np.where(dbl, 2, 1)}
    for name, a in (("off", a_off), ("on", a_on)):
        lam, vec = np.linalg.eig(a)
        if not np.iscomplexobj(lam) or not np.any(lam.imag):  # real: work in real numbers
            lam, vec = np.real(lam), np.real(vec)
        out[name + "_l"], out[name + "_v"] = lam, vec
        out[name + "_vi"] = np.linalg.inv(vec)
        out[name + "_cond"] = np.linalg.cond(vec)
    return out


def rows(s: Mapping[str, np.ndarray], idx: np.ndarray) -> dict[str, np.ndarray]:
    """The system of the rows ``idx`` of a one-dimensional batch."""
    return {k: v[idx] for k, v in s.items()}


def phi(s: Mapping[str, np.ndarray], name: str, th: np.ndarray) -> np.ndarray:
    """exp(A·θ) of state ``name`` ("off"/"on") at θ (rows, or rows × points): real N×N."""
    th = as_array(th)
    extra = th.ndim - s[name + "_l"].ndim + 1  # trailing point axes beyond the rows
    lam, v, vi = s[name + "_l"], s[name + "_v"], s[name + "_vi"]
    for _ in range(extra):
        lam, v, vi = lam[..., None, :], v[..., None, :, :], vi[..., None, :, :]
    e = np.exp(lam * th[..., None])
    out = (v * e[..., None, :]) @ vi
    return np.real(out) if np.iscomplexobj(out) else out


def steady(s: Mapping[str, np.ndarray], th: np.ndarray) -> np.ndarray:
    """The off state's sinusoidal steady state at θ (rows, or rows × points): (..., N)."""
    th = as_array(th)
    x = s["x_ss"]
    for _ in range(th.ndim - x.ndim + 1):
        x = x[..., None, :]
    return np.imag(x * np.exp(1j * th)[..., None])


def amplitude_lag(s: Mapping[str, np.ndarray]) -> tuple[np.ndarray, np.ndarray]:
    """Crest Vm·G [V] and lag ψ [rad] of the diac capacitor's voltage, triac off (steady)."""
    xd = np.take_along_axis(s["x_ss"], s["diac"][..., None], axis=-1)[..., 0]
    return np.abs(xd), -np.angle(xd) % (2 * np.pi)


def _mv(m: np.ndarray, x: np.ndarray) -> np.ndarray:
    return (m @ x[..., None])[..., 0]


def _at(idx: np.ndarray, ndim: int) -> np.ndarray:
    """The per-row diac index with trailing axes up to ``ndim``."""
    while idx.ndim < ndim:
        idx = idx[..., None]
    return idx


def _expand(x: Any, ndim: int) -> np.ndarray:
    x = as_array(x)
    while x.ndim < ndim:
        x = x[..., None]
    return x


def running_state(s: Mapping[str, np.ndarray], *, alpha: np.ndarray, gam: np.ndarray,
                  breakback: Any) -> tuple[np.ndarray, np.ndarray]:
    """The periodic state that fires at α in every half-cycle (the triac off from the
    current's zero γ = β − π of the previous half to α, on from α to π + γ): (x(γ), x(α⁻)).

    With M = P·Φ_on(π + γ − α) (P zeroes u: the load's current restarts from 0 at its zero)
    and half-wave antisymmetry x(γ) = −M·(x(α⁻) − ΔV·e_d),
    (I + M·Φ_off(α − γ))·x(γ) = −M·(xs(α) − Φ_off(α − γ)·xs(γ) − ΔV·e_d),
    x(α⁻) = xs(α) + Φ_off(α − γ)·(x(γ) − xs(γ)).
    """
    alpha, gam = np.broadcast_arrays(as_array(alpha), as_array(gam))
    p_off = phi(s, "off", alpha - gam)
    m = phi(s, "on", np.pi + gam - alpha)
    m[..., 0, :] = 0.0
    xs_a, xs_g = steady(s, alpha), steady(s, gam)
    ed = kick(s, _expand(breakback, alpha.ndim), alpha.ndim)
    rhs = -_mv(m, xs_a - _mv(p_off, xs_g) - ed)
    x0 = np.linalg.solve(np.eye(m.shape[-1]) + m @ p_off, rhs[..., None])[..., 0]
    xa = xs_a + _mv(p_off, x0 - xs_g)
    return x0, xa


def kick(s: Mapping[str, np.ndarray], dv: np.ndarray, ndim: int) -> np.ndarray:
    """ΔV on the diac's state, zero elsewhere: (..., N) with ``ndim`` leading axes."""
    on = np.arange(s["x_ss"].shape[-1]) == _at(s["diac"], ndim)[..., None]
    return np.where(on, dv[..., None], 0.0)


def diac_value(s: Mapping[str, np.ndarray], x: np.ndarray) -> np.ndarray:
    """The diac capacitor's voltage out of states ``x`` (..., N)."""
    on = np.arange(x.shape[-1]) == _at(s["diac"], x.ndim - 1)[..., None]
    return np.sum(np.where(on, x, 0.0), axis=-1)


def refires(s: Mapping[str, np.ndarray], *, x_after: np.ndarray, level: np.ndarray,
            span: np.ndarray, points: int = 48) -> np.ndarray:
    """Whether the network, left free by the conducting triac from state ``x_after`` (just
    after a firing), brings the diac's capacitor back to ``level`` within ``span`` [rad]
    (a second section can): checked on a grid of ``points`` (rows)."""
    u = np.linspace(0.0, 1.0, points + 1)[1:]
    th = span[..., None] * u
    p = phi(s, "on", th)
    x = _mv(p, x_after[..., None, :])
    v = diac_value(s, x)
    return (v >= _expand(level, v.ndim)).any(axis=-1)
