"""The ``osc.*`` checks through the engine: pass, marginal and fail on circuits built here.

Every project is written as TOML and loaded by the project loader, then evaluated with
``strict=True`` (a defect in a check raises instead of becoming an ``error`` result). Where the
standard checklist has no marginal band (fail_below = marginal_below) a test checklist with a
wider band is used to reach ``marginal``.
"""

from __future__ import annotations

import copy
import math
from pathlib import Path
from typing import Any

import pytest
import tomli_w

from checks import oscillator as osc
from reviewer.checklist import Checklist, standard
from reviewer.engine import Result, evaluate
from reviewer.project import load_project, load_project_text
from reviewer.schema import CATALOGUE

NAMES = {
    "osc.window": {"peak_voltage", "r_min", "r_max", "timing_r"},
    "osc.timing": {"period", "frequency", "charge_time", "discharge_time", "approx_period"},
    "osc.idle-gate": {"idle_voltage", "vgd"},
    "osc.discharge": {"peak_current", "pulse_energy"},
    "osc.dissipation": {"dissipation"},
    "osc.leakage": {"charge_current", "ip"},
    "osc.temp-comp": {"base2_r", "base2_r_rule"},
}

SCR = {"type": "scr", "vdrm": "600 V", "vrrm": "600 V", "igt": "10 mA", "vgt": "1.5 V",
       "vgd": "0.2 V"}
UJT = {"type": "ujt", "eta": 0.6, "rbb": "5 kohm", "ip": "10 uA", "iv": "10 mA", "vv": "1 V",
       "vd": "0.7 V", "rb1_on": "100 ohm", "ie_peak": "2 A", "pd": "300 mW"}
PUT = {"type": "put", "ip": "100 uA", "iv": "5.5 mA", "rg": "3.33 kohm", "offset": "0.7 V",
       "vv": "1 V", "vf": "1.2 V", "itrm": "1 A", "energy": "100 uJ", "pd": "300 mW"}
UJT_STAGE = {"kind": "ujt-oscillator", "ujt": "U1", "supply": "12 V", "timing_r": "50 kohm",
             "timing_c": "100 nF", "base1_r": "100 ohm", "base2_r": "1 kohm"}
PUT_STAGE = {"kind": "put-oscillator", "put": "U1", "supply": "12 V", "timing_r": "10 kohm",
             "timing_c": "1 uF", "gate_r_upper": "5 kohm", "gate_r_lower": "10 kohm",
             "cathode_r": "100 ohm"}
GATE = {"kind": "gate-drive", "source": "osc", "scr": "Q1", "coupling": "direct",
        "series_r": "100 ohm"}


def project(device: str = "ujt", *, stage: dict[str, Any] | None = None,
            part: dict[str, Any] | None = None, gate: dict[str, Any] | None = None,
            scr: dict[str, Any] | None = None, supply: dict[str, Any] | None = None,
            drop: tuple[str, ...] = (), drop_part: tuple[str, ...] = ()) -> Any:
    """A one-oscillator project (plus an optional gate drive), loaded by the real loader."""
    st = copy.deepcopy(UJT_STAGE if device == "ujt" else PUT_STAGE) | (stage or {})
    pt = copy.deepcopy(UJT if device == "ujt" else PUT) | (part or {})
    for k in drop:
        st.pop(k, None)
    for k in drop_part:
        pt.pop(k, None)
    doc: dict[str, Any] = {
        "project": {"name": "oscillator test bench", "revision": "A"},
        "conditions": {"ambient": {"min": "0 degC", "max": "45 degC"}, "enclosure_rise": "10 K"},
        "supply": {"kind": "ac", "voltage": "230 V", "frequency": "50 Hz"} | (supply or {}),
        "parts": {"U1": pt, "Q1": SCR | (scr or {})},
        "stages": {"osc": st},
    }
    if gate is not None:
        doc["stages"]["drive"] = GATE | gate
    return load_project_text(tomli_w.dumps(doc), "bench.toml")


def run(check: str, proj: Any, checklist: Checklist | None = None) -> Result:
    res = evaluate(proj, checklist, only=[("osc", check)], strict=True).results
    assert len(res) == 1
    r = res[0]
    if r.status not in ("not-applicable", "incomplete"):
        assert NAMES[check] <= set(r.values), set(r.values)
        assert r.summary and "\n" not in r.summary
    return r


def wide(check: str, **limits: float) -> Checklist:
    """The standard checklist with other limits for one check."""
    base = standard()
    lim = {k: dict(v) for k, v in base.limits.items()}
    lim[check] = lim[check] | limits
    return Checklist("test", "1", lim)


# --------------------------------------------------------------------------- osc.window

@pytest.mark.parametrize(("rt", "status"), [("50 kohm", "pass"), ("300 kohm", "marginal"),
                                            ("500 kohm", "fail"), ("1 kohm", "fail")])
def test_window_ujt(rt: str, status: str) -> None:
    r = run("osc.window", project(stage={"timing_r": rt}))
    assert r.status == status
    vp = 0.7 + 12 * (0.6 * 5e3 + 100) / (5e3 + 100 + 1e3)
    assert r.values["peak_voltage"].nominal == pytest.approx(vp)
    assert r.values["r_max"].nominal == pytest.approx((12 - vp) / 10e-6)
    assert "25 °C" in r.summary
    if status == "fail" and rt == "500 kohm":
        assert "needs R_T ≤ 433 kΩ" in r.summary
    if status == "fail" and rt == "1 kohm":
        assert "must exceed 1.1 kΩ" in r.summary
    if status == "marginal":
        assert "R_T ≤ 260 kΩ would pass" in r.summary


@pytest.mark.parametrize(("rt", "status"), [("10 kohm", "pass"), ("20 kohm", "marginal"),
                                            ("30 kohm", "fail")])
def test_window_put(rt: str, status: str) -> None:
    r = run("osc.window", project("put", stage={"timing_r": rt}))
    assert r.status == status
    assert r.values["r_max"].nominal == pytest.approx(33e3)  # Boylestad PUT inputs [memory]
    assert not any("R_G" in n for n in r.notes)  # rg 3.33 kΩ matches 5 k ∥ 10 k


def test_window_put_without_valley_current_fails_with_the_reason() -> None:
    r = run("osc.window", project("put", drop_part=("iv",)))
    assert r.status == "fail"
    assert "no guaranteed valley current at this R_G" in r.summary


def test_window_put_rg_mismatch_is_noted() -> None:
    r = run("osc.window", project("put", part={"rg": "100 kohm"}))
    assert any("R_G = 100 kΩ" in n and "3.33 kΩ" in n for n in r.notes)


def test_window_line_sync_uses_the_clamp_plateau() -> None:
    r = run("osc.window", project(stage={"sync": "line", "zener": "20 V"}))
    vp = 0.7 + 20 * (0.6 * 5e3 + 100) / (5e3 + 100 + 1e3)
    assert r.values["peak_voltage"].nominal == pytest.approx(vp)


# --------------------------------------------------------------------------- osc.timing

def test_timing_free_fixed_rt() -> None:
    base = {"timing_r": "50 kohm ±5%"}
    ok = run("osc.timing", project(stage=base | {"target": {"min": "200 Hz", "max": "300 Hz"}}))
    assert ok.status == "pass"
    fr = osc.free_running(device="ujt", v1=12.0, rt=50e3, ct=100e-9, vv=1.0,
                          r_discharge=200.0, eta=0.6, rbb=5e3, r1=100.0, r2=1e3, vd=0.7)
    assert ok.values["period"].nominal == pytest.approx(float(fr["period"]))
    assert ok.values["approx_period"].nominal == pytest.approx(50e3 * 100e-9 * math.log(2.5))
    assert "firing_angle" not in ok.values
    bad = run("osc.timing", project(stage=base | {"target": {"min": "100 Hz", "max": "250 Hz"}}))
    assert bad.status == "fail"
    assert "needs R_T ≈" in bad.summary
    marg = run("osc.timing", project(stage=base | {"target": {"min": "240 Hz", "max": "300 Hz"}}),
               wide("osc.timing", marginal_below=1.1))
    assert marg.status == "marginal"


def test_timing_free_adjustable_rt_covers_target() -> None:
    adj = {"timing_r": {"min": "10 kohm", "max": "200 kohm"}}
    ok = run("osc.timing", project(stage=adj | {"target": {"min": "100 Hz", "max": "500 Hz"}}))
    assert ok.status == "pass"
    assert ok.values["frequency"].max > 500 and ok.values["frequency"].min < 100
    bad = run("osc.timing", project(stage=adj | {"target": {"min": "100 Hz", "max": "2 kHz"}}))
    assert bad.status == "fail"
    assert "R_T,min ≤ about" in bad.summary


def test_timing_free_without_target_and_r_on_assumed() -> None:
    r = run("osc.timing", project(drop_part=("rb1_on",)))
    assert r.status == "pass"
    assert "no target given" in r.summary and "r_on = 0 assumed" in r.summary
    fr = osc.free_running(device="ujt", v1=12.0, rt=50e3, ct=100e-9, vv=1.0,
                          r_discharge=100.0, eta=0.6, rbb=5e3, r1=100.0, r2=1e3, vd=0.7)
    assert r.values["discharge_time"].nominal == pytest.approx(float(fr["discharge_time"]))


def test_timing_never_fires_fails() -> None:
    # peak point above the supply: the PUT gate divider puts VP at 11.6 V + 0.7 V > 12 V
    r = run("osc.timing", project("put", stage={"gate_r_upper": "1 kohm",
                                                "gate_r_lower": "30 kohm"}))
    # It never fires, so osc.window fails and the timing it would give means nothing.
    assert r.status == "blocked"
    assert r.summary.startswith("blocked: needs osc.window of `osc`, which is fail")


LINE = {"sync": "line", "zener": "20 V", "base1_r": "1 mohm", "base2_r": "0 ohm",
        "timing_c": "100 nF"}
O6_PART = {"eta": 0.63, "rbb": "7 kohm", "vd": "0.5 V", "vv": "2 V"}


def test_timing_line_sync_o6_through_the_engine() -> None:
    # [recomputed] O6 inputs (all assumed): 230 V 50 Hz, VZ 20 V, η 0.63, VD 0.5 V, 0.1 µF
    for rt, alpha in (("10 kohm", 20.95), ("22 kohm", 43.92), ("47 kohm", 91.80)):
        r = run("osc.timing", project(stage=LINE | {"timing_r": rt}, part=O6_PART))
        assert r.values["firing_angle"].nominal == pytest.approx(alpha, abs=0.05)
        assert NAMES["osc.timing"] | {"firing_angle"} <= set(r.values)


def test_timing_line_sync_coverage() -> None:
    adj = LINE | {"timing_r": {"min": "10 kohm", "max": "47 kohm"}}
    ok = run("osc.timing", project(stage=adj | {"target": {"min": "30 deg", "max": "90 deg"}},
                                   part=O6_PART))
    assert ok.status == "pass"
    assert ok.values["firing_angle"].min == pytest.approx(20.95, abs=0.05)
    assert ok.values["firing_angle"].max == pytest.approx(91.80, abs=0.05)
    bad = run("osc.timing", project(stage=adj | {"target": {"min": "15 deg", "max": "90 deg"}},
                                    part=O6_PART))
    assert bad.status == "fail"
    assert "R_T,min ≤ about" in bad.summary
    late = run("osc.timing", project(stage=adj | {"target": {"min": "30 deg",
                                                             "max": "120 deg"}}, part=O6_PART))
    assert late.status == "fail" and "R_T,max ≥ about" in late.summary
    marg = run("osc.timing", project(stage=adj | {"target": {"min": "30 deg", "max": "90 deg"}},
                                     part=O6_PART), wide("osc.timing", marginal_below=1.05))
    assert marg.status == "marginal"


def test_timing_line_sync_line_tolerance_moves_the_angle() -> None:
    r = run("osc.timing", project(stage=LINE | {"timing_r": "22 kohm", "zener": "20 V ±5%"},
                                  part=O6_PART, supply={"voltage": "230 V ±10%"}))
    lo, hi = r.values["firing_angle"].min, r.values["firing_angle"].max
    assert lo < 43.92 < hi
    # the extremes agree with the direct function at the corresponding ends
    vm = 230 * math.sqrt(2)
    fn = lambda vz, v: math.degrees(float(osc.line_sync_firing_angle(  # noqa: E731
        device="ujt", vm=v, omega=2 * math.pi * 50, vz=vz, rt=22e3, ct=100e-9, eta=0.63,
        rbb=7e3, r1=1e-3, r2=0.0, vd=0.5)))
    assert lo == pytest.approx(min(fn(21.0, 1.1 * vm), fn(21.0, 0.9 * vm)), abs=1e-6)
    assert hi == pytest.approx(max(fn(19.0, 1.1 * vm), fn(19.0, 0.9 * vm)), abs=1e-6)


def test_timing_ripple_is_reported() -> None:
    r = run("osc.timing", project(stage={"supply_ripple": "1 V"}))
    assert "ripple moves the firing instant by" in r.summary


def test_timing_put_line_sync() -> None:
    r = run("osc.timing", project("put", stage={"sync": "line", "zener": "15 V",
                                                "timing_r": "68 kohm", "timing_c": "100 nF",
                                                "gate_r_upper": "20 kohm",
                                                "gate_r_lower": "20 kohm"}))
    want = osc.line_sync_firing_angle(device="put", vm=230 * math.sqrt(2),
                                      omega=2 * math.pi * 50, vz=15.0, rt=68e3, ct=100e-9,
                                      r_upper=20e3, r_lower=20e3, offset=0.7)
    assert r.values["firing_angle"].nominal == pytest.approx(math.degrees(float(want)))


# --------------------------------------------------------------------------- osc.idle-gate

@pytest.mark.parametrize(("r1", "status"), [("47 ohm", "pass"), ("100 ohm", "marginal"),
                                            ("150 ohm", "fail")])
def test_idle_gate_ujt(r1: str, status: str) -> None:
    r = run("osc.idle-gate", project(stage={"base1_r": r1}, gate={}))
    assert r.status == status
    r1v = float(r1.split()[0])
    assert r.values["idle_voltage"].nominal == pytest.approx(r1v * 12 / (r1v + 5e3 + 1e3))
    assert r.values["vgd"].nominal == pytest.approx(0.2)
    if status == "fail":
        assert "needs R1 ≤" in r.summary


def test_idle_gate_with_gate_cathode_resistor() -> None:
    r = run("osc.idle-gate", project(stage={"base1_r": "150 ohm"},
                                     gate={"gate_cathode_r": "220 ohm"}))
    v_idle = 150 * 12 / (150 + 6e3)
    r_src = 150 * 6e3 / 6150
    assert r.values["idle_voltage"].nominal == pytest.approx(v_idle * 220 / (r_src + 100 + 220))
    assert r.status == "pass"


def test_idle_gate_not_applicable() -> None:
    r = run("osc.idle-gate", project())
    assert r.status == "not-applicable" and "no directly coupled" in r.summary
    r = run("osc.idle-gate", project(gate={"coupling": "transformer", "turns_ratio": 1.0}))
    assert r.status == "not-applicable" and "transformer" in r.summary
    scr_no_vgd = project(gate={})
    scr_no_vgd.parts["Q1"].params.pop("vgd")
    r = run("osc.idle-gate", scr_no_vgd)
    assert r.status == "incomplete" and "parts.Q1.vgd not given" in r.summary


def test_idle_gate_put() -> None:
    r = run("osc.idle-gate", project("put", gate={}))
    assert r.status == "pass"
    assert r.values["idle_voltage"].nominal == pytest.approx(100e-6 * 100)
    bad = run("osc.idle-gate", project("put", stage={"cathode_r": "2.2 kohm"}, gate={}))
    assert bad.status == "fail" and "needs R_K ≤" in bad.summary


# --------------------------------------------------------------------------- osc.discharge

def test_discharge_ujt() -> None:
    ok = run("osc.discharge", project())
    assert ok.status == "pass"
    vp = 0.7 + 12 * 3100 / 6100
    assert ok.values["peak_current"].nominal == pytest.approx((vp - 0.7) / 200)
    assert ok.values["pulse_energy"].nominal == pytest.approx(0.5 * 100e-9 * vp ** 2)
    bad = run("osc.discharge", project(part={"ie_peak": "20 mA"}))
    assert bad.status == "fail" and "needs R1 ≥" in bad.summary
    marg = run("osc.discharge", project(part={"ie_peak": "50 mA"}),
               wide("osc.discharge", marginal_below=2.0))
    assert marg.status == "marginal"
    assumed = run("osc.discharge", project(drop_part=("rb1_on",)))
    assert any("r_on = 0" in n for n in assumed.notes)
    na = run("osc.discharge", project(drop_part=("ie_peak",)))
    assert na.status == "incomplete" and "ie_peak not given" in na.summary


def test_discharge_put_energy_and_gate_short() -> None:
    ok = run("osc.discharge", project("put"))
    assert ok.status == "pass"
    assert ok.values["pulse_energy"].nominal == pytest.approx(0.5 * 1e-6 * 8.7 ** 2)
    bad = run("osc.discharge", project("put", part={"energy": "30 uJ"}))
    assert bad.status == "fail" and "C_T ≤" in bad.summary
    gated = run("osc.discharge", project("put", gate={}))
    r_eff = 100 * 100 / 200
    assert gated.values["peak_current"].nominal == pytest.approx((8.7 - 1.2) / r_eff)


# --------------------------------------------------------------------------- osc.dissipation

def test_dissipation_ujt() -> None:
    ok = run("osc.dissipation", project())
    assert ok.status == "pass"
    assert ok.values["dissipation"].nominal == pytest.approx((12 / 6100) ** 2 * 5e3)
    assert "assumed" in ok.summary and "125 °C" in ok.summary
    hot = {"supply": "30 V"}
    bad = run("osc.dissipation", project(stage=hot, part={"pd": "100 mW"}))
    assert bad.status == "fail" and "needs R2 ≥" in bad.summary
    # allowed 0.1 W·(125 − 55)/100 = 70 mW: R2 ≥ 30 V·√(5 kΩ/70 mW) − 5.1 kΩ = 2.92 kΩ
    assert "needs R2 ≥ 2.92 kΩ" in bad.summary
    ok2 = run("osc.dissipation", project(stage=hot | {"base2_r": "2.95 kohm"},
                                         part={"pd": "100 mW"}))
    assert ok2.status == "pass"
    marg = run("osc.dissipation", project(stage=hot), wide("osc.dissipation",
                                                           marginal_below=2.0))
    assert marg.status == "marginal"
    na = run("osc.dissipation", project(drop_part=("pd",)))
    assert na.status == "incomplete" and "pd not given" in na.summary


def test_dissipation_put() -> None:
    ok = run("osc.dissipation", project("put"))
    assert ok.status == "pass"
    bad = run("osc.dissipation", project("put", part={"pd": "100 uW"}))
    assert bad.status == "fail"


# --------------------------------------------------------------------------- osc.leakage

@pytest.mark.parametrize(("leak", "status"), [(None, "pass"), ("50 uA", "marginal"),
                                              ("100 uA", "fail")])
def test_leakage(leak: str | None, status: str) -> None:
    r = run("osc.leakage", project(stage={"leakage": leak} if leak else {}))
    assert r.status == status
    vp = 0.7 + 12 * 3100 / 6100
    assert r.values["charge_current"].nominal == pytest.approx((12 - vp) / 50e3)
    if leak is None:
        assert "no leakage data" in r.summary
    else:
        assert "needs R_T,max ≤" in r.summary


# --------------------------------------------------------------------------- osc.temp-comp

@pytest.mark.parametrize(("r2", "status"), [("1 kohm", "pass"), ("100 ohm", "marginal"),
                                            ("0 ohm", "marginal"), ("100 kohm", "marginal")])
def test_temp_comp_is_advisory(r2: str, status: str) -> None:
    r = run("osc.temp-comp", project(stage={"base2_r": r2}))
    assert r.status == status  # never fail
    assert r.values["base2_r_rule"].nominal == pytest.approx(1e4 / (0.6 * 12))
    if status == "marginal":
        assert "choose R2 within" in r.summary


def test_temp_comp_not_for_put_and_physical_estimate() -> None:
    res = evaluate(project("put"), only=[("osc", "osc.temp-comp")], strict=True).results
    assert res == []
    r = run("osc.temp-comp", project(part={"rbb_tempco": "0.5 %/K"}))
    assert "physical estimate" in r.summary


# --------------------------------------------------------------------------- demo projects

DEMOS = sorted(Path(__file__).resolve().parents[2].joinpath("projects").glob("*.toml"))


@pytest.mark.parametrize("path", DEMOS, ids=[p.name for p in DEMOS])
def test_demo_projects_run_every_osc_check(path: Path) -> None:
    proj = load_project(path)
    only = [(sid, c) for sid, st in proj.stages.items() for c, kinds in CATALOGUE
            if c.startswith("osc.") and st.kind in kinds]
    for r in evaluate(proj, only=only, strict=True).results:
        assert r.status in ("pass", "marginal", "fail", "not-applicable")
        if r.status != "not-applicable":
            assert NAMES[r.check] <= set(r.values)
