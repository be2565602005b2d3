"""Loads with a back EMF: a battery or a DC motor armature (R–L–E) on a phase-controlled
rectifier (half-wave, fully controlled bridge, half-controlled bridge with a diode leg).

While the SCR conducts, L·di/dt + R·i + E = v(θ); in per unit of Vm/Z the current from i(a) is

    i(θ) = sin(θ − φ) − k + C·exp(−(θ − a)/tan φ),   k = (E/Vm)/cos φ = E/R in units of Vm/Z,

with C = i(a) + k − sin(a − φ). An SCR is forward-biased from zero current only while the line
exceeds E: from θ1 = asin(E/Vm) to π − θ1. Firing earlier than θ1 does nothing until θ1 (a wide
gate pulse then fires it at θ1; a narrow one misses the half-cycle), and firing after π − θ1
gives no current at all. The current ends at the extinction angle β, the first root after a of
i(θ) = 0; a bridge whose current outlasts the next firing runs continuously, and a freewheeling
diode carries the current past π as i = (i(π) + k)·e^(−x/tan φ) − k until it reaches zero.

Every mean and RMS value is a closed-form integral of the sine, the exponential and the
constant, so no quadrature error enters; roots are found for every row at once by a safeguarded
Newton iteration inside a bracket where the current falls monotonically.

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §3 (battery
    charger), §10 (single-phase full converter with an R–L–E load, Example 10.2), §15 (DC drives
    on single-phase full and semi converters).
[2] P. S. Bimbhra, *Power Electronics*, ch. 6 (single-phase converters: battery charging,
    R–L–E loads, continuous and discontinuous conduction).
[3] G. K. Dubey, *Fundamentals of Electrical Drives*, ch. 5 (discontinuous armature current).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping

import numpy as np

from checks.core import FAIL, MARGINAL, PASS, Outcome, distinct_rows, grade
from checks.power import _decay, _one_minus_decay, _segment_peak, segment_integrals
from checks.rl import root_falling

TOPOLOGIES = ("half-wave", "bridge")
_TINY = 1e-12


def _a(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


def emf_angle(*, vm: np.ndarray, e: np.ndarray) -> np.ndarray:
    """θ1 = asin(E/Vm) [rad]: the earliest angle at which the line exceeds the back EMF, so
    the earliest firing that starts a current from zero; π/2 when E ≥ Vm (never). vm, e [V].

    >>> round(float(np.degrees(emf_angle(vm=84.85, e=12.0))), 2)
    8.13
    """
    return np.arcsin(np.clip(_a(e) / _a(vm), 0.0, 1.0))


def waveform_pu(*, topology: str, freewheel: bool, alpha: np.ndarray, phi: np.ndarray,
                m: np.ndarray, peak: bool = True) -> dict[str, np.ndarray]:
    """Per-unit averages of a rectifier feeding an R–L–E load: currents in Vm/Z, voltages in Vm.

    topology ``half-wave`` or ``bridge`` (fully controlled; with ``freewheel`` a half-controlled
    bridge, whose diode leg carries the current after π); alpha [rad] firing angle; phi [rad]
    load angle atan(ωL/R) < π/2 (R > 0); m = E/Vm ≥ 0 [–].

    Returns the keys of :func:`checks.power.waveform_pu` — ``vdc``, ``vrms`` (load terminal
    voltage, E while no current flows), ``idc``, ``irms`` (load current: the charge or armature
    current), ``it_av``, ``it_rms``, ``it_peak`` (one SCR), ``beta``, ``conduction``,
    ``alpha_eff`` (where conduction starts: max(α, θ1) from zero), ``continuous``, ``seg_a``,
    ``seg_b``, ``seg_c`` — and ``offset`` k, ``theta1`` θ1, ``fw_len`` (the freewheeling
    interval after π), ``i_pi`` (the current at π where it freewheels), and the hand-over
    tail ``handed``, ``tail_a``, ``tail_b``, ``tail_c`` (zero length where there is none).

    Cases  [1, §10, §15], [2, ch. 6]:

    * discontinuous, from zero at a = max(α, θ1): β is the root of i in
      [max(a, π − θ1), a + P] (P = 2π half-wave, π bridge), where v − E < 0 makes i fall;
    * continuous bridge (the current from zero at a is still positive at a + π): the steady
      state C = −2·sin(α − φ)/(1 − e^(−π/tan φ)) at the actual α (the outgoing pair keeps the
      incoming one forward-biased, so α < θ1 fires too); V_dc = (2Vm/π)·cos α;
    * bridge fired before θ1 whose current from θ1 still flows at α + π (i_h there): the next
      pair takes it over at α + π, so the state starts at α with i_h, C_t = i_h + k − sin(α −
      φ); the current falls while the line is below E. If it is still positive at θ1 it never
      stops (continuous, as above); else it ends at γ < θ1 and the pair starts again from zero
      at θ1 (a gate held past θ1): each SCR conducts the tail (α, γ) (``tail_a``, ``tail_b``,
      ``tail_c``; ``handed`` 1) and (θ1, α + π), and ``beta`` = γ + π is where the load
      current ends;
    * freewheel: SCR from a to min(β, π); the diode from π while (i(π) + k)·e^(−x/tan φ) > k,
      at most until the next firing; continuous when it lasts that long, with
      i(α) = [k2·(sin φ − sin(α − φ)·k1 + k·k1) − k]/(1 − k1·k2), k1 = e^(−(π − α)/tan φ),
      k2 = e^(−Δ/tan φ), Δ = π + α (half-wave) or α (bridge).

    In steady state the mean of L·di/dt is zero, so V_dc = E + R·I_dc: a self-check.

    A half-wave stage without a freewheel has one segment from zero per cycle, however long
    L/R: over a cycle from a0 the line's mean is zero, so L·i(a0 + 2π) = −2πE/ω − R·∫i < 0
    were the current positive throughout, and it cannot reach zero while the line exceeds
    E; so it ends before 2π + θ1 (the root's bracket) and the next firing finds no current.

    >>> w = waveform_pu(topology="half-wave", freewheel=False, alpha=0.0, phi=0.0,
    ...                 m=12.0 / 84.85)  # a diode-like charger: conducts θ1 .. π − θ1
    >>> round(float(np.degrees(w["beta"] - w["alpha_eff"])), 2)
    163.74
    """
    if topology not in TOPOLOGIES:
        raise ValueError(f"a back-EMF load needs a rectifier topology, not {topology!r}")
    alpha, phi, m = np.broadcast_arrays(_a(alpha), np.clip(_a(phi), 0.0, np.arctan(1e12)),
                                        np.clip(_a(m), 0.0, None))
    shape = alpha.shape
    alpha, phi, m = (np.array(x, dtype=float).ravel() for x in (alpha, phi, m))
    tau = np.tan(phi)
    cphi = np.cos(phi)
    k = m / cphi
    th1 = np.arcsin(np.clip(m, 0.0, 1.0))
    two_pi = 2 * np.pi
    period = two_pi if topology == "half-wave" else np.pi
    a0 = np.maximum(alpha, th1)
    starts = (m < 1.0) & (a0 < np.pi - th1)
    res = tau <= _TINY

    def seg_val(th: np.ndarray, a: np.ndarray, c: np.ndarray, kk: np.ndarray,
                tt: np.ndarray, p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        inv = np.where(tt > _TINY, 1.0 / np.where(tt > _TINY, tt, 1.0), 0.0)
        ex = c * _decay(th - a, tt)
        return np.sin(th - p) - kk + ex, np.cos(th - p) - ex * inv

    c0 = k - np.sin(a0 - phi)
    if freewheel:
        hi = np.full_like(a0, np.pi)
    elif topology == "half-wave":
        hi = two_pi + th1
    else:
        hi = a0 + np.pi
    lo = np.minimum(np.maximum(a0, np.pi - th1), hi)
    g_lo, _ = seg_val(lo, a0, c0, k, tau, phi)
    g_hi, _ = seg_val(hi, a0, c0, k, tau, phi)
    beta = np.where(res | (g_lo <= 0.0), lo, hi)
    def fall_to_zero(rows: np.ndarray, start: np.ndarray, c_seg: np.ndarray,
                     t_lo: np.ndarray, t_hi: np.ndarray) -> np.ndarray:
        """Where the segment from ``start`` (constant ``c_seg``) falls to zero in
        (t_lo, t_hi), for the index array ``rows``."""
        def f(th: np.ndarray, sub: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
            j = rows[sub]
            return seg_val(th, start[j], c_seg[j], k[j], tau[j], phi[j])

        return root_falling(t_lo[rows], t_hi[rows], f)

    search = starts & ~res & (g_lo > 0.0) & (g_hi <= 0.0)
    if search.any():
        idx = np.flatnonzero(search)
        beta[idx] = fall_to_zero(idx, a0, c0, lo, hi)
    outlasts = starts & ~res & (g_hi > 0.0)  # the zero-start current is alive at `hi`

    a = a0.copy()
    b = np.where(starts, beta, a0)
    c = c0.copy()
    cont = np.zeros_like(a)
    fw_len = np.zeros_like(a)
    i_pi = np.zeros_like(a)
    # The hand-over tail of a bridge fired before θ1: from α, i = sin(θ − φ) − k + C_t·e.
    ta = alpha.copy()
    tb = alpha.copy()
    tc = np.zeros_like(a)
    handed = np.zeros(a.shape, dtype=bool)

    def tail(early: np.ndarray, i_h: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Rows ``early`` take over i_h at α: (rows whose tail ends before θ1, its C_t); the
        tail's end goes into ``tb``. The current falls on (α, θ1) (the line is below E)."""
        c_h = i_h + k - np.sin(alpha - phi)
        g_th1, _ = seg_val(th1, alpha, c_h, k, tau, phi)
        ends = early & (g_th1 <= 0.0)
        if ends.any():
            idx = np.flatnonzero(ends)
            tb[idx] = fall_to_zero(idx, alpha, c_h, alpha, th1)
        return ends, np.where(ends, c_h, 0.0)

    if not freewheel and topology == "bridge":
        # Fired before θ1, the current from θ1 may still flow at α + π: the next pair's pulse
        # then takes it over (its line polarity is the higher one), so the state starts at α
        # with that current, which falls while the line is below E. Where it reaches zero
        # before θ1 the pair starts again from zero at θ1 (a gate held past θ1); otherwise
        # the current never stops: continuous at α.
        early = starts & ~res & (alpha < th1) & (beta > alpha + np.pi)
        i_h, _ = seg_val(alpha + np.pi, a0, c0, k, tau, phi)
        handed, tc = tail(early, i_h)
        cc = (outlasts & (alpha >= th1)) | (early & ~handed)
        b = np.where(handed, alpha + np.pi, b)
        # Continuous conduction at the actual α: the steady state of the full bridge.
        q1 = _one_minus_decay(np.pi, tau)
        with np.errstate(divide="ignore", invalid="ignore"):
            c_cont = -2 * np.sin(alpha - phi) / np.where(q1 > 0, q1, 1.0)
        a = np.where(cc, alpha, a)
        b = np.where(cc, alpha + np.pi, b)
        c = np.where(cc, c_cont, c)
        cont = cc.astype(float)
    elif freewheel:
        fw = outlasts  # the SCR current reaches π: the diode takes it over
        delta0 = (np.pi + a0) if topology == "half-wave" else a0
        k1 = _decay(np.pi - a0, tau)
        ip0 = np.sin(phi) - k + c0 * k1
        with np.errstate(divide="ignore", invalid="ignore"):
            x_end = np.where(k > 0, tau * np.log(np.maximum(ip0 + k, _TINY) / np.where(
                k > 0, k, 1.0)), np.inf)
        fw_cont = fw & (x_end >= delta0)
        # Continuous: the steady state at the actual α (the diode holds the load at 0 V, so
        # the line forward-biases the SCR at any α in (0, π)).
        delta = (np.pi + alpha) if topology == "half-wave" else alpha
        # Fired before θ1 with the diode's current still flowing at the next pulse (α, after
        # Δ = δ(α) of freewheeling): the SCR takes it over there, on a line below E, and it
        # falls; continuous if it outlasts θ1, else a tail (α, γ) and a new start at θ1.
        early = fw & ~fw_cont & ~res & (alpha < th1) & (x_end > delta)
        i_hf = (ip0 + k) * _decay(delta, tau) - k
        handed, tc = tail(early, i_hf)
        fw_cont = fw_cont | (early & ~handed)
        k1c = _decay(np.pi - alpha, tau)
        k2c = _decay(delta, tau)
        with np.errstate(divide="ignore", invalid="ignore"):
            i0 = (k2c * (np.sin(phi) - np.sin(alpha - phi) * k1c + k * k1c) - k) / (
                1 - k1c * k2c)
        c_fc = i0 - np.sin(alpha - phi) + k
        a = np.where(fw_cont, alpha, a)
        c = np.where(fw_cont, c_fc, c)
        b = np.where(fw, np.pi, b)
        i_pi = np.where(fw_cont, np.sin(phi) - k + c_fc * k1c, np.where(fw, ip0, 0.0))
        fw_len = np.where(fw_cont | handed, delta,
                          np.where(fw, np.minimum(x_end, delta0), 0.0))
        cont = fw_cont.astype(float)

    s1, s2 = segment_integrals(a=a, b=b, phi=phi, c=c)  # of sin(θ − φ) + C·e, per unit
    length = np.maximum(b - a, 0.0)
    i1 = s1 - k * length
    i2 = s2 - 2 * k * s1 + k * k * length
    t_len = np.maximum(tb - ta, 0.0)
    if handed.any():
        t1, t2 = segment_integrals(a=ta, b=tb, phi=phi, c=tc)
        i1 = i1 + np.where(handed, t1 - k * t_len, 0.0)
        i2 = i2 + np.where(handed, t2 - 2 * k * t1 + k * k * t_len, 0.0)
    amp = i_pi + k  # freewheel: i(x) = amp·e^(−x/τ) − k
    e1 = tau * _one_minus_decay(fw_len, tau)
    e2 = 0.5 * tau * _one_minus_decay(2 * fw_len, tau)
    f1 = amp * e1 - k * fw_len
    f2 = amp * amp * e2 - 2 * k * amp * e1 + k * k * fw_len
    f1 = np.where(fw_len > 0, f1, 0.0)
    f2 = np.where(fw_len > 0, f2, 0.0)
    on = starts | (cont > 0)
    off = np.where(on, np.maximum(period - length - t_len - fw_len, 0.0), period)
    v1 = np.where(on, np.cos(a) - np.cos(b) + np.cos(ta) - np.cos(tb), 0.0)
    v2 = np.where(on, 0.5 * (length + t_len) - 0.25 * (np.sin(2 * b) - np.sin(2 * a)
                                                       + np.sin(2 * tb) - np.sin(2 * ta)), 0.0)
    out = {
        "vdc": (v1 + m * off) / period,
        "vrms": np.sqrt(np.maximum((v2 + m * m * off) / period, 0.0)),
        "idc": np.where(on, (i1 + f1) / period, 0.0),
        "irms": np.sqrt(np.maximum(np.where(on, (i2 + f2) / period, 0.0), 0.0)),
        "it_av": np.where(on, i1 / two_pi, 0.0),
        "it_rms": np.sqrt(np.maximum(np.where(on, i2 / two_pi, 0.0), 0.0)),
    }
    if peak:
        out["it_peak"] = np.where(on, _segment_peak(a, b, phi, c) - k, 0.0)
    out.update(beta=np.where(handed & (not freewheel), tb + np.pi, b),
               conduction=np.where(on, length + t_len, 0.0), alpha_eff=a, continuous=cont,
               seg_a=a, seg_b=b, seg_c=c, offset=k, theta1=th1, fw_len=fw_len, i_pi=i_pi,
               handed=handed.astype(float), tail_a=ta, tail_b=tb, tail_c=tc)
    return {key: v.reshape(shape) for key, v in out.items()}


def stage_values(*, topology: str, freewheel: bool, vs: np.ndarray, r: np.ndarray,
                 l: np.ndarray, omega: np.ndarray, alpha: np.ndarray,  # noqa: E741
                 e: np.ndarray, peak: bool = True) -> dict[str, np.ndarray]:
    """:func:`waveform_pu` in SI, with the keys of :func:`checks.power.stage_values`.

    vs [V RMS]; r [Ω] > 0; l [H]; omega [rad/s]; alpha [rad]; e [V] back EMF. ``load_power``
    [W] is what the load absorbs, E·I_dc + R·I_rms² (charge power plus resistive loss);
    ``emf_power`` = E·I_dc; ``theta1`` [rad].

    >>> v = stage_values(topology="bridge", freewheel=False, vs=120.0, r=0.5, l=6.5e-3,
    ...                  omega=2 * np.pi * 60, alpha=np.pi / 3, e=10.0)  # Rashid 4e Ex 10.2
    >>> round(float(v["idc"]), 2), round(float(v["it_rms"]), 2)
    (88.04, 63.7)
    """
    vm, r, l, omega, alpha, e = np.broadcast_arrays(np.sqrt(2.0) * _a(vs), _a(r), _a(l),
                                                    _a(omega), _a(alpha), _a(e))
    x = omega * l
    z = np.hypot(r, x)
    phi = np.arctan2(x, r)
    w = waveform_pu(topology=topology, freewheel=freewheel, alpha=alpha, phi=phi, m=e / vm,
                    peak=peak)
    ib = vm / z
    out = {key: w[key] * vm for key in ("vdc", "vrms")}
    out.update({key: w[key] * ib for key in ("idc", "irms", "it_av", "it_rms", "it_peak")
                if key in w})
    out.update(beta=w["beta"], conduction=w["conduction"], alpha_eff=w["alpha_eff"],
               continuous=w["continuous"], phi=phi, vm=vm, seg_a=w["seg_a"], seg_b=w["seg_b"],
               seg_c=w["seg_c"], theta1=w["theta1"], e=e, offset=w["offset"],
               fw_len=w["fw_len"], i_pi=w["i_pi"], handed=w["handed"], tail_a=w["tail_a"],
               tail_b=w["tail_b"], tail_c=w["tail_c"])
    out["emf_power"] = e * out["idc"]
    out["load_power"] = out["emf_power"] + out["irms"] ** 2 * r
    return out


def segment_current(*, theta: np.ndarray, a: np.ndarray, c: np.ndarray, phi: np.ndarray,
                    k: np.ndarray) -> np.ndarray:
    """The SCR segment current i(θ) = sin(θ − φ) − k + C·e^(−(θ − a)/tan φ) [per unit]."""
    tau = np.tan(np.clip(_a(phi), 0.0, np.arctan(1e12)))
    return np.sin(_a(theta) - phi) - k + _a(c) * _decay(_a(theta) - a, tau)


def dropout_angle(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                  omega: np.ndarray, alpha: np.ndarray, e: np.ndarray, topology: str,
                  freewheel: bool, ih: np.ndarray) -> np.ndarray:
    """Where the falling SCR current reaches IH before it ends [rad]; NaN where the current
    never reaches IH. A continuous bridge hands its current to the next pair at α + π, and a
    freewheeling SCR hands it to the diode at π: there the angle is the hand-over itself.
    Arguments as :func:`stage_values`; ih [A]. A 257-point grid finds the last sample above
    IH; 50 bisection steps refine it (vectorised over the rows).

    >>> round(float(np.degrees(dropout_angle(vs=100 / np.sqrt(2), r=10.0, l=0.0, omega=314.16,
    ...     alpha=0.0, e=50.0, topology="half-wave", freewheel=False, ih=0.1))), 2)
    149.34
    """
    v = stage_values(topology=topology, freewheel=freewheel, vs=vs, r=r, l=l, omega=omega,
                     alpha=alpha, e=e, peak=True)
    shape = v["seg_a"].shape
    a, b, c = (v[n].ravel() for n in ("seg_a", "seg_b", "seg_c"))
    phi, k = v["phi"].ravel(), v["offset"].ravel()
    target = np.broadcast_to(_a(ih) * np.hypot(_a(r), _a(omega) * _a(l)) / v["vm"],
                             shape).ravel()
    frac = np.linspace(0.0, 1.0, 257)
    grid = a[:, None] + (b - a)[:, None] * frac
    cur = segment_current(theta=grid, a=a[:, None], c=c[:, None], phi=phi[:, None],
                          k=k[:, None])
    above = cur >= target[:, None]
    reach = above.any(axis=1)
    last = np.where(reach, 256 - np.argmax(above[:, ::-1], axis=1), 0)
    lo = a + (b - a) * np.minimum(last, 256) / 256
    hi = np.minimum(lo + (b - a) / 256, b)
    handed = last >= 256  # still above IH where the SCR hands the current over
    for _ in range(50):
        mid = 0.5 * (lo + hi)
        up = segment_current(theta=mid, a=a, c=c, phi=phi, k=k) >= target
        lo = np.where(up, mid, lo)
        hi = np.where(up, hi, mid)
    out = np.where(handed, b, 0.5 * (lo + hi))
    return np.where(reach, out, np.nan).reshape(shape)


# --------------------------------------------------------------------------------------------
# Checks that read the load current of a back-EMF load. They follow checks.power's checks of
# the same name; the current here is the R–L–E current.

def first_peak(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
               omega: np.ndarray, alpha: np.ndarray, e: np.ndarray) -> np.ndarray:
    """The largest current after firing at α from zero current [A]: the peak of the segment
    from max(α, θ1) to its extinction (a first firing from rest, the least current the SCR
    sees after a pulse; steady continuous conduction only adds to it). 0 where the line never
    exceeds E after α. Arguments as :func:`stage_values`.

    >>> round(float(first_peak(vs=100 / np.sqrt(2), r=10.0, l=0.0, omega=314.16,
    ...                        alpha=np.radians(150), e=20.0)), 6)
    3.0
    """
    v = stage_values(topology="half-wave", freewheel=False, vs=vs, r=r, l=l, omega=omega,
                     alpha=alpha, e=e, peak=True)
    return v["it_peak"]


def max_firing_angle(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                     omega: np.ndarray, e: np.ndarray, il: np.ndarray) -> np.ndarray:
    """Latest α at which the current after firing still reaches IL [rad]: bisection of
    :func:`first_peak` = IL over [max(π/2, θ1), π − θ1], where the peak falls as α grows; NaN
    when even firing at max(π/2, θ1) stays below IL. il [A]; the rest as :func:`stage_values`.

    >>> round(float(np.degrees(max_firing_angle(vs=100 / np.sqrt(2), r=10.0, l=0.0,
    ...     omega=314.16, e=20.0, il=3.0))), 4)
    150.0
    """
    # Each distinct row once: a corner table repeats these six for the inputs the angle does
    # not read (65 rows, 9 distinct on the demos), and every row's bisection is its own.
    cols, back = distinct_rows(vs, r, l, omega, e, il)
    return np.asarray(_max_firing_angle(*cols)[back])


def _max_firing_angle(vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                      omega: np.ndarray, e: np.ndarray, il: np.ndarray) -> np.ndarray:
    th1 = emf_angle(vm=np.sqrt(2) * vs, e=e)
    lo = np.maximum(np.pi / 2, th1)
    hi = np.maximum(np.pi - th1, lo)
    ok = first_peak(vs=vs, r=r, l=l, omega=omega, alpha=lo, e=e) >= il
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        reach = first_peak(vs=vs, r=r, l=l, omega=omega, alpha=mid, e=e) >= il
        lo = np.where(reach, mid, lo)
        hi = np.where(reach, hi, mid)
    return np.where(ok, 0.5 * (lo + hi), np.nan)


def latching_check(*, vs: np.ndarray, r: np.ndarray, l: np.ndarray,  # noqa: E741
                   omega: np.ndarray, alpha: np.ndarray, alpha_lo: np.ndarray,
                   alpha_hi: np.ndarray, e: np.ndarray, il_cold: np.ndarray,
                   limits: Mapping[str, float]) -> Outcome:
    """``power.latching`` with a back EMF: min over α_lo, α_hi of :func:`first_peak` / IL_c,
    graded with ``fail_below``; ``anode_current_at_fire`` is the first peak at the row's α and
    ``max_firing_angle`` comes from :func:`max_firing_angle`. The largest E is the worst.

    >>> o = latching_check(vs=np.array([100 / np.sqrt(2)]), r=10.0, l=0.0, omega=314.16,
    ...                    alpha=np.radians(150), alpha_lo=np.radians(30),
    ...                    alpha_hi=np.radians(150), e=20.0, il_cold=4.0, limits={})
    >>> o.status.tolist(), round(float(o.values["reach_current"][0]), 3)
    ([2], 3.0)
    """
    il_cold = _a(il_cold)
    kw = dict(vs=vs, r=r, l=l, omega=omega, e=e)
    at_fire = first_peak(alpha=alpha, **kw)
    th1 = emf_angle(vm=np.sqrt(2) * _a(vs), e=e)

    def peak_or_none(a: np.ndarray) -> np.ndarray:
        # Where the line never exceeds E after α there is no current to latch (a dead band,
        # said by power.control), not a latching failure.
        dead = np.maximum(_a(a), th1) >= np.pi - th1
        return np.where(dead, np.inf, first_peak(alpha=a, **kw))

    reach = np.minimum(peak_or_none(alpha_lo), peak_or_none(alpha_hi))
    margin, status = grade(reach / il_cold, limits)
    margin = np.where(np.isinf(reach), np.inf, margin)
    reach = np.where(np.isinf(reach), np.nan, reach)
    amax = max_firing_angle(il=il_cold, **kw)
    return Outcome({"anode_current_at_fire": at_fire, "il": il_cold + 0 * at_fire,
                    "max_firing_angle": amax + 0 * at_fire, "reach_current": reach},
                   margin, status)


def holding_check(*, topology: str, freewheel: bool, vs: np.ndarray, r: np.ndarray,
                  l: np.ndarray, omega: np.ndarray, alpha: np.ndarray,  # noqa: E741
                  e: np.ndarray, ih_cold: np.ndarray, limits: Mapping[str, float]) -> Outcome:
    """``power.holding`` with a back EMF: the angle where the SCR current falls to IH_c
    (:func:`dropout_angle`), reported with pass; fail where the current never reaches IH_c
    (margin = peak/IH − 1 there).

    >>> o = holding_check(topology="half-wave", freewheel=False, vs=np.array([50.0]), r=10.0,
    ...                   l=0.0, omega=314.16, alpha=0.5, e=60.0, ih_cold=2.0, limits={})
    >>> o.status.tolist()
    [2]
    """
    ih = _a(ih_cold)
    v = stage_values(topology=topology, freewheel=freewheel, vs=vs, r=r, l=l, omega=omega,
                     alpha=alpha, e=e, peak=True)
    peak = v["it_peak"]
    drop = dropout_angle(vs=vs, r=r, l=l, omega=omega, alpha=alpha, e=e, topology=topology,
                         freewheel=freewheel, ih=ih)
    th1 = emf_angle(vm=np.sqrt(2) * _a(vs), e=e)
    dead = (np.maximum(_a(alpha), th1) >= np.pi - th1) & (v["continuous"] == 0)
    never = np.isnan(drop) & ~dead
    status = np.where(never, FAIL, PASS).astype(np.int8)
    with np.errstate(divide="ignore", invalid="ignore"):
        margin = np.where(never, peak / ih - 1.0, np.inf)
    return Outcome({"load_current": peak, "ih": ih + 0 * peak, "dropout_angle": drop},
                   margin, status)


def surge_check(*, vs: np.ndarray, r_cold: np.ndarray, l: np.ndarray,  # noqa: E741
                omega: np.ndarray, alpha: np.ndarray, e_start: np.ndarray, itsm: np.ndarray,
                t_sm: np.ndarray, limits: Mapping[str, float]) -> Outcome:
    """``power.surge`` with a back EMF: the first half-cycle from rest into the cold load with
    the EMF at its start value ``e_start`` [V] (a motor at standstill has none; a battery its
    lowest), :func:`first_peak`, against ITSM at the line's half-cycle
    (:func:`checks.power.itsm_at`).

    >>> o = surge_check(vs=np.array([253.0]), r_cold=2.0, l=0.0, omega=314.16, alpha=0.0,
    ...                 e_start=0.0, itsm=200.0, t_sm=0.01, limits={})
    >>> o.status.tolist(), round(float(o.values["inrush_peak"][0]), 1)
    ([0], 178.9)
    """
    from checks.power import itsm_at

    peak = first_peak(vs=vs, r=r_cold, l=l, omega=omega, alpha=alpha, e=e_start)
    rating = itsm_at(itsm=itsm, t_sm=t_sm, t=np.pi / _a(omega))
    with np.errstate(divide="ignore"):
        margin, status = grade(rating / peak, limits)
    return Outcome({"inrush_peak": peak, "itsm_at_line": rating + 0 * peak}, margin, status)


def control_check(*, vs: np.ndarray, e: np.ndarray, alpha_lo: np.ndarray,
                  alpha_hi: np.ndarray, limits: Mapping[str, float], topology: str = "",
                  freewheel: bool = False, r: np.ndarray | None = None,
                  l: np.ndarray | None = None,  # noqa: E741
                  omega: np.ndarray | None = None) -> Outcome:
    """``power.control`` with a back EMF: firing before θ1 = asin(E/Vm) starts no current, so a
    firing range that begins below θ1 has lost control there (a narrow gate pulse misses the
    half-cycle; a wide one fires at θ1 whatever the setting)  [1, §3], [2, ch. 6].

    metric = α_min/θ1 (graded with ``fail_below``); ``last_angle`` = π − θ1, the latest firing
    that gives any current. vs [V RMS]; e [V]; alpha_lo, alpha_hi [rad].

    With the load (``topology``, ``freewheel``, ``r`` [Ω], ``l`` [H], ``omega`` [rad/s]): a
    row whose current at α_lo still flows from the previous half-cycle without a break
    (continuous conduction, :func:`waveform_pu`; not a hand-over tail that dies before θ1)
    keeps control below θ1 — the incoming SCR is forward-biased by the line against the
    outgoing pair (2·v) or the freewheeling diode (v), so even a narrow pulse fires it at
    α. ``kept_by_current`` is 1 there and the row is marginal, not failed: control holds
    only while the current runs; from rest (or after the current has stopped) a narrow
    pulse below θ1 does nothing, so the start must come from α ≥ θ1 or a gate held past θ1.

    >>> o = control_check(vs=np.array([60.0]), e=12.0, alpha_lo=np.radians(5),
    ...                   alpha_hi=np.radians(120), limits={})
    >>> o.status.tolist(), round(float(np.degrees(o.values["emf_angle"][0])), 2)
    ([2], 8.13)
    """
    th1 = emf_angle(vm=np.sqrt(2) * _a(vs), e=e)
    lo = _a(alpha_lo) + 0 * th1
    with np.errstate(divide="ignore", invalid="ignore"):
        metric = np.where(th1 > 0, lo / th1, np.inf)
    margin, status = grade(metric, limits)
    margin = np.where(np.isinf(metric), np.inf, margin)
    kept = np.zeros(np.shape(status), dtype=bool)
    if r is not None and l is not None and omega is not None and topology in TOPOLOGIES:
        v = stage_values(topology=topology, freewheel=freewheel, vs=vs, r=r, l=l,
                         omega=omega, alpha=lo, e=e, peak=False)
        kept = (status == FAIL) & (v["continuous"] > 0) & (v["handed"] == 0)
        status = np.where(kept, MARGINAL, status).astype(np.int8)
        margin = np.where(kept, 0.0, margin)
    return Outcome({"emf_angle": th1, "alpha_min": lo, "alpha_max": _a(alpha_hi) + 0 * th1,
                    "last_angle": np.pi - th1, "kept_by_current": kept + 0.0 * th1},
                   margin, status)


def load_waveform(*, topology: str, freewheel: bool, vs: float, r: float, l: float,  # noqa: E741
                  omega: float, alpha: float, e: float,
                  points: int = 721) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """One cycle of the load's terminal voltage and current with a back EMF, (θ [rad],
    v_load [V], i_load [A]), for plots: the steady state of :func:`waveform_pu`. The
    terminals sit at E while no current flows and at 0 V while the diode freewheels.
    Arguments as :func:`stage_values` (scalars); ``points`` samples over 0..2π.

    >>> th, v, i = load_waveform(topology="half-wave", freewheel=False, vs=100 / np.sqrt(2),
    ...                          r=10.0, l=0.0, omega=314.16, alpha=0.0, e=50.0, points=5)
    >>> v.round(6).tolist(), i.round(6).tolist()
    ([50.0, 100.0, 50.0, 50.0, 50.0], [0.0, 5.0, 0.0, 0.0, 0.0])
    """
    vm = float(np.sqrt(2.0) * vs)
    z = float(np.hypot(r, omega * l))
    phi = float(np.arctan2(omega * l, r))
    w = waveform_pu(topology=topology, freewheel=freewheel, alpha=alpha, phi=phi, m=e / vm)
    a, b, c, k = (float(w[n]) for n in ("seg_a", "seg_b", "seg_c", "offset"))
    fw_len, i_pi = float(w["fw_len"]), float(w["i_pi"])
    tau = float(np.tan(phi))
    theta = np.linspace(0.0, 2 * np.pi, points)
    src = np.sin(theta)
    conducts = float(w["conduction"]) > 0
    v_load = np.full_like(theta, e / vm)
    i_load = np.zeros_like(theta)
    starts = [(0.0, 1.0)] if topology == "half-wave" else [(0.0, 1.0), (np.pi, -1.0)]
    for shift, sign in starts:
        if not conducts:
            break
        x = np.mod(theta - a - shift, 2 * np.pi)
        on = x <= (b - a)
        cur = np.sin(x + a - phi) - k + c * _decay(x, tau)
        i_load = np.where(on, cur, i_load)
        v_load = np.where(on, sign * src, v_load)
        if float(w["handed"]) > 0:  # the current taken over at the pulse, to its end
            ta, tb, tc = (float(w[n]) for n in ("tail_a", "tail_b", "tail_c"))
            xt = np.mod(theta - ta - shift, 2 * np.pi)
            on_t = (xt <= tb - ta) & ~on
            cur_t = np.sin(xt + ta - phi) - k + tc * _decay(xt, tau)
            i_load = np.where(on_t, cur_t, i_load)
            v_load = np.where(on_t, sign * src, v_load)
        if fw_len > 0:
            y = np.mod(theta - np.pi - shift, 2 * np.pi)
            fw = (y < fw_len) & ~on
            i_load = np.where(fw, (i_pi + k) * _decay(y, tau) - k, i_load)
            v_load = np.where(fw, 0.0, v_load)
    return theta, v_load * vm, np.maximum(i_load, 0.0) * vm / z


# --------------------------------------------------------------------------------------------
# power.output of a back-EMF load: the worst corner over the E and R ranges.

def transfer_current(w: Mapping[str, np.ndarray], phi: np.ndarray) -> np.ndarray:
    """The load current at the firing of a :func:`waveform_pu` result (load angle ``phi``)
    [per unit]: what the incoming SCR takes over from the conducting pair (or the
    freewheeling diode) through the supply inductance. Zero where each firing starts from
    zero current."""
    k = w["offset"]
    at_a = np.sin(w["seg_a"] - phi) - k + w["seg_c"]  # continuous: i at α (start)
    at_tail = np.sin(w["tail_a"] - phi) - k + w["tail_c"]  # hand-over: i at α
    i_t = np.where(w["handed"] > 0, at_tail, np.where(w["continuous"] > 0, at_a, 0.0))
    return np.maximum(i_t, 0.0)


def _output_grid(*, topology: str, freewheel: bool, quantity: str, vm: np.ndarray,
                 r: np.ndarray, l: np.ndarray, omega: np.ndarray,  # noqa: E741
                 alpha: np.ndarray, e: np.ndarray, l_s: np.ndarray | None,
                 err_low: bool = True) -> np.ndarray:
    """The output ``quantity`` at arrays of the same shape (SI), the supply inductance's
    overlap taken off where the current is still flowing at the firing (continuous or a
    hand-over): ΔV ≈ c·i_t/(1 + c/R), c = 2ωL_s/π (fully controlled: one transfer of 2·i_t)
    or ωL_s/π (half-controlled: the SCR takes i_t from the diode leg), i_t the current at the
    transfer; the mean current falls by ΔV/R (a DC shift of the current). Outside the
    overlaps L_s is in series with the load, so the waveform is that of L + L_s (the mean of
    L_s·di/dt over a periodic current is zero: the load terminals see the same mean).
    The two sides err apart, each to its safe side (checked against the circuit solved in
    time): with ``err_low`` (the full output) ΔV = c·i_t, the current not lowered by its own
    drop, for every transfer; without (the minimum output) a continuous current's
    ΔV = c·i_t/(1 + c/R) and none for a hand-over (whose loss that over-states: its current
    is not a DC level the drop shifts)."""
    with_ls = l_s is not None and topology == "bridge"
    x = omega * (l + l_s if with_ls else l)
    z = np.hypot(r, x)
    phi = np.arctan2(x, r)
    w = waveform_pu(topology=topology, freewheel=freewheel, alpha=alpha, phi=phi, m=e / vm,
                    peak=False)
    ib = vm / z
    vdc, idc, irms = w["vdc"] * vm, w["idc"] * ib, w["irms"] * ib
    if with_ls:
        assert l_s is not None
        i_t = transfer_current(w, phi) * ib
        c = (1.0 if freewheel else 2.0) * omega * l_s / np.pi
        # err_low: the current unlowered by its own drop, more loss.
        drop = c * i_t if err_low else np.where(w["handed"] > 0, 0.0, c * i_t / (1.0 + c / r))
        d = drop / r
        vdc = vdc - drop
        irms = np.sqrt(np.maximum(irms ** 2 - 2 * idc * d + d * d, 0.0))
        idc = np.maximum(idc - d, 0.0)
    if quantity == "voltage":
        return vdc
    if quantity == "current":
        return idc
    return e * idc + r * irms ** 2


def _scan(f: Callable[[np.ndarray, np.ndarray], np.ndarray], lo: np.ndarray, hi: np.ndarray,
          fixed: np.ndarray, pick: int, sign: float, best: np.ndarray, arg: np.ndarray,
          other: np.ndarray, n: int = 17, passes: int = 3) -> tuple[np.ndarray, ...]:
    """Refine the least sign·f over one coordinate (``pick`` 0: E, 1: R) on [lo, hi] per row,
    the other held at ``fixed``: a grid of n points, then twice a grid across the best
    point's neighbours. Returns the least (best, arg, other) including the given ones, so a
    refinement can only find a worse corner, never lose one."""
    a, b = lo.copy(), hi.copy()
    frac = np.linspace(0.0, 1.0, n)
    for _ in range(passes):
        pts = a[:, None] + (b - a)[:, None] * frac
        fix = np.broadcast_to(fixed[:, None], pts.shape)
        val = sign * (f(pts, fix) if pick == 0 else f(fix, pts))
        j = np.argmin(val, axis=1)
        rows = np.arange(len(j))
        v = val[rows, j]
        take = v < best
        best = np.where(take, v, best)
        arg = np.where(take, pts[rows, j], arg)
        other = np.where(take, fixed, other)
        step = (b - a) / (n - 1)
        a, b = np.maximum(pts[rows, j] - step, lo), np.minimum(pts[rows, j] + step, hi)
    return best, arg, other


def output_extremes(*, topology: str, freewheel: bool, quantity: str, vs: np.ndarray,
                    r_lo: np.ndarray, r_hi: np.ndarray, l: np.ndarray,  # noqa: E741
                    omega: np.ndarray, alpha_lo: np.ndarray, alpha_hi: np.ndarray,
                    e_lo: np.ndarray, e_hi: np.ndarray,
                    l_s: np.ndarray | None = None) -> dict[str, np.ndarray]:
    """The full output (least over the E and R ranges at α_lo) and the minimum output (most
    over them at α_hi) of a back-EMF load, per row (the row's line and inductance).

    ``quantity``: ``voltage`` (mean terminal voltage: the line while the load conducts, 0 V
    while a diode freewheels, E while no current flows), ``current`` (mean charge or armature
    current) or ``power`` (E·I_dc + R·I_rms²), each from the exact waveform
    (:func:`waveform_pu`: discontinuous, continuous, freewheeling, hand-over); with ``l_s``
    [H] a bridge's overlap is taken off (:func:`_output_grid`). The extremes need not lie at
    the ends of the E range (the terminal voltage is least where the conduction turns
    continuous, the power can peak inside the ranges), so a 17 × 5 grid over E × R is refined
    around its worst point, first along E, then along R (a grid of 17 across the neighbours,
    three times each). The minimum of a ``voltage`` is taken at E = e_lo only: V_dc = E +
    R·I_dc ≥ E, so no setting holds a faster motor below its own EMF; the range's low end
    asks for the slow state.

    vs [V RMS]; r_lo, r_hi [Ω]; l [H]; omega [rad/s]; alpha_lo, alpha_hi [rad]; e_lo, e_hi [V].
    Returns ``full``, ``e_full``, ``r_full``, ``least``, ``e_least``, ``r_least``.

    >>> o = output_extremes(topology="bridge", freewheel=True, quantity="voltage",
    ...     vs=207.0, r_lo=7.2, r_hi=8.8, l=0.08, omega=2 * np.pi * 50,
    ...     alpha_lo=np.radians(40), alpha_hi=np.radians(135), e_lo=80.0, e_hi=150.0)
    >>> round(float(o["full"]), 2), round(float(o["e_full"]), 1)  # continuous: (Vm/π)(1+cos α)
    (164.56, 80.0)
    """
    # Each distinct row once: a corner table repeats these for the row's own E and R, which
    # the search does not read.
    cols, back = distinct_rows(vs, r_lo, r_hi, l, omega, alpha_lo, alpha_hi, e_lo, e_hi,
                               0.0 if l_s is None else l_s)
    vs_, rl, rh, ll, om, alo, ahi, el, eh, ls = cols
    vm = np.sqrt(2.0) * vs_
    out: dict[str, np.ndarray] = {}
    # The minimum terminal voltage is taken at the least E: V_dc = E + R·I_dc ≥ E, so no
    # setting brings a faster motor below its own EMF; what the range asks is the slow state.
    eh_least = el if quantity == "voltage" else eh
    for name, alpha, sign, top in (("full", alo, 1.0, eh), ("least", ahi, -1.0, eh_least)):
        def f(e: np.ndarray, r: np.ndarray, alpha: np.ndarray = alpha,
              full: bool = sign > 0) -> np.ndarray:
            col = (slice(None), None)
            return _output_grid(topology=topology, freewheel=freewheel, quantity=quantity,
                                vm=vm[col], r=r, l=ll[col], omega=om[col], alpha=alpha[col],
                                e=e, l_s=None if l_s is None else ls[col],
                                err_low=full)

        fe = np.linspace(0.0, 1.0, 17)
        fr = np.linspace(0.0, 1.0, 5)
        eg = (el[:, None] + (top - el)[:, None] * fe)[:, None, :] + 0 * fr[None, :, None]
        rg = (rl[:, None] + (rh - rl)[:, None] * fr)[:, :, None] + 0 * fe[None, None, :]
        val = sign * f(eg.reshape(len(vm), -1), rg.reshape(len(vm), -1))
        j = np.argmin(val, axis=1)
        rows = np.arange(len(j))
        best = val[rows, j]
        e_b = eg.reshape(len(vm), -1)[rows, j]
        r_b = rg.reshape(len(vm), -1)[rows, j]
        best, e_b, r_b = _scan(f, el, top, r_b, 0, sign, best, e_b, r_b)
        best, r_b, e_b = _scan(f, rl, rh, e_b, 1, sign, best, r_b, e_b)
        out[name] = (sign * best)[back]
        out["e_" + name] = e_b[back]
        out["r_" + name] = r_b[back]
    return out


def output_check(*, outcome: Outcome, extremes: Mapping[str, np.ndarray], req_lo: np.ndarray,
                 req_hi: np.ndarray, limits: Mapping[str, float]) -> Outcome:
    """``power.output`` of a back-EMF load regraded on :func:`output_extremes`: the row's
    values of ``outcome`` (:func:`checks.power.output_check`) with ``output_at_min`` (full
    output) and ``output_at_max`` (minimum output) replaced by the worst over the E and R
    ranges, and ``e_at_full``, ``r_at_full``, ``e_at_least``, ``r_at_least`` where they occur.
    Metric = min(full/req_hi, req_lo/least), graded with ``fail_below`` (NaN: not required).
    """
    full, least = _a(extremes["full"]), _a(extremes["least"])
    with np.errstate(divide="ignore", invalid="ignore"):
        m_full = np.where(np.isnan(req_hi), np.inf, full / _a(req_hi))
        m_min = np.where(np.isnan(req_lo), np.inf,
                         np.where(least > 0, _a(req_lo) / least, np.inf))
    metric = np.minimum(m_full, m_min)
    margin, status = grade(metric, limits)
    margin = np.where(np.isinf(metric), np.inf, margin)
    vals = dict(outcome.values)
    vals.update(output_at_min=full + 0 * margin, output_at_max=least + 0 * margin,
                e_at_full=extremes["e_full"] + 0 * margin,
                r_at_full=extremes["r_full"] + 0 * margin,
                e_at_least=extremes["e_least"] + 0 * margin,
                r_at_least=extremes["r_least"] + 0 * margin)
    return Outcome(vals, margin, status, list(outcome.notes))
