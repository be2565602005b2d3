"""What a stage kind accepts and which checks it runs: the contract between files and checks.

A :class:`StageKind` lists the parameters a stage of that kind takes (validated by
:mod:`reviewer.project`). A :class:`CheckDef` ties a pure function of :mod:`checks` to a stage
kind: ``bind`` gathers exactly the inputs the check reads (so the corners and the inputs hash
cover those and nothing else), ``fn`` computes on arrays, ``summarise`` writes the one-line
summary from the reduced result.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from typing import Any

from checks.core import Outcome
from reviewer.errors import ProjectError
from reviewer.model import Part, Project, Stage, Value


@dataclass(frozen=True)
class Param:
    """One parameter a table accepts.

    ``kind``: ``value`` (a quantity of dimension ``dim``), ``number`` (a plain positive
    count), ``choice`` (one of ``choices``), ``bool``, ``text``, ``part`` (a designator of
    ``part_type``), ``parts`` (one designator or a list), ``stage`` (a stage id of one of
    ``stage_kinds``), ``table`` (with ``fields``), ``step`` (a choice or a value).
    """

    kind: str
    dim: str = ""
    required: bool = False
    choices: tuple[str, ...] = ()
    part_type: str = ""
    stage_kinds: tuple[str, ...] = ()
    fields: Mapping[str, Param] | None = None
    allow_zero: bool = False
    allow_negative: bool = False
    help: str = ""


@dataclass(frozen=True)
class StageKind:
    """A stage kind: its name, its parameters and a one-line description."""

    name: str
    params: Mapping[str, Param]
    about: str = ""


@dataclass
class Input:
    """One input a check reads: where it comes from in the project, and its value.

    ``sweep`` > 0 asks the engine to sample the range at that many points (for inputs such as
    the firing angle whose effect is not monotonic); ``extra`` adds interior points.
    """

    path: str
    value: Value
    sweep: int = 0
    extra: tuple[float, ...] = ()


@dataclass
class Bound:
    """Everything one check reads for one stage, gathered before any computation."""

    inputs: dict[str, Input] = field(default_factory=dict)
    options: dict[str, Any] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)
    not_applicable: str | None = None
    #: The paths of keys the check needs that the project does not give (result ``incomplete``).
    missing: list[str] = field(default_factory=list)
    #: (stage id, check id) whose pass is this check's premise (result ``blocked`` otherwise).
    depends: list[tuple[str, str]] = field(default_factory=list)
    #: Why the model does not cover this configuration (result ``incomplete`` with this text).
    unmodelled: str | None = None

    def add(self, name: str, path: str, value: Value, *, sweep: int = 0,
            extra: tuple[float, ...] = ()) -> Value:
        """Register input ``name`` read from ``path``; returns the value for convenience."""
        self.inputs[name] = Input(path, value, sweep, extra)
        return value


class Context:
    """The project and the stage a check is being bound for, with lookup helpers."""

    def __init__(self, project: Project, stage: Stage) -> None:
        self.project = project
        self.stage = stage

    def stage_path(self, key: str, stage: Stage | None = None) -> str:
        """The dotted path of a stage parameter."""
        return f"stages.{(stage or self.stage).id}.{key}"

    def linked_stage(self, key: str, stage: Stage | None = None) -> Stage | None:
        """The stage a link parameter names (validated at load), or None when absent."""
        sid = (stage or self.stage).get(key)
        return self.project.stages.get(sid) if isinstance(sid, str) else None

    def part(self, key: str, stage: Stage | None = None) -> Part | None:
        """The part a link parameter names; for a list, the first."""
        ref = (stage or self.stage).get(key)
        if isinstance(ref, list):
            ref = ref[0] if ref else None
        return self.project.parts.get(ref) if isinstance(ref, str) else None

    def parts(self, key: str, stage: Stage | None = None) -> list[Part]:
        """Every part a link parameter names (one or a list)."""
        ref = (stage or self.stage).get(key)
        refs = ref if isinstance(ref, list) else [ref] if ref else []
        return [self.project.parts[r] for r in refs if r in self.project.parts]

    def stages_of(self, kinds: tuple[str, ...], link: str, target: str) -> list[Stage]:
        """Stages of ``kinds`` whose parameter ``link`` names stage ``target``."""
        return [s for s in self.project.stages.values()
                if s.kind in kinds and s.get(link) == target]

    def read(self, b: Bound, name: str, path: str, *, default: float | None = None,
             dim: str = "", unit: str = "", sweep: int = 0,
             extra: tuple[float, ...] = ()) -> Value | None:
        """Add the value at ``path`` as input ``name``.

        When the project leaves it out and ``default`` is given, the default is used and a
        note says so; without a default a missing value returns None (the caller decides).
        """
        v = self.project.lookup(path)
        if isinstance(v, Value):
            return b.add(name, path, v, sweep=sweep, extra=extra)
        if default is not None:
            from reviewer.fmt import eng

            b.notes.append(f"{path.split('.')[-1]} not given: {eng(default, unit)} assumed")
            return b.add(name, path + "#assumed", Value.fixed(default, dim, unit), sweep=sweep)
        return None

    def want(self, b: Bound, name: str, path: str, **kw: Any) -> Value | None:
        """Add a value the check cannot answer without; a missing one makes it incomplete.

        Use this for data a part or stage has but the file may leave out (a rating, a
        capacitor's voltage); ``not_applicable`` stays for what the circuit does not have.
        """
        v = self.read(b, name, path, **kw)
        if v is None and path not in b.missing:
            b.missing.append(path)
        return v

    def need(self, b: Bound, name: str, path: str, *, sweep: int = 0,
             extra: tuple[float, ...] = ()) -> Value:
        """Add a required value; the project loader guarantees required keys are present."""
        v = self.read(b, name, path, sweep=sweep, extra=extra)
        if v is None:
            raise ProjectError(f"`{path}` is needed by this check but is not given")
        return v

    def ambient_min(self, b: Bound, name: str = "t_min") -> Value:
        """The coldest ambient, as input ``name`` [K]."""
        amb: Value = self.project.conditions["ambient"]
        return b.add(name, "conditions.ambient.min", amb.at(amb.lo))

    def ambient_max(self, b: Bound, name: str = "t_max") -> Value:
        """The hottest ambient plus the enclosure rise, as input ``name`` [K]."""
        amb: Value = self.project.conditions["ambient"]
        rise: Value | None = self.project.conditions.get("enclosure_rise")
        b.add(name + "_ambient", "conditions.ambient.max", amb.at(amb.hi))
        b.add(name + "_rise", "conditions.enclosure_rise",
              rise if rise is not None else Value.fixed(0.0, "temperature_difference", "K"))
        return amb.at(amb.hi)

    def cold(self, b: Bound, name: str, part: Part, key: str) -> None:
        """Add a part parameter with its cold data: ``name``, ``name_cold``, ``name_cold_at``.

        Missing cold data become NaN, which :func:`checks.core.cold_value` reads as "apply the
        common-practice factor".
        """
        self.need(b, name, f"parts.{part.ref}.{key}")
        cv = part.cold.get(key)
        at = part.cold.get("at")
        nan = float("nan")
        if cv is not None and at is not None:
            b.add(name + "_cold", f"parts.{part.ref}.cold.{key}", cv)
            b.add(name + "_cold_at", f"parts.{part.ref}.cold.at", at)
        else:
            b.add(name + "_cold", f"parts.{part.ref}.cold.{key}#none", Value.fixed(nan, "", ""))
            b.add(name + "_cold_at", f"parts.{part.ref}.cold.at#none", Value.fixed(nan, "", ""))


@dataclass
class Reduced:
    """A check's outcome reduced over its rows, handed to ``summarise``.

    ``nom``, ``lo``, ``hi`` and ``worst`` give each value in SI; ``status`` is the overall
    status name; ``margin`` the smallest margin; ``limits`` the checklist limits in force.
    """

    status: str
    margin: float
    nom: dict[str, float]
    lo: dict[str, float]
    hi: dict[str, float]
    worst: dict[str, float]
    worst_inputs: dict[str, float]
    limits: Mapping[str, float]
    bound: Bound
    notes: list[str]


@dataclass(frozen=True)
class CheckDef:
    """One check of the catalogue, for the stage kinds it applies to."""

    id: str
    kinds: tuple[str, ...]
    question: str
    method: str
    source: str
    fn: Callable[..., Outcome]
    bind: Callable[[Context], Bound]
    units: Mapping[str, str]
    summarise: Callable[[Reduced], str]
    cautions: tuple[str, ...] = ()
    fix: str = ""
    #: Values that may be NaN where they are not defined at a row (the engine otherwise
    #: refuses a pass with a non-finite value).
    optional: frozenset[str] = frozenset()
    #: The method's revision: raise it when a change of the method (its formula, or what a
    #: status means) can change what was signed. Above 1 it is part of the inputs snapshot,
    #: so every sign-off made under another revision goes stale and says so; at 1 the
    #: snapshot (and every sign-off made before revisions existed) is as it was.
    revision: int = 1


STAGE_KINDS: dict[str, StageKind] = {}
CHECKS: dict[str, CheckDef] = {}


def register_kind(kind: StageKind) -> StageKind:
    """Make a stage kind known to the loader."""
    STAGE_KINDS[kind.name] = kind
    return kind


def register(check: CheckDef) -> CheckDef:
    """Make a check known to the engine (one id, once)."""
    if check.id in CHECKS:
        raise ValueError(f"check {check.id} registered twice")
    CHECKS[check.id] = check
    return check


def checks_for(kind: str) -> list[CheckDef]:
    """The checks a stage kind runs, in catalogue order."""
    return [c for c in CHECKS.values() if kind in c.kinds]
