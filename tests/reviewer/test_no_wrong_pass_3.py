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


# --------------------------------------------------------------------------------------------
# turnoff.time, resonant commutation without a diode: the textbook hold time C·V_1/I_o takes
# the load current as constant while C discharges. A resistive load lets the loop (supply,
# load R, the commutating L and C) ring: the current rises above I_o and C discharges sooner.

DC_RESONANT = """
[project]
name = "test dc switch"
revision = "A"

[conditions]
ambient = {{ min = "0 degC", max = "40 degC" }}

[supply]
kind = "dc"
voltage = "100 V"

[parts.Q1]
type = "scr"
vdrm = "600 V"
vrrm = "600 V"
igt = "10 mA"
vgt = "1.5 V"
tq = "{tq}"
dvdt = "200 V/us"

[stages.sw]
kind = "dc-switch"
scr = "Q1"
load = {{ r = "5 ohm"{load_l} }}

[stages.rs]
kind = "resonant-commutation"
for = "sw"
c = "{c}"
l = "1 uH"
c_voltage = "400 V"
diode = false
"""


def _ivp_resonant_hold(*, vs: float, c: float, l: float, r: float,  # noqa: E741
                       l_load: float = 0.0) -> float:
    """The commutation of a DC switch by an L–C ring charged to the supply, integrated: the
    ring (SCR on, load current V_s/R) until its current reaches the load current, then the
    loop V_s, R, L_load, L, C in series; the SCR's voltage is v_C + L·di/dt. Returns the time
    from the SCR's current zero to its voltage returning to zero."""
    i_o = vs / r

    def ring(t, y):  # y = (i_ring, v_C): L·di/dt = v_C, C·dv_C/dt = −i (C starts at +V_s)
        return [y[1] / l, -y[0] / c]

    def reaches(t, y):
        return y[0] - i_o
    reaches.terminal, reaches.direction = True, 1
    s1 = solve_ivp(ring, (0, 10 * math.pi * math.sqrt(l * c)), [0.0, vs], events=reaches,
                   rtol=1e-11, atol=1e-12)
    assert s1.status == 1
    v1 = float(s1.y[1][-1])  # the capacitor at the SCR's current zero (positive: C's plate
    lt = l + l_load          # toward the cathode, so the SCR is reverse-biased by it)

    def loop(t, y):  # y = (i, v_x) with v_x = −v_C seen across the SCR: starts at −v1
        return [(vs - r * y[0] - y[1]) / lt, y[0] / c]

    def sees(t, y):
        return y[1] + l * (vs - r * y[0] - y[1]) / lt
    sees.terminal, sees.direction = True, 1
    t0 = 1e-9 * math.sqrt(lt * c)
    s2 = solve_ivp(loop, (0, 400 * max(math.sqrt(lt * c), r * c)), [i_o, -v1], events=sees,
                   rtol=1e-11, atol=1e-12, max_step=math.sqrt(lt * c) / 40, first_step=t0)
    times = [t for t in s2.t_events[0] if t > 10 * t0]
    return times[0]


def _resonant(tq: str, c: str = "10 uF", load_l: str = ""):
    text = DC_RESONANT.format(tq=tq, c=c, load_l=f', l = "{load_l}"' if load_l else "")
    project = load_project_text(text, "test.toml")
    [res] = evaluate(project, only=[("rs", "turnoff.time")], strict=True).results
    return res


def test_resonant_hold_time_of_a_resistive_load_from_the_loop():
    """100 V, 5 Ω (20 A), 10 µF charged to 100 V, 1 µH: the ring peaks at 316 A, reaches 20 A
    with C at 99.8 V; held at 20 A that would take C·V_1/I_o = 49.9 µs to discharge (1.66 ×
    a 30 µs tq: a pass), but the loop rings and the SCR is reverse-biased for 34.8 µs only:
    1.16 × tq, below the 1.2 × that the standard checklist asks for: a fail."""
    t_ref = _ivp_resonant_hold(vs=100.0, c=10e-6, l=1e-6, r=5.0)
    assert t_ref == pytest.approx(34.77e-6, rel=1e-3)
    assert t_ref / 30e-6 < 1.2
    res = _resonant("30 us")
    assert res.values["turnoff_time"].min == pytest.approx(t_ref, rel=1e-6)
    assert res.status == "fail"
    # The C the summary asks for holds the SCR off for 1.5 × tq in the integrated circuit.
    text = res.summary.split("C ≥ ")[-1].split(" to pass")[0]
    assert text.endswith("µF")
    c_pass = float(text.split()[0]) * 1e-6
    assert _ivp_resonant_hold(vs=100.0, c=c_pass, l=1e-6, r=5.0) >= 1.5 * 30e-6


def test_resonant_hold_time_with_a_load_choke_follows_the_choke():
    """The same switch with a 20 mH load choke: the current stays near 20 A and the hold time
    (49.7 µs) is close to C·V_1/I_o (49.9 µs). With 2 µH of load inductance it is 34.70 µs,
    a little shorter than with none (34.77 µs): the loop's ring is not monotonic in the load's
    inductance, so the check reads load.l rather than bounding it."""
    refs = {}
    for l_load, text in ((20e-3, "20 mH"), (2e-6, "2 uH")):
        refs[l_load] = _ivp_resonant_hold(vs=100.0, c=10e-6, l=1e-6, r=5.0, l_load=l_load)
        res = _resonant("20 us", load_l=text)
        assert "stages.sw.load.l" in res.snapshot["inputs"]
        assert res.values["turnoff_time"].min == pytest.approx(refs[l_load], rel=1e-6)
    assert refs[20e-3] == pytest.approx(10e-6 * 99.8 / 20.0, rel=5e-3)
    assert refs[2e-6] < _ivp_resonant_hold(vs=100.0, c=10e-6, l=1e-6, r=5.0)


def test_no_resonant_hold_time_longer_than_the_integrated_circuit():
    """A fixed-seed search over random circuits (charge ratio I_p/I_o 1.02–200, damping
    R/√(L/C) 0.01–100, load inductance 0 or 0.01–10⁴ × L): the check's t_c never exceeds the
    integrated circuit's, and agrees with it to 1e-6."""
    from checks.turnoff import time_check

    rng = np.random.default_rng(20261204)
    for k in range(40):
        c = 10 ** rng.uniform(-7, -4)
        l = 10 ** rng.uniform(-7, -4)  # noqa: E741
        z0 = math.sqrt(l / c)
        vs = 10 ** rng.uniform(1, 2.7)
        i_o = vs / z0 / 10 ** rng.uniform(math.log10(1.02), math.log10(200))
        r = vs / i_o
        l_load = 0.0 if k % 3 == 0 else l * 10 ** rng.uniform(-2, 4)
        t_ref = _ivp_resonant_hold(vs=vs, c=c, l=l, r=r, l_load=l_load)
        out = time_check(network="resonant", tq=np.array([1e-6]), c=c, l=l, r=r, v_s=vs,
                         diode="no", l_load=l_load,
                         limits={"fail_below": 1.2, "marginal_below": 1.5})
        t_c = float(out.values["turnoff_time"][0])
        assert t_c <= t_ref * (1 + 1e-6), (k, t_c, t_ref)
        assert t_c == pytest.approx(t_ref, rel=1e-6), (k, t_c, t_ref)
