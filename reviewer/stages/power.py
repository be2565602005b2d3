"""Power stages (phase control on AC, DC switch) and the ``power.*`` checks."""

from __future__ import annotations

from reviewer.registry import Param, StageKind, register_kind

V = "value"

LOAD = {
    "r": Param(V, "resistance", required=True),
    "l": Param(V, "inductance", allow_zero=True),
    "cold_r": Param(V, "resistance"),
    "hold_current": Param(V, "current"),
}
HEATSINK = {
    "rth_cs": Param(V, "thermal_resistance", allow_zero=True),
    "rth_sa": Param(V, "thermal_resistance", required=True),
    "devices": Param("number"),
}
FUSE = {
    "rating": Param(V, "current", required=True),
    "i2t": Param(V, "i2t", required=True),
    "clearing_time": Param(V, "time"),
}

PHASE_CONTROL = register_kind(StageKind("phase-control", {
    "scr": Param("part", required=True, part_type="scr"),
    "topology": Param("choice", required=True, choices=("half-wave", "bridge", "ac-switch")),
    "gate": Param("stage", stage_kinds=("gate-drive",)),
    "firing": Param(V, "angle", allow_zero=True),
    "load": Param("table", required=True, fields=LOAD),
    "freewheel": Param("bool"),
    "heatsink": Param("table", fields=HEATSINK),
    "fuse": Param("table", fields=FUSE),
    "required": Param("required"),
}, "SCRs controlling power from an AC supply by firing angle"))

DC_SWITCH = register_kind(StageKind("dc-switch", {
    "scr": Param("part", required=True, part_type="scr"),
    "gate": Param("stage", stage_kinds=("gate-drive",)),
    "load": Param("table", required=True, fields=LOAD),
    "heatsink": Param("table", fields=HEATSINK),
    "fuse": Param("table", fields=FUSE),
    "duty": Param(V, "dimensionless"),
}, "an SCR switching a DC load, turned off by a turn-off network"))
