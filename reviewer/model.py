"""The validated project model: values in SI, parts, stages and the resolved project.

Values carry their nominal and both ends in SI magnitudes (the engine works only with these),
and the text the user wrote (for display and for the hash of what a sign-off read).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from reviewer.errors import Where


@dataclass(frozen=True)
class Value:
    """A quantity with its spread: nominal, low and high ends, all in SI units.

    ``dim`` is the dimension name from :mod:`reviewer.units`; ``unit`` the unit to show it in;
    ``text`` what the user wrote. A value without a tolerance has ``lo == nom == hi``.
    ``is_range`` marks a ``{ min, max }`` table: an adjustable range or a spread, as opposed to
    a tolerance written after a value.
    """

    nom: float
    lo: float
    hi: float
    dim: str
    unit: str = ""
    text: str = ""
    where: Where = field(default_factory=Where, compare=False)
    is_range: bool = False

    @property
    def varies(self) -> bool:
        """True when the low and high ends differ."""
        return self.lo != self.hi

    @classmethod
    def fixed(cls, x: float, dim: str, unit: str = "", text: str = "") -> Value:
        """A value with no spread."""
        return cls(float(x), float(x), float(x), dim, unit, text)

    def at(self, x: float, text: str = "") -> Value:
        """This value pinned at ``x`` (for example the minimum of the ambient range)."""
        return Value(float(x), float(x), float(x), self.dim, self.unit, text, self.where)


@dataclass
class Part:
    """A part by its designator: its type and parameters (Values), and its cold table."""

    ref: str
    type: str
    params: dict[str, Any]
    description: str = ""
    cold: dict[str, Value] = field(default_factory=dict)
    where: Where = field(default_factory=Where)


@dataclass
class Stage:
    """A stage of the circuit: its id, kind and parameters (Values, strings, links, tables)."""

    id: str
    kind: str
    params: dict[str, Any]
    where: Where = field(default_factory=Where)

    def get(self, key: str, default: Any = None) -> Any:
        """A parameter, or ``default`` when it is not given."""
        return self.params.get(key, default)


@dataclass
class Project:
    """A loaded, validated and variant-resolved project."""

    path: str
    name: str
    revision: str
    line: str
    checklist: str
    conditions: dict[str, Any]
    supply: dict[str, Any]
    parts: dict[str, Part]
    stages: dict[str, Stage]
    variant_of: str = ""
    chain: list[str] = field(default_factory=list)
    origin: dict[str, str] = field(default_factory=dict)
    raw: dict[str, Any] = field(default_factory=dict)
    warnings: list[str] = field(default_factory=list)  # values outside their plausible band

    def lookup(self, path: str) -> Any:
        """The model object at a dotted path such as ``parts.Q1.igt`` or ``supply.voltage``.

        Returns None when the path names nothing.
        """
        head, _, rest = path.partition(".")
        if head == "parts":
            ref, _, key = rest.partition(".")
            part = self.parts.get(ref)
            if part is None:
                return None
            if key.startswith("cold."):
                return part.cold.get(key[5:])
            return part.params.get(key) if key else part
        if head == "stages":
            sid, _, key = rest.partition(".")
            stage = self.stages.get(sid)
            if stage is None:
                return None
            if not key:
                return stage
            node: Any = stage.params
            for k in key.split("."):
                if not isinstance(node, dict) or k not in node:
                    return None
                node = node[k]
            return node
        if head in ("supply", "conditions"):
            node = getattr(self, head)
            for k in rest.split("."):
                if not isinstance(node, dict) or k not in node:
                    return None
                node = node[k]
            return node
        return None
