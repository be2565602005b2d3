"""A short circuit at the load of a phase-control stage: the prospective fault current from the
supply's impedance, against the SCR's surge rating and the fuse's clearing I²t.

With the supply's inductance L_s the only impedance in the loop (the short bypasses the load),
the symmetrical fault current is I_sc = V_s/(ω·L_s) RMS. A fault that starts at a voltage zero
carries a DC offset: its first peak approaches 2√2·I_sc, the bound used here. The
prospective I²t of a half-cycle is I_sc²·π/ω. If the first peak exceeds the SCR's ITSM, the
SCR survives only when a fuse clears within the half-cycle: the prospective I²t must reach the
fuse's total clearing I²t (else it does not clear that fast) and that clearing I²t must stay
below the SCR's (the coordination of ``power.fuse``).

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §17
    (protection: fault current from the source inductance, fuse coordination, Example 17.6).
[2] P. S. Bimbhra, *Power Electronics*, ch. 4 (surge current and I²t ratings).
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from checks.core import FAIL, MARGINAL, PASS, Outcome
from checks.power import i2t_at, itsm_at


def _a(x: object) -> np.ndarray:
    return np.asarray(x, dtype=float)


def fault_current(*, vs: np.ndarray, omega: np.ndarray, l_s: np.ndarray) -> np.ndarray:
    """Symmetrical prospective fault current I_sc = V_s/(ω·L_s) [A RMS]  [1, §17].

    >>> round(float(fault_current(vs=240.0, omega=2 * np.pi * 60, l_s=0.07e-3)))  # Ex 17.6
    9095
    """
    with np.errstate(divide="ignore"):
        return _a(vs) / (_a(omega) * _a(l_s))


def fault_check(*, vs: np.ndarray, omega: np.ndarray, l_s: np.ndarray, itsm: np.ndarray,
                t_sm: np.ndarray, i2t: np.ndarray, fuse_i2t: np.ndarray | None = None,
                t_fuse: np.ndarray | None = None,
                limits: Mapping[str, float]) -> Outcome:
    """``power.fault``: does the SCR survive a short at the load?

    ``fault_peak`` = 2√2·I_sc (first peak with full offset) against ITSM at the half-cycle
    π/ω (:func:`checks.power.itsm_at`): within it, pass (margin ITSM/peak − 1). Above it,
    with a fuse (``fuse_i2t`` [A²s], clearing at ``t_fuse`` [s], else the half-cycle): pass
    when the prospective half-cycle I²t reaches the fuse's clearing I²t and that is below the
    SCR's I²t on the fuse's time base (:func:`checks.power.i2t_at`); margin = the smaller
    ratio − 1. Without a fuse, or with one that a half-cycle of the fault does not clear
    (prospective I²t below its clearing I²t): fail above ITSM, and marginal at best within it
    (the SCR rides through the first half-cycle, and fires into the short again every
    half-cycle until something clears it, if anything does). vs [V RMS]; omega [rad/s]; l_s [H];
    itsm [A]; t_sm [s]; i2t [A²s]. ``limits`` unused (the rule has no factor).

    >>> o = fault_check(vs=np.array([240.0]), omega=2 * np.pi * 60, l_s=0.07e-3, itsm=10e3,
    ...                 t_sm=8.33e-3, i2t=300e3, fuse_i2t=280e3, t_fuse=8e-3, limits={})
    >>> o.status.tolist(), round(float(o.values["fault_peak"][0]) / 1e3, 2)
    ([0], 25.72)
    """
    half = np.pi / _a(omega)
    i_sc = fault_current(vs=vs, omega=omega, l_s=l_s)
    peak = 2 * np.sqrt(2) * i_sc
    rating = itsm_at(itsm=itsm, t_sm=t_sm, t=half)
    prospective = i_sc**2 * half
    with np.errstate(divide="ignore", invalid="ignore"):
        within = rating / peak
        if fuse_i2t is None:
            fused = np.zeros_like(within)
            dev = np.full_like(within, np.nan)
        else:
            tf = half if t_fuse is None else _a(t_fuse)
            dev = i2t_at(i2t=i2t, t_sm=t_sm, t=tf) + 0 * within
            fused = np.minimum(prospective / _a(fuse_i2t), dev / _a(fuse_i2t))
    ok = (within >= 1.0) | (fused >= 1.0)
    metric = np.where(within >= 1.0, within, fused)
    status = np.where(ok & np.isfinite(peak), PASS, FAIL).astype(np.int8)
    # ITSM covers one half-cycle: with nothing to clear the short within it (no fuse, or one
    # whose clearing I²t a half-cycle of the fault does not reach) the SCR fires into it again
    # every half-cycle, which no surge rating covers, until something clears it, if anything
    # does (a fault below the fuse's rating never blows it). Riding through the first
    # half-cycle is all that can be said: marginal, never pass.
    if fuse_i2t is None:
        status = np.where(status == PASS, MARGINAL, status).astype(np.int8)
    else:
        with np.errstate(invalid="ignore"):
            clears = prospective >= _a(fuse_i2t)
        status = np.where((status == PASS) & ~clears, MARGINAL, status).astype(np.int8)
    margin = np.where(np.isfinite(metric), metric - 1.0, -1.0)
    return Outcome({"fault_current": i_sc, "fault_peak": peak, "fault_i2t": prospective,
                    "itsm_at_line": rating + 0 * peak, "device_i2t": dev + 0 * peak,
                    "fuse_ratio": fused + 0 * peak}, margin, status)
