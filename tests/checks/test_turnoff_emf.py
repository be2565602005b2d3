"""Line commutation with a back-EMF load (battery, motor armature): the circuit turn-off time
against a time-domain simulation (scipy solve_ivp) of the R–L–E circuit with ideal SCRs, and
the closed form of the resistive case."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from checks import turnoff as to

REL = 5e-3


def simulate_turnoff(topology: str, alpha: float, phi: float, m: float,
                     periods: int = 30) -> tuple[float, float]:
    """Per unit (V_m = 1, Z = 1, ω = 1): R = cos φ, X = sin φ, E = m. Integrates
    X·di/dθ = s·sin θ − R·i − E with ideal SCRs fired at α (+ π for the bridge's other pair)
    from rest, then, in the last periods, takes SCR 1's current end β and scans its voltage on
    a fine grid until it is positive again or conducts (the shortest such interval of the
    period): the line while the other pair
    conducts (bridge), and with nothing conducting v − E (half-wave) or (v − E)/2 (the bridge
    pair's share). A gate pulse that comes before the line exceeds E lasts until it does.
    Returns (β, t_c) [rad]."""
    r, x = np.cos(phi), np.sin(phi)
    step = 2 * np.pi if topology == "half-wave" else np.pi
    n = int(periods * 2 * np.pi / step)
    spans: list[tuple[float, float, int]] = []  # (start, end, pair)
    i, pair, start = 0.0, 0, 0.0
    th1 = np.arcsin(min(m, 1.0))
    for k in range(n):
        tf = alpha + k * step
        p = 1 if topology == "half-wave" or k % 2 == 0 else -1
        t_next = alpha + (k + 1) * step
        pulse_end = th1 + k * step + 1e-7  # the pulse lasts until the line exceeds E
        v_load = pair * np.sin(tf) if pair and i > 0 else m
        if not pair and p * np.sin(tf) <= m:
            tf = max(tf, pulse_end)
        if p * np.sin(tf) - v_load <= 0:
            continue
        if pair and i > 0:
            spans.append((start, tf, pair))
        pair, start = p, tf
        while True:
            def rhs(t, y, s=pair):
                return [(s * np.sin(t) - r * y[0] - m) / x]

            def zero(t, y, t0=tf):
                return y[0] if t > t0 + 1e-9 else 1.0
            zero.terminal, zero.direction = True, -1
            sol = solve_ivp(rhs, (tf, t_next), [max(i, 1e-300)], events=[zero],
                            rtol=1e-11, atol=1e-13, max_step=0.01)
            if not sol.t_events[0].size:
                i = float(sol.y[0, -1])
                break
            t_end = float(sol.t_events[0][0])
            spans.append((start, t_end, pair))
            i, pair = 0.0, 0
            if t_end >= pulse_end or p * np.sin(pulse_end) <= m:
                break
            tf = start = pulse_end  # its pulse is still on: fires again when the line allows
            pair = p
    last = alpha + (n - 2) * step
    ends = [e for a, e, p in spans if p == 1 and last - 2 * np.pi <= e < last]
    found = []
    for beta in ends:  # SCR 1 may turn off more than once a period: the shortest counts
        theta = np.linspace(beta, beta + 2 * np.pi, 400_001)[1:]
        v = np.sin(theta) - m
        if topology == "bridge":
            v = 0.5 * v
        for a, b, p in spans:
            inside = (theta > a) & (theta < b)
            v = np.where(inside, 1.0 if p == 1 else np.sin(theta), v)
        forward = np.flatnonzero(v > 1e-12)
        found.append((float(theta[forward[0]] - beta), beta))
    tc, beta = min(found)
    return beta, tc


CASES = [  # topology, α, φ [deg], E/Vm: which formula each case exercises
    ("half-wave", 40.0, 60.0, 0.3),    # β > π: (2π + θ1 − β)
    ("half-wave", 90.0, 30.0, 0.5),    # β < π (the current ends while the line is below E)
    ("half-wave", 30.0, 80.0, 0.15),   # a long tail, β near 2π
    ("bridge", 60.0, 50.0, 0.3),       # discontinuous, β > π: (2π − β)
    ("bridge", 60.0, 20.0, 0.6),       # discontinuous, β < π: (2π + θ1 − β)
    ("bridge", 30.0, 75.0, 0.1),       # continuous: π − α
    ("bridge", 4.9, 39.7, 0.422),      # fired before θ1: the current outlasts π + α
    ("bridge", 15.1, 47.6, 0.402),     # the same, another tail
    ("half-wave", 10.0, 50.0, 0.4),    # fired before θ1: conducts from θ1
]


@pytest.mark.parametrize(("topology", "alpha_deg", "phi_deg", "m"), CASES)
def test_line_turnoff_with_emf_against_solve_ivp(topology, alpha_deg, phi_deg, m):
    a, p = np.radians(alpha_deg), np.radians(phi_deg)
    beta_sim, tc_sim = simulate_turnoff(topology, a, p, m)
    out = to.line_turnoff_emf(topology=topology, alpha=a, omega=1.0, r=np.cos(p), l=np.sin(p),
                              vm=1.0, e=m)
    assert float(out.turnoff_time) == pytest.approx(tc_sim, rel=REL)
    if not out.continuous:
        assert float(out.beta) == pytest.approx(np.mod(beta_sim - a, 2 * np.pi) + a, rel=REL)


def test_cases_cover_every_branch():
    seen = set()
    for topology, alpha_deg, phi_deg, m in CASES:
        a, p = np.radians(alpha_deg), np.radians(phi_deg)
        out = to.line_turnoff_emf(topology=topology, alpha=a, omega=1.0, r=np.cos(p),
                                  l=np.sin(p), vm=1.0, e=m)
        seen.add((topology, bool(out.continuous), bool(out.beta > np.pi)))
    assert seen == {("half-wave", False, True), ("half-wave", False, False),
                    ("bridge", False, True), ("bridge", False, False), ("bridge", True, True)}
    handed = CASES[-3]
    assert np.radians(handed[1]) < np.arcsin(handed[3])  # fired before the line exceeds E


def test_resistive_battery_charger_closed_form():
    # R and E only: the current flows from θ1 to π − θ1 (the line above E), so the SCR is
    # reverse-biased from π − θ1 to 2π + θ1: t_c = (π + 2·asin(E/V_m))/ω.
    w, vm, e = 2 * np.pi * 50, 24 * np.sqrt(2), 12.0
    out = to.line_turnoff_emf(topology="half-wave", alpha=np.radians(10.0), omega=w, r=0.5,
                              l=0.0, vm=vm, e=e)
    assert float(out.turnoff_time) == pytest.approx((np.pi + 2 * np.arcsin(e / vm)) / w,
                                                    rel=1e-12)


def test_back_emf_never_shortens_the_rl_turnoff_time_when_fired_after_theta1():
    # Fired after the line exceeds E, E ≥ 0 ends the current sooner and delays the next
    # forward bias: the R–L value (E = 0) is a lower bound there.
    rng = np.random.default_rng(3)
    m = rng.uniform(0.0, 0.9, 2000)
    a = rng.uniform(np.arcsin(m), np.pi * 0.95)
    p = rng.uniform(0.0, 1.5, 2000)
    for topology in ("half-wave", "bridge"):
        kw = dict(topology=topology, alpha=a, omega=1.0, r=np.cos(p), l=np.sin(p), vm=1.0)
        emf = to.line_turnoff_emf(e=m, **kw).turnoff_time
        rl = to.line_turnoff(freewheel=False, **kw).turnoff_time
        assert np.all(emf >= rl - 1e-9)
        assert to.line_turnoff_emf(e=0.0, **kw).turnoff_time == pytest.approx(rl, abs=1e-9)


def test_bridge_fired_before_theta1_can_leave_less_than_the_rl_time():
    # The tail case of CASES: the pair that takes the current over at π + α loses it before
    # the line exceeds E and is forward-biased again at θ1 + π: far less than π − α.
    a, p, m = np.radians(4.9), np.radians(39.7), 0.422
    kw = dict(topology="bridge", alpha=a, omega=1.0, r=np.cos(p), l=np.sin(p), vm=1.0)
    emf = float(to.line_turnoff_emf(e=m, **kw).turnoff_time)
    assert emf < 0.1 * float(to.line_turnoff(freewheel=False, **kw).turnoff_time)
    assert emf == pytest.approx(simulate_turnoff("bridge", a, p, m)[1], rel=REL)
