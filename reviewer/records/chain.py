"""History entries and the hash chain that links them.

Each ``[[entry]]`` carries the hash of the one before it and its own hash over its canonical
JSON, so an edit, a deletion or a reordering shows up as the first entry whose hash or
sequence does not follow. The chain is tamper-evident, not tamper-proof: whoever can write the
file can re-hash it from any entry on; signatures (:mod:`reviewer.records.policy`) and an
anchor kept elsewhere (``verify --head``) are what catch that.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from datetime import datetime
from typing import Any

from reviewer.records.canon import (
    covered_inputs_hash,
    covered_results_hash,
    entry_hash,
    snap_from_toml,
    snap_hash,
)

KINDS = {"signoff": "reviewed", "approval": "approved", "waiver": "waived",
         "revoke": "revoked", "note": "noted"}
COVERING = ("signoff", "approval", "waiver")


@dataclass
class Entry:
    """One history entry, read from the record (``raw`` is exactly what the file holds).

    ``existing`` is True when a command found this entry already in the history (a retry of
    an operation that had written it) instead of adding it. ``position`` is its place in the
    file (1-based), which a tampered ``seq`` does not change.
    """

    seq: int
    kind: str
    meaning: str
    stage: str
    checks: list[str]
    by: dict[str, str]
    at: datetime | None
    note: str
    items: list[dict[str, Any]]
    revokes: int | None
    entry_sha256: str
    prev_sha256: str
    signature: str
    raw: dict[str, Any]
    existing: bool = False
    position: int = 0

    @classmethod
    def from_raw(cls, raw: Mapping[str, Any], position: int) -> Entry:
        """Read leniently (the chain check reports what is wrong, by entry)."""
        def s(key: str) -> str:
            v = raw.get(key, "")
            return v if isinstance(v, str) else str(v)
        seq = raw.get("seq")
        items = raw.get("signed", [])
        at = raw.get("at")
        rev = raw.get("revokes")
        return cls(seq if isinstance(seq, int) and not isinstance(seq, bool) else position,
                   s("kind"), s("meaning"), s("stage"),
                   [str(c) for c in raw.get("checks", []) if isinstance(raw.get("checks"), list)],
                   {k: str(v) for k, v in raw.get("by", {}).items()}
                   if isinstance(raw.get("by"), Mapping) else {},
                   at if isinstance(at, datetime) else None, s("note"),
                   [dict(i) for i in items if isinstance(i, Mapping)]
                   if isinstance(items, list) else [],
                   rev if isinstance(rev, int) and not isinstance(rev, bool) else None,
                   s("entry_sha256"), s("prev_sha256"), s("signature"), dict(raw),
                   position=position)

    @property
    def keys(self) -> list[tuple[str, str]]:
        """The (stage, check) pairs this entry covers."""
        return [(str(i.get("stage", "")), str(i.get("check", ""))) for i in self.items]

    @property
    def login(self) -> str:
        """The signer's login as recorded."""
        return self.by.get("login", "")

    @property
    def policy_sha256(self) -> str:
        """The signing policy the entry was made under ("" for entries older than policies)."""
        cl = self.raw.get("checklist", {})
        return str(cl.get("policy_sha256", "")) if isinstance(cl, Mapping) else ""

    def who(self) -> str:
        """``Name (login@host)``."""
        login, host = self.by.get("login", "?"), self.by.get("host", "?")
        name = self.by.get("name", "")
        return f"{name} ({login}@{host})" if name and name != login else f"{login}@{host}"

    def title(self) -> str:
        """``#3 signoff of stage trigger by alice@host``."""
        where = "the whole project" if self.stage == "*" else f"stage {self.stage}"
        if self.kind == "revoke":
            where = f"entry #{self.revokes}"
        return f"#{self.seq} {self.kind} of {where} by {self.who()}"


@dataclass
class ChainCheck:
    """The outcome of checking the hash chain alone (links, hashes, places, fields)."""

    ok: bool = True
    first_bad: int | None = None
    messages: list[str] = field(default_factory=list)

    def bad(self, seq: int, message: str) -> None:
        """Record a break; the first one is the one named."""
        if self.first_bad is None:
            self.first_bad = seq
        self.ok = False
        self.messages.append(message)


_REQUIRED: dict[str, type | tuple[type, ...]] = {
    "seq": int, "kind": str, "meaning": str, "stage": str, "checks": list, "by": dict,
    "at": datetime, "note": str, "inputs_sha256": str, "results_sha256": str, "checklist": dict,
    "tool": str, "signed": list, "prev_sha256": str, "entry_sha256": str,
}


def check_chain(raw_entries: Sequence[Any], header: Mapping[str, Any] | None = None) -> ChainCheck:
    """Check every entry's place, fields, hashes and links; name the first that breaks.

    Per entry ``i`` (1-based): it has every field with the right type; ``seq == i`` (a deleted
    or moved entry shows here); ``prev_sha256`` is entry ``i-1``'s ``entry_sha256``; its own hash
    is right; its covered items hash to its ``inputs_sha256``/``results_sha256`` and each item's
    snapshot to its inputs hash; a revocation names an earlier, revocable entry. The header's
    ``entries``/``head_sha256`` catch a history cut short at the end — unless whoever cut it
    also fixed the header, which only a signed head or an anchor kept elsewhere catches.
    """
    out = ChainCheck()
    prev = ""
    kinds_by_seq: dict[int, str] = {}
    revoked: set[int] = set()
    for i, raw in enumerate(raw_entries, 1):
        if not isinstance(raw, Mapping):
            out.bad(i, f"entry {i}: not a table")
            break
        missing = [k for k, t in _REQUIRED.items()
                   if not isinstance(raw.get(k), t) or isinstance(raw.get(k), bool)]
        if missing:
            out.bad(i, f"entry {i}: missing or mistyped {', '.join(missing)}")
            break
        if raw["seq"] != i:
            out.bad(i, f"entry {i} in the file carries seq {raw['seq']}: an entry was removed, "
                       "added or moved at this point")
            break
        if raw["kind"] not in KINDS or raw["meaning"] != KINDS[raw["kind"]]:
            out.bad(i, f"entry {i}: unknown kind/meaning {raw['kind']}/{raw['meaning']}")
            break
        if raw["prev_sha256"] != prev:
            out.bad(i, f"entry {i}: its link to the entry before does not match (prev_sha256): "
                       "the entry before it was changed, removed or moved")
            break
        if entry_hash(raw) != raw["entry_sha256"]:
            out.bad(i, f"entry {i}: its content does not match its hash (entry_sha256): it was "
                       "edited after it was written")
            break
        items = raw["signed"]
        if not all(isinstance(it, Mapping) for it in items):
            out.bad(i, f"entry {i}: a covered item is not a table")
            break
        if covered_inputs_hash(items) != raw["inputs_sha256"] \
                or covered_results_hash(items) != raw["results_sha256"]:
            out.bad(i, f"entry {i}: its covered results do not match its inputs/results hashes")
            break
        snaps_ok = True
        for it in items:
            snap = it.get("snapshot", {})
            if not isinstance(snap, Mapping) or \
                    snap_hash(snap_from_toml(snap)) != it.get("inputs_sha256"):
                snaps_ok = False
                break
        if not snaps_ok:
            out.bad(i, f"entry {i}: a signed input snapshot does not match its inputs hash")
            break
        if raw["kind"] == "revoke":
            target = raw.get("revokes")
            if not isinstance(target, int) or kinds_by_seq.get(target) not in COVERING \
                    or target in revoked:
                out.bad(i, f"entry {i}: revokes #{target}, which is not an earlier sign-off, "
                           "approval or waiver still in force")
                break
            revoked.add(target)
        kinds_by_seq[i] = raw["kind"]
        prev = raw["entry_sha256"]
    if out.ok and header is not None and header:
        n = header.get("entries")
        head = header.get("head_sha256")
        if isinstance(n, int) and n > len(raw_entries):
            out.bad(len(raw_entries) + 1,
                    f"entry {len(raw_entries) + 1}: missing; the record's header names {n} "
                    f"entries and the file holds {len(raw_entries)} (the last were removed)")
        elif isinstance(n, int) and n < len(raw_entries):
            out.bad(n + 1, f"entry {n + 1}: not in the record's header ({n} entries): it was "
                           "added outside Latchbook")
        elif isinstance(head, str) and head != prev and n == len(raw_entries):
            out.bad(max(len(raw_entries), 1),
                    f"entry {max(len(raw_entries), 1)}: the last entry is not the head the "
                    "record's header names")
    return out


__all__ = ["COVERING", "KINDS", "ChainCheck", "Entry", "check_chain"]
