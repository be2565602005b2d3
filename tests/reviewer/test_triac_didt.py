"""``triac.didt`` with an R–C snubber: the capacitor discharges into the triac from the voltage
across it at firing, which the load and the snubber can lift above the line's instantaneous
value (their divider, and the ringing after the current zero when the triac fires soon after
it). Reference: scipy ``solve_ivp`` of the switched circuit (line → R–L load → triac, the
snubber R_s–C across the triac; the triac fires at α and α + π and turns off at its current's
zero, the snubber discharging through it while on) run to its periodic state; the triac's
voltage just before firing read off it. Written here without the checks' closed forms.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from .test_triac_stage import VM_HI, W50, project, rng, run, val


def voltage_at_firing(vm: float, r: float, l: float, r_s: float, c: float,  # noqa: E741
                      alpha: float, cycles: int = 10) -> float:
    """|v_triac| just before the last firing of ``cycles`` periodic cycles (solve_ivp)."""
    t, y = 0.0, np.zeros(2)  # load current (the series current while off), v_C
    period = 2 * math.pi / W50
    v_fire = 0.0
    for k in range(2 * cycles):
        t_f = (k * math.pi + alpha) / W50

        def off(tt: float, s: np.ndarray) -> list[float]:
            i, v = s
            return [(vm * math.sin(W50 * tt) - (r + r_s) * i - v) / l, i / c]

        if t_f > t:
            y = solve_ivp(off, (t, t_f), y, rtol=1e-10, atol=1e-12, method="LSODA").y[:, -1]
        v_fire = abs(y[1] + r_s * y[0])

        def on(tt: float, s: np.ndarray) -> list[float]:
            i, v = s
            return [(vm * math.sin(W50 * tt) - r * i) / l, -v / (r_s * c)]

        sign = 1.0 if k % 2 == 0 else -1.0

        def zero(tt: float, s: np.ndarray, t0: float = t_f, sg: float = sign) -> float:
            return sg * (s[0] + s[1] / r_s) if tt > t0 + 1e-5 else 1.0
        zero.terminal, zero.direction = True, -1  # type: ignore[attr-defined]
        sol = solve_ivp(on, (t_f, t_f + period), [y[0], y[1]], rtol=1e-10, atol=1e-12,
                        events=zero, method="LSODA", max_step=1e-4)
        t, y = float(sol.t[-1]), np.array([0.0, sol.y[1, -1]])
    return v_fire


@pytest.mark.parametrize("alpha_deg", [65.0, 70.0, 90.0, 150.0])
def test_snubber_discharge_starts_from_the_triac_voltage_at_firing(alpha_deg: float):
    """The test fan (220 Ω, 1 H) with a 3.3 kΩ / 47 nF snubber and 10 µH in its discharge
    loop: di/dt = v(α⁻)/L_d + Vm·sin α/(L_s + L) at firing (L_d·di/dt takes the whole
    triac voltage when it collapses). Fired at 65°, 6° after the current's zero, the snubber
    still rings: the triac holds 425 V (solve_ivp), 1.31 × the line's 324 V there and 1.19 ×
    its peak, which the code before took at most. The check's voltage, and so its di/dt, must
    be at or above the reference's."""
    a = math.radians(alpha_deg)
    fixed = rng(a, a, "angle", "deg")
    p = project(power={"firing": fixed, "load": {"r": val(220, "resistance", "ohm"),
                                                 "l": val(1.0, "inductance", "H")}},
                snub={"r": val(3300, "resistance", "ohm"), "c": val(47e-9, "capacitance", "F"),
                      "discharge_inductance": val(10e-6, "inductance", "H")})
    res = run(p, "triac.didt")
    v_ref = voltage_at_firing(VM_HI, 220.0, 1.0, 3300.0, 47e-9, a)
    if alpha_deg == 65.0:  # fired 6° after the zero, in the ringing: above the line's peak
        assert v_ref > 1.15 * VM_HI
    assert res.values["snubber_voltage"].max >= v_ref * (1 - 1e-3), res.summary
    ref = v_ref / 10e-6 + VM_HI * math.sin(a) / (1.0 + 50e-6)
    assert res.values["didt"].max >= ref * (1 - 1e-3), res.summary
    # at 65° the reference needs 42.5 A/µs, where the code before said 32.4 A/µs; the
    # check's bound (488 V, 48.8 A/µs) is within 50 A/µs: graded, not refused
    assert res.status in ("pass", "marginal")
