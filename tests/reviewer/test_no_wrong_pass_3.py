"""A third set of regressions for wrong passes: circuits built for the test (invented values, no
real parts) where an earlier model said pass while an independent solution of the circuit
(scipy ``solve_ivp`` written here, a fine grid, or a closed form from a named book) says the
criterion fails."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from reviewer.engine import evaluate
from reviewer.project import load_project_text

HALF_WAVE = """
[project]
name = "test half-wave heater"
revision = "A"

[conditions]
ambient = {{ min = "0 degC", max = "40 degC" }}

[supply]
kind = "ac"
voltage = "230 V ±10%"
frequency = "50 Hz"
inductance = "{ls}"

[parts.Q1]
type = "scr"
vdrm = "1200 V"
vrrm = "1200 V"
it_rms = "40 A"
it_av = "25 A"
itsm = "400 A"
itsm_duration = "10 ms"
vt0 = "0.9 V"
rt = "15 mohm"
rth_jc = "0.8 K/W"
tj_max = "125 degC"
igt = "25 mA"
vgt = "1.5 V"
ih = "40 mA"
il = "80 mA"

[stages.power]
kind = "phase-control"
scr = "Q1"
topology = "half-wave"
firing = {{ min = "30 deg", max = "120 deg" }}
load = {{ r = "5 ohm ±10%" }}
heatsink = {{ rth_cs = "0.3 K/W", rth_sa = "0.5 K/W" }}
{fuse}
"""


def _check(check: str, **fmt: str):
    project = load_project_text(HALF_WAVE.format(**fmt), "test.toml")
    res = evaluate(project, only=[("power", check)], strict=True).results
    assert len(res) == 1
    return res[0]


# --------------------------------------------------------------------------------------------
# power.fault: a fuse that a half-cycle of the fault does not blow leaves the SCR firing into
# the short every cycle, exactly as with no fuse at all; and a fault below the fuse's rated
# current never blows it.

def _ivp_short_pulse(*, vm: float, w: float, l_s: float, alpha: float) -> tuple[float, ...]:
    """One conduction pulse of an SCR fired at α into a short behind the supply inductance:
    L_s·di/dt = V_m·sin(ωt) from i = 0 until the current returns to zero (the SCR blocks the
    reverse). Returns (peak [A], I²t [A²s], average and RMS over one line cycle [A])."""
    def rhs(t, y):
        i = y[0]
        return [vm * math.sin(w * t) / l_s, i * i, i]

    def zero(t, y):
        return y[0]
    zero.terminal, zero.direction = True, -1
    t0 = alpha / w
    sol = solve_ivp(rhs, (t0, t0 + 2 * math.pi / w), [0.0, 0.0, 0.0], events=zero,
                    rtol=1e-10, atol=1e-12, max_step=1e-5)
    assert sol.status == 1  # the current returned to zero within the cycle
    period = 2 * math.pi / w
    i2t, q = float(sol.y[1][-1]), float(sol.y[2][-1])
    return float(sol.y[0].max()), i2t, q / period, math.sqrt(i2t / period)


def test_fault_behind_a_fuse_that_a_half_cycle_does_not_clear_is_not_a_pass():
    """230 V +10 % through 25 mH, fired at 30°: one pulse peaks at 85 A (under ITSM 400 A) and
    delivers 52 A²s, short of the 600 A²s the fuse needs to clear, so the SCR is fired into the
    short again every cycle: 51 A RMS and 40 A average, above the SCR's 40 A and 25 A, below
    the fuse's 63 A rating, which it carries indefinitely (a fuse's conventional non-fusing
    current is 1.25 × its rated current at this size, IEC 60269-1 table 2, from memory). No
    coordination can help: power.fuse passes (SCR 800 A²s against the fuse's 600 A²s), so the
    earlier model's pass of power.fault (the first peak within ITSM) was the whole verdict."""
    vm, w, l_s = 253.0 * math.sqrt(2), 2 * math.pi * 50, 25e-3
    peak, i2t, i_av, i_rms = _ivp_short_pulse(vm=vm, w=w, l_s=l_s, alpha=math.radians(30))
    assert peak < 400.0                  # the SCR rides through one pulse ...
    assert i2t < 600.0                   # ... which does not clear the fuse ...
    assert i_rms < 63.0                  # ... nor does the repeating fault, ever ...
    assert i_rms > 40.0 and i_av > 25.0  # ... while the SCR overheats: the criterion fails
    fuse = 'fuse = { rating = "63 A", i2t = "600 A^2*s" }'
    assert _check("power.fuse", ls="25 mH", fuse=fuse).status == "pass"
    res = _check("power.fault", ls="25 mH", fuse=fuse)
    assert res.values["fault_peak"].max < 400.0
    assert res.status != "pass"
    assert res.status == "marginal"
    assert "again every half-cycle" in res.summary


def test_fault_that_clears_the_fuse_within_a_half_cycle_still_passes():
    """The same stage through 0.5 mH: a half-cycle delivers far more than the fuse's clearing
    I²t (so it clears within it), and the fuse's 600 A²s is below the SCR's 800 A²s: pass."""
    fuse = 'fuse = { rating = "63 A", i2t = "600 A^2*s" }'
    vm, w = 253.0 * math.sqrt(2), 2 * math.pi * 50
    _, i2t, _, _ = _ivp_short_pulse(vm=vm, w=w, l_s=0.5e-3, alpha=math.radians(30))
    assert i2t > 600.0
    res = _check("power.fault", ls="0.5 mH", fuse=fuse)
    assert res.status == "pass"
    assert float(np.max(res.values["fault_i2t"].min)) > 600.0


if __name__ == "__main__":  # pragma: no cover
    pytest.main([__file__, "-q"])


# --------------------------------------------------------------------------------------------
# Records: a sign-off binds what the check read and the limits; a revised method (a formula
# fixed, or what a status means changed) must make it stale too, even where the status is the
# same, since the reviewer signed numbers computed another way.

OSC = """\
[project]
name = "Test oscillator"
revision = "A"

[conditions]
ambient = { min = "0 degC", max = "40 degC" }

[supply]
kind = "dc"
voltage = "24 V ±5%"

[parts.U1]
type = "ujt"
eta = { min = 0.6, max = 0.7 }
rbb = { min = "5 kohm", max = "8 kohm" }
ip = "5 uA"
iv = "4 mA"
vv = "2 V"
vd = "0.6 V"
pd = "300 mW"
ie_peak = "1 A"

[stages.trigger]
kind = "ujt-oscillator"
ujt = "U1"
supply = "20 V"
sync = "free"
timing_r = { min = "10 kohm", max = "100 kohm" }
timing_c = "100 nF ±10%"
base1_r = "47 ohm"
base2_r = "470 ohm"
"""


def test_a_revised_method_makes_its_sign_offs_stale_and_says_so(tmp_path, monkeypatch):
    import dataclasses

    from reviewer.checklist import load_checklist
    from reviewer.project import load_project
    from reviewer.registry import CHECKS
    from reviewer.review import check_states, load_record, sign

    p = tmp_path / "osc.toml"
    p.write_text(OSC, "utf-8")

    def state():
        project = load_project(p)
        run = evaluate(project, load_checklist(project.checklist, p.parent))
        return check_states(load_record(p), run)[("trigger", "osc.window")]

    sign(p, stage="trigger", checks=["osc.window"], note="window checked by hand")
    assert state().signoff == "signed"
    revised = dataclasses.replace(CHECKS["osc.window"], revision=2)
    monkeypatch.setitem(CHECKS, "osc.window", revised)
    st = state()
    assert st.status == "pass" and st.signoff == "stale"
    [ch] = st.changed
    assert ch.path == "method" and (ch.old, ch.new) == (1, 2)
    assert "revision 1 → 2" in ch.text()
    # Signing again under the revised method is current again; back at 1 it is stale.
    sign(p, stage="trigger", checks=["osc.window"], note="rechecked under revision 2")
    assert state().signoff == "signed"
    monkeypatch.setitem(CHECKS, "osc.window", dataclasses.replace(revised, revision=1))
    assert state().signoff == "stale"
