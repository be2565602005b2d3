"""Staleness and the review state of each check, computed every time, never stored.

What an entry covers is a list of (stage, check) items, each with its computed result and a
canonical snapshot of exactly the inputs that check read (SI values). A sign-off, approval or
waiver is *current* while every check it covers still reads inputs hashing as signed, under
the same checklist and the same signing policy, with the same result; otherwise it is
*stale*, and the snapshot diff says which inputs changed. An entry that does not verify
(:mod:`reviewer.records.trust`) makes the checks it covers *unverified*: it counts for nothing.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any

from reviewer.fmt import show
from reviewer.records.canon import canonical_json, snap_from_toml
from reviewer.records.chain import COVERING, Entry
from reviewer.schema import dim_of_path
from reviewer.states import FAILING, WAIVABLE, result_word, review_word

POLICY = "signing policy"
METHOD = "method"


@dataclass(frozen=True)
class Change:
    """What changed since an entry was signed: an input path (SI values), or what else."""

    path: str
    old: Any
    new: Any

    def text(self) -> str:
        """``stages.trigger.timing_r: 4.7 kΩ → 5.6 kΩ`` in engineering notation."""
        if self.path == POLICY:
            return (f"signing policy changed (approvers, self-approval, SSH signing or the "
                    f"allowed signers): {self.old} → {self.new}")
        if self.path == METHOD:
            return (f"the check's method was revised since it was signed (revision "
                    f"{self.old} → {self.new}): the signed result was computed another way")
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
    if old.get("method", 1) != new.get("method", 1):
        out.append(Change(METHOD, old.get("method", 1), new.get("method", 1)))
    if not out and canonical_json(old) != canonical_json(new):
        out.append(Change("inputs", old.get("scheme", "?"), new.get("scheme", "?")))
    return out


def _ident_text(c: Mapping[str, Any]) -> str:
    return f"{c.get('name', '?')} v{c.get('version', '?')} ({str(c.get('sha256', ''))[:12]})"


def item_changes(entry: Entry, item: Mapping[str, Any], result: Any,
                 checklist_id: Mapping[str, str]) -> list[Change]:
    """Why a covered item is stale (empty: still current).

    Current means: the check still exists, its inputs hash as signed, the checklist's content
    and its signing policy are the ones signed under, and the result is the one signed.
    """
    if result is None:
        return [Change(f"{item.get('stage')}/{item.get('check')}", "in the project",
                       "no longer in the project")]
    out: list[Change] = []
    if result.inputs_sha256 != item.get("inputs_sha256"):
        old = snap_from_toml(item.get("snapshot", {}) or {})
        out += snapshot_diff(old, result.snapshot or {})
    signed_cl = dict(entry.raw.get("checklist", {}) or {})
    content = ("name", "version", "sha256")
    if any(signed_cl.get(k) != checklist_id.get(k) for k in content):
        out.append(Change("checklist", _ident_text(signed_cl), _ident_text(checklist_id)))
    if signed_cl.get("policy_sha256", "") != checklist_id.get("policy_sha256", ""):
        out.append(Change(POLICY, str(signed_cl.get("policy_sha256", "none"))[:12] or "none",
                          str(checklist_id.get("policy_sha256", ""))[:12]))
    if not out and result.status != item.get("status"):
        out.append(Change("result", item.get("status"), result.status))
    return out


@dataclass
class CheckState:
    """The review state of one (stage, check) against a run.

    ``status`` is the computed result (see :mod:`reviewer.states`). ``signoff`` is the
    reviewed sign-off in force: ``signed`` (current), ``stale``, ``unverified`` (the entry
    does not verify) or ``unsigned``; ``approval`` likewise (``approved``, ``stale``,
    ``unverified`` or ""); ``waiver``: ``waived``, ``stale``, ``unverified`` or "".
    :attr:`review` is the one review word (:func:`reviewer.states.review_word`); ``state``
    is the older one-word reading that merges result and review (precedence unverified,
    stale, failing, waived, signed, not-applicable, unsigned), kept for exit codes.

    ``changed`` lists what differs from what was signed; ``problems`` why an entry covering
    it does not verify; ``*_seq`` the entry numbers in force.
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
    unverified_seqs: list[int] = field(default_factory=list)
    problems: list[str] = field(default_factory=list)

    @property
    def review(self) -> str:
        """The review word: unverified, stale, waived, approved, signed or unsigned."""
        return review_word(self)

    @property
    def result(self) -> str:
        """The result word as tables show it (``n/a`` for not-applicable)."""
        return result_word(self.status)

    @property
    def seqs(self) -> list[int]:
        """The entry numbers that bear on this check (in force, stale or unverified)."""
        s = {x for x in (self.signoff_seq, self.approval_seq, self.waiver_seq) if x}
        return sorted(s | set(self.stale_seqs) | set(self.unverified_seqs))

    @property
    def label(self) -> str:
        """``fail | waived``: the result and the review state, side by side."""
        return f"{self.result} | {self.review}"

    def as_dict(self) -> dict[str, Any]:
        """The ``review`` field of a result in JSON."""
        return {"state": self.review, "entries": self.seqs,
                "signoff": self.signoff, "approval": self.approval or None,
                "waiver": self.waiver or None,
                "changed": [c.text() for c in self.changed],
                "problems": list(self.problems)}


def in_force(entries: Iterable[Entry], trust: Any = None
             ) -> tuple[dict[str, dict[tuple[str, str], tuple[Entry, dict]]],
                        dict[str, set[tuple[str, str]]]]:
    """The latest entry of each covering kind per (stage, check), revoked entries left out;
    and per kind the checks touched by a revocation that does not verify.

    Revoking an entry withdraws it; the latest earlier one of the same kind, if any, is then
    the one in force again (and is itself judged current or stale). Entries that do not verify
    are kept here: the caller shows them as unverified.
    """
    entries = list(entries)
    ok = (lambda e: True) if trust is None else trust.entry_ok
    by_seq = {e.seq: e for e in entries}
    revoked = {e.revokes for e in entries if e.kind == "revoke" and e.revokes is not None}
    tainted: dict[str, set[tuple[str, str]]] = {k: set() for k in COVERING}
    for e in entries:
        if e.kind == "revoke" and not ok(e) and e.revokes in by_seq:
            target = by_seq[e.revokes]
            if target.kind in tainted:
                tainted[target.kind].update(target.keys)
    latest: dict[str, dict[tuple[str, str], tuple[Entry, dict]]] = {k: {} for k in COVERING}
    for e in entries:
        if e.kind not in COVERING or e.seq in revoked:
            continue
        for item in e.items:
            latest[e.kind][(str(item.get("stage")), str(item.get("check")))] = (e, item)
    return latest, tainted


_WORDS = {"signoff": ("signed", "unsigned"), "approval": ("approved", ""),
          "waiver": ("waived", "")}


def check_states(record: Any, run: Any) -> dict[tuple[str, str], CheckState]:
    """The review state of every (stage, check) of ``run``, from the record as verified."""
    trust = getattr(record, "trust", None)
    latest, tainted = in_force(record.entries, trust)
    ident = run.checklist.identity()
    out: dict[tuple[str, str], CheckState] = {}
    for key, res in run.by_key().items():
        st = CheckState(res.stage, res.check, res.status, "")
        for kind in COVERING:
            hit = latest[kind].get(key)
            word = ""
            seq = None
            if hit is not None:
                entry, item = hit
                seq = entry.seq
                if trust is not None and not trust.entry_ok(entry):
                    word = "unverified"
                    st.unverified_seqs.append(entry.seq)
                    st.problems += [f"#{entry.seq}: {p}" for p in trust.problems_of(entry)]
                else:
                    changes = item_changes(entry, item, res, ident)
                    if changes:
                        word = "stale"
                        st.changed += [c for c in changes if c not in st.changed]
                        st.stale_seqs.append(entry.seq)
                    else:
                        word = _WORDS[kind][0]
            if key in tainted[kind]:
                word = "unverified"
                st.problems.append("a revocation of its entry does not verify")
            word = word or _WORDS[kind][1]
            if kind == "signoff":
                st.signoff, st.signoff_seq = word, seq
            elif kind == "approval":
                st.approval, st.approval_seq = word, seq
            else:
                st.waiver, st.waiver_seq = word, seq
        st.state = _merged(st)
        out[key] = st
    return out


def _merged(st: CheckState) -> str:
    words = (st.signoff, st.approval, st.waiver)
    waived = st.waiver == "waived" and st.status in WAIVABLE
    if "unverified" in words:
        return "unverified"
    if "stale" in words:
        return "stale"
    if st.status in FAILING and not waived:
        return st.status
    if waived:
        return "waived"
    if st.signoff == "signed":
        return "signed"
    if st.status == "not-applicable":
        return "not-applicable"
    return "unsigned"


def stale_entries(record: Any, run: Any) -> list[tuple[Entry, list[Change]]]:
    """Every verified covering entry in force that is stale, with what changed."""
    trust = getattr(record, "trust", None)
    latest, _ = in_force(record.entries, trust)
    ident = run.checklist.identity()
    by_key = run.by_key()
    found: dict[int, tuple[Entry, list[Change]]] = {}
    for kind in COVERING:
        for key, (entry, item) in latest[kind].items():
            if trust is not None and not trust.entry_ok(entry):
                continue
            changes = item_changes(entry, item, by_key.get(key), ident)
            if changes:
                slot = found.setdefault(entry.seq, (entry, []))
                slot[1].extend(c for c in changes if c not in slot[1])
    return [found[s] for s in sorted(found)]


COUNT_KEYS = ("pass", "marginal", "fail", "blocked", "incomplete", "n/a", "unsigned", "signed",
              "approved", "waived", "stale", "unverified")


def counts(states: Mapping[tuple[str, str], CheckState]) -> dict[str, int]:
    """Result counts and review counts, side by side.

    Results: ``pass``, ``marginal``, ``fail`` (fail or error), ``blocked``, ``incomplete``
    (each without a current waiver), ``n/a``. Reviews (applicable checks, by
    review word): ``unsigned``, ``signed``, ``approved``, ``waived``, ``stale``,
    ``unverified``.
    """
    c = dict.fromkeys(COUNT_KEYS, 0)
    for st in states.values():
        review = st.review
        waived = review == "waived"
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
        if st.status == "not-applicable" and review == "unsigned":
            continue
        c[review] += 1
    return c


__all__ = ["COUNT_KEYS", "Change", "CheckState", "check_states", "counts", "in_force",
           "item_changes", "snapshot_diff", "stale_entries"]
