"""Turn-off networks: line (natural), capacitor and resonant commutation of an SCR.

Every function takes keyword-only SI magnitudes (V, A, Ω, F, H, s, rad, rad/s) that broadcast
over numpy arrays, one row per corner. The circuit turn-off time t_c is the interval after the
SCR's current zero during which it is held reverse-biased (or at least not forward-biased); it
is graded against the device's tq at Tj,max.

References
----------
[1] P. S. Bimbhra, *Power Electronics*, ch. 5 (commutation: Examples 5.2, 5.3, 5.4, 5.6, 5.9,
    5.12) and ch. 7 (chopper commutation: Examples 7.18, 7.19).
[2] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §10–11
    (controlled rectifiers and AC controllers with R–L loads), §17 (snubber step response,
    eqs. 17.34–17.35).
[3] N. Mohan, T. M. Undeland & W. P. Robbins, *Power Electronics: Converters, Applications, and
    Design*, ch. 6 (overlap in a single-phase thyristor bridge with source inductance).
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any, NamedTuple

import numpy as np

from checks.core import Outcome, grade
from checks.oscillator import line_sync_firing_angle
from checks.rl import extinction_angle, load_angle, root_falling

_TWO_PI = 2.0 * np.pi


def _a(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


# --------------------------------------------------------------------------------------------
# Capacitor commutation
# --------------------------------------------------------------------------------------------

def resistive_turnoff_time(*, r: np.ndarray, c: np.ndarray, v_s: np.ndarray,
                           v_c0: np.ndarray) -> np.ndarray:
    """Turn-off time of capacitor commutation recharging through a resistive load [s].

    The SCR voltage v_T(t) = V_s − (V_s + V_c0)·e^(−t/(R·C)) is negative until
    **t_c = R·C·ln(1 + V_c0/V_s)**, which is R·C·ln 2 = 0.693·R·C for V_c0 = V_s  [1, Ex 5.6,
    Ex 7.19].

    r [Ω] load resistance; c [F] commutating capacitor; v_s [V] DC supply; v_c0 [V] capacitor
    charge voltage. Valid for an ideal switch placing C across the SCR and a purely resistive
    recharge path.

    >>> round(float(resistive_turnoff_time(r=5.0, c=10e-6, v_s=200.0, v_c0=200.0)) * 1e6, 3)
    34.657
    """
    return _a(r) * _a(c) * np.log1p(_a(v_c0) / _a(v_s))


def constant_current_turnoff_time(*, c: np.ndarray, v_c0: np.ndarray,
                                  i_o: np.ndarray) -> np.ndarray:
    """Turn-off time when an inductive load holds I_o through the capacitor [s].

    The capacitor discharges linearly: **t_c = C·V_c0/I_o**  [1, Ex 5.4, Ex 7.18].

    c [F]; v_c0 [V] charge voltage at commutation; i_o [A] load current. Valid while the load
    inductance keeps the current constant over t_c.

    >>> round(float(constant_current_turnoff_time(c=40e-6, v_c0=230.0, i_o=120.0)) * 1e6, 3)
    76.667
    """
    return _a(c) * _a(v_c0) / _a(i_o)


# --------------------------------------------------------------------------------------------
# Resonant commutation
# --------------------------------------------------------------------------------------------

def ring_peak(*, v_c0: np.ndarray, c: np.ndarray, l: np.ndarray) -> np.ndarray:  # noqa: E741
    """Peak of the L–C ring current **I_p = V_c0·√(C/L)** [A]  [1, Ex 5.2].

    v_c0 [V] capacitor precharge; c [F]; l [H]. Lossless ring.

    >>> round(float(ring_peak(v_c0=230.0, c=20e-6, l=5e-6)), 3)
    460.0
    """
    return _a(v_c0) * np.sqrt(_a(c) / _a(l))


def diode_interval(*, v_c0: np.ndarray, c: np.ndarray, l: np.ndarray,  # noqa: E741
                   i_o: np.ndarray) -> np.ndarray:
    """Interval in which the ring current exceeds the load current (diode across the SCR) [s].

    **t_D = (π − 2·asin x)·√(L·C)**, x = I_o/I_p  [1, Ex 5.9 (recomputed)]. The ring
    i = I_p·sin(ω_0·t) passes I_o at asin(x)/ω_0 and falls back through it at
    (π − asin x)/ω_0; in between the diode carries the excess and holds the SCR at its drop.
    Zero when x ≥ 1 (the ring never cancels the load current: commutation fails).

    v_c0 [V]; c [F]; l [H]; i_o [A].

    >>> round(float(diode_interval(v_c0=200.0, c=20e-6, l=0.2e-3, i_o=10.0)) * 1e6, 1)
    178.6
    """
    x = np.clip(_a(i_o) / ring_peak(v_c0=v_c0, c=c, l=l), 0.0, 1.0)
    return (np.pi - 2.0 * np.arcsin(x)) * np.sqrt(_a(l) * _a(c))


def hold_time(*, v_c0: np.ndarray, c: np.ndarray, l: np.ndarray,  # noqa: E741
              i_o: np.ndarray) -> np.ndarray:
    """Time the capacitor holds the SCR reverse-biased with no diode fitted [s].

    When the ring current reaches I_o the SCR current is zero and C sits across it at
    V_1 = V_c0·√(1 − x²), x = I_o/I_p; the load current then discharges it:
    **t_c = C·V_1/I_o**  [1, Ex 5.2]. Zero when x ≥ 1.

    v_c0 [V]; c [F]; l [H]; i_o [A]. Load current constant during t_c.

    >>> round(float(hold_time(v_c0=230.0, c=20e-6, l=5e-6, i_o=300.0)) * 1e6, 3)
    11.624
    """
    x = np.clip(_a(i_o) / ring_peak(v_c0=v_c0, c=c, l=l), 0.0, 1.0)
    return _a(c) * _a(v_c0) * np.sqrt(1.0 - x * x) / _a(i_o)


def _loop_voltage(t: np.ndarray, *, v1: np.ndarray, c: np.ndarray, l: np.ndarray,  # noqa: E741
                  l_t: np.ndarray, r: np.ndarray, i_o: np.ndarray) -> np.ndarray:
    """v_AK of the SCR at t after its current zero (see :func:`loop_hold_time`) [V]: the series
    loop R, L_t, C from i = I_o, v_C = −V_1, natural response i = c1·e^(s1·t) + c2·e^(s2·t)
    (complex roots when underdamped; the forced current is 0 behind C); v_AK = v_C + L·di/dt."""
    sig = r / (2.0 * l_t)
    w0sq = 1.0 / (l_t * c)
    disc = (sig * sig - w0sq).astype(complex)
    # Critical damping makes the two roots equal: separate them by a relative 1e-7.
    disc = np.where(np.abs(disc) < 1e-14 * w0sq, 1e-14 * w0sq, disc)
    root = np.sqrt(disc)
    s1, s2 = -sig + root, -sig - root
    di0 = v1 / l_t  # L_t·di/dt at 0+: V_s − R·I_o (zero) + V_1
    c1 = (di0 - s2 * i_o) / (s1 - s2)
    c2 = i_o - c1
    e1, e2 = np.exp(s1 * t), np.exp(s2 * t)
    v_c = -v1 + (c1 * np.expm1(s1 * t) / s1 + c2 * np.expm1(s2 * t) / s2) / c
    return np.real(v_c + l * (c1 * s1 * e1 + c2 * s2 * e2))


def loop_hold_time(*, v_c0: np.ndarray, c: np.ndarray, l: np.ndarray,  # noqa: E741
                   i_o: np.ndarray, r: np.ndarray, l_load: np.ndarray | float = 0.0
                   ) -> np.ndarray:
    """Time the SCR stays reverse-biased after its current zero with no diode fitted, from the
    circuit itself rather than a constant load current [s].

    When the ring current reaches I_o (the SCR's current zero) C is at −V_1,
    V_1 = V_c0·√(1 − x²), x = I_o/I_p, and the load current I_o = V_s/R flows on through the
    commutating branch: the loop is V_s, the load R and L_load, L and C in series. Its current
    obeys L_t·di/dt = V_s − R·i − v_C (L_t = L + L_load) from i = I_o, v_C = −V_1, and the SCR,
    across the L–C branch, sees v_AK = v_C + L·di/dt; t_c is the first time v_AK returns to 0.
    A large L_load holds the current at I_o and t_c tends to :func:`hold_time`; a resistive
    load lets the current ring up and discharge C sooner (up to 30× sooner where I_p ≫ I_o).
    Solved in closed form on a grid of the time scales (logarithmic near 0, uniform over the
    ring) and refined by bisection, all rows at once; 0 when x ≥ 1.

    v_c0 [V]; c [F]; l [H] commutating inductor; i_o [A]; r [Ω] load; l_load [H].

    >>> round(float(loop_hold_time(v_c0=230.0, c=20e-6, l=5e-6, i_o=300.0, r=230 / 300,
    ...                            l_load=1.0)) * 1e6, 2)  # constant current: hold_time
    11.62
    >>> round(float(loop_hold_time(v_c0=100.0, c=10e-6, l=1e-6, i_o=20.0, r=5.0)) * 1e6, 2)
    34.77
    """
    v_c0, c, l, i_o, r, l_load = np.broadcast_arrays(  # noqa: E741
        _a(v_c0), _a(c), _a(l), _a(i_o), _a(r), _a(l_load))
    shape = v_c0.shape
    flat = [np.ravel(x) for x in (v_c0, c, l, i_o, r, l_load)]
    # Rows in blocks: each carries a 1440-point grid of complex values (about 23 kB a row).
    step = 512
    out = np.concatenate([_loop_hold_rows(*(a[k:k + step] for a in flat))
                          for k in range(0, max(flat[0].size, 1), step)])
    return out[:flat[0].size].reshape(shape)


def _loop_hold_rows(v_c0: np.ndarray, c: np.ndarray, l: np.ndarray,  # noqa: E741
                    i_o: np.ndarray, r: np.ndarray, l_load: np.ndarray) -> np.ndarray:
    """:func:`loop_hold_time` of 1-D rows [s]."""
    x = np.clip(i_o / ring_peak(v_c0=v_c0, c=c, l=l), 0.0, 1.0)
    v1 = v_c0 * np.sqrt(1.0 - x * x)
    l_t = l + l_load
    tau0 = np.sqrt(l_t * c)
    hold = c * v1 / i_o
    t_rc = r * c * np.log1p(v1 / (i_o * r))
    # The crossing comes within a few ring periods, the R–C recharge or the constant-current
    # hold, whichever is longest: a uniform grid over that, and a logarithmic one (8 % steps)
    # for the early crossings, keep the first lobe on the grid.
    t_max = 4.0 * np.maximum.reduce([hold, 2.0 * np.pi * tau0, t_rc])
    n_lin = 1200
    u = np.linspace(0.0, 1.0, n_lin + 1)[1:]
    lin = t_max[:, None] * u[None, :]
    log = t_max[:, None] * np.logspace(-9, 0, 240)[None, :]
    grid = np.sort(np.concatenate([log, lin], axis=1), axis=1)
    kw = {k: v[:, None] for k, v in (("v1", v1), ("c", c), ("l", l), ("l_t", l_t), ("r", r),
                                     ("i_o", i_o))}
    with np.errstate(all="ignore"):
        g = _loop_voltage(grid, **kw)
    up = g >= 0.0
    first = np.argmax(up, axis=1)
    found = up[np.arange(first.size), first]
    rows = np.arange(first.size)
    hi = grid[rows, first]
    lo = np.where(first > 0, grid[rows, np.maximum(first - 1, 0)], 0.0)
    kw1 = {k: v[:, 0] for k, v in kw.items()}
    with np.errstate(all="ignore"):
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            pos = _loop_voltage(mid, **kw1) >= 0.0
            hi = np.where(pos, mid, hi)
            lo = np.where(pos, lo, mid)
    # No crossing on the grid (it should not happen) or none before the first point: the
    # smaller bracket end, never a longer time than the circuit gives.
    out = np.where(found & (first > 0), lo, 0.0)
    return np.where(x >= 1.0, 0.0, out)


def resonant_turnoff_time(*, v_c0: np.ndarray, c: np.ndarray, l: np.ndarray,  # noqa: E741
                          i_o: np.ndarray, diode: str, r: np.ndarray | None = None,
                          l_load: np.ndarray | float = 0.0) -> np.ndarray:
    """``turnoff_time`` of resonant commutation [s].

    ``diode``: ``"yes"`` → :func:`diode_interval`; ``"no"`` → :func:`hold_time`, or with the
    load ``r`` [Ω] (and ``l_load`` [H]) given the circuit's own :func:`loop_hold_time`;
    ``"unknown"`` → the smaller of the two (the diode's presence is not stated).

    >>> round(float(resonant_turnoff_time(v_c0=200.0, c=30e-6, l=4e-6, i_o=250.0,
    ...                                   diode="unknown")) * 1e6, 2)
    21.35
    """
    t_d = diode_interval(v_c0=v_c0, c=c, l=l, i_o=i_o)
    if diode == "yes":
        return t_d
    if r is None:
        t_h = hold_time(v_c0=v_c0, c=c, l=l, i_o=i_o)
    else:
        t_h = loop_hold_time(v_c0=v_c0, c=c, l=l, i_o=i_o, r=r, l_load=l_load)
    if diode == "no":
        return t_h
    return np.minimum(t_d, t_h)


def resonant_c_for_time(*, v_c0: np.ndarray, l: np.ndarray, i_o: np.ndarray,  # noqa: E741
                        t_req: np.ndarray, diode: str, r: np.ndarray | None = None,
                        l_load: np.ndarray | float = 0.0) -> np.ndarray:
    """The smallest C giving the resonant turnoff_time ``t_req`` [F].

    No diode: C·V_c0·√(1 − I_o²·L/(V_c0²·C))/I_o = t solves in closed form,
    C = [I_o²·L + √(I_o⁴·L² + 4·V_c0²·I_o²·t²)]/(2·V_c0²). With a diode, t_D increases
    monotonically with C and is solved by vectorised bisection on log C (all rows at once).

    v_c0 [V]; l [H]; i_o [A]; t_req [s].

    >>> c = resonant_c_for_time(v_c0=230.0, l=5e-6, i_o=300.0, t_req=11.624e-6, diode="no")
    >>> round(float(c) * 1e6, 2)
    20.0
    >>> c = resonant_c_for_time(v_c0=200.0, l=0.2e-3, i_o=10.0, t_req=178.6e-6, diode="yes")
    >>> round(float(c) * 1e6, 2)
    20.0
    """
    v_c0, l, i_o, t_req = np.broadcast_arrays(_a(v_c0), _a(l), _a(i_o), _a(t_req))  # noqa: E741
    c_nd = (i_o**2 * l + np.sqrt(i_o**4 * l**2 + 4.0 * v_c0**2 * i_o**2 * t_req**2)) \
        / (2.0 * v_c0**2)
    if r is not None and diode != "yes":  # the circuit's own hold time: bisection on log C
        c_nd = _c_for_loop(v_c0=v_c0, l=l, i_o=i_o, t_req=t_req, r=r, l_load=l_load,
                           start=c_nd)
    if diode == "no":
        return c_nd
    # t_D < π·√(L·C) and needs I_p > I_o: bracket from the larger of both lower bounds.
    lo = np.maximum((t_req / np.pi) ** 2 / l, l * (i_o / v_c0) ** 2)
    hi = lo * 16.0
    for _ in range(12):  # widen until t_D(hi) ≥ t_req on every row (vectorised)
        short = diode_interval(v_c0=v_c0, c=hi, l=l, i_o=i_o) < t_req
        hi = np.where(short, hi * 16.0, hi)
    llo, lhi = np.log(lo), np.log(hi)
    for _ in range(60):
        mid = 0.5 * (llo + lhi)
        ok = diode_interval(v_c0=v_c0, c=np.exp(mid), l=l, i_o=i_o) >= t_req
        lhi = np.where(ok, mid, lhi)
        llo = np.where(ok, llo, mid)
    c_d = np.exp(lhi)
    return c_d if diode == "yes" else np.maximum(c_d, c_nd)


def _c_for_loop(*, v_c0: np.ndarray, l: np.ndarray, i_o: np.ndarray,  # noqa: E741
                t_req: np.ndarray, r: np.ndarray, l_load: np.ndarray | float,
                start: np.ndarray) -> np.ndarray:
    """A C at which :func:`loop_hold_time` reaches ``t_req`` (bisection on log C between the
    C at which I_p = I_o and one that holds long enough; the upper end is returned, so the C
    returned always gives at least t_req) [F]; NaN where no C up to 16¹²× the start does."""
    def ok(c: np.ndarray) -> np.ndarray:
        return loop_hold_time(v_c0=v_c0, c=c, l=l, i_o=i_o, r=r, l_load=l_load) >= t_req
    lo = l * (i_o / v_c0) ** 2
    hi = np.maximum(start, lo * 1.0001)
    good = ok(hi)
    for _ in range(12):
        if np.all(good):
            break
        hi = np.where(good, hi, hi * 16.0)
        good = ok(hi)
    llo, lhi = np.log(lo), np.log(hi)
    for _ in range(30):  # the log-C bracket (at most ln 16¹³) shrinks 2³⁰-fold: < 4e-8
        mid = 0.5 * (llo + lhi)
        m = ok(np.exp(mid))
        lhi = np.where(m, mid, lhi)
        llo = np.where(m, llo, mid)
    return np.where(good, np.exp(lhi), np.nan)


def overcharge_peak(*, v_ref: np.ndarray, v0: np.ndarray, l: np.ndarray,  # noqa: E741
                    c: np.ndarray, i_l: np.ndarray) -> np.ndarray:
    """Capacitor peak when current I_L flows in L while C is at V_0, in a loop of source V_ref.

    Energy balance: **V_C,pk = V_ref + √((V_0 − V_ref)² + (L/C)·I_L²)**  [1, Ex 5.12].

    v_ref, v0 [V]; l [H]; c [F]; i_l [A]. Lossless.

    >>> round(float(overcharge_peak(v_ref=0.0, v0=0.0, l=1.0, c=1e-6, i_l=1.57)), 1)
    1570.0
    """
    v_ref, v0 = _a(v_ref), _a(v0)
    return v_ref + np.sqrt((v0 - v_ref) ** 2 + _a(l) / _a(c) * _a(i_l) ** 2)


# --------------------------------------------------------------------------------------------
# Line (natural) commutation
# --------------------------------------------------------------------------------------------

def extinction(*, alpha: np.ndarray, phi: np.ndarray) -> np.ndarray:
    """Extinction angle β of an R–L load fired at α [rad]; β = π for a resistive load.

    sin(β − φ) = sin(α − φ)·e^(−(β − α)/tan φ), first root after α  [2, §10]. Delegates to
    :func:`checks.rl.extinction_angle` for φ > 0.

    >>> round(float(np.degrees(extinction(alpha=np.radians(45), phi=0.0))), 6)
    180.0
    """
    alpha, phi = np.broadcast_arrays(_a(alpha), _a(phi))
    resistive = phi < 1e-9
    beta = extinction_angle(alpha=alpha, phi=np.where(resistive, 0.0, phi))
    return np.where(resistive, np.pi, beta)


def continuous_bridge_current(*, alpha: np.ndarray, phi: np.ndarray, vm: np.ndarray,
                              z: np.ndarray, omega: np.ndarray, r: np.ndarray,
                              l: np.ndarray) -> np.ndarray:  # noqa: E741
    """Load current at the firing instant of a bridge in continuous conduction [A].

    I_Lo = (V_m/Z)·(−sin(α − φ))·(1 + k)/(1 − k), k = e^(−(R/L)·π/ω)  [2, §10 (full
    converter, E = 0)]. Positive (continuous) for α < φ. L > 0.

    alpha, phi [rad]; vm [V]; z [Ω]; omega [rad/s]; r [Ω]; l [H].

    >>> w = 2 * np.pi * 60
    >>> p = float(load_angle(r=0.5, l=6.5e-3, omega=w)); z = float(np.hypot(0.5, w * 6.5e-3))
    >>> round(float(continuous_bridge_current(alpha=np.radians(60), phi=p, vm=120 * 2**0.5,
    ...       z=z, omega=w, r=0.5, l=6.5e-3)) - 10 / 0.5, 2)
    49.34
    """
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        k = np.exp(-(_a(r) / _a(l)) * np.pi / _a(omega))
        return (_a(vm) / _a(z)) * (-np.sin(_a(alpha) - _a(phi))) * (1.0 + k) / (1.0 - k)


def overlap_angle(*, alpha: np.ndarray, omega: np.ndarray, l_s: np.ndarray, i_d: np.ndarray,
                  vm: np.ndarray) -> np.ndarray:
    """Overlap angle μ of a single-phase bridge with source inductance L_s [rad].

    **cos(α + μ) = cos α − 2·ω·L_s·I_d/V_m**  [3, ch. 6]. NaN when the right side is below −1
    (the current cannot transfer before the line reverses: commutation fails).

    alpha [rad]; omega [rad/s]; l_s [H]; i_d [A] current transferred; vm [V].

    >>> round(float(np.degrees(overlap_angle(alpha=np.radians(30), omega=2 * np.pi * 50,
    ...       l_s=1e-3, i_d=20.0, vm=230 * 2**0.5))), 2)
    4.17
    """
    arg = np.cos(_a(alpha)) - 2.0 * _a(omega) * _a(l_s) * _a(i_d) / _a(vm)
    with np.errstate(invalid="ignore"):
        return np.where(arg >= -1.0, np.arccos(np.clip(arg, -1.0, 1.0)) - _a(alpha), np.nan)


class LineTurnoff(NamedTuple):
    """Line-commutation results per row (SI)."""

    turnoff_time: np.ndarray     # [s]
    beta: np.ndarray             # extinction angle [rad]; π + α + μ for a continuous bridge
    full_line_time: np.ndarray   # ac-switch: (π + α − β)/ω with the full line across [s]
    continuous: np.ndarray       # bridge in continuous conduction
    lost_control: np.ndarray     # ac-switch fired before φ (α < φ)


def line_turnoff(*, topology: str, freewheel: bool, alpha: np.ndarray, omega: np.ndarray,
                 r: np.ndarray, l: np.ndarray, vm: np.ndarray,  # noqa: E741
                 l_s: np.ndarray | float = 0.0,
                 gate_pulse: float | None = None) -> LineTurnoff:
    """Circuit turn-off time of natural commutation on an AC line [s].

    From the SCR's current zero until forward voltage returns  [2, §10–11]; [3, ch. 6]:

    - with a freewheeling diode: π/ω;
    - half-wave: (2π − β)/ω (β = π for R: π/ω);
    - ac-switch: π/ω while α ≥ φ (after its current zero the line and then the antiparallel
      SCR's on-state drop reverse-bias it); the part with the full line across it is
      (π + α − β)/ω. Fired before φ the partner's pulse comes while this SCR still conducts;
      with narrow pulses it behaves as a half-wave: (2π − β)/ω; a ``gate_pulse`` [s] that
      lasts past this SCR's current (ω·t ≥ β − π − α) fires the partner as soon as it stops,
      which is firing at φ: π/ω;
    - bridge, discontinuous (α > φ): (2π − β)/ω; continuous (α ≤ φ):
      (π − α − μ)/ω with μ from :func:`overlap_angle` for the current at firing.

    topology ``half-wave`` | ``bridge`` | ``ac-switch``; alpha [rad] firing angle; omega [rad/s];
    r [Ω], l [H] load; vm [V] line peak; l_s [H] source inductance (bridge overlap only).

    >>> out = line_turnoff(topology="ac-switch", freewheel=False, alpha=np.pi / 2,
    ...                    omega=2 * np.pi * 60, r=10.0, l=0.0, vm=170.0)
    >>> round(float(out.turnoff_time) * 1e3, 3)
    8.333
    """
    alpha, omega, r, l, vm, l_s = np.broadcast_arrays(  # noqa: E741
        _a(alpha), _a(omega), _a(r), _a(l), _a(vm), _a(l_s))
    phi = load_angle(r=r, l=l, omega=omega)
    beta = extinction(alpha=alpha, phi=phi)
    half = (_TWO_PI - beta) / omega
    full_line = np.where(topology == "ac-switch", (np.pi + alpha - beta) / omega, np.nan)
    continuous = np.zeros(alpha.shape, dtype=bool)
    lost = np.zeros(alpha.shape, dtype=bool)
    if freewheel:
        t_c = np.pi / omega
    elif topology == "half-wave":
        t_c = half
    elif topology == "ac-switch":
        lost = alpha < phi - 1e-12
        if gate_pulse is not None:  # wide pulses: control kept, the partner fires at φ
            lost &= omega * gate_pulse < beta - np.pi - alpha
        t_c = np.where(lost, half, np.pi / omega)
        full_line = np.where(lost, np.nan, full_line)
    else:
        continuous = (phi > 1e-9) & (alpha <= phi)
        z = np.hypot(r, omega * l)
        i_d = np.where(continuous, continuous_bridge_current(
            alpha=alpha, phi=phi, vm=vm, z=z, omega=omega, r=r, l=np.where(l > 0, l, 1.0)), 0.0)
        mu = overlap_angle(alpha=alpha, omega=omega, l_s=l_s, i_d=np.maximum(i_d, 0.0), vm=vm)
        t_cont = np.maximum(np.pi - alpha - mu, 0.0) / omega
        t_c = np.where(continuous, np.where(np.isnan(mu), 0.0, t_cont), half)
        beta = np.where(continuous, np.pi + alpha + np.nan_to_num(mu), beta)
    return LineTurnoff(np.broadcast_to(t_c, alpha.shape), beta, full_line, continuous, lost)


def line_turnoff_emf(*, topology: str, alpha: np.ndarray, omega: np.ndarray, r: np.ndarray,
                     l: np.ndarray, vm: np.ndarray, e: np.ndarray,  # noqa: E741
                     l_s: np.ndarray | float = 0.0) -> LineTurnoff:
    """Circuit turn-off time of natural commutation with a back-EMF load (battery, motor) [s].

    After its current ends at the R–L–E extinction angle β (:func:`checks.rle.waveform_pu`,
    conduction from max(α, θ1), θ1 = asin(E/V_m)) the load's terminals sit at E, so the SCR
    sees v − E: it stays reverse-biased until the line again exceeds E, at 2π + θ1
    [2, §10 (R–L–E load)], [1, ch. 6 (battery charging)]:

    - half-wave: (2π + θ1 − β)/ω; 0 where the current reaches 2π + θ1 (it never ends);
    - fully controlled bridge, discontinuous: the incoming pair fires at π + max(α, θ1) and,
      while it conducts, puts the line itself across the outgoing SCR: (2π − β)/ω when β > π
      (the incoming pair still conducts at 2π), else (2π + θ1 − β)/ω (its current too ended
      before 2π, the pair then shares v − E < 0); continuous, or fired before θ1 with a current
      that outlasts π + α (the incoming pair takes it over there): (π − α − μ)/ω with μ from
      :func:`overlap_angle` for the R–L–E current handed over; in the latter case the pair
      that took it over carries it on while the line is below E and, where it ends at θ_d
      before θ1, is forward-biased again at θ1: (θ1 − θ_d)/ω when shorter.

    Rows where the line never exceeds E after α conduct nothing; they keep the formula's value.
    Not for a freewheeling diode (π/ω there, :func:`line_turnoff`). Arguments as
    :func:`line_turnoff`; e [V] back EMF ≥ 0.

    >>> w = 2 * np.pi * 50  # R and E only: conducts θ1..π − θ1, so t_c = (π + 2·θ1)/ω
    >>> out = line_turnoff_emf(topology="half-wave", alpha=0.0, omega=w, r=1.0, l=0.0,
    ...                        vm=100.0, e=50.0)
    >>> round(float(out.turnoff_time) * 1e3, 4), round((np.pi + np.pi / 3) / w * 1e3, 4)
    (13.3333, 13.3333)
    """
    from checks.power import _decay
    from checks.rle import waveform_pu

    alpha, omega, r, l, vm, e, l_s = np.broadcast_arrays(  # noqa: E741
        _a(alpha), _a(omega), _a(r), _a(l), _a(vm), _a(e), _a(l_s))
    phi = load_angle(r=r, l=l, omega=omega)
    w = waveform_pu(topology=topology, freewheel=False, alpha=alpha, phi=phi, m=e / vm,
                    peak=False)
    beta, th1 = w["beta"], w["theta1"]
    back = np.maximum(_TWO_PI + th1 - beta, 0.0) / omega
    continuous = w["continuous"] > 0
    if topology == "half-wave":
        t_c = back
    else:
        t_disc = np.where(beta > np.pi, np.maximum(_TWO_PI - beta, 0.0) / omega, back)
        # Fired before θ1 (α < θ1) a current from θ1 may outlast π + α: the incoming pair's
        # pulse then takes it over (the outgoing pair's conduction forward-biases it).
        handed = ~continuous & (beta > np.pi + alpha)
        z = np.hypot(r, omega * l)
        at = np.where(continuous, alpha, np.pi + alpha)
        i_d = (vm / z) * (np.sin(at - phi) - w["offset"] + w["seg_c"] * _decay(
            at - w["seg_a"], np.tan(phi)))
        continuous = continuous | handed
        mu = overlap_angle(alpha=alpha, omega=omega, l_s=l_s,
                           i_d=np.where(continuous, np.maximum(i_d, 0.0), 0.0), vm=vm)
        t_cont = np.maximum(np.pi - alpha - mu, 0.0) / omega
        t_cont = np.minimum(t_cont, _tail_turnoff(handed, alpha, phi, w, i_d * z / vm) / omega)
        t_c = np.where(continuous, np.where(np.isnan(mu), 0.0, t_cont), t_disc)
        beta = np.where(continuous, np.pi + alpha + np.nan_to_num(mu), beta)
    nan = np.full(alpha.shape, np.nan)
    return LineTurnoff(np.broadcast_to(t_c, alpha.shape), beta, nan, continuous,
                       np.zeros(alpha.shape, dtype=bool))


def _tail_turnoff(handed: np.ndarray, alpha: np.ndarray, phi: np.ndarray,
                  w: Mapping[str, np.ndarray], i_h: np.ndarray) -> np.ndarray:
    """A bridge fired before θ1 whose current outlasts π + α hands it over there: the
    incoming pair carries it on while the line is still below E, so it falls, and where it
    ends before θ1 (+ π), at θ_d, that pair is forward-biased again at θ1 when the line
    exceeds E: reverse-biased for θ1 − θ_d [rad]; ∞ where the current outlasts θ1 or on
    other rows. i_h [per unit of V_m/Z] the current handed over."""
    shape = alpha.shape
    handed, alpha, phi, i_h = (np.ravel(x) for x in (handed, alpha, phi, i_h))
    k, th1 = np.ravel(w["offset"]), np.ravel(w["theta1"])
    out = np.full(alpha.shape, np.inf)
    tau = np.tan(phi)
    c = i_h + k - np.sin(alpha - phi)  # the tail i = sin(θ − φ) − k + c·e^(−(θ − α)/τ)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        g_end = np.sin(th1 - phi) - k + c * np.exp(-(th1 - alpha) / tau)
    idx = np.flatnonzero(handed & (tau > 1e-12) & (g_end <= 0.0) & (i_h > 0.0))
    if idx.size:
        a, p, kk, cc, tt = (x[idx] for x in (alpha, phi, k, c, tau))

        def f(b: np.ndarray, rows: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
            ex = cc[rows] * np.exp(-(b - a[rows]) / tt[rows])
            return (np.sin(b - p[rows]) - kk[rows] + ex,
                    np.cos(b - p[rows]) - ex / tt[rows])

        out[idx] = th1[idx] - root_falling(a, th1[idx], f)
    return out.reshape(shape)


def step_dvdt_max(*, e: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                  c: np.ndarray) -> np.ndarray:
    """Largest dv/dt across a series R–C reached by a step E through L, from rest [V/s].

    v = v_C + R·i. With σ = R/(2L), ω_0 = 1/√(LC), ζ = σ/ω_0: for ζ ≥ 0.5 the maximum is at
    t = 0+, E·R/L; below, at t_m = atan[ω_d(ω_d² − 3σ²)/(σ(3ω_d² − σ²))]/ω_d, where it is
    E·ω_0·e^(−σ·t_m)  [2, eqs. 17.34–17.35].

    e [V] step; r [Ω] snubber resistor; l [H] loop inductance; c [F] snubber capacitor.

    >>> round(float(step_dvdt_max(e=1.0, r=0.6, l=1.0, c=1.0)), 3)
    0.813
    """
    e, r, l, c = np.broadcast_arrays(_a(e), _a(r), _a(l), _a(c))  # noqa: E741
    sigma = r / (2.0 * l)
    w0 = 1.0 / np.sqrt(l * c)
    zeta = sigma / w0
    wd = w0 * np.sqrt(np.clip(1.0 - zeta**2, 1e-12, None))
    under = zeta < 0.5
    with np.errstate(divide="ignore", invalid="ignore"):
        tm = np.arctan2(wd * (wd**2 - 3.0 * sigma**2), sigma * (3.0 * wd**2 - sigma**2)) / wd
    late = e * w0 * np.exp(-sigma * np.where(under & np.isfinite(tm), tm, 0.0))
    return np.where(under, late, e * r / l)


# --------------------------------------------------------------------------------------------
# Waveform for the workbook's plot
# --------------------------------------------------------------------------------------------

class Waveform(NamedTuple):
    """A commutation transient: time [s], capacitor voltage [V] (positive while it holds the
    SCR reverse-biased), capacitor current [A], and the available turn-off interval (bool)."""

    t: np.ndarray
    v_c: np.ndarray
    i_c: np.ndarray
    turnoff: np.ndarray


def commutation_waveform(*, network: str, c: float, v_c0: float, v_s: float,
                         r: float = np.nan, i_o: float = np.nan,
                         l: float = np.nan, diode: str = "yes",  # noqa: E741
                         n: int = 400) -> Waveform:
    """The commutation transient from the instant the capacitor is switched in.

    - ``network="resistive"``: v_c = (V_s + V_c0)·e^(−t/RC) − V_s, recharging through R;
      i_c = (V_s + v_c)/R; turn-off while v_c > 0.
    - ``"constant-current"``: v_c = V_c0 − I_o·t/C (until −V_s); turn-off while v_c > 0.
    - ``"resonant"``: ring v_c = V_c0·cos ω_0t, i_c = I_p·sin ω_0t until the SCR current
      I_o − i_c reaches zero at t_1 = asin(x)/ω_0. With a diode the ring continues to π/ω_0 and
      the turn-off interval is where i_c > I_o; without, C then carries I_o and
      v_c = V_1 − I_o(t − t_1)/C, turn-off while v_c > 0  [1, Ex 5.2, Ex 5.9].

    c [F]; v_c0 [V]; v_s [V] supply; r [Ω]; i_o [A]; l [H]; n samples. Spans about twice the
    turn-off interval.

    >>> w = commutation_waveform(network="resistive", c=10e-6, v_c0=200.0, v_s=200.0, r=5.0)
    >>> round(float(w.t[w.turnoff][-1]) * 1e6, 0)
    35.0
    """
    if network == "resistive":
        t = np.linspace(0.0, 3.0 * r * c, n)
        v = (v_s + v_c0) * np.exp(-t / (r * c)) - v_s
        i = (v_s + v) / r
        return Waveform(t, v, i, v > 0)
    if network == "constant-current":
        t_c = c * v_c0 / i_o
        t = np.linspace(0.0, 2.5 * t_c, n)
        v = np.maximum(v_c0 - i_o * t / c, -v_s)
        i = np.where(v > -v_s, i_o, 0.0)
        return Waveform(t, v, i, v > 0)
    ip = float(ring_peak(v_c0=v_c0, c=c, l=l))
    w0 = 1.0 / np.sqrt(l * c)
    x = min(i_o / ip, 1.0)
    t1 = np.arcsin(x) / w0
    if diode == "yes":
        t = np.linspace(0.0, np.pi / w0, n)
        return Waveform(t, v_c0 * np.cos(w0 * t), ip * np.sin(w0 * t),
                        ip * np.sin(w0 * t) > i_o)
    v1 = v_c0 * np.sqrt(1.0 - x * x)
    t_end = t1 + 2.0 * c * v1 / i_o
    t = np.linspace(0.0, max(t_end, 2.0 * t1), n)
    ring = t < t1
    v = np.where(ring, v_c0 * np.cos(w0 * t), np.maximum(v1 - i_o * (t - t1) / c, -v_s))
    i = np.where(ring, ip * np.sin(w0 * t), i_o)
    return Waveform(t, v, i, (~ring) & (v > 0))


# --------------------------------------------------------------------------------------------
# Check functions (one call per check on the whole corner table)
# --------------------------------------------------------------------------------------------

def _outcome(values: Mapping[str, np.ndarray], metric: np.ndarray,
             limits: Mapping[str, float]) -> Outcome:
    """Grade ``metric`` and return every value broadcast to one common shape."""
    with np.errstate(divide="ignore", invalid="ignore"):
        margin, status = grade(metric, limits)
    names = list(values)
    arrays = np.broadcast_arrays(*(_a(values[k]) for k in names), margin, status)
    return Outcome(dict(zip(names, arrays[:-2], strict=True)), arrays[-2], arrays[-1])


def _vm(v_s: np.ndarray, ac: bool) -> np.ndarray:
    return _a(v_s) * (np.sqrt(2.0) if ac else 1.0)


def load_current(*, v_s: np.ndarray, r: np.ndarray, ac: bool) -> np.ndarray:
    """Load current to commutate [A]: V_s/R on DC; on AC the line peak over R, V_m/R, the most
    an R or R–L load carries at any instant (at a current peak L·di/dt = 0, so R·i ≤ V_m).

    >>> float(load_current(v_s=200.0, r=10.0, ac=False))
    20.0
    """
    return _vm(v_s, ac) / _a(r)


def firing_angle(*, alpha: np.ndarray | None, v_s: np.ndarray, f: np.ndarray,
                 osc: Mapping[str, Any]) -> np.ndarray:
    """The firing angle [rad]: ``alpha`` when the power stage gives it, else the line-synchronised
    oscillator's (:func:`checks.oscillator.line_sync_firing_angle`) from ``osc``: ``osc_device``
    and the arrays ``osc_vz``, ``osc_rt``, ``osc_ct`` and ``osc_<peak parameter>``; the
    oscillator sees the rectified line of peak √2·V_s.

    >>> float(firing_angle(alpha=np.array(1.0), v_s=230.0, f=50.0, osc={}))
    1.0
    """
    if alpha is not None:
        return _a(alpha)
    peak = {k[4:]: v for k, v in osc.items()
            if k.startswith("osc_") and k not in ("osc_device", "osc_vz", "osc_rt", "osc_ct")}
    return line_sync_firing_angle(device=osc["osc_device"], vm=_vm(v_s, True),
                                  omega=_TWO_PI * _a(f), vz=osc["osc_vz"], rt=osc["osc_rt"],
                                  ct=osc["osc_ct"], **peak)


def _charge(v_s: np.ndarray, v_c0: np.ndarray | None, ac: bool) -> np.ndarray:
    return _vm(v_s, ac) if v_c0 is None else _a(v_c0)


def capacitor_time(*, model: str, c: np.ndarray, r: np.ndarray, v_s: np.ndarray,
                   v_c0: np.ndarray | None = None) -> np.ndarray:
    """turnoff_time of capacitor commutation for ``model`` (``resistive`` or
    ``constant-current``), I_o = V_s/R, V_c0 = V_s when not given [s].

    >>> round(float(capacitor_time(model="constant-current", c=20e-6, r=1.0, v_s=200.0,
    ...                            v_c0=180.0)) * 1e6, 1)
    18.0
    """
    vc = _charge(v_s, v_c0, False)
    if model == "resistive":
        return resistive_turnoff_time(r=r, c=c, v_s=v_s, v_c0=vc)
    return constant_current_turnoff_time(c=c, v_c0=vc, i_o=load_current(v_s=v_s, r=r, ac=False))


def _line(*, topology: str, freewheel: bool, alpha: np.ndarray | None, f: np.ndarray,
          r: np.ndarray | None, l: np.ndarray | None, v_s: np.ndarray | None,  # noqa: E741
          l_s: np.ndarray | None, osc: Mapping[str, Any],
          gate_pulse: float | None = None, e: np.ndarray | None = None) -> LineTurnoff:
    """:func:`line_turnoff` with the inputs a check read; the rest cannot change the answer
    (a resistive load or a freewheeling diode makes t_c = π/ω whatever α, R and V are).
    With a back EMF ``e`` [V]: :func:`line_turnoff_emf`."""
    vs = _a(1.0 if v_s is None else v_s)
    a = 0.0 if alpha is None and not osc else firing_angle(alpha=alpha, v_s=vs, f=f, osc=osc)
    if e is not None and not freewheel:
        return line_turnoff_emf(topology=topology, alpha=a, omega=_TWO_PI * _a(f),
                                r=1.0 if r is None else r, l=0.0 if l is None else l,
                                vm=_vm(vs, True), e=e, l_s=0.0 if l_s is None else l_s)
    return line_turnoff(topology=topology, freewheel=freewheel, alpha=a,
                        omega=_TWO_PI * _a(f), r=1.0 if r is None else r,
                        l=0.0 if l is None else l, vm=_vm(vs, True),
                        l_s=0.0 if l_s is None else l_s, gate_pulse=gate_pulse)


def time_check(*, network: str, tq: np.ndarray, limits: Mapping[str, float],
               c: np.ndarray | None = None, r: np.ndarray | None = None,
               v_s: np.ndarray | None = None, v_c0: np.ndarray | None = None,
               l: np.ndarray | None = None, f: np.ndarray | None = None,  # noqa: E741
               alpha: np.ndarray | None = None, l_s: np.ndarray | None = None,
               model: str = "resistive", diode: str = "unknown", topology: str = "half-wave",
               freewheel: bool = False, ac: bool = False, gate_pulse: float | None = None,
               e: np.ndarray | None = None, l_load: np.ndarray | None = None,
               **osc: Any) -> Outcome:
    """``turnoff.time``: circuit turn-off time t_c against tq; metric t_c/tq.

    network ``line``: :func:`line_turnoff` (alpha [rad] or the oscillator's ``osc_*`` inputs,
    see :func:`firing_angle`; f [Hz]; r [Ω], l [H] load; v_s [V RMS]; l_s [H]; e [V] a back
    EMF, :func:`line_turnoff_emf`);
    ``capacitor``: :func:`capacitor_time` (model); ``resonant``: :func:`resonant_turnoff_time`
    (diode) with I_o from :func:`load_current`, the hold time without a diode from the loop
    through the load (:func:`loop_hold_time`, R = V/I_o and ``l_load`` [H]). tq [s] at Tj,max.

    Besides ``turnoff_time`` and ``tq`` it returns for the summary: ``c_scale_fail`` and
    ``c_scale_pass``, the factor on C per row that gives t_c = k·tq (capacitor, resonant);
    line: ``full_line_time`` (ac-switch), ``beta``, ``continuous``, ``lost_control``.

    >>> out = time_check(network="resonant", tq=np.array([8e-6]), c=20e-6, l=5e-6, r=230 / 300,
    ...                  v_s=230.0, diode="no", l_load=1.0,
    ...                  limits={"fail_below": 1.2, "marginal_below": 1.5})
    >>> round(float(out.values["turnoff_time"][0]) * 1e6, 2), out.status.tolist()
    (11.62, [1])
    """
    k_fail = float(limits.get("fail_below", 1.2))
    k_pass = float(limits.get("marginal_below", k_fail))
    tq = _a(tq)
    values: dict[str, np.ndarray] = {}
    if network == "line":
        assert f is not None
        lt = _line(topology=topology, freewheel=freewheel, alpha=alpha, f=f, r=r, l=l,
                   v_s=v_s, l_s=l_s, osc=osc, gate_pulse=gate_pulse, e=e)
        t_c = lt.turnoff_time
        values.update(full_line_time=lt.full_line_time, beta=lt.beta,
                      continuous=lt.continuous.astype(float),
                      lost_control=lt.lost_control.astype(float))
    elif network == "capacitor":
        assert c is not None and r is not None and v_s is not None
        t_c = capacitor_time(model=model, c=c, r=r, v_s=v_s, v_c0=v_c0)
        with np.errstate(divide="ignore", invalid="ignore"):
            values.update(c_scale_fail=k_fail * tq / t_c, c_scale_pass=k_pass * tq / t_c)
    else:
        assert c is not None and l is not None and r is not None and v_s is not None
        i_o = load_current(v_s=v_s, r=r, ac=ac)
        vc = _charge(v_s, v_c0, ac)
        # The load's own R (and L) set how the current flows on once the SCR is off.
        loop = {"r": _vm(v_s, ac) / i_o, "l_load": 0.0 if l_load is None else l_load}
        t_c = resonant_turnoff_time(v_c0=vc, c=c, l=l, i_o=i_o, diode=diode, **loop)
        values.update(
            c_scale_fail=resonant_c_for_time(v_c0=vc, l=l, i_o=i_o, t_req=k_fail * tq,
                                             diode=diode, **loop) / _a(c),
            c_scale_pass=resonant_c_for_time(v_c0=vc, l=l, i_o=i_o, t_req=k_pass * tq,
                                             diode=diode, **loop) / _a(c),
            t_diode=diode_interval(v_c0=vc, c=c, l=l, i_o=i_o),
            t_hold=loop_hold_time(v_c0=vc, c=c, l=l, i_o=i_o, **loop), load_current=i_o)
    with np.errstate(divide="ignore", invalid="ignore"):
        return _outcome({"turnoff_time": t_c, "tq": tq, **values}, t_c / tq, limits)


def capacitor_check(*, network: str, c: np.ndarray, v_s: np.ndarray, r: np.ndarray,
                    c_voltage: np.ndarray, limits: Mapping[str, float],
                    v_c0: np.ndarray | None = None, l: np.ndarray | None = None,  # noqa: E741
                    model: str = "resistive", ac: bool = False) -> Outcome:
    """``turnoff.capacitor``: capacitor peak voltage and current; metric c_voltage/peak.

    Capacitor commutation: peak max(V_c0, V_s) (C swings from −V_c0 and recharges toward the
    supply); current (V_s + V_c0)/R (resistive) or I_o (constant current). Resonant: the
    overcharge :func:`overcharge_peak` with V_ref = V_0 = supply (the load current recharges C
    to the supply while L still carries I_o), or V_c0 if larger; current I_p  [1, Ex 5.12].
    Returns ``c_scale_overcharge`` (resonant): the factor on C per row that brings the
    overcharge down to the rating (NaN where no C can, the rating being below V_c0 or V_s).

    c [F]; v_s [V] (RMS when ``ac``); r [Ω]; c_voltage [V] rating; v_c0 [V]; l [H].

    >>> out = capacitor_check(network="capacitor", c=10e-6, v_s=200.0, r=5.0, c_voltage=250.0,
    ...                       limits={"fail_below": 1.0})
    >>> out.values["capacitor_peak"].item(), out.values["capacitor_current"].item()
    (200.0, 80.0)
    """
    vs = _vm(v_s, ac)
    vc = _charge(v_s, v_c0, ac)
    i_o = load_current(v_s=v_s, r=r, ac=ac)
    extra: dict[str, np.ndarray] = {}
    if network == "capacitor":
        peak = np.maximum(vc, vs)
        current = (vs + vc) / _a(r) if model == "resistive" else i_o
    else:
        assert l is not None
        peak = np.maximum(vc, overcharge_peak(v_ref=vs, v0=vs, l=l, c=c, i_l=i_o))
        current = ring_peak(v_c0=vc, c=c, l=l)
        head = _a(c_voltage) - vs
        with np.errstate(divide="ignore", invalid="ignore"):
            extra["c_scale_overcharge"] = np.where(
                (head > 0) & (vc <= c_voltage), _a(l) * (i_o / head) ** 2 / _a(c), np.nan)
    return _outcome({"capacitor_peak": peak, "capacitor_current": current,
                     "c_voltage": _a(c_voltage), **extra}, _a(c_voltage) / peak, limits)


def peak_current_check(*, c: np.ndarray, l: np.ndarray, v_s: np.ndarray,  # noqa: E741
                       r: np.ndarray, limits: Mapping[str, float],
                       v_c0: np.ndarray | None = None, ac: bool = False) -> Outcome:
    """``turnoff.peak-current``: ring peak I_p = V_c0·√(C/L) against the load current;
    metric I_p/I_o (limit 1.5). Also returns ``scr_peak`` = I_o + I_p (what the SCRs carry)
    and ``c_scale_fail`` = (k·I_o/I_p)², the factor on C per row (or 1/factor on L) at which
    I_p = k·I_o.

    c [F]; l [H]; v_s [V]; r [Ω]; v_c0 [V] (default the supply).

    >>> out = peak_current_check(c=40e-6, l=20e-6, v_s=230.0, r=230 / 120,
    ...                          limits={"fail_below": 1.5})
    >>> round(out.values["scr_peak"].item(), 2), out.status.tolist()
    (445.27, 0)
    """
    vc = _charge(v_s, v_c0, ac)
    i_o = load_current(v_s=v_s, r=r, ac=ac)
    ip = ring_peak(v_c0=vc, c=c, l=l)
    k = float(limits.get("fail_below", 1.5))
    return _outcome({"ring_peak": ip, "load_current": i_o, "scr_peak": ip + i_o,
                     "c_scale_fail": (k * i_o / ip) ** 2}, ip / i_o, limits)


def dvdt_check(*, network: str, dvdt: np.ndarray, limits: Mapping[str, float],
               v_s: np.ndarray, r: np.ndarray | None = None, c: np.ndarray | None = None,
               l: np.ndarray | None = None, f: np.ndarray | None = None,  # noqa: E741
               alpha: np.ndarray | None = None, l_s: np.ndarray | None = None,
               snubber_r: np.ndarray | None = None, snubber_c: np.ndarray | None = None,
               snubber_l: np.ndarray | None = None, model: str = "resistive",
               topology: str = "half-wave", freewheel: bool = False,
               ac: bool = False, **osc: Any) -> Outcome:
    """``turnoff.reapplied-dvdt``: rate at which forward voltage returns; metric rating/rate.

    - capacitor, resistive: V_s/(R·C), the slope at the voltage zero; constant current and
      resonant: I_o/C (the load current recharges C)  [1, Ex 5.4, Ex 5.6];
    - line: the line's own slope ω·V_m at its zero crossing, unless the forward voltage returns
      as a step of V_m·|sin β| when the partner SCR turns off an inductive current (ac-switch;
      discontinuous bridge): then :func:`step_dvdt_max` of the snubber; with no snubber the
      rate is unbounded (NaN: fails). A half-wave SCR's step is in the reverse direction and a
      continuous bridge's outgoing SCR sees the line reverse it, so both get the line slope.

    dvdt [V/s] rating at Tj,max; other arguments as in :func:`time_check`; snubber_r [Ω],
    snubber_c [F], snubber_l [H] the snubber and its loop inductance (line only). Returns
    ``c_scale_fail``: the factor on C per row at which the rate equals the rating (capacitor,
    resonant); ``stepped``: 1 where a step sets the rate; ``step_voltage``.

    >>> out = dvdt_check(network="capacitor", dvdt=np.array([10e6]), v_s=200.0, r=5.0,
    ...                  c=10e-6, limits={"fail_below": 1.0})
    >>> round(out.values["reapplied_dvdt"].item() / 1e6, 3)
    4.0
    """
    dvdt = _a(dvdt)
    extra: dict[str, np.ndarray] = {}
    if network == "line":
        assert f is not None
        omega = _TWO_PI * _a(f)
        vm = _vm(v_s, True)
        rate = omega * vm
        if l is not None and r is not None and not freewheel \
                and topology in ("ac-switch", "bridge"):
            lt = _line(topology=topology, freewheel=freewheel, alpha=alpha, f=f, r=r, l=l,
                       v_s=v_s, l_s=l_s, osc=osc)
            stepped = (load_angle(r=r, l=l, omega=omega) > 1e-9) & ~lt.continuous
            e = vm * np.abs(np.sin(lt.beta))
            if snubber_r is not None and snubber_c is not None and snubber_l is not None:
                step = step_dvdt_max(e=e, r=snubber_r, l=snubber_l, c=snubber_c)
            else:
                step = np.full(np.shape(e), np.nan)
            rate = np.where(stepped, np.maximum(step, rate), rate)
            extra.update(stepped=stepped.astype(float), step_voltage=np.where(stepped, e, 0.0))
    else:
        assert r is not None and c is not None
        if network == "capacitor" and model == "resistive":
            rate = _vm(v_s, ac) / (_a(r) * _a(c))
        else:
            rate = load_current(v_s=v_s, r=r, ac=ac) / _a(c)
        extra["c_scale_fail"] = rate / dvdt
    with np.errstate(divide="ignore", invalid="ignore"):
        return _outcome({"reapplied_dvdt": rate, "dvdt": dvdt, **extra}, dvdt / rate, limits)
