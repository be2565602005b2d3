"""Commutation overlap of a fully controlled single-phase bridge with source inductance.

When the incoming pair is fired, the supply's inductance L_s keeps both pairs conducting while
the line current reverses from −I_d to +I_d: the output is shorted (v_d = 0) for the overlap
angle μ, with  Vm·(cos α − cos(α + μ)) = 2·ω·L_s·I_d,  so the mean output falls by
ΔV = (2/π)·ω·L_s·I_d. With a ripple-free load current into R and a back EMF E,
I_d = [(2Vm/π)·cos α − E]/(R + 2ωL_s/π). Commutation fails (no μ) when
cos α − 2ωL_s·I_d/Vm < −1: the current cannot transfer before the line reverses.

References
----------
[1] N. Mohan, T. M. Undeland & W. P. Robbins, *Power Electronics: Converters, Applications, and
    Design*, ch. 5–6 (line-frequency rectifiers with L_s: commutation, ΔV_d = (2/π)·ωL_s·I_d).
[2] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §10
    (effects of source inductance on single-phase converters).
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


def overlap_on_output(*, values: dict[str, np.ndarray], quantity: str, vs: np.ndarray,
                      r: np.ndarray, omega: np.ndarray, l_s: np.ndarray, alpha: np.ndarray,
                      alpha_lo: np.ndarray, e: np.ndarray | float, continuous: np.ndarray,
                      continuous_lo: np.ndarray, req_hi: np.ndarray) -> dict[str, np.ndarray]:
    """The overlap's effect on a full bridge's ``power.output`` values (continuous rows only).

    Adds ``overlap_angle`` μ [rad] and ``overlap_drop`` ΔV [V] at the row's α (NaN where the
    conduction is discontinuous), and lowers the full output ``output_at_min`` at α_lo by ΔV
    (voltage), ΔV/R (current) or the factor ((V − ΔV)/V)² (power); returns the new values and
    ``overlap_short`` (1 where the lowered full output no longer reaches ``req_hi``).
    """
    out = dict(values)
    row = overlap_output(vs=vs, r=r, omega=omega, l_s=l_s, alpha=alpha, e=e)
    cont = np.asarray(continuous) > 0
    out["overlap_angle"] = np.where(cont, row["mu"], np.nan)
    out["overlap_drop"] = np.where(cont, row["drop"], np.nan)
    lo = overlap_output(vs=vs, r=r, omega=omega, l_s=l_s, alpha=alpha_lo, e=e)
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
                  req_hi: np.ndarray) -> Outcome:
    """``power.output`` of a full bridge with source inductance: the outcome of the check
    without it, with :func:`overlap_on_output`'s values; rows whose full output the overlap
    brings below ``req_hi`` fail (margin = lowered/req_hi − 1)."""
    vals = overlap_on_output(values=outcome.values, quantity=quantity, vs=vs, r=r, omega=omega,
                             l_s=l_s, alpha=alpha, alpha_lo=alpha_lo, e=e,
                             continuous=continuous, continuous_lo=continuous_lo, req_hi=req_hi)
    short = vals["overlap_short"] > 0
    status = np.where(short, FAIL, outcome.status).astype(np.int8)
    with np.errstate(divide="ignore", invalid="ignore"):
        margin = np.where(short, vals["output_at_min"] / _a(req_hi) - 1.0, outcome.margin)
    return Outcome(vals, margin, status, list(outcome.notes))
