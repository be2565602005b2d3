"""Turn-off network stages (line, capacitor and resonant commutation) and ``turnoff.*`` checks."""

from __future__ import annotations

from reviewer.registry import Param, StageKind, register_kind
from reviewer.schema import POWER

V = "value"

LINE = register_kind(StageKind("line-commutation", {
    "for": Param("stage", required=True, stage_kinds=("phase-control",)),
}, "natural turn-off on an AC supply"))

CAPACITOR = register_kind(StageKind("capacitor-commutation", {
    "for": Param("stage", required=True, stage_kinds=("dc-switch",)),
    "c": Param(V, "capacitance", required=True),
    "c_voltage": Param(V, "voltage"),
    "charge_voltage": Param(V, "voltage"),
    "load_model": Param("choice", choices=("resistive", "constant-current")),
}, "a charged capacitor switched across the conducting SCR"))

RESONANT = register_kind(StageKind("resonant-commutation", {
    "for": Param("stage", required=True, stage_kinds=POWER),
    "c": Param(V, "capacitance", required=True),
    "l": Param(V, "inductance", required=True),
    "c_voltage": Param(V, "voltage"),
    "charge_voltage": Param(V, "voltage"),
    "diode": Param("bool"),
}, "an L–C circuit rings a current pulse against the load current"))
