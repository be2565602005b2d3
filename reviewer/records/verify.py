"""``latchbook verify``: the record's verification, staleness, and an optional anchor.

The anchor is a head hash kept somewhere the record's writer cannot reach (printed by
``status``, written into every report, or the record as committed): with ``--head HASH`` the
history must still contain that entry, else entries were cut off or the history rewritten.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

from reviewer.errors import LatchbookError, ProjectError, RecordError, UnsafeFileError, Where
from reviewer.records.actions import fresh_run
from reviewer.records.record import load_record
from reviewer.records.staleness import stale_entries

MIN_ANCHOR = 8


@dataclass
class VerifyReport:
    """What ``latchbook verify`` found.

    ``ok`` is True only when the history verifies (chain, signatures, approver rules, signed
    head, stored results), no sign-off, approval or waiver in force is stale, and the anchor
    (when given) is in the history. ``messages`` are the problems; ``notes`` say what was
    checked and what a file alone cannot prove.
    """

    ok: bool
    first_bad: int | None
    messages: list[str]
    entries: int = 0
    signed: int = 0
    stale: list[str] = field(default_factory=list)
    head: str = ""
    history_ok: bool = True
    notes: list[str] = field(default_factory=list)
    anchor: str = ""
    anchor_found: bool | None = None
    head_signature: str = "none"

    def as_dict(self) -> dict[str, object]:
        """The ``--json`` document."""
        return {"ok": self.ok, "exit_code": 0 if self.ok else 1, "history_ok": self.history_ok,
                "first_bad": self.first_bad, "entries": self.entries,
                "ssh_signatures_good": self.signed, "head_signature": self.head_signature,
                "head_sha256": self.head, "anchor": self.anchor or None,
                "anchor_found": self.anchor_found, "messages": self.messages,
                "stale": self.stale, "notes": self.notes}


def verify(project_path: str | Path, *, head: str | None = None) -> VerifyReport:
    """Verify the record of ``project_path``; with ``head``, check it against that anchor."""
    project_path = Path(project_path)
    if not project_path.exists():
        raise ProjectError("no such project file; check the path", Where(str(project_path)))
    if head is not None and (len(head) < MIN_ANCHOR or
                             any(c not in "0123456789abcdef" for c in head.lower())):
        raise ProjectError(f"--head takes a head hash (at least {MIN_ANCHOR} hex digits, as "
                           "status and reports print it)", Where(str(project_path)))
    from reviewer.project import load_project

    load_project(project_path)  # a project that cannot be read is bad input, record or not
    try:
        rec = load_record(project_path)
    except UnsafeFileError:
        raise  # a file not to be read as it is (a pipe, a link loop, nesting): bad input
    except RecordError as exc:
        return VerifyReport(False, None, [str(exc)], history_ok=False)
    t = rec.trust
    rep = VerifyReport(t.ok, t.first_bad, t.messages(), len(rec.entries), t.signatures_good,
                       head=rec.head, history_ok=t.ok, notes=list(t.notes),
                       head_signature=t.head_signature)
    if not rec.exists:
        rep.notes = [f"no review record yet ({rec.path.name}); nothing to verify"]
    if head is not None:
        rep.anchor = head.lower()
        hit = next((e for e in rec.entries if e.entry_sha256.startswith(rep.anchor)), None)
        rep.anchor_found = hit is not None
        if hit is None:
            rep.messages.append(f"the anchored head {rep.anchor[:16]} is not in this history: "
                                "entries were cut off the end, or the history was rewritten")
        elif hit.position == len(rec.entries):
            rep.notes.insert(0, f"the anchored head {rep.anchor[:16]} is the head: nothing was "
                                "cut off since it was taken")
        else:
            rep.notes.insert(0, f"the anchored head {rep.anchor[:16]} is entry {hit.position}; "
                                f"{len(rec.entries) - hit.position} entries were added since")
    if rec.checklist is not None and rec.exists:
        try:
            run, _ = fresh_run(project_path)
        except LatchbookError as exc:
            rep.messages.append(f"staleness not checked: {exc}")
            rep.ok = False
        else:
            for entry, changes in stale_entries(rec, run):
                what = "; ".join(c.text() for c in changes[:6])
                more = f" (+{len(changes) - 6} more)" if len(changes) > 6 else ""
                rep.stale.append(f"{entry.title()} is stale: {what}{more}")
    rep.ok = rep.history_ok and not rep.stale and rep.anchor_found is not False \
        and not any(m.startswith("staleness not checked") for m in rep.messages)
    return rep


__all__ = ["VerifyReport", "verify"]
