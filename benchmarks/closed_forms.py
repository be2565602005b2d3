"""The vectorised closed forms against scipy ``solve_ivp`` time-stepping the same circuits.

For each computation a batch of random circuits is drawn; the closed form is timed on
the whole batch in one call (best of several runs) and ``solve_ivp`` integrates a subset of the
same circuits one by one (each to an event). Prints the time per circuit of both, their ratio,
and the largest relative difference over the integrated subset:

* UJT free-running period: charge V_V → V_P through R_T, discharge V_P → V_V through R_dis;
* line-synchronised firing angle: R_T·C_T·dv/dt = min(Vm·|sin ωt|, VZ) − v up to v = a·V_b + d;
* R–L extinction angle: X·di/dθ = sin θ − i (per unit, X = tan φ) from i(α) = 0 until i = 0;
* R–L–E (battery, motor) extinction angle, per unit with Z = 1:
  sin φ·di/dθ = sin θ − cos φ·i − m from i(max(α, θ1)) = 0 until i = 0 (half-wave);
* R–C snubber step: L·di/dt = E − R·i − v_C, C·dv_C/dt = i; the peak of v = v_C + R·i and
  its steepest slope (events where dv/dt and d²v/dt² cross zero);
* triac commutation step: the same loop with the load's L and R in it, v = v_C + R_s·i.

    python -m benchmarks.closed_forms [BATCH] [SUBSET] [RTOL]
"""

from __future__ import annotations

import math
import sys
import time
from collections.abc import Callable

import numpy as np
from scipy.integrate import solve_ivp

from checks import rle
from checks.oscillator import divider_ratio, free_running, line_sync_firing_angle
from checks.rl import extinction_angle
from checks.snubber import step_max_dvdt, step_peak
from checks.triac import snubbed_step

RTOL = 1e-8  # the integrator's relative tolerance (a third argument changes it)
ATOL_REL = 1e-10  # its absolute tolerance, relative to the circuit's scale


def best(fn: Callable[[], object], repeat: int = 7) -> float:
    """Best wall time of ``repeat`` runs [s]."""
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def timed(fn: Callable[[], float]) -> tuple[float, float]:
    """(result, wall time [s]) of one call."""
    t0 = time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t0


# ----------------------------------------------------------------------------- circuits

def ujt_sets(rng: np.random.Generator, n: int) -> dict[str, np.ndarray]:
    """Free-running UJT oscillators (every one fires: V_P < V1)."""
    return {"v1": rng.uniform(10.0, 30.0, n), "rt": 10 ** rng.uniform(3.5, 5.5, n),
            "ct": 10 ** rng.uniform(-8.0, -6.0, n), "vv": rng.uniform(1.0, 3.0, n),
            "r_discharge": rng.uniform(20.0, 200.0, n), "eta": rng.uniform(0.5, 0.8, n),
            "rbb": rng.uniform(4e3, 9e3, n), "r1": rng.uniform(0.0, 100.0, n),
            "r2": rng.uniform(0.0, 1000.0, n), "vd": rng.uniform(0.4, 0.7, n)}


def ivp_period(p: dict[str, float]) -> float:
    """Charge from V_V to V_P, then discharge back to V_V, each by integration [s]."""
    vp = p["vd"] + p["v1"] * (p["eta"] * p["rbb"] + p["r1"]) / (p["rbb"] + p["r1"] + p["r2"])
    tau_c, tau_d = p["rt"] * p["ct"], p["r_discharge"] * p["ct"]

    def up(t: float, v: np.ndarray) -> float:
        return v[0] - vp

    def down(t: float, v: np.ndarray) -> float:
        return v[0] - p["vv"]

    up.terminal, up.direction = True, 1  # type: ignore[attr-defined]
    down.terminal, down.direction = True, -1  # type: ignore[attr-defined]
    s1 = solve_ivp(lambda t, v: (p["v1"] - v) / tau_c, (0.0, 50 * tau_c), [p["vv"]],
                   events=up, rtol=RTOL, atol=ATOL_REL * p["v1"])
    s2 = solve_ivp(lambda t, v: -v / tau_d, (0.0, 50 * tau_d), [vp], events=down, rtol=RTOL,
                   atol=ATOL_REL * p["v1"])
    return float(s1.t_events[0][0] + s2.t_events[0][0])


def line_sets(rng: np.random.Generator, n: int) -> dict[str, np.ndarray]:
    """Line-synchronised UJT ramps on 50/60 Hz lines (some never fire: NaN)."""
    return {"vm": math.sqrt(2) * rng.uniform(100.0, 250.0, n),
            "omega": 2 * np.pi * rng.choice([50.0, 60.0], n), "vz": rng.uniform(12.0, 30.0, n),
            "rt": 10 ** rng.uniform(3.7, 5.0, n), "ct": rng.uniform(50e-9, 500e-9, n),
            "eta": rng.uniform(0.5, 0.8, n), "rbb": rng.uniform(4e3, 9e3, n),
            "r1": rng.uniform(0.0, 100.0, n), "r2": rng.uniform(0.0, 1000.0, n),
            "vd": rng.uniform(0.4, 0.7, n)}


def ivp_firing(p: dict[str, float]) -> float:
    """First firing angle by integrating the clamped-supply charge [rad]; NaN if none."""
    a = float(divider_ratio(device="ujt", eta=p["eta"], rbb=p["rbb"], r1=p["r1"], r2=p["r2"]))
    vm, om, vz, tau = p["vm"], p["omega"], p["vz"], p["rt"] * p["ct"]

    def vb(t: float) -> float:
        return min(vm * abs(math.sin(om * t)), vz)

    def ev(t: float, v: np.ndarray) -> float:
        return v[0] - (a * vb(t) + p["vd"])

    ev.terminal, ev.direction = True, 1  # type: ignore[attr-defined]
    half = math.pi / om
    sol = solve_ivp(lambda t, v: [(vb(t) - v[0]) / tau], (0.0, half), [0.0], events=ev,
                    rtol=RTOL, atol=ATOL_REL * vz, max_step=half / 200)
    return float(sol.t_events[0][0]) * om if sol.t_events[0].size else float("nan")


def rl_sets(rng: np.random.Generator, n: int) -> dict[str, np.ndarray]:
    """Firing angles and R–L load angles."""
    return {"alpha": rng.uniform(0.0, 0.95 * np.pi, n), "phi": rng.uniform(0.05, 1.5, n)}


def ivp_extinction(p: dict[str, float]) -> float:
    """β by integrating X·di/dθ = sin θ − i from i(α) = 0 to the current's zero [rad]."""
    x = math.tan(p["phi"])

    def zero(th: float, i: np.ndarray) -> float:
        return i[0]

    zero.terminal, zero.direction = True, -1  # type: ignore[attr-defined]
    a = p["alpha"]
    sol = solve_ivp(lambda th, i: (math.sin(th) - i) / x, (a, 2 * math.pi + a), [0.0],
                    events=zero, rtol=RTOL, atol=ATOL_REL)
    return float(sol.t_events[0][0])


def rle_sets(rng: np.random.Generator, n: int) -> dict[str, np.ndarray]:
    """Firing angles, load angles and back EMFs m = E/Vm that leave a conduction window."""
    m = rng.uniform(0.0, 0.8, n)
    th1 = np.arcsin(m)
    return {"alpha": rng.uniform(0.0, 0.95, n) * (np.pi - th1), "phi": rng.uniform(0.05, 1.5, n),
            "m": m}


def ivp_rle_extinction(p: dict[str, float]) -> float:
    """β of the half-wave R–L–E circuit: sin φ·di/dθ = sin θ − cos φ·i − m from zero [rad]."""
    r, x, m = math.cos(p["phi"]), math.sin(p["phi"]), p["m"]

    def zero(th: float, i: np.ndarray) -> float:
        return i[0]

    zero.terminal, zero.direction = True, -1  # type: ignore[attr-defined]
    a = max(p["alpha"], math.asin(m))
    sol = solve_ivp(lambda th, i: (math.sin(th) - r * i - m) / x, (a, 2 * math.pi + a),
                    [0.0], events=zero, rtol=RTOL, atol=ATOL_REL)
    return float(sol.t_events[0][0])


def snubber_sets(rng: np.random.Generator, n: int) -> dict[str, np.ndarray]:
    """Step E, loop L, snubber C, and R from a damping ratio ζ in 0.1–2."""
    l_ = 10 ** rng.uniform(-5.5, -4.0, n)
    c = 10 ** rng.uniform(-8.0, -6.0, n)
    zeta = rng.uniform(0.1, 2.0, n)
    return {"e": rng.uniform(100.0, 600.0, n), "r": 2 * zeta * np.sqrt(l_ / c), "l": l_, "c": c}


def ivp_snubber(p: dict[str, float]) -> tuple[float, float]:
    """(V_pk [V], (dv/dt)max [V/s]) of the step by integrating the series R–L–C loop."""
    e, r, l_, c = p["e"], p["r"], p["l"], p["c"]

    def rhs(t: float, y: np.ndarray) -> list[float]:
        vc, i = y
        return [i / c, (e - r * i - vc) / l_]

    def dv(t: float, y: np.ndarray) -> float:  # dv/dt of v = v_C + R·i
        vc, i = y
        return i / c + r * (e - r * i - vc) / l_

    def d2v(t: float, y: np.ndarray) -> float:
        vc, i = y
        di = (e - r * i - vc) / l_
        return di / c + r * (-r * di - i / c) / l_

    dv.terminal, dv.direction = True, -1  # type: ignore[attr-defined]
    d2v.direction = -1  # type: ignore[attr-defined]
    w0 = 1 / math.sqrt(l_ * c)
    sol = solve_ivp(rhs, (0.0, 40 / w0), [0.0, 0.0], events=[dv, d2v], rtol=RTOL,
                    atol=[ATOL_REL * e, ATOL_REL * e / r], dense_output=False)
    vc, i = sol.y_events[0][0]
    v_pk = vc + r * i
    slopes = [r * e / l_] + [dv(0.0, y) for y in sol.y_events[1]]
    return float(v_pk), float(max(slopes))


def triac_sets(rng: np.random.Generator, n: int) -> dict[str, np.ndarray]:
    """The step reapplied across a triac at its current zero: load L (10 mH – 2 H) and R,
    snubber R_s (ζ 0.05–2 with the load) and C (10–220 nF)."""
    l_ = 10 ** rng.uniform(-2.0, 0.3, n)
    c = 10 ** rng.uniform(-8.0, np.log10(220e-9), n)
    r_load = rng.uniform(0.0, 300.0, n)
    zeta = rng.uniform(0.05, 2.0, n)
    r_s = np.maximum(2 * zeta * np.sqrt(l_ / c) - r_load, 10.0)
    return {"e": rng.uniform(50.0, 360.0, n), "r_load": r_load, "l": l_, "r_s": r_s, "c": c}


def ivp_triac(p: dict[str, float]) -> tuple[float, float]:
    """(V_pk [V], (dv/dt)max [V/s]) of the triac's voltage v = v_C + R_s·i after the zero."""
    e, rl, l_, rs, c = p["e"], p["r_load"], p["l"], p["r_s"], p["c"]
    rt = rl + rs

    def rhs(t: float, y: np.ndarray) -> list[float]:
        vc, i = y
        return [i / c, (e - rt * i - vc) / l_]

    def dv(t: float, y: np.ndarray) -> float:
        vc, i = y
        return i / c + rs * (e - rt * i - vc) / l_

    def d2v(t: float, y: np.ndarray) -> float:
        vc, i = y
        di = (e - rt * i - vc) / l_
        return di / c + rs * (-rt * di - i / c) / l_

    dv.direction = -1  # type: ignore[attr-defined]
    d2v.direction = -1  # type: ignore[attr-defined]
    w0 = 1 / math.sqrt(l_ * c)
    sigma = rt / (2 * l_)
    t_end = max(40 / w0, 12 / sigma) if sigma > 0 else 40 / w0
    sol = solve_ivp(rhs, (0.0, min(t_end, 400 / w0)), [0.0, 0.0], events=[dv, d2v],
                    rtol=RTOL, atol=[ATOL_REL * e, ATOL_REL * e / max(rt, 1.0)])
    peaks = [vc + rs * i for vc, i in sol.y_events[0]] or [e]
    slopes = [rs * e / l_] + [dv(0.0, y) for y in sol.y_events[1]]
    return float(max(max(peaks), e)), float(max(slopes))


# ----------------------------------------------------------------------------- the runs

def rel_diff(a: np.ndarray, b: np.ndarray) -> tuple[float, int]:
    """Largest |a/b − 1| over rows where both are finite, and how many rows disagree on NaN."""
    a, b = np.asarray(a, dtype=float), np.asarray(b, dtype=float)
    both = np.isfinite(a) & np.isfinite(b)
    d = np.abs(a[both] / b[both] - 1.0)
    return (float(d.max()) if d.size else float("nan"),
            int(np.count_nonzero(np.isfinite(a) != np.isfinite(b))))


def row(name: str, t_closed: float, n: int, t_ivp: float, k: int, diff: float,
        nan_mismatch: int) -> None:
    """Print one line of the table."""
    per_c, per_i = t_closed / n, t_ivp / k
    print(f"{name:34} {per_c * 1e6:9.3f} µs {per_i * 1e3:9.3f} ms {per_i / per_c:9.0f}× "
          f"{diff:10.2e} {nan_mismatch:5d}")


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    k = int(sys.argv[2]) if len(sys.argv) > 2 else 50
    if len(sys.argv) > 3:
        global RTOL
        RTOL = float(sys.argv[3])
    rng = np.random.default_rng(2024)
    print(f"closed forms on {n} circuits per call (best of 7); solve_ivp one by one on {k} of "
          f"them (rtol {RTOL:g})")
    print(f"{'computation':34} {'closed/circuit':>12} {'ivp/circuit':>12} {'ratio':>10} "
          f"{'max |rel|':>10} {'NaN≠':>5}")

    p = ujt_sets(rng, n)
    osc = {k2: v for k2, v in p.items() if k2 not in ("v1", "rt", "ct", "vv", "r_discharge")}
    tc = best(lambda: free_running(device="ujt", v1=p["v1"], rt=p["rt"], ct=p["ct"], vv=p["vv"],
                                   r_discharge=p["r_discharge"], **osc))
    got = free_running(device="ujt", v1=p["v1"], rt=p["rt"], ct=p["ct"], vv=p["vv"],
                       r_discharge=p["r_discharge"], **osc)["period"][:k]
    ref, ti = timed(lambda: np.array([ivp_period({q: float(v[j]) for q, v in p.items()})
                                      for j in range(k)]))
    row("UJT free-running period", tc, n, ti, k, *rel_diff(got, ref))

    p = line_sets(rng, n)
    kw = {q: p[q] for q in ("vm", "omega", "vz", "rt", "ct", "eta", "rbb", "r1", "r2", "vd")}
    tc = best(lambda: line_sync_firing_angle(device="ujt", **kw))
    got = line_sync_firing_angle(device="ujt", **kw)[:k]
    ref, ti = timed(lambda: np.array([ivp_firing({q: float(v[j]) for q, v in p.items()})
                                      for j in range(k)]))
    row("line-synchronised firing angle", tc, n, ti, k, *rel_diff(got, ref))

    p = rl_sets(rng, n)
    tc = best(lambda: extinction_angle(alpha=p["alpha"], phi=p["phi"]))
    got = extinction_angle(alpha=p["alpha"], phi=p["phi"])[:k]
    ref, ti = timed(lambda: np.array([ivp_extinction({q: float(v[j]) for q, v in p.items()})
                                      for j in range(k)]))
    row("R–L extinction angle", tc, n, ti, k, *rel_diff(got, ref))

    p = rle_sets(rng, n)

    def rle_beta() -> np.ndarray:
        return rle.waveform_pu(topology="half-wave", freewheel=False, peak=False, **p)["beta"]

    tc = best(rle_beta)
    got = rle_beta()[:k]
    ref, ti = timed(lambda: np.array([ivp_rle_extinction({q: float(v[j]) for q, v in p.items()})
                                      for j in range(k)]))
    row("R–L–E extinction angle", tc, n, ti, k, *rel_diff(got, ref))

    p = snubber_sets(rng, n)
    tc = best(lambda: (step_peak(**p), step_max_dvdt(**p)))
    v_pk, _ = step_peak(**p)
    slope, _ = step_max_dvdt(**p)
    refs, ti = timed(lambda: np.array([ivp_snubber({q: float(v[j]) for q, v in p.items()})
                                       for j in range(k)]))
    d1, m1 = rel_diff(v_pk[:k], refs[:, 0])
    d2, m2 = rel_diff(slope[:k], refs[:, 1])
    row("snubber step: peak and max dv/dt", tc, n, ti, k, max(d1, d2), m1 + m2)

    p = triac_sets(rng, n)
    tc = best(lambda: snubbed_step(**p))
    got = snubbed_step(**p)
    refs, ti = timed(lambda: np.array([ivp_triac({q: float(v[j]) for q, v in p.items()})
                                       for j in range(k)]))
    d1, m1 = rel_diff(got["peak_voltage"][:k], refs[:, 0])
    d2, m2 = rel_diff(got["dvdt_max"][:k], refs[:, 1])
    row("triac commutation step: peak, dv/dt", tc, n, ti, k, max(d1, d2), m1 + m2)


if __name__ == "__main__":
    main()
