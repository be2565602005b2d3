"""The diac–RC running firing angle: the vectorised closed form against the alternatives.

A batch of random single-section networks (R1 10 k–300 k, C 47–220 nF, VBO 28–36 V,
breakback 4–10 V, 230 V / 50 Hz) is drawn. Timed:

* the array call :func:`checks.diac.firing_angle` (``running=True``) on the whole batch;
* plain scalar Python a careful engineer would write: per circuit, the same periodic-state
  formula with ``math`` (single section: scalars only) and ``scipy.optimize.brentq`` on a
  bracket found by scanning the half-cycle in 1° steps;
* ``solve_ivp`` simulating each circuit of a subset for 30 cycles (the switched network:
  driven until the diac fires, shorted to the line's zero, the breakback at each firing),
  the last firing angle taken.

Prints the time per circuit of each, the ratios and the largest differences.

    python -m benchmarks.diac [BATCH] [SUBSET]
"""

from __future__ import annotations

import math
import sys
import time

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from checks.diac import firing_angle

W = 2 * math.pi * 50.0
VM = 230.0 * math.sqrt(2.0)


def scalar_angle(r1: float, c1: float, vbo: float, dv: float) -> float:
    """The running angle of one single-section network, scalar code."""
    tau = W * r1 * c1
    g = 1 / math.sqrt(1 + tau * tau)
    psi = math.atan(tau)

    def vss(th: float) -> float:
        return VM * g * math.sin(th - psi)

    def excess(a: float) -> float:
        e = math.exp(-math.pi / tau)
        x0 = (e * vss(0.0) - math.exp(-(math.pi - a) / tau) * (vss(a) - dv)) / (1 + e)
        return vss(a) + math.exp(-a / tau) * (x0 - vss(0.0)) - vbo

    prev = 1e-9
    for k in range(1, 181):
        th = min(math.radians(k), math.pi - 1e-9)
        if excess(th) >= 0:
            return brentq(excess, prev, th, xtol=1e-14, rtol=1e-14)
        prev = th
    return math.nan


def simulated_angle(r1: float, c1: float, vbo: float, dv: float, cycles: int = 30) -> float:
    """The last firing angle of a 30-cycle solve_ivp run of the switched network."""
    half = 0.5 / 50.0
    x = np.zeros(1)
    last = math.nan
    for k in range(2 * cycles):
        sign = 1 if k % 2 == 0 else -1

        def ev(t: float, y: np.ndarray, s: int = sign) -> float:
            return s * y[0] - vbo
        ev.terminal = True  # type: ignore[attr-defined]
        ev.direction = 1  # type: ignore[attr-defined]
        s = solve_ivp(lambda t, y: [(VM * math.sin(W * t) - y[0]) / (r1 * c1)],
                      (k * half, (k + 1) * half), x, events=[ev], rtol=1e-10, atol=1e-10)
        if s.status == 1:
            te = s.t_events[0][0]
            last = W * te - k * math.pi
            y0 = s.y_events[0][0] - sign * dv
            s = solve_ivp(lambda t, y: [-y[0] / (r1 * c1)], (te, (k + 1) * half), y0,
                          rtol=1e-10, atol=1e-10)
        x = s.y[:, -1]
    return last


def main() -> None:
    batch = int(sys.argv[1]) if len(sys.argv) > 1 else 10000
    subset = int(sys.argv[2]) if len(sys.argv) > 2 else 20
    rng = np.random.default_rng(7)
    r1 = rng.uniform(10e3, 300e3, batch)
    c1 = rng.uniform(47e-9, 220e-9, batch)
    vbo = rng.uniform(28.0, 36.0, batch)
    dv = rng.uniform(4.0, 10.0, batch)
    times = []
    for _ in range(5):
        t0 = time.perf_counter()
        a = firing_angle(vm=VM, omega=W, r1=r1, c1=c1, vbo=vbo, breakback=dv, running=True)
        times.append(time.perf_counter() - t0)
    t_vec = min(times) / batch
    n_sc = min(batch, 2000)
    t0 = time.perf_counter()
    sc = [scalar_angle(*map(float, (r1[i], c1[i], vbo[i], dv[i]))) for i in range(n_sc)]
    t_sc = (time.perf_counter() - t0) / n_sc
    t0 = time.perf_counter()
    sim = [simulated_angle(*map(float, (r1[i], c1[i], vbo[i], dv[i]))) for i in range(subset)]
    t_sim = (time.perf_counter() - t0) / subset
    d_sc = np.nanmax(np.abs(np.array(sc) - a[:n_sc]))
    d_sim = np.nanmax(np.abs(np.array(sim) / a[:subset] - 1))
    print(f"running firing angle, {batch} single-section networks")
    print(f"  array call        {t_vec * 1e6:10.2f} us per circuit")
    print(f"  scalar + brentq   {t_sc * 1e6:10.2f} us per circuit ({n_sc} circuits), "
          f"{t_sc / t_vec:.0f}x the array call; largest difference {d_sc:.1e} rad")
    print(f"  solve_ivp 30 cyc  {t_sim * 1e6:10.0f} us per circuit ({subset} circuits), "
          f"{t_sim / t_vec:.0f}x; largest relative difference {d_sim:.1e}")


if __name__ == "__main__":
    main()
