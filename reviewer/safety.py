"""The cautions shown in the workbook's help, in reports and in the README, and the footer.

They state what the results mean and what they do not: a pass means only that the computed
margin meets the checklist's limit. Nothing here claims compliance with any standard.
"""

from __future__ import annotations

CAUTIONS: tuple[tuple[str, str], ...] = (
    ("Assume everything is live",
     "Phase-control circuits and most SCR drives are not isolated from the mains: the gate, "
     "cathode, heatsink and control 'ground' can sit at line potential. Use differential probes "
     "rated for the working voltage, never an earthed scope ground lead; bring a new board up "
     "from a current-limited or variable supply."),
    ("Stored charge outlasts the switch",
     "Snubber, filter and commutating capacitors can stay charged after switch-off, and a "
     "resonant network can leave a capacitor above the supply. Fit bleeders to the limits of "
     "the product's standard and measure before touching."),
    ("Off is not isolated",
     "An SCR switch that is off still passes its leakage and the snubber current V·ω·C: an "
     "'off' load can shock. Use a mechanical disconnect with lockout for maintenance."),
    ("Isolate the gate drive properly",
     "Pulse transformers and optocouplers across the barrier must be rated for the working "
     "voltage and the impulse withstand of the installation's overvoltage category "
     "(IEC 60664-1). The workbook records isolation figures; it does not derive them."),
    ("Fuse for the semiconductor",
     "A general-purpose fuse protects the wiring, not the thyristor. Use a semiconductor-"
     "protection fuse whose total-clearing I²t is below the device's."),
    ("Heatsinks are hot and possibly live",
     "On many packages the tab is the anode: without an insulating pad the heatsink is at line "
     "potential and must be guarded."),
    ("Failures that leave the load on",
     "A shorted SCR or snubber capacitor, or false triggering, energises the load with no "
     "command. Heaters and motors need an independent cut-out."),
    ("Qualified people only",
     "Design, commissioning and servicing of mains equipment are for competent persons; local "
     "codes may require licensed practitioners. Follow local codes and licensed practice."),
)

SHORT = ("Mains circuits are dangerous. These results support a design review by qualified "
         "people; they do not make a product compliant with any standard.")

FOOTER = ("These results are design aids for a review. They compute electrical margins under "
          "the stated assumptions. They do not show compliance with any safety standard, and "
          "they do not replace local codes, certification or the judgement of qualified, and "
          "where required licensed, people.")

# Cautions that belong to a kind of load or to one check: shown only where they apply.
LOAD_CAUTIONS: dict[str, tuple[tuple[str, str], ...]] = {
    "battery": (
        ("Batteries gas and can burst",
         "A charging lead-acid battery gives off hydrogen, which can explode: ventilate, keep "
         "sparks away, and do not connect or disconnect the clips while current flows. A "
         "battery delivers a very large short-circuit current that no mains fuse limits: fuse "
         "the battery lead close to the terminal and guard against reverse connection."),
    ),
    "motor": (
        ("Motors stall and kick",
         "At standstill a motor has no back EMF: the first firing and a stalled rotor draw the "
         "full stall current, so limit it. The armature inductance kicks when the current is "
         "interrupted (a broken lead, an opened contactor): give its current a freewheeling "
         "path, and remember a coasting motor is a generator that keeps its terminals live."),
    ),
}

# Cautions a device kind brings with it (reports add them where a project has that device).
LOAD_CAUTIONS["triac"] = (
    ("Triac designs are live throughout",
     "A triac AC switch has no isolation: the gate, its drive (a DC supply referred to MT1, "
     "a diac network, an opto-triac's output side) and the control's 'ground' all sit at "
     "mains potential. The tab of most triac packages is MT2, so a heatsink without an "
     "insulating pad is live. A triac that fails to commutate on an inductive load, or fails "
     "short, leaves the load on: a motor or a heater needs an independent cut-out."),
)

HARMONICS = ("Harmonics are an estimate",
             "The line harmonics, power factor and comparison with the IEC 61000-3-2 table are "
             "an engineering estimate from the ideal waveform that shows where a design "
             "stands; they are never a compliance test, which needs the standard's test "
             "conditions, source and measuring equipment.")


def load_cautions(loads: list[str]) -> tuple[tuple[str, str], ...]:
    """The cautions for the kinds of load ("battery", "motor") a project has, each once."""
    out: list[tuple[str, str]] = []
    for kind in dict.fromkeys(loads):
        out += LOAD_CAUTIONS.get(kind, ())
    return tuple(out)
