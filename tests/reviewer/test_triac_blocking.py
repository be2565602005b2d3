"""``triac.blocking`` with an R–L load and an R–C snubber across the triac, against solve_ivp.

Off, the triac sees the line through the load and the snubber in series; the voltage across it
is not the line's: (1) in the steady off state (a triac not fired, e.g. a controller switched
off) it is the line times the divider gain |Z_snub/(Z_load + Z_snub)|, above 1 towards the
L–C resonance; (2) after each current zero the reapplied step rings above the line. Both
references are integrated here with scipy ``solve_ivp`` (the series circuit line → R → L →
R_s → C, the triac voltage v_C + R_s·i), without the checks' closed forms. Each case is one the
code before the divider and the ringing were counted passed (VDRM ≥ 2 × the line's peak).
"""

from __future__ import annotations

import math

import numpy as np
from scipy.integrate import solve_ivp

from .test_triac_properties import reference_rates
from .test_triac_stage import VM_HI, W50, project, rng, run, triac_part, val


def offstate_peak(vm: float, r: float, l: float, r_s: float, c: float,  # noqa: E741
                  cycles: int = 60) -> float:
    """The peak |v| across a triac that is never fired, in the periodic steady state: the
    series circuit from rest for ``cycles`` line cycles (the transient gone), peak read off a
    fine grid of the last cycle."""
    def f(t: float, y: np.ndarray) -> list[float]:
        i, vc = y
        return [(vm * math.sin(W50 * t) - (r + r_s) * i - vc) / l, i / c]

    t_end = cycles * 2 * math.pi / W50
    sol = solve_ivp(f, (0.0, t_end), [0.0, 0.0], method="LSODA", rtol=1e-10, atol=1e-12,
                    dense_output=True)
    t = np.linspace(t_end - 2 * math.pi / W50, t_end, 40_001)
    i, vc = sol.sol(t)
    return float(np.abs(vc + r_s * i).max())


def test_blocking_counts_the_divider_gain_of_load_and_snubber():
    """R = 30 Ω, L = 2 H and a 2.8 kΩ / 1 µF snubber (resonance near 112 Hz): off, the triac
    sees 1.11 × the line (solve_ivp, steady state). With VDRM = 2.05 × the line's peak the old
    check passed (ratio 2.05); against the true off-state peak the ratio is 1.85: marginal."""
    r, l, r_s, c = 30.0, 2.0, 2800.0, 1e-6  # noqa: E741
    ref = offstate_peak(VM_HI, r, l, r_s, c)
    assert ref > 1.08 * VM_HI  # the case is what it says: the divider gain is above 1
    vdrm = 2.05 * VM_HI
    p = project(part=triac_part(vdrm=val(vdrm, "voltage", "V")),
                power={"load": {"r": val(r, "resistance", "ohm"),
                                "l": val(l, "inductance", "H")}},
                snub={"r": val(r_s, "resistance", "ohm"), "c": val(c, "capacitance", "F")})
    res = run(p, "triac.blocking")
    assert res.values["peak_voltage"].max >= ref * (1 - 1e-3), res.summary
    assert res.status == "marginal", res.summary
    assert vdrm / ref < 2.0


def test_blocking_counts_the_ringing_after_commutation():
    """The test fan (220 Ω ±10 %, 1 H ±10 %) with the 3.3 kΩ ±5 % / 47 nF ±10 % snubber:
    after the current zero the reapplied step rings to about 500 V at high line (solve_ivp of
    the R–L current to its zero, then of the snubbed circuit with the moving line until the next
    firing). VDRM 800 V is 2.24 × the line's 358 V peak (the old check's pass) but about 1.6 ×
    the ringing peak: marginal, never pass."""
    vs = rng(253.0, 253.0, "voltage", "V")
    alpha = rng(math.radians(65), math.radians(150), "angle", "deg")
    _, _, peak = reference_rates(vs=vs, r=val(220, "resistance", "ohm", 0.1),
                                 l=val(1.0, "inductance", "H", 0.1), alpha=alpha,
                                 r_s=val(3300, "resistance", "ohm", 0.05),
                                 c=val(47e-9, "capacitance", "F", 0.1), alphas=7)
    ref = float(peak.max())
    assert 800 / ref < 2.0 < 800 / VM_HI
    res = run(project(snub={}), "triac.blocking")
    assert res.values["peak_voltage"].max >= ref * (1 - 5e-3), res.summary
    assert res.status == "marginal", res.summary


def test_blocking_without_a_snubber_is_the_line_peak_only():
    """No snubber: nothing divides or rings (the triac's own capacitance is not modelled, and
    triac.commutation fails such a design on an inductive load)."""
    res = run(project(), "triac.blocking")
    assert res.values["peak_voltage"].max == VM_HI


def test_blocking_without_a_firing_range_takes_the_zero_at_the_line_peak():
    """A DC gate drive and no `firing` range: blocking is still judged (not incomplete), with
    the reapplied step put at the line's peak (the largest any firing gives), and says so."""
    res = run(project(power={"firing": None}, snub={}), "triac.blocking")
    assert res.status in ("pass", "marginal", "fail")
    assert "no firing range given" in res.summary
    fired = run(project(snub={}), "triac.blocking")
    assert res.values["peak_voltage"].max >= fired.values["peak_voltage"].max * (1 - 1e-12)
