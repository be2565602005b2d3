"""A diac fired from an RC phase-shift network on the line: firing angle, snap-on, gate pulse,
half-cycle symmetry.

The network is fed from the line through the load. Here the load's drop while the triac is
off is neglected (its impedance is far below the network's); with the R–L load itself given
(``rl_r``, ``rl_l``, and a snubber's ``rs``, ``cs``) :func:`firing_angle` and :func:`limit_r`
feed the network through it instead (:mod:`checks.diac_load`: off- and on-state matrices,
one or two sections, refirings followed). Single time constant: R1 (pot + series R)
charges C1, the diac sits across C1. Double time constant: R1–C1, then R2–C2, the diac across
C2. Angles are in radians from the line's zero crossing; θ = ωt.

Without firing the diac capacitor follows the sinusoidal steady state vss(θ) = Vm·G·sin(θ − ψ)
(phasor, transient-free; G the gain, ψ the lag). It fires at the first crossing of VBO,
α = ψ + asin(VBO/(Vm·G)), and only when Vm·G > VBO and α < π (a crossing after the line has
reversed fires in the wrong half-cycle, counted here as no firing).

Once the diac fires, the triac shorts the network's supply until its current's zero (the
line's zero for a resistive load, the R–L extinction angle β > π for an inductive one, after
which the network restarts from the line's value at β), and the diac drops its capacitor by
the breakback ΔV. The capacitor then
starts each half-cycle near zero instead of at the steady sine's −Vm·G·sin ψ, so it reaches
VBO much earlier: the running state. Its periodic solution is in closed form (half-wave
antisymmetry, :func:`running_excess`) and its firing angle is the first root over the
half-cycle. The difference is the snap-on: firing starts where vss reaches VBO and then runs
at an earlier angle, and stops only where the running state no longer reaches VBO. A second
RC section keeps C1's charge to restore C2 with, which narrows the gap.

References
----------
[1] General Electric, *SCR Manual*, 6th ed. (1979), ch. 9 (phase control with a diac and an RC
    network; the hysteresis and the double time constant) — from memory.
[2] T. J. Maloney, *Modern Industrial Electronics*, 5th ed., ch. 7 (triacs, diac triggering,
    RC phase shift) — from memory.
[3] M. H. Rashid, *Power Electronics*, 4th ed., §10 (AC voltage controllers: output of a
    phase-controlled AC switch).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from typing import Any

import numpy as np

from checks import diac_load, diac_single, memo, rl, triac
from checks.core import FAIL, MARGINAL, PASS, Outcome, as_array, cold_value
from checks.memo import memoised

_BISECT = 44  # halvings of the log-R bracket (1 Ω … 1 GΩ): 1e-12 relative


def _double(r2: np.ndarray, c2: np.ndarray) -> np.ndarray:
    return np.isfinite(r2) & np.isfinite(c2) & (r2 > 0) & (c2 > 0)


def network(*, r1: np.ndarray, c1: np.ndarray, omega: np.ndarray, r2: np.ndarray | float = np.nan,
            c2: np.ndarray | float = np.nan) -> tuple[np.ndarray, np.ndarray]:
    """Gain G and lag ψ [rad] from the line to the diac capacitor (sinusoidal steady state).

    Single (r2 or c2 NaN): H = 1/(1 + jωR1C1). Double: node equations of R1–C1–R2–C2 give
    H = 1/[(1 + jωR1C1)(1 + jωR2C2) + jωR1C2]. r [Ω], c [F], omega [rad/s].

    >>> g, psi = network(r1=100e3, c1=100e-9, omega=2 * np.pi * 50)
    >>> round(float(g), 4), round(float(np.degrees(psi)), 2)
    (0.3033, 72.34)
    """
    r1, c1, omega, r2, c2 = (as_array(x) for x in (r1, c1, omega, r2, c2))
    dbl = _double(r2, c2)
    jw = 1j * omega
    r2s, c2s = np.where(dbl, r2, 0.0), np.where(dbl, c2, 0.0)
    den = (1 + jw * r1 * c1) * (1 + jw * r2s * c2s) + jw * r1 * c2s
    h = 1.0 / den
    return np.abs(h), -np.angle(h) % (2 * np.pi)


def _system(*, vm: np.ndarray, r1: np.ndarray, c1: np.ndarray, omega: np.ndarray,
            r2: np.ndarray, c2: np.ndarray) -> dict[str, np.ndarray]:
    """The network as x' = A·x + b·v(θ) in θ = ωt, x = (v_C1, v_diac), with the eigenvalues
    of A and the steady-state phasors of x under Vm·sin θ.

    Single section: the diac capacitor is state 2 and state 1 a decoupled, undriven dummy
    (eigenvalue a22 − 1, so the two stay distinct). RC ladders have real, negative, distinct
    eigenvalues, so exp(A·θ) has Sylvester's closed form per row.
    """
    r1, c1, omega, r2, c2 = (as_array(x) for x in (r1, c1, omega, r2, c2))
    r1 = np.maximum(r1, 1.0)  # a pot at 0 Ω with no series R: 1 Ω keeps exp(A·θ) finite
    dbl = _double(r2, c2)
    r2s, c2s = np.where(dbl, r2, 1.0), np.where(dbl, c2, 1.0)
    t1 = 1 / (omega * r1 * c1)
    a22 = np.where(dbl, -1 / (omega * r2s * c2s), -t1)
    a11 = np.where(dbl, -(1 / r1 + 1 / r2s) / (omega * c1), a22 - 1.0)
    a12 = np.where(dbl, 1 / (omega * r2s * c1), 0.0)
    a21 = np.where(dbl, 1 / (omega * r2s * c2s), 0.0)
    tr, det = a11 + a22, a11 * a22 - a12 * a21
    root = np.sqrt(np.maximum(tr * tr - 4 * det, 0.0))
    g, psi = network(r1=r1, c1=c1, omega=omega, r2=r2, c2=c2)
    x2 = as_array(vm) * g * np.exp(-1j * psi)
    x1 = np.where(dbl, x2 * (1 + 1j * omega * r2s * c2s), 0.0)
    return {"a11": a11, "a12": a12, "a21": a21, "a22": a22, "l1": 0.5 * (tr + root),
            "l2": 0.5 * (tr - root), "x1": x1, "x2": x2}


def _phi(s: Mapping[str, np.ndarray], th: np.ndarray) -> tuple[np.ndarray, ...]:
    """exp(A·θ) as (φ11, φ12, φ21, φ22) (Sylvester, distinct eigenvalues)."""
    l1, l2 = s["l1"], s["l2"]
    e1, e2 = np.exp(l1 * th), np.exp(l2 * th)
    d = l1 - l2
    p11 = (e1 * (s["a11"] - l2) - e2 * (s["a11"] - l1)) / d
    p22 = (e1 * (s["a22"] - l2) - e2 * (s["a22"] - l1)) / d
    p12 = (e1 - e2) * s["a12"] / d
    p21 = (e1 - e2) * s["a21"] / d
    return p11, p12, p21, p22


def _xss(s: Mapping[str, np.ndarray], th: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The steady state under the unclamped sine at θ: Im(X·e^(jθ)) per state."""
    rot = np.exp(1j * th)
    return np.imag(s["x1"] * rot), np.imag(s["x2"] * rot)


def running_excess(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                   vbo: np.ndarray, breakback: np.ndarray | float, alpha: np.ndarray,
                   r2: np.ndarray | float = np.nan,
                   c2: np.ndarray | float = np.nan, start: bool = False,
                   phi: np.ndarray | float = 0.0) -> Any:
    """v_diac(α⁻) − VBO [V] in the periodic state that fires at α in every half-cycle, once
    (``start``: the state x(0) at the positive zero instead, as two arrays).

    ``phi`` [rad] the load angle atan(ωL/R) of an R–L load (0: resistive). The triac then
    conducts until the current's zero β(α) > π (:func:`checks.rl.extinction_angle`), the
    network's input is zero over (α, β) and it restarts at γ = β − π in the next half-cycle,
    from the line's value there: with y = x(γ) the start of the half-cycle,

    (I + Φ(π))·y = Φ(π)·xs(γ) − Φ(π + γ − α)·(xs(α) − ΔV·e₂),
    x(α⁻) = xs(α) + Φ(α − γ)·(y − xs(γ)),

    which is the resistive form at γ = 0. For α ≤ φ the current does not end before the next
    half-cycle's firing (continuous conduction): NaN there (no consistent state).

    The network sits across the triac: it sees Vm·sin θ on [0, α) and nothing while the triac
    conducts, (α, π) (a resistive load's current ends at the line zero). At α the diac drops
    its capacitor by ΔV. Half-wave antisymmetry x(π) = −x(0) gives the start of the
    half-cycle in closed form, with Φ(θ) = exp(A·θ) and xs the sinusoidal steady state:

    x(0) = (I + Φ(π))⁻¹·[Φ(π)·xs(0) − Φ(π − α)·(xs(α) − ΔV·e₂)],
    x(α⁻) = xs(α) + Φ(α)·(x(0) − xs(0)).

    The firing angle of the running state is the first root in α of this excess. It holds
    while the diac fires once per half-cycle; where C1 brings C2 back up to VBO after the
    breakback (a double section can), :func:`periodic_running` follows the refirings.
    """
    s = _system(vm=vm, r1=r1, c1=c1, omega=omega, r2=as_array(r2), c2=as_array(c2))
    alpha = as_array(alpha)
    dv = as_array(breakback)
    ph = as_array(phi)
    if np.any(ph > 0):
        beta = _extinction(alpha, ph)
        gam = np.where(ph > 0, beta - np.pi, 0.0)
        # α ≤ φ: the current would not end before the next firing (no such state)
        gam = np.where(alpha > np.where(ph > 0, ph, -1.0), gam, np.nan)
    else:
        gam = np.zeros_like(alpha)
    s10, s20 = _xss(s, gam)
    s1a, s2a = _xss(s, alpha)
    q11, q12, q21, q22 = _phi(s, np.full_like(alpha, np.pi))
    r11, r12, r21, r22 = _phi(s, np.pi + gam - alpha)
    u1, u2 = s1a, s2a - dv
    w1 = q11 * s10 + q12 * s20 - (r11 * u1 + r12 * u2)
    w2 = q21 * s10 + q22 * s20 - (r21 * u1 + r22 * u2)
    m11, m12, m21, m22 = 1 + q11, q12, q21, 1 + q22
    det = m11 * m22 - m12 * m21
    x01 = (m22 * w1 - m12 * w2) / det
    x02 = (m11 * w2 - m21 * w1) / det
    if start:
        return x01, x02
    p11, p12, p21, p22 = _phi(s, alpha - gam)
    return s2a + p21 * (x01 - s10) + p22 * (x02 - s20) - as_array(vbo)


def _extinction(alpha: np.ndarray, phi: np.ndarray) -> np.ndarray:
    """:func:`checks.rl.extinction_angle`, by the warm-started iteration of
    :func:`checks.diac_single.extinction` on the rows it covers (0 ≤ α < π, tan φ > 1e-12;
    the same root to ~1e-14 rad) and by the general code on the others."""
    a, p = np.broadcast_arrays(as_array(alpha), as_array(phi))
    fast = (np.tan(np.clip(p, 0.0, np.pi / 2)) > 1e-12) & (a >= 0) & (a < np.pi)
    if fast.all():
        return diac_single.extinction(a, p)
    out = np.empty(a.shape)
    out[~fast] = rl.extinction_angle(alpha=a[~fast], phi=p[~fast])
    if fast.any():
        out[fast] = diac_single.extinction(a[fast], p[fast])
    return out


def _restart_slope(ang: np.ndarray, phi: np.ndarray | float) -> tuple[np.ndarray, np.ndarray]:
    """:func:`_restart` γ and its slope dγ/dα, implicit in the extinction equation
    g(β, α) = sin(β − φ) − sin(α − φ)·e^(−(β − α)/tan φ) = 0: dβ/dα = −g_α/g_β, with
    g_α = −e^(…)·(cos(α − φ) + sin(α − φ)/tan φ), g_β = cos(β − φ) + sin(α − φ)·e^(…)/tan φ."""
    gam = _restart(ang, phi)
    ph = as_array(phi)
    live = (gam > 0) & np.isfinite(ang)
    with np.errstate(all="ignore"):
        inv = 1.0 / np.tan(np.where(ph > 0, ph, 1.0))
        beta = np.pi + gam
        e = np.exp(-(beta - ang) * inv)
        s_a, c_a = np.sin(ang - ph), np.cos(ang - ph)
        slope = e * (c_a + s_a * inv) / (np.cos(beta - ph) + s_a * e * inv)
    return gam, np.where(live, slope, 0.0)


def _restart(ang: np.ndarray, phi: np.ndarray | float) -> np.ndarray:
    """Where the next half-cycle's network starts after a firing at ``ang`` [rad]: γ = β − π
    for an R–L load (0: resistive, or a half that does not fire, NaN ``ang``)."""
    ph = as_array(phi)
    if not np.any(ph > 0):
        return np.zeros(np.broadcast_shapes(np.shape(ang), np.shape(ph)))
    fired = np.isfinite(ang)
    beta = _extinction(np.where(fired, ang, np.pi), ph)
    return np.where(fired & (ph > 0), beta - np.pi, 0.0)


def pair_excess(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                v_pos: np.ndarray, v_neg: np.ndarray, breakback: np.ndarray | float,
                a: np.ndarray, b: np.ndarray, which: int, r2: np.ndarray | float = np.nan,
                c2: np.ndarray | float = np.nan,
                phi: np.ndarray | float = 0.0,
                gammas: tuple[np.ndarray, np.ndarray] | None = None) -> np.ndarray:
    """The periodic state over a whole cycle that fires at a in the positive half-cycle (level
    v_pos) and at b after the negative one starts (level v_neg; NaN: that half does not
    fire): v_diac − level at the firing of half ``which`` (0: positive, 1: negative).

    Each half-cycle starts where the other's current ended, γ = β − π (0 for a resistive load
    or a half that did not fire; ``phi`` the load angle, :func:`running_excess`), and is an
    affine map of its starting state, x ↦ Φ(π + γ_out − γ_in)·x + q (in the frame of that
    half's sign), q = Φ(π + γ_out − a)·(xs(a) − Φ(a − γ_in)·xs(γ_in) − ΔV·e₂); the cycle
    closes with x(γ_b) = (I − Φ(2π))⁻¹·(Φ(π + γ_b − γ_a)·q₊ − q₋). With v_pos = v_neg
    this is :func:`running_excess`. A half that would fire before the other's current has
    ended is NaN (no such state). ``which`` −1: both halves, stacked on a leading axis.
    ``gammas``: the restarts (γ after a, γ after b) when the caller has them.
    """
    s = _system(vm=vm, r1=r1, c1=c1, omega=omega, r2=as_array(r2), c2=as_array(c2))
    a, b = np.broadcast_arrays(as_array(a), as_array(b))
    dv = as_array(breakback)
    ga, gb = (_restart(a, phi), _restart(b, phi)) if gammas is None else gammas

    def q(ang: np.ndarray, g_in: np.ndarray, g_out: np.ndarray
          ) -> tuple[np.ndarray, np.ndarray]:
        fired = np.isfinite(ang)
        ang = np.where(fired, ang, np.pi)
        d = np.where(fired, dv, 0.0)
        sa1, sa2 = _xss(s, ang)
        s01, s02 = _xss(s, g_in)
        p11, p12, p21, p22 = _phi(s, ang - g_in)
        u1 = sa1 - (p11 * s01 + p12 * s02)
        u2 = sa2 - (p21 * s01 + p22 * s02) - d
        r11, r12, r21, r22 = _phi(s, np.pi + g_out - ang)
        return r11 * u1 + r12 * u2, r21 * u1 + r22 * u2

    qa1, qa2 = q(a, gb, ga)
    qb1, qb2 = q(b, ga, gb)
    ma11, ma12, ma21, ma22 = _phi(s, np.pi + ga - gb)
    mb11, mb12, mb21, mb22 = _phi(s, np.pi + gb - ga)
    w1 = mb11 * qa1 + mb12 * qa2 - qb1
    w2 = mb21 * qa1 + mb22 * qa2 - qb2
    f11, f12, f21, f22 = _phi(s, np.full_like(ga, 2 * np.pi))
    m11, m12, m21, m22 = 1 - f11, -f12, -f21, 1 - f22  # I − Φ(2π)
    det = m11 * m22 - m12 * m21
    x1 = (m22 * w1 - m12 * w2) / det
    x2 = (m11 * w2 - m21 * w1) / det
    outs = []
    for half in (0, 1) if which < 0 else (which,):
        g_in, y1, y2 = gb, x1, x2
        if half == 1:  # the negative half's start, mirrored: −(Φ(π + γ_a − γ_b)·x + q₊)
            y1, y2 = -(ma11 * x1 + ma12 * x2 + qa1), -(ma21 * x1 + ma22 * x2 + qa2)
            g_in = ga
        ang = a if half == 0 else b
        sa1, sa2 = _xss(s, ang)
        s01, s02 = _xss(s, g_in)
        p11, p12, p21, p22 = _phi(s, ang - g_in)
        out = sa2 + p21 * (y1 - s01) + p22 * (y2 - s02) - as_array(v_pos if half == 0
                                                                   else v_neg)
        outs.append(np.where(ang > g_in, out, np.nan))
    return outs[0] if which >= 0 else np.stack(outs)


def _running_pair(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                 v_pos: np.ndarray, v_neg: np.ndarray, breakback: np.ndarray | float,
                 r2: np.ndarray | float = np.nan,
                 c2: np.ndarray | float = np.nan, phi: np.ndarray | float = 0.0
                 ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """running_pair: see there (one block of rows)."""
    shape = np.broadcast_shapes(*(np.shape(x) for x in (vm, omega, r1, c1, v_pos, v_neg,
                                                         breakback, r2, c2, phi)))

    def c(x: np.ndarray | float) -> np.ndarray:
        return np.broadcast_to(as_array(x), shape)

    kw = {"vm": c(vm), "omega": c(omega), "r1": c(r1), "c1": c(c1), "v_pos": c(v_pos),
          "v_neg": c(v_neg), "breakback": c(breakback), "r2": c(r2), "c2": c(c2),
          "phi": c(phi)}
    base = {k: kw[k] for k in ("vm", "omega", "r1", "c1", "breakback", "r2", "c2", "phi")}
    ph = kw["phi"]
    with np.errstate(all="ignore"):
        a = firing_angle(vbo=kw["v_pos"], running=True, **base)
        b = firing_angle(vbo=kw["v_neg"], running=True, **base)
        both = np.isfinite(a) | np.isfinite(b)
        a, b = np.where(np.isfinite(a), a, b), np.where(np.isfinite(b), b, a)
        h = 1e-7

        def f(x: np.ndarray, y: np.ndarray, k: Mapping[str, np.ndarray] = kw,
              gammas: tuple[np.ndarray, np.ndarray] | None = None
              ) -> tuple[np.ndarray, np.ndarray]:
            both_halves = pair_excess(a=x, b=y, which=-1, gammas=gammas, **k)
            return both_halves[0], both_halves[1]

        # Newton on the rows still moving: a row leaves once its step is below 1e-13 rad.
        flat = {k: np.ravel(v) for k, v in kw.items()}
        af, bf = np.array(a, dtype=float).ravel(), np.array(b, dtype=float).ravel()
        act = np.flatnonzero(np.ravel(both))
        for _ in range(8):
            if not act.size:
                break
            sub = {k: v[act] for k, v in flat.items()}
            x, y = af[act], bf[act]
            # The restarts at x ± h from their slope (the error, ~h²·γ'', is far below
            # what the difference quotient resolves): one extinction solve per half.
            (gx, sx), (gy, sy) = _restart_slope(x, sub["phi"]), _restart_slope(y, sub["phi"])
            f0, g0 = f(x, y, sub, (gx, gy))
            fa1, ga1 = f(x + h, y, sub, (gx + h * sx, gy))
            fa0, ga0 = f(x - h, y, sub, (gx - h * sx, gy))
            fb1, gb1 = f(x, y + h, sub, (gx, gy + h * sy))
            fb0, gb0 = f(x, y - h, sub, (gx, gy - h * sy))
            j11, j21 = (fa1 - fa0) / (2 * h), (ga1 - ga0) / (2 * h)
            j12, j22 = (fb1 - fb0) / (2 * h), (gb1 - gb0) / (2 * h)
            det = j11 * j22 - j12 * j21
            da = (j22 * f0 - j12 * g0) / det
            db = (j11 * g0 - j21 * f0) / det
            floor = np.where(sub["phi"] > 0, sub["phi"] + _PHI_GAP, 1e-9)
            x_new = np.clip(x - da, floor, np.pi - 1e-9)
            y_new = np.clip(y - db, floor, np.pi - 1e-9)
            af[act], bf[act] = x_new, y_new
            moved = np.maximum(np.abs(x_new - x), np.abs(y_new - y))
            act = act[~(moved <= 1e-13)]
        a, b = af.reshape(shape), bf.reshape(shape)
        f0, g0 = f(a, b)
        ok = (np.abs(f0) <= 1e-9 * kw["v_pos"]) & (np.abs(g0) <= 1e-9 * kw["v_pos"])
        a = np.where(both, np.where(ok, a, np.nan), a)
        b = np.where(both, np.where(ok, b, np.nan), b)
        one = both & ~ok  # no state firing in both halves: try one half alone
        if one.any():
            nan = np.full(shape, np.nan)[..., None]
            kc = {k: v[..., None] for k, v in kw.items()}
            a1 = _first_root(lambda x: pair_excess(a=x, b=nan + 0 * x, which=0, **kc), shape)
            b1 = _first_root(lambda x: pair_excess(a=nan + 0 * x, b=x, which=1, **kc), shape)
            # The other half must then indeed not fire; where it would, nothing is trusted.
            b_chk = _first_root(lambda x: pair_excess(a=a1[..., None] + 0 * x, b=x, which=1,
                                                      **kc), shape)
            a_chk = _first_root(lambda x: pair_excess(a=x, b=b1[..., None] + 0 * x, which=0,
                                                      **kc), shape)
            pos_only = np.isfinite(a1) & ~np.isfinite(b_chk)
            neg_only = np.isfinite(b1) & ~np.isfinite(a_chk) & ~pos_only
            a = np.where(one, np.where(pos_only, a1, np.nan), a)
            b = np.where(one, np.where(neg_only, b1, np.nan), b)
            bad = one & ~pos_only & ~neg_only & (np.isfinite(a1) | np.isfinite(b1))
            a = np.where(bad, np.nan, a)
            b = np.where(bad, np.nan, b)
        else:
            bad = np.zeros(shape, dtype=bool)
        dbl = np.broadcast_to(_double(as_array(r2), as_array(c2)), shape)
        bad = bad | (dbl & (ph > 0))  # a second section with an R–L load: not modelled
        live = dbl & (ph <= 0) & (np.isfinite(a) | np.isfinite(b))
        if live.any():
            # A double section may refire within a half-cycle: follow it where it does.
            guess = np.where(np.isfinite(a), a, np.where(np.isfinite(b), b, np.pi / 2))
            x1, x2 = running_excess(vbo=kw["v_pos"], breakback=kw["breakback"], alpha=guess,
                                    start=True, **{k: kw[k] for k in ("vm", "omega", "r1",
                                                                      "c1", "r2", "c2")})
            s = _system(**{k: kw[k] for k in ("vm", "r1", "c1", "omega", "r2", "c2")})
            _, m1, m2, n1, _ = _half_map(s, x1, x2, kw["v_pos"], kw["breakback"])
            _, _, _, n2, _ = _half_map(s, m1, m2, kw["v_neg"], kw["breakback"])
            redo = live & ((n1 > 0) | (n2 > 0))
            if redo.any():
                st = periodic_running(x1=x1, x2=x2, **{k: v for k, v in kw.items() if k != "phi"})
                a = np.where(redo, st["alpha_pos"], a)
                b = np.where(redo, st["alpha_neg"], b)
                bad = bad | (redo & ~st["resolved"])
                dc = np.where(redo, st["dc"], dc_fraction(a, b))
                return a, b, ~bad, dc
    return a, b, ~bad, dc_fraction(a, b, phi=ph)


_REFIRE_MAX = 16  # refirings within one half-cycle followed at most (then: not trusted)


def _root_in(f: Callable[[np.ndarray], np.ndarray], lo: np.ndarray, hi: np.ndarray,
             grid: int = 32, steps: int = 20) -> np.ndarray:
    """The first θ in (lo, hi] where f(θ) ≥ 0, per row; NaN without one. ``f`` takes θ with
    a trailing axis of grid points (or of one point).

    A grid of ``grid`` points brackets the first sign change, then the Illinois variant of
    false position narrows every row's bracket together (``steps`` steps: superlinear, about
    1e-12 rad from a bracket of π/32 for these smooth exponentials).
    """
    u = np.linspace(0.0, 1.0, grid + 1)[1:]
    th = lo[..., None] + (hi - lo)[..., None] * u
    vals = f(th)
    up = vals >= 0
    has = up.any(axis=-1)
    i = np.argmax(up, axis=-1)[..., None]
    b = np.take_along_axis(th, i, axis=-1)[..., 0]
    fb = np.take_along_axis(vals, i, axis=-1)[..., 0]
    first = i[..., 0] == 0
    a = np.where(first, lo, np.take_along_axis(th, np.maximum(i - 1, 0), axis=-1)[..., 0])
    fa = np.where(first, f(lo[..., None])[..., 0],
                  np.take_along_axis(vals, np.maximum(i - 1, 0), axis=-1)[..., 0])
    fa = np.where(fa >= 0, -1e-300, fa)  # a root at lo itself: keep the bracket's sign
    side = np.zeros(a.shape, dtype=int)
    for _ in range(steps):
        x = np.where(fb != fa, b - fb * (b - a) / (fb - fa), 0.5 * (a + b))
        x = np.where((x > a) & (x < b), x, 0.5 * (a + b))
        fx = f(x[..., None])[..., 0]
        pos = fx >= 0
        # Illinois: halve the retained end's value when the same end is kept twice.
        fa = np.where(pos & (side == 1), 0.5 * fa, fa)
        fb = np.where(~pos & (side == -1), 0.5 * fb, fb)
        b, fb = np.where(pos, x, b), np.where(pos, fx, fb)
        a, fa = np.where(pos, a, x), np.where(pos, fa, fx)
        side = np.where(pos, 1, -1)
    return np.where(has, b, np.nan)


def _half_map(s: Mapping[str, np.ndarray], x1: np.ndarray, x2: np.ndarray,
              level: np.ndarray, dv: np.ndarray
              ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """One half-cycle from the state (x1, x2) at its zero, in the frame of its own sign:
    (α, the next half-cycle's start state mirrored, number of refirings, trusted).

    The line drives the network until the diac capacitor reaches ``level`` at α (NaN: it
    does not, and the half-cycle runs undriven by the triac to its end); there the capacitor
    drops by ΔV and the network, shorted by the triac, decays freely — and fires again each
    time C1 brings C2 back up to the level (a double section can), until the line's zero.
    """
    zero = np.zeros_like(x1)
    s10, s20 = _xss(s, zero)

    def driven(th: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        c = {k: v[..., None] for k, v in s.items()}
        p11, p12, p21, p22 = _phi(c, th)
        a1, a2 = _xss(c, th)
        d1, d2 = (x1 - s10)[..., None], (x2 - s20)[..., None]
        return a1 + p11 * d1 + p12 * d2, a2 + p21 * d1 + p22 * d2

    lvl = level[..., None]
    alpha = _root_in(lambda th: driven(th)[1] - lvl, zero, zero + np.pi)
    fired = np.isfinite(alpha)
    at = np.where(fired, alpha, np.pi)
    y1, y2 = (v[..., 0] for v in driven(at[..., None]))
    y2 = np.where(fired, y2 - dv, y2)
    t_k = at.copy()
    n = np.zeros(x1.shape, dtype=int)
    trusted = np.ones(x1.shape, dtype=bool)
    for _ in range(_REFIRE_MAX):
        c = {k: v[..., None] for k, v in s.items()}
        a, b = y1[..., None], y2[..., None]
        tk = t_k[..., None]

        def free2(th: np.ndarray, c: dict = c, a: np.ndarray = a, b: np.ndarray = b,
                  tk: np.ndarray = tk) -> np.ndarray:
            _, _, p21, p22 = _phi(c, th - tk)
            return p21 * a + p22 * b - lvl

        again = _root_in(free2, t_k, zero + np.pi) if fired.any() else np.full(x1.shape,
                                                                                 np.nan)
        again = np.where(fired & (t_k < np.pi), again, np.nan)
        hit = np.isfinite(again)
        if not hit.any():
            break
        p11, p12, p21, p22 = _phi(s, np.where(hit, again, t_k) - t_k)
        y1, y2 = (np.where(hit, p11 * y1 + p12 * y2, y1),
                  np.where(hit, p21 * y1 + p22 * y2 - dv, y2))
        t_k = np.where(hit, again, t_k)
        n = n + hit
    else:
        trusted = ~hit
    p11, p12, p21, p22 = _phi(s, np.pi - t_k)
    e1, e2 = p11 * y1 + p12 * y2, p21 * y1 + p22 * y2
    return alpha, -e1, -e2, n, trusted


def periodic_running(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                     v_pos: np.ndarray, v_neg: np.ndarray, breakback: np.ndarray | float,
                     x1: np.ndarray, x2: np.ndarray, r2: np.ndarray | float = np.nan,
                     c2: np.ndarray | float = np.nan, steps: int = 6, settle: int = 40,
                     history: int = 24) -> dict[str, np.ndarray]:
    """The running state with refirings, from a first guess (x1, x2) of the state at the
    positive zero: ``alpha_pos``, ``alpha_neg`` [rad], ``refires`` (most in a half-cycle),
    ``periodic`` (one cycle repeats), ``dc`` (the mean load voltage over Vm, per
    :func:`dc_fraction`) and ``resolved``.

    The cycle map (two :func:`_half_map` in turn, levels v_pos and v_neg) is affine while the
    firings keep their order, so Newton's method on x − map(x) with a finite-difference
    Jacobian (steps of 1e-6·VBO) lands on the fixed point once the order has settled. Where
    it does not converge (residual above 1e-8·VBO) the order of refirings changes from cycle
    to cycle — the circuit fires in a pattern longer than one cycle: the map itself is then
    run for ``settle`` cycles and the next ``history`` cycles are kept; ``dc`` is their mean,
    the angles those of the earliest cycle kept, ``periodic`` False.
    """
    shape = np.broadcast_shapes(*(np.shape(x) for x in (vm, omega, r1, c1, v_pos, v_neg,
                                                         breakback, x1, x2, r2, c2)))

    def c(x: np.ndarray | float) -> np.ndarray:
        return np.array(np.broadcast_to(as_array(x), shape), dtype=float).ravel()

    p = {k: c(v) for k, v in (("vm", vm), ("r1", r1), ("c1", c1), ("omega", omega),
                              ("r2", r2), ("c2", c2))}
    vp, vn, dv = c(v_pos), c(v_neg), c(breakback)
    x, y = c(x1), c(x2)

    def cycle(a: np.ndarray, b: np.ndarray, sel: np.ndarray | None = None
              ) -> tuple[np.ndarray, ...]:
        q = {k: v if sel is None else v[sel] for k, v in p.items()}
        lv_p, lv_n, d = (v if sel is None else v[sel] for v in (vp, vn, dv))
        s = _system(**q)
        ap, m1, m2, n1, t1 = _half_map(s, a, b, lv_p, d)
        an, e1, e2, n2, t2 = _half_map(s, m1, m2, lv_n, d)
        return e1, e2, ap, an, np.maximum(n1, n2), t1 & t2

    with np.errstate(all="ignore"):
        h = 1e-6 * vp
        for _ in range(steps):
            f1, f2, *_ = cycle(x, y)
            g1, g2 = x - f1, y - f2
            if ((np.abs(g1) <= 1e-10 * vp) & (np.abs(g2) <= 1e-10 * vp)).all():
                break  # every row has landed: no Jacobian needed
            a1, a2, *_ = cycle(x + h, y)
            b1, b2, *_ = cycle(x, y + h)
            j11, j21 = 1 - (a1 - f1) / h, -(a2 - f2) / h
            j12, j22 = -(b1 - f1) / h, 1 - (b2 - f2) / h
            det = j11 * j22 - j12 * j21
            x = x - (j22 * g1 - j12 * g2) / det
            y = y - (j11 * g2 - j21 * g1) / det
        f1, f2, ap, an, n, ok = cycle(x, y)
        periodic = ok & (np.abs(f1 - x) <= 1e-8 * vp) & (np.abs(f2 - y) <= 1e-8 * vp)
        dc = dc_fraction(ap, an)
        resolved = periodic.copy()
        idx = np.flatnonzero(~periodic)
        if idx.size:
            u, w = f1[idx], f2[idx]
            for _ in range(settle):
                u, w, *_ = cycle(u, w, idx)
            total = np.zeros(idx.size)
            good = np.ones(idx.size, dtype=bool)
            first: tuple[np.ndarray, ...] = ()
            for k in range(history):
                u, w, a_p, a_n, nk, tk = cycle(u, w, idx)
                total += dc_fraction(a_p, a_n)
                good &= tk & np.isfinite(u) & np.isfinite(w)
                if k == 0:
                    first = (a_p, a_n, nk)
            ap[idx], an[idx], n[idx] = first
            dc[idx] = total / history
            resolved[idx] = good
    out = {"alpha_pos": ap, "alpha_neg": an, "refires": n, "periodic": periodic, "dc": dc,
           "resolved": resolved}
    return {k: v.reshape(shape) for k, v in out.items()}


_GRID = 96  # bracketing points over the half-cycle for the running firing angle


def _first_root(g: Callable[[np.ndarray], np.ndarray], shape: tuple[int, ...],
                lo: np.ndarray | None = None) -> np.ndarray:
    """The first α in (lo, π) (lo: 0 unless given) where g(α) turns non-negative, per row;
    NaN without one.

    A grid of _GRID angles brackets the first sign change, then false position (Illinois)
    narrows every row's bracket together (:func:`_root_in`).
    """
    start = np.zeros(shape) if lo is None else np.broadcast_to(lo, shape)
    return _root_in(g, start, np.full(shape, np.pi * (1 - 1e-12)), grid=_GRID)


_PHI_GAP = 1e-9  # [rad] above φ: the first angle an R–L load's current ends before


def _alpha_floor(phi: np.ndarray | float, shape: tuple[int, ...]) -> np.ndarray:
    """The lowest running angle a row can fire at: 0 (resistive) or just above φ."""
    ph = np.broadcast_to(as_array(phi), shape)
    return np.where(ph > 0, ph + _PHI_GAP, 0.0)


_BLOCK = 2048  # elements per block where a half-cycle grid rides on every row


def _blocked(fn: Callable[..., Any], names: tuple[str, ...], kw: dict[str, Any]) -> Any:
    """Call ``fn(**kw)`` on blocks of at most _BLOCK elements of the broadcast arrays
    ``names`` (the rest passed as they are), so that the grid each row carries stays in
    memory (a Monte Carlo chunk is thousands of rows); results are joined back in shape.
    A loop over blocks, not rows."""
    arrays = {n: as_array(kw[n]) for n in names if n in kw}
    shape = np.broadcast_shapes(*(a.shape for a in arrays.values()))
    size = int(np.prod(shape)) if shape else 1
    if size <= _BLOCK:
        return fn(**kw)
    flat = {n: np.broadcast_to(a, shape).ravel() for n, a in arrays.items()}
    parts = []
    for start in range(0, size, _BLOCK):
        sl = slice(start, start + _BLOCK)
        parts.append(fn(**{**kw, **{n: a[sl] for n, a in flat.items()}}))
    if isinstance(parts[0], tuple):
        return tuple(np.concatenate([p[k] for p in parts]).reshape(shape)
                     for k in range(len(parts[0])))
    return np.concatenate(parts).reshape(shape)


_ANGLE_ARGS = ("vm", "omega", "r1", "c1", "vbo", "breakback", "r2", "c2", "phi", "rl_r", "rl_l",
               "rs", "cs")


def _by_row(fn: Callable[..., Any], names: tuple[str, ...], kw: dict[str, Any],
            cache: str) -> Any:
    """``fn(**kw)`` solved once per distinct row of the broadcast inputs ``names`` (compared
    bit for bit, NaN included) and, inside a :func:`checks.memo.shared` block, once per
    distinct row among every call with the same ``cache`` name (the checks of a stage pass
    tables of many rows built from a few distinct inputs; each row's solution does not
    depend on the other rows). ``fn`` returns an array or a tuple of arrays in the rows'
    shape; the result is joined back in the inputs' shape."""
    arrays = [as_array(kw[n]) for n in names]
    shape = np.broadcast_shapes(*(a.shape for a in arrays))
    n = int(np.prod(shape)) if shape else 1
    if n == 0:
        return _blocked(fn, names, kw)
    m = np.stack([np.broadcast_to(a, shape).ravel() for a in arrays], axis=1) + 0.0  # −0 → 0
    bits = m.view(np.int64)
    order = np.lexsort(bits.T[::-1])
    srt = bits[order]
    new = np.ones(n, dtype=bool)
    new[1:] = (srt[1:] != srt[:-1]).any(axis=1)
    inv = np.empty(n, dtype=np.intp)
    inv[order] = np.cumsum(new) - 1
    uniq = m[order[new]]
    store = memo.table(cache)
    keys = [row.tobytes() for row in uniq] if store is not None else []
    known = [store.get(k) for k in keys] if store is not None else [None] * len(uniq)
    todo = np.array([r is None for r in known], dtype=bool)
    got: Any = None
    if todo.any():
        sub = {**kw, **{nm: uniq[todo, j] for j, nm in enumerate(names)}}
        got = _blocked(fn, names, sub)
    sample = got if got is not None else next(r for r in known if r is not None)
    multi = isinstance(sample, tuple)
    # each column keeps its own type (the pair's third result is a mask)
    types = [np.asarray(x).dtype for x in (sample if multi else (sample,))]
    cols = [np.empty(len(uniq), dtype=t) for t in types]
    if got is not None:
        for j, part in enumerate(got if multi else (got,)):
            cols[j][todo] = np.asarray(part)
    for i, r in enumerate(known):
        if r is not None:
            for j, c in enumerate(cols):
                c[i] = r[j] if multi else r
    if store is not None and got is not None:
        for i in np.flatnonzero(todo):
            store[keys[i]] = tuple(c[i] for c in cols) if multi else cols[0][i]
    out = tuple(c[inv].reshape(shape) for c in cols)
    return out if multi else out[0]


@memoised  # every triac check fired from this trigger asks for the same angles
def firing_angle(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                 vbo: np.ndarray, breakback: np.ndarray | float = 0.0, running: bool = False,
                 r2: np.ndarray | float = np.nan, c2: np.ndarray | float = np.nan,
                 phi: np.ndarray | float = 0.0, rl_r: np.ndarray | float = np.nan,
                 rl_l: np.ndarray | float = np.nan, rs: np.ndarray | float = np.nan,
                 cs: np.ndarray | float = np.nan) -> np.ndarray:
    """Firing angle α [rad]: the first crossing of VBO by the steady sine (``running`` False:
    the diac starts firing) or, with it firing every half-cycle, the first root of
    :func:`running_excess` (``running`` True); NaN: no firing in its half-cycle.

    ``phi`` [rad]: the load angle of an R–L load (running only; 0: resistive). The root is
    then sought over (φ, π): below φ the current would not end before the next firing. The
    triac shorts the network while it conducts, so the capacitor restarts below VBO at the
    current's zero and the first root lies above φ; a row where it does not (the state just
    above φ already past VBO: continuous conduction) has no consistent state and is NaN, as
    is a second section with an R–L load given by ``phi`` alone (give ``rl_r``, ``rl_l``).

    vm [V] line crest; omega [rad/s]; r1 [Ω] pot + series R; c1 [F]; vbo [V]; breakback [V]
    the drop ΔV when the diac fires; r2, c2 the second section (NaN: single).

    ``rl_r`` [Ω], ``rl_l`` [H]: the R–L load itself (NaN: its drop neglected, ``phi`` alone).
    Given, the network is fed through the load while the triac is off (and ``rs`` [Ω],
    ``cs`` [F], a snubber across the triac, draws its current through it too), φ is
    atan(ωL/R), one or two sections (:func:`_load_running`; :mod:`checks.diac_load`).

    >>> round(float(np.degrees(firing_angle(vm=325.0, omega=2 * np.pi * 50, r1=100e3,
    ...                                     c1=100e-9, vbo=32.0))), 2)
    91.29
    """
    kw = {"vm": vm, "omega": omega, "r1": r1, "c1": c1, "vbo": vbo, "breakback": breakback,
          "running": running, "r2": r2, "c2": c2, "phi": phi, "rl_r": rl_r, "rl_l": rl_l,
          "rs": rs, "cs": cs}
    if not running:
        return _firing_angle(**kw)
    if _with_load(rl_r, rl_l) and np.all(np.isfinite(as_array(rl_l)) & (as_array(rl_l) > 0)
                                         & np.isfinite(as_array(rl_r))):
        names = ("vm", "omega", "r1", "c1", "vbo", "breakback", "r2", "c2", "rl_r", "rl_l",
                 "rs", "cs")
        got = _by_row(_load_rows, names, {k: kw[k] for k in names}, "checks.diac.running_load")
        return got[0]
    return _by_row(_firing_angle, _ANGLE_ARGS, kw, "checks.diac.running")


def _with_load(rl_r: Any, rl_l: Any) -> bool:
    return bool(np.any(np.isfinite(as_array(rl_l)) & (as_array(rl_l) > 0)
                       & np.isfinite(as_array(rl_r))))


def _load_excess(*, vm: Any, omega: Any, r1: Any, c1: Any, vbo: Any, breakback: Any, r2: Any,
                 c2: Any, rl_r: Any, rl_l: Any, rs: Any, cs: Any, shape: tuple[int, ...]
                 ) -> tuple[dict[str, np.ndarray], np.ndarray, Callable[..., np.ndarray],
                            Callable[..., np.ndarray]]:
    """The load model's system, load angle φ, restart γ(α) and running excess g(α) =
    v_diac(α⁻) − VBO, on the rows of ``shape`` flattened (α: rows × points; ``idx``, a
    subset of the rows)."""
    def b(x: Any) -> np.ndarray:
        return np.broadcast_to(as_array(x), shape).ravel()

    w, rr, ll, dv, lv = b(omega), b(rl_r), b(rl_l), b(breakback), b(vbo)
    s = diac_load.system(vm=b(vm), omega=w, r1=b(r1), c1=b(c1), rl_r=rr, rl_l=ll, r2=b(r2),
                         c2=b(c2), rs=b(rs), cs=b(cs))
    ph = np.arctan2(w * ll, rr)
    # the load's current at the firing, over its crest current Vm/|Z|, per unit of u = R1·i
    per_u = np.hypot(rr, w * ll) / (b(vm) * np.maximum(b(r1), 1.0))

    def gamma(a: np.ndarray, idx: Any = slice(None)) -> np.ndarray:
        p = np.broadcast_to(ph[idx][:, None], a.shape)
        ok = a > p
        beta = _extinction(np.where(ok, a, np.pi / 2), np.where(ok, p, 0.5))
        return np.where(ok, beta - np.pi, np.nan)

    def g(a: np.ndarray, idx: Any = slice(None), exact: bool = True) -> np.ndarray:
        sub = s if isinstance(idx, slice) else diac_load.rows(s, idx)
        gm = gamma(a, idx)
        _, xa = diac_load.running_state(sub, alpha=a, gam=gm, breakback=dv[idx][:, None])
        if exact:  # the current already in the load at α moves its zero: once more with it
            gm = _restart_from(a, gm, ph[idx][:, None], xa[..., 0] * per_u[idx][:, None])
            _, xa = diac_load.running_state(sub, alpha=a, gam=gm, breakback=dv[idx][:, None])
        return diac_load.diac_value(sub, xa) - lv[idx][:, None]

    s["per_u"] = per_u
    return s, ph, gamma, g


def _restart_from(a: np.ndarray, gam: np.ndarray, ph: np.ndarray, i0: np.ndarray
                  ) -> np.ndarray:
    """γ = β − π where the R–L current that starts at α from i0 (over Vm/|Z|; from γ, its
    zero from rest) ends: sin(β − φ) = (sin(α − φ) − i0)·e^(−(β − α)/tan φ), by Newton's
    method (three steps from the zero from rest: i0 is a few thousandths)."""
    inv = 1.0 / np.tan(ph)
    k = np.sin(a - ph) - i0
    beta = np.pi + gam
    for _ in range(3):
        e = k * np.exp(-(beta - a) * inv)
        beta = beta - (np.sin(beta - ph) - e) / (np.cos(beta - ph) + e * inv)
    return beta - np.pi


def _load_root(g: Callable[..., np.ndarray], lo: np.ndarray, hi: Any,
               grid: int = _GRID) -> tuple[np.ndarray, np.ndarray]:
    """The first α in (lo, hi] where g(α) ≥ 0 per row (flat), NaN without one, and g(lo): a
    grid of ``grid`` points brackets it, then false position (Illinois) on the rows still
    open, each leaving once its bracket is below 1e-13 rad (at most 40 steps)."""
    n = lo.shape[0]
    hi = np.broadcast_to(as_array(hi), lo.shape)
    u = np.linspace(0.0, 1.0, grid + 1)[1:]
    th = lo[:, None] + (hi - lo)[:, None] * u
    vals = g(th)
    up = vals >= 0
    has = up.any(axis=-1)
    i = np.argmax(up, axis=-1)
    r = np.arange(n)
    b, fb = th[r, i], vals[r, i]
    first = i == 0
    f_lo = g(lo[:, None])[:, 0]
    a = np.where(first, lo, th[r, np.maximum(i - 1, 0)])
    fa = np.where(first, f_lo, vals[r, np.maximum(i - 1, 0)])
    fa = np.where(fa >= 0, -1e-300, fa)
    side = np.zeros(n, dtype=int)
    act = np.flatnonzero(has)
    for _ in range(40):
        act = act[b[act] - a[act] > 1e-13]
        if not act.size:
            break
        aa, bb, ffa, ffb = a[act], b[act], fa[act], fb[act]
        x = np.where(ffb != ffa, bb - ffb * (bb - aa) / (ffb - ffa), 0.5 * (aa + bb))
        x = np.where((x > aa) & (x < bb), x, 0.5 * (aa + bb))
        fx = g(x[:, None], act)[:, 0]
        pos = fx >= 0
        sd = side[act]
        ffa = np.where(pos & (sd == 1), 0.5 * ffa, ffa)
        ffb = np.where(~pos & (sd == -1), 0.5 * ffb, ffb)
        b[act], fb[act] = np.where(pos, x, bb), np.where(pos, fx, ffb)
        a[act], fa[act] = np.where(pos, aa, x), np.where(pos, ffa, fx)
        side[act] = np.where(pos, 1, -1)
    return np.where(has, b, np.nan), f_lo


_NEAR = 0.1  # [rad] half-width of the bracket about the angle with the load's drop neglected
_BELOW = 12  # grid points confirming that the excess stays negative below that bracket


def _guess_angle(*, vm: Any, omega: Any, r1: Any, c1: Any, vbo: Any, breakback: Any, r2: Any,
                 c2: Any, phi: np.ndarray, shape: tuple[int, ...]) -> np.ndarray:
    """The running angle with the load's drop neglected (flat rows; NaN where that model
    has none): a start for :func:`_near_root`."""
    if _double(as_array(r2), as_array(c2)).any():
        return np.full(int(np.prod(shape)) if shape else 1, np.nan)
    return np.ravel(np.broadcast_to(firing_angle(
        vm=vm, omega=omega, r1=r1, c1=c1, vbo=vbo, breakback=breakback, running=True,
        phi=phi), shape))


def _near_root(g: Callable[..., np.ndarray], floor: np.ndarray, top: float,
               guess: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """:func:`_load_root` started from ``guess``: where g < 0 at the floor, on a grid of
    _BELOW points up to guess − _NEAR and there, and g ≥ 0 at guess + _NEAR, the first root
    lies in that bracket (to the grid's resolution, as :func:`_load_root` itself) and false
    position narrows it; the other rows get the full search. (g at the floor, the root)."""
    n = floor.shape[0]
    lo = np.maximum(floor, guess - _NEAR)
    hi = np.minimum(top, guess + _NEAR)
    ok = np.isfinite(guess) & (hi > lo) & (lo > floor)
    alpha, f_lo = np.full(n, np.nan), np.full(n, np.nan)
    idx = np.flatnonzero(ok)
    if idx.size:
        u = np.linspace(0.0, 1.0, _BELOW + 1)
        below = floor[idx, None] + (lo[idx] - floor[idx])[:, None] * u
        vals = g(below, idx, exact=False)  # signs far from the root: the start's current
        top_v = g(hi[idx, None], idx)[:, 0]  # does not change them
        good = (vals < 0).all(axis=-1) & (top_v >= 0)
        take = idx[good]
        if take.size:
            a, _ = _load_root(lambda x, i=None: g(x, take if i is None else take[i]),
                              lo[take], hi[take], grid=1)
            alpha[take], f_lo[take] = a, vals[good, 0]
        ok[idx[~good]] = False
    rest = np.flatnonzero(~ok)
    if rest.size:
        a, fl = _load_root(lambda x, i=None: g(x, rest if i is None else rest[i]),
                           floor[rest], top)
        alpha[rest], f_lo[rest] = a, fl
    return alpha, f_lo


def _load_half(s: Mapping[str, np.ndarray], x: np.ndarray, gin: np.ndarray, ph: np.ndarray,
               per_u: np.ndarray, lv: np.ndarray, dv: np.ndarray
               ) -> tuple[np.ndarray, ...]:
    """One half-cycle of the load model from state ``x`` (u = 0) at the current's zero
    ``gin``, in its own sign's frame (flat rows): the triac off until the diac's capacitor
    reaches ``lv`` at α, on to the current's zero β (from the current already in the load at
    α), the network free meanwhile and the diac firing again (ΔV each time) wherever C1
    brings C2 back to ``lv``. (α, the next half's start mirrored, its γ = β − π, refirings,
    trusted.)"""
    m = x.shape[0]
    xs_g = diac_load.steady(s, gin)

    def vd_off(th: np.ndarray) -> np.ndarray:
        p = diac_load.phi(s, "off", th - gin[:, None])
        xx = diac_load.steady(s, th) + (p @ (x - xs_g)[:, None, :, None])[..., 0]
        return diac_load.diac_value(s, xx) - lv[:, None]

    top = np.full(m, np.pi * (1 - 1e-12))
    alpha = _root_in(vd_off, gin, top, grid=48)
    fired = np.isfinite(alpha)
    a = np.where(fired, alpha, np.pi / 2)
    p = diac_load.phi(s, "off", a - gin)
    xa = diac_load.steady(s, a) + (p @ (x - xs_g)[..., None])[..., 0]
    gm0 = _extinction(a, ph) - np.pi
    gm = _restart_from(a, gm0, ph, xa[:, 0] * per_u)
    beta = np.pi + gm
    kick = diac_load.kick(s, dv, 1)
    y, t = xa - kick, a.copy()
    n = np.zeros(m, dtype=int)
    hit = np.zeros(m, dtype=bool)
    for _ in range(_REFIRE_MAX):
        y0, t0 = y, t

        def free(th: np.ndarray, y0: np.ndarray = y0, t0: np.ndarray = t0) -> np.ndarray:
            q = diac_load.phi(s, "on", th - t0[:, None])
            return diac_load.diac_value(s, (q @ y0[:, None, :, None])[..., 0]) - lv[:, None]

        again = _root_in(free, t, beta)
        hit = np.isfinite(again) & fired & (again < beta)
        if not hit.any():
            break
        q = diac_load.phi(s, "on", np.where(hit, again, t) - t)
        y = np.where(hit[:, None], (q @ y[..., None])[..., 0] - kick, y)
        t = np.where(hit, again, t)
        n = n + hit
    q = diac_load.phi(s, "on", beta - t)
    end = (q @ y[..., None])[..., 0]
    end[:, 0] = 0.0
    return alpha, -end, gm, n, fired & ~hit


def _load_refiring(s: Mapping[str, np.ndarray], x0: np.ndarray, gam: np.ndarray,
                   ph: np.ndarray, per_u: np.ndarray, lv: np.ndarray, dv: np.ndarray,
                   steps: int = 8) -> tuple[np.ndarray, np.ndarray]:
    """The periodic state with refirings (a second section, the R–L load): Newton's method
    on z = (x without u, γ) ↦ :func:`_load_half`(z) − z from the closed form's state (the
    Jacobian by differences of 1e-6·VBO and 1e-7 rad). (α, trusted: residual below
    1e-8·VBO and 1e-9 rad, no half-cycle left unresolved)."""
    m, n = x0.shape
    z = np.concatenate([x0[:, 1:], gam[:, None]], axis=1)
    step = np.concatenate([np.repeat((1e-6 * lv)[:, None], n - 1, axis=1),
                           np.full((m, 1), 1e-7)], axis=1)

    def h(zz: np.ndarray) -> tuple[np.ndarray, ...]:
        xx = np.concatenate([np.zeros((m, 1)), zz[:, :-1]], axis=1)
        a, nxt, g_next, _, ok = _load_half(s, xx, zz[:, -1], ph, per_u, lv, dv)
        return np.concatenate([nxt[:, 1:], g_next[:, None]], axis=1) - zz, a, ok

    for _ in range(steps):
        f, _, _ = h(z)
        if (np.abs(f) <= 1e-3 * step).all():
            break
        jac = np.empty((m, n, n))
        for k in range(n):
            dz = np.zeros_like(z)
            dz[:, k] = step[:, k]
            jac[:, :, k] = (h(z + dz)[0] - f) / step[:, k:k + 1]
        z = z - np.linalg.solve(jac, f[..., None])[..., 0]
    f, a, ok = h(z)
    good = ok & (np.abs(f[:, :-1]) <= 1e-8 * lv[:, None]).all(axis=1) & (np.abs(f[:, -1]) <= 1e-9)
    return np.where(good, a, np.nan), good


def _load_running(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                  vbo: np.ndarray, breakback: np.ndarray | float, r2: Any, c2: Any,
                  rl_r: Any, rl_l: Any, rs: Any, cs: Any,
                  shape: tuple[int, ...]) -> tuple[np.ndarray, np.ndarray]:
    """The running angle with the network fed through the R–L load while the triac is off
    (:func:`checks.diac_load.running_state`: the first root of v_diac(α⁻) − VBO over
    (φ, π)), and a mask of the rows trusted: False where the state just above φ is already
    past VBO (continuous conduction, NaN angle) or where a second section brings the diac's
    capacitor back to VBO while the triac conducts (a refiring, not followed here)."""
    s, ph, gamma, g = _load_excess(vm=vm, omega=omega, r1=r1, c1=c1, vbo=vbo,
                                   breakback=breakback, r2=r2, c2=c2, rl_r=rl_r, rl_l=rl_l,
                                   rs=rs, cs=cs, shape=shape)
    per_u = s.pop("per_u")
    dv = np.broadcast_to(as_array(breakback), shape).ravel()
    lv = np.broadcast_to(as_array(vbo), shape).ravel()
    with np.errstate(all="ignore"):
        floor = ph + _PHI_GAP
        top = np.pi * (1 - 1e-12)
        alpha, f_lo = _near_root(g, floor, top, _guess_angle(
            vm=vm, omega=omega, r1=r1, c1=c1, vbo=vbo, breakback=breakback, r2=r2, c2=c2,
            phi=ph.reshape(shape), shape=shape))
        trusted = ~(f_lo >= 0)
        fired = np.isfinite(alpha)
        a = np.where(fired, alpha, np.pi / 2)
        gm = gamma(a[:, None])[:, 0]
        _, xa = diac_load.running_state(s, alpha=a, gam=gm, breakback=dv)
        gm = _restart_from(a, gm, ph, xa[..., 0] * per_u)
        x0, xa = diac_load.running_state(s, alpha=a, gam=gm, breakback=dv)
        after = xa - diac_load.kick(s, dv, a.ndim)
        again = diac_load.refires(s, x_after=after, level=lv, span=np.pi + gm - a)
        redo = np.flatnonzero(fired & again & (s["diac"] == 2))
        if redo.size:  # C1 brings C2 back to VBO while the triac conducts: follow it
            sub = diac_load.rows(s, redo)
            a_r, ok_r = _load_refiring(sub, x0[redo], gm[redo], ph[redo], per_u[redo],
                                       lv[redo], dv[redo])
            alpha[redo] = a_r
            trusted[redo] &= ok_r
        trusted &= (s["off_cond"] < 1e10) & (s["on_cond"] < 1e10)
    return (np.where(trusted, alpha, np.nan).reshape(shape), trusted.reshape(shape))


def running_pair(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                 v_pos: np.ndarray, v_neg: np.ndarray, breakback: np.ndarray | float,
                 r2: np.ndarray | float = np.nan,
                 c2: np.ndarray | float = np.nan, phi: np.ndarray | float = 0.0
                 ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Running firing angles (α₊, α₋) [rad] with different breakover levels in the two
    half-cycles (NaN: that half does not fire); a mask of the rows resolved (False: no
    consistent state was found, not to be trusted); the mean load voltage over Vm
    (:func:`dc_fraction`; over the whole pattern where a double section refires in a pattern
    longer than one cycle).

    From the symmetric solutions at each level (:func:`firing_angle`, running), Newton's
    method on the two equations of :func:`pair_excess` (Jacobian by central differences of
    1e-7 rad, steps kept inside (0, π)), up to 8 steps for every row at once (fewer once no
    row moves by 1e-13 rad); a row whose residual
    is then above 1e-9·VBO is NaN (not trusted). Where only one half fires at its own level,
    that half is solved with the other not firing (the first root over its half-cycle). A
    double section that refires within a half-cycle is then solved by
    :func:`periodic_running` from that state. Rows are taken in blocks (:func:`_blocked`).
    ``phi``: an R–L load's angle (each half starts at the other's current zero,
    :func:`pair_excess`; a second section with it is not resolved).
    """
    kw = {"vm": vm, "omega": omega, "r1": r1, "c1": c1, "v_pos": v_pos, "v_neg": v_neg,
          "breakback": breakback, "r2": r2, "c2": c2, "phi": phi}
    return _by_row(_running_pair, tuple(kw), kw, "checks.diac.running_pair")


def crossing(*, vm: np.ndarray, gain: np.ndarray, lag: np.ndarray,
             level: np.ndarray) -> np.ndarray:
    """First crossing of ``level`` [V] by vss = Vm·G·sin(θ − ψ) after the line's zero [rad];
    NaN when vss never reaches it or reaches it only after π (the line has reversed).

    vss rises from θ = ψ − π/2 to its crest at ψ + π/2, and is negative at θ = 0 (0 < ψ < π),
    so the first crossing of a positive level is ψ + asin(level/(Vm·G)).

    >>> round(float(np.degrees(crossing(vm=325.0, gain=0.3033, lag=np.radians(72.34),
    ...                                 level=32.0))), 2)
    91.28
    """
    amp = as_array(vm) * as_array(gain)
    with np.errstate(invalid="ignore", divide="ignore"):
        a = as_array(lag) + np.arcsin(as_array(level) / amp)
    return np.where((amp > level) & (a < np.pi), a, np.nan)


def unresolved(*, vm: Any, omega: Any, r1: Any, c1: Any, vbo: Any, breakback: Any,
               r2: Any = np.nan, c2: Any = np.nan, rl_r: Any = np.nan, rl_l: Any = np.nan,
               rs: Any = np.nan, cs: Any = np.nan) -> np.ndarray:
    """Rows whose running state with the load (:func:`_load_running`) is not trusted
    although the circuit may fire there: a second section refiring while the triac
    conducts, or a continuous conduction (True)."""
    kw = {"vm": vm, "omega": omega, "r1": r1, "c1": c1, "vbo": vbo, "breakback": breakback,
          "r2": r2, "c2": c2, "rl_r": rl_r, "rl_l": rl_l, "rs": rs, "cs": cs}
    if not _with_load(rl_r, rl_l):
        return np.zeros(np.broadcast_shapes(*(np.shape(v) for v in kw.values())), dtype=bool)
    return ~_by_row(_load_rows, tuple(kw), kw, "checks.diac.running_load")[1]


def _load_rows(**k: Any) -> tuple[np.ndarray, np.ndarray]:
    """:func:`_load_running` on rows of inputs (the shape theirs)."""
    shape = np.broadcast_shapes(*(np.shape(v) for v in k.values()))
    return _load_running(shape=shape, **k)


def _firing_angle(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                 vbo: np.ndarray, breakback: np.ndarray | float = 0.0, running: bool = False,
                 r2: np.ndarray | float = np.nan, c2: np.ndarray | float = np.nan,
                 phi: np.ndarray | float = 0.0, rl_r: np.ndarray | float = np.nan,
                 rl_l: np.ndarray | float = np.nan, rs: np.ndarray | float = np.nan,
                 cs: np.ndarray | float = np.nan) -> np.ndarray:
    """firing_angle: see there (one block of rows)."""
    if _with_load(rl_r, rl_l):
        load = np.isfinite(as_array(rl_l)) & (as_array(rl_l) > 0) & np.isfinite(as_array(rl_r))
        args = {"vm": vm, "omega": omega, "r1": r1, "c1": c1, "vbo": vbo, "r2": r2, "c2": c2}
        shape = np.broadcast_shapes(*(np.shape(x) for x in (*args.values(), breakback, phi,
                                                             rl_r, rl_l, rs, cs)))
        if running:
            got = _load_running(breakback=breakback, rl_r=rl_r, rl_l=rl_l, rs=rs, cs=cs,
                                shape=shape, **args)[0]
        else:
            s = diac_load.system(vm=vm, omega=omega, r1=r1, c1=c1, rl_r=rl_r, rl_l=rl_l,
                                 r2=r2, c2=c2, rs=rs, cs=cs)
            amp, lag = diac_load.amplitude_lag(s)
            got = crossing(vm=amp, gain=1.0, lag=lag, level=as_array(vbo))
        if np.all(load):
            return np.broadcast_to(got, shape)
        rest = _firing_angle(breakback=breakback, running=running, phi=phi, **args)
        return np.where(load, got, rest)
    if running:
        shape = np.broadcast_shapes(*(np.shape(x) for x in (vm, omega, r1, c1, vbo, breakback,
                                                             r2, c2, phi)))
        inductive = bool(np.any(as_array(phi) > 0))

        def c(x: np.ndarray | float) -> np.ndarray:
            return np.broadcast_to(as_array(x), shape)[..., None]

        def g(a: np.ndarray) -> np.ndarray:
            return running_excess(vm=c(vm), omega=c(omega), r1=c(r1), c1=c(c1), vbo=c(vbo),
                                  breakback=c(breakback), alpha=a, r2=c(r2), c2=c(c2),
                                  phi=c(phi) if inductive else 0.0)

        with np.errstate(all="ignore"):
            dbl = np.broadcast_to(_double(as_array(r2), as_array(c2)), shape)
            if not dbl.any():
                return _single_running(vm=vm, omega=omega, r1=r1, c1=c1, vbo=vbo,
                                       breakback=breakback, phi=phi, shape=shape, g=g)
            if inductive:
                floor = _alpha_floor(phi, shape)
                alpha = _first_root(g, shape, floor)
                ph = np.broadcast_to(as_array(phi), shape)
                bad = (ph > 0) & ((g(floor[..., None])[..., 0] >= 0) | dbl)
                alpha = np.where(bad, np.nan, alpha)
            else:
                alpha = _first_root(g, shape)
            if not (dbl & np.isfinite(alpha)).any():
                return alpha  # a single section never fires twice in a half-cycle
            kw = {k: np.broadcast_to(as_array(x), shape) for k, x in
                  (("vm", vm), ("omega", omega), ("r1", r1), ("c1", c1), ("r2", r2),
                   ("c2", c2))}
            dv = np.broadcast_to(as_array(breakback), shape)
            lv = np.broadcast_to(as_array(vbo), shape)
            x1, x2 = running_excess(vbo=lv, breakback=dv, alpha=np.where(
                np.isfinite(alpha), alpha, np.pi / 2), start=True, **kw)
            s = _system(**{k: kw[k] for k in ("vm", "r1", "c1", "omega", "r2", "c2")})
            _, _, _, n, _ = _half_map(s, x1, x2, lv, dv)
            redo = dbl & np.isfinite(alpha) & (n > 0)
            if not redo.any():
                return alpha
            st = periodic_running(v_pos=lv, v_neg=lv, breakback=dv, x1=x1, x2=x2, **kw)
            # A pattern longer than a cycle has no one angle: not trusted (NaN).
            return np.where(redo, np.where(st["periodic"], st["alpha_pos"], np.nan), alpha)
    g_, psi = network(r1=r1, c1=c1, omega=omega, r2=r2, c2=c2)
    return crossing(vm=vm, gain=g_, lag=psi, level=as_array(vbo))


def _single_running(*, vm: np.ndarray, omega: np.ndarray, r1: np.ndarray, c1: np.ndarray,
                    vbo: np.ndarray, breakback: np.ndarray | float,
                    phi: np.ndarray | float, shape: tuple[int, ...],
                    g: Callable[[np.ndarray], np.ndarray]) -> np.ndarray:
    """The running angle of single-section rows (:func:`checks.diac_single.running_angle`:
    the same root as :func:`_first_root` of :func:`running_excess`, without a nested solve);
    a row whose grid bracket the exact ends do not confirm is solved by the general code."""
    floor = _alpha_floor(phi, shape)
    alpha, f_lo, recheck = diac_single.running_angle(
        vm=vm, omega=omega, r1=r1, c1=c1, vbo=vbo, breakback=as_array(breakback),
        phi=as_array(phi), floor=floor, grid=_GRID)
    ph = np.broadcast_to(as_array(phi), shape)
    alpha = np.where((ph > 0) & (f_lo >= 0), np.nan, alpha)
    if recheck.any():
        redo = _first_root(g, shape, floor)
        redo = np.where((ph > 0) & (g(floor[..., None])[..., 0] >= 0), np.nan, redo)
        alpha = np.where(recheck, redo, alpha)
    return alpha


def limit_r(*, vm: np.ndarray, omega: np.ndarray, c1: np.ndarray, vbo: np.ndarray,
            breakback: np.ndarray | float = 0.0, running: bool = False,
            r2: np.ndarray | float = np.nan, c2: np.ndarray | float = np.nan,
            phi: np.ndarray | float = 0.0, rl_r: np.ndarray | float = np.nan,
            rl_l: np.ndarray | float = np.nan, rs: np.ndarray | float = np.nan,
            cs: np.ndarray | float = np.nan) -> np.ndarray:
    """The largest R1 [Ω] that still fires (starting, or ``running``), solved per row by
    bisection in log R over 1 Ω … 1 GΩ (firing stops once as R1 rises: G falls and ψ grows);
    NaN where even 1 Ω does not fire. Single section, starting: ωR1C1 = √((Vm/VBO)² − 1).
    ``phi``: an R–L load's angle (running: the grid runs over (φ, π), :func:`running_excess`).
    ``rl_r``, ``rl_l``, ``rs``, ``cs``: the load itself and a snubber (:func:`firing_angle`).

    >>> round(float(limit_r(vm=325.0, omega=2 * np.pi * 50, c1=100e-9, vbo=32.0)))
    321713
    """
    shape = np.broadcast_shapes(*(np.shape(x) for x in (vm, omega, c1, vbo, breakback, r2, c2,
                                                         phi, rl_r, rl_l, rs, cs)))
    load = _with_load(rl_r, rl_l)
    if load:
        phi = np.arctan2(as_array(omega) * as_array(rl_l), as_array(rl_r))
        phi = np.where(np.isfinite(phi), phi, 0.0)
    lo = np.full(shape, 0.0)
    hi = np.full(shape, np.log(1e9))

    th: Any = np.linspace(0.0, np.pi, _GRID + 1)[1:-1]
    if np.any(as_array(phi) > 0):
        floor = _alpha_floor(phi, shape)[..., None]
        th = floor + (np.pi - floor) * np.linspace(0.0, 1.0, _GRID + 1)[1:-1]

    single = running and not load and not _double(as_array(r2), as_array(c2)).any()
    fast = diac_single.grid_fires(
        vm=vm, omega=omega, c1=c1, vbo=vbo, breakback=as_array(breakback), phi=as_array(phi),
        floor=_alpha_floor(phi, shape), u=np.linspace(0.0, 1.0, _GRID + 1)[1:-1],
        top=np.pi) if single else None

    def fires(ln_r: np.ndarray) -> np.ndarray:
        if fast is not None:  # one section: the same grid test without a nested solve
            return fast(np.exp(ln_r))
        if not running:
            return np.isfinite(firing_angle(vm=vm, omega=omega, r1=np.exp(ln_r), c1=c1,
                                            vbo=vbo, r2=r2, c2=c2, rl_r=rl_r, rl_l=rl_l,
                                            rs=rs, cs=cs))
        if load:  # the same grid test on the load model's excess
            with np.errstate(all="ignore"):
                g = _load_excess(vm=vm, omega=omega, r1=np.exp(ln_r), c1=c1, vbo=vbo,
                                 breakback=breakback, r2=r2, c2=c2, rl_r=rl_r, rl_l=rl_l,
                                 rs=rs, cs=cs, shape=shape)[3]
                pts = np.broadcast_to(th, shape + (np.shape(th)[-1],))
                return (g(pts.reshape(-1, pts.shape[-1])) >= 0).any(axis=-1).reshape(shape)
        # Running: a root exists where the excess is non-negative somewhere on the grid
        # (the same test as :func:`_first_root`), so the angle itself is not needed.
        def c(x: np.ndarray | float) -> np.ndarray:
            return np.broadcast_to(as_array(x), shape)[..., None]

        with np.errstate(all="ignore"):
            g = running_excess(vm=c(vm), omega=c(omega), r1=c(np.exp(ln_r)), c1=c(c1),
                               vbo=c(vbo), breakback=c(breakback), alpha=th, r2=c(r2),
                               c2=c(c2), phi=c(phi))
        return (g >= 0).any(axis=-1)

    ok_lo = fires(lo)
    for _ in range(_BISECT):  # vectorised: every row halves its bracket at once
        mid = 0.5 * (lo + hi)
        f = fires(mid)
        lo = np.where(f, mid, lo)
        hi = np.where(f, hi, mid)
    return np.where(ok_lo, np.exp(0.5 * (lo + hi)), np.nan)


def _grade_max(value: np.ndarray, limit: np.ndarray | float,
               marginal_fraction: float) -> tuple[np.ndarray, np.ndarray]:
    """Grade a lower-is-better value against a maximum: margin = limit/value − 1; marginal
    above ``marginal_fraction`` of the limit; NaN fails."""
    value = as_array(value)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.where(value > 0, limit / value, np.inf)
    margin = np.where(np.isnan(value), -1.0, np.minimum(ratio - 1.0, 9.0))
    status = np.where(~(value <= limit), FAIL,
                      np.where(value > marginal_fraction * limit, MARGINAL, PASS))
    return margin, status.astype(np.int8)


# ------------------------------------------------------------------------------- the checks

def firing_range_check(*, vs: np.ndarray, freq: np.ndarray, r_lo: np.ndarray, r_hi: np.ndarray,
                       c1: np.ndarray, vbo: np.ndarray, breakback: np.ndarray,
                       target_lo: np.ndarray | float, target_hi: np.ndarray | float,
                       series_r: np.ndarray, limits: Mapping[str, float],
                       r2: np.ndarray | float = np.nan,
                       c2: np.ndarray | float = np.nan,
                       phi: np.ndarray | float = 0.0,
                       load: Mapping[str, Any] | None = None) -> Outcome:
    """``diac.firing-range``: the firing angles at the ends of the pot, against the target.

    vs [V] RMS line; freq [Hz]; r_lo, r_hi [Ω] R1 at the pot's ends (pot + series R); c1 [F];
    vbo [V]; breakback [V]; target_lo/hi [rad]; series_r [Ω] (to express R1 as a pot
    setting). Both ends are the running angles (the state the load is in while on; the first
    half-cycle after switching on fires later, at the starting angle, reported as
    ``alpha_lo_start``/``alpha_hi_start``). Every setting must also start firing from off:
    a pot end where the capacitor's steady sine never reaches VBO fails, and ``fires_up_to``
    says the pot setting above which it does not. Metric: the smaller of target_lo/α_lo and
    α_hi/target_hi (≥ 1 passes), graded with ``fail_below`` and ``marginal_below``.
    ``phi`` [rad]: the load angle of an R–L load (the running angles follow its current's
    zero, :func:`running_excess`), reported as ``load_angle``. ``load``: the R–L load itself
    and a snubber (``rl_r``, ``rl_l``, ``rs``, ``cs`` of :func:`firing_angle`): the network
    is then fed through the load while the triac is off, one or two sections; a second
    section that refires while the triac conducts is not resolved (NaN, ``refires`` 1).
    """
    vm = np.sqrt(2.0) * as_array(vs)
    omega = 2 * np.pi * as_array(freq)
    ld = dict(load or {})
    if ld:
        phi = np.arctan2(omega * as_array(ld["rl_l"]), as_array(ld["rl_r"]))
    a_lo_start = firing_angle(vm=vm, omega=omega, r1=r_lo, c1=c1, vbo=vbo, r2=r2, c2=c2, **ld)
    a_lo = firing_angle(vm=vm, omega=omega, r1=r_lo, c1=c1, vbo=vbo, breakback=breakback,
                        running=True, r2=r2, c2=c2, phi=phi, **ld)
    a_hi_start = firing_angle(vm=vm, omega=omega, r1=r_hi, c1=c1, vbo=vbo, r2=r2, c2=c2, **ld)
    a_hi = firing_angle(vm=vm, omega=omega, r1=r_hi, c1=c1, vbo=vbo, breakback=breakback,
                        running=True, r2=r2, c2=c2, phi=phi, **ld)
    r_start = limit_r(vm=vm, omega=omega, c1=c1, vbo=vbo, r2=r2, c2=c2, **ld)
    never = ~np.isfinite(a_hi_start) | ~np.isfinite(a_lo_start) | ~np.isfinite(a_lo) \
        | ~np.isfinite(a_hi)
    with np.errstate(divide="ignore", invalid="ignore"):
        m_lo = np.where(a_lo > 0, as_array(target_lo) / a_lo, np.inf)
        m_hi = a_hi / as_array(target_hi)
    metric = np.where(never, np.nan, np.minimum(m_lo, m_hi))
    fail_below = float(limits.get("fail_below", 1.0))
    marginal_below = float(limits.get("marginal_below", fail_below))
    margin = np.where(np.isnan(metric), -1.0, metric / fail_below - 1.0)
    status = np.where(~(metric >= fail_below), FAIL,
                      np.where(metric < marginal_below, MARGINAL, PASS)).astype(np.int8)
    values = {"alpha_lo": a_lo, "alpha_hi": a_hi, "alpha_lo_start": a_lo_start,
              "alpha_hi_start": a_hi_start,
              "fires_up_to": r_start - as_array(series_r), "amplitude_hi": vm * network(
                  r1=r_hi, c1=c1, omega=omega, r2=r2, c2=c2)[0]}
    notes = ["no firing at the pot's top end at some corners"] if never.any() else []
    if np.any(as_array(phi) > 0):
        values["load_angle"] = np.broadcast_to(as_array(phi), np.shape(a_lo))
    if ld:
        rows = np.broadcast_shapes(np.shape(a_lo), np.shape(vm))
        ref = np.zeros(rows, dtype=bool)
        for r1 in (r_lo, r_hi):
            ref |= unresolved(vm=vm, omega=omega, r1=r1, c1=c1, vbo=vbo, breakback=breakback,
                              r2=r2, c2=c2, **ld)
        values["refires"] = ref.astype(float)
    return Outcome(values, margin, status, notes)


def snap_on_check(*, vs: np.ndarray, freq: np.ndarray, c1: np.ndarray, vbo: np.ndarray,
                  breakback: np.ndarray, series_r: np.ndarray, limits: Mapping[str, float],
                  r2: np.ndarray | float = np.nan, c2: np.ndarray | float = np.nan,
                  phi: np.ndarray | float = 0.0,
                  load: Mapping[str, Any] | None = None) -> Outcome:
    """``diac.snap-on``: the jump in firing angle where the load snaps on.

    R_on = :func:`limit_r` (starting): there vss just reaches VBO, and once it fires the
    running state applies at once: the angle jumps from α_start = α(VBO) to α_run. R_off
    (running) is where it drops out again. ``jump`` = α_start − α_run; ``snap_power`` the
    fraction of full power a resistive load gets at α_run, 1 − α/π + sin 2α/(2π) [3];
    ``pot_on`` and ``pot_off`` the pot settings (R − series_r); ``charge_removed`` the
    ΔQ = C·ΔV each firing takes from the diac's capacitor (C2 with a second section) [C],
    which with the triac's short of the network sets the running state. Graded against
    ``max_jump_deg`` (marginal above ``marginal_fraction`` of it). ``phi``: an R–L load's
    angle (the running state follows its current's zero); ``load`` the load itself and a
    snubber, as :func:`firing_range_check` (the network fed through the load while off).
    """
    vm = np.sqrt(2.0) * as_array(vs)
    omega = 2 * np.pi * as_array(freq)
    ld = dict(load or {})
    r_on = limit_r(vm=vm, omega=omega, c1=c1, vbo=vbo, r2=r2, c2=c2, **ld)
    r_off = limit_r(vm=vm, omega=omega, c1=c1, vbo=vbo, breakback=breakback, running=True,
                    r2=r2, c2=c2, phi=phi, **ld)
    # Just inside the starting limit (the angle there is the limit of α as R → R_on⁻).
    r_at = r_on * (1 - 1e-9)
    a_start = firing_angle(vm=vm, omega=omega, r1=r_at, c1=c1, vbo=vbo, r2=r2, c2=c2, **ld)
    a_run = firing_angle(vm=vm, omega=omega, r1=r_at, c1=c1, vbo=vbo, breakback=breakback,
                         running=True, r2=r2, c2=c2, phi=phi, **ld)
    jump = a_start - a_run
    p = 1 - a_run / np.pi + np.sin(2 * a_run) / (2 * np.pi)
    limit = np.radians(float(limits.get("max_jump_deg", 35.0)))
    margin, status = _grade_max(jump, limit, float(limits.get("marginal_fraction", 0.8)))
    dbl = _double(as_array(r2), as_array(c2))
    dq = np.where(dbl, as_array(c2), as_array(c1)) * as_array(breakback)
    values = {"jump": jump, "alpha_start": a_start, "alpha_run": a_run, "snap_power": p,
              "charge_removed": dq,
              "pot_on": r_on - as_array(series_r), "pot_off": r_off - as_array(series_r)}
    return Outcome(values, margin, status)


def gate_pulse_check(*, c_diac: np.ndarray, breakback: np.ndarray, r_path: np.ndarray,
                     igt_q1: np.ndarray, igt_q3: np.ndarray, vgt_q1: np.ndarray,
                     vgt_q3: np.ndarray, t_min: np.ndarray, igt_q1_cold: np.ndarray,
                     igt_q3_cold: np.ndarray, vgt_q1_cold: np.ndarray,
                     vgt_q3_cold: np.ndarray, cold_at: np.ndarray,
                     limits: Mapping[str, float],
                     i_pulse: np.ndarray | float = np.nan) -> Outcome:
    """``diac.gate-pulse``: the pulse the diac's breakback drives into the triac's gate.

    The capacitor (c_diac [F]) drops by ΔV (breakback [V]) into the gate: charge C·ΔV, peak
    current I = (ΔV − VGT)/R_path (r_path [Ω]: series resistor plus the diac's on
    resistance), decaying with R_path·C; its width above IGT is R_path·C·ln(I/IGT). IGT and
    VGT are those of the worse of quadrants I and III, the one with the smaller I/IGT, each
    with its own VGT (a diac's pulse follows MT2's sign: :func:`checks.triac.quadrants`
    "ac") at the coldest ambient (t_min [K]; the cold table at
    ``cold_at`` [K], NaN: the common-practice factors at −40 °C pro rata, IGT ×2, VGT ×1.5).
    Metric I/IGT_cold graded with ``fail_below``/``marginal_below``; a peak above the diac's
    pulse rating ``i_pulse`` [A] fails.
    """
    used = triac.quadrants("ac")
    raw_i = {"q1": igt_q1, "q3": igt_q3}
    raw_v = {"q1": vgt_q1, "q3": vgt_q3}
    cold_i = {"q1": igt_q1_cold, "q3": igt_q3_cold}
    cold_v = {"q1": vgt_q1_cold, "q3": vgt_q3_cold}
    ic = {q: cold_value(raw_i[q], t_min, v_cold=cold_i[q], t_cold=cold_at, k=triac.K_IGT)
          for q in used}
    vc = {q: cold_value(raw_v[q], t_min, v_cold=cold_v[q], t_cold=cold_at, k=triac.K_VGT)
          for q in used}
    dv = as_array(breakback)
    # Each quadrant with its own VGT: the one with the highest IGT need not be the worse
    # (a higher VGT elsewhere leaves less current); the smaller ratio decides.
    with np.errstate(divide="ignore", invalid="ignore"):
        i_q = {q: np.maximum(dv - vc[q], 0.0) / as_array(r_path) for q in used}
        r_q = {q: i_q[q] / ic[q] for q in used}
    worse3 = ~(r_q["q3"] >= r_q["q1"]) & ~np.isnan(r_q["q3"])
    idx = worse3.astype(int)
    igt = np.where(worse3, ic["q3"], ic["q1"])
    vgt = np.where(worse3, vc["q3"], vc["q1"])
    i_pk = np.where(worse3, i_q["q3"], i_q["q1"])
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = i_pk / igt
        width = np.where(ratio > 1, as_array(r_path) * as_array(c_diac) * np.log(ratio), 0.0)
    fail_below = float(limits.get("fail_below", 1.0))
    marginal_below = float(limits.get("marginal_below", fail_below))
    margin = ratio / fail_below - 1.0
    status = np.where(~(ratio >= fail_below), FAIL,
                      np.where(ratio < marginal_below, MARGINAL, PASS)).astype(np.int8)
    ip = as_array(i_pulse)
    rated = np.isfinite(ip)
    over = rated & ~(i_pk <= ip)
    with np.errstate(divide="ignore", invalid="ignore"):
        margin = np.where(rated, np.minimum(margin, ip / i_pk - 1.0), margin)
    status = np.where(over, FAIL, status).astype(np.int8)
    values = {"peak_current": i_pk, "igt_cold": igt, "vgt_cold": vgt,
              "quadrant": np.where(idx == 0, 1.0, 3.0), "charge": as_array(c_diac) * dv,
              "width": width, "drive_ratio": ratio}
    if rated.any():
        values["i_pulse"] = np.broadcast_to(ip, np.shape(i_pk))
    return Outcome(values, margin, status)


def dc_fraction(a_pos: np.ndarray, a_neg: np.ndarray,
                phi: np.ndarray | float = 0.0) -> np.ndarray:
    """Mean of the load voltage over a cycle as a fraction of Vm, positive half fired at
    α₊ and negative at α₋ (NaN: that half does not fire) [3]:
    (cos α₊ − cos α₋)/(2π), each missing half counting as α = π. With an R–L load (``phi``
    the load angle) each half conducts to its current's zero β (the load's voltage is the
    line's over (α, β), its DC part across R): [(cos α₊ − cos β₊) − (cos α₋ − cos β₋)]/(2π).

    >>> round(float(dc_fraction(np.radians(90.0), np.radians(100.0))), 5)
    0.02764
    >>> round(float(dc_fraction(np.radians(90.0), np.nan)), 5)
    0.15915
    """
    cp = np.where(np.isfinite(a_pos), np.cos(a_pos), -1.0)
    cn = np.where(np.isfinite(a_neg), np.cos(a_neg), -1.0)
    if np.any(as_array(phi) > 0):
        cp = cp - np.cos(np.pi + _restart(a_pos, phi))  # − cos β₊ (β = π + γ)
        cn = cn - np.cos(np.pi + _restart(a_neg, phi))
    return (cp - cn) / (2 * np.pi)


def symmetry_check(*, vs: np.ndarray, freq: np.ndarray, r_lo: np.ndarray, r_hi: np.ndarray,
                   c1: np.ndarray, vbo: np.ndarray, asymmetry: np.ndarray,
                   breakback: np.ndarray, limits: Mapping[str, float],
                   r2: np.ndarray | float = np.nan, c2: np.ndarray | float = np.nan,
                   load_r: np.ndarray | float = np.nan, points: int = 0,
                   phi: np.ndarray | float = 0.0) -> Outcome:
    """``diac.symmetry``: the DC component a VBO asymmetry puts on the load.

    One half-cycle fires at VBO, the other at VBO − asymmetry (the datasheet's largest
    | +VBO | − | −VBO |), both running, solved together over the whole cycle
    (:func:`running_pair`: one half's firing sets where the other starts). The mean load
    voltage |cos α₊ − cos α₋|/(2π)·Vm is taken at ``points`` pot settings between r_lo and
    r_hi (log-spaced, both ends included) and its largest value reported: where one half
    still fires and the other has dropped out it is a half-wave.
    ``dc_fraction`` of Vm is graded against ``max_dc_fraction`` (marginal above
    ``marginal_fraction`` of it); ``dc_current`` = V_dc/load_r [A] when the load's DC
    resistance ``load_r`` is given (a winding or transformer primary). A pot setting whose
    pair of angles could not be resolved gives NaN, which fails (never a pass by default).
    ``phi``: the load angle of an R–L load (each half starts at the other's current zero).
    """
    vm = np.sqrt(2.0) * as_array(vs)
    omega = 2 * np.pi * as_array(freq)
    if points <= 0:  # a double section refires: each point costs more, take fewer
        points = 25 if _double(as_array(r2), as_array(c2)).any() else 49
    t = np.linspace(0.0, 1.0, points)
    rl, rh = as_array(r_lo), as_array(r_hi)
    ln_lo, ln_hi = np.log(np.maximum(rl, 1.0)), np.log(np.maximum(rh, 1.0))
    grid = np.exp(ln_lo[..., None] + (ln_hi - ln_lo)[..., None] * t)  # rows × points

    def col(x: np.ndarray | float) -> np.ndarray:
        return as_array(x)[..., None]

    a_pos, a_neg, trusted, dc_mean = running_pair(vm=col(vm), omega=col(omega), r1=grid, c1=col(c1),
                                v_pos=col(vbo), v_neg=col(vbo) - np.abs(col(asymmetry)),
                                breakback=col(breakback), r2=col(r2), c2=col(c2),
                                phi=col(phi))
    dc = np.where(trusted, np.abs(dc_mean), np.nan)
    grid = np.broadcast_to(grid, dc.shape)
    worst = np.argmax(dc, axis=-1)
    take = np.take_along_axis
    dcw = take(dc, worst[..., None], axis=-1)[..., 0]
    values = {"dc_fraction": dcw, "dc_voltage": vm * dcw,
              "at_r": take(grid, worst[..., None], axis=-1)[..., 0],
              "alpha_pos": take(a_pos, worst[..., None], axis=-1)[..., 0],
              "alpha_neg": take(a_neg, worst[..., None], axis=-1)[..., 0]}
    lr = as_array(load_r)
    if np.isfinite(lr).any():
        values["dc_current"] = vm * dcw / lr
    limit = float(limits.get("max_dc_fraction", 0.01))
    margin, status = _grade_max(dcw, limit, float(limits.get("marginal_fraction", 0.5)))
    return Outcome(values, margin, status)


def angle_curve(*, vm: float, omega: float, pot_lo: float, pot_hi: float, series_r: float,
                c1: float, vbo: float, breakback: float, r2: float = np.nan,
                c2: float = np.nan, points: int = 121) -> dict[str, np.ndarray]:
    """The firing angle over the pot's travel at one design point (for a figure).

    ``pot`` [Ω] from pot_lo to pot_hi (linear); ``starting`` and ``running`` [rad] the two
    angles of :func:`firing_angle` (NaN where there is no firing); ``pot_on`` / ``pot_off``
    [Ω] the settings where the load snaps on and drops out (:func:`limit_r` less series_r).

    >>> c = angle_curve(vm=325.0, omega=2 * np.pi * 50, pot_lo=0.0, pot_hi=400e3,
    ...                 series_r=0.0, c1=100e-9, vbo=32.0, breakback=6.0, points=5)
    >>> np.isnan(c["starting"][-1]), bool(c["pot_on"] < c["pot_off"])
    (np.True_, True)
    """
    pot = np.linspace(pot_lo, pot_hi, points)
    r1 = pot + series_r
    kw = {"vm": vm, "omega": omega, "c1": c1, "vbo": vbo, "r2": r2, "c2": c2}
    start = firing_angle(r1=r1, **kw)
    run = firing_angle(r1=r1, breakback=breakback, running=True, **kw)
    on = limit_r(**kw) - series_r
    off = limit_r(breakback=breakback, running=True, **kw) - series_r
    return {"pot": pot, "starting": start, "running": run, "pot_on": on, "pot_off": off}
