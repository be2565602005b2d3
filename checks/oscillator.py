"""UJT and PUT relaxation oscillators: peak point, charge and discharge, firing angle.

All arguments are SI magnitudes (V, Ω, F, s, A) that broadcast over numpy arrays.

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §9 (UJT and
    PUT trigger circuits, Examples 9.5 and 9.6).
[2] R. L. Boylestad & L. Nashelsky, *Electronic Devices and Circuit Theory*, ch. 17 (UJT
    oscillator analysis).
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from checks.core import FAIL, MARGINAL, PASS, Outcome


def ujt_peak_voltage(*, v1: np.ndarray, eta: np.ndarray, rbb: np.ndarray, r1: np.ndarray,
                     r2: np.ndarray, vd: np.ndarray) -> np.ndarray:
    """UJT peak-point voltage with the external base resistors in the divider [V].

    VP = VD + V1·(η·RBB + R1)/(RBB + R1 + R2)  [1, §9], the open-emitter divider of the bar
    (η·RBB below the emitter point, (1 − η)·RBB above) in series with R1 and R2.

    v1 [V] interbase supply; eta [–] intrinsic standoff ratio; rbb [Ω] interbase resistance;
    r1, r2 [Ω] base-1 and base-2 resistors; vd [V] emitter diode drop.

    >>> round(float(ujt_peak_voltage(v1=12, eta=0.6, rbb=5e3, r1=100, r2=0, vd=0.7)), 4)
    7.9941
    """
    return vd + v1 * (eta * rbb + r1) / (rbb + r1 + r2)


def put_peak_voltage(*, v1: np.ndarray, r_upper: np.ndarray, r_lower: np.ndarray,
                     offset: np.ndarray) -> np.ndarray:
    """PUT peak-point voltage VP = V1·RGK/(RGA + RGK) + VOFF [V]  [1, §9].

    r_upper [Ω] supply→gate (R_GA); r_lower [Ω] gate→common (R_GK); offset [V] anode above
    gate at firing.

    >>> float(put_peak_voltage(v1=12, r_upper=5e3, r_lower=10e3, offset=0.7))
    8.7
    """
    return v1 * r_lower / (r_upper + r_lower) + offset


def charge_time(*, r: np.ndarray, c: np.ndarray, v1: np.ndarray, v0: np.ndarray,
                vp: np.ndarray) -> np.ndarray:
    """Time for C charging through R from v0 toward v1 to reach vp [s].

    t = R·C·ln[(V1 − V0)/(V1 − VP)]; NaN where VP ≥ V1 (it never gets there).

    >>> round(float(charge_time(r=50e3, c=0.1e-6, v1=12, v0=1, vp=7.99412)) * 1e3, 4)
    5.0507
    """
    with np.errstate(invalid="ignore", divide="ignore"):
        ratio = (v1 - v0) / (v1 - vp)
        return np.where(ratio > 0, r * c * np.log(np.where(ratio > 0, ratio, 1.0)), np.nan) \
            * np.where(vp < v1, 1.0, np.nan)



def peak_voltage(*, device: str, v1: np.ndarray, **p: np.ndarray) -> np.ndarray:
    """Peak-point voltage for either device: UJT keys eta, rbb, r1, r2, vd; PUT keys
    r_upper, r_lower, offset [V].

    >>> float(peak_voltage(device="put", v1=12, r_upper=5e3, r_lower=10e3, offset=0.7))
    8.7
    """
    if device == "ujt":
        return ujt_peak_voltage(v1=v1, eta=p["eta"], rbb=p["rbb"], r1=p["r1"], r2=p["r2"],
                                vd=p["vd"])
    return put_peak_voltage(v1=v1, r_upper=p["r_upper"], r_lower=p["r_lower"],
                            offset=p["offset"])


def window(*, v1: np.ndarray, vp: np.ndarray, vv: np.ndarray, ip: np.ndarray,
           iv: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The oscillation window for the timing resistor: (r_min, r_max) [Ω].

    r_min = (V1 − VV)/IV (below it the resistor holds the device on past the valley) and
    r_max = (V1 − VP)/IP (above it the resistor cannot supply IP at the peak)  [1, §9]; [2].

    >>> r_min, r_max = window(v1=12, vp=7.9941, vv=1, ip=10e-6, iv=10e-3)
    >>> round(float(r_min)), round(float(r_max) / 1e3, 1)
    (1100, 400.6)
    """
    return (v1 - vv) / iv, (v1 - vp) / ip


def window_check(*, device: str, v1: np.ndarray, rt: np.ndarray, vv: np.ndarray,
                 ip: np.ndarray, iv: np.ndarray, limits: Mapping[str, float],
                 **p: np.ndarray) -> Outcome:
    """``osc.window``: is the timing resistor inside the oscillation window at every corner?

    Margin per row = min(R_T/r_min − 1, r_max/(k·R_T) − 1) with k = ``fail_below`` (1.2);
    marginal when R_T > r_max/``marginal_below`` (2). Device parameters as in
    :func:`peak_voltage`.

    >>> out = window_check(device="ujt", v1=np.array([12.0]), rt=np.array([50e3]), vv=1.0,
    ...                    ip=10e-6, iv=10e-3, eta=0.6, rbb=5e3, r1=100.0, r2=0.0, vd=0.7,
    ...                    limits={"fail_below": 1.2, "marginal_below": 2.0})
    >>> out.status.tolist(), round(float(out.margin[0]), 3)
    ([0], 5.676)
    """
    vp = peak_voltage(device=device, v1=v1, **p)
    r_min, r_max = window(v1=v1, vp=vp, vv=vv, ip=ip, iv=iv)
    k_fail = float(limits.get("fail_below", 1.2))
    k_marg = float(limits.get("marginal_below", 2.0))
    with np.errstate(divide="ignore", invalid="ignore"):
        low = rt / r_min - 1.0
        high = r_max / (k_fail * rt) - 1.0
    margin = np.minimum(low, high)
    status = np.where((rt <= r_min) | (rt * k_fail > r_max), FAIL,
                      np.where(rt * k_marg > r_max, MARGINAL, PASS)).astype(np.int8)
    return Outcome({"peak_voltage": vp, "r_min": r_min, "r_max": r_max, "timing_r": rt},
                   margin, status)
