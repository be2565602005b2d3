"""One call for a view: the record of a project, verified once, read against a run.

:func:`review_view` is what the workbook, the reports and the command line build on: per check
its result and review words side by side, and the history with who, when, what, why and
whether each entry verifies.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import datetime
from pathlib import Path
from typing import Any

from reviewer.records.chain import COVERING, Entry
from reviewer.records.record import Record, load_record
from reviewer.records.staleness import CheckState, check_states, counts, stale_entries

Key = tuple[str, str]


@dataclass
class HistoryItem:
    """One entry as a history screen shows it.

    ``verification`` is ``verified`` or ``unverified`` (``problems`` say why); ``standing``
    is, for a sign-off, approval or waiver, ``in force``, ``stale``, ``revoked by #N`` or
    ``replaced by #N``, and "" for revocations and notes.
    """

    seq: int
    position: int
    kind: str
    meaning: str
    stage: str
    checks: list[str]
    who: str
    login: str
    at: datetime | None
    note: str
    revokes: int | None
    verification: str
    problems: list[str] = field(default_factory=list)
    signature: str = "none"
    standing: str = ""
    changed: list[str] = field(default_factory=list)

    def as_dict(self) -> dict[str, Any]:
        """JSON form."""
        return {"seq": self.seq, "kind": self.kind, "meaning": self.meaning,
                "stage": self.stage, "checks": list(self.checks), "who": self.who,
                "login": self.login, "at": self.at.isoformat() if self.at else None,
                "note": self.note, "revokes": self.revokes, "verification": self.verification,
                "problems": list(self.problems), "signature": self.signature,
                "standing": self.standing, "changed": list(self.changed)}


@dataclass
class ReviewView:
    """A record read against a run: states per check, the history, the verification."""

    record: Record
    states: dict[Key, CheckState]
    history: list[HistoryItem]

    @property
    def exists(self) -> bool:
        """False when the project has no review record yet (then no check has a review word)."""
        return self.record.exists

    @property
    def verified(self) -> bool:
        """True when the history and the record verify."""
        return self.record.trust.ok

    @property
    def problems(self) -> list[str]:
        """Why the record does not verify, in words."""
        return self.record.trust.messages()

    @property
    def head(self) -> str:
        """The head hash to anchor."""
        return self.record.head

    def review_word(self, stage: str, check: str) -> str:
        """The review word of one check ("" without a record or for an unknown check)."""
        st = self.states.get((stage, check))
        return st.review if st is not None and self.exists else ""

    def counts(self) -> dict[str, int]:
        """Result and review counts (see :func:`reviewer.records.staleness.counts`)."""
        return counts(self.states)

    def for_check(self, stage: str, check: str) -> list[HistoryItem]:
        """The entries that cover one check, oldest first."""
        return [h for h in self.history
                if h.stage in (stage, "*") and (check in h.checks or f"{stage}/{check}"
                                                in h.checks or not h.checks)]


def _standing(e: Entry, entries: list[Entry], stale: dict[int, list[str]]) -> str:
    if e.kind not in COVERING:
        return ""
    rev = next((r for r in entries if r.kind == "revoke" and r.revokes == e.seq), None)
    if rev is not None:
        return f"revoked by #{rev.seq}"
    later = next((x for x in entries if x.position > e.position and x.kind == e.kind
                  and set(e.keys) <= set(x.keys)), None)
    if later is not None:
        return f"replaced by #{later.seq}"
    return "stale" if e.seq in stale else "in force"


def history(record: Record, run: Any = None) -> list[HistoryItem]:
    """Every entry with who, when, what, why and its verification state."""
    stale = ({e.seq: [c.text() for c in ch] for e, ch in stale_entries(record, run)}
             if run is not None else {})
    out = []
    for e in record.entries:
        c = record.trust.entries.get(e.position)
        out.append(HistoryItem(
            e.seq, e.position, e.kind, e.meaning, e.stage, list(e.checks), e.who(), e.login,
            e.at, e.note, e.revokes, "verified" if c is None or c.ok else "unverified",
            list(c.problems) if c is not None else [], c.signature if c is not None else "none",
            _standing(e, record.entries, stale), stale.get(e.seq, [])))
    return out


def review_view(project_path: str | Path, run: Any, record: Record | None = None) -> ReviewView:
    """Load and verify the record once (or use ``record``), and read it against ``run``."""
    rec = record if record is not None else load_record(project_path, run.checklist)
    return ReviewView(rec, check_states(rec, run), history(rec, run))


__all__ = ["HistoryItem", "ReviewView", "history", "review_view"]
