"""The cautions the workbook shows: in the help, in every check's detail, in the footer line.

Worded to support a review and never to claim compliance: a pass means only that the computed
margin meets the checklist limit.
"""

from __future__ import annotations

SAFETY_LINE = ("Mains circuits can kill. These results support a design review by qualified "
               "people; a pass means the computed margin meets the checklist limit, nothing "
               "more. They do not show compliance with any standard.")

GENERAL = (
    "Assume everything is live: gate, cathode, heatsink and the control 'ground' can sit at "
    "line potential; use differential probes, never an earthed scope ground.",
    "Stored charge outlasts the switch: snubber and commutating capacitors can stay "
    "charged; fit bleeders and measure before touching.",
    "'Off' is not isolated: leakage and snubber current flow in the off state; isolate with "
    "a mechanical disconnect, locked out.",
    "Defer to local codes, the product's standard and licensed, qualified practice; "
    "Latchbook records a review and does not certify anything.",
)

BY_KIND = {
    "ujt-oscillator": ("A line-synchronised trigger sits at mains potential with the rest of "
                       "the circuit unless the gate drive isolates it.",),
    "put-oscillator": ("A line-synchronised trigger sits at mains potential with the rest of "
                       "the circuit unless the gate drive isolates it.",),
    "gate-drive": ("Pulse transformers or optocouplers bridging mains and control need the "
                   "working-voltage and impulse ratings the overvoltage category asks for.",),
    "phase-control": ("Fuse for the semiconductor, not only for the wiring; a shorted SCR "
                      "leaves the load on, so heaters and motors need an independent cut-out.",
                      "The heatsink can be live (tab = anode) and hot enough to burn."),
    "dc-switch": ("A shorted SCR leaves the load on; the heatsink can be live and hot.",),
    "triac-phase-control": ("A triac switch has no isolation: the whole control circuit, gate "
                            "side included, sits at mains potential.",
                            "The triac's tab is MT2: a heatsink without an insulating pad is "
                            "live, and hot enough to burn.",
                            "A triac that fails to commutate, or fails short, leaves the load "
                            "on: motors and heaters need an independent cut-out."),
    "triac-gate": ("The gate drive is referred to MT1, which is joined to the mains: a DC "
                   "drive's supply and everything on it are live unless an opto-coupler rated "
                   "for the working voltage separates them.",),
    "rc-snubber": ("The snubber passes V·ω·C in the off state: an 'off' load can still shock. "
                   "Choose resistors that fail open safely.",),
    "line-commutation": ("Line surges reach the thyristor unless clamped below its "
                         "non-repetitive ratings.",),
    "capacitor-commutation": ("The commutating capacitor can hold a dangerous charge after "
                              "switch-off.",),
    "resonant-commutation": ("A resonant network can leave its capacitor above the supply "
                             "voltage after switch-off.",),
}


def cautions_for(kind: str, load_type: str = "") -> tuple[str, ...]:
    """The cautions of a stage kind (and of its load's kind: "battery", "motor"), then the
    general ones."""
    from reviewer.safety import load_cautions

    extra = tuple(f"{t}: {b}" for t, b in load_cautions([load_type] if load_type else []))
    return BY_KIND.get(kind, ()) + extra + GENERAL
