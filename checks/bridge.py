"""Commutation overlap of single-phase bridges with source inductance: the fully controlled
bridge and the half-controlled bridge (semi-converter) whose diode leg freewheels the load.

When the incoming pair is fired, the supply's inductance L_s keeps both pairs conducting while
the line current reverses from −I_d to +I_d: the output is shorted (v_d = 0) for the overlap
angle μ, with  Vm·(cos α − cos(α + μ)) = 2·ω·L_s·I_d,  so the mean output falls by
ΔV = (2/π)·ω·L_s·I_d. With a ripple-free load current into R and a back EMF E,
I_d = [(2Vm/π)·cos α − E]/(R + 2ωL_s/π). Commutation fails (no μ) when
cos α − 2ωL_s·I_d/Vm < −1: the current cannot transfer before the line reverses.

A half-controlled bridge makes two transfers of I_d (not one of 2·I_d) per half-cycle: at the
line zero its diode leg takes the load current over (freewheeling) while the line current falls
from I_d to 0, over μ_d with cos μ_d = 1 − ωL_s·I_d/Vm; at the firing the incoming SCR takes
it from the freewheeling path while the line current rises from 0 to I_d, over μ with
cos(α + μ) = cos α − ωL_s·I_d/Vm. The output is zero during both (and while it freewheels), so
V_d = (Vm/π)·(1 + cos α) − ωL_s·I_d/π: half the full bridge's drop. Fired before the diode
transfer ends (α < μ_d) the line current runs on from −I_d to +I_d in one overlap from the line
zero, as in a diode bridge: V_d = 2Vm/π − 2ωL_s·I_d/π; both are the first form with
α' = max(α, μ_d).

References
----------
[1] N. Mohan, T. M. Undeland & W. P. Robbins, *Power Electronics: Converters, Applications, and
    Design*, ch. 5–6 (line-frequency rectifiers with L_s: commutation, ΔV_d = (2/π)·ωL_s·I_d).
[2] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §10
    (effects of source inductance on single-phase converters).
[3] P. S. Bimbhra, *Power Electronics*, ch. 6 (single-phase semi-converter with source
    inductance: V_d = (Vm/π)(1 + cos α) − (ωL_s/π)·I_d) [from memory].
"""

from __future__ import annotations

import numpy as np

from checks.core import FAIL, Outcome
from checks.turnoff import overlap_angle


def _a(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


def overlap_drop(*, omega: np.ndarray, l_s: np.ndarray, i_d: np.ndarray) -> np.ndarray:
    """Mean output lost to the overlap, ΔV = (2/π)·ω·L_s·I_d [V]  [1, ch. 5–6].

    omega [rad/s]; l_s [H]; i_d [A] the (ripple-free) current transferred.

    >>> round(float(overlap_drop(omega=2 * np.pi * 60, l_s=1e-3, i_d=10.0)), 3)
    2.4
    """
    return 2.0 / np.pi * _a(omega) * _a(l_s) * _a(i_d)


def overlap_output(*, vs: np.ndarray, r: np.ndarray, omega: np.ndarray, l_s: np.ndarray,
                   alpha: np.ndarray, e: np.ndarray | float = 0.0) -> dict[str, np.ndarray]:
    """A full bridge in continuous, ripple-free conduction with source inductance.

    Returns ``i_d`` [A] = [(2Vm/π)·cos α − E]/(R + 2ωL_s/π) (0 where that is negative),
    ``vdc`` [V] = (2Vm/π)·cos α − ΔV, ``drop`` ΔV [V] and ``mu`` [rad] (NaN where the
    commutation fails). vs [V RMS]; r [Ω]; omega [rad/s]; l_s [H]; alpha [rad]; e [V].

    >>> o = overlap_output(vs=230.0, r=8.0, omega=2 * np.pi * 50, l_s=1e-3,
    ...                    alpha=np.radians(30), e=0.0)
    >>> round(float(o["i_d"]), 3), round(float(np.degrees(o["mu"])), 2)
    (21.87, 4.53)
    """
    vm = np.sqrt(2.0) * _a(vs)
    vd0 = 2.0 * vm / np.pi * np.cos(_a(alpha))
    rc = 2.0 * _a(omega) * _a(l_s) / np.pi
    i_d = np.maximum((vd0 - _a(e)) / (_a(r) + rc), 0.0)
    drop = overlap_drop(omega=omega, l_s=l_s, i_d=i_d)
    mu = overlap_angle(alpha=alpha, omega=omega, l_s=l_s, i_d=i_d, vm=vm)
    return {"i_d": i_d, "vdc": vd0 - drop, "drop": drop, "mu": mu}


def semi_overlap_output(*, vs: np.ndarray, r: np.ndarray, omega: np.ndarray,
                        l_s: np.ndarray, alpha: np.ndarray,
                        e: np.ndarray | float = 0.0) -> dict[str, np.ndarray]:
    """A half-controlled bridge (diode leg freewheeling) in continuous, ripple-free conduction
    with source inductance  [3], [1, ch. 5–6 (the diode bridge for α < μ_d)].

    With x = ωL_s·I_d/Vm: the diode-leg transfer at the line zero lasts μ_d = acos(1 − x); the
    firing transfer from α' = max(α, μ_d) lasts μ with cos(α' + μ) = cos α' − x (for α < μ_d
    the two are one, from the line zero, 2·x); V_d = (Vm/π)·(1 + cos α') − ωL_s·I_d/π, and
    I_d = [(Vm/π)·(1 + cos α') − E]/(R + ωL_s/π) (0 where negative). α < μ_d at that current
    gives the diode-bridge current [2Vm/π − E]/(R + 2ωL_s/π).

    Returns ``i_d`` [A], ``vdc`` [V], ``drop`` [V] the mean output lost to the overlaps
    ((Vm/π)(1 + cos α) − V_d), ``mu`` [rad] the firing overlap (from α; for α < μ_d the whole
    overlap from the line zero less α), ``mu_d`` [rad] the diode-leg transfer (NaN where the
    firing interrupts it), ``mu_end`` [rad] where the output leaves zero. NaN μ where the
    transfer cannot end before π. vs [V RMS]; r [Ω]; omega [rad/s]; l_s [H]; alpha [rad]; e [V].

    >>> o = semi_overlap_output(vs=230.0, r=8.0, omega=2 * np.pi * 50, l_s=1e-3,
    ...                         alpha=np.radians(30), e=0.0)
    >>> round(float(o["i_d"]), 3), round(float(np.degrees(o["mu"])), 3)
    (23.852, 2.543)
    """
    vm = np.sqrt(2.0) * _a(vs)
    xl = _a(omega) * _a(l_s)
    a = _a(alpha)
    r, e = _a(r), _a(e)
    i_semi = np.maximum((vm / np.pi * (1 + np.cos(a)) - e) / (r + xl / np.pi), 0.0)
    i_diode = np.maximum((2 * vm / np.pi - e) / (r + 2 * xl / np.pi), 0.0)
    # The diode-leg transfer at I_d is over by α when 1 − cos α ≥ x.
    early = (1 - np.cos(a)) < xl * i_semi / vm
    i_d = np.where(early, i_diode, i_semi)
    x = xl * i_d / vm
    mu_d = np.arccos(np.clip(1 - x, -1.0, 1.0))
    a_eff = np.maximum(a, mu_d)
    arg = np.cos(a_eff) - np.where(early, 0.0, x)
    if_early = 1 - 2 * x  # the one overlap from the line zero
    arg = np.where(early, if_early, arg)
    with np.errstate(invalid="ignore"):
        end = np.where(arg >= -1.0, np.arccos(np.clip(arg, -1.0, 1.0)), np.nan)
    vdc = vm / np.pi * (1 + np.cos(a_eff)) - xl * i_d / np.pi
    return {"i_d": i_d, "vdc": vdc, "drop": vm / np.pi * (1 + np.cos(a)) - vdc,
            "mu": end - a, "mu_d": np.where(early, np.nan, mu_d), "mu_end": end}


def transfer_overlap(*, vs: np.ndarray, r: np.ndarray, omega: np.ndarray, l_s: np.ndarray,
                     alpha: np.ndarray, i_t: np.ndarray, i_pi: np.ndarray | float = 0.0,
                     semi: bool = False, l: np.ndarray | None = None,  # noqa: E741
                     e: np.ndarray | float = 0.0,
                     continuous: np.ndarray | None = None) -> dict[str, np.ndarray]:
    """The overlap of a transfer at the firing of a current ``i_t`` [A] that is not the ripple-
    free I_d: a bridge fired before the line exceeds the back EMF whose current still flows
    at the next pulse (a hand-over), or any waveform whose current at the firing is known.

    The transfer ends when the line current, rising through L_s as Vm(cos α − cos θ)/(ωL_s)
    from −i (fully controlled) or 0 (half-controlled), meets the load current: without ``l``
    that current is taken as constant, cos(α + μ) = cos α − (2 or 1)·ωL_s·i/Vm  [1, ch. 5–6];
    with the load's ``l`` [H] and ``e`` [V] it decays through the overlap (the load sees 0 V:
    i(θ) = (i + E/R)·e^(−R(θ − α)/ωL) − E/R), which matters where E is large against R·i (a
    hand-over), and μ is the root of that meeting (bisection). Where the current is
    ``continuous`` (default: every row) the overlap's loss of mean voltage ΔV = c·i
    (c = 2ωL_s/π fully, ωL_s/π half-controlled) lowers it by ΔV/R, so i = i_t/(1 + c/R);
    a hand-over's current is taken as it comes (``i_t`` from the waveform with L + L_s).
    ``semi``: the diode leg takes the current at π, ``i_pi`` [A] (reduced alike), over μ_d
    with cos μ_d = 1 − ωL_s·i_π/Vm; a firing before that ends (α < μ_d) makes one overlap
    from the line zero, as in :func:`semi_overlap_output`. Returns ``mu``, ``drop`` ΔV [V],
    ``mu_d`` (semi; NaN where no current reaches π or the firing interrupts it); NaN μ
    where the transfer cannot end before π. vs [V RMS]; r [Ω]; omega [rad/s]; l_s [H];
    alpha [rad]; i_t, i_pi [A].

    >>> kw = dict(vs=230.0, r=8.0, omega=2 * np.pi * 50, l_s=1e-3, alpha=np.radians(30))
    >>> i_d = overlap_output(**kw)["i_d"]  # ripple-free: i_t is I_d without the overlap
    >>> o = transfer_overlap(i_t=i_d * (1 + 0.2 / 8.0), **kw)
    >>> round(float(np.degrees(o["mu"])), 2), round(float(o["drop"] / 0.2), 3)
    (4.53, 21.87)
    """
    vm = np.sqrt(2.0) * _a(vs)
    xl = _a(omega) * _a(l_s)
    a, r = np.broadcast_arrays(_a(alpha), _a(r))
    c = (1.0 if semi else 2.0) * xl / np.pi
    cont = np.ones(a.shape, dtype=bool) if continuous is None else _a(continuous) > 0
    red = np.where(cont, 1.0 + c / r, 1.0)
    i = np.maximum(_a(i_t), 0.0) / red
    x = xl * i / vm
    start = 0.0 if semi else 1.0  # the line current starts at −i (fully) or 0 (half)
    x_pi = 0.0 * x
    early = np.zeros(np.broadcast(a, x).shape, dtype=bool)
    if semi:
        x_pi = xl * np.maximum(_a(i_pi), 0.0) / red / vm
        mu_d = np.arccos(np.clip(1 - x_pi, -1.0, 1.0))
        early = (x_pi > 0) & (a < mu_d)
        mu_d = np.where((x_pi > 0) & ~early, mu_d, np.nan)
    # From the line zero when the firing interrupts the diode transfer, else from α.
    a0 = np.where(early, 0.0, a)
    base = np.where(early, x_pi, 0.0)  # the line current already at −i_π there
    if l is None:
        arg = np.cos(a0) - (1.0 + start) * x - base
        with np.errstate(invalid="ignore"):
            end = np.where(arg >= -1.0, np.arccos(np.clip(arg, -1.0, 1.0)), np.nan)
    else:
        xload = np.maximum(_a(omega) * _a(l), 1e-300)
        kk = _a(e) / r / vm * xl  # E/R in the same units as x (ωL_s·i/Vm)

        def gap(th: np.ndarray) -> np.ndarray:
            # line current (units of Vm/ωL_s) from its start, against the load current.
            load = (x + kk) * np.exp(-r * (th - a) / xload) - kk
            return np.cos(a0) - np.cos(th) - base - start * x - load

        lo = a + 0.0 * x
        hi = np.pi + 0.0 * x
        ok = gap(hi) >= 0
        for _ in range(60):
            mid = 0.5 * (lo + hi)
            up = gap(mid) >= 0
            hi = np.where(up, mid, hi)
            lo = np.where(up, lo, mid)
        end = np.where(ok, 0.5 * (lo + hi), np.nan)
    out = {"mu": np.where(i > 0, end - a, 0.0), "drop": c * i}
    if semi:
        out["mu_d"] = mu_d
    return out


def overlap_on_output(*, values: dict[str, np.ndarray], quantity: str, vs: np.ndarray,
                      r: np.ndarray, omega: np.ndarray, l_s: np.ndarray, alpha: np.ndarray,
                      alpha_lo: np.ndarray, e: np.ndarray | float, continuous: np.ndarray,
                      continuous_lo: np.ndarray, req_hi: np.ndarray,
                      semi: bool = False, transfer: dict[str, np.ndarray] | None = None,
                      lower: bool = True) -> dict[str, np.ndarray]:
    """The overlap's effect on a bridge's ``power.output`` values (continuous rows only): a
    fully controlled bridge (:func:`overlap_output`) or, with ``semi``, a half-controlled one
    (:func:`semi_overlap_output`).

    Adds ``overlap_angle`` μ [rad] and ``overlap_drop`` ΔV [V] at the row's α (NaN where the
    conduction is discontinuous; ``semi`` also ``overlap_diode`` μ_d [rad], the diode leg's
    transfer at the line zero, NaN where the firing interrupts it), and lowers the full output
    ``output_at_min`` at α_lo by ΔV (voltage), ΔV/R (current) or the factor ((V − ΔV)/V)²
    (power); returns the new values and ``overlap_short`` (1 where the lowered full output no
    longer reaches ``req_hi``).

    ``transfer`` (a back-EMF load): the rows' waveform currents at the transfer, ``i_t``
    and ``i_pi`` [A], and the load's ``l`` [H] and ``e`` [V] (:func:`transfer_overlap`; a
    row not ``continuous`` is a hand-over there), used in place of the ripple-free I_d at
    every row where a current flows at the firing (``continuous`` > 0, or a hand-over:
    ``i_t`` > 0); ``lower`` False leaves ``output_at_min`` as given (its worst corner
    already has the overlap taken off).
    """
    out = dict(values)
    solve = semi_overlap_output if semi else overlap_output
    row = solve(vs=vs, r=r, omega=omega, l_s=l_s, alpha=alpha, e=e)
    cont = np.asarray(continuous) > 0
    if transfer is not None:
        row = transfer_overlap(vs=vs, r=r, omega=omega, l_s=l_s, alpha=alpha,
                               i_t=transfer["i_t"], i_pi=transfer.get("i_pi", 0.0), semi=semi,
                               l=transfer.get("l"), e=transfer.get("e", 0.0),
                               continuous=continuous)
        cont = _a(transfer["i_t"]) > 0
    out["overlap_angle"] = np.where(cont, row["mu"], np.nan)
    out["overlap_drop"] = np.where(cont, row["drop"], np.nan)
    if semi:
        out["overlap_diode"] = np.where(cont, row["mu_d"], np.nan)
    if not lower:
        out["overlap_short"] = np.zeros_like(out["overlap_drop"])
        return out
    lo = solve(vs=vs, r=r, omega=omega, l_s=l_s, alpha=alpha_lo, e=e)
    full = _a(values["output_at_min"])
    with np.errstate(divide="ignore", invalid="ignore"):
        if quantity == "voltage":
            lowered = full - lo["drop"]
        elif quantity == "current":
            lowered = full - lo["drop"] / _a(r)
        else:
            v0 = lo["vdc"] + lo["drop"]
            lowered = full * np.where(v0 > 0, (lo["vdc"] / v0) ** 2, 1.0)
    lowered = np.where(np.asarray(continuous_lo) > 0, lowered, full)
    out["output_at_min"] = lowered
    out["overlap_short"] = ((lowered < _a(req_hi)) & ~(full < _a(req_hi))).astype(float)
    return out


def overlap_check(*, outcome: Outcome, quantity: str, vs: np.ndarray, r: np.ndarray,
                  omega: np.ndarray, l_s: np.ndarray, alpha: np.ndarray, alpha_lo: np.ndarray,
                  e: np.ndarray | float, continuous: np.ndarray, continuous_lo: np.ndarray,
                  req_hi: np.ndarray, semi: bool = False,
                  transfer: dict[str, np.ndarray] | None = None, lower: bool = True) -> Outcome:
    """``power.output`` of a bridge with source inductance (``semi``: half-controlled): the
    outcome of the check without it, with :func:`overlap_on_output`'s values; rows whose full
    output the overlap brings below ``req_hi`` fail (margin = lowered/req_hi − 1); ``transfer``
    and ``lower`` as there."""
    vals = overlap_on_output(values=outcome.values, quantity=quantity, vs=vs, r=r, omega=omega,
                             l_s=l_s, alpha=alpha, alpha_lo=alpha_lo, e=e,
                             continuous=continuous, continuous_lo=continuous_lo, req_hi=req_hi,
                             semi=semi, transfer=transfer, lower=lower)
    short = vals["overlap_short"] > 0
    status = np.where(short, FAIL, outcome.status).astype(np.int8)
    with np.errstate(divide="ignore", invalid="ignore"):
        margin = np.where(short, vals["output_at_min"] / _a(req_hi) - 1.0, outcome.margin)
    return Outcome(vals, margin, status, list(outcome.notes))
