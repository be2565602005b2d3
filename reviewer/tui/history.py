"""The review record's history as the lead reads it (no Textual here): every entry with who,
when, what, why, its number, and where it stands.

Where an entry stands is two things, like a check's result and review state:

- its *verification*: ``verified`` (the hash chain holds up to it and its SSH signature, if
  any, is good), ``unverified`` (it is at or after a break of the chain or a bad or missing
  signature: it counts for nothing), or ``checking`` while ``verify`` runs;
- its *standing*: ``in force`` (the latest entry of its kind on a check, still matching),
  ``stale`` (in force, but what it covered changed), ``superseded`` (a later entry of its kind
  covers those checks), ``revoked`` (by entry #n), or ``recorded`` (a note or a revocation).
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from typing import Any

COVERING = ("signoff", "approval", "waiver")
WHAT = {"signoff": "sign-off", "approval": "approval", "waiver": "waiver", "revoke": "revocation",
        "note": "note"}


@dataclass(frozen=True)
class HistoryRow:
    """One entry of the history, ready to show."""

    seq: int
    kind: str
    what: str          # "sign-off (reviewed)", "revocation of #3", "manual answer"
    where: str         # "stage gate: gate.trigger, gate.noise" or "the whole project"
    stage: str
    checks: tuple[str, ...]
    who: str
    login: str
    when: str
    note: str
    verification: str  # verified | unverified | checking
    standing: str      # in force | stale | superseded | revoked by #n | recorded
    ssh: bool

    @property
    def state(self) -> str:
        """The one word a table column shows: unverified first, then the standing."""
        return "unverified" if self.verification == "unverified" else self.standing

    @property
    def short_where(self) -> str:
        """``where`` for a table cell: a long list of checks is counted, not listed."""
        if len(self.checks) <= 3:
            return self.where
        head = self.where.split(":")[0]
        return f"{head}: {len(self.checks)} checks"

    def matches(self, typed: str) -> bool:
        """Whether every word of ``typed`` names this entry's stage or one of its checks."""
        words = typed.lower().split()
        hay = " ".join((self.stage, *self.checks)).lower()
        return all(w in hay for w in words)


def _checks(entry: Any) -> tuple[str, ...]:
    keys = [c for _, c in getattr(entry, "keys", [])]
    return tuple(keys or [c for c in getattr(entry, "checks", []) if not c.startswith("manual:")])


def _where(entry: Any, checks: tuple[str, ...]) -> str:
    if entry.kind == "revoke":
        return f"entry #{entry.revokes}"
    stage = "the whole project" if entry.stage == "*" else f"stage {entry.stage}"
    manual = [c[len("manual:"):] for c in getattr(entry, "checks", []) if c.startswith("manual:")]
    if manual:
        return f"{stage}: question {', '.join(manual)}"
    return f"{stage}: {', '.join(checks)}" if checks else stage


def rows(entries: Iterable[Any], check_states: Mapping[tuple[str, str], Any], *,
         first_bad: int | None, checking: bool) -> list[HistoryRow]:
    """Every entry, oldest first, with its verification and standing.

    ``first_bad``: the first entry that fails verification (chain or signature; None: none);
    ``checking``: signatures are still being verified (the chain alone is known).
    """
    entries = list(entries)
    revoked_by = {e.revokes: e.seq for e in entries if e.kind == "revoke" and e.revokes}
    in_force: set[int] = set()
    stale: set[int] = set()
    for st in check_states.values():
        for seq in (st.signoff_seq, st.approval_seq, st.waiver_seq):
            if seq is not None:
                in_force.add(seq)
        stale.update(getattr(st, "stale_seqs", []) or [])
    out = []
    for e in entries:
        checks = _checks(e)
        if first_bad is not None and e.seq >= first_bad:
            verification = "unverified"
        else:
            verification = "checking" if checking else "verified"
        if e.seq in revoked_by:
            standing = f"revoked by #{revoked_by[e.seq]}"
        elif e.kind not in COVERING:
            standing = "recorded"
        elif e.seq in stale:
            standing = "stale"
        elif e.seq in in_force:
            standing = "in force"
        else:
            standing = "superseded"
        what = WHAT.get(e.kind, e.kind)
        if e.kind in COVERING and e.meaning:
            what += f" ({e.meaning})"
        if e.kind == "note" and any(c.startswith("manual:") for c in e.checks):
            what = "manual answer"
        when = e.at.strftime("%Y-%m-%d %H:%M") if e.at is not None else "no date"
        out.append(HistoryRow(e.seq, e.kind, what, _where(e, checks), e.stage, checks, e.who(),
                              e.by.get("login", "?"), when, e.note, verification, standing,
                              bool(e.signature)))
    return out
