"""Series R–C snubber across an SCR: the R–L–C step response, its peak and slope, and losses.

The model: a voltage step E is applied through the loop inductance L to R in series with C,
from rest (capacitor discharged, no current); the blocking SCR sees v = v_C + R·i [1, §17.6].
With σ = R/(2L), ω0 = 1/√(LC), ζ = σ/ω0 and q = ω0² − σ² (ω_d² when ζ < 1),

    v(t) = E·[1 − e^(−σt)·(c(t) − σ·s(t))],   dv/dt = E·e^(−σt)·[2σ·c(t) + (q − σ²)·s(t)]

with c = cos ω_d t, s = sin(ω_d t)/ω_d (ζ < 1), c = cosh bt, s = sinh(bt)/b with b = √(−q)
(ζ > 1), and c = 1, s = t at ζ = 1. Every function is a closed form per damping regime selected
with ``np.where``; all arguments are SI magnitudes (V, Ω, H, F, s, Hz, rad) broadcasting over
numpy arrays.

Closed forms used (each derived from the response above by setting a derivative to zero):

* peak:  V_pk = E·(1 + e^(−σ·t_1)), ω0·t_1 = 2·acos ζ/√(1 − ζ²) (ζ < 1), 2 (ζ = 1),
  2·acosh ζ/√(ζ² − 1) (ζ > 1). The ζ < 1 form equals ω_d·t_1 = π − 2·atan(σ/ω_d) and, unlike
  the printed π − atan(2ζ√(1−ζ²)/(1−2ζ²)), holds for every ζ < 1 [1, eq. 17.33] (corrected).
* maximum slope: 2ζ·ω0·E at t = 0 for ζ ≥ 0.5; for ζ < 0.5 at
  ω0·t_m = (π/2 − 3·asin ζ)/√(1 − ζ²), where it is E·ω0·e^(−σ·t_m) [1, eqs. 17.34–17.35].
* capacitor peak: E·(1 + e^(−πζ/√(1−ζ²))) for ζ < 1, E for ζ ≥ 1 [2, ch. 5].

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §17.6
    (RC snubbers; Examples 17.3 and 17.4) and §9 (Example 9.4, RC snubber for a DC switch).
[2] P. S. Bimbhra, *Power Electronics*, ch. 5 (dv/dt protection; Examples 5.5, 5.8).
[3] N. Mohan, T. M. Undeland & W. P. Robbins, *Power Electronics: Converters, Applications, and
    Design*, ch. 27 (snubber circuits; energy dissipated in charging and discharging).
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import NamedTuple

import numpy as np

from checks.core import FAIL, MARGINAL, PASS, Outcome, cap_status, distinct_rows, grade
from checks.memo import memoised

# The exponential dv/dt rating reads the slope as 0.632·V_final/τ: the chord to 1 − 1/e.
EXP_FRACTION = 1.0 - np.exp(-1.0)
_BISECT_STEPS = 60
_NEWTON_MAX = 60  # safeguarded Newton steps at most (rows stop far sooner)
_NEWTON_TOL = 1e-15  # stopping step, relative to the bracket's end


def _arr(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


def damping(*, r: np.ndarray, l: np.ndarray, c: np.ndarray) -> np.ndarray:  # noqa: E741
    """Damping ratio of the series R–L–C loop, ζ = (R/2)·√(C/L) [–]  [1, §17.6].

    r [Ω] snubber resistance; l [H] loop inductance; c [F] snubber capacitance. L = 0 gives
    ζ = ∞ (no ringing: the step appears at once).

    >>> round(float(damping(r=6.6, l=50e-6, c=0.75e-6)), 4)
    0.4042
    """
    r, l, c = _arr(r), _arr(l), _arr(c)  # noqa: E741
    with np.errstate(divide="ignore"):
        return 0.5 * r * np.sqrt(c / l)


def _omega0(l: np.ndarray, c: np.ndarray) -> np.ndarray:  # noqa: E741
    with np.errstate(divide="ignore"):
        return 1.0 / np.sqrt(_arr(l) * _arr(c))


def _peak_phase(zeta: np.ndarray) -> np.ndarray:
    """ω0·t_1 of the device-voltage peak for every ζ (closed forms per regime)."""
    z = _arr(zeta)
    s = np.sqrt(np.abs((1.0 - z) * (1.0 + z)))
    with np.errstate(invalid="ignore", divide="ignore"):
        under = 2.0 * np.arccos(np.clip(z, -1.0, 1.0)) / s
        over = 2.0 * np.arccosh(np.maximum(z, 1.0)) / s
    out = np.where(z < 1.0, under, over)
    out = np.where(s == 0.0, 2.0, out)
    return np.where(np.isinf(z), 0.0, out)


def _slope_phase(zeta: np.ndarray) -> np.ndarray:
    """ω0·t_m of the steepest slope: (π/2 − 3·asin ζ)/√(1 − ζ²) below ζ = 0.5, else 0."""
    z = np.minimum(_arr(zeta), 0.5)
    return np.where(z < 0.5, (0.5 * np.pi - 3.0 * np.arcsin(z)) / np.sqrt(1.0 - z * z), 0.0)


def step_response(*, e: np.ndarray, r: np.ndarray, l: np.ndarray, c: np.ndarray,  # noqa: E741
                  t: np.ndarray) -> np.ndarray:
    """Device voltage v(t) = v_C + R·i of the R–L–C step from rest [V]  [1, §17.6].

    v(t) = E·[1 − e^(−σt)·(cos ω_d t − (σ/ω_d)·sin ω_d t)] for ζ < 1, with the cosh/sinh
    (ζ > 1) and 1, t (ζ = 1) forms elsewhere. e [V] step; r [Ω]; l [H] loop inductance (> 0);
    c [F]; t [s] time after the step (≥ 0), broadcast against the circuit values.

    >>> round(float(step_response(e=220.0, r=6.6, l=50e-6, c=0.75e-6, t=15.46e-6)), 2)
    299.29
    >>> round(float(step_response(e=1.0, r=2.0, l=1.0, c=1.0, t=2.0)), 4)  # ζ = 1
    1.1353
    """
    ec, es, sigma, q = _basis(r, l, c, t)
    return _arr(e) * (1.0 - (ec - sigma * es))


def step_slope(*, e: np.ndarray, r: np.ndarray, l: np.ndarray, c: np.ndarray,  # noqa: E741
               t: np.ndarray) -> np.ndarray:
    """dv/dt of the device voltage [V/s]: E·e^(−σt)·[2σ·cos ω_d t + ((ω_d² − σ²)/ω_d)·sin ω_d t]
    (and its ζ ≥ 1 forms); E·R/L at t = 0  [1, eq. 17.34]. Arguments as :func:`step_response`.

    >>> round(float(step_slope(e=220.0, r=6.6, l=50e-6, c=0.75e-6, t=0.0)) / 1e6, 2)
    29.04
    """
    ec, es, sigma, q = _basis(r, l, c, t)
    return _arr(e) * (2.0 * sigma * ec + (q - sigma * sigma) * es)


def _basis(r: np.ndarray, l: np.ndarray, c: np.ndarray,  # noqa: E741
           t: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """e^(−σt)·c(t), e^(−σt)·s(t), σ and q, evaluated without overflow in every regime."""
    r, l, c, t = _arr(r), _arr(l), _arr(c), _arr(t)  # noqa: E741
    sigma = r / (2.0 * l)
    w0sq = 1.0 / (l * c)
    q = w0sq - sigma * sigma
    w = np.sqrt(np.abs(q))
    decay = np.exp(-sigma * t)
    # Underdamped and critical: sin(wt)/w = t·sinc(wt/π) stays exact as w → 0.
    ec_u = decay * np.cos(w * t)
    es_u = decay * t * np.sinc(w * t / np.pi)
    # Overdamped: e^(−σt)·cosh bt = e^(kt)·(1 + e^(−2bt))/2 with k = b − σ = −ω0²/(σ + b) ≤ 0.
    k = -w0sq / (sigma + w)
    y = 2.0 * w * t
    with np.errstate(invalid="ignore", divide="ignore"):
        h = np.where(y > 0.0, -np.expm1(-y) / np.where(y > 0.0, y, 1.0), 1.0)
    grow = np.exp(k * t)
    ec_o = grow * 0.5 * (1.0 + np.exp(-y))
    es_o = grow * t * h
    over = q < 0.0
    return np.where(over, ec_o, ec_u), np.where(over, es_o, es_u), sigma, q


def step_peak(*, e: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
              c: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Peak device voltage of the step and its time, (V_pk [V], t_1 [s]), for every ζ.

    V_pk = E·(1 + e^(−σ·t_1)) exactly, with ω0·t_1 = 2·acos ζ/√(1 − ζ²) (ζ < 1; the same as
    ω_d·t_1 = π − 2·atan(σ/ω_d)), 2 (ζ = 1), 2·acosh ζ/√(ζ² − 1) (ζ > 1): an overdamped snubber
    still overshoots through the R·i term  [1, eq. 17.33, quadrant corrected]. L = 0 gives E
    at t = 0. e [V]; r [Ω]; l [H]; c [F].

    >>> v, t1 = step_peak(e=220.0, r=6.6, l=50e-6, c=0.75e-6)
    >>> round(float(v), 2), round(float(t1) * 1e6, 2)
    (299.29, 15.46)
    """
    zeta = damping(r=r, l=l, c=c)
    w0 = _omega0(l, c)
    phase = _peak_phase(zeta)
    with np.errstate(invalid="ignore"):
        t1 = np.where(np.isinf(w0), 0.0, phase / w0)
        v_pk = _arr(e) * (1.0 + np.where(np.isinf(zeta), 0.0, np.exp(-zeta * phase)))
    return v_pk, t1


def step_max_dvdt(*, e: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                  c: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Maximum dv/dt of the step and when it occurs, ((dv/dt)max [V/s], t_m [s]).

    ζ ≥ 0.5: at t = 0, E·R/L = 2ζ·ω0·E. ζ < 0.5: at ω0·t_m = (π/2 − 3·asin ζ)/√(1 − ζ²)
    (the same instant as t_m = atan[ω_d(ω_d² − 3σ²)/(σ(3ω_d² − σ²))]/ω_d), where it is
    E·ω0·e^(−σ·t_m)  [1, eqs. 17.34–17.35]. Smallest for fixed L, C at ζ ≈ 0.26
    (0.810·E·ω0). e [V]; r [Ω]; l [H] (> 0; 0 gives ∞); c [F].

    >>> s, tm = step_max_dvdt(e=220.0, r=6.6, l=50e-6, c=0.75e-6)
    >>> round(float(s) / 1e6, 2), round(float(tm) * 1e6, 3)
    (31.15, 2.16)
    """
    zeta = damping(r=r, l=l, c=c)
    w0 = _omega0(l, c)
    phase = _slope_phase(zeta)
    with np.errstate(invalid="ignore"):
        late = _arr(e) * w0 * np.exp(-zeta * phase)
        early = 2.0 * zeta * w0 * _arr(e)
        slope = np.where(zeta < 0.5, late, early)
        t_m = np.where(zeta < 0.5, phase / w0, 0.0)
    return slope, t_m


def capacitor_peak(*, e: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                   c: np.ndarray) -> np.ndarray:
    """Peak of the capacitor's own voltage in the step [V]: E·(1 + e^(−πζ/√(1 − ζ²))) for
    ζ < 1, else E  [2, ch. 5]. Always below the device peak (:func:`step_peak`).

    >>> round(float(capacitor_peak(e=220.0, r=6.6, l=50e-6, c=0.75e-6)), 1)
    274.9
    """
    z = np.minimum(damping(r=r, l=l, c=c), 1.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        over = np.where(z < 1.0, np.exp(-np.pi * z / np.sqrt(1.0 - z * z)), 0.0)
    return _arr(e) * (1.0 + over)


def step_chord(*, e: np.ndarray, r: np.ndarray, l: np.ndarray, c: np.ndarray,  # noqa: E741
               fraction: float = EXP_FRACTION) -> tuple[np.ndarray, np.ndarray]:
    """Chord slope from 0 to ``fraction``·E, the reading of an exponentially defined dv/dt
    rating (0.632·V/τ), and the time it is reached: (chord [V/s], t_f [s]).

    v(t) rises monotonically until the peak t_1 and v(t_1) ≥ E, so t_f is bracketed in
    [0, t_1]; a safeguarded Newton iteration on v(t) − fraction·E (with the exact slope of
    :func:`step_slope`, bisecting whenever a step would leave the bracket) finds it for every
    row at once. By the mean-value theorem the chord never exceeds :func:`step_max_dvdt`.
    e [V]; r [Ω]; l [H] (> 0); c [F]; 0 < fraction < 1.

    >>> chord, t63 = step_chord(e=220.0, r=6.6, l=50e-6, c=0.75e-6)
    >>> round(float(chord) / 1e6, 2)
    30.44
    """
    e, r, l, c = np.broadcast_arrays(_arr(e), _arr(r), _arr(l), _arr(c))  # noqa: E741
    v_pk, t1 = step_peak(e=e, r=r, l=l, c=c)
    target = fraction * e
    shape = t1.shape
    e1, r1, l1, c1, tgt, hi = (np.array(x, dtype=float).ravel()
                               for x in (e, r, l, c, target, t1))
    lo = np.zeros_like(hi)
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(v_pk.ravel() > 0, hi * tgt / v_pk.ravel(), 0.5 * hi)
    t = np.where(tgt <= 0.0, 0.0, np.where((t >= lo) & (t <= hi), t, 0.5 * hi))
    out = t.copy()
    tol = _NEWTON_TOL * hi
    idx = np.arange(hi.size)
    for _ in range(_NEWTON_MAX):
        ec, es, sigma, q = _basis(r1, l1, c1, t)
        g = e1 * (1.0 - (ec - sigma * es)) - tgt
        dg = e1 * (2.0 * sigma * ec + (q - sigma * sigma) * es)
        below = g < 0.0
        lo = np.where(below, t, lo)
        hi = np.where(below, hi, t)
        with np.errstate(divide="ignore", invalid="ignore"):
            step = t - g / dg
        inside = (step >= lo) & (step <= hi) & np.isfinite(step)
        t_new = np.where(g == 0.0, t, np.where(inside, step, 0.5 * (lo + hi)))
        done = (np.abs(t_new - t) <= tol) | (hi - lo <= tol) | ~np.isfinite(t_new)
        t = t_new
        if done.any():  # converged rows leave the iteration
            out[idx[done]] = t[done]
            keep = ~done
            idx, t, lo, hi, tol, e1, r1, l1, c1, tgt = (
                x[keep] for x in (idx, t, lo, hi, tol, e1, r1, l1, c1, tgt))
            if not idx.size:
                break
    out[idx] = t
    t_f = out.reshape(shape)[()]
    with np.errstate(divide="ignore", invalid="ignore"):
        # t_f = 0 (no step, or no inductance): the chord's limit, the initial slope E·R/L
        return np.where(t_f > 0, target / t_f, e * r / l)[()], t_f


class Waveform(NamedTuple):
    """A sampled step response for plotting, with the peak and the steepest slope marked.

    ``t`` and ``v`` have shape (..., n) (one row per circuit); the marks have the circuits'
    shape. Units: s, V, V/s.
    """

    t: np.ndarray
    v: np.ndarray
    t_peak: np.ndarray
    v_peak: np.ndarray
    t_slope: np.ndarray
    v_slope: np.ndarray
    dvdt_max: np.ndarray


def step_waveform(*, e: np.ndarray, r: np.ndarray, l: np.ndarray, c: np.ndarray,  # noqa: E741
                  n: int = 400, span: float = 3.0) -> Waveform:
    """Sample v(t) of the step from 0 to ``span``·t_1 at ``n`` points per circuit.

    Returns a :class:`Waveform`: t [s] and v [V] arrays, the peak (t_1, V_pk) and the
    steepest slope (t_m, v(t_m), (dv/dt)max), all from the closed forms of this module.

    >>> w = step_waveform(e=220.0, r=6.6, l=50e-6, c=0.75e-6, n=5)
    >>> w.t.shape, round(float(w.v_peak), 1), bool(w.v.max() <= w.v_peak + 1e-9)
    ((5,), 299.3, True)
    """
    e, r, l, c = np.broadcast_arrays(_arr(e), _arr(r), _arr(l), _arr(c))  # noqa: E741
    v_pk, t1 = step_peak(e=e, r=r, l=l, c=c)
    slope, t_m = step_max_dvdt(e=e, r=r, l=l, c=c)
    frac = np.linspace(0.0, 1.0, n)
    t = (span * t1)[..., None] * frac
    v = step_response(e=e[..., None], r=r[..., None], l=l[..., None], c=c[..., None], t=t)
    v_m = step_response(e=e, r=r, l=l, c=c, t=t_m)
    return Waveform(t, v, t1, v_pk, t_m, v_m, slope)


def discharge_peak(*, v: np.ndarray, r: np.ndarray, l_discharge: np.ndarray,
                   c: np.ndarray | float | None = None) -> np.ndarray:
    """Peak current of the snubber capacitor, charged to v, discharging into the SCR [A].

    Without ``c`` (or with l_discharge = 0): v/R, the bound the loop inductance can only
    lower [1, §9, Example 9.4]. With ``c`` and l_discharge > 0, the exact series R–L–C
    discharge from rest: i_pk = v·√(C/L)·e^(−ζ·acos ζ/√(1 − ζ²)) (ζ < 1; acosh and
    √(ζ² − 1) for ζ > 1), ζ = (R/2)·√(C/L), which tends to v/R as L → 0.
    v [V] capacitor voltage at firing (V_m·sin α on AC); r [Ω]; l_discharge [H]; c [F].

    >>> round(float(discharge_peak(v=200.0, r=2.0, l_discharge=0.0)), 1)
    100.0
    >>> round(float(discharge_peak(v=200.0, r=2.0, l_discharge=1e-9, c=0.1e-6)), 1)
    98.8
    """
    v, r, ld = _arr(v), _arr(r), _arr(l_discharge)
    plain = v / r
    if c is None:
        return plain * np.ones_like(ld)
    cc = _arr(c)
    zeta = damping(r=r, l=ld, c=cc)
    with np.errstate(divide="ignore", invalid="ignore"):
        half = 0.5 * _peak_phase(zeta) * zeta  # σ·t_p = ζ·ω0·t_p = ζ·(ω0·t_1)/2
        exact = v * np.sqrt(cc / ld) * np.exp(-half)
    return np.where((ld > 0.0) & np.isfinite(zeta), exact, plain)


def discharge_didt(*, v: np.ndarray, l_discharge: np.ndarray) -> np.ndarray:
    """Initial (and largest) rate of rise of the snubber discharge current, v/L_d [A/s].

    At firing the discharge loop's inductance carries no current, so di/dt(0+) = v/L_d; it
    then falls (d²i/dt² = −2σ·v/L_d < 0). v [V]; l_discharge [H] (0 gives ∞).

    >>> round(float(discharge_didt(v=325.0, l_discharge=1e-6)) / 1e6, 1)
    325.0
    """
    with np.errstate(divide="ignore"):
        return _arr(v) / _arr(l_discharge)


def damping_for_overshoot(*, ratio: np.ndarray) -> np.ndarray:
    """The damping ratio ζ at which the step peak V_pk/E equals ``ratio`` [–].

    Inverts :func:`step_peak` (V_pk/E = 1 + e^(−ζ·ω0·t_1) falls monotonically from 2 at ζ = 0
    towards 1) by vectorised bisection on log ζ. ratio ≥ 2 gives 0; ratio ≤ 1 gives ∞ (no
    finite snubber keeps the peak at E).

    >>> round(float(damping_for_overshoot(ratio=1.298)), 3)
    0.5
    """
    ratio = _arr(ratio)
    lo = np.full(ratio.shape, -6.0)
    hi = np.full(ratio.shape, 6.0)
    for _ in range(_BISECT_STEPS):
        mid = 0.5 * (lo + hi)
        z = 10.0**mid
        too_high = 1.0 + np.exp(-z * _peak_phase(z)) > ratio
        lo = np.where(too_high, mid, lo)
        hi = np.where(too_high, hi, mid)
    z = 10.0 ** (0.5 * (lo + hi))
    return np.where(ratio >= 2.0, 0.0, np.where(ratio <= 1.0, np.inf, z))


def step_voltage(*, v: np.ndarray | float, mode: str, ac: bool,
                 e_given: np.ndarray | float = np.nan) -> np.ndarray:
    """The step E the snubber must tame [V]: ``line`` √2·V on AC (V on DC), ``dc`` V, or the
    given value ``e_given`` (``mode = "value"``, v not needed). v [V] supply (RMS on AC, bus
    on DC) at each corner.

    >>> round(float(step_voltage(v=253.0, mode="line", ac=True)), 1)
    357.8
    """
    v = _arr(v)
    if mode == "value":
        return _arr(e_given) * np.ones_like(v)
    return v * (np.sqrt(2.0) if (mode == "line" and ac) else 1.0)


class EmfSteps(NamedTuple):
    """What an SCR with a back-EMF load (battery, motor armature) sees when it stops [V].

    ``step``: the step at its own current zero β, |V_m·sin β − E| (the SCR goes from the
    on-state to the line minus E), 0 where the current never stops. ``fw_step``, ``fw_base``:
    where a freewheeling diode carries the current and it dies out before the next firing,
    the load's terminal voltage rises from 0 to E at once, a step E on top of the line's
    |V_m·sin| there. ``envelope``: the largest steady off-state voltage, V_m + E (the line's
    reverse peak plus the EMF; how the blocking devices share E is not fixed by ideal parts),
    V_m where the current never stops. ``ramp``: V_m·ω, the line's steepest slope, which the
    step model holds still during the ringing; ``omega`` ω; ``cos_step``, ``cos_fw``: |cos|
    of the line at the two instants, for :meth:`drift`.
    """

    step: np.ndarray
    fw_step: np.ndarray
    fw_base: np.ndarray
    envelope: np.ndarray
    ramp: np.ndarray
    omega: np.ndarray
    cos_step: np.ndarray
    cos_fw: np.ndarray

    def drift(self, t: np.ndarray, *, fw: bool = False) -> np.ndarray:
        """A bound on the line's move in the time t after the step [V]:
        V_m·(ωt·|cos θ| + (ωt)²/2), from |sin(θ + x) − sin θ| ≤ x·|cos θ| + x²/2."""
        x = self.omega * _arr(t)
        cos = self.cos_fw if fw else self.cos_step
        with np.errstate(invalid="ignore", divide="ignore"):
            vm = np.where(self.omega > 0, self.ramp / np.where(self.omega > 0, self.omega, 1.0),
                          0.0)
        return vm * (x * cos + 0.5 * x * x)


def emf_steps(*, topology: str, freewheel: bool, v: np.ndarray, f: np.ndarray,
              r_load: np.ndarray, l_load: np.ndarray, alpha: np.ndarray,
              e_load: np.ndarray) -> EmfSteps:
    """The reapplied steps of an SCR feeding an R–L–E load (:class:`EmfSteps`).

    The current's zero β and the freewheeling interval come from
    :func:`checks.rle.waveform_pu`. A bridge's step is taken whole on one SCR (the pair
    shares it only if the off-state impedances are equal). v [V] RMS line; f [Hz]; r_load
    [Ω]; l_load [H]; alpha [rad]; e_load [V] back EMF.

    >>> s = emf_steps(topology="half-wave", freewheel=False, v=24.0, f=50.0, r_load=0.6,
    ...               l_load=0.3e-3, alpha=np.pi / 3, e_load=12.0)
    >>> round(float(s.step), 2), round(float(s.envelope), 2)
    (4.92, 45.94)
    """
    from checks import rle

    vm = np.sqrt(2.0) * _arr(v)
    omega = 2.0 * np.pi * _arr(f)
    r_load, l_load, e_load, alpha = _arr(r_load), _arr(l_load), _arr(e_load), _arr(alpha)
    phi = np.arctan2(omega * l_load, r_load)
    w = rle.waveform_pu(topology=topology, freewheel=freewheel, alpha=alpha, phi=phi,
                        m=e_load / vm, peak=False)
    on = w["conduction"] > 0.0
    cont = w["continuous"] > 0.0
    beta = w["beta"]
    fw = (w["fw_len"] > 0.0) & (w["handed"] == 0.0)  # handed: the next firing takes it over
    # The SCR's own zero: not where the diode takes the current at π, nor where it never stops.
    own = on & ~cont & ~(fw if freewheel else np.zeros_like(on))
    step = np.where(own, np.abs(vm * np.sin(beta) - e_load), 0.0)
    fw_end = fw & ~cont
    fw_step = np.where(fw_end, e_load, 0.0)
    fw_base = np.where(fw_end, vm * np.abs(np.sin(w["fw_len"])), 0.0)
    envelope = np.where(cont, vm, vm + e_load)
    cos_step = np.abs(np.cos(beta))
    cos_fw = np.abs(np.cos(w["fw_len"]))  # |cos(π + x)| = |cos x|
    return EmfSteps(step, fw_step, fw_base, envelope, vm * omega, omega + 0.0 * vm, cos_step,
                    cos_fw)



def worst_emf_steps(*, alpha_range: tuple[float, float, float], alpha: np.ndarray,
                    **kw: np.ndarray | str | bool) -> EmfSteps:
    """:func:`emf_steps` at its worst within half a sweep step of each row's α: the step at
    the current zero and the freewheel end's base maximised separately (each by
    :func:`checks.harmonics.refine_min`: samples, then golden section), so a sharp peak
    between the sampled angles (where the current turns continuous) is not missed.
    alpha_range (α_lo, α_hi, half step) [rad]; the other arguments as :func:`emf_steps`.
    """
    from checks.harmonics import refine_min

    lo, hi, half = alpha_range
    base = emf_steps(alpha=alpha, **kw)  # type: ignore[arg-type]
    shape = np.broadcast_shapes(*(np.shape(x) for x in (*base, _arr(alpha))))
    a_row = np.broadcast_to(_arr(alpha), shape).ravel()
    flat = {k: (np.broadcast_to(_arr(v), shape).ravel() if not isinstance(v, (str, bool))
                else v) for k, v in kw.items()}

    def at(a: np.ndarray) -> EmfSteps:
        return emf_steps(alpha=a, **flat)  # type: ignore[arg-type]

    a_s, _ = refine_min(lambda a: -at(a).step, a_row, lo, hi, half, points=5, steps=18)
    s_w = at(a_s)
    if kw.get("freewheel"):
        def fw_top(a: np.ndarray) -> np.ndarray:
            got = at(a)
            return -(got.fw_base + got.fw_step)

        a_f, _ = refine_min(fw_top, a_row, lo, hi, half, points=5, steps=18)
        f_w = at(a_f)
    else:  # no freewheeling diode: no freewheel end to search
        f_w = s_w
    b = [np.broadcast_to(x, shape).ravel() for x in base]
    row = EmfSteps(*b)

    better_s = s_w.step > row.step
    better_f = (f_w.fw_base + f_w.fw_step) > (row.fw_base + row.fw_step)
    out = EmfSteps(
        step=np.maximum(s_w.step, row.step),
        fw_step=np.where(better_f, f_w.fw_step, row.fw_step),
        fw_base=np.where(better_f, f_w.fw_base, row.fw_base),
        envelope=np.maximum(np.maximum(row.envelope, s_w.envelope), f_w.envelope),
        ramp=row.ramp, omega=row.omega,
        cos_step=np.where(better_s, s_w.cos_step, row.cos_step),
        cos_fw=np.where(better_f, f_w.cos_fw, row.cos_fw))
    return EmfSteps(*(x.reshape(shape) for x in out))


def emf_steps_rows(*, topology: str, freewheel: bool, v: np.ndarray, f: np.ndarray,
                   r_load: np.ndarray, l_load: np.ndarray, alpha: np.ndarray,
                   e_load: np.ndarray,
                   alpha_range: tuple[float, float, float] | None = None) -> EmfSteps:
    """:func:`emf_steps` (or, with ``alpha_range``, :func:`worst_emf_steps`) worked on the
    distinct rows of its inputs only (a snubber's own corners repeat each row many times) and
    shared by the snubber checks that ask for the same rows. Arguments as those functions.
    """
    cols, back = distinct_rows(v, f, r_load, l_load, alpha, e_load)
    lo, hi, half = alpha_range if alpha_range is not None else (np.nan, np.nan, np.nan)
    table = _emf_table(topology=topology, freewheel=freewheel, lo=lo, hi=hi, half=half,
                       v=cols[0], f=cols[1], r_load=cols[2], l_load=cols[3], alpha=cols[4],
                       e_load=cols[5])
    return EmfSteps(*(table[k][back] for k in EmfSteps._fields))


@memoised
def _emf_table(*, topology: str, freewheel: bool, lo: float, hi: float, half: float,
               **rows: np.ndarray) -> dict[str, np.ndarray]:
    if np.isnan(lo):
        s = emf_steps(topology=topology, freewheel=freewheel, **rows)
    else:
        s = worst_emf_steps(alpha_range=(float(lo), float(hi), float(half)),
                            topology=topology, freewheel=freewheel, **rows)
    n = np.shape(rows["alpha"])
    return {k: np.broadcast_to(np.asarray(x, dtype=float), n).copy()
            for k, x in s._asdict().items()}

def _emf_or_none(emf: EmfSteps | None, like: np.ndarray) -> EmfSteps:
    """The back-EMF steps, or zeros (no back EMF: the line step alone)."""
    if emf is not None:
        return emf
    z = np.zeros_like(like)
    return EmfSteps(z, z, z, z + np.nan, z, z, z, z)


def dvdt_check(*, r: np.ndarray, l: np.ndarray, c: np.ndarray,  # noqa: E741
               v: np.ndarray | float = np.nan, rating: np.ndarray, mode: str, ac: bool,
               limits: Mapping[str, float], e_given: np.ndarray | float = np.nan,
               emf: EmfSteps | None = None) -> Outcome:
    """``snubber.dvdt``: the step's maximum dv/dt against the SCR's rating (at Tj,max).

    Metric rating/(dv/dt)max, graded with ``fail_below``/``marginal_below`` (1 and 2). The
    instantaneous maximum (:func:`step_max_dvdt`) is the reading of a linear-ramp rating and,
    never being below the 0→63 % chord (:func:`step_chord`, also returned as ``dvdt_chord``),
    a conservative reading of an exponential (0.632·V/τ) rating. With a back-EMF load
    (``emf``, :func:`emf_steps`) the step is the larger of the line step and the steps at the
    current zero, and the line's own slope adds at most 2·V_m·ω (its ramp through a response
    whose step peak is below 2). Units as the functions above.

    >>> out = dvdt_check(v=220.0, r=6.6, l=50e-6, c=0.75e-6, rating=50e6, mode="dc", ac=False,
    ...                  limits={"fail_below": 1.0, "marginal_below": 2.0})
    >>> out.status.ravel().tolist(), round(float(out.values["dvdt_max"]) / 1e6, 2)
    ([1], 31.15)
    """
    e = step_voltage(v=v, mode=mode, ac=ac, e_given=e_given)
    m = _emf_or_none(emf, e)
    e = np.maximum(np.maximum(e, m.step), m.fw_step)
    slope, t_m = step_max_dvdt(e=e, r=r, l=l, c=c)
    slope = slope + 2.0 * m.ramp
    chord, _ = step_chord(e=e, r=r, l=l, c=c)
    with np.errstate(divide="ignore"):
        margin, status = grade(_arr(rating) / slope, limits)
    return Outcome({"dvdt_max": slope, "damping": damping(r=r, l=l, c=c), "dvdt_chord": chord,
                    "dvdt_time": t_m, "step": e}, margin, status)


def peak_check(*, r: np.ndarray, l: np.ndarray, c: np.ndarray,  # noqa: E741
               v: np.ndarray | float = np.nan, vdrm: np.ndarray, mode: str, ac: bool,
               limits: Mapping[str, float], e_given: np.ndarray | float = np.nan,
               emf: EmfSteps | None = None) -> Outcome:
    """``snubber.peak-voltage``: V_pk of the step (:func:`step_peak`) against VDRM.

    With a back-EMF load (``emf``): the largest of the ringing peak of the largest step, the
    freewheel end's E step rung on top of the line there, and the steady V_m + E; a bound on
    the line's move until the peak (:meth:`EmfSteps.drift` at t_1) is added to each step
    (the step model holds the line still).
    Metric VDRM/V_pk with ``fail_below``/``marginal_below`` (1 and 1.2).

    >>> out = peak_check(v=220.0, r=6.6, l=50e-6, c=0.75e-6, vdrm=400.0, mode="dc", ac=False,
    ...                  limits={"fail_below": 1.0, "marginal_below": 1.2})
    >>> out.status.ravel().tolist(), round(float(out.values["peak_voltage"]), 1)
    ([0], 299.3)
    """
    e = step_voltage(v=v, mode=mode, ac=ac, e_given=e_given)
    m = _emf_or_none(emf, e)
    ratio, t1 = step_peak(e=np.ones_like(e), r=r, l=l, c=c)
    e = np.maximum(e, m.step + m.drift(t1))
    v_pk = e * ratio
    fw_peak = np.where(m.fw_step > 0.0,
                       m.fw_base + (m.fw_step + m.drift(t1, fw=True)) * ratio, 0.0)
    v_pk = np.fmax(np.maximum(v_pk, fw_peak), m.envelope)
    margin, status = grade(_arr(vdrm) / v_pk, limits)
    values = {"peak_voltage": v_pk, "damping": damping(r=r, l=l, c=c), "peak_time": t1,
              "step": e}
    if emf is not None:
        values.update(steady_peak=m.envelope + 0.0 * v_pk, freewheel_peak=fw_peak + 0.0 * v_pk)
    return Outcome(values, margin, status)


def capacitor_check(*, v: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                    c: np.ndarray, rating: np.ndarray, mode: str, ac: bool,
                    limits: Mapping[str, float],
                    e_given: np.ndarray | float = np.nan,
                    emf: EmfSteps | None = None) -> Outcome:
    """``snubber.capacitor``: the capacitor's own peak, max(V_m or V, v_C,pk of the step)
    (:func:`capacitor_peak`), against its voltage rating; metric rating/peak.

    With a back-EMF load (``emf``) the steady V_m + E, the larger step and the freewheel
    end's step on the line there count too, each step with the bound on the line's move
    until the capacitor's peak at π/ω_d (ζ < 1; at ζ ≥ 1 it never overshoots its input).

    >>> out = capacitor_check(v=253.0, r=10.0, l=50e-6, c=0.22e-6, rating=630.0, mode="line",
    ...                       ac=True, limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> out.status.ravel().tolist(), round(float(out.values["capacitor_peak"]), 1)
    ([0], 476.4)
    """
    e = step_voltage(v=v, mode=mode, ac=ac, e_given=e_given)
    m = _emf_or_none(emf, e)
    line = _arr(v) * (np.sqrt(2.0) if ac else 1.0)
    zeta = damping(r=r, l=l, c=c)
    with np.errstate(divide="ignore", invalid="ignore"):
        t_c = np.where(zeta < 1.0, np.pi * np.sqrt(_arr(l) * _arr(c))
                       / np.sqrt(np.abs(1.0 - zeta * zeta)), 0.0)
    e = np.maximum(e, m.step + m.drift(t_c))
    peak = np.maximum(line, capacitor_peak(e=e, r=r, l=l, c=c))
    fw_peak = np.where(m.fw_step > 0.0, m.fw_base + capacitor_peak(
        e=m.fw_step + m.drift(t_c, fw=True), r=r, l=l, c=c), 0.0)
    peak = np.fmax(np.maximum(peak, fw_peak), m.envelope)
    margin, status = grade(_arr(rating) / peak, limits)
    return Outcome({"capacitor_peak": peak, "step": e}, margin, status)


def _firing_voltage(v: np.ndarray, alpha: np.ndarray | None, ac: bool) -> np.ndarray:
    """Device (and capacitor) voltage just before firing: V_m·sin α on AC, V on DC."""
    if not ac or alpha is None:
        return _arr(v)
    return np.sqrt(2.0) * _arr(v) * np.abs(np.sin(_arr(alpha)))


def discharge_check(*, v: np.ndarray, r: np.ndarray, r_load: np.ndarray | float = np.inf,
                    itsm: np.ndarray | float, ac: bool, inductive: bool,
                    limits: Mapping[str, float], alpha: np.ndarray | None = None,
                    share: float = 0.05) -> Outcome:
    """``snubber.discharge``: C_sn's discharge into the SCR at firing, V_m·sin α/R_sn (AC) or
    V/R_sn (DC) (:func:`discharge_peak`), with the load current at firing.

    Fails when load current + discharge > ITSM (metric ITSM/(i_load + i_dis), ``fail_below``);
    marginal when the discharge exceeds ``share`` of ITSM (a few percent [common practice]) or,
    for a resistive load, the load current at firing (V_m·sin α/R; an inductive load starts
    from zero, so there the discharge is the whole initial current). NaN ``itsm`` (not given)
    grades on the marginal rules only. v [V]; r, r_load [Ω]; itsm [A]; alpha [rad].

    >>> out = discharge_check(v=230.0, r=47.0, r_load=50.0, itsm=100.0, ac=True,
    ...                       inductive=False, alpha=np.pi / 2, limits={"fail_below": 1.0})
    >>> out.status.ravel().tolist(), round(float(out.values["discharge_peak"]), 2)
    ([1], 6.92)
    """
    vf = _firing_voltage(v, alpha, ac)
    i_dis = discharge_peak(v=vf, r=r, l_discharge=0.0)
    i_load = np.zeros_like(vf) if inductive else vf / _arr(r_load)
    itsm = _arr(itsm)
    with np.errstate(divide="ignore", invalid="ignore"):
        margin, status = grade(itsm / (i_load + i_dis), limits)
    flag = i_dis > share * itsm
    if not inductive:
        flag = flag | (i_dis > i_load)
    soft = np.where(flag, MARGINAL, PASS).astype(np.int8)
    no_rating = np.isnan(itsm)
    status = np.where(no_rating, soft, np.maximum(status, soft)).astype(np.int8)
    margin = np.where(no_rating, np.nan, margin)
    return Outcome({"discharge_peak": i_dis, "load_current_at_fire": i_load,
                    "firing_voltage": vf}, margin, status)


def resistor_power(*, v: np.ndarray, f: np.ndarray, r: np.ndarray, c: np.ndarray,
                   alpha: np.ndarray, topology: str, r_load: np.ndarray | float = np.inf,
                   l_load: np.ndarray | float = 0.0, freewheel: bool = False,
                   emf: EmfSteps | None = None) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Snubber resistor dissipation on an AC phase-control stage, by part [W].

    Returns (firing, turn-off, off-state) parts, their sum being the dissipation:

    * firing: n·½·C·(V_m·sin α)²·f — each firing discharges C from the device voltage
      through R_sn; n = 2 firings per cycle for an ``ac-switch`` (one snubber across the
      pair), 1 for ``half-wave`` and for the snubber across one SCR of a ``bridge`` [1, §9];
    * turn-off (inductive load, no freewheeling diode): n·½·C·(V_m·sin φ)²·f, the step at the
      current zero charging C (all of ½·C·E² counted in R_sn, conservatively) [3, ch. 27];
    * off-state: (V·ω·C)²·R_sn times the off-state fraction of the cycle (α/π, or
      (π + α)/2π with one firing per cycle; the resistive-load value, an upper bound).

    With a back-EMF load (``emf``, :func:`emf_steps`) the turn-off part is ½·C·S²·f for each
    step S (at the current zero, at the freewheel's end), counted twice per cycle on a
    bridge (both current zeros move every SCR's voltage; an upper bound), once on half-wave.
    No step occurs at a resistive load's current zero (v ≈ 0 there). v [V] RMS line;
    f [Hz]; r [Ω] R_sn; c [F]; alpha [rad]; r_load [Ω], l_load [H] the load.

    >>> p = resistor_power(v=230.0, f=50.0, r=47.0, c=0.1e-6, alpha=np.pi / 2,
    ...                    topology="ac-switch")
    >>> round(float(p[0]), 3), round(float(sum(p)), 3)
    (0.529, 0.530)
    """
    v, f, r, c = _arr(v), _arr(f), _arr(r), _arr(c)
    alpha = _arr(alpha)
    vm = np.sqrt(2.0) * v
    omega = 2.0 * np.pi * f
    n = 2.0 if topology == "ac-switch" else 1.0
    p_fire = n * 0.5 * c * (vm * np.sin(alpha)) ** 2 * f
    phi = np.arctan2(omega * _arr(l_load), _arr(r_load))
    p_off = 0.0 if freewheel else n * 0.5 * c * (vm * np.sin(phi)) ** 2 * f
    if emf is not None:
        n_off = 1.0 if topology == "half-wave" else 2.0
        p_off = n_off * 0.5 * c * (emf.step ** 2 + emf.fw_step ** 2) * f
    frac = alpha / np.pi if n == 2.0 else (np.pi + alpha) / (2.0 * np.pi)
    p_sin = (v * omega * c) ** 2 * r * frac
    return p_fire, p_off * np.ones_like(p_fire), p_sin


def resistor_power_check(*, v: np.ndarray, f: np.ndarray, r: np.ndarray, c: np.ndarray,
                         alpha: np.ndarray, rating: np.ndarray, topology: str,
                         limits: Mapping[str, float], r_load: np.ndarray | float = np.inf,
                         l_load: np.ndarray | float = 0.0, freewheel: bool = False,
                         emf: EmfSteps | None = None) -> Outcome:
    """``snubber.resistor-power`` on AC: :func:`resistor_power` against ``rating``
    (metric rating/P with ``fail_below``/``marginal_below``, 1 and 2).

    >>> out = resistor_power_check(v=230.0, f=50.0, r=47.0, c=0.1e-6, alpha=np.pi / 2,
    ...                            rating=0.5, topology="ac-switch",
    ...                            limits={"fail_below": 1.0, "marginal_below": 2.0})
    >>> out.status.ravel().tolist()
    [2]
    """
    p_fire, p_off, p_sin = resistor_power(v=v, f=f, r=r, c=c, alpha=alpha, topology=topology,
                                          r_load=r_load, l_load=l_load, freewheel=freewheel,
                                          emf=emf)
    total = p_fire + p_off + p_sin
    with np.errstate(divide="ignore"):
        margin, status = grade(_arr(rating) / total, limits)
    return Outcome({"resistor_power": total, "firing_part": p_fire, "turnoff_part": p_off,
                    "offstate_part": p_sin}, margin, status)


def dc_resistor_power(*, v: np.ndarray, r: np.ndarray, c: np.ndarray, r_load: np.ndarray,
                      f_sw: np.ndarray) -> np.ndarray:
    """Snubber resistor dissipation on a DC switch [W]:
    ½·C·V²·f_sw·(1 + R_sn/(R_sn + R)) — the discharge at each firing, plus R_sn's share of the
    ½·C·V² lost charging C through R_sn and the load at each turn-off [1, §9 Ex 9.4]; [3].
    v [V] bus; r [Ω] R_sn; c [F]; r_load [Ω]; f_sw [Hz] switching rate.

    >>> round(float(dc_resistor_power(v=200.0, r=2.0, c=0.129e-6, r_load=5.0, f_sw=2e3)), 2)
    6.63
    """
    r = _arr(r)
    return 0.5 * _arr(c) * _arr(v) ** 2 * _arr(f_sw) * (1.0 + r / (r + _arr(r_load)))


def dc_resistor_power_check(*, v: np.ndarray, r: np.ndarray, c: np.ndarray,
                            r_load: np.ndarray, rating: np.ndarray, rt: np.ndarray,
                            ct: np.ndarray, v1: np.ndarray, vv: np.ndarray, device: str,
                            limits: Mapping[str, float], **osc: np.ndarray) -> Outcome:
    """``snubber.resistor-power`` on a DC switch fired by a free-running oscillator.

    The switching rate is taken as 1/t_1, the oscillator's steady-state charge time from VV
    to VP (the discharge time neglected, so the rate and the loss err high). Oscillator
    arguments as :func:`checks.oscillator.peak_voltage` (rt, ct [Ω, F] timing R and C).

    >>> out = dc_resistor_power_check(v=200.0, r=2.0, c=0.129e-6, r_load=5.0, rating=10.0,
    ...     rt=50e3, ct=0.1e-6, v1=12.0, vv=1.0, device="put", r_upper=5e3, r_lower=10e3,
    ...     offset=0.7, limits={"fail_below": 1.0, "marginal_below": 2.0})
    >>> round(float(out.values["switching_rate"]), 1), out.status.ravel().tolist()
    (166.0, [0])
    """
    from checks.oscillator import charge_time, peak_voltage

    vp = peak_voltage(device=device, v1=v1, **osc)
    f_sw = 1.0 / charge_time(r=rt, c=ct, v1=v1, v0=vv, vp=vp)
    total = dc_resistor_power(v=v, r=r, c=c, r_load=r_load, f_sw=f_sw)
    margin, status = grade(_arr(rating) / total, limits)
    return Outcome({"resistor_power": total, "switching_rate": f_sw}, margin, status)


def leakage_check(*, v: np.ndarray, f: np.ndarray, c: np.ndarray,
                  limits: Mapping[str, float], hold: np.ndarray | float = np.nan) -> Outcome:
    """``snubber.leakage`` (advisory): off-state current through the snubber, V·ω·C [A] (the
    upper bound of V/|Z_load + R_sn + 1/(jωC)|).

    Marginal (never fail) when it exceeds the touch-current limit (``touch_current``, 0.5 mA)
    or the load's hold-on current ``hold`` (NaN when not given); margin = limit/I − 1.
    v [V] RMS line; f [Hz]; c [F]; hold [A].

    >>> out = leakage_check(v=230.0, f=50.0, c=0.1e-6, limits={"touch_current": 0.5e-3})
    >>> round(float(out.values["leakage_current"]) * 1e3, 2), out.status.ravel().tolist()
    (7.23, [1])
    """
    i = _arr(v) * 2.0 * np.pi * _arr(f) * _arr(c)
    limit = np.fmin(float(limits.get("touch_current", 0.5e-3)), _arr(hold))
    with np.errstate(divide="ignore"):
        margin = limit / i - 1.0
    status = cap_status(np.where(i > limit, FAIL, PASS), MARGINAL)
    return Outcome({"leakage_current": i, "leakage_limit": limit * np.ones_like(i)}, margin,
                   status)


def osc_firing_angle(*, device: str, v: np.ndarray, f: np.ndarray, v1: np.ndarray,
                     rt: np.ndarray, ct: np.ndarray, **peak: np.ndarray) -> np.ndarray:
    """Firing angle set by a line-synchronised oscillator on this supply [rad].

    :func:`checks.oscillator.line_sync_firing_angle` with V_m = √2·v, ω = 2πf and the clamp
    v1; where it does not fire within the half-cycle the SCR stays off, returned as α = π
    (no voltage at firing, off all the half-cycle). device "ujt"/"put"; v [V] RMS line; f [Hz];
    v1 [V] clamp; rt [Ω], ct [F] timing R and C; peak as the oscillator's peak point.

    >>> a = osc_firing_angle(device="ujt", v=230.0, f=50.0, v1=20.0, rt=np.array([22e3]),
    ...                      ct=0.1e-6, eta=0.63, rbb=7e3, r1=0.0, r2=0.0, vd=0.5)
    >>> np.degrees(a).round(2).tolist()
    [43.92]
    """
    from checks.oscillator import line_sync_firing_angle

    alpha = line_sync_firing_angle(device=device, vm=np.sqrt(2.0) * _arr(v),
                                   omega=2.0 * np.pi * _arr(f), vz=v1, rt=rt, ct=ct, **peak)
    return np.where(np.isnan(alpha), np.pi, alpha)
