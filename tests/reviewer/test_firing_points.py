"""The timing R values added to a line-synchronised firing range (α = 90°).

The bracketed secant of :mod:`reviewer.stages.firing` is checked against plain bisection to
full width (48 halvings in ln R, the simplest method that cannot miss a root of a rising
function), against a function whose inverse is known in closed form, and, at the demo's
values, against the first firing angle integrated with scipy's ``solve_ivp``.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from reviewer.engine import run_project
from reviewer.model import Value
from reviewer.registry import Bound
from reviewer.stages import firing, power, snubber

DEMO = Path(__file__).resolve().parents[2] / "projects" / "kiln-230.toml"
Angle = Callable[[Mapping[str, np.ndarray], np.ndarray], np.ndarray]


def bisected(b: Bound, rt_name: str, others: list[str], angle_of: Angle,
             angles: list[float]) -> tuple[float, ...]:
    """Reference: 48 halvings of [ln R_lo, ln R_hi] per row (NaN counts as late)."""
    names = list(others)
    ends = [sorted({b.inputs[n].value.lo, b.inputs[n].value.hi}) for n in names]
    grid = dict(zip(names, (g.ravel() for g in np.meshgrid(*ends, indexing="ij")),
                    strict=True))
    rt = b.inputs[rt_name].value
    rows = next(iter(grid.values())).size
    out: list[float] = []
    for target in angles:
        lo = np.full(rows, math.log(rt.lo))
        hi = np.full(rows, math.log(rt.hi))
        for _ in range(48):
            mid = 0.5 * (lo + hi)
            with np.errstate(all="ignore"):
                late = ~(angle_of(grid, np.exp(mid)) < target)
            hi, lo = np.where(late, mid, hi), np.where(late, lo, mid)
        inside = (lo > math.log(rt.lo) + 1e-12) & (hi < math.log(rt.hi) - 1e-12)
        out += [float(x) for x in np.exp(0.5 * (lo + hi))[inside]]
    return tuple(sorted(set(out)))


@pytest.fixture(scope="module")
def demo_calls() -> list[tuple[tuple[float, ...], tuple[float, ...], Angle, dict]]:
    """Every call the demo's checks make, with the solver's and the bisection's answers."""
    calls = []
    original = firing.rt_at_angles

    def both(b: Bound, rt_name: str, others: list[str], angle_of: Angle,
             angles: tuple[float, ...], key: object = None) -> tuple[float, ...]:
        others, angles = list(others), list(angles)
        got = original(b, rt_name, others, angle_of, angles)  # solved here, not remembered
        ends = {n: (b.inputs[n].value.lo, b.inputs[n].value.hi) for n in others}
        calls.append((got, bisected(b, rt_name, others, angle_of, angles), angle_of, ends))
        return got

    mp = pytest.MonkeyPatch()
    mp.setattr(power, "rt_at_angles", both)
    mp.setattr(snubber, "rt_at_angles", both)
    try:
        run_project(DEMO)
    finally:
        mp.undo()
    return calls


def test_demo_uses_the_points(demo_calls: list) -> None:
    assert len(demo_calls) >= 2  # the power stage's and the snubber's firing ranges
    assert all(len(got) > 0 for got, *_ in demo_calls)


def test_same_points_as_bisection(demo_calls: list) -> None:
    for got, ref, _, _ in demo_calls:
        assert len(got) == len(ref)
        for g, r in zip(got, ref, strict=True):
            assert g == pytest.approx(r, rel=1e-11)


def test_points_fire_at_ninety_degrees(demo_calls: list) -> None:
    """The code's own angle at each point is 90° to within 1e-9 rad (as bisection's is)."""
    for got, ref, angle_of, ends in demo_calls:
        names = list(ends)
        grid = dict(zip(names, (g.ravel() for g in np.meshgrid(
            *[sorted(set(ends[n])) for n in names], indexing="ij")), strict=True))
        for pts in (got, ref):
            best = [float(np.nanmin(np.abs(angle_of(grid, np.full(next(iter(grid.values())).size,
                                                                   r)) - math.pi / 2)))
                    for r in pts]
            assert max(best) < 1e-9


def _ivp_first_firing(vm: float, omega: float, vz: float, rt: float, ct: float, a: float,
                      d: float) -> float:
    """First firing angle by integrating R·C·dv/dt = min(Vm|sin ωt|, VZ) − v [rad]."""
    def vb(t: float) -> float:
        return min(vm * abs(math.sin(omega * t)), vz)

    ev = lambda t, v: v[0] - (a * vb(t) + d)  # noqa: E731
    ev.terminal, ev.direction = True, 1
    sol = solve_ivp(lambda t, v: [(vb(t) - v[0]) / (rt * ct)], (0, math.pi / omega), [0.0],
                    events=ev, rtol=1e-11, atol=1e-13, max_step=math.pi / omega / 8000)
    return float(sol.t_events[0][0]) * omega


def test_point_against_solve_ivp() -> None:
    """A UJT oscillator on a 230 V ±10 % line: the R found fires at 90° by integration too."""
    b = Bound()
    b.add("rt", "stages.t.timing_r", Value(47e3, 20e3, 100e3, "resistance", "ohm"))
    b.add("vs", "supply.voltage", Value(230.0, 207.0, 253.0, "voltage", "V"))
    p = {"eta": 0.63, "rbb": 7e3, "r1": 0.0, "r2": 0.0, "vd": 0.5}

    def angle_of(g: Mapping[str, np.ndarray], r: np.ndarray) -> np.ndarray:
        return power.oscillator.line_sync_firing_angle(
            device="ujt", vm=math.sqrt(2) * g["vs"], omega=2 * math.pi * 50, vz=20.0, rt=r,
            ct=0.1e-6, **p)

    pts = firing.rt_at_angles(b, "rt", ["vs"], angle_of, [math.pi / 2])
    assert len(pts) == 2  # one per end of the line voltage
    a = p["eta"]
    for r, v in zip(pts, (207.0, 253.0), strict=True):
        got = _ivp_first_firing(math.sqrt(2) * v, 2 * math.pi * 50, 20.0, r, 0.1e-6, a, 0.5)
        assert math.degrees(got) == pytest.approx(90.0, abs=0.02)


def test_closed_form_inverse_and_no_firing() -> None:
    """α(R) = π·R/(R + R0) reaches 90° at R = R0 exactly; NaN (no firing) above 3·R0 is late;
    a row whose root lies outside the range gives no point."""
    r0 = np.array([30e3, 55e3, 200e3])  # the last one outside 10–100 kΩ

    def angle(r: np.ndarray) -> np.ndarray:
        return np.where(r > 3 * r0, np.nan, math.pi * r / (r + r0))

    root, inside = firing.solve_log_r(angle, math.log(10e3), math.log(100e3), math.pi / 2, 3)
    assert inside.tolist() == [True, True, False]
    assert np.exp(root[:2]) == pytest.approx(r0[:2], rel=1e-12)


def test_fewer_angle_solutions_than_bisection() -> None:
    calls = [0]
    r0 = np.array([23e3, 41e3, 77e3])

    def angle(r: np.ndarray) -> np.ndarray:
        calls[0] += 1
        return 2 * np.arctan(np.sqrt(r / r0))  # 90° at R = R0

    root, inside = firing.solve_log_r(angle, math.log(10e3), math.log(100e3), math.pi / 2, 3)
    assert inside.all()
    assert np.exp(root) == pytest.approx(r0, rel=1e-12)
    assert calls[0] <= 20  # bisection to the same width needs 48


def test_same_key_and_values_solved_once() -> None:
    """Points are remembered by (key, the inputs' ends, R range, angles): the same again costs
    no angle solution; another value of an input is solved afresh."""
    calls = [0]

    def angle_of(g: Mapping[str, np.ndarray], r: np.ndarray) -> np.ndarray:
        calls[0] += 1
        return math.pi * r / (r + g["r0"])

    def bound(r0_hi: float) -> Bound:
        b = Bound()
        b.add("rt", "stages.t.timing_r", Value(47e3, 10e3, 100e3, "resistance", "ohm"))
        b.add("r0", "stages.t.other", Value(30e3, 25e3, r0_hi, "resistance", "ohm"))
        return b

    key = ("test angle", "ujt")
    first = firing.rt_at_angles(bound(35e3), "rt", ["r0"], angle_of, [math.pi / 2], key=key)
    assert first == pytest.approx((25e3, 35e3), rel=1e-12)
    n = calls[0]
    again = firing.rt_at_angles(bound(35e3), "rt", ["r0"], angle_of, [math.pi / 2], key=key)
    assert again == first and calls[0] == n
    other = firing.rt_at_angles(bound(40e3), "rt", ["r0"], angle_of, [math.pi / 2], key=key)
    assert other == pytest.approx((25e3, 40e3), rel=1e-12) and calls[0] > n
    # without a key nothing is remembered
    m = calls[0]
    firing.rt_at_angles(bound(35e3), "rt", ["r0"], angle_of, [math.pi / 2])
    assert calls[0] > m
