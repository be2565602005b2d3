"""The ``snubber.*`` step checks through the engine on a back-EMF load (battery charger).

The worst corner must be found over the supply, the EMF's range and the firing range: here it
is compared with a brute-force maximum of the closed form over a fine grid of those inputs
(each closed-form step itself tested against solve_ivp in tests/checks/test_snubber_emf.py),
and with the line-peak step the checks took before the back EMF counted.
"""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest

from checks import snubber as sn
from reviewer.engine import evaluate
from reviewer.model import Part, Project, Stage, Value


def val(nom: float, dim: str, unit: str, tol: float = 0.0) -> Value:
    return Value(nom, nom * (1 - tol), nom * (1 + tol), dim, unit)


FIRING = (math.radians(30.0), math.radians(150.0))
E_RANGE = (11.5, 14.4)


def project(*, freewheel: bool = False, topology: str = "half-wave",
            l_load: float = 30e-3) -> Project:
    scr = {"vdrm": val(200, "voltage", "V"), "vrrm": val(200, "voltage", "V"),
           "igt": val(25e-3, "current", "A"), "vgt": val(1.5, "voltage", "V"),
           "itsm": val(300, "current", "A"), "dvdt": val(100e6, "voltage_rate", "V/s")}
    sup = {"kind": "ac", "voltage": Value(24.0, 21.6, 26.4, "voltage", "V"),
           "frequency": val(50, "frequency", "Hz"), "inductance": val(400e-6, "inductance", "H")}
    load = {"r": val(0.6, "resistance", "ohm"), "l": val(l_load, "inductance", "H"),
            "e": Value(13.0, E_RANGE[0], E_RANGE[1], "voltage", "V"), "type": "battery"}
    pw = {"scr": "Q1", "topology": topology, "freewheel": freewheel, "load": load,
          "firing": Value(math.pi / 2, FIRING[0], FIRING[1], "angle", "deg")}
    sb = {"across": "power", "r": val(47, "resistance", "ohm"),
          "c": val(0.1e-6, "capacitance", "F"), "r_power": val(2, "power", "W"),
          "c_voltage": val(100, "voltage", "V"), "step": "line"}
    return Project(
        path="test.toml", name="snubber emf test", revision="A", line="", checklist="standard",
        conditions={"ambient": Value(298.15, 263.15, 318.15, "temperature", "degC")},
        supply=sup, parts={"Q1": Part("Q1", "scr", scr)},
        stages={"power": Stage("power", "phase-control", pw),
                "snubber": Stage("snubber", "rc-snubber", sb)})


def run(p: Project, check: str):
    res = evaluate(p, None, only=[("snubber", check)], strict=True).results
    assert len(res) == 1
    return res[0]


def brute_peak(freewheel: bool, topology: str, l_load: float) -> float:
    alpha = np.linspace(*FIRING, 721)
    best = 0.0
    for v, e in itertools.product((21.6, 26.4), E_RANGE):
        emf = sn.emf_steps(topology=topology, freewheel=freewheel, v=v, f=50.0, r_load=0.6,
                           l_load=l_load, alpha=alpha, e_load=e)
        out = sn.peak_check(v=v, r=47.0, l=400e-6, c=0.1e-6, vdrm=200.0, mode="line", ac=True,
                            limits={"fail_below": 1.0}, emf=emf)
        best = max(best, float(np.max(out.values["peak_voltage"])))
    return best


@pytest.mark.parametrize("freewheel, topology", [(False, "half-wave"), (True, "half-wave"),
                                                 (False, "bridge"), (True, "bridge")])
def test_peak_worst_corner_over_the_emf_and_firing_range(freewheel, topology):
    res = run(project(freewheel=freewheel, topology=topology), "snubber.peak-voltage")
    brute = brute_peak(freewheel, topology, 30e-3)
    got = res.values["peak_voltage"].max
    assert got == pytest.approx(brute, rel=5e-3)
    vm_hi = math.sqrt(2) * 26.4
    assert got >= vm_hi + E_RANGE[1] * (1 - 1e-12)  # never below the steady reverse peak
    assert "back-EMF load" in " ".join(res.notes)


def test_half_wave_charger_step_beyond_the_line_peak_is_caught():
    p = project()
    res = run(p, "snubber.dvdt")
    vm_hi = math.sqrt(2) * 26.4
    # The step at the current zero, E − V_m·sin β, exceeds the line peak the check used to
    # take: the rate follows it (the closed form is linear in the step).
    per_volt, _ = sn.step_max_dvdt(e=1.0, r=47.0, l=400e-6, c=0.1e-6)
    alpha = np.linspace(*FIRING, 721)
    worst = max(float(np.max(sn.emf_steps(topology="half-wave", freewheel=False, v=26.4,
                                           f=50.0, r_load=0.6, l_load=30e-3, alpha=alpha,
                                           e_load=e).step)) for e in E_RANGE)
    assert worst > 1.15 * vm_hi
    got = res.values["dvdt_max"].max
    assert got >= float(per_volt) * worst
    assert got == pytest.approx(float(per_volt) * worst, rel=5e-3)


def test_resistor_power_counts_the_emf_steps():
    res = run(project(), "snubber.resistor-power")
    # The total at its worst on a fine grid of the line, the EMF and the firing range, with
    # ½·C·S²·f for the step S at each current zero.
    alpha = np.linspace(*FIRING, 721)
    best = old = 0.0
    for v, e in itertools.product((21.6, 26.4), E_RANGE):
        emf = sn.emf_steps(topology="half-wave", freewheel=False, v=v, f=50.0, r_load=0.6,
                           l_load=30e-3, alpha=alpha, e_load=e)
        parts = sn.resistor_power(v=v, f=50.0, r=47.0, c=0.1e-6, alpha=alpha,
                                  topology="half-wave", r_load=0.6, l_load=30e-3, emf=emf)
        assert np.allclose(parts[1], 0.5 * 0.1e-6 * emf.step**2 * 50.0)
        best = max(best, float(np.max(sum(parts))))
        no_emf = sn.resistor_power(v=v, f=50.0, r=47.0, c=0.1e-6, alpha=alpha,
                                   topology="half-wave", r_load=0.6, l_load=30e-3)
        old = max(old, float(np.max(sum(no_emf))))
    got = res.values["resistor_power"].max
    # Never below; a little above, as the step is taken at its worst within half a sweep
    # step of each sampled angle while the firing part stays at that angle.
    assert best * (1 - 1e-9) <= got <= best * 1.02
    assert got > old  # the back EMF's larger step costs more than V_m·sin φ did
