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

Prints the time per circuit of each, the ratios and the largest differences. Then the same
for random networks firing an R–L load (φ 10°–70°): the array call against scalar code
(``math``, the extinction angle by ``brentq`` on the load current inside every evaluation of
the excess, the first root by a 1° scan and ``brentq``), and at the rows of a corner table
(each row's inputs from a few ends: what the checks pass).

``--commands [DIR]``: whole ``latchbook check`` processes instead (fan-230, fan-230-bare and
kiln-230 for scale), from bytecode, alternating run by run with the checkout in DIR (the code
before this solver), as ``benchmarks.cli`` does; median wall and CPU and their ratios.

    python -m benchmarks.diac [BATCH] [SUBSET]
    python -m benchmarks.diac --commands DIR [--repeat N]
"""

from __future__ import annotations

import math
import os
import sys
import time
from pathlib import Path

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


def scalar_rl_angle(r1: float, c1: float, vbo: float, dv: float, phi: float) -> float:
    """The running angle of one single-section network firing an R–L load, scalar code: the
    network restarts at the current's zero γ = β − π, β by brentq inside every evaluation."""
    tau = W * r1 * c1
    g = 1 / math.sqrt(1 + tau * tau)
    psi = math.atan(tau)
    tp = math.tan(phi)

    def vss(th: float) -> float:
        return VM * g * math.sin(th - psi)

    def beta(a: float) -> float:
        def cur(t: float) -> float:
            return math.sin(t - phi) - math.sin(a - phi) * math.exp(-(t - a) / tp)
        hi = min(math.pi + phi, 2 * math.pi - a)
        if cur(math.pi) <= 0:
            return math.pi
        if cur(hi) >= 0:  # rounding at α → φ: the current ends at the steady zero π + φ
            return hi
        return brentq(cur, math.pi, hi, xtol=1e-15)

    def excess(a: float) -> float:
        gam = beta(a) - math.pi
        e = math.exp(-math.pi / tau)
        x0 = (e * vss(gam) - math.exp(-(math.pi + gam - a) / tau) * (vss(a) - dv)) / (1 + e)
        return vss(a) + math.exp(-(a - gam) / tau) * (x0 - vss(gam)) - vbo

    lo = phi + 1e-9
    if excess(lo) >= 0:
        return math.nan
    prev = lo
    for k in range(1, 181):
        th = lo + (math.pi * (1 - 1e-12) - lo) * k / 180
        if excess(th) >= 0:
            return brentq(excess, prev, th, xtol=1e-14, rtol=1e-14)
        prev = th
    return math.nan


def _rl_part(batch: int) -> None:
    rng = np.random.default_rng(8)
    r1 = rng.uniform(20e3, 250e3, batch)
    c1 = rng.uniform(47e-9, 150e-9, batch)
    vbo = rng.uniform(28.0, 36.0, batch)
    dv = rng.uniform(4.0, 10.0, batch)
    phi = np.radians(rng.uniform(10.0, 70.0, batch))
    kw = {"vm": VM, "omega": W, "breakback": dv, "running": True}
    times = []
    for _ in range(3):
        t0 = time.perf_counter()
        a = firing_angle(r1=r1, c1=c1, vbo=vbo, phi=phi, **kw)
        times.append(time.perf_counter() - t0)
    t_vec = min(times) / batch
    n_sc = min(batch, 300)
    t0 = time.perf_counter()
    sc = [scalar_rl_angle(*map(float, (r1[i], c1[i], vbo[i], dv[i], phi[i])))
          for i in range(n_sc)]
    t_sc = (time.perf_counter() - t0) / n_sc
    d_sc = np.nanmax(np.abs(np.array(sc) - a[:n_sc]))
    # A corner table: 4096 rows drawn from the ends of 5 inputs and 16 pot settings.
    pick = rng.integers(0, 2, (4096, 4))
    pot = rng.integers(0, 16, 4096)
    rows = {"r1": 39e3 * (1 + 0.05 * (2 * pick[:, 0] - 1)) + 180e3 * pot / 15,
            "c1": 100e-9 * (1 + 0.1 * (2 * pick[:, 1] - 1)),
            "vbo": 32.0 + 4.0 * (2 * pick[:, 2] - 1),
            "phi": np.arctan(W * (1 + 0.1 * (2 * pick[:, 3] - 1)) / 220.0)}
    times = []
    for _ in range(3):
        t0 = time.perf_counter()
        firing_angle(**rows, **{**kw, "breakback": 6.0})
        times.append(time.perf_counter() - t0)
    print(f"running firing angle, {batch} single-section networks with an R–L load")
    print(f"  array call        {t_vec * 1e6:10.2f} us per circuit")
    print(f"  scalar + brentq   {t_sc * 1e6:10.2f} us per circuit ({n_sc} circuits), "
          f"{t_sc / t_vec:.0f}x the array call; largest difference {d_sc:.1e} rad")
    distinct = len(set(zip(*(v.tolist() for v in rows.values()), strict=True)))
    print(f"  a corner table of 4096 rows ({distinct} distinct): {min(times) * 1e3:.1f} ms, "
          f"{min(times) / 4096 * 1e6:.2f} us per row")


def _commands(against: Path, repeat: int) -> None:
    from benchmarks.cli import LB, run

    print("load average (1, 5, 15 min): " + ", ".join(f"{x:.2f}" for x in os.getloadavg()))
    print(f"{'command':28} {'new median':>11} {'CPU':>9}   {'old median':>11} {'CPU':>9}"
          "   ratio (wall, CPU)")
    root = Path(__file__).resolve().parents[1]
    for name in ("fan-230", "fan-230-bare", "kiln-230"):
        cmd = [*LB, "check", f"projects/{name}.toml"]
        new, old = run(cmd, repeat, True, (root, against.resolve()))
        print(f"{'check ' + name:28} {new[1] * 1e3:8.0f} ms {new[2] * 1e3:6.0f} ms   "
              f"{old[1] * 1e3:8.0f} ms {old[2] * 1e3:6.0f} ms   "
              f"{old[1] / new[1]:5.1f}x {old[2] / new[2]:5.1f}x")
    print("load average (1, 5, 15 min): " + ", ".join(f"{x:.2f}" for x in os.getloadavg()))


def main() -> None:
    if "--commands" in sys.argv:
        rest = sys.argv[sys.argv.index("--commands") + 1:]
        repeat = int(rest[rest.index("--repeat") + 1]) if "--repeat" in rest else 5
        _commands(Path(rest[0]), repeat)
        return
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
    _rl_part(min(batch, 4000))


if __name__ == "__main__":
    main()
