"""Gate drive: from a UJT or PUT oscillator's pulse, directly or through a pulse transformer,
to one or more SCR gates.

The gate is modelled as a voltage source VGT (at the coldest ambient) while it conducts, with the
optional gate–cathode resistor R_GK across it. The pulse source is the oscillator's timing
capacitor discharging through the emitter diode (V_D, or the PUT's V_F), the device's on
resistance r_on and the base-1 (or cathode) resistor R_1; R_S runs from that node to the gate.
A pulse transformer (turns ratio n = primary ÷ secondary, ideal: magnetising current and
leakage inductance neglected) is handled by referring the gate side to the primary:
R_S → n²·R_S, VGT → n·VGT, gate currents ÷ n.

All arguments are SI magnitudes (V, Ω, F, s, A, W, K, rad) that broadcast over numpy arrays;
nothing here loops per row.

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §9 (gate
    characteristics, UJT and PUT trigger circuits, Examples 9.5–9.6) and §10 (Example 10.11,
    the minimum gate pulse width of a converter with an R–L load).
[2] P. S. Bimbhra, *Power Electronics*, ch. 4 (gate characteristic, load line, pulse frequency
    and duty; latching time with L and R–L loads).
[3] V. Singhal & B. R. Gupta, *Introduction to Electric Drives*, ch. 1 (Examples 1_3–1_5:
    trigger source voltage, average gate power, latching pulse width).
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import NamedTuple

import numpy as np

from checks.core import PASS, Outcome, cold_value, grade
from checks.oscillator import free_running, idle_gate_check, line_sync_firing_angle, peak_voltage
from checks.rl import load_angle, rl_current

# Common-practice cold multipliers at −40 °C (applied pro rata by checks.core.cold_value).
K_IGT = 2.0
K_VGT = 1.5
K_IL = 2.0

Limits = Mapping[str, float]


def _f(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


def _g_gk(r_gk: np.ndarray | None) -> np.ndarray:
    """Conductance of the gate–cathode resistor; 0 when none is fitted."""
    return np.asarray(0.0) if r_gk is None else 1.0 / _f(r_gk)


def _turns(n: np.ndarray | None) -> np.ndarray:
    return np.asarray(1.0) if n is None else _f(n)


# --- source models ---------------------------------------------------------------------------

def thevenin(*, vp: np.ndarray, vd: np.ndarray, r_on: np.ndarray, r1: np.ndarray,
             series_r: np.ndarray, n: np.ndarray | float = 1.0,
             r_gk: np.ndarray | None = None) -> tuple[np.ndarray, ...]:
    """The pulse source at the gate at t = 0: (E_G, R_src, E_th, R_th)  [1, §9].

    E_G = (VP − VD)·R1/(R1 + r_on)/n and R_src = (R1∥r_on)/n² + R_S (R_GK not included);
    with R_GK across the gate terminals E_th = E_G·R_GK/(R_src + R_GK), R_th = R_src∥R_GK
    (without R_GK: E_th = E_G, R_th = R_src).

    vp [V] peak-point voltage; vd [V] emitter diode drop (PUT: its V_F); r_on [Ω] base-1
    resistance while conducting (PUT: 0); r1 [Ω] base-1 resistor (PUT: cathode resistor R_K);
    series_r [Ω] R_S; n [–] pulse-transformer turns ratio (1 for direct coupling); r_gk [Ω]
    gate–cathode resistor or None. Valid at the first instant of the pulse (the capacitor
    still at VP).

    >>> e_g, r_src, e_th, r_th = thevenin(vp=15.8, vd=0.5, r_on=10.0, r1=100.0, series_r=47.0,
    ...                                   r_gk=1e3)
    >>> [round(float(x), 3) for x in (e_g, r_src, e_th, r_th)]
    [13.909, 56.091, 13.17, 53.112]
    """
    n = _f(n)
    g = _g_gk(r_gk)
    e_pri = (_f(vp) - vd) * r1 / (r1 + r_on)
    r_pri = r1 * r_on / (r1 + r_on)
    e_g = e_pri / n
    r_src = r_pri / n**2 + series_r
    e_th = e_g / (1.0 + r_src * g)
    r_th = r_src / (1.0 + r_src * g)
    return e_g, r_src, e_th, r_th


def gate_current(*, e_g: np.ndarray, r_src: np.ndarray, vgt: np.ndarray,
                 r_gk: np.ndarray | None = None, n_gates: int = 1) -> np.ndarray:
    """Current into one gate held at VGT [A]: i_G = (E_G − VGT)/R_src/N − VGT/R_GK  [1, §9].

    The source current is shared by the N gates fired from one pulse (dividing it by N is
    conservative, since the source's internal drop would fall with fewer gates on); R_GK takes
    VGT/R_GK. e_g [V], r_src [Ω] from :func:`thevenin`; vgt [V]; r_gk [Ω] or None.

    >>> round(float(gate_current(e_g=14.75, r_src=2e3, vgt=0.75)) * 1e3, 6)
    7.0
    """
    return (_f(e_g) - vgt) / r_src / n_gates - _f(vgt) * _g_gk(r_gk)


def peak_power_bound(*, e_th: np.ndarray, r_th: np.ndarray) -> np.ndarray:
    """The most power the source can put into any gate [W]: E_th²/(4·R_th), reached at
    v_GK = E_th/2 whatever the gate's curve (maximum power transfer)  [1, §9]; [2, ch. 4].

    >>> round(float(peak_power_bound(e_th=15.0, r_th=111.87)), 4)
    0.5028
    """
    return _f(e_th) ** 2 / (4.0 * _f(r_th))


class Pulse(NamedTuple):
    """The gate-loaded discharge, referred to the primary side (n = 1 for direct coupling)."""

    tau: np.ndarray    # time constant C·(r_on + R1∥R_S') [s]
    i_c0: np.ndarray   # capacitor current at t = 0 [A]
    t_end: np.ndarray  # end of the pulse (valley voltage, or valley current) [s]
    r_p: np.ndarray    # R1∥R_S' [Ω]
    v_x: np.ndarray    # VD + R_p·VGT'/R_S': the voltage the capacitor decays toward [V]
    rs_p: np.ndarray   # R_S' = n²·R_S [Ω]
    vgt_p: np.ndarray  # VGT' = n·VGT [V]
    r1: np.ndarray     # R1 [Ω]
    n: np.ndarray      # turns ratio [–]


def discharge_pulse(*, vp: np.ndarray, vd: np.ndarray, r_on: np.ndarray, r1: np.ndarray,
                    series_r: np.ndarray, c: np.ndarray, vgt: np.ndarray, vv: np.ndarray,
                    iv: np.ndarray | None = None, n: np.ndarray | float = 1.0) -> Pulse:
    """The UJT (or PUT) discharge with the gate as a load  [1, §9]; derivation in the module
    docstring's model.

    With R_S' = n²·R_S, VGT' = n·VGT, R_p = R1∥R_S' and V_x = VD + R_p·VGT'/R_S':
    τ_g = C·(r_on + R_p); i_C(t) = i_C0·e^(−t/τ_g), i_C0 = (VP − V_x)/(r_on + R_p); the
    capacitor voltage is V_x + (r_on + R_p)·i_C; the pulse ends when it reaches VV,
    t_end = τ_g·ln[(VP − V_x)/(VV − V_x)], or earlier when i_C falls below IV (when given).

    vp, vd, r_on, r1, series_r, n as in :func:`thevenin`; c [F] timing capacitor; vgt [V] the
    gate's clamp voltage; vv [V] valley voltage; iv [A] valley current or None. Valid while
    the gate conducts (the gate-node current stays positive); r_on is taken as constant.

    >>> p = discharge_pulse(vp=15.8, vd=0.5, r_on=10.0, r1=100.0, series_r=47.0, c=0.5e-6,
    ...                     vgt=1.2692, vv=3.5)
    >>> round(float(p.tau) * 1e6, 2), round(float(p.i_c0), 4), round(float(p.t_end) * 1e6, 1)
    (20.99, 0.344, 40.1)
    """
    n = _f(n)
    rs_p = n**2 * _f(series_r)
    vgt_p = n * _f(vgt)
    r1 = _f(r1)
    r_p = r1 * rs_p / (r1 + rs_p)
    v_x = vd + r_p * vgt_p / rs_p
    r_loop = r_on + r_p
    tau = _f(c) * r_loop
    i_c0 = (_f(vp) - v_x) / r_loop
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = (vp - v_x) / (vv - v_x)
        t_vv = np.where((vv > v_x) & (ratio > 0), tau * np.log(np.where(ratio > 0, ratio, 1.0)),
                        np.inf)
        if iv is None:
            t_iv = np.inf
        else:
            q = i_c0 / _f(iv)
            t_iv = np.where(q > 0, tau * np.log(np.where(q > 0, q, 1.0)), 0.0)
    t_end = np.maximum(np.minimum(t_vv, t_iv), 0.0)
    return Pulse(tau, i_c0, t_end, r_p, v_x, rs_p, vgt_p, r1, n)


def pulse_width(*, pulse: Pulse, igt: np.ndarray, vgt: np.ndarray,
                r_gk: np.ndarray | None = None, n_gates: int = 1) -> np.ndarray:
    """Time the gate current stays at or above IGT [s], capped at the pulse end  [1, §9]:

    t_w = min{ τ_g·ln[ i_C0 / (I'·(R1 + R_S')/R1 + VGT'/R1) ], t_end },
    I' = N·IGT_eff/n, IGT_eff = IGT + VGT/R_GK,

    from i_node(t) = [R1/(R1 + R_S')]·(i_C(t) − VGT'/R1), the current into the gate node,
    shared by N gates. 0 when the pulse never reaches IGT. igt [A], vgt [V] at the coldest
    ambient; r_gk [Ω] or None; pulse from :func:`discharge_pulse` with the same vgt.

    >>> p = discharge_pulse(vp=15.8, vd=0.5, r_on=10.0, r1=100.0, series_r=47.0, c=0.5e-6,
    ...                     vgt=1.2692, vv=3.5)
    >>> round(float(pulse_width(pulse=p, igt=15.385e-3, vgt=1.2692, r_gk=1e3)) * 1e6, 1)
    40.1
    """
    igt_eff = _f(igt) + _f(vgt) * _g_gk(r_gk)
    i_req = n_gates * igt_eff / pulse.n
    i_th = i_req * (pulse.r1 + pulse.rs_p) / pulse.r1 + pulse.vgt_p / pulse.r1
    with np.errstate(divide="ignore", invalid="ignore"):
        q = pulse.i_c0 / i_th
        above = np.where(q > 1.0, pulse.tau * np.log(np.where(q > 1.0, q, 1.0)), 0.0)
    return np.minimum(above, pulse.t_end)


def primary_volt_seconds(*, pulse: Pulse) -> np.ndarray:
    """Volt-seconds on the transformer primary over the pulse [V·s]:

    ∫v_pri dt = R_p·[i_C0·τ_g·(1 − e^(−t_end/τ_g)) + (VGT'/R_S')·t_end],

    the exact integral of the model's primary voltage v_pri = R_p·(i_C + VGT'/R_S'): the
    exponential pulse E_pk·τ_g·(1 − e^(−t_end/τ_g)) plus the level the clamped gate holds.
    The shortcut E_pk·t_end overstates the exponential part by (t/τ_g)/(1 − e^(−t/τ_g)),
    1.58 at t = τ_g. Magnetising current neglected (ideal transformer).

    >>> p = discharge_pulse(vp=15.8, vd=0.5, r_on=10.0, r1=100.0, series_r=47.0, c=0.5e-6,
    ...                     vgt=1.2692, vv=3.5)
    >>> round(float(primary_volt_seconds(pulse=p)) * 1e6, 1)
    231.3
    """
    with np.errstate(invalid="ignore", over="ignore"):
        frac = -np.expm1(-pulse.t_end / pulse.tau)
        return pulse.r_p * (pulse.i_c0 * pulse.tau * frac
                            + pulse.vgt_p / pulse.rs_p * pulse.t_end)


# --- required gate-pulse width -----------------------------------------------------------------

def required_width_resistive(*, alpha: np.ndarray, il: np.ndarray, r: np.ndarray,
                             vm: np.ndarray, omega: np.ndarray,
                             tgt: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Resistive AC load: (t_req, latch_limit_angle)  [1, §10]; [2, ch. 4].

    t_req(α) = max(0, [asin(IL·R/Vm) − α]/ω) + tgt for α ≤ π − asin(IL·R/Vm), else ∞ (the
    sine never again reaches IL); latch_limit_angle = π − asin(IL·R/Vm). When Vm/R < IL the
    SCR never latches: t_req = ∞, latch limit NaN.

    alpha [rad]; il [A] latching current (cold); r [Ω]; vm [V] peak line voltage (low line);
    omega [rad/s]; tgt [s] gate-controlled turn-on time.

    >>> t, lim = required_width_resistive(alpha=np.radians(5.0), il=40e-3, r=2e3,
    ...                                   vm=230 * 2**0.5, omega=2 * np.pi * 50, tgt=0.0)
    >>> round(float(t) * 1e3, 3), round(float(np.degrees(lim)), 2)
    (0.513, 165.76)
    """
    x = _f(il) * r / vm
    with np.errstate(invalid="ignore"):
        onset = np.arcsin(np.where(x <= 1.0, x, np.nan))
    limit = np.pi - onset
    wait = np.maximum(0.0, (onset - alpha) / omega)
    t_req = np.where(np.isnan(onset) | (_f(alpha) > limit), np.inf, wait + tgt)
    return t_req, limit


def _after_zero(i: np.ndarray) -> np.ndarray:
    """Grid points (axis 1) at or after the current's first return to zero: the formula of
    :func:`checks.rl.rl_current` holds only until then."""
    was_on = np.maximum.accumulate(i, axis=1) > 0.0
    return np.cumsum((i <= 0.0) & was_on, axis=1) > 0


_FINE = np.concatenate([np.geomspace(1e-7, 0.05, 160), np.linspace(0.05, 2 * np.pi, 1260)])


def time_to_current_rl(*, alpha: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                       vm: np.ndarray, omega: np.ndarray, i_target: np.ndarray) -> np.ndarray:
    """Time from firing at α until an R–L load current first reaches i_target [s]  [1, §10]:

    the first θ > α with i(θ) = (Vm/Z)·[sin(θ − φ) − sin(α − φ)·e^(−(θ−α)/tan φ)] = i_target
    (:func:`checks.rl.rl_current`), t = (θ − α)/ω; ∞ when the current returns to zero first.
    First-order form: L·i_target/(Vm·sin α).

    Method: a bracketing grid in θ − α (geometric below 0.05 rad, 0.14° steps above, up to
    2π; grid points after the current's first zero are excluded), then 60 steps of vectorised
    bisection. r [Ω], l [H] > 0, vm [V], omega [rad/s], alpha [rad], i_target [A].

    >>> t = time_to_current_rl(alpha=np.radians(30.0), r=10.0, l=10e-3, vm=120 * 2**0.5,
    ...                        omega=2 * np.pi * 60, i_target=0.5)
    >>> round(float(t) * 1e6, 2)
    59.53
    """
    arrays = np.broadcast_arrays(_f(alpha), _f(r), _f(l), _f(vm), _f(omega), _f(i_target))
    shape = arrays[0].shape
    a, rr, ll, v, w, it = (x.ravel() for x in arrays)
    phi = load_angle(r=rr, l=ll, omega=w)
    z = np.hypot(rr, w * ll)

    grid = _FINE[None, :]
    i = rl_current(theta=a[:, None] + grid, alpha=a[:, None], phi=phi[:, None], vm=v[:, None],
                   z=z[:, None])
    hit = (i >= it[:, None]) & ~_after_zero(i)
    found = hit.any(axis=1)
    k = hit.argmax(axis=1)
    hi = _FINE[k]
    lo = np.where(k > 0, _FINE[np.maximum(k - 1, 0)], 0.0)
    for _ in range(60):  # vectorised bisection over every row at once
        mid = 0.5 * (lo + hi)
        up = rl_current(theta=a + mid, alpha=a, phi=phi, vm=v, z=z) >= it
        hi = np.where(up, mid, hi)
        lo = np.where(up, lo, mid)
    out = np.where(found, 0.5 * (lo + hi) / w, np.inf)
    return out.reshape(shape)


def time_to_current_rle(*, alpha: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                        vm: np.ndarray, omega: np.ndarray, e: np.ndarray,
                        i_target: np.ndarray) -> np.ndarray:
    """Time from the gate pulse at α until an R–L–E load current first reaches i_target [s].

    The SCR is forward-biased only while the line exceeds the back EMF E (from θ1 =
    asin(E/Vm)): the current starts from zero at a = max(α, θ1), so a pulse that comes
    before θ1 must last until then, and rises as (Vm/Z)·[sin(θ − φ) − k + C·e^(−(θ − a)/tan φ)],
    k = E/(Vm·cos φ), C = k − sin(a − φ) (:func:`checks.rle.segment_current`); t = (θ − α)/ω
    at its first crossing of i_target; ∞ when it returns to zero first or never starts
    (a ≥ π − θ1). Grid and bisection as :func:`time_to_current_rl`. r [Ω] > 0; l [H] ≥ 0;
    vm [V]; omega [rad/s]; alpha [rad]; e [V] ≥ 0; i_target [A].

    >>> t = time_to_current_rle(alpha=0.0, r=10.0, l=0.0, vm=100.0, omega=2 * np.pi * 50,
    ...                         e=50.0, i_target=1.0)  # R load: sin θ = 0.6 at 36.87°
    >>> round(float(t) * 1e3, 4), round(float(np.degrees(np.arcsin(0.6))) / 18, 4)
    (2.0483, 2.0483)
    """
    from checks.rle import segment_current

    arrays = np.broadcast_arrays(_f(alpha), _f(r), _f(l), _f(vm), _f(omega), _f(e),
                                 _f(i_target))
    shape = arrays[0].shape
    al, rr, ll, v, w, ee, it = (x.ravel() for x in arrays)
    phi = load_angle(r=rr, l=ll, omega=w)
    z = np.hypot(rr, w * ll)
    m = np.clip(ee / v, 0.0, None)
    th1 = np.arcsin(np.clip(m, 0.0, 1.0))
    a0 = np.maximum(al, th1)
    starts = (m < 1.0) & (a0 < np.pi - th1)
    k = m / np.cos(phi)
    c = k - np.sin(a0 - phi)
    target = it * z / v

    def cur(x: np.ndarray, j: slice | None = None) -> np.ndarray:
        if j is None:
            return segment_current(theta=a0 + x, a=a0, c=c, phi=phi, k=k)
        return segment_current(theta=a0[:, None] + x, a=a0[:, None], c=c[:, None],
                               phi=phi[:, None], k=k[:, None])

    i = cur(_FINE[None, :], slice(None))
    hit = (i >= target[:, None]) & ~_after_zero(i)
    found = hit.any(axis=1) & starts
    idx = hit.argmax(axis=1)
    hi = _FINE[idx]
    lo = np.where(idx > 0, _FINE[np.maximum(idx - 1, 0)], 0.0)
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        up = cur(mid) >= target
        hi = np.where(up, mid, hi)
        lo = np.where(up, lo, mid)
    out = np.where(found, (a0 - al + 0.5 * (lo + hi)) / w, np.inf)
    return out.reshape(shape)


def _rl_slope(d: np.ndarray, alpha: np.ndarray, phi: np.ndarray) -> np.ndarray:
    """(Z/Vm)·di/dθ of :func:`checks.rl.rl_current` at θ = α + d:
    cos(θ − φ) + [sin(α − φ)/tan φ]·e^(−d/tan φ), the exponential taken in log form so that a
    nearly resistive load (tan φ → 0) neither overflows nor divides by zero."""
    tan_phi = np.maximum(np.tan(phi), 1e-300)
    amp = np.sin(alpha - phi)
    with np.errstate(divide="ignore", over="ignore", under="ignore", invalid="ignore"):
        term = np.sign(amp) * np.exp(np.log(np.abs(amp)) - np.log(tan_phi) - d / tan_phi)
    return np.cos(alpha + d - phi) + np.where(amp == 0.0, 0.0, term)


def latch_limit_rl(*, r: np.ndarray, l: np.ndarray, vm: np.ndarray,  # noqa: E741
                   omega: np.ndarray, i_target: np.ndarray) -> np.ndarray:
    """The latest firing angle at which an R–L load current still reaches i_target [rad].

    The current's first peak falls as α rises (∂i/∂α = −(Vm/Z)·e^(−(θ−α)/tan φ)·sin α/sin φ
    < 0 for 0 < α < π, at every θ), so the limit is the root of peak(α) = i_target, found by
    40 steps of vectorised bisection on α ∈ [0, π]. The peak is at the first zero of di/dθ
    after α (di/dθ = (Vm/Z)·sin α/sin φ > 0 at α), bracketed on the grid of
    :func:`time_to_current_rl` and refined by 50 bisection steps. NaN when even α = 0 does not
    reach it. For L → 0 it tends to π − asin(i_target·R/Vm). Rows sharing (R, L, Vm, ω,
    i_target) are computed once.

    >>> lim = latch_limit_rl(r=2e3, l=1e-6, vm=230 * 2**0.5, omega=2 * np.pi * 50,
    ...                      i_target=40e-3)
    >>> round(float(np.degrees(lim)), 2)
    165.76
    """
    arrays = np.broadcast_arrays(_f(r), _f(l), _f(vm), _f(omega), _f(i_target))
    shape = arrays[0].shape
    keys = np.stack([x.ravel() for x in arrays], axis=1)
    uniq, inv = np.unique(keys, axis=0, return_inverse=True)
    rr, ll, v, w, it = uniq.T
    phi = load_angle(r=rr, l=ll, omega=w)
    z = np.hypot(rr, w * ll)

    def peak(a: np.ndarray) -> np.ndarray:
        falling = _rl_slope(_FINE[None, :], a[:, None], phi[:, None]) <= 0.0
        k = np.where(falling.any(axis=1), falling.argmax(axis=1), _FINE.size - 1)
        hi = _FINE[k]
        lo = np.where(k > 0, _FINE[np.maximum(k - 1, 0)], 0.0)
        for _ in range(50):  # vectorised bisection on the slope's sign
            mid = 0.5 * (lo + hi)
            down = _rl_slope(mid, a, phi) <= 0.0
            hi = np.where(down, mid, hi)
            lo = np.where(down, lo, mid)
        return rl_current(theta=a + 0.5 * (lo + hi), alpha=a, phi=phi, vm=v, z=z)

    lo = np.zeros(rr.size)
    hi = np.full(rr.size, np.pi)
    ok0 = peak(np.full(rr.size, 1e-9)) >= it
    for _ in range(40):  # vectorised bisection over every distinct row at once
        mid = 0.5 * (lo + hi)
        up = peak(mid) >= it
        lo = np.where(up, mid, lo)
        hi = np.where(up, hi, mid)
    out = np.where(ok0, 0.5 * (lo + hi), np.nan)
    return out[inv.ravel()].reshape(shape)


def required_width_dc(*, il: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                      v: np.ndarray, tgt: np.ndarray) -> np.ndarray:
    """DC switch: t_req = −(L/R)·ln(1 − R·IL/V) + tgt [s]; for R → 0, L·IL/V  [2, ch. 4]; [3].

    ∞ when V/R ≤ IL (the current never reaches IL). il [A]; r [Ω]; l [H]; v [V] the bus at its
    low end; tgt [s].

    >>> [round(float(required_width_dc(il=0.1, r=r, l=l, v=200.0, tgt=0.0)) * 1e6, 2)
    ...  for r, l in ((0.0, 0.2), (20.0, 0.2), (20.0, 2.0))]
    [100.0, 100.5, 1005.03]
    """
    il, r, l, v = _f(il), _f(r), _f(l), _f(v)  # noqa: E741
    x = r * il / v
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(r > 0, -(l / np.where(r > 0, r, 1.0)) * np.log1p(-np.minimum(x, 1.0)),
                     l * il / v)
    return np.where(x < 1.0, t, np.inf) + tgt


# --- textbook design relations with a known linear gate characteristic ------------------------

def gate_point_at_power(*, p: np.ndarray, v0: np.ndarray,
                        r_g: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Operating point (i_G, v_GK) where a linear gate v = V0 + r_g·i dissipates p [A, V]:
    the positive root of r_g·i² + V0·i − p = 0  [2, ch. 4]; [3].

    >>> i, v = gate_point_at_power(p=5.0, v0=1.0, r_g=10.0)
    >>> round(float(i), 5), round(float(v), 4)
    (0.65887, 7.5887)
    """
    p, v0, r_g = _f(p), _f(v0), _f(r_g)
    with np.errstate(divide="ignore", invalid="ignore"):
        i = np.where(r_g > 0, (-v0 + np.sqrt(v0**2 + 4 * r_g * p)) / (2 * np.where(r_g > 0, r_g,
                                                                                   1.0)), p / v0)
    return i, v0 + r_g * i


def load_line_power_points(*, e: np.ndarray, r_src: np.ndarray,
                           p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Currents where the load line v = E − R_src·i meets the gate power hyperbola v·i = p:
    the roots of R_src·i² − E·i + p = 0, (high, low) [A]; NaN when p > E²/(4R_src)  [2, ch. 4].

    >>> hi, lo = load_line_power_points(e=15.0, r_src=120.0, p=0.4)
    >>> round(float(hi) * 1e3, 3), round(float(lo) * 1e3, 3)
    (86.436, 38.564)
    """
    e, r_src, p = _f(e), _f(r_src), _f(p)
    disc = e**2 - 4 * r_src * p
    with np.errstate(invalid="ignore"):
        s = np.sqrt(np.where(disc >= 0, disc, np.nan))
    return (e + s) / (2 * r_src), (e - s) / (2 * r_src)


def max_pulse_rate(*, pg_av: np.ndarray, peak_power: np.ndarray,
                   width: np.ndarray) -> np.ndarray:
    """The highest pulse rate for a given PG(AV): f = PG(AV)/(P_peak·t_p) [Hz]  [2, ch. 4].

    >>> float(max_pulse_rate(pg_av=0.3, peak_power=5.0, width=20e-6))
    3000.0
    """
    return _f(pg_av) / (_f(peak_power) * _f(width))


# --- shared binding of the oscillator as a pulse source ---------------------------------------

def _source(device: str, p: Mapping[str, np.ndarray]) -> tuple[np.ndarray, ...]:
    """(VP, V_D, r_on, R1) of the oscillator; a PUT maps V_D → V_F, r_on → 0, R1 → R_K."""
    if device == "ujt":
        vp = peak_voltage(device="ujt", v1=p["v1"], eta=p["eta"], rbb=p["rbb"], r1=p["r1"],
                          r2=p["r2"], vd=p["vd"])
        return vp, _f(p["vd"]), _f(p.get("r_on", 0.0)), _f(p["r1"])
    vp = peak_voltage(device="put", v1=p["v1"], r_upper=p["r_upper"], r_lower=p["r_lower"],
                      offset=p["offset"])
    return vp, _f(p["vf"]), np.asarray(0.0), _f(p["r_k"])


def _peak_params(device: str, p: Mapping[str, np.ndarray]) -> dict[str, np.ndarray]:
    """The peak-point keywords of :func:`checks.oscillator.peak_voltage` (v1 excluded)."""
    keys = ("eta", "rbb", "r1", "r2", "vd") if device == "ujt" else ("r_upper", "r_lower",
                                                                       "offset")
    return {k: p[k] for k in keys}


def _cold(v: np.ndarray, t_min: np.ndarray, v_cold: np.ndarray, at: np.ndarray,
          k: float) -> np.ndarray:
    return cold_value(v, t_min, v_cold=v_cold, t_cold=at, k=k)


# --- the checks --------------------------------------------------------------------------------

def trigger_check(*, device: str, series_r: np.ndarray, igt: np.ndarray,
                  igt_cold: np.ndarray, igt_cold_at: np.ndarray, vgt: np.ndarray,
                  vgt_cold: np.ndarray, vgt_cold_at: np.ndarray, t_min: np.ndarray,
                  limits: Limits, r_gk: np.ndarray | None = None,
                  n: np.ndarray | None = None, n_gates: int = 1,
                  **p: np.ndarray) -> Outcome:
    """``gate.trigger``: metric i_G/IGT_c, fail below 1, marginal below 2 (``limits``).

    i_G = (E_G − VGT_c)/R_src/N − VGT_c/R_GK (:func:`gate_current`); the load line passes the
    trigger corner (E_G − R_src·N·IGT_eff,c ≥ VGT_c) exactly when i_G ≥ IGT_c. Values:
    gate_current, required_current (IGT_c), gate_voltage (E_th), and for the summary
    igt_eff (IGT_c + VGT_c/R_GK), series_r_max (the R_S that would give k·IGT_c at that row,
    k = ``marginal_below``) and e_g_needed (the E_G that would, with R_S as it is).
    Oscillator inputs ``p`` as in :func:`checks.oscillator.peak_voltage`, plus r_on (UJT),
    vf and r_k (PUT). Temperatures [K].

    >>> out = trigger_check(device="ujt", v1=30.0, eta=0.51, rbb=7e3, r1=100.0, r2=654.0,
    ...     vd=0.5, r_on=10.0, series_r=47.0, r_gk=1e3, igt=10e-3, igt_cold=np.nan,
    ...     igt_cold_at=np.nan, vgt=1.0, vgt_cold=np.nan, vgt_cold_at=np.nan, t_min=263.15,
    ...     limits={"fail_below": 1.0, "marginal_below": 2.0})
    >>> int(out.status), round(float(out.values["gate_current"]) * 1e3, 1)
    (0, 206.2)
    """
    vp, vd, r_on, r1 = _source(device, p)
    igt_c = _cold(igt, t_min, igt_cold, igt_cold_at, K_IGT)
    vgt_c = _cold(vgt, t_min, vgt_cold, vgt_cold_at, K_VGT)
    nn = _turns(n)
    e_g, r_src, e_th, _ = thevenin(vp=vp, vd=vd, r_on=r_on, r1=r1, series_r=series_r, n=nn,
                                   r_gk=r_gk)
    i_g = gate_current(e_g=e_g, r_src=r_src, vgt=vgt_c, r_gk=r_gk, n_gates=n_gates)
    margin, status = grade(i_g / igt_c, limits)
    k = float(limits.get("marginal_below", 2.0))
    igt_eff = igt_c + vgt_c * _g_gk(r_gk)
    i_need = n_gates * (k * igt_c + vgt_c * _g_gk(r_gk))
    r_int = r_src - series_r
    return Outcome({"gate_current": i_g, "required_current": igt_c, "gate_voltage": e_th,
                    "igt_eff": igt_eff, "vgt_cold": vgt_c, "e_g": e_g,
                    "series_r_max": (e_g - vgt_c) / i_need - r_int,
                    "e_g_needed": vgt_c + i_need * r_src}, margin, status)


def peak_power_check(*, device: str, series_r: np.ndarray, pgm: np.ndarray, limits: Limits,
                     r_gk: np.ndarray | None = None, n: np.ndarray | None = None,
                     **p: np.ndarray) -> Outcome:
    """``gate.peak-power``: metric PGM/peak_power with peak_power = E_th²/(4·R_th)
    (:func:`peak_power_bound`). Values: peak_power, and series_r_min, the smallest R_S that
    keeps the bound within PGM/k (k = ``marginal_below``), from
    R_th-free form E_G²·G/(4·R_src·(R_src + G)) = P (G = R_GK; without it E_G²/(4·R_src)).

    >>> out = peak_power_check(device="ujt", v1=30.0, eta=0.51, rbb=7e3, r1=100.0, r2=654.0,
    ...     vd=0.5, r_on=10.0, series_r=47.0, r_gk=1e3, pgm=0.5,
    ...     limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> int(out.status), round(float(out.values["peak_power"]), 3), round(float(
    ...     out.values["series_r_min"]), 1)
    (2, 0.703, 68.2)
    """
    vp, vd, r_on, r1 = _source(device, p)
    e_g, r_src, e_th, r_th = thevenin(vp=vp, vd=vd, r_on=r_on, r1=r1, series_r=series_r,
                                      n=_turns(n), r_gk=r_gk)
    pk = peak_power_bound(e_th=e_th, r_th=r_th)
    margin, status = grade(pgm / pk, limits)
    allowed = _f(pgm) / float(limits.get("marginal_below", 1.0))
    if r_gk is None:
        r_need = e_g**2 / (4 * allowed)
    else:
        g = _f(r_gk)
        r_need = 0.5 * (-g + np.sqrt(g**2 + e_g**2 * g / allowed))
    return Outcome({"peak_power": pk, "pgm": _f(pgm) + 0 * pk,
                    "series_r_min": r_need - (r_src - series_r)}, margin, status)


def average_power_check(*, device: str, series_r: np.ndarray, c: np.ndarray, rt: np.ndarray,
                        vv: np.ndarray, pg_av: np.ndarray, limits: Limits,
                        r_gk: np.ndarray | None = None, n: np.ndarray | None = None,
                        **p: np.ndarray) -> Outcome:
    """``gate.average-power``: metric PG(AV)/average_power, average_power = peak_power·δ,
    δ = τ_g·f_p (τ_g the equivalent rectangular width of the exponential pulse, f_p the
    free-running rate, :func:`checks.oscillator.free_running` with the discharge through
    r_on + R1 (PUT R_K); with line sync v1 is V_Z, the rate inside the clamp
    window)  [2, ch. 4]; [3]. Values: average_power, duty, peak_power, pulse_rate, tau,
    rate_max (the rate at which the average would meet PG(AV)/k).

    >>> out = average_power_check(device="ujt", v1=30.0, eta=0.51, rbb=7e3, r1=100.0,
    ...     r2=654.0, vd=0.5, r_on=10.0, series_r=47.0, r_gk=1e3, c=0.5e-6, rt=46.728e3,
    ...     vv=3.5, pg_av=0.1, limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> int(out.status), round(float(out.values["pulse_rate"]), 2)
    (0, 77.45)
    """
    vp, vd, r_on, r1 = _source(device, p)
    nn = _turns(n)
    _, _, e_th, r_th = thevenin(vp=vp, vd=vd, r_on=r_on, r1=r1, series_r=series_r, n=nn,
                                r_gk=r_gk)
    pk = peak_power_bound(e_th=e_th, r_th=r_th)
    rs_p = nn**2 * _f(series_r)
    tau = _f(c) * (r_on + r1 * rs_p / (r1 + rs_p))
    rate = free_running(device=device, v1=p["v1"], rt=rt, ct=c, vv=vv, r_discharge=r_on + r1,
                        **_peak_params(device, p))["frequency"]
    duty = tau * rate
    avg = pk * duty
    margin, status = grade(pg_av / avg, limits)
    k = float(limits.get("marginal_below", 1.0))
    return Outcome({"average_power": avg, "duty": duty, "peak_power": pk, "pulse_rate": rate,
                    "tau": tau, "rate_max": max_pulse_rate(pg_av=_f(pg_av) / k,
                                                           peak_power=pk, width=tau)},
                   margin, status)


def latch_time_check(*, device: str, load: str, series_r: np.ndarray, c: np.ndarray,
                     vv: np.ndarray, igt: np.ndarray, igt_cold: np.ndarray,
                     igt_cold_at: np.ndarray, vgt: np.ndarray, vgt_cold: np.ndarray,
                     vgt_cold_at: np.ndarray, il: np.ndarray, il_cold: np.ndarray,
                     il_cold_at: np.ndarray, t_min: np.ndarray, tgt: np.ndarray,
                     v_s: np.ndarray, r_load: np.ndarray, limits: Limits,
                     l_load: np.ndarray | float = 0.0, f: np.ndarray | None = None,
                     alpha: np.ndarray | None = None, rt: np.ndarray | None = None,
                     iv: np.ndarray | None = None, r_gk: np.ndarray | None = None,
                     n: np.ndarray | None = None, n_gates: int = 1,
                     e: np.ndarray | None = None, **p: np.ndarray) -> Outcome:
    """``gate.latch-time``: metric t_w/t_req over the firing range.

    t_w from :func:`pulse_width` (IGT_c, VGT_c); t_req at each row's α with IL_c and the line
    at that row (the low-line corner is the worst): ``load = "ac"`` — the sine for L = 0
    (:func:`required_width_resistive`), the exact R–L current otherwise
    (:func:`time_to_current_rl`, latch limit :func:`latch_limit_rl`); ``load = "dc"`` —
    :func:`required_width_dc` (latch limit NaN). v_s [V] RMS line (ac) or bus (dc); f [Hz];
    alpha [rad] the firing angle, or, when None, the line-synchronised oscillator's own
    (:func:`checks.oscillator.line_sync_firing_angle` with V_Z = v1, the timing resistor rt
    [Ω] and C_T = c, on the same line); r_load [Ω]; l_load [H]. Values: pulse_width, required_width,
    latch_limit_angle, firing_angle, c_needed (the C_T at which t_w would equal t_req, t_w
    being proportional to C_T). A back EMF ``e`` [V] (battery, motor; ac only): the current
    from max(α, θ1) against E (:func:`time_to_current_rle`), latch limit
    :func:`checks.rle.max_firing_angle`.

    >>> out = latch_time_check(device="ujt", load="ac", v1=20.0, eta=0.6, rbb=7e3, r1=100.0,
    ...     r2=600.0, vd=0.5, r_on=10.0, series_r=47.0, r_gk=1e3, c=0.5e-6, vv=3.5,
    ...     igt=10e-3, igt_cold=np.nan, igt_cold_at=np.nan, vgt=1.0, vgt_cold=np.nan,
    ...     vgt_cold_at=np.nan, il=40e-3, il_cold=np.nan, il_cold_at=np.nan, t_min=263.15,
    ...     tgt=2e-6, v_s=207.0, f=50.0, r_load=100.0, alpha=np.radians([0.0, 30.0]),
    ...     limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> out.status.tolist()
    [2, 0]
    """
    vp, vd, r_on, r1 = _source(device, p)
    igt_c = _cold(igt, t_min, igt_cold, igt_cold_at, K_IGT)
    vgt_c = _cold(vgt, t_min, vgt_cold, vgt_cold_at, K_VGT)
    il_c = _cold(il, t_min, il_cold, il_cold_at, K_IL)
    pulse = discharge_pulse(vp=vp, vd=vd, r_on=r_on, r1=r1, series_r=series_r, c=c, vgt=vgt_c,
                            vv=vv, iv=iv, n=_turns(n))
    t_w = pulse_width(pulse=pulse, igt=igt_c, vgt=vgt_c, r_gk=r_gk, n_gates=n_gates)
    l_load = _f(l_load)
    if load == "dc":
        t_req = required_width_dc(il=il_c, r=r_load, l=l_load, v=v_s, tgt=tgt)
        limit = np.full(np.broadcast(t_req).shape, np.nan)
        a = limit
    else:
        assert f is not None
        vm = np.sqrt(2.0) * _f(v_s)
        omega = 2 * np.pi * _f(f)
        if alpha is None:
            assert rt is not None
            a = line_sync_firing_angle(device=device, vm=vm, omega=omega, vz=p["v1"], rt=rt,
                                       ct=c, **_peak_params(device, p))
        else:
            a = _f(alpha)
        t_r, lim_r = required_width_resistive(alpha=a, il=il_c, r=r_load, vm=vm, omega=omega,
                                              tgt=tgt)
        inductive = bool(np.any(l_load > 0))
        if e is not None:
            from checks.rle import max_firing_angle

            t_req = time_to_current_rle(alpha=a, r=r_load, l=l_load, vm=vm, omega=omega, e=e,
                                        i_target=il_c) + tgt
            limit = max_firing_angle(vs=_f(v_s), r=r_load, l=l_load, omega=omega, e=e,
                                     il=il_c)
        elif inductive:
            safe_l = np.where(l_load > 0, l_load, 1e-12)
            t_l = time_to_current_rl(alpha=a, r=r_load, l=safe_l, vm=vm, omega=omega,
                                     i_target=il_c) + tgt
            lim_l = latch_limit_rl(r=r_load, l=safe_l, vm=vm, omega=omega, i_target=il_c)
            t_req = np.where(l_load > 0, t_l, t_r)
            limit = np.where(l_load > 0, lim_l, lim_r)
        else:
            t_req, limit = t_r, lim_r
    with np.errstate(divide="ignore", invalid="ignore"):
        # no firing in the half-cycle (NaN angle) leaves nothing to latch: that row fails
        ratio = np.where(np.isinf(t_req) | np.isnan(t_req), 0.0, t_w / t_req)
        c_need = np.where(t_w > 0, _f(c) * t_req / t_w, np.inf)
    margin, status = grade(ratio, limits)
    return Outcome({"pulse_width": t_w, "required_width": t_req, "latch_limit_angle": limit,
                    "firing_angle": a + 0 * t_w, "il_cold": il_c + 0 * t_w,
                    "c_needed": c_need}, margin, status)


def _idle(device: str, series_r: np.ndarray, r_gk: np.ndarray | float,
          p: Mapping[str, np.ndarray]) -> np.ndarray:
    """Idle gate voltage of a DC-coupled oscillator (:func:`checks.oscillator.idle_gate_check`,
    which also grades it for ``osc.idle-gate``); r_gk = inf when none is fitted."""
    if device == "ujt":
        keys = {"v1": p["v1"], "rbb": p["rbb"], "r1": p["r1"], "r2": p["r2"]}
    else:
        keys = {"ip": p["ip"], "cathode_r": p["r_k"]}
    out = idle_gate_check(device=device, vgd=1.0, series_r=series_r, gate_cathode_r=r_gk,
                          limits={}, **keys)
    return out.values["idle_voltage"]


def noise_check(*, device: str, coupling: str, series_r: np.ndarray, vgd: np.ndarray,
                limits: Limits, r_gk: np.ndarray | None = None,
                c_cc: np.ndarray | None = None, dvdt: np.ndarray | None = None,
                igt: np.ndarray | float = np.nan, **p: np.ndarray) -> Outcome:
    """``gate.noise``: metric VGD/noise_voltage; noise_voltage = max(idle voltage of a
    DC-coupled oscillator (:func:`_idle`: UJT V_idle = R1·V1/(R1 + RBB + R2) times
    R_GK/(R1∥(RBB + R2) + R_S + R_GK), PUT IP·R_K likewise), C_cc·dv/dt·R_GK through a pulse
    transformer). A coupled current with no R_GK has no defined voltage limit: NaN, which
    fails. Values: noise_voltage, vgd, idle_voltage, coupled_current, r_gk_max (the R_GK that
    would bring the larger term to VGD/k, k = ``marginal_below``), igt (as given, for the
    sensitive-gate remark: a coupled current above IGT can fire it whatever the voltage).

    >>> out = noise_check(device="ujt", coupling="transformer", series_r=10.0, vgd=0.2,
    ...                   r_gk=1e3, c_cc=20e-12, dvdt=200e6, v1=20.0,
    ...                   limits={"fail_below": 1.0, "marginal_below": 1.25})
    >>> round(float(out.values["noise_voltage"]), 3), int(out.status)
    (4.0, 2)
    """
    vgd = _f(vgd)
    k = float(limits.get("marginal_below", 1.0))
    target = vgd / k
    zero = 0.0 * vgd
    if coupling == "direct":
        idle = _idle(device, series_r, np.inf if r_gk is None else r_gk, p) + zero
        # The idle source is V_open behind a series resistance R_ser (R_S included): probing
        # with a 1 Ω gate resistor gives R_ser = V_open/v(1 Ω) − 1 in ohms.
        v_open = _idle(device, series_r, np.inf, p)
        r_ser = v_open / _idle(device, series_r, 1.0, p) - 1.0
        with np.errstate(divide="ignore", invalid="ignore"):
            r_gk_max = np.where(v_open > target, target * r_ser / (v_open - target), np.inf)
        i_cm = zero
        noise = idle
    else:
        idle = zero
        i_cm = zero if c_cc is None or dvdt is None else _f(c_cc) * dvdt + zero
        noise = np.where(i_cm > 0, np.nan, 0.0) if r_gk is None else i_cm * r_gk
        with np.errstate(divide="ignore"):
            r_gk_max = np.where(i_cm > 0, target / np.where(i_cm > 0, i_cm, 1.0), np.inf)
    with np.errstate(divide="ignore", invalid="ignore"):
        metric = np.where(noise > 0, vgd / np.where(noise > 0, noise, 1.0), np.inf)
    metric = np.where(np.isnan(noise), np.nan, metric)
    margin, status = grade(metric, limits)
    return Outcome({"noise_voltage": noise, "vgd": vgd + zero, "idle_voltage": idle,
                    "coupled_current": i_cm, "r_gk_max": r_gk_max + zero,
                    "igt": _f(igt) + zero}, margin, status)


def reverse_check(*, device: str, coupling: str, vrgm: np.ndarray, limits: Limits,
                  series_r: np.ndarray | float = 0.0, n: np.ndarray | None = None,
                  **p: np.ndarray) -> Outcome:
    """``gate.reverse``: metric VRGM/reverse_voltage. Direct coupling models no reverse
    source (0 V; lead ringing not modelled); through a transformer with no clamp declared,
    the backswing is taken equal to the forward secondary amplitude E_G (conservative).
    Values: reverse_voltage, vrgm, n_min (the turns ratio at which E_G = VRGM/k).

    >>> out = reverse_check(device="ujt", coupling="transformer", series_r=10.0, vrgm=5.0,
    ...     n=2.0, v1=30.0, eta=0.51, rbb=7e3, r1=100.0, r2=654.0, vd=0.5, r_on=10.0,
    ...     limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> round(float(out.values["reverse_voltage"]), 3), int(out.status)
    (6.454, 2)
    """
    vrgm = _f(vrgm)
    if coupling == "direct":
        rev = 0.0 * vrgm
        n_min = np.full(rev.shape, np.nan)
    else:
        vp, vd, r_on, r1 = _source(device, p)
        nn = _turns(n)
        e_g, _, _, _ = thevenin(vp=vp, vd=vd, r_on=r_on, r1=r1, series_r=series_r, n=nn)
        rev = e_g
        n_min = e_g * nn * float(limits.get("marginal_below", 1.0)) / vrgm
    with np.errstate(divide="ignore"):
        metric = np.where(rev > 0, vrgm / np.where(rev > 0, rev, 1.0), np.inf)
    margin, status = grade(metric, limits)
    return Outcome({"reverse_voltage": rev, "vrgm": vrgm + 0 * rev, "n_min": n_min},
                   margin, status)


def transformer_check(*, device: str, series_r: np.ndarray, c: np.ndarray, vv: np.ndarray,
                      vgt: np.ndarray, vgt_cold: np.ndarray, vgt_cold_at: np.ndarray,
                      t_min: np.ndarray, limits: Limits, n: np.ndarray | None = None,
                      iv: np.ndarray | None = None, vs_rating: np.ndarray | None = None,
                      isolation: np.ndarray | None = None,
                      required_isolation: np.ndarray | None = None,
                      **p: np.ndarray) -> Outcome:
    """``gate.transformer``: metric min(rating/volt_seconds, isolation/required_isolation)
    over whichever of the two the project gives. volt_seconds from
    :func:`primary_volt_seconds` (gate clamped at VGT_c). Values: volt_seconds, isolation,
    required_isolation, vs_shortcut (E_pk·t_end, for the summary), vs_ratio, iso_ratio.

    >>> out = transformer_check(device="ujt", v1=30.0, eta=0.51, rbb=7e3, r1=100.0, r2=654.0,
    ...     vd=0.5, r_on=10.0, series_r=10.0, n=2.0, c=0.5e-6, vv=3.5, vgt=1.0,
    ...     vgt_cold=np.nan, vgt_cold_at=np.nan, t_min=263.15, vs_rating=300e-6,
    ...     isolation=4e3, required_isolation=3e3,
    ...     limits={"fail_below": 1.0, "marginal_below": 1.0})
    >>> int(out.status), round(float(out.values["volt_seconds"]) * 1e6, 1)
    (0, 242.0)
    """
    vp, vd, r_on, r1 = _source(device, p)
    vgt_c = _cold(vgt, t_min, vgt_cold, vgt_cold_at, K_VGT)
    pulse = discharge_pulse(vp=vp, vd=vd, r_on=r_on, r1=r1, series_r=series_r, c=c, vgt=vgt_c,
                            vv=vv, iv=iv, n=_turns(n))
    vs = primary_volt_seconds(pulse=pulse)
    e_pk = pulse.r_p * (pulse.i_c0 + pulse.vgt_p / pulse.rs_p)
    nan = np.full(np.broadcast(vs).shape, np.nan)
    with np.errstate(divide="ignore", invalid="ignore"):
        vs_ratio = nan if vs_rating is None else _f(vs_rating) / vs
        iso_ratio = (nan if isolation is None or required_isolation is None
                     else _f(isolation) / required_isolation + 0 * vs)
    metric = np.fmin(vs_ratio, iso_ratio)
    margin, status = grade(metric, limits)
    return Outcome({"volt_seconds": vs,
                    "isolation": nan if isolation is None else _f(isolation) + 0 * vs,
                    "required_isolation": (nan if required_isolation is None
                                           else _f(required_isolation) + 0 * vs),
                    "vs_shortcut": e_pk * pulse.t_end, "vs_ratio": vs_ratio,
                    "iso_ratio": iso_ratio}, margin, status)


__all__ = ["PASS", "Pulse", "average_power_check", "discharge_pulse", "gate_current",
           "gate_point_at_power", "latch_limit_rl", "latch_time_check",
           "load_line_power_points", "max_pulse_rate", "noise_check", "peak_power_bound",
           "peak_power_check", "primary_volt_seconds", "pulse_width",
           "required_width_dc", "required_width_resistive", "reverse_check", "thevenin",
           "time_to_current_rl", "transformer_check", "trigger_check"]
