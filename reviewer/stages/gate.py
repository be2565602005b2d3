"""Gate-drive stages (oscillator pulse to SCR gate) and the ``gate.*`` checks."""

from __future__ import annotations

from reviewer.registry import Param, StageKind, register_kind
from reviewer.schema import OSC

V = "value"

GATE_DRIVE = register_kind(StageKind("gate-drive", {
    "source": Param("stage", required=True, stage_kinds=OSC),
    "scr": Param("parts", required=True, part_type="scr"),
    "coupling": Param("choice", required=True, choices=("direct", "transformer")),
    "series_r": Param(V, "resistance", required=True),
    "gate_cathode_r": Param(V, "resistance"),
    "turns_ratio": Param(V, "dimensionless"),
    "volt_seconds": Param(V, "volt_seconds"),
    "isolation": Param(V, "voltage"),
    "required_isolation": Param(V, "voltage"),
    "coupling_capacitance": Param(V, "capacitance", allow_zero=True),
}, "from an oscillator's pulse to one or more SCR gates"))
