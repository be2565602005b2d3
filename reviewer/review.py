"""Review records: the stored results, the append-only history of sign-offs, and staleness.

``NAME.review.toml`` sits beside ``NAME.toml``. It holds a ``[review]`` header, one ``[[result]]``
per (stage, check) in project order (refreshed by every run that records), and the history:
``[[entry]]`` tables, oldest first, never rewritten. Each entry carries the hash of the one
before it and its own hash over its canonical JSON, so an edit, a deletion or a reordering shows
up as the first entry whose hash or sequence does not follow — the chain is tamper-evident, not
tamper-proof. Where the checklist asks for it (``sign_with_ssh = true``) each entry also carries
an SSH signature over its canonical bytes, checked against the checklist's ``allowed_signers``.

What an entry covers is a list of (stage, check) items, each with its computed result and a
canonical snapshot of exactly the inputs that check read (SI values). Staleness is computed every
time, never stored: a sign-off or waiver is *current* while every check it covers still reads
inputs hashing as signed, under the same checklist and with the same result; otherwise it is
*stale*, and the snapshot diff says which inputs changed (old → new, SI).

Entry kinds and their meaning: ``signoff`` (reviewed), ``approval`` (approved; only the
checklist's approvers when it names any), ``waiver`` (waived: a failing or marginal check,
accepted with a written reason), ``revoke`` (revoked: withdraws an earlier entry by its seq),
``note`` (noted). A waived check reads "fail — waived", never "pass".
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import math
import os
import re
import subprocess
import tempfile
import threading
import tomllib
from collections.abc import Iterable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from datetime import UTC, date, datetime
from datetime import time as dtime
from pathlib import Path
from typing import Any

import tomli_w

from reviewer import TOOL
from reviewer.errors import LatchbookError, ProjectError, RecordError, Where
from reviewer.fmt import show
from reviewer.schema import dim_of_path
from reviewer.states import FAILING, WAIVABLE
from reviewer.store import (
    ProjectLock,
    base_name,
    current_person,
    file_sha256,
    pending_journal,
    read_with_hash,
    save_checked,
    utc_now,
)

SSH_NAMESPACE = "latchbook-review"
KINDS = {"signoff": "reviewed", "approval": "approved", "waiver": "waived",
         "revoke": "revoked", "note": "noted"}
COVERING = ("signoff", "approval", "waiver")
MIN_REASON = 20
PLACEHOLDERS = {"ok", "okay", "n", "a", "na", "n/a", "none", "waived", "waive", "waiver",
                "accepted", "accept", "fine", "good", "yes", "no", "tbd", "todo", "see",
                "above", "below", "as", "discussed", "per", "agreed", "approved", "x", "test",
                "fixme", "later", "known", "issue", "same", "ditto", "ignore", "ignored",
                "not", "applicable", "it", "is", "the", "this", "and", "to", "be", "will",
                "we", "done", "lgtm", "reviewed", "signed", "nothing", "of", "for", "all"}
_ENTRY_HEADER = re.compile(r"^\[\[entry\]\][ \t]*$", re.MULTILINE)


def record_path(project_path: str | Path) -> Path:
    """``NAME.review.toml`` beside ``NAME.toml``."""
    b = base_name(project_path)
    return b.with_name(b.name + ".review.toml")


# --------------------------------------------------------------------------------------------
# Canonical forms and hashes
# --------------------------------------------------------------------------------------------

def _iso(t: datetime) -> str:
    """UTC ISO 8601 with ``Z`` (the one spelling hashed, whatever the TOML wrote)."""
    if t.tzinfo is not None:
        t = t.astimezone(UTC).replace(tzinfo=None)
        return t.isoformat() + "Z"
    return t.isoformat()  # a local date-time (not written by us) hashes as written


def _canon(x: Any) -> Any:
    """A JSON-ready form of a TOML value: NaN/inf and date-times get explicit markers."""
    if isinstance(x, bool) or x is None or isinstance(x, (int, str)):
        return x
    if isinstance(x, float):
        if math.isnan(x):
            return {"$float": "nan"}
        if math.isinf(x):
            return {"$float": "inf" if x > 0 else "-inf"}
        return x
    if isinstance(x, datetime):
        return {"$datetime": _iso(x)}
    if isinstance(x, (date, dtime)):
        return {"$datetime": x.isoformat()}
    if isinstance(x, Mapping):
        return {str(k): _canon(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_canon(v) for v in x]
    raise TypeError(f"not a TOML value: {type(x).__name__}")


def canonical_json(x: Any) -> bytes:
    """Sorted keys, no spaces, shortest float repr, UTF-8: the bytes every hash is taken of."""
    return json.dumps(_canon(x), sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False).encode("utf-8")


def _sha(x: Any) -> str:
    return hashlib.sha256(canonical_json(x)).hexdigest()


def entry_bytes(raw: Mapping[str, Any]) -> bytes:
    """The canonical bytes of an entry: everything except its own hash and signature."""
    return canonical_json({k: v for k, v in raw.items()
                           if k not in ("entry_sha256", "signature")})


def entry_hash(raw: Mapping[str, Any]) -> str:
    """``entry_sha256``: SHA-256 of :func:`entry_bytes`."""
    return hashlib.sha256(entry_bytes(raw)).hexdigest()


def _snap_to_toml(snap: Mapping[str, Any]) -> dict[str, Any]:
    """The engine's snapshot in TOML: its nulls (NaN inputs, absent options) become ``nan``.

    The engine never puts NaN itself in a snapshot (it maps NaN to null and refuses NaN in the
    hash), so the mapping is reversible.
    """
    def enc(v: Any) -> Any:
        if v is None:
            return math.nan
        if isinstance(v, Mapping):
            return {k: enc(w) for k, w in v.items()}
        if isinstance(v, (list, tuple)):
            return [enc(w) for w in v]
        return v
    return enc(dict(snap))


def _snap_from_toml(snap: Mapping[str, Any]) -> dict[str, Any]:
    """Inverse of :func:`_snap_to_toml`."""
    def dec(v: Any) -> Any:
        if isinstance(v, float) and math.isnan(v):
            return None
        if isinstance(v, Mapping):
            return {k: dec(w) for k, w in v.items()}
        if isinstance(v, list):
            return [dec(w) for w in v]
        return v
    return dec(dict(snap))


def _snap_hash(snap: Mapping[str, Any]) -> str:
    """The engine's inputs hash of a snapshot ("" for a check that read nothing)."""
    from reviewer.engine import inputs_hash

    return inputs_hash(snap) if snap else ""


def _item_result(item: Mapping[str, Any]) -> dict[str, Any]:
    """The result part of a covered item (what ``results_sha256`` is taken over)."""
    return {k: item[k] for k in ("stage", "check", "status", "margin", "summary",
                                 "inputs_sha256") if k in item}


def covered_inputs_hash(items: Sequence[Mapping[str, Any]]) -> str:
    """Hash over the sorted (stage, check, inputs hash) of every covered check."""
    return _sha(sorted([str(i.get("stage")), str(i.get("check")), str(i.get("inputs_sha256"))]
                       for i in items))


def covered_results_hash(items: Sequence[Mapping[str, Any]]) -> str:
    """Hash over the covered checks' results (status, margin, summary, inputs hash)."""
    return _sha([_item_result(i) for i in items])


# --------------------------------------------------------------------------------------------
# The record
# --------------------------------------------------------------------------------------------

@dataclass
class Entry:
    """One history entry, read from the record (``raw`` is exactly what the file holds)."""

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
                   s("entry_sha256"), s("prev_sha256"), s("signature"), dict(raw))

    @property
    def keys(self) -> list[tuple[str, str]]:
        """The (stage, check) pairs this entry covers."""
        return [(str(i.get("stage", "")), str(i.get("check", ""))) for i in self.items]

    def who(self) -> str:
        """``Name (login@host)``."""
        login, host = self.by.get("login", "?"), self.by.get("host", "?")
        name = self.by.get("name", "")
        return f"{name} ({login}@{host})" if name and name != login else f"{login}@{host}"

    def title(self) -> str:
        """``#3 signoff of trigger by alice@host``."""
        where = "the whole project" if self.stage == "*" else f"stage {self.stage}"
        if self.kind == "revoke":
            where = f"entry #{self.revokes}"
        return f"#{self.seq} {self.kind} of {where} by {self.who()}"


@dataclass
class ChainCheck:
    """The outcome of checking the hash chain (signatures are checked by :func:`verify`)."""

    ok: bool = True
    first_bad: int | None = None
    messages: list[str] = field(default_factory=list)

    def bad(self, seq: int, message: str) -> None:
        """Record a break; the first one is the one named."""
        if self.first_bad is None:
            self.first_bad = seq
        self.ok = False
        self.messages.append(message)


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

    @property
    def trusted(self) -> list[Entry]:
        """The entries before the first break of the chain (the ones that count)."""
        if self.chain.first_bad is None:
            return list(self.entries)
        return self.entries[: self.chain.first_bad - 1]

    @property
    def head(self) -> str:
        """The last entry's hash (what to anchor: commit it, print it)."""
        return self.entries[-1].entry_sha256 if self.entries else ""


def _split(text: str) -> tuple[str, str]:
    """The text before the first ``[[entry]]`` line, and the history from it to the end."""
    m = _ENTRY_HEADER.search(text)
    if m is None:
        return text, ""
    return text[: m.start()], text[m.start():]


def load_record(project_path: str | Path) -> Record:
    """Read ``NAME.review.toml`` beside the project and check its hash chain.

    A missing record is an empty one. A record that is not valid TOML is a :class:`RecordError`
    naming the file and the line (restore it from version control).
    """
    project_path = Path(project_path)
    path = record_path(project_path)
    text, sha = read_with_hash(path)
    if text is None:
        return Record(path, project_path, False, None, {}, [], [], "", ChainCheck())
    try:
        doc = tomllib.loads(text)
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
    _, entries_text = _split(text)
    return Record(path, project_path, True, sha, header, [dict(r) for r in results], entries,
                  entries_text, chain)


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
    ``entries``/``head_sha256`` catch a history cut short at the end.
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
                    _snap_hash(_snap_from_toml(snap)) != it.get("inputs_sha256"):
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


def results_seal(results: Sequence[Mapping[str, Any]]) -> str:
    """The hash over the stored ``[[result]]`` tables (a hand edit to them shows)."""
    return _sha(list(results))


# --------------------------------------------------------------------------------------------
# Staleness
# --------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Change:
    """What changed since an entry was signed: an input path (SI values), or what else."""

    path: str
    old: Any
    new: Any

    def text(self) -> str:
        """``stages.trigger.timing_r: 4.7 kΩ → 5.6 kΩ`` in engineering notation."""
        dim = dim_of_path(self.path)
        return f"{self.path}: {_show(self.old, dim)} → {_show(self.new, dim)}"


def _show(v: Any, dim: str = "") -> str:
    if v is None:
        return "(absent)"
    if isinstance(v, list) and len(v) == 3 and all(x is None or isinstance(x, (int, float))
                                                    for x in v):
        nom, lo, hi = v
        if dim and all(isinstance(x, (int, float)) and math.isfinite(x) for x in v):
            if lo == hi == nom:
                return show(nom, dim)
            return f"{show(nom, dim)} ({show(lo, dim)} … {show(hi, dim)})"
        if lo == hi == nom:
            return _num(nom)
        return f"{_num(nom)} ({_num(lo)} … {_num(hi)})"
    if isinstance(v, float):
        return _num(v)
    return str(v)


def _num(x: Any) -> str:
    if x is None or (isinstance(x, float) and math.isnan(x)):
        return "none"
    return f"{x:.6g}" if isinstance(x, float) else str(x)


def snapshot_diff(old: Mapping[str, Any], new: Mapping[str, Any]) -> list[Change]:
    """The inputs (and options) whose values differ between two snapshots (paths sorted)."""
    out: list[Change] = []
    oi, ni = old.get("inputs", {}) or {}, new.get("inputs", {}) or {}
    for path in sorted(set(oi) | set(ni)):
        a, b = oi.get(path), ni.get(path)
        if canonical_json(a) != canonical_json(b):
            out.append(Change(path, a, b))
    oo, no = old.get("options", {}) or {}, new.get("options", {}) or {}
    for key in sorted(set(oo) | set(no)):
        if canonical_json(oo.get(key)) != canonical_json(no.get(key)):
            out.append(Change(f"option {key}", oo.get(key), no.get(key)))
    if not out and canonical_json(old) != canonical_json(new):
        out.append(Change("inputs", old.get("scheme", "?"), new.get("scheme", "?")))
    return out


def _ident_text(c: Mapping[str, Any]) -> str:
    return f"{c.get('name', '?')} v{c.get('version', '?')} ({str(c.get('sha256', ''))[:12]})"


def item_changes(entry: Entry, item: Mapping[str, Any], result: Any,
                 checklist_id: Mapping[str, str]) -> list[Change]:
    """Why a covered item is stale (empty: still current).

    Current means: the check still exists, its inputs hash as signed, the checklist identity is
    the one signed under, and the result's status is the one signed.
    """
    if result is None:
        return [Change(f"{item.get('stage')}/{item.get('check')}", "in the project",
                       "no longer in the project")]
    out: list[Change] = []
    if result.inputs_sha256 != item.get("inputs_sha256"):
        old = _snap_from_toml(item.get("snapshot", {}) or {})
        out += snapshot_diff(old, result.snapshot or {})
    signed_cl = entry.raw.get("checklist", {})
    if canonical_json(dict(signed_cl)) != canonical_json(dict(checklist_id)):
        out.append(Change("checklist", _ident_text(signed_cl), _ident_text(checklist_id)))
    if not out and result.status != item.get("status"):
        out.append(Change("result", item.get("status"), result.status))
    return out


@dataclass
class CheckState:
    """The review state of one (stage, check) against a run.

    ``status`` is the computed result (pass, marginal, fail, error, not-applicable).
    ``signoff`` is the reviewed sign-off: ``signed`` (current), ``stale`` or ``unsigned``;
    ``approval`` likewise (``approved``, ``stale`` or ""); ``waiver``: ``waived`` (current),
    ``stale`` or "". ``state`` is the one word a table shows, by precedence:

    1. ``stale`` — a sign-off, approval or waiver covering it no longer matches;
    2. ``fail`` / ``error`` — it fails and no current waiver covers it;
    3. ``waived`` — it fails or is marginal and a current waiver covers it (read it as
       "fail — waived", never as a pass);
    4. ``signed`` — a current sign-off covers it;
    5. ``not-applicable`` — nothing to decide and not signed;
    6. ``unsigned``.

    ``changed`` lists what differs from what was signed (for every stale entry covering it).
    """

    stage: str
    check: str
    status: str
    state: str
    signoff: str = "unsigned"
    approval: str = ""
    waiver: str = ""
    changed: list[Change] = field(default_factory=list)
    signoff_seq: int | None = None
    approval_seq: int | None = None
    waiver_seq: int | None = None
    stale_seqs: list[int] = field(default_factory=list)

    @property
    def label(self) -> str:
        """A short human reading: ``fail — waived``, ``pass, signed``, ``marginal, stale``."""
        if self.waiver == "waived" and self.status in WAIVABLE:
            base = f"{self.status} — waived"
        else:
            base = "n/a" if self.status == "not-applicable" else self.status
        if self.state == "stale":
            return f"{base}, stale"
        if self.signoff == "signed":
            return f"{base}, approved" if self.approval == "approved" else f"{base}, signed"
        return base if self.status == "not-applicable" else f"{base}, unsigned"


def _in_force(entries: Iterable[Entry]) -> dict[str, dict[tuple[str, str], tuple[Entry, dict]]]:
    """The latest entry of each covering kind per (stage, check), revoked entries left out.

    Revoking an entry withdraws it; the latest earlier one of the same kind, if any, is then
    the one in force again (and is itself judged current or stale).
    """
    entries = list(entries)
    revoked = {e.revokes for e in entries if e.kind == "revoke" and e.revokes is not None}
    latest: dict[str, dict[tuple[str, str], tuple[Entry, dict]]] = {k: {} for k in COVERING}
    for e in entries:
        if e.kind not in COVERING or e.seq in revoked:
            continue
        for item in e.items:
            latest[e.kind][(str(item.get("stage")), str(item.get("check")))] = (e, item)
    return latest


def check_states(record: Record, run: Any) -> dict[tuple[str, str], CheckState]:
    """The review state of every (stage, check) of ``run``, from the record's trusted entries.

    Entries at and after a break in the chain do not count (the workbook names the break).
    """
    latest = _in_force(record.trusted)
    ident = run.checklist.identity()
    by_key = run.by_key()
    out: dict[tuple[str, str], CheckState] = {}
    for key, res in by_key.items():
        st = CheckState(res.stage, res.check, res.status, "")
        for kind in COVERING:
            hit = latest[kind].get(key)
            if hit is None:
                continue
            entry, item = hit
            changes = item_changes(entry, item, res, ident)
            current = not changes
            if not current:
                st.changed += [c for c in changes if c not in st.changed]
                st.stale_seqs.append(entry.seq)
            if kind == "signoff":
                st.signoff, st.signoff_seq = ("signed" if current else "stale"), entry.seq
            elif kind == "approval":
                st.approval, st.approval_seq = ("approved" if current else "stale"), entry.seq
            else:
                st.waiver, st.waiver_seq = ("waived" if current else "stale"), entry.seq
        failing = res.status in FAILING
        waived = st.waiver == "waived" and res.status in WAIVABLE
        if "stale" in (st.signoff, st.approval, st.waiver):
            st.state = "stale"
        elif failing and not waived:
            st.state = res.status
        elif waived:
            st.state = "waived"
        elif st.signoff == "signed" or st.approval == "approved":
            st.state = "signed"
        elif res.status == "not-applicable":
            st.state = "not-applicable"
        else:
            st.state = "unsigned"
        out[key] = st
    return out


def stale_entries(record: Record, run: Any) -> list[tuple[Entry, list[Change]]]:
    """Every covering entry in force that is stale, with what changed (for ``verify``)."""
    latest = _in_force(record.trusted)
    ident = run.checklist.identity()
    by_key = run.by_key()
    found: dict[int, tuple[Entry, list[Change]]] = {}
    for kind in COVERING:
        for key, (entry, item) in latest[kind].items():
            changes = item_changes(entry, item, by_key.get(key), ident)
            if changes:
                slot = found.setdefault(entry.seq, (entry, []))
                slot[1].extend(c for c in changes if c not in slot[1])
    return [found[s] for s in sorted(found)]


def counts(states: Mapping[tuple[str, str], CheckState]) -> dict[str, int]:
    """The status-table counts: pass, marginal, fail, waived, stale, unsigned, n/a.

    ``fail`` counts failing (and error) checks without a current waiver; ``marginal`` marginal
    ones without one; ``waived`` those with one; ``stale`` checks covered by a stale entry;
    ``unsigned`` applicable checks with no sign-off in force.
    """
    c = dict.fromkeys(("pass", "marginal", "fail", "blocked", "incomplete", "waived", "stale",
                       "unsigned", "n/a"), 0)
    for st in states.values():
        waived = st.waiver == "waived" and st.status in WAIVABLE
        if st.status == "pass":
            c["pass"] += 1
        elif st.status == "marginal" and not waived:
            c["marginal"] += 1
        elif st.status in ("blocked", "incomplete") and not waived:
            c[st.status] += 1
        elif st.status in FAILING and not waived:
            c["fail"] += 1
        elif st.status == "not-applicable":
            c["n/a"] += 1
        if waived:
            c["waived"] += 1
        if "stale" in (st.signoff, st.approval, st.waiver):
            c["stale"] += 1
        if st.signoff == "unsigned" and st.status != "not-applicable":
            c["unsigned"] += 1
    return c


# --------------------------------------------------------------------------------------------
# Writing
# --------------------------------------------------------------------------------------------

def _result_table(res: Any) -> dict[str, Any]:
    """One ``[[result]]`` table (TOML has no null: absent values are left out)."""
    t: dict[str, Any] = {"stage": res.stage, "check": res.check, "status": res.status}
    if res.margin is not None and math.isfinite(res.margin):
        t["margin"] = float(res.margin)
    t["summary"] = res.summary
    t["inputs_sha256"] = res.inputs_sha256
    values = {}
    for name, stat in res.values.items():
        d = {k: v for k, v in stat.as_dict().items() if v is not None}
        values[name] = d
    if values:
        t["values"] = values
    if res.worst:
        t["worst"] = dict(res.worst)
    if res.notes:
        t["notes"] = list(res.notes)
    return t


def _item(res: Any) -> dict[str, Any]:
    """A covered check as an entry records it: the result and the snapshot of its inputs."""
    it: dict[str, Any] = {"stage": res.stage, "check": res.check, "status": res.status}
    if res.margin is not None and math.isfinite(res.margin):
        it["margin"] = float(res.margin)
    it["summary"] = res.summary
    it["inputs_sha256"] = res.inputs_sha256
    it["snapshot"] = _snap_to_toml(res.snapshot or {})
    return it


def _render(header: dict[str, Any], results: list[dict[str, Any]], entries_text: str) -> str:
    head = tomli_w.dumps({"review": header} | ({"result": results} if results else {}))
    if not entries_text:
        return head
    return head.rstrip("\n") + "\n\n" + entries_text


def _header(project_path: Path, ident: Mapping[str, str], computed_at: Any,
            results: list[dict[str, Any]], n: int, head: str) -> dict[str, Any]:
    h: dict[str, Any] = {"project": project_path.name, "tool": TOOL, "checklist": dict(ident)}
    if isinstance(computed_at, datetime):
        h["computed_at"] = computed_at
    h["results_sha256"] = results_seal(results)
    h["entries"] = n
    h["head_sha256"] = head
    return h


def _write(rec: Record, *, results: list[dict[str, Any]], ident: Mapping[str, str],
           computed_at: Any, new_entry: dict[str, Any] | None = None) -> Path:
    """Write the record: new header and results, the old history verbatim, maybe one entry."""
    entries_text = rec.entries_text
    old_raw = [e.raw for e in rec.entries]
    new_raw = list(old_raw)
    if new_entry is not None:
        block = tomli_w.dumps({"entry": [new_entry]})
        if entries_text and not entries_text.endswith("\n"):
            entries_text += "\n"
        entries_text = entries_text + ("\n" if entries_text else "") + block
        new_raw.append(new_entry)
    head = new_raw[-1].get("entry_sha256", "") if new_raw else ""
    header = _header(rec.project_path, ident, computed_at, results, len(new_raw), str(head))
    text = _render(header, results, entries_text)
    # The history must come back exactly: every old entry, in order, then the new one.
    doc = tomllib.loads(text)
    back = doc.get("entry", [])
    if [canonical_json(e) for e in back] != [canonical_json(e) for e in new_raw] \
            or not _split(text)[1].startswith(rec.entries_text):
        raise RecordError("the review record is not laid out as Latchbook writes it, so the "
                          "history cannot be kept byte for byte; nothing was written. Restore "
                          "it from version control", Where(str(rec.path)))
    return save_checked(rec.path, text, rec.sha256)


def _refresh(rec: Record, run: Any) -> dict[str, Any]:
    results = [_result_table(r) for r in run.results]
    return {"results": results, "ident": run.checklist.identity(), "computed_at": utc_now()}


_IN_PROCESS = threading.RLock()


@contextlib.contextmanager
def _writing(project_path: Path) -> Iterator[None]:
    """The project's lock, plus a mutex for the threads of this process.

    The file lock is re-entrant per process (the workbook holds it for its session and signs
    from a worker thread), so threads of one process are serialised here instead.
    """
    with _IN_PROCESS, ProjectLock(project_path):
        yield


def record_results(run: Any, project_path: str | Path) -> Path:
    """Store ``run``'s results in the record, keeping every history entry byte for byte.

    Takes the project's lock (re-entrant within this process). Returns the record's path.
    """
    project_path = Path(project_path)
    with _writing(project_path):
        rec = load_record(project_path)
        return _write(rec, **_refresh(rec, run))


def _fresh(project_path: Path) -> tuple[Any, dict[str, str]]:
    """Load the project from disk and compute every check; the files' hashes to re-check."""
    from reviewer.checklist import load_checklist
    from reviewer.engine import evaluate
    from reviewer.project import load_project

    project = load_project(project_path)
    checklist = load_checklist(project.checklist, project_path.parent)
    files = {str(p): file_sha256(p) or "" for p in
             [project_path, *[Path(c) for c in getattr(project, "chain", [])]]}
    if checklist.path not in ("", "standard"):
        files[checklist.path] = file_sha256(checklist.path) or ""
    return evaluate(project, checklist), files


def _unchanged(files: Mapping[str, str], project_path: Path) -> None:
    for p, h in files.items():
        if (file_sha256(p) or "") != h:
            raise RecordError(f"{Path(p).name} changed while this entry was being made; nothing "
                              "was written. Try again", Where(str(project_path)))


def _refuse_unsaved(project_path: Path, unsaved: bool) -> None:
    if unsaved:
        raise RecordError("the project has unsaved edits; save them (or undo them) first: a "
                          "sign-off covers the file on disk", Where(str(project_path)))
    j = pending_journal(project_path)
    if j is not None:
        raise RecordError(f"the project has {len(j.edits)} unsaved edit(s) in {j.path.name} "
                          f"(saved {j.saved_at}); open it in the workbook to save or discard "
                          "them, then sign", Where(str(project_path)))


def _trusted_for_write(project_path: Path) -> Record:
    rec = load_record(project_path)
    if not rec.chain.ok:
        raise RecordError(f"the history is broken at entry {rec.chain.first_bad} "
                          f"({rec.chain.messages[0]}); nothing was added. Restore the record "
                          "from version control (see `latchbook verify`)", Where(str(rec.path)))
    return rec


def reason_problem(note: str) -> str | None:
    """Why ``note`` is not a reason of substance (None when it is).

    Refused: empty, shorter than 20 characters, fewer than three different words, or made only
    of placeholder words ("ok", "n/a", "waived", "see above" ...).
    """
    text = note.strip()
    if not text:
        return "a reason is required"
    if len(text) < MIN_REASON:
        return f"the reason is too short ({len(text)} characters; at least {MIN_REASON})"
    words = [w.lower() for w in re.findall(r"[A-Za-z0-9]+(?:/[A-Za-z0-9]+)?", text)]
    if len(set(words)) < 3:
        return "the reason needs at least three different words"
    if all(w in PLACEHOLDERS or w.isdigit() for w in words):
        return "the reason is only placeholder words; say why the result is acceptable"
    return None


def _new_entry(rec: Record, *, kind: str, stage: str, checks: list[str],
               items: list[dict[str, Any]], note: str, ident: Mapping[str, str],
               revokes: int | None = None) -> dict[str, Any]:
    me = current_person()
    prev = rec.entries[-1].entry_sha256 if rec.entries else ""
    e: dict[str, Any] = {
        "seq": len(rec.entries) + 1, "kind": kind, "meaning": KINDS[kind], "stage": stage,
        "checks": checks, "by": me.as_dict(), "at": utc_now(), "note": note.strip(),
        "inputs_sha256": covered_inputs_hash(items), "results_sha256": covered_results_hash(items),
        "checklist": dict(ident), "tool": TOOL,
    }
    if revokes is not None:
        e["revokes"] = revokes
    e["signed"] = items
    e["prev_sha256"] = prev
    e["entry_sha256"] = entry_hash(e)
    return e


def _entry_of(raw: dict[str, Any]) -> Entry:
    return Entry.from_raw(raw, int(raw["seq"]))


def _select(run: Any, stage: str, checks: Sequence[str] | None, project_path: Path) -> list[Any]:
    """The results a sign-off covers; unknown stages or checks are errors that list the known."""
    where = Where(str(project_path))
    if stage == "*":
        chosen = list(run.results)
    else:
        stages = list(dict.fromkeys(r.stage for r in run.results))
        if stage not in stages:
            raise ProjectError(f"no stage `{stage}`; the stages are {', '.join(stages)} "
                               "(or `*` for the whole project)", where)
        chosen = [r for r in run.results if r.stage == stage]
    if checks:
        known = {r.check for r in chosen}
        bad = [c for c in checks if c not in known]
        if bad:
            raise ProjectError(f"no check {', '.join(bad)} in stage `{stage}`; its checks are "
                               f"{', '.join(sorted(known))}", where)
        chosen = [r for r in chosen if r.check in set(checks)]
    return chosen


def _checks_field(stage: str, results: Sequence[Any]) -> list[str]:
    if stage == "*":
        return [f"{r.stage}/{r.check}" for r in results]
    return [r.check for r in results]


def sign(project_path: str | Path, *, stage: str, checks: Sequence[str] | None = None,
         meaning: str = "reviewed", note: str = "", unsaved: bool = False,
         ssh_key: str | Path | None = None) -> Entry:
    """Sign a stage (or ``"*"``, the whole project) as reviewed or approved.

    The results are computed afresh from the file on disk and recorded with the entry. Refused
    while the project has unsaved edits, while a covered check fails (or errors) without a
    current waiver, for ``approved`` by someone not among the checklist's approvers, and for
    ``approved`` while a covered check has no current reviewed sign-off.
    """
    project_path = Path(project_path)
    if meaning not in ("reviewed", "approved"):
        raise ProjectError(f"meaning `{meaning}` is not known; use reviewed or approved")
    kind = "signoff" if meaning == "reviewed" else "approval"
    with _writing(project_path):
        _refuse_unsaved(project_path, unsaved)
        run, files = _fresh(project_path)
        rec = _trusted_for_write(project_path)
        chosen = _select(run, stage, checks, project_path)
        states = check_states(rec, run)
        where = Where(str(project_path))
        failing = [r for r in chosen if r.status in FAILING
                   and states[(r.stage, r.check)].waiver != "waived"]
        if failing:
            what = "; ".join(f"{r.stage}/{r.check} " + (
                f"{r.status}s" if r.status in ("fail", "error") else f"is {r.status}") +
                             (" (a computation error cannot be waived: fix it)"
                              if r.status == "error" else "") for r in failing)
            raise RecordError(f"not signed: {what}. Fix the design, or waive the check with a "
                              "reason (latchbook waive), then sign", where)
        if kind == "approval":
            me = current_person()
            if run.checklist.approvers and me.login not in run.checklist.approvers:
                raise RecordError(f"not approved: {me.login} is not an approver of checklist "
                                  f"{run.checklist.name} ({', '.join(run.checklist.approvers)})",
                                  where)
            unreviewed = [f"{r.stage}/{r.check}" for r in chosen
                          if states[(r.stage, r.check)].signoff != "signed"]
            if unreviewed:
                raise RecordError("not approved: these have no current reviewed sign-off: "
                                  + ", ".join(unreviewed[:8])
                                  + (" …" if len(unreviewed) > 8 else ""), where)
        entry = _new_entry(rec, kind=kind, stage=stage, checks=_checks_field(stage, chosen),
                           items=[_item(r) for r in chosen], note=note,
                           ident=run.checklist.identity())
        entry = _maybe_sign(entry, run.checklist, ssh_key, project_path)
        _unchanged(files, project_path)
        _write(rec, new_entry=entry, **_refresh(rec, run))
        return _entry_of(entry)


def waive(project_path: str | Path, *, stage: str, check: str, note: str,
          unsaved: bool = False, ssh_key: str | Path | None = None) -> Entry:
    """Accept a failing or marginal check with a written reason (it stays "fail — waived").

    The reason must have substance (:func:`reason_problem`). The waiver binds to the inputs the
    check reads now: any change to them makes it stale.
    """
    project_path = Path(project_path)
    problem = reason_problem(note)
    if problem:
        raise RecordError(f"not waived: {problem}. Write why the result is acceptable "
                          "(e.g. the measured value, the test that covers it, who decided)",
                          Where(str(project_path)))
    with _writing(project_path):
        _refuse_unsaved(project_path, unsaved)
        run, files = _fresh(project_path)
        rec = _trusted_for_write(project_path)
        [res] = _select(run, stage, [check], project_path)
        if res.status not in WAIVABLE:
            why = ("a computation error cannot be waived: fix its input or report it"
                   if res.status == "error" else f"it is {res.status}; there is nothing to waive")
            raise RecordError(f"not waived: {stage}/{check}: {why}", Where(str(project_path)))
        entry = _new_entry(rec, kind="waiver", stage=stage, checks=[check], items=[_item(res)],
                           note=note, ident=run.checklist.identity())
        entry = _maybe_sign(entry, run.checklist, ssh_key, project_path)
        _unchanged(files, project_path)
        _write(rec, new_entry=entry, **_refresh(rec, run))
        return _entry_of(entry)


def _checklist_or_none(project_path: Path) -> Any:
    from reviewer.checklist import load_checklist
    from reviewer.project import load_project

    try:
        project = load_project(project_path)
        return load_checklist(project.checklist, project_path.parent)
    except LatchbookError:
        return None


def _append_plain(project_path: Path, *, kind: str, stage: str, checks: list[str], note: str,
                  revokes: int | None, ssh_key: str | Path | None, rec: Record) -> Entry:
    checklist = _checklist_or_none(project_path)
    if checklist is not None:
        ident = checklist.identity()
    else:  # the project does not load: keep the identity the record was last computed under
        ident = dict(rec.header.get("checklist", {"name": "?", "version": "?", "sha256": ""}))
    entry = _new_entry(rec, kind=kind, stage=stage, checks=checks, items=[], note=note,
                       ident=ident, revokes=revokes)
    if checklist is not None:
        entry = _maybe_sign(entry, checklist, ssh_key, project_path)
    _write(rec, results=rec.results, ident=rec.header.get("checklist", ident),
           computed_at=rec.header.get("computed_at"), new_entry=entry)
    return _entry_of(entry)


def revoke(project_path: str | Path, *, seq: int, note: str,
           ssh_key: str | Path | None = None) -> Entry:
    """Withdraw an earlier sign-off, approval or waiver (by its seq), with a reason."""
    project_path = Path(project_path)
    problem = reason_problem(note)
    if problem:
        raise RecordError(f"not revoked: {problem}. Say why entry #{seq} no longer holds",
                          Where(str(project_path)))
    with _writing(project_path):
        rec = _trusted_for_write(project_path)
        target = next((e for e in rec.entries if e.seq == seq), None)
        revoked = {e.revokes for e in rec.entries if e.kind == "revoke"}
        if target is None:
            raise RecordError(f"there is no entry #{seq} (the history has {len(rec.entries)})",
                              Where(str(rec.path)))
        if target.kind not in COVERING:
            raise RecordError(f"entry #{seq} is a {target.kind}; only sign-offs, approvals and "
                              "waivers can be revoked", Where(str(rec.path)))
        if seq in revoked:
            raise RecordError(f"entry #{seq} is already revoked", Where(str(rec.path)))
        return _append_plain(project_path, kind="revoke", stage=target.stage,
                             checks=list(target.checks), note=note, revokes=seq,
                             ssh_key=ssh_key, rec=rec)


def add_note(project_path: str | Path, *, note: str, stage: str = "*",
             checks: Sequence[str] = (), ssh_key: str | Path | None = None) -> Entry:
    """Add a note to the history (it signs nothing and changes no state)."""
    project_path = Path(project_path)
    if not note.strip():
        raise RecordError("a note needs some text", Where(str(project_path)))
    with _writing(project_path):
        rec = _trusted_for_write(project_path)
        return _append_plain(project_path, kind="note", stage=stage, checks=list(checks),
                             note=note, revokes=None, ssh_key=ssh_key, rec=rec)


# --------------------------------------------------------------------------------------------
# SSH signatures
# --------------------------------------------------------------------------------------------

def _allowed_signers(checklist: Any) -> Path | None:
    ref = getattr(checklist, "allowed_signers", "") or ""
    if not ref:
        return None
    p = Path(ref)
    if not p.is_absolute() and checklist.path not in ("", "standard"):
        p = Path(checklist.path).parent / p
    return p


def _ssh_keygen(args: list[str], data: bytes) -> subprocess.CompletedProcess[bytes]:
    try:
        return subprocess.run(["ssh-keygen", *args], input=data, capture_output=True,
                              timeout=60, check=False)
    except FileNotFoundError:
        raise RecordError("ssh-keygen is not installed; SSH signatures need OpenSSH 8.1 or "
                          "newer") from None
    except subprocess.TimeoutExpired:
        raise RecordError("ssh-keygen did not answer within 60 s (waiting for a passphrase? "
                          "load the key into ssh-agent)") from None


def ssh_sign(data: bytes, key: Path) -> str:
    """An armored SSH signature of ``data`` (namespace ``latchbook-review``)."""
    proc = _ssh_keygen(["-Y", "sign", "-f", str(key), "-n", SSH_NAMESPACE], data)
    if proc.returncode != 0 or b"BEGIN SSH SIGNATURE" not in proc.stdout:
        raise RecordError(f"ssh-keygen could not sign with {key}: "
                          f"{proc.stderr.decode(errors='replace').strip()}")
    return proc.stdout.decode("ascii").strip() + "\n"


def ssh_verify(data: bytes, signature: str, allowed: Path, login: str) -> tuple[bool, str]:
    """Check a signature against an allowed-signers file for principal ``login``."""
    with tempfile.TemporaryDirectory(prefix="latchbook-sig-") as tmp:
        sig = Path(tmp) / "entry.sig"
        sig.write_text(signature, "ascii")
        proc = _ssh_keygen(["-Y", "verify", "-f", str(allowed), "-I", login, "-n",
                            SSH_NAMESPACE, "-s", str(sig)], data)
    text = (proc.stdout + proc.stderr).decode(errors="replace").strip()
    return proc.returncode == 0, text


def default_key() -> Path:
    """``~/.ssh/id_ed25519``."""
    return Path(os.path.expanduser("~")) / ".ssh" / "id_ed25519"


def _maybe_sign(entry: dict[str, Any], checklist: Any, ssh_key: str | Path | None,
                project_path: Path) -> dict[str, Any]:
    """Add ``signature`` when the checklist asks for SSH-signed entries."""
    if not getattr(checklist, "sign_with_ssh", False):
        return entry
    key = Path(ssh_key) if ssh_key else default_key()
    if not key.exists():
        raise RecordError(f"checklist {checklist.name} asks for SSH-signed entries and there "
                          f"is no key at {key}; give one with --ssh-key (ed25519 recommended)",
                          Where(str(project_path)))
    data = entry_bytes(entry)
    sig = ssh_sign(data, key)
    allowed = _allowed_signers(checklist)
    if allowed is not None:
        ok, text = ssh_verify(data, sig, allowed, entry["by"]["login"])
        if not ok:
            raise RecordError(f"your key {key} is not in {allowed} for login "
                              f"{entry['by']['login']} ({text}); nothing was written. Ask the "
                              "checklist's owner to add it", Where(str(project_path)))
    return entry | {"signature": sig}


# --------------------------------------------------------------------------------------------
# Verify
# --------------------------------------------------------------------------------------------

@dataclass
class VerifyReport:
    """What ``latchbook verify`` found: the chain, the signatures, and stale sign-offs."""

    ok: bool
    first_bad: int | None
    messages: list[str]
    entries: int = 0
    signed: int = 0
    stale: list[str] = field(default_factory=list)
    head: str = ""


def verify(project_path: str | Path) -> VerifyReport:
    """Check the record's chain, its results seal, the SSH signatures, and staleness.

    ``ok`` is False for a broken chain, a bad or missing (where required) signature, or hand-
    edited stored results; ``first_bad`` names the first bad entry. Stale sign-offs are listed
    but do not make the chain bad (``latchbook status`` fails on them).
    """
    project_path = Path(project_path)
    if not project_path.exists():
        raise ProjectError("no such project file; check the path", Where(str(project_path)))
    try:
        rec = load_record(project_path)
    except RecordError as exc:
        return VerifyReport(False, None, [str(exc)])
    rep = VerifyReport(rec.chain.ok, rec.chain.first_bad, list(rec.chain.messages),
                       len(rec.entries), head=rec.head)
    if not rec.exists:
        rep.messages.append(f"no review record yet ({rec.path.name}); nothing to verify")
        return rep
    seal = rec.header.get("results_sha256")
    if seal is not None and seal != results_seal(rec.results):
        rep.ok = False
        rep.messages.append("the stored [[result]] tables were edited outside Latchbook; run "
                            "`latchbook check --record` to store fresh results")
    checklist = _checklist_or_none(project_path)
    if checklist is None:
        rep.messages.append("the project does not load, so signatures and staleness were not "
                            "checked; fix it (latchbook check) and verify again")
    _verify_signatures(rec, checklist, rep)
    if checklist is not None:
        try:
            run, _ = _fresh(project_path)
        except LatchbookError as exc:
            rep.messages.append(f"staleness not checked: {exc}")
        else:
            for entry, changes in stale_entries(rec, run):
                what = "; ".join(c.text() for c in changes[:6])
                more = f" (+{len(changes) - 6} more)" if len(changes) > 6 else ""
                rep.stale.append(f"{entry.title()} is stale: {what}{more}")
    return rep


def _verify_signatures(rec: Record, checklist: Any, rep: VerifyReport) -> None:
    required = bool(getattr(checklist, "sign_with_ssh", False))
    allowed = _allowed_signers(checklist) if checklist is not None else None
    have = [e for e in rec.entries if e.signature]
    if not required and not have:
        rep.messages.append(
            "entries are not SSH-signed: the hash chain shows edits only up to its head. "
            "Anyone who can write the file can rewrite it from any entry and re-hash the rest; "
            f"anchor the head ({rec.head[:16] or 'none yet'}) by committing the record to "
            "version control or keeping a printed report")
        return
    if allowed is None or not allowed.exists():
        msg = ("entries carry SSH signatures but the checklist names no allowed_signers file"
               if allowed is None else f"the allowed_signers file {allowed} does not exist")
        rep.messages.append(msg + "; signatures were not checked")
        if required:
            rep.ok = False
        return
    seen_signed = False
    for e in rec.entries:
        if not e.signature:
            if seen_signed or (required and e is rec.entries[-1]):
                rep.ok = False
                rep.first_bad = _first(rep.first_bad, e.seq)
                rep.messages.append(f"entry {e.seq}: no SSH signature, but signed entries "
                                    "came before it (or the checklist requires them)")
            continue
        seen_signed = True
        ok, text = ssh_verify(entry_bytes(e.raw), e.signature, allowed,
                              e.by.get("login", ""))
        if ok:
            rep.signed += 1
        else:
            rep.ok = False
            rep.first_bad = _first(rep.first_bad, e.seq)
            rep.messages.append(f"entry {e.seq}: bad SSH signature for {e.by.get('login', '?')} "
                                f"({text.splitlines()[-1] if text else 'no detail'})")
    if rep.signed and rep.ok:
        unsigned = len(rec.entries) - rep.signed
        rep.messages.append(f"{rep.signed} SSH signature(s) good against {allowed}"
                            + (f"; {unsigned} earlier entries unsigned, anchored by the first "
                               "signed one" if unsigned else ""))


def _first(a: int | None, b: int) -> int:
    return b if a is None else min(a, b)


__all__ = ["COVERING", "KINDS", "Change", "CheckState", "Entry", "Record", "VerifyReport",
           "add_note", "canonical_json", "check_chain", "check_states", "counts",
           "entry_bytes", "entry_hash", "load_record", "reason_problem", "record_path",
           "record_results", "revoke", "sign", "snapshot_diff", "stale_entries", "verify",
           "waive"]
