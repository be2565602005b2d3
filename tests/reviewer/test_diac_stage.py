"""The diac-rc stage through the engine: pass, marginal and fail per check, no pass for a pot
setting that never fires, incomplete inputs, bad input, the firing range a power stage takes,
the report, the netlist refusal and the workbook."""

from __future__ import annotations

import asyncio
import math
import shutil
from pathlib import Path

import numpy as np
import pytest

from checks import diac
from reviewer.cli import main
from reviewer.engine import evaluate
from reviewer.errors import ProjectError
from reviewer.project import load_project_text
from reviewer.registry import Bound, Context
from reviewer.stages import diac as diac_stage
from tests.reviewer.test_spice import needs_ngspice
from tests.reviewer.test_spice import simulate as spice_run

DIMMER_PATH = Path(__file__).resolve().parents[1] / "projects" / "lamp-dimmer.toml"
DIMMER = DIMMER_PATH.read_text("utf-8")
POT = 'pot = { min = "0 ohm", max = "200 kohm" }'
TARGET = 'target = { min = "30 deg", max = "120 deg" }'


def result(text: str, check: str):
    p = load_project_text(text, "d.toml")
    return evaluate(p, only=[("trigger", check)], strict=True).results[0]


def with_(text: str = DIMMER, **repl: str) -> str:
    for old, new in repl.items():
        assert old in text, old
        text = text.replace(old, new)
    return text


# ---------------------------------------------------------------------------- firing range

def test_range_pass_marginal_fail():
    """Worst corners: VBO 28–36 V, C 90–110 nF, line 207–253 V. Pot 0–200 k + 3.3 k: the
    low end fires at 12.7° at worst, the high end runs down to 72.9° at worst (running);
    a target of 20°–70° is covered, 20°–72° within 2 % (marginal), 30°–120° is not."""
    ok = result(with_(**{TARGET: 'target = { min = "20 deg", max = "70 deg" }'}),
                "diac.firing-range")
    assert ok.status == "pass", ok.summary
    marg = result(with_(**{TARGET: 'target = { min = "20 deg", max = "72 deg" }'}),
                  "diac.firing-range")
    assert marg.status == "marginal", marg.summary
    bad = result(DIMMER, "diac.firing-range")
    assert bad.status == "fail" and "a later high end" in bad.summary
    assert bad.values["alpha_hi"].min == pytest.approx(72.9, abs=0.05)  # degrees


def test_range_values_are_the_check_functions_at_the_worst_corner():
    """The reported ends are checks.diac's running angles at the corners that set them: the
    low end at VBO 36 V, C 110 nF, 207 V (latest); the high end at 28 V, 90 nF, 253 V
    (earliest). The first half-cycle from off fires later (the starting angle)."""
    r = result(DIMMER, "diac.firing-range")
    lo = diac.firing_angle(vm=207 * 2**0.5, omega=2 * np.pi * 50, r1=3.3e3, c1=110e-9,
                           vbo=36.0, breakback=6.0, running=True)
    lo_start = diac.firing_angle(vm=207 * 2**0.5, omega=2 * np.pi * 50, r1=3.3e3, c1=110e-9,
                                 vbo=36.0)
    assert r.values["alpha_lo_start"].max == pytest.approx(math.degrees(float(lo_start)),
                                                           rel=1e-9)
    assert lo_start > lo
    hi = diac.firing_angle(vm=253 * 2**0.5, omega=2 * np.pi * 50, r1=203.3e3, c1=90e-9,
                           vbo=28.0, breakback=6.0, running=True)
    assert r.values["alpha_lo"].max == pytest.approx(math.degrees(float(lo)), rel=1e-9)
    assert r.values["alpha_hi"].min == pytest.approx(math.degrees(float(hi)), rel=1e-9)


def test_pot_setting_that_never_fires_is_not_a_pass():
    """A 250 k pot: at VBO 36 V, C 110 nF and 207 V the capacitor's crest stays below VBO
    above about 230 k (√((Vm/VBO)² − 1)/(ωC) − 3.3 k): no firing there, whatever the target
    says — the check fails and names the setting."""
    text = with_(**{POT: 'pot = { min = "0 ohm", max = "250 kohm" }',
                    TARGET: 'target = { min = "30 deg", max = "90 deg" }'})
    r = result(text, "diac.firing-range")
    assert r.status == "fail"
    limit = math.sqrt((207 * 2**0.5 / 36.0) ** 2 - 1) / (2 * math.pi * 50 * 110e-9) - 3.3e3
    assert "never reaches VBO above a pot setting of" in r.summary
    assert r.values["fires_up_to"].min == pytest.approx(limit, rel=1e-6)
    assert "needs pot max ≤" in r.summary


def test_pot_at_zero_without_series_r():
    """Pot from 0 Ω and no series R: the low end fires where the line itself reaches VBO
    (the capacitor follows the line), not a failure to fire."""
    r = result(with_(**{'series_r = "3.3 kohm"\n': ""}), "diac.firing-range")
    assert "never reaches VBO" not in r.summary
    assert r.values["alpha_lo_start"].min == pytest.approx(
        math.degrees(math.asin(28.0 / (253 * 2**0.5))), abs=0.05)


def test_range_without_target_is_incomplete():
    r = result(with_(**{TARGET + "\n": ""}), "diac.firing-range")
    assert r.status == "incomplete" and "stages.trigger.target" in r.summary


# ---------------------------------------------------------------------------- snap-on

def test_snap_on_fail_single_pass_double():
    """Single time constant: the angle jumps 38° at worst (limit 35°): fails. With a second
    section of 15 k and 47 nF the jump falls to about a third: passes; 1 k and 220 nF (a C2
    larger than C1 shares less) jumps 31.6° at worst, above 80 % of the limit: marginal."""
    single = result(DIMMER, "diac.snap-on")
    assert single.status == "fail" and "second RC section" in single.summary
    # R_on is above 200 k at every corner: the pot never turns the lamp off.
    assert single.values["pot_on"].min > 200e3 and "stays on" in single.summary
    assert single.values["charge_removed"].max == pytest.approx(110e-9 * 6.0)  # C·ΔV
    reach = result(with_(**{POT: 'pot = { min = "0 ohm", max = "400 kohm" }'}), "diac.snap-on")
    assert "stays on" not in reach.summary
    double = with_(**{'c = "100 nF +-10%"': 'c = "100 nF +-10%"\nr2 = "15 kohm"\nc2 = "47 nF"'})
    r = result(double, "diac.snap-on")
    assert r.status == "pass", r.summary
    assert r.values["jump"].max < single.values["jump"].max / 2
    marg = with_(**{'c = "100 nF +-10%"': 'c = "100 nF +-10%"\nr2 = "1 kohm"\nc2 = "220 nF"'})
    m = result(marg, "diac.snap-on")
    assert m.status == "marginal", m.summary


# ---------------------------------------------------------------------------- gate pulse

def test_gate_pulse_pass_marginal_fail_and_incomplete():
    """At −10 °C IGT(III) 15 mA × 1.54 = 23 mA and VGT 1.3 V × 1.27 = 1.65 V (the common-
    practice factors, pro rata): (6 − 1.65) V through 47 Ω is 92.6 mA: pass; 120 Ω gives
    36 mA, 1.57×: marginal; 330 Ω 13 mA: fail. No gate_r and no r_on: incomplete. A cold
    table for the triac replaces the factors."""
    assert result(DIMMER, "diac.gate-pulse").status == "pass"
    m = result(with_(**{'gate_r = "47 ohm"': 'gate_r = "120 ohm"'}), "diac.gate-pulse")
    assert m.status == "marginal", m.summary
    f = result(with_(**{'gate_r = "47 ohm"': 'gate_r = "330 ohm"'}), "diac.gate-pulse")
    assert f.status == "fail" and "needs a peak" in f.summary
    i = result(with_(**{'gate_r = "47 ohm"\n': ""}), "diac.gate-pulse")
    assert i.status == "incomplete" and "gate_r" in i.summary
    over = result(with_(**{'gate_r = "47 ohm"': 'gate_r = "1 ohm"'}), "diac.gate-pulse")
    assert over.status == "fail" and "pulse rating" in over.summary
    r = result(DIMMER, "diac.gate-pulse")
    assert r.values["peak_current"].min == pytest.approx((6 - 1.3 * (1 + 0.5 * 35 / 65)) / 47)
    cold = with_(**{'vgt_q4 = "1.5 V"': 'vgt_q4 = "1.5 V"\n'
                    'cold = { at = "-40 degC", igt_q3 = "45 mA", vgt_q3 = "1.6 V" }'})
    c = result(cold, "diac.gate-pulse")
    # 15 mA at 25 °C to 45 mA at −40 °C: 35/65 of the way at −10 °C is 31.2 mA
    assert c.values["igt_cold"].max == pytest.approx(15e-3 + 30e-3 * 35 / 65)


# ---------------------------------------------------------------------------- symmetry

def test_symmetry_pass_marginal_fail():
    """A 2 V asymmetry: 0.29 % of Vm at worst (limit 1 %, marginal above 0.5 %): pass;
    4 V: marginal; 8 V: fail (the halves drop out at different pot settings: a half-wave)."""
    assert result(DIMMER, "diac.symmetry").status == "pass"
    m = result(with_(**{'vbo_asymmetry = "2 V"': 'vbo_asymmetry = "4 V"'}), "diac.symmetry")
    assert m.status == "marginal", m.summary
    f = result(with_(**{'vbo_asymmetry = "2 V"': 'vbo_asymmetry = "8 V"'}), "diac.symmetry")
    assert f.status == "fail", f.summary
    dc = with_(**{'vbo_asymmetry = "2 V"': 'vbo_asymmetry = "8 V"',
                  'gate_r = "47 ohm"': 'gate_r = "47 ohm"\nload_r = "20 ohm"'})
    r = result(dc, "diac.symmetry")
    assert r.values["dc_current"].max == pytest.approx(r.values["dc_voltage"].max / 20.0)
    assert "DC through the load" in r.summary
    i = result(with_(**{'vbo_asymmetry = "2 V"\n': ""}), "diac.symmetry")
    assert i.status == "incomplete" and "vbo_asymmetry" in i.summary


# ---------------------------------------------------------------------------- input errors

def test_second_section_needs_both(tmp_path, capsys):
    text = with_(**{'c = "100 nF +-10%"': 'c = "100 nF +-10%"\nr2 = "15 kohm"'})
    with pytest.raises(ProjectError, match="r2 and c2"):
        evaluate(load_project_text(text, "d.toml"), strict=True)
    path = tmp_path / "d.toml"
    path.write_text(text, "utf-8")
    assert main(["check", str(path)]) == 2
    assert "r2 and c2" in capsys.readouterr().err


def test_unknown_part_type_lists_the_types():
    text = with_(**{'type = "diac"': 'type = "diak"'})
    with pytest.raises(ProjectError, match='"diac"'):
        load_project_text(text, "d.toml")


def test_dc_supply_refused():
    text = with_(**{'kind = "ac"': 'kind = "dc"', 'frequency = "50 Hz"\n': ""})
    with pytest.raises(ProjectError, match="ac supply"):
        evaluate(load_project_text(text, "d.toml"), strict=True)


# ---------------------------------------------------------------------------- firing range out

def test_binding_helper_gives_the_running_range():
    """bind_firing/firing_from: per row, the running angles at the pot's ends and at the swept
    pot value — the same numbers as checks.diac at the nominal row."""
    p = load_project_text(DIMMER, "d.toml")
    stage = p.stages["trigger"]
    ctx = Context(p, stage)
    b = Bound()
    diac_stage.bind_firing(ctx, b, stage, sweep=5)
    # No premise: a target the pot misses is no reason to block the power checks; a corner
    # that does not fire gives NaN angles instead, which no check passes (below).
    assert b.depends == [] and b.options["diac_trigger"] and b.options["firing_vs_only"]
    kw = {k: np.array([i.value.nom]) for k, i in b.inputs.items()}
    kw.update(b.options)
    a, lo, hi = diac_stage.firing_from(kw)
    assert not any(k.startswith("dt_") for k in kw)
    ref = diac.firing_angle(vm=230 * 2**0.5, omega=2 * np.pi * 50, r1=203.3e3, c1=100e-9,
                            vbo=32.0, breakback=6.0, running=True)
    assert float(hi[0]) == pytest.approx(float(ref), rel=1e-12)
    assert float(lo[0]) < float(a[0]) <= float(hi[0])


POWER = """
[stages.power]
kind = "triac-phase-control"
triac = "T1"
gate = "trigger"
load = { r = "88 ohm +-5%" }
"""


def test_triac_stage_takes_its_firing_from_the_trigger():
    """A triac-phase-control stage whose gate is the diac-rc stage and that gives no `firing`
    computes over the trigger's running range: the resistive load's power at the earliest
    angle (low end: VBO 28 V, C 90 nF, 253 V; the load at −5 %) is
    V²/R·(1 − α/π + sin 2α/(2π)) (Rashid 4th ed. §11, from memory) at checks.diac's angle;
    the α = 90° pot settings are in the sweep (where the RMS current's worst may sit)."""
    p = load_project_text(DIMMER + POWER, "d.toml")
    res = evaluate(p, only=[("power", "triac.output"), ("power", "triac.rms-current")],
                   strict=True).results
    out = next(r for r in res if r.check == "triac.output")
    assert out.status == "pass" and "firing range from the diac-RC trigger" in " ".join(
        out.notes)
    a = float(diac.firing_angle(vm=253 * 2**0.5, omega=2 * np.pi * 50, r1=3.3e3, c1=90e-9,
                                vbo=28.0, breakback=6.0, running=True))
    full = 253.0**2 / (88 * 0.95) * (1 - a / np.pi + np.sin(2 * a) / (2 * np.pi))
    assert out.values["load_power"].max == pytest.approx(full, rel=1e-9)
    assert out.values["conduction_angle"].max == pytest.approx(180 - np.degrees(a), rel=1e-9)
    ctx = Context(p, p.stages["power"])
    b = Bound()
    diac_stage.bind_firing(ctx, b, p.stages["trigger"], sweep=7, extra=(np.pi / 2,))
    extra = b.inputs["dt_pot"].extra
    assert extra and all(0 < x < 200e3 for x in extra)
    dead = load_project_text(with_(DIMMER + POWER, **{
        POT: 'pot = { min = "0 ohm", max = "250 kohm" }'}), "d.toml")
    r = evaluate(dead, only=[("power", "triac.output")], strict=True).results[0]
    assert r.status != "pass"
    # Each added setting fires at 90° at one combination of the other inputs' ends.
    grid = [(vs, vbo, c) for vs in (207.0, 253.0) for vbo in (28.0, 36.0)
            for c in (90e-9, 110e-9)]
    for x in extra:
        angles = [float(diac.firing_angle(vm=vs * 2**0.5, omega=2 * np.pi * 50, r1=x + 3.3e3,
                                          c1=c, vbo=vbo, breakback=6.0, running=True))
                  for vs, vbo, c in grid]
        assert min(abs(a - np.pi / 2) for a in angles) < 1e-6


# ---------------------------------------------------------------------------- outputs

def test_report_html_and_markdown(tmp_path):
    html, md = tmp_path / "r.html", tmp_path / "r.md"
    assert main(["report", str(DIMMER_PATH), "-o", str(html)]) == 0
    assert main(["report", str(DIMMER_PATH), "--format", "md", "-o", str(md)]) == 0
    h = html.read_text("utf-8")
    assert "diac.firing-range" in h and "diac.symmetry" in h
    assert "no schematic for a diac-rc stage" not in h and "DIAC" in h  # drawn
    assert "diac.snap-on" in md.read_text("utf-8")


@needs_ngspice
@pytest.mark.parametrize("second", ["", 'r2 = "15 kohm"\nc2 = "47 nF"'])
def test_spice_netlist_fires_at_the_running_angle(tmp_path, second):
    """ngspice (an independent circuit simulator) runs the exported netlist for 10 cycles:
    the triac turns on, in the last positive half-cycle, at the running angle of
    checks.diac at the nominal (pot at 100 k of 0–200 k) within 0.5 %; single and double
    time constant."""
    text = with_(**{'c = "100 nF +-10%"': 'c = "100 nF +-10%"\n' + second})
    path = tmp_path / "d.toml"
    path.write_text(text, "utf-8")
    out = tmp_path / "d.cir"
    assert main(["export", "--spice", "trigger", str(path), "-o", str(out)]) == 0
    deck = out.read_text("utf-8")
    assert "DIACSW" in deck and "TRIACSW" in deck
    data = spice_run(deck, "v(line) v(mt2)", tmp_path)
    t, vl, vm = data[:, 0], data[:, 1], data[:, 2]
    on = (np.abs(vm) < 5.0) & (vl > 10.0)
    starts = t[1:][on[1:] & ~on[:-1]]
    w = 2 * np.pi * 50
    alpha = float((w * starts[-1]) % (2 * np.pi))
    kw = {"r2": 15e3, "c2": 47e-9} if second else {}
    ref = diac.firing_angle(vm=230 * 2**0.5, omega=w, r1=103.3e3, c1=100e-9, vbo=32.0,
                            breakback=6.0, running=True, **kw)
    assert alpha == pytest.approx(float(ref), rel=5e-3)


def test_workbook_opens_the_project(tmp_path):
    """The workbook shows the stage and every diac check's detail without an error."""
    from reviewer.tui.app import Workbook
    from reviewer.tui.session import Session
    from tests.tui.conftest import screen_text, settle

    path = tmp_path / "lamp-dimmer.toml"
    shutil.copyfile(DIMMER_PATH, path)

    async def go():
        app = Workbook(Session(path))
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot, app)
            assert "trigger" in screen_text(app)
            for check in ("diac.firing-range", "diac.snap-on", "diac.gate-pulse",
                          "diac.symmetry"):
                app.open_check("trigger", check)
                await pilot.pause()
                body = str(app.screen.query_one("#detail").render())
                assert "Question" in body and "Method" in body
                await pilot.press("v")
                await pilot.pause()
                if check == "diac.firing-range":  # the firing angle over the pot's travel
                    text = screen_text(app)
                    assert any(0x2801 <= ord(ch) <= 0x28FF for ch in text)
                    assert "pot" in text
                await pilot.press("escape")
                await pilot.pause()
            app.session.close()
    asyncio.run(go())
