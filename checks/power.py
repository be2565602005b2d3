"""Power stages: phase control on an AC line and the DC switch; the ``power.*`` checks.

Waveforms are computed exactly for resistive and R–L loads (no ripple-free assumption): the
SCR current from zero at the firing angle α (:func:`checks.rl.rl_current`) up to the extinction
angle β (:func:`checks.rl.extinction_angle`); the steady periodic current where conduction is
continuous (bridge with α < φ) or a freewheeling diode carries the load current. Averages and
RMS values use closed-form integrals of the sine and the exponential (no quadrature), so a load
with a very short time constant is integrated as exactly as a slow one.

All arguments are SI magnitudes (V, Ω, H, A, s, K, rad) broadcasting over numpy arrays, one row
per corner. Angles are measured from the zero crossing of the device's forward voltage.

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §10
    (controlled rectifiers, Examples 10.1, 10.2), §11 (AC voltage controllers, Examples 11.1,
    11.2, 11.8), §17 (protection: fuses, Example 17.6; cooling).
[2] D. W. Hart, *Power Electronics*, §3 (half-wave rectifiers with R–L loads, freewheeling).
[3] P. S. Bimbhra, *Power Electronics*, ch. 4 (thyristor ratings: surge current, I²t, form
    factor and average-current derating).
[4] V. Singhal & B. R. Gupta, *Introduction to Electric Drives*, ch. 1 (holding current).
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from checks.core import FAIL, MARGINAL, PASS, Outcome, grade
from checks.memo import memoised
from checks.rl import extinction_angle, rl_current

TOPOLOGIES = ("half-wave", "bridge", "ac-switch")
_TINY = 1e-12


def _a(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


def _decay(x: np.ndarray, tau: np.ndarray) -> np.ndarray:
    """exp(−x/τ) for x ≥ 0; 0 for τ = 0 (no inductance: a resistive current jumps)."""
    x, tau = _a(x), _a(tau)
    safe = np.where(tau > _TINY, tau, 1.0)
    with np.errstate(over="ignore", under="ignore"):
        return np.where(tau > _TINY, np.exp(-np.maximum(x, 0.0) / safe), 0.0)


def _one_minus_decay(x: np.ndarray, tau: np.ndarray) -> np.ndarray:
    """1 − exp(−x/τ) without cancellation when τ ≫ x (nearly pure inductance)."""
    x, tau = _a(x), _a(tau)
    safe = np.where(tau > _TINY, tau, 1.0)
    with np.errstate(over="ignore", under="ignore"):
        return np.where(tau > _TINY, -np.expm1(-np.maximum(x, 0.0) / safe),
                        1.0 + 0.0 * x)


def segment_integrals(*, a: np.ndarray, b: np.ndarray, phi: np.ndarray,
                      c: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """∫ i dθ and ∫ i² dθ over (a, b) of i(θ) = sin(θ − φ) + C·exp(−(θ − a)/tan φ) [per unit].

    Closed forms, with τ = tan φ, L = b − a, u = a − φ:
    ∫ sin = cos u − cos(u + L); ∫ e = τ·(1 − e^(−L/τ)); ∫ sin² = L/2 − [sin 2(u + L) − sin 2u]/4;
    ∫ e² = (τ/2)·(1 − e^(−2L/τ)); ∫ sin·e = τ·[sin u + τ cos u − e^(−L/τ)(sin(u + L) +
    τ cos(u + L))]/(1 + τ²). a, b, phi [rad]; c [per unit of Vm/Z]. Valid for 0 ≤ φ ≤ π/2.

    >>> s1, s2 = segment_integrals(a=0.0, b=np.pi, phi=0.0, c=0.0)
    >>> round(float(s1), 12), round(float(s2), 12)
    (2.0, 1.570796326795)
    """
    a, b, phi, c = _a(a), _a(b), _a(phi), _a(c)
    tau = np.tan(np.clip(phi, 0.0, np.pi / 2))
    length = np.maximum(b - a, 0.0)
    u = a - phi
    e_l = _decay(length, tau)
    int_s = np.cos(u) - np.cos(u + length)
    int_e = tau * _one_minus_decay(length, tau)
    int_s2 = 0.5 * length - 0.25 * (np.sin(2 * (u + length)) - np.sin(2 * u))
    int_e2 = 0.5 * tau * _one_minus_decay(2 * length, tau)
    with np.errstate(over="ignore", invalid="ignore"):
        big = tau > 1e8  # nearly pure inductance: the τ²/(1 + τ²) → 1 limit, no overflow
        t_safe = np.where(big, 1.0, tau)
        int_se = t_safe * (np.sin(u) + t_safe * np.cos(u)
                           - e_l * (np.sin(u + length) + t_safe * np.cos(u + length))) \
            / (1 + t_safe**2)
        int_se = np.where(big, np.cos(u) - e_l * np.cos(u + length), int_se)
    return int_s + c * int_e, int_s2 + 2 * c * int_se + c * c * int_e2


def _segment_peak(a: np.ndarray, b: np.ndarray, phi: np.ndarray, c: np.ndarray) -> np.ndarray:
    """Largest value of i(θ) = sin(θ − φ) + C·e^(−(θ − a)/tan φ) on [a, b] [per unit].

    Resistive rows (tan φ ≤ 1e-12, the exponential is 0) in closed form: 1 where the range
    holds θ = φ + π/2, else the larger end. R–L rows: a 33-point grid finds the bracket, then
    46 golden-section steps refine it (i has one interior maximum on a conduction interval).
    """
    a, b = np.broadcast_arrays(_a(a), _a(b))
    phi, c = np.broadcast_to(_a(phi), a.shape), np.broadcast_to(_a(c), a.shape)
    tau = np.tan(np.clip(phi, 0.0, np.pi / 2))
    length = np.maximum(b - a, 0.0)
    top = phi + 0.5 * np.pi
    out = np.where((a <= top) & (top <= a + length), 1.0,
                   np.maximum(np.sin(a - phi), np.sin(a + length - phi)))
    rl = tau > _TINY
    if not rl.any():
        return out
    out = np.array(out, dtype=float)
    out[rl] = _segment_peak_rl(a[rl], length[rl], phi[rl], c[rl], tau[rl])
    return out


def _segment_peak_rl(a: np.ndarray, length: np.ndarray, phi: np.ndarray, c: np.ndarray,
                     tau: np.ndarray) -> np.ndarray:
    """:func:`_segment_peak` for 1-D R–L rows (tan φ > 0): grid bracket, golden section."""
    return _segment_argmax_rl(a, length, phi, c, tau)[0]


#: The bracketing grid and the golden-section steps of an R–L segment's peak. The current has
#: one interior maximum at most on a conduction interval, a hump a good part of a radian wide,
#: so 32 intervals find its bracket; 46 steps then narrow the two intervals around the best
#: grid point to 2·L/32·0.618^46 ≈ 2e-11·L (the 256-interval grid with 40 steps: 3e-11·L).
_PEAK_GRID = 32
_GOLDEN = 46


@np.errstate(over="ignore", under="ignore")  # as _decay has it, once for the whole search
def _segment_argmax_rl(a: np.ndarray, length: np.ndarray, phi: np.ndarray, c: np.ndarray,
                       tau: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The largest value of an R–L segment and the angle where it is, (i_max, θ_max); every
    row has τ = tan φ > 1e-12."""
    frac = np.linspace(0.0, 1.0, _PEAK_GRID + 1)
    grid = a[..., None] + length[..., None] * frac
    b = a + length

    def f(th: np.ndarray, ex: int = 0) -> np.ndarray:
        aa = a[..., None] if ex else a
        pp = phi[..., None] if ex else phi
        cc = c[..., None] if ex else c
        tt = tau[..., None] if ex else tau
        # _decay(th − a, τ) written out: every row here has τ > 0, so it is exactly this
        # (bit for bit), without its checks, once per golden-section step
        return np.sin(th - pp) + cc * np.exp(-np.maximum(th - aa, 0.0) / tt)

    vals = f(grid, 1)
    k = vals.argmax(axis=-1)
    step = length / _PEAK_GRID
    lo = np.maximum(a + (k - 1) * step, a)
    hi = np.minimum(a + (k + 1) * step, b)
    best = np.take_along_axis(vals, k[..., None], axis=-1)[..., 0]
    gr = (np.sqrt(5) - 1) / 2
    x1, x2 = hi - gr * (hi - lo), lo + gr * (hi - lo)
    f1, f2 = f(x1), f(x2)
    for _ in range(_GOLDEN):  # vectorised golden section over every row at once
        left = f1 > f2
        hi = np.where(left, x2, hi)
        lo = np.where(left, lo, x1)
        # one new point per row: the kept inner point is reused (one f per step, not two)
        step_in = gr * (hi - lo)
        xn = np.where(left, hi - step_in, lo + step_in)
        fn = f(xn)
        x1, x2 = np.where(left, xn, x2), np.where(left, x1, xn)
        f1, f2 = np.where(left, fn, f2), np.where(left, f1, fn)
    fx = np.maximum(f1, f2)
    th_best = a + k * step
    th = np.where(fx >= best, np.where(f1 >= f2, x1, x2), th_best)
    return np.maximum(best, fx), th


def waveform_pu(*, topology: str, freewheel: bool, alpha: np.ndarray,
                phi: np.ndarray, peak: bool = True) -> dict[str, np.ndarray]:
    """Per-unit averages of a phase-controlled stage: currents in Vm/Z, voltages in Vm.

    Returns ``vdc``, ``vrms`` (load mean and RMS voltage), ``idc``, ``irms`` (load current),
    ``it_av``, ``it_rms``, ``it_peak`` (one SCR), ``beta`` (where that SCR's current ends),
    ``conduction`` (its conduction angle), ``alpha_eff`` (the angle conduction starts),
    ``continuous`` (1 where the load current never reaches zero), ``seg_a``, ``seg_b``,
    ``seg_c`` (the SCR segment i = sin(θ − φ) + C·e^(−(θ − a)/tan φ) on (a, b)).

    Topologies  [1, §10–11], [2, §3]:

    * ``half-wave``: SCR from α to β; V_dc = (Vm/2π)(cos α − cos β).
    * ``bridge``: one SCR per half-cycle; discontinuous (α ≥ φ) as half-wave with period π,
      V_dc = (Vm/π)(cos α − cos β); continuous (α < φ) the steady current with
      i(α) = (Vm/Z)·(−sin(α − φ))·(1 + k)/(1 − k), k = e^(−π/tan φ), V_dc = (2Vm/π)·cos α.
    * ``ac-switch``: each SCR from α to β ≤ α + π. For α < φ control is lost: the first SCR
      still conducts when the second one's pulse comes, and the worst case a gate drive
      allows is taken, narrow pulses: that pulse is missed, one SCR conducts from α to the
      half-wave β > α + π and the load carries DC (IT(RMS), IT(AV) of that SCR are higher
      than with wide pulses, which would give the steady sine from φ).
    * ``freewheel`` (half-wave, bridge): the SCR carries α..π, the diode the decay over the rest
      of the period; steady state i(α) = k2·(sin φ − sin(α − φ)·k1)/(1 − k1·k2) with
      k1 = e^(−(π − α)/tan φ), k2 = e^(−Δ/tan φ), Δ = π + α (half-wave) or α (bridge).

    alpha [rad] 0 ≤ α ≤ π; phi [rad] load angle (0 for a resistive load). ``peak=False``
    leaves out ``it_peak`` (the one value that needs a search on an R–L load).

    >>> w = waveform_pu(topology="half-wave", freewheel=False, alpha=np.pi / 2, phi=0.0)
    >>> round(float(w["vdc"]), 4), round(float(w["vrms"]), 4)
    (0.1592, 0.3536)
    """
    alpha, phi = np.broadcast_arrays(_a(alpha), np.clip(_a(phi), 0.0, np.pi / 2))
    tau = np.tan(phi)
    two_pi = 2 * np.pi
    if topology not in TOPOLOGIES:
        raise ValueError(f"unknown topology {topology!r}")
    zero = np.zeros_like(alpha)
    cont = zero.copy()
    if topology == "ac-switch" or not freewheel:
        a = alpha
        beta = extinction_angle(alpha=a, phi=phi)
        c = -np.sin(a - phi)
        period = two_pi if topology == "half-wave" else np.pi
        lost = (alpha < phi - 1e-12) if topology == "ac-switch" else np.zeros(alpha.shape, bool)
        if topology == "ac-switch":
            beta = np.where(lost, beta, np.minimum(beta, a + np.pi))
        if topology == "bridge":
            cont = (alpha < phi).astype(float)
            k_c = _one_minus_decay(np.pi, tau)
            with np.errstate(divide="ignore", invalid="ignore"):
                c_cont = -2 * np.sin(alpha - phi) / np.where(k_c > 0, k_c, 1.0)
            c = np.where(cont > 0, c_cont, c)
            beta = np.where(cont > 0, alpha + np.pi, beta)
        s1, s2 = segment_integrals(a=a, b=beta, phi=phi, c=c)
        cond = beta - a
        if topology == "ac-switch":
            # Both SCRs conduct (α ≥ φ), or one alone as a half-wave (α < φ, narrow pulses).
            k = np.where(lost, 2.0, 1.0)
            vdc = np.where(lost, (np.cos(a) - np.cos(beta)) / two_pi, zero)
            vrms2 = (cond + 0.5 * np.sin(2 * a) - 0.5 * np.sin(2 * beta)) / (2 * np.pi * k)
            idc, irms2 = np.where(lost, s1 / two_pi, zero), s2 / (np.pi * k)
        else:
            vdc = (np.cos(a) - np.cos(beta)) / period
            vrms2 = (cond - 0.5 * (np.sin(2 * beta) - np.sin(2 * a))) / (2 * period)
            idc, irms2 = s1 / period, s2 / period
        it_av, it_rms2 = s1 / two_pi, s2 / two_pi
    else:
        a = alpha
        period = two_pi if topology == "half-wave" else np.pi
        delta = np.pi + alpha if topology == "half-wave" else alpha
        k1 = _decay(np.pi - alpha, tau)
        k2 = _decay(delta, tau)
        i0 = k2 * (np.sin(phi) - np.sin(alpha - phi) * k1) / (1 - k1 * k2)
        c = i0 - np.sin(alpha - phi)
        beta = np.full_like(alpha, np.pi)
        s1, s2 = segment_integrals(a=alpha, b=beta, phi=phi, c=c)
        i1 = np.sin(phi) + c * k1
        f1 = i1 * tau * _one_minus_decay(delta, tau)
        f2 = i1 * i1 * 0.5 * tau * _one_minus_decay(2 * delta, tau)
        cond = np.pi - alpha
        vdc = (1 + np.cos(alpha)) / period
        vrms2 = (cond + 0.5 * np.sin(2 * alpha)) / (2 * period)
        idc, irms2 = (s1 + f1) / period, (s2 + f2) / period
        it_av, it_rms2 = s1 / two_pi, s2 / two_pi
        cont = (i0 > 0).astype(float)
    none = alpha >= np.pi
    clean = {
        "vdc": vdc, "vrms": np.sqrt(np.maximum(vrms2, 0.0)), "idc": idc,
        "irms": np.sqrt(np.maximum(irms2, 0.0)), "it_av": it_av,
        "it_rms": np.sqrt(np.maximum(it_rms2, 0.0)),
    }
    if peak:
        clean["it_peak"] = _segment_peak(a, beta, phi, c)
    out = {k: np.where(none, 0.0, v) for k, v in clean.items()}
    out.update(beta=beta, conduction=np.maximum(cond, 0.0), alpha_eff=a, continuous=cont,
               seg_a=a, seg_b=beta, seg_c=c)
    return out


def _vm_z_phi(vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
              omega: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    vm = np.sqrt(2.0) * _a(vs)
    x = _a(omega) * _a(l)
    return vm, np.hypot(_a(r), x), np.arctan2(x, _a(r))


@memoised  # several checks read the same waveform from the same rows: solved once
def stage_values(*, topology: str, freewheel: bool, vs: np.ndarray, r: np.ndarray,
                 l: np.ndarray, omega: np.ndarray,  # noqa: E741
                 alpha: np.ndarray, peak: bool = True,
                 e: np.ndarray | None = None) -> dict[str, np.ndarray]:
    """:func:`waveform_pu` in SI for supply ``vs`` [V RMS], load ``r`` [Ω], ``l`` [H] at
    ``omega`` [rad/s], fired at ``alpha`` [rad]. Adds ``phi`` [rad], ``load_power`` [W] =
    I_rms²·R and ``vm`` [V]. ``peak=False`` leaves out ``it_peak``.

    >>> v = stage_values(topology="ac-switch", freewheel=False, vs=120.0, r=10.0, l=0.0,
    ...                  omega=2 * np.pi * 60, alpha=np.pi / 2)  # Rashid 4e Ex 11.1 [book]
    >>> round(float(v["vrms"]), 2), round(float(v["load_power"]), 1)
    (84.85, 720.0)

    A back EMF ``e`` [V] (battery, motor armature) hands over to :func:`checks.rle.stage_values`.
    """
    if e is not None:
        from checks import rle

        return rle.stage_values(topology=topology, freewheel=freewheel, vs=vs, r=r, l=l,
                                omega=omega, alpha=alpha, e=e, peak=peak)
    vm, z, phi = _vm_z_phi(vs, r, l, omega)
    w = waveform_pu(topology=topology, freewheel=freewheel, alpha=alpha, phi=phi, peak=peak)
    ib = vm / z
    out = {k: w[k] * vm for k in ("vdc", "vrms")}
    out.update({k: w[k] * ib for k in ("idc", "irms", "it_av", "it_rms", "it_peak") if k in w})
    out.update(beta=w["beta"], conduction=w["conduction"], alpha_eff=w["alpha_eff"],
               continuous=w["continuous"], phi=phi + 0 * w["beta"], vm=vm + 0 * w["beta"],
               load_power=out["irms"] ** 2 * _a(r), seg_a=w["seg_a"], seg_b=w["seg_b"],
               seg_c=w["seg_c"])
    return out


def shortcut_output(*, topology: str, vs: np.ndarray, conduction: np.ndarray) -> np.ndarray:
    """The textbook shortcut for the load output [V]: θ_c/360°·V_s (half-wave V_dc),
    θ_c/180°·V_s (bridge V_dc), V_s·√(θ_c/180°) (ac-switch V_rms); it treats the conducted part
    of the sine as a rectangle. vs [V RMS]; conduction [rad].

    >>> round(float(shortcut_output(topology="half-wave", vs=120.0,
    ...                             conduction=np.radians(216.87 - 45))), 2)  # 57.29 V
    57.29
    """
    vs, th = _a(vs), _a(conduction)
    if topology == "half-wave":
        return th / (2 * np.pi) * vs
    if topology == "bridge":
        return th / np.pi * vs
    return vs * np.sqrt(th / np.pi)


def load_waveform(*, topology: str, freewheel: bool, vs: float, r: float,
                  l: float, omega: float, alpha: float,  # noqa: E741
                  points: int = 721, e: float | None = None
                  ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """One cycle of the load voltage and current, (θ [rad], v_load [V], i_load [A]), for plots.

    θ runs over 0..2π at ``points`` samples; the supply is √2·V_s·sin θ, fired at ``alpha``
    [rad] (and at α + π for the bridge and the ac-switch). The current is the steady state of
    :func:`waveform_pu` (from zero at α when discontinuous). vs [V RMS]; r [Ω]; l [H];
    omega [rad/s].

    >>> th, v, i = load_waveform(topology="half-wave", freewheel=False, vs=100 / np.sqrt(2),
    ...                          r=10.0, l=0.0, omega=314.16, alpha=np.pi / 2, points=5)
    >>> np.abs(v).round(6).tolist(), np.abs(i).round(6).tolist()
    ([0.0, 100.0, 0.0, 0.0, 0.0], [0.0, 10.0, 0.0, 0.0, 0.0])

    A back EMF ``e`` [V] hands over to :func:`checks.rle.load_waveform`.
    """
    if e is not None:
        from checks import rle

        return rle.load_waveform(topology=topology, freewheel=freewheel, vs=vs, r=r, l=l,
                                 omega=omega, alpha=alpha, e=e, points=points)
    vm, z, phi = _vm_z_phi(vs, r, l, omega)
    w = waveform_pu(topology=topology, freewheel=freewheel, alpha=_a(alpha), phi=phi)
    a, b, c = float(w["seg_a"]), float(w["seg_b"]), float(w["seg_c"])
    phi = float(phi)
    tau = float(np.tan(phi))
    theta = np.linspace(0.0, 2 * np.pi, points)
    ib = vm / z

    def seg(th: np.ndarray, start: float) -> tuple[np.ndarray, np.ndarray]:
        # The segment's current, repeated at start (every period), and where it conducts.
        x = np.mod(th - start, 2 * np.pi)
        on = x <= (b - a)
        cur = np.sin(x + a - phi) + c * _decay(x, tau)
        return on & (b > a), np.where(on, cur, 0.0)

    src = vm * np.sin(theta)
    if topology == "half-wave" or topology == "bridge":
        on1, i1 = seg(theta, a)
        if topology == "half-wave":
            on2, i2 = np.zeros_like(on1), np.zeros_like(i1)
        else:
            on2, i2 = seg(theta, a + np.pi)
        i_load = np.abs(i1) + np.abs(i2)
        v_load = np.where(on1, src, 0.0) + np.where(on2, -src, 0.0)
        if freewheel:
            # Freewheeling: the current decays from π (or 2π) through the diode, v_load = 0.
            i_pi = np.sin(phi) + c * _decay(np.pi - a, tau)
            ends = [np.pi] if topology == "half-wave" else [0.0, np.pi]
            fw = np.zeros_like(theta)
            for e in ends:  # at most two freewheel intervals per cycle
                x = np.mod(theta - e, 2 * np.pi)
                span = (np.pi + a) if topology == "half-wave" else a
                fw = np.where(x < span, i_pi * _decay(x, tau), fw)
            i_load = np.where(on1 | on2, i_load, fw)
        return theta, v_load, i_load * ib
    on1, i1 = seg(theta, a)
    on2, i2 = seg(theta, a + np.pi)
    if a < phi - 1e-12:  # control lost, narrow pulses: the second SCR misses its pulse
        on2, i2 = np.zeros_like(on1), np.zeros_like(i1)
    v_load = np.where(on1 | on2, src, 0.0)
    return theta, v_load, (i1 - i2) * ib


# --------------------------------------------------------------------------------------------
# Checks. Each takes ``alpha`` (the row's firing angle) and, where a pass rule is about the
# ends of the firing range, ``alpha_lo`` and ``alpha_hi`` (that row's range ends) [rad].


def output_check(*, topology: str, freewheel: bool, vs: np.ndarray, r: np.ndarray,
                 l: np.ndarray, omega: np.ndarray, alpha: np.ndarray,  # noqa: E741
                 alpha_lo: np.ndarray, alpha_hi: np.ndarray, req_lo: np.ndarray,
                 req_hi: np.ndarray, quantity: str, limits: Mapping[str, float],
                 e: np.ndarray | None = None, e_full: np.ndarray | None = None,
                 e_least: np.ndarray | None = None) -> Outcome:
    """``power.output``: the load output over the firing range against ``required``.

    Exact values per row (:func:`stage_values`); pass when the output at α_lo reaches
    ``req_hi`` and the output at α_hi is at most ``req_lo`` (NaN: that side not required).
    ``quantity`` is ``power`` (load power [W]) or ``voltage`` (V_dc [V] for the rectifiers,
    V_rms for the ac-switch). Metric = min(out(α_lo)/req_hi, req_lo/out(α_hi)), graded with
    ``fail_below``. ``shortcut_error`` = shortcut/exact − 1 (:func:`shortcut_output`).
    With a back EMF ``e`` [V]: ``quantity`` may also be ``current`` (the mean load current:
    charge or armature current, ``load_current``); V_dc is the terminal voltage, E included;
    the shortcut does not apply (NaN). The full output is taken at ``e_full`` (E at its
    highest: a full battery, top speed) and the minimum at ``e_least`` (E at its lowest), the
    pairing in which a charger or a drive runs; both default to ``e``.

    >>> o = output_check(topology="ac-switch", freewheel=False, vs=np.array([230.0]), r=26.45,
    ...                  l=0.0, omega=314.159, alpha=0.0, alpha_lo=0.0, alpha_hi=np.pi * 0.9,
    ...                  req_lo=np.nan, req_hi=1900.0, quantity="power",
    ...                  limits={"fail_below": 1.0})
    >>> o.status.tolist(), round(float(o.values["load_power"][0]))
    ([0], 2000)
    """
    def out_of(a: np.ndarray, e: np.ndarray | None = e) -> tuple[np.ndarray,
                                                                  dict[str, np.ndarray]]:
        v = stage_values(topology=topology, freewheel=freewheel, vs=vs, r=r, l=l, omega=omega,
                         alpha=a, peak=False, e=e)
        if quantity == "power":
            return v["load_power"], v
        if quantity == "current":
            return v["idc"], v
        return (v["vrms"] if topology == "ac-switch" else v["vdc"]), v

    y, v = out_of(_a(alpha))
    y_lo, _ = out_of(_a(alpha_lo), e if e_full is None else e_full)
    y_hi, _ = out_of(_a(alpha_hi), e if e_least is None else e_least)
    exact = v["vrms"] if topology == "ac-switch" else v["vdc"]
    short = shortcut_output(topology=topology, vs=vs, conduction=v["conduction"])
    with np.errstate(divide="ignore", invalid="ignore"):
        err = np.where(np.abs(exact) > 1e-9 * v["vm"], short / exact - 1.0, np.nan)
        if e is not None:
            err = np.nan * err
        m_full = np.where(np.isnan(req_hi), np.inf, y_lo / _a(req_hi))
        m_min = np.where(np.isnan(req_lo), np.inf, np.where(y_hi > 0, _a(req_lo) / y_hi, np.inf))
    metric = np.minimum(m_full, m_min)
    margin, status = grade(metric, limits)
    margin = np.where(np.isinf(metric), np.inf, margin)
    values = {"vdc": v["vdc"], "vrms": v["vrms"], "load_power": v["load_power"],
              "extinction_angle": v["beta"], "conduction_angle": v["conduction"],
              "shortcut_error": err, "output_at_min": y_lo, "output_at_max": y_hi,
              "load_angle": v["phi"]}
    if e is not None:
        values.update(load_current=v["idc"], load_rms_current=v["irms"],
                      emf_angle=v["theta1"], continuous=v["continuous"])
    return Outcome(values, margin, status)


def blocking_check(*, vdrm: np.ndarray, vrrm: np.ndarray, v_fwd: np.ndarray,
                   v_rev: np.ndarray, limits: Mapping[str, float]) -> Outcome:
    """``power.blocking``: min(VDRM/V_fwd, VRRM/V_rev) against 1.5 (fail) / 2.0 (marginal).

    vdrm, vrrm [V] ratings; v_fwd, v_rev [V] the forward and reverse peak stress (√2·V_s at
    high line on AC, or the snubber's overshoot peak; V_rev = 0 where nothing reverse-biases
    the device)  [3, ch. 4].

    >>> o = blocking_check(vdrm=800.0, vrrm=800.0, v_fwd=np.array([357.8]), v_rev=357.8,
    ...                    limits={"fail_below": 1.5, "marginal_below": 2.0})
    >>> o.status.tolist(), round(float(o.values["blocking_ratio"][0]), 3)
    ([0], 2.236)
    """
    v_fwd, v_rev = _a(v_fwd), _a(v_rev)
    with np.errstate(divide="ignore"):
        ratio = np.minimum(_a(vdrm) / v_fwd, np.where(v_rev > 0, _a(vrrm) / v_rev, np.inf))
    margin, status = grade(ratio, limits)
    return Outcome({"peak_voltage": np.maximum(v_fwd, v_rev), "blocking_ratio": ratio},
                   margin, status)


def dc_currents(*, vs: np.ndarray, r: np.ndarray,
                duty: np.ndarray) -> dict[str, np.ndarray]:
    """DC switch: I = V_s/R (settled), IT(AV) = D·I, IT(RMS) = √D·I, FF = 1/√D  [1, §9].

    vs [V]; r [Ω]; duty [–] fraction of time on (0 < D ≤ 1).

    >>> {k: round(float(v), 3) for k, v in dc_currents(vs=100.0, r=10.0, duty=0.25).items()}
    {'i': 10.0, 'it_av': 2.5, 'it_rms': 5.0, 'form_factor': 2.0}
    """
    i = _a(vs) / _a(r)
    d = _a(duty)
    return {"i": i, "it_av": d * i, "it_rms": np.sqrt(d) * i, "form_factor": 1 / np.sqrt(d)}


def _currents(kind: str, topology: str, freewheel: bool, vs: np.ndarray, r: np.ndarray,
              l: np.ndarray, omega: np.ndarray, alpha: np.ndarray,  # noqa: E741
              duty: np.ndarray, e: np.ndarray | None = None) -> dict[str, np.ndarray]:
    if kind == "dc":
        return dc_currents(vs=vs, r=r, duty=duty)
    v = stage_values(topology=topology, freewheel=freewheel, vs=vs, r=r, l=l, omega=omega,
                     alpha=alpha, peak=False, e=e)
    with np.errstate(divide="ignore", invalid="ignore"):
        ff = np.where(v["it_av"] > 0, v["it_rms"] / v["it_av"], np.nan)
    return {"it_av": v["it_av"], "it_rms": v["it_rms"], "form_factor": ff}


def rms_current_check(*, kind: str, topology: str = "", freewheel: bool = False,
                      vs: np.ndarray, r: np.ndarray, l: np.ndarray = 0.0,  # noqa: E741
                      omega: np.ndarray = 1.0, alpha: np.ndarray = 0.0, duty: np.ndarray = 1.0,
                      it_rms_rating: np.ndarray, limits: Mapping[str, float],
                      e: np.ndarray | None = None) -> Outcome:
    """``power.rms-current``: IT(RMS) of one SCR against its rating (``kind`` "ac" or "dc").

    >>> o = rms_current_check(kind="ac", topology="ac-switch", vs=np.array([230.0]), r=5.29,
    ...                       omega=376.99, it_rms_rating=40.0, limits={})  # Rashid 4e Ex 11.8
    >>> round(float(o.values["it_rms"][0]), 2), o.status.tolist()
    (30.74, [0])
    """
    cur = _currents(kind, topology, freewheel, vs, r, l, omega, alpha, duty, e)
    with np.errstate(divide="ignore"):
        metric = _a(it_rms_rating) / cur["it_rms"]
    margin, status = grade(metric, limits)
    return Outcome({"it_rms": cur["it_rms"]}, margin, status)


def equal_loss_current(*, ff: np.ndarray, it_av_rated: np.ndarray, vt0: np.ndarray,
                       rt: np.ndarray) -> np.ndarray:
    """IT(AV) at form factor FF that gives the loss of the rated IT(AV) at 180° [A]  [3, ch. 4]:

    rT·FF²·I² + VT0·I = P_r = VT0·I_r + rT·(π/2)²·I_r², so
    I = [−VT0 + √(VT0² + 4·FF²·rT·P_r)]/(2·FF²·rT); with rT = 0, I = P_r/VT0; with NaN
    VT0/rT, the equal-RMS bound I_r·(π/2)/FF (conservative: all loss taken as rT loss).
    ff [–]; it_av_rated [A]; vt0 [V]; rt [Ω].

    >>> round(float(equal_loss_current(ff=2.221, it_av_rated=10.0, vt0=0.9, rt=0.025)), 3)
    8.025
    """
    ff, ir, vt0, rt = _a(ff), _a(it_av_rated), _a(vt0), _a(rt)
    p_r = vt0 * ir + rt * (np.pi / 2) ** 2 * ir**2
    with np.errstate(divide="ignore", invalid="ignore"):
        quad = (-vt0 + np.sqrt(vt0**2 + 4 * ff**2 * rt * p_r)) / (2 * ff**2 * rt)
        lin = p_r / vt0
    exact = np.where(rt > 0, quad, lin)
    return np.where(np.isnan(vt0) | np.isnan(rt), ir * (np.pi / 2) / ff, exact)


def average_current_check(*, kind: str, topology: str = "", freewheel: bool = False,
                          vs: np.ndarray, r: np.ndarray, l: np.ndarray = 0.0,  # noqa: E741
                          omega: np.ndarray = 1.0, alpha: np.ndarray = 0.0,
                          duty: np.ndarray = 1.0, it_av_rating: np.ndarray,
                          vt0: np.ndarray = np.nan, rt: np.ndarray = np.nan,
                          limits: Mapping[str, float], e: np.ndarray | None = None) -> Outcome:
    """``power.average-current``: IT(AV) against the equal-loss derated rating.

    metric = it_av_allowed/it_av with it_av_allowed = :func:`equal_loss_current` at the row's
    form factor.

    >>> o = average_current_check(kind="dc", vs=np.array([100.0]), r=10.0, duty=0.25,
    ...                           it_av_rating=3.0, vt0=0.9, rt=0.025, limits={})
    >>> round(float(o.values["it_av_allowed"]), 3), o.status.tolist()
    (2.766, [0])
    """
    cur = _currents(kind, topology, freewheel, vs, r, l, omega, alpha, duty, e)
    allowed = equal_loss_current(ff=cur["form_factor"], it_av_rated=it_av_rating, vt0=vt0, rt=rt)
    with np.errstate(divide="ignore", invalid="ignore"):
        metric = np.where(cur["it_av"] > 0, allowed / cur["it_av"], np.inf)
    margin, status = grade(metric, limits)
    return Outcome({"it_av": cur["it_av"], "form_factor": cur["form_factor"],
                    "it_av_allowed": allowed}, margin, status)


def device_loss(*, it_av: np.ndarray, it_rms: np.ndarray, vt0: np.ndarray,
                rt: np.ndarray) -> np.ndarray:
    """On-state loss P_T = VT0·IT(AV) + rT·IT(RMS)² [W]  [1, §17]; [3, ch. 4].

    >>> round(float(device_loss(it_av=3.914, it_rms=6.149, vt0=0.9, rt=0.015)), 3)
    4.09
    """
    return _a(vt0) * _a(it_av) + _a(rt) * _a(it_rms) ** 2


def junction_check(*, kind: str, topology: str = "", freewheel: bool = False,
                   vs: np.ndarray, r: np.ndarray, l: np.ndarray = 0.0,  # noqa: E741
                   omega: np.ndarray = 1.0, alpha: np.ndarray = 0.0, duty: np.ndarray = 1.0,
                   vt0: np.ndarray, rt: np.ndarray, rth_jc: np.ndarray, rth_cs: np.ndarray,
                   rth_sa: np.ndarray, devices: float = 1.0, tj_max: np.ndarray,
                   t_max_ambient: np.ndarray, t_max_rise: np.ndarray,
                   limits: Mapping[str, float], e: np.ndarray | None = None) -> Outcome:
    """``power.junction``: Tj = T_a + ΔT_enc + n·P·Rth(s-a) + P·(Rth(j-c) + Rth(c-s)) [K].

    Fail when Tj > tj_max − ``headroom_fail`` (0 K), marginal when Tj > tj_max −
    ``headroom_marginal`` (25 K). ``rth_sa_required`` = the Rth(s-a) at which Tj = tj_max −
    headroom_marginal. margin = (T_fail − Tj)/(Tj − T_a): the headroom as a fraction of the
    rise. Temperatures [K]; thermal resistances [K/W]; devices [–] on the heatsink.

    >>> o = junction_check(kind="ac", topology="ac-switch", vs=np.array([253.0]), r=26.45,
    ...                    omega=314.16, vt0=0.9, rt=0.015, rth_jc=1.0, rth_cs=0.3, rth_sa=1.2,
    ...                    devices=2, tj_max=398.15, t_max_ambient=318.15, t_max_rise=10.0,
    ...                    limits={"headroom_fail": 0.0, "headroom_marginal": 25.0})
    >>> round(float(o.values["junction_temperature"][0]) - 273.15, 2), o.status.tolist()
    (71.88, [0])
    """
    cur = _currents(kind, topology, freewheel, vs, r, l, omega, alpha, duty, e)
    p = device_loss(it_av=cur["it_av"], it_rms=cur["it_rms"], vt0=vt0, rt=rt)
    ta = _a(t_max_ambient) + _a(t_max_rise)
    n = float(devices)
    own = _a(rth_jc) + _a(rth_cs)
    tj = ta + n * p * _a(rth_sa) + p * own
    h_fail = float(limits.get("headroom_fail", 0.0))
    h_marg = float(limits.get("headroom_marginal", 25.0))
    t_fail = _a(tj_max) - h_fail
    t_marg = _a(tj_max) - h_marg
    with np.errstate(divide="ignore", invalid="ignore"):
        need = np.where(p > 0, (t_marg - ta - p * own) / (n * p), np.inf)
        margin = np.where(tj > ta, (t_fail - tj) / (tj - ta), np.inf)
    status = np.where(tj > t_fail, FAIL, np.where(tj > t_marg, MARGINAL, PASS)).astype(np.int8)
    return Outcome({"device_loss": p, "junction_temperature": tj, "rth_sa_required": need},
                   margin, status)


def itsm_at(*, itsm: np.ndarray, t_sm: np.ndarray, t: np.ndarray) -> np.ndarray:
    """ITSM converted to a half-sine of length t by I^N·t = const [A]  [3, ch. 4]:
    ITSM(t) = ITSM(t_sm)·(t_sm/t)^(1/N), N = 4 when t < t_sm, N = 2 when t > t_sm (both the
    conservative choice). itsm [A]; t_sm, t [s].

    >>> round(float(itsm_at(itsm=1.0, t_sm=0.01, t=1 / 120)), 3)
    1.047
    """
    t_sm, t = _a(t_sm), _a(t)
    n = np.where(t < t_sm, 4.0, 2.0)
    return _a(itsm) * (t_sm / t) ** (1 / n)


def inrush_peak(*, topology: str, vs: np.ndarray, r_cold: np.ndarray,
                l: np.ndarray, omega: np.ndarray, alpha: np.ndarray) -> np.ndarray:  # noqa: E741
    """First-half-cycle peak current into the cold load fired at α [A]  [1, §11]:

    R load: √2·V_s/R_cold for α ≤ 90°, else √2·V_s·sin α/R_cold; R–L: the peak of
    i(θ) = (Vm/Z)·[sin(θ − φ) − sin(α − φ)·e^(−(θ − α)/tan φ)] with the cold R. vs [V RMS];
    r_cold [Ω]; l [H]; omega [rad/s]; alpha [rad].

    >>> round(float(inrush_peak(topology="ac-switch", vs=253.0, r_cold=105.8 / 12, l=0.0,
    ...                         omega=314.16, alpha=0.0)), 1)
    40.6
    """
    vm, z, phi, a = np.broadcast_arrays(*_vm_z_phi(vs, r_cold, l, omega), _a(alpha))
    # Resistive rows in closed form; the R–L peak search only where there is inductance.
    out = np.array(vm / z * np.where(a <= np.pi / 2, 1.0, np.sin(a)), dtype=float)
    rl = phi > 0
    if np.any(rl):
        ar, pr = a[rl], phi[rl]
        beta = extinction_angle(alpha=ar, phi=pr)
        out = out.copy()
        out[rl] = (vm / z)[rl] * _segment_peak(ar, beta, pr, -np.sin(ar - pr))
    return out


def surge_check(*, topology: str, vs: np.ndarray, r_cold: np.ndarray,
                l: np.ndarray, omega: np.ndarray, alpha: np.ndarray,  # noqa: E741
                itsm: np.ndarray, t_sm: np.ndarray, limits: Mapping[str, float]) -> Outcome:
    """``power.surge``: inrush peak (:func:`inrush_peak`) against ITSM at the supply's
    half-cycle π/ω (:func:`itsm_at`).

    >>> o = surge_check(topology="ac-switch", vs=np.array([253.0]), r_cold=8.817, l=0.0,
    ...                 omega=314.16, alpha=0.0, itsm=100.0, t_sm=0.01, limits={})
    >>> o.status.tolist(), round(float(o.values["itsm_at_line"][0]), 1)
    ([0], 100.0)
    """
    peak = inrush_peak(topology=topology, vs=vs, r_cold=r_cold, l=l, omega=omega, alpha=alpha)
    rating = itsm_at(itsm=itsm, t_sm=t_sm, t=np.pi / _a(omega))
    with np.errstate(divide="ignore"):
        margin, status = grade(rating / peak, limits)
    return Outcome({"inrush_peak": peak, "itsm_at_line": rating + 0 * peak}, margin, status)


def i2t_at(*, i2t: np.ndarray, t_sm: np.ndarray, t: np.ndarray) -> np.ndarray:
    """Device I²t converted to time t [A²s]  [3, ch. 4]: I²t(t) = I²t(t_sm)·(t/t_sm)^((N−2)/N),
    N = 4 when t < t_sm, N = 2 (no change) when t > t_sm. i2t [A²s]; t_sm, t [s].

    >>> round(float(i2t_at(i2t=300e3, t_sm=8.33e-3, t=8e-3)) / 1e3, 1)  # Rashid 4e Ex 17.6
    294.0
    """
    t_sm, t = _a(t_sm), _a(t)
    n = np.where(t < t_sm, 4.0, 2.0)
    return _a(i2t) * (t / t_sm) ** ((n - 2) / n)


def fuse_check(*, fuse_i2t: np.ndarray, i2t: np.ndarray, t_sm: np.ndarray, t_base: np.ndarray,
               limits: Mapping[str, float]) -> Outcome:
    """``power.fuse``: device I²t at the fuse's time base (:func:`i2t_at`) over the fuse's
    total clearing I²t; pass when the device's is larger. fuse_i2t, i2t [A²s]; t_sm, t_base [s].

    >>> o = fuse_check(fuse_i2t=np.array([280e3]), i2t=300e3, t_sm=8.33e-3, t_base=8e-3,
    ...                limits={"fail_below": 1.0})
    >>> o.status.tolist(), round(float(o.margin[0]), 3)
    ([0], 0.05)
    """
    dev = i2t_at(i2t=i2t, t_sm=t_sm, t=t_base)
    margin, status = grade(dev / _a(fuse_i2t), limits)
    return Outcome({"fuse_i2t": _a(fuse_i2t) + 0 * dev, "device_i2t": dev}, margin, status)


def peak_after_firing(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                      omega: np.ndarray, alpha: np.ndarray) -> np.ndarray:
    """The largest anode current after firing at α, from zero, on the line [A]: R load
    √2·V_s·sin(max(α, 90°))/R; R–L the peak of i(θ) up to β. Arguments as :func:`inrush_peak`.

    >>> round(float(peak_after_firing(vs=100 / np.sqrt(2), r=10.0, l=0.0, omega=314.16,
    ...                               alpha=np.radians(150))), 6)
    5.0
    """
    return inrush_peak(topology="", vs=vs, r_cold=r, l=l, omega=omega, alpha=alpha)


def max_firing_angle(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                     omega: np.ndarray, il: np.ndarray) -> np.ndarray:
    """Latest α at which the anode current still reaches IL [rad]: π − asin(IL·R/Vm) for an
    R load  [1, §10]; for R–L, vectorised bisection on :func:`peak_after_firing` over
    [0, π] (the peak after firing falls as α grows: below φ the offset adds to it), so a
    strongly inductive light load can have its limit below 90°. NaN when even firing at
    α = 0 never reaches IL.

    >>> round(float(np.degrees(max_firing_angle(vs=230.0, r=2e3, l=0.0, omega=314.16,
    ...                                         il=0.1))), 2)
    142.07
    """
    vs, r, l, il = np.broadcast_arrays(_a(vs), _a(r), _a(l), _a(il))  # noqa: E741
    omega = np.broadcast_to(_a(omega), vs.shape)
    ok = peak_after_firing(vs=vs, r=r, l=l, omega=omega, alpha=np.zeros(vs.shape)) >= il
    out = np.array(np.pi - np.arcsin(np.clip(il * r / (np.sqrt(2) * vs), 0.0, 1.0)), dtype=float)
    m = l > 0
    if np.any(m):  # vectorised bisection over the inductive rows only
        s = {k: v[m] for k, v in (("vs", vs), ("r", r), ("l", l), ("omega", omega))}
        lo = np.zeros(int(m.sum()))
        hi = np.full(lo.shape, np.pi)
        for _ in range(40):
            mid = 0.5 * (lo + hi)
            reach = peak_after_firing(alpha=mid, **s) >= il[m]
            lo = np.where(reach, mid, lo)
            hi = np.where(reach, hi, mid)
        out = out.copy()
        out[m] = 0.5 * (lo + hi)
    return np.where(ok, out, np.nan)


def latching_check(*, kind: str, vs: np.ndarray, r: np.ndarray,
                   l: np.ndarray = 0.0, omega: np.ndarray = 1.0,  # noqa: E741
                   alpha: np.ndarray = 0.0, alpha_lo: np.ndarray = 0.0,
                   alpha_hi: np.ndarray = 0.0, il_cold: np.ndarray,
                   limits: Mapping[str, float]) -> Outcome:
    """``power.latching``: does the anode current reach IL (cold) at both ends of the range?

    AC: ``anode_current_at_fire`` = Vm·sin α/R at the row's α (R load; R–L: the peak after
    firing, the current starting from zero); the metric is min over α_lo, α_hi of
    :func:`peak_after_firing` / IL_c; ``max_firing_angle`` from :func:`max_firing_angle`.
    DC: V_s/R against IL_c. vs [V] (RMS on AC); il_cold [A].

    >>> o = latching_check(kind="ac", vs=np.array([207.0]), r=2e3, omega=314.16,
    ...                    alpha=np.radians(150), alpha_lo=np.radians(30),
    ...                    alpha_hi=np.radians(150), il_cold=0.1, limits={})
    >>> o.status.tolist(), round(float(np.degrees(o.values["max_firing_angle"][0])), 1)
    ([2], 136.9)
    """
    il_cold = _a(il_cold)
    if kind == "dc":
        i = _a(vs) / _a(r)
        margin, status = grade(i / il_cold, limits)
        return Outcome({"anode_current_at_fire": i, "il": il_cold + 0 * i,
                        "max_firing_angle": np.nan * i}, margin, status)
    vm = np.sqrt(2) * _a(vs)
    l = _a(l)  # noqa: E741
    at_fire = np.where(l > 0, peak_after_firing(vs=vs, r=r, l=l, omega=omega, alpha=alpha),
                       vm * np.sin(_a(alpha)) / _a(r))
    reach = np.minimum(peak_after_firing(vs=vs, r=r, l=l, omega=omega, alpha=alpha_lo),
                       peak_after_firing(vs=vs, r=r, l=l, omega=omega, alpha=alpha_hi))
    margin, status = grade(reach / il_cold, limits)
    amax = max_firing_angle(vs=vs, r=r, l=l, omega=omega, il=il_cold)
    return Outcome({"anode_current_at_fire": at_fire, "il": il_cold + 0 * at_fire,
                    "max_firing_angle": amax, "reach_current": reach}, margin, status)


def dropout_angle(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                  omega: np.ndarray, alpha: np.ndarray, ih: np.ndarray) -> np.ndarray:
    """Angle where the falling anode current reaches IH before β [rad]  [1, §10]:
    π − asin(IH·R/Vm) for an R load (the SCR as an ideal switch); for R–L, vectorised bisection
    of i(θ) = IH between the current's peak and β. NaN when the current never reaches IH.

    >>> round(float(np.degrees(dropout_angle(vs=230.0, r=2e3, l=0.0, omega=314.16, alpha=0.5,
    ...                                      ih=0.05))), 2)
    162.1
    """
    vm, z, phi = _vm_z_phi(vs, r, l, omega)
    vm, z, phi, a, ih = np.broadcast_arrays(vm, z, phi, _a(alpha), _a(ih))
    target = ih * z / vm
    beta = extinction_angle(alpha=a, phi=phi)
    # Resistive rows: the current is largest at max(α, π/2) and falls after it.
    lo = np.minimum(np.maximum(a, np.pi / 2 + phi), beta)
    lo, hi, a, phi, target = np.broadcast_arrays(lo, beta, a, phi, target)
    lo = np.array(lo, dtype=float)
    rl = np.tan(phi) > 1e-12
    if rl.any():
        # R–L rows: the current rises from zero at α to one peak, then falls to zero at β;
        # the drop-out lies after the peak (fired late, the peak is well past π/2 + φ).
        _, lo[rl] = _segment_argmax_rl(a[rl], (beta - a)[rl], phi[rl], -np.sin(a - phi)[rl],
                                       np.tan(phi[rl]))
    cur = rl_current(theta=lo, alpha=a, phi=phi, vm=1.0, z=1.0)
    # Resistive rows (no exponential in rl_current): sin(θ − φ) = IH·Z/Vm past the crest.
    out = np.clip(phi + np.pi - np.arcsin(np.clip(target, -1.0, 1.0)), lo, hi)
    if rl.any():
        lo_r, hi_r, a_r, p_r, t_r = lo[rl], hi[rl], a[rl], phi[rl], target[rl]
        for _ in range(50):  # vectorised bisection: i(θ) − IH changes sign once on [lo, hi]
            mid = 0.5 * (lo_r + hi_r)
            above = rl_current(theta=mid, alpha=a_r, phi=p_r, vm=1.0, z=1.0) >= t_r
            lo_r = np.where(above, mid, lo_r)
            hi_r = np.where(above, hi_r, mid)
        out = np.array(out, dtype=float)
        out[rl] = 0.5 * (lo_r + hi_r)
    return np.where(cur >= target, out, np.nan)


def holding_check(*, kind: str, vs: np.ndarray, r: np.ndarray, l: np.ndarray = 0.0,  # noqa: E741
                  omega: np.ndarray = 1.0, alpha: np.ndarray = 0.0, ih_cold: np.ndarray,
                  limits: Mapping[str, float]) -> Outcome:
    """``power.holding``: DC: V_s/R against IH_c (fail below 1×, marginal below 2×)  [4];
    AC: the dropout angle (reported, pass), failing only where the current never reaches IH_c.

    >>> o = holding_check(kind="dc", vs=np.array([1.0]), r=200.0, ih_cold=5e-3,
    ...                   limits={"fail_below": 1.0, "marginal_below": 2.0})  # S&G Ex 1_3
    >>> o.status.tolist(), round(float(o.margin[0]), 6)
    ([1], 0.0)
    """
    ih = _a(ih_cold)
    if kind == "dc":
        i = _a(vs) / _a(r)
        margin, status = grade(i / ih, limits)
        return Outcome({"load_current": i, "ih": ih + 0 * i, "dropout_angle": np.nan * i},
                       margin, status)
    peak = peak_after_firing(vs=vs, r=r, l=l, omega=omega, alpha=alpha)
    drop = dropout_angle(vs=vs, r=r, l=l, omega=omega, alpha=alpha, ih=ih)
    status = np.where(np.isnan(drop), FAIL, PASS).astype(np.int8)
    margin = np.where(np.isnan(drop), peak / ih - 1.0, np.inf)
    return Outcome({"load_current": peak, "ih": ih + 0 * peak, "dropout_angle": drop},
                   margin, status)


def didt_check(*, kind: str, vs: np.ndarray, l_tot: np.ndarray, alpha: np.ndarray = np.pi / 2,
               snub_didt: np.ndarray = 0.0, didt_rating: np.ndarray,
               limits: Mapping[str, float], e: np.ndarray = 0.0) -> Outcome:
    """``power.didt``: di/dt at firing = V·sin α/L_tot (+ the snubber discharge's) [A/s]  [1, §17].

    AC: V = √2·V_s at the row's α (the engine adds α = 90° where the range spans it); DC: V_s.
    ``snub_didt`` [A/s] is the snubber discharge contribution at the same instant. A back EMF
    ``e`` [V] in the loop opposes the line: the load term is (V − E)/L_tot, never below 0.

    >>> o = didt_check(kind="ac", vs=np.array([253.0]), l_tot=50e-6, alpha=np.pi / 2,
    ...                didt_rating=50e6, limits={})
    >>> round(float(o.values["didt"][0]) / 1e6, 2), o.status.tolist()
    (7.16, [0])
    """
    v = _a(vs) if kind == "dc" else np.sqrt(2) * _a(vs) * np.sin(_a(alpha))
    v = np.maximum(v - _a(e), 0.0)
    with np.errstate(divide="ignore"):
        rate = v / _a(l_tot) + _a(snub_didt)
        margin, status = grade(_a(didt_rating) / rate, limits)
    return Outcome({"didt": rate}, margin, status)


def control_check(*, r: np.ndarray, l: np.ndarray, omega: np.ndarray,  # noqa: E741
                  alpha_lo: np.ndarray, limits: Mapping[str, float]) -> Outcome:
    """``power.control``: AC switch with an R–L load: α_min ≥ φ = atan(ωL/R)  [1, §11].

    metric = α_min/φ. r [Ω]; l [H]; omega [rad/s]; alpha_lo [rad].

    >>> o = control_check(r=2.5, l=6.5e-3, omega=2 * np.pi * 60, alpha_lo=np.radians(30),
    ...                   limits={})  # Rashid 4e Ex 11.2 load: φ = 44.43°
    >>> o.status.tolist(), round(float(np.degrees(o.values["load_angle"])), 2)
    (2, 44.43)
    """
    phi = np.arctan2(_a(omega) * _a(l), _a(r))
    with np.errstate(divide="ignore", invalid="ignore"):
        margin, status = grade(_a(alpha_lo) / phi, limits)
    return Outcome({"load_angle": phi}, margin, status)
