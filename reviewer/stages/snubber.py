"""RC snubber stages and the ``snubber.*`` checks."""

from __future__ import annotations

from reviewer.registry import Param, StageKind, register_kind
from reviewer.schema import POWER

V = "value"

RC_SNUBBER = register_kind(StageKind("rc-snubber", {
    "across": Param("stage", required=True, stage_kinds=POWER),
    "r": Param(V, "resistance", required=True),
    "c": Param(V, "capacitance", required=True),
    "r_power": Param(V, "power"),
    "c_voltage": Param(V, "voltage"),
    "inductance": Param(V, "inductance"),
    "discharge_inductance": Param(V, "inductance"),
    "step": Param("step", dim="voltage", choices=("line", "dc")),
}, "series R–C across the SCR(s) of a power stage"))
