"""Configuration rules: keys that mean nothing in a stage's configuration, keys it needs, and
choices that contradict the supply kind.

Each rule raises a :class:`~reviewer.errors.ProjectError` that says why the key does not fit and
what to write instead. Ratings that are merely absent (a snubber's ``c_voltage``, an SCR's
``tq``) are not input errors: the check that needs one reports it as incomplete.
"""

from __future__ import annotations

from collections.abc import Callable

from reviewer.errors import ProjectError, Where
from reviewer.model import Project, Stage, Value

WhereFn = Callable[[str, str], Where]

TRANSFORMER_ONLY = ("turns_ratio", "volt_seconds", "isolation", "required_isolation",
                    "coupling_capacitance")


def check(project: Project, where: WhereFn) -> None:
    """Apply every configuration rule to a loaded project (links already checked)."""
    ac = project.supply.get("kind") == "ac"
    for part in project.parts.values():
        if part.type == "triac":
            _triac_part(part.ref, part.params, where)
    for st in project.stages.values():
        table = f"stages.{st.id}"
        if st.kind in ("ujt-oscillator", "put-oscillator"):
            _oscillator(st, ac, table, where)
        elif st.kind == "gate-drive":
            _gate_drive(st, table, where)
        elif st.kind == "phase-control":
            _phase_control(project, st, table, where)
        elif st.kind == "dc-switch" and ac:
            raise ProjectError('a dc-switch stage needs a DC supply (supply kind = "dc"); an SCR '
                               "on an AC supply is a phase-control stage "
                               '(kind = "phase-control", topology = …)', where(table, "kind"))
        elif st.kind == "rc-snubber":
            _snubber(st, ac, table, where)
        elif st.kind in ("triac-phase-control", "triac-gate") and not ac:
            raise ProjectError(f"a {st.kind} stage needs an AC supply (supply kind = \"ac\"): a "
                               "triac turns off only where its current passes through zero",
                               where(table, "kind"))
        elif st.kind == "triac-phase-control":
            gate = project.stages.get(st.get("gate", ""))
            if gate is not None and gate.kind == "triac-gate" \
                    and gate.get("triac") != st.get("triac"):
                raise ProjectError(f"the gate drive `{gate.id}` fires triac "
                                   f"\"{gate.get('triac')}\", but this stage switches "
                                   f"\"{st.get('triac')}\": name the same part in both",
                                   where(table, "gate"))


def _triac_part(ref: str, params: dict, where: WhereFn) -> None:
    """(dv/dt)c is rated at a rate of fall of current (di/dt)c: one means nothing alone."""
    table = f"parts.{ref}"
    if "dvdt_c" in params and "didt_c" not in params:
        raise ProjectError("`dvdt_c` holds only at the rate of fall of current it is rated at: "
                           'add didt_c = "…" (the datasheet gives it beside (dv/dt)c, often in '
                           'A/ms, e.g. didt_c = "1.8 A/ms")', where(table, "dvdt_c"))
    if "didt_c" in params and "dvdt_c" not in params:
        raise ProjectError("`didt_c` is the rate of fall of current at which (dv/dt)c is rated: "
                           'add dvdt_c = "…" beside it (e.g. dvdt_c = "5 V/us"), or remove it',
                           where(table, "didt_c"))


def _oscillator(st: Stage, ac: bool, table: str, where: WhereFn) -> None:
    line = st.get("sync") == "line"
    if not line and "zener" in st.params:
        raise ProjectError('`zener` is the clamp of a line-synchronised oscillator; this one is '
                           'free-running (sync = "free" or not given), so nothing would use it: '
                           'remove zener, or set sync = "line"', where(table, "zener"))
    if line and not ac:
        raise ProjectError('sync = "line" needs an AC supply (the capacitor restarts at every '
                           'zero crossing of the line); on a DC supply write sync = "free"',
                           where(table, "sync"))
    target = st.get("target")
    if isinstance(target, Value):
        want = "angle" if line else "frequency"
        if target.dim != want:
            example = ('{ min = "30 deg", max = "150 deg" }' if line
                       else '{ min = "40 Hz", max = "120 Hz" }')
            mode, what, sets = (("line", "firing-angle", "line-synchronised oscillator sets an "
                                 "angle") if line else
                                ("free", "frequency", "free-running oscillator sets a rate"))
            raise ProjectError(f'`target` must be a {what} range with sync = "{mode}" (a '
                               f"{sets}), e.g. target = {example}", where(table, "target"))


def _gate_drive(st: Stage, table: str, where: WhereFn) -> None:
    if st.get("coupling") == "direct":
        for key in TRANSFORMER_ONLY:
            if key in st.params:
                raise ProjectError(f"`{key}` belongs to a pulse transformer, but this gate drive "
                                   'has coupling = "direct": remove it, or set '
                                   'coupling = "transformer"', where(table, key))
    elif "turns_ratio" not in st.params:
        raise ProjectError('transformer coupling needs the turns ratio: add turns_ratio = 1 '
                           "(primary turns per secondary turn, e.g. 1.5 for 1.5:1)",
                           where(table, "coupling"))


def _phase_control(project: Project, st: Stage, table: str, where: WhereFn) -> None:
    gate = project.stages.get(st.get("gate", ""))
    osc = project.stages.get(gate.get("source", "")) if gate is not None else None
    if "firing" in st.params and osc is not None and osc.get("sync") == "line":
        raise ProjectError(f"both `firing` and `gate` give the firing range: the gate's "
                           f"oscillator `{osc.id}` is line-synchronised, so its timing sets the "
                           "angle. Remove `firing` (the range then comes from the oscillator), "
                           "or remove `gate` to review a fixed range", where(table, "firing"))
    if "firing" not in st.params and osc is not None and osc.get("sync") != "line" \
            and st.get("control") != "burst":  # burst control fires at the voltage zero
        raise ProjectError(f"the firing range is not known: the gate's oscillator `{osc.id}` is "
                           "free-running, so its pulses are not tied to the line. Add "
                           'firing = { min = "…", max = "…" } (the angles the control covers), '
                           f'or make `{osc.id}` line-synchronised (sync = "line", zener = "…")',
                           where(table, "gate"))
    if st.get("freewheel") and st.get("topology") == "ac-switch":
        raise ProjectError("`freewheel` has no meaning on an ac-switch: the load sees AC, and a "
                           "diode across it would short every other half-cycle. Remove it "
                           '(a freewheeling diode belongs to "half-wave" or "bridge")',
                           where(table, "freewheel"))


def _snubber(st: Stage, ac: bool, table: str, where: WhereFn) -> None:
    step = st.get("step")
    if step == "dc" and ac:
        raise ProjectError('step = "dc" is for a DC bus, but the supply is AC: write '
                           'step = "line" (the peak line voltage at the worst instant) or the '
                           'step as a voltage, e.g. step = "400 V"', where(table, "step"))
    if step == "line" and not ac:
        raise ProjectError('step = "line" is for an AC supply, but the supply is DC: write '
                           'step = "dc" (the bus voltage) or the step as a voltage, e.g. '
                           'step = "40 V"', where(table, "step"))
