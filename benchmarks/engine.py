"""The vectorised engine against what a careful engineer would script instead.

Part 1, per demo project: the whole ``evaluate`` (every check: bind, corners, one array call,
reduce, summarise) and, for reference, the same check functions called once per corner with
one-element arrays. That loop pays numpy's call overhead on every row and is no one's real
alternative; it is printed only to show where such a comparison goes wrong.

Part 2, the honest comparison: for the computations below, plain scalar Python with ``math``
(one corner at a time, no numpy), against the array call on the same rows. Rows are the demo's
own corner table for that check and, for scale, a Monte Carlo-sized 10⁵ rows. The scalar code
is checked against the array results (largest difference printed).

* free-running oscillator period (``osc.timing`` of the flasher's PUT): charge from VV to VP
  and discharge back, T = R_T·C_T·ln[(V1 − VV)/(V1 − VP)] + R_dis·C_T·ln(VP/VV);
* line-synchronised firing angle (``osc.timing``, the kiln's UJT): the capacitor's piecewise
  closed-form response; the first crossing of the peak point by a 32-point scan and
  bisection on each ramp and in closed form on the plateau.

    python -m benchmarks.engine
"""

from __future__ import annotations

import math
import time
from pathlib import Path

import numpy as np

from checks import oscillator
from reviewer.engine import evaluate
from reviewer.project import load_project
from reviewer.registry import CHECKS

ROOT = Path(__file__).resolve().parents[1]


def best(fn, repeat: int = 5) -> float:
    """Best wall time of ``repeat`` runs [s]."""
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


# ------------------------------------------------------------------------ scalar baselines

def period_scalar(v1: float, rt: float, ct: float, vv: float, r_dis: float, r_upper: float,
                  r_lower: float, offset: float) -> float:
    """PUT free-running period with ``math`` only (NaN where it never fires)."""
    vp = v1 * r_lower / (r_upper + r_lower) + offset
    if not (vv < vp < v1) or vv <= 0:
        return math.nan
    return rt * ct * math.log((v1 - vv) / (v1 - vp)) + r_dis * ct * math.log(vp / vv)


def firing_scalar(vm: float, omega: float, vz: float, tau: float, a: float, d: float) -> float:
    """Line-synchronised firing angle with ``math`` only [rad]; NaN if it does not fire."""
    vz = min(vz, vm)
    tz = math.asin(min(1.0, vz / vm)) / omega
    t3 = math.pi / omega - tz
    wt = omega * tau
    amp = vm / (1.0 + wt * wt)

    def forced(t: float) -> float:
        return amp * (math.sin(omega * t) - wt * math.cos(omega * t))

    p0 = forced(0.0)
    v_tz = forced(tz) + (0.0 - p0) * math.exp(-tz / tau)
    v_t3 = vz - (vz - v_tz) * math.exp(-(t3 - tz) / tau)
    p_t3 = forced(t3)

    def gap(t: float) -> float:
        if t <= tz:
            v = forced(t) - p0 * math.exp(-t / tau)
        elif t <= t3:
            v = vz - (vz - v_tz) * math.exp(-(t - tz) / tau)
        else:
            v = forced(t) + (v_t3 - p_t3) * math.exp(-(t - t3) / tau)
        return v - (a * min(vm * abs(math.sin(omega * t)), vz) + d)

    def first_root(lo: float, hi: float, n: int = 32) -> float:
        """First sign change of ``gap`` on an n-point scan of [lo, hi], bisected to 1e-15."""
        prev = lo
        if gap(lo) >= 0.0:
            return lo
        for i in range(1, n + 1):
            t = lo + (hi - lo) * i / n
            if gap(t) >= 0.0:
                a_, b_ = prev, t
                while b_ - a_ > 1e-15 * b_:
                    mid = 0.5 * (a_ + b_)
                    if gap(mid) >= 0.0:
                        b_ = mid
                    else:
                        a_ = mid
                return b_
            prev = t
        return math.nan

    t = first_root(0.0, tz) if tz > 0 else math.nan  # rising ramp
    if math.isnan(t) and t3 > tz:  # plateau: v = VZ − (VZ − v_tz)·e^(−(t−tz)/τ) = a·VZ + d
        target = a * vz + d
        if target <= v_tz:
            t = tz
        elif target < vz:
            t_p = tz + tau * math.log((vz - v_tz) / (vz - target))
            t = t_p if t_p <= t3 else math.nan
    if math.isnan(t):
        t = first_root(t3, math.pi / omega)  # falling ramp
    return omega * t


# ------------------------------------------------------------------------ the comparisons

def _rows(arrays: dict[str, np.ndarray], n: int, seed: int = 1) -> dict[str, np.ndarray]:
    """``n`` rows drawn from the corner table's own ranges (uniform between its ends)."""
    rng = np.random.default_rng(seed)
    return {k: rng.uniform(v.min(), v.max(), n) if v.max() > v.min() else np.full(n, v[0])
            for k, v in arrays.items()}


def compare_period(n_rows: int | None) -> tuple[int, float, float, float]:
    run = evaluate(load_project(ROOT / "projects" / "flasher-dc.toml"))
    ev = next(r.evaluation for r in run.results if r.check == "osc.timing")
    ins = {k: np.broadcast_to(v, (len(ev.inputs[ev.names[0]]),)).astype(float)
           for k, v in ev.inputs.items()}
    if n_rows:
        ins = _rows(ins, n_rows)
    v1, rt, ct, vv, rk = ins["v1"], ins["rt"], ins["ct"], ins["vv"], ins["cathode_r"]
    ru, rl, off = ins["r_upper"], ins["r_lower"], ins["offset"]
    n = len(v1)

    def vector():
        return oscillator.free_running(device="put", v1=v1, rt=rt, ct=ct, vv=vv,
                                       r_discharge=rk, r_upper=ru, r_lower=rl,
                                       offset=off)["period"]

    cols = [x.tolist() for x in (v1, rt, ct, vv, rk, ru, rl, off)]

    def scalar():
        return [period_scalar(*row) for row in zip(*cols, strict=True)]

    diff = float(np.nanmax(np.abs(np.asarray(scalar()) - vector()) / vector()))
    return n, best(vector), best(scalar, 3), diff


def compare_firing(n_rows: int | None) -> tuple[int, float, float, float]:
    run = evaluate(load_project(ROOT / "projects" / "kiln-230.toml"))
    ev = next(r.evaluation for r in run.results if r.check == "osc.timing")
    size = len(ev.inputs[ev.names[0]])
    ins = {k: np.broadcast_to(v, (size,)).astype(float) for k, v in ev.inputs.items()}
    if n_rows:
        ins = _rows(ins, n_rows)
    vm = np.sqrt(2.0) * ins["line_v"]
    omega = 2 * np.pi * ins["line_f"]
    vz, rt, ct = ins["v1"], ins["rt"], ins["ct"]
    peak = {k: ins[k] for k in ("eta", "rbb", "r1", "r2", "vd")}
    n = len(vm)

    def vector():
        return oscillator.line_sync_firing_angle(device="ujt", vm=vm, omega=omega, vz=vz,
                                                 rt=rt, ct=ct, **peak)

    a = oscillator.divider_ratio(device="ujt", **peak)
    cols = [x.tolist() for x in (vm, omega, vz, rt * ct, a, peak["vd"])]

    def scalar():
        return [firing_scalar(*row) for row in zip(*cols, strict=True)]

    diff = float(np.nanmax(np.abs(np.asarray(scalar()) - vector())))
    return n, best(vector), best(scalar, 1), diff


def main() -> None:
    print("Part 1: every check of each demo (whole evaluate; numpy-per-corner loop for "
          "reference only)")
    print(f"{'project':28} {'checks':>6} {'rows':>7} {'evaluate':>10} {'arrays':>9} "
          f"{'numpy/row':>10}")
    for path in sorted((ROOT / "projects").glob("*.toml")):
        project = load_project(path)
        full = best(lambda project=project: evaluate(project), 3)
        run = evaluate(project)
        items = [(CHECKS[r.check], r.evaluation) for r in run.results if r.evaluation]
        rows = sum(len(ev.inputs[ev.names[0]]) for _, ev in items if ev.names)

        def vector(items=items) -> None:
            for defn, ev in items:
                ev.call(defn, ev.inputs)

        def loop(items=items) -> None:
            for defn, ev in items:
                n = len(ev.inputs[ev.names[0]]) if ev.names else 1
                for i in range(n):
                    ev.call(defn, {k: np.asarray(v[i:i + 1]) for k, v in ev.inputs.items()})

        tv, tl = best(vector), best(loop, 1)
        print(f"{path.name:28} {len(items):6d} {rows:7d} {full * 1e3:7.1f} ms "
              f"{tv * 1e3:6.1f} ms {tl * 1e3:7.0f} ms")
    print()
    print("Part 2: scalar Python with math, one row at a time, against the array call")
    print(f"{'computation':34} {'rows':>7} {'arrays':>10} {'scalar':>10} {'ratio':>8} "
          f"{'largest diff':>13}")
    for label, fn, unit in (("PUT free-running period", compare_period, "rel"),
                            ("line-sync firing angle (UJT)", compare_firing, "rad")):
        for n_rows in (None, 100_000):
            n, tv, ts, diff = fn(n_rows)
            print(f"{label:34} {n:7d} {tv * 1e3:7.2f} ms {ts * 1e3:7.1f} ms "
                  f"{ts / tv:7.1f}× {diff:10.1e} {unit}")


if __name__ == "__main__":
    main()
