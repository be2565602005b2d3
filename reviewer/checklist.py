"""Checklists: which checks apply, their limits, manual questions and approvers.

The built-in ``standard`` checklist ships in the package (``reviewer/data``). A checklist's
identity — name, version and the SHA-256 of its canonical content — is recorded with every
result and sign-off, so a changed checklist makes sign-offs stale.
"""

from __future__ import annotations

import hashlib
import json
import tomllib
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path
from typing import Any

from reviewer.errors import ProjectError, Where


@dataclass
class Checklist:
    """A resolved checklist (after ``extends``)."""

    name: str
    version: str
    limits: dict[str, dict[str, float]]
    disabled: dict[str, str] = field(default_factory=dict)
    manual: list[dict[str, str]] = field(default_factory=list)
    approvers: list[str] = field(default_factory=list)
    sign_with_ssh: bool = False
    path: str = ""

    @property
    def sha256(self) -> str:
        """Hash of the canonical content (everything that changes what a review means)."""
        doc = {"name": self.name, "version": self.version, "limits": self.limits,
               "disabled": self.disabled, "manual": self.manual, "approvers": self.approvers}
        return hashlib.sha256(json.dumps(doc, sort_keys=True).encode()).hexdigest()

    def identity(self) -> dict[str, str]:
        """The ``{name, version, sha256}`` recorded in results and entries."""
        return {"name": self.name, "version": self.version, "sha256": self.sha256}

    def limits_for(self, check: str) -> dict[str, float]:
        """The limits in force for ``check`` (empty when the checklist has none)."""
        return dict(self.limits.get(check, {}))


def _read_standard() -> dict[str, Any]:
    text = resources.files("reviewer").joinpath("data/standard.checklist.toml").read_text("utf-8")
    return tomllib.loads(text)


def standard() -> Checklist:
    """The built-in ``standard`` checklist."""
    doc = _read_standard()
    return Checklist(doc["checklist"]["name"], str(doc["checklist"]["version"]),
                     {k: dict(v) for k, v in doc["limits"].items()}, path="standard")


def load_checklist(ref: str, base_dir: Path) -> Checklist:
    """Load the checklist a project names: ``standard`` or a path relative to the project."""
    if ref in ("", "standard"):
        return standard()
    path = (base_dir / ref).resolve()
    where = Where(str(path), "checklist")
    try:
        doc = tomllib.loads(path.read_text("utf-8"))
    except FileNotFoundError:
        raise ProjectError(f"checklist file not found: {path}; give a path relative to the "
                           "project, or checklist = \"standard\"", where) from None
    except (UnicodeDecodeError, tomllib.TOMLDecodeError) as exc:
        raise ProjectError(f"not a readable TOML checklist: {exc}", where) from None
    head = doc.get("checklist", {})
    base = standard()
    limits = {k: dict(v) for k, v in base.limits.items()}
    for check, lim in doc.get("limits", {}).items():
        limits.setdefault(check, {}).update(lim)
    return Checklist(str(head.get("name", path.stem)), str(head.get("version", "1")), limits,
                     manual=list(doc.get("manual", [])),
                     approvers=list(head.get("approvers", [])),
                     sign_with_ssh=bool(head.get("sign_with_ssh", False)), path=str(path))
