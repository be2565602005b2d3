"""Current of an R–L load switched onto a sine by an SCR fired at angle α.

References
----------
[1] M. H. Rashid, *Power Electronics: Devices, Circuits, and Applications*, 4th ed., §10–11
    (controlled rectifiers and AC voltage controllers with R–L loads).
"""

from __future__ import annotations

import numpy as np


def load_angle(*, r: np.ndarray, l: np.ndarray, omega: np.ndarray) -> np.ndarray:  # noqa: E741
    """φ = atan(ωL/R) [rad]; r [Ω], l [H], omega [rad/s].

    >>> round(float(np.degrees(load_angle(r=10.0, l=10e-3, omega=2 * np.pi * 60))), 3)
    20.656
    """
    return np.arctan2(omega * l, r)


def rl_current(*, theta: np.ndarray, alpha: np.ndarray, phi: np.ndarray, vm: np.ndarray,
               z: np.ndarray) -> np.ndarray:
    """Current from zero at α while the SCR conducts [A]  [1]:

    i(θ) = (Vm/Z)·[sin(θ − φ) − sin(α − φ)·exp(−(θ − α)/tan φ)]

    theta, alpha, phi [rad]; vm [V] peak line voltage; z [Ω] = √(R² + ω²L²). For φ → 0 the
    exponential term vanishes (a resistive load). Valid from α until the current returns to zero.

    >>> round(float(rl_current(theta=np.pi / 2, alpha=0.0, phi=0.0, vm=100.0, z=10.0)), 6)
    10.0
    """
    tan_phi = np.tan(phi)
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        decay = np.where(tan_phi > 1e-12, np.exp(-(theta - alpha) / np.where(tan_phi > 1e-12,
                                                                               tan_phi, 1.0)), 0.0)
    return (vm / z) * (np.sin(theta - phi) - np.sin(alpha - phi) * decay)
