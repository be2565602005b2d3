"""Reading a review record: ``NAME.review.toml`` beside ``NAME.toml``, verified on load.

The record holds a ``[review]`` header, one ``[[result]]`` per (stage, check) in project
order (refreshed by every run that records), and the history: ``[[entry]]`` tables, oldest
first, never rewritten. :func:`load_record` reads it and runs the one verification
(:func:`reviewer.records.trust.verify_history`) against the project's checklist; the outcome
travels with the record as ``trust``.
"""

from __future__ import annotations

import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from reviewer.errors import LatchbookError, RecordError, UnsafeFileError, Where
from reviewer.records.chain import ChainCheck, Entry, check_chain
from reviewer.records.trust import Trust, verify_history
from reviewer.safeio import load_toml
from reviewer.store import base_name, read_with_hash

#: How deep a record's tables and arrays may nest (Latchbook writes eight levels).
RECORD_MAX_DEPTH = 32

_ENTRY_HEADER = re.compile(r"^\[\[entry\]\][ \t]*$", re.MULTILINE)


def parse_record(text: str, path: str | Path) -> dict[str, Any]:
    """A record's text as TOML, refusing nesting far deeper than Latchbook writes (an
    :class:`UnsafeFileError` naming the file and line; a syntax error passes through). A
    byte-order mark an editor put in front is accepted (the next write leaves it out)."""
    return load_toml(text.removeprefix("\ufeff"), path, limit=RECORD_MAX_DEPTH,
                     error=UnsafeFileError,
                     what="a review record",
                     fix="records are written only by Latchbook, so restore it from version "
                         "control")


def record_path(project_path: str | Path) -> Path:
    """``NAME.review.toml`` beside ``NAME.toml``."""
    b = base_name(project_path)
    return b.with_name(b.name + ".review.toml")


@dataclass
class Record:
    """A review record as read from disk (an absent file reads as an empty record)."""

    path: Path
    project_path: Path
    exists: bool
    sha256: str | None
    header: dict[str, Any]
    results: list[dict[str, Any]]
    entries: list[Entry]
    entries_text: str
    chain: ChainCheck
    trust: Trust = field(default_factory=Trust)
    checklist: Any = None

    @property
    def trusted(self) -> list[Entry]:
        """The entries that verify (the only ones that count)."""
        return [e for e in self.entries if self.trust.entry_ok(e)]

    @property
    def verified(self) -> bool:
        """True when the whole history and the record verify."""
        return self.trust.ok

    @property
    def head(self) -> str:
        """The last entry's hash (what to anchor: commit it, print it)."""
        return self.entries[-1].entry_sha256 if self.entries else ""


def split_history(text: str) -> tuple[str, str]:
    """The text before the first ``[[entry]]`` line, and the history from it to the end."""
    m = _ENTRY_HEADER.search(text)
    if m is None:
        return text, ""
    return text[: m.start()], text[m.start():]


def checklist_of(project_path: Path) -> Any:
    """The project's checklist as on disk, or None when the project does not load."""
    from reviewer.checklist import load_checklist
    from reviewer.project import load_project

    if project_path.name.endswith(".review.toml"):
        b = base_name(project_path)
        project_path = b.with_name(b.name + ".toml")
    try:
        project = load_project(project_path)
        return load_checklist(project.checklist, project_path.parent)
    except LatchbookError:
        return None


def load_record(project_path: str | Path, checklist: Any = None) -> Record:
    """Read ``NAME.review.toml`` beside the project and verify it, once.

    ``checklist`` is the project's checklist (loaded from the project when not given; None
    when the project does not load, and then signatures and approvals are not checked and
    the history does not verify). A missing record is an empty one. A record that is not
    valid TOML is a :class:`RecordError` naming the file and the line.
    """
    project_path = Path(project_path)
    path = record_path(project_path)
    text, sha = read_with_hash(path)
    if checklist is None:
        checklist = checklist_of(project_path)
    if text is None:
        trust = Trust(policy_known=checklist is not None,
                      policy_sha256=checklist.policy_sha256 if checklist is not None else "")
        return Record(path, project_path, False, None, {}, [], [], "", ChainCheck(), trust,
                      checklist)
    try:
        doc = parse_record(text, path)
    except tomllib.TOMLDecodeError as exc:
        m = re.search(r"line (\d+)", str(exc))
        raise RecordError(f"the review record is not valid TOML ({exc}); it is written only by "
                          "Latchbook, so restore it from version control",
                          Where(str(path), line=int(m.group(1)) if m else None)) from None
    header = doc.get("review", {})
    results = doc.get("result", [])
    raw_entries = doc.get("entry", [])
    if not isinstance(header, dict) or not isinstance(results, list) \
            or not isinstance(raw_entries, list):
        raise RecordError("the review record does not have the layout Latchbook writes "
                          "([review], [[result]], [[entry]]); restore it from version control",
                          Where(str(path)))
    entries = [Entry.from_raw(e if isinstance(e, dict) else {}, i)
               for i, e in enumerate(raw_entries, 1)]
    chain = check_chain(raw_entries, header)
    results = [dict(r) if isinstance(r, dict) else {} for r in results]
    trust = verify_history(header=header, results=results, entries=entries, chain=chain,
                           checklist=checklist, project_name=project_path.name)
    _, entries_text = split_history(text)
    return Record(path, project_path, True, sha, header, results, entries, entries_text, chain,
                  trust, checklist)


__all__ = ["Record", "checklist_of", "load_record", "parse_record", "record_path",
           "split_history"]
