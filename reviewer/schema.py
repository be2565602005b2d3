"""The v1 project format's tables: project, conditions, supply, parts, and the check catalogue.

Stage kinds live beside their checks in :mod:`reviewer.stages`; this module holds the tables
every project has, the part types, and the catalogue of check ids (checks.md) so that a
check not yet built is reported as such rather than silently missing.
"""

from __future__ import annotations

from reviewer.registry import Param

V = "value"

PROJECT = {
    "name": Param("text", required=True, help='a name, e.g. name = "Bench kiln controller"'),
    "revision": Param("text", required=True, help='the design revision, e.g. revision = "C"'),
    "line": Param("text"),
    "checklist": Param("text"),
    "variant_of": Param("text"),
    "description": Param("text"),
}

CONDITIONS = {
    "ambient": Param(V, "temperature", required=True, allow_negative=True, allow_zero=True,
                     help='ambient = { min = "-10 degC", max = "45 degC" }'),
    "enclosure_rise": Param(V, "temperature_difference", allow_zero=True),
}

SUPPLY = {
    "kind": Param("choice", required=True, choices=("ac", "dc")),
    "voltage": Param(V, "voltage", required=True, help='voltage = "230 V +10% -10%"'),
    "frequency": Param(V, "frequency"),
    "inductance": Param(V, "inductance", allow_zero=True),
}

PART_TYPES: dict[str, dict[str, Param]] = {
    "scr": {
        "vdrm": Param(V, "voltage", required=True), "vrrm": Param(V, "voltage", required=True),
        "it_rms": Param(V, "current"), "it_av": Param(V, "current"),
        "itsm": Param(V, "current"), "itsm_duration": Param(V, "time"),
        "i2t": Param(V, "i2t"), "vt0": Param(V, "voltage", allow_zero=True),
        "rt": Param(V, "resistance", allow_zero=True), "rth_jc": Param(V, "thermal_resistance"),
        "tj_max": Param(V, "temperature"), "igt": Param(V, "current", required=True),
        "vgt": Param(V, "voltage", required=True), "vgd": Param(V, "voltage"),
        "ih": Param(V, "current"), "il": Param(V, "current"),
        "dvdt": Param(V, "voltage_rate"), "didt": Param(V, "current_rate"),
        "tq": Param(V, "time"), "pgm": Param(V, "power"), "pg_av": Param(V, "power"),
        "vrgm": Param(V, "voltage"), "tgt": Param(V, "time"),
    },
    "ujt": {
        "eta": Param(V, "dimensionless", required=True),
        "rbb": Param(V, "resistance", required=True),
        "ip": Param(V, "current", required=True), "iv": Param(V, "current", required=True),
        "vv": Param(V, "voltage", required=True), "vd": Param(V, "voltage", required=True),
        "rb1_on": Param(V, "resistance", allow_zero=True), "ie_peak": Param(V, "current"),
        "pd": Param(V, "power"), "rbb_tempco": Param(V, "tempco", allow_negative=True),
    },
    "put": {
        "ip": Param(V, "current", required=True), "iv": Param(V, "current"),
        "rg": Param(V, "resistance"), "offset": Param(V, "voltage", required=True),
        "vv": Param(V, "voltage", required=True), "vf": Param(V, "voltage", required=True),
        "itrm": Param(V, "current"), "energy": Param(V, "energy"), "pd": Param(V, "power"),
    },
    "diac": {
        "vbo": Param(V, "voltage", required=True, help='vbo = "32 V +-4 V"'),
        "vbo_asymmetry": Param(V, "voltage", allow_zero=True,
                               help='the largest | +VBO | - | -VBO |, e.g. "2 V"'),
        "breakback": Param(V, "voltage", required=True,
                           help='the drop from VBO when it fires, e.g. "6 V"'),
        "ibo": Param(V, "current"), "i_pulse": Param(V, "current"),
        "r_on": Param(V, "resistance", allow_zero=True),
    },
    # Gate data per quadrant as flat keys (igt_q1 …): each is an ordinary value with its own
    # path (parts.T1.igt_q3) that sign-offs bind to and the cold table mirrors.
    "triac": {
        "vdrm": Param(V, "voltage", required=True), "it_rms": Param(V, "current"),
        "itsm": Param(V, "current"), "itsm_duration": Param(V, "time"),
        "i2t": Param(V, "i2t"), "vt0": Param(V, "voltage", allow_zero=True),
        "rt": Param(V, "resistance", allow_zero=True), "rth_jc": Param(V, "thermal_resistance"),
        "tj_max": Param(V, "temperature"),
        **{f"{k}_{q}": Param(V, dim, required=q != "q4")
           for q in ("q1", "q2", "q3", "q4")
           for k, dim in (("igt", "current"), ("vgt", "voltage"))},
        "ih": Param(V, "current"), "il": Param(V, "current"),
        "dvdt": Param(V, "voltage_rate"), "didt": Param(V, "current_rate"),
        "dvdt_c": Param(V, "voltage_rate"), "didt_c": Param(V, "current_rate"),
        "pgm": Param(V, "power"), "pg_av": Param(V, "power"), "tgt": Param(V, "time"),
    },
}
PART_COMMON = {"type": Param("choice", required=True, choices=tuple(PART_TYPES)),
               "description": Param("text")}
COLD_KEYS = {"at": Param(V, "temperature", required=True, allow_negative=True, allow_zero=True),
             "igt": Param(V, "current"), "vgt": Param(V, "voltage"),
             "ih": Param(V, "current"), "il": Param(V, "current")}
TRIAC_COLD_KEYS = {**{k: v for k, v in COLD_KEYS.items() if k not in ("igt", "vgt")},
                   **{f"{k}_{q}": Param(V, dim) for q in ("q1", "q2", "q3", "q4")
                      for k, dim in (("igt", "current"), ("vgt", "voltage"))}}
#: The cold table's keys for each part type that has one.
COLD_TABLES = {"scr": COLD_KEYS, "triac": TRIAC_COLD_KEYS}

OSC = ("ujt-oscillator", "put-oscillator")
POWER = ("phase-control", "dc-switch")
TURNOFF = ("line-commutation", "capacitor-commutation", "resonant-commutation")
TRIAC = ("triac-phase-control",)
#: Stages a snubber may sit across: the SCR power stages and the triac AC switch.
ACROSS = POWER + TRIAC
DIAC = ("diac-rc",)

# The check catalogue (checks.md), in its order: id and the stage kinds it applies to.
CATALOGUE: list[tuple[str, tuple[str, ...]]] = [
    ("osc.window", OSC), ("osc.timing", OSC), ("osc.idle-gate", OSC), ("osc.discharge", OSC),
    ("osc.dissipation", OSC), ("osc.leakage", OSC), ("osc.temp-comp", ("ujt-oscillator",)),
    ("gate.trigger", ("gate-drive",)), ("gate.peak-power", ("gate-drive",)),
    ("gate.average-power", ("gate-drive",)), ("gate.latch-time", ("gate-drive",)),
    ("gate.noise", ("gate-drive",)), ("gate.reverse", ("gate-drive",)),
    ("gate.transformer", ("gate-drive",)),
    ("power.output", ("phase-control",)), ("power.blocking", POWER),
    ("power.rms-current", POWER), ("power.average-current", POWER), ("power.junction", POWER),
    ("power.surge", ("phase-control",)), ("power.fuse", POWER), ("power.latching", POWER),
    ("power.holding", POWER), ("power.didt", POWER), ("power.control", ("phase-control",)),
    ("power.harmonics", ("phase-control",)), ("power.fault", ("phase-control",)),
    ("snubber.dvdt", ("rc-snubber",)), ("snubber.peak-voltage", ("rc-snubber",)),
    ("snubber.discharge", ("rc-snubber",)), ("snubber.resistor-power", ("rc-snubber",)),
    ("snubber.capacitor", ("rc-snubber",)), ("snubber.leakage", ("rc-snubber",)),
    ("turnoff.time", TURNOFF),
    ("turnoff.capacitor", ("capacitor-commutation", "resonant-commutation")),
    ("turnoff.peak-current", ("resonant-commutation",)), ("turnoff.reapplied-dvdt", TURNOFF),
    ("triac.output", TRIAC), ("triac.blocking", TRIAC), ("triac.rms-current", TRIAC),
    ("triac.junction", TRIAC),
    ("triac.surge", TRIAC), ("triac.fuse", TRIAC), ("triac.latching", TRIAC),
    ("triac.latch-time", TRIAC),
    ("triac.holding", TRIAC), ("triac.didt", TRIAC), ("triac.control", TRIAC),
    ("triac.commutation", TRIAC), ("triac.gate-trigger", ("triac-gate",)),
    ("triac.gate-power", ("triac-gate",)),
    ("diac.firing-range", DIAC), ("diac.snap-on", DIAC), ("diac.gate-pulse", DIAC),
    ("diac.symmetry", DIAC),
]


def dim_of_path(path: str, stage_kind: str = "") -> str:
    """The dimension of the value at a dotted input path ("" when it cannot be told).

    Stage parameters are looked up in ``stage_kind`` when given, else in any stage kind that
    has the key (keys mean the same thing in every kind that uses them).

    >>> dim_of_path("parts.Q1.cold.igt"), dim_of_path("stages.power.load.r")
    ('current', 'resistance')
    >>> dim_of_path("conditions.ambient.min"), dim_of_path("stages.trigger.timing_c")
    ('temperature', 'capacitance')
    """
    from reviewer.registry import STAGE_KINDS

    parts = path.split("#")[0].split(".")
    head, rest = parts[0], parts[1:]
    if head == "conditions" and rest:
        p = CONDITIONS.get(rest[0])
        return p.dim if p else ""
    if head == "supply" and rest:
        p = SUPPLY.get(rest[0])
        return p.dim if p else ""
    if head == "parts" and len(rest) >= 2:
        if rest[1] == "cold" and len(rest) == 3:
            p = COLD_KEYS.get(rest[2]) or TRIAC_COLD_KEYS.get(rest[2])
            return p.dim if p else ""
        for params in PART_TYPES.values():
            if rest[1] in params:
                return params[rest[1]].dim
        return ""
    if head == "stages" and len(rest) >= 2:
        kinds = [STAGE_KINDS[stage_kind]] if stage_kind in STAGE_KINDS else STAGE_KINDS.values()
        for kind in kinds:
            p = kind.params.get(rest[1])
            if p is None:
                continue
            if len(rest) == 3 and p.fields:
                sub = p.fields.get(rest[2])
                if sub is not None:
                    return sub.dim
            elif p.dim or p.kind == "value":
                return p.dim
    return ""
