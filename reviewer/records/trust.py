"""The one verification of a history: chain, signatures, approver and self-approval rules.

:func:`verify_history` runs once when a record is loaded (:func:`reviewer.records.load_record`)
and its :class:`Trust` travels with the record to every view and every command that appends.
An entry that does not verify counts for nothing: no view shows it as signed, waived or
approved, and nothing is appended on top of a history that does not verify.

Rules, per entry (by its place in the file):

* the hash chain holds up to and including it (an entry after a break is not trusted either);
* under the current signing policy with ``sign_with_ssh``, it carries a signature that
  ``ssh-keygen -Y verify`` accepts for its login against the ``allowed_signers`` file bound by
  the policy; any signature present is checked, whatever the policy;
* an approval made under the current policy is by one of its approvers (when it names any),
  and every check it covers had a current, verified reviewed sign-off by someone else (or by
  anyone, with ``self_approval = true``) when it was made.

And for the record: the stored ``[[result]]`` tables match their seal, and with signing on the
header's head (entry count and last hash) is signed. What a file alone cannot show is a cut
back to an earlier, once-valid state: only an anchor kept elsewhere (``verify --head``) does.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

from reviewer.records.canon import entry_bytes, head_bytes, results_seal
from reviewer.records.chain import ChainCheck, Entry
from reviewer.records.policy import allowed_signers, signing, ssh_verify

FILE_ALONE = ("a record file alone shows edits, reordering, deletions inside the history and "
              "entries not signed by a listed signer; it cannot show that entries were cut off "
              "the end together with the header, back to a state it once had. Keep the head "
              "hash (printed by status and in every report, or in a commit) and check it with "
              "`latchbook verify --head HASH`")


RESULTS_EDITED = ("the stored [[result]] tables were edited outside Latchbook; run "
                  "`latchbook check --record` to store fresh results")


@dataclass
class EntryCheck:
    """What the verification found about one entry: ``problems`` empty means it verifies."""

    position: int
    seq: int
    problems: list[str] = field(default_factory=list)
    signature: str = "none"  # good | bad | none | not checked

    @property
    def ok(self) -> bool:
        """True when the entry verifies."""
        return not self.problems

    @property
    def word(self) -> str:
        """``verified`` or ``unverified``."""
        return "verified" if self.ok else "unverified"


@dataclass
class Trust:
    """The outcome of :func:`verify_history` (one per loaded record)."""

    chain: ChainCheck = field(default_factory=ChainCheck)
    entries: dict[int, EntryCheck] = field(default_factory=dict)
    problems: list[str] = field(default_factory=list)  # about the record, not one entry
    notes: list[str] = field(default_factory=list)     # what was and was not checked
    signatures_good: int = 0
    policy_known: bool = True
    policy_sha256: str = ""
    head_signature: str = "none"  # good | bad | none | not required

    @property
    def ok(self) -> bool:
        """True when every entry and the record itself verify."""
        return not self.problems and all(c.ok for c in self.entries.values())

    @property
    def first_bad(self) -> int | None:
        """The place of the first entry that does not verify (None: every entry does)."""
        bad = [p for p, c in self.entries.items() if not c.ok]
        if not self.chain.ok and self.chain.first_bad is not None:
            bad.append(self.chain.first_bad)
        return min(bad) if bad else None

    @property
    def history_ok(self) -> bool:
        """True when every entry and the header's head verify (stored results aside: a fresh
        ``check --record`` replaces those)."""
        return all(c.ok for c in self.entries.values()) and \
            all(p == RESULTS_EDITED for p in self.problems)

    def entry_ok(self, entry: Entry) -> bool:
        """True when ``entry`` verifies."""
        c = self.entries.get(entry.position)
        return c is None or c.ok

    def problems_of(self, entry: Entry) -> list[str]:
        """Why ``entry`` does not verify (empty when it does)."""
        c = self.entries.get(entry.position)
        return list(c.problems) if c is not None else []

    def messages(self) -> list[str]:
        """Every problem, first the record's, then each entry's, in words."""
        out = list(self.problems)
        for pos in sorted(self.entries):
            out += [f"entry {pos}: {p}" if not p.startswith("entry ") else p
                    for p in self.entries[pos].problems]
        return out


def _revoked_before(entries: Sequence[Entry], position: int) -> set[int]:
    return {e.revokes for e in entries
            if e.kind == "revoke" and e.revokes is not None and e.position < position}


def approval_problems(e: Entry, entries: Sequence[Entry], checks: Mapping[int, EntryCheck],
                       checklist: Any) -> list[str]:
    out: list[str] = []
    approvers = list(getattr(checklist, "approvers", []) or [])
    if approvers and e.login not in approvers:
        out.append(f"approval by {e.login or '?'}, who is not an approver of checklist "
                   f"{getattr(checklist, 'name', '?')} ({', '.join(approvers)})")
    self_ok = bool(getattr(checklist, "self_approval", False))
    revoked = _revoked_before(entries, e.position)
    ident = e.raw.get("checklist", {})
    lacking: list[str] = []
    own: list[str] = []
    for item in e.items:
        key = (str(item.get("stage")), str(item.get("check")))
        backers = []
        for s in entries:
            if s.position >= e.position or s.kind != "signoff" or s.seq in revoked:
                continue
            if not checks[s.position].ok or s.raw.get("checklist") != ident:
                continue
            for it in s.items:
                if (str(it.get("stage")), str(it.get("check"))) == key and \
                        it.get("inputs_sha256") == item.get("inputs_sha256"):
                    backers.append(s.login)
        name = f"{key[0]}/{key[1]}"
        if not backers:
            lacking.append(name)
        elif not self_ok and all(b == e.login for b in backers):
            own.append(name)
    if lacking:
        out.append("approves checks that had no current, verified reviewed sign-off: "
                   + ", ".join(lacking[:6]) + (" …" if len(lacking) > 6 else ""))
    if own:
        out.append(f"self-approval: {e.login} approves their own sign-off of "
                   + ", ".join(own[:6]) + (" …" if len(own) > 6 else "")
                   + " (the checklist does not say self_approval = true)")
    return out


def verify_history(*, header: Mapping[str, Any], results: Sequence[Mapping[str, Any]],
                   entries: Sequence[Entry], chain: ChainCheck, checklist: Any,
                   project_name: str) -> Trust:
    """Check every entry and the record against ``checklist``'s policy (None: not loadable)."""
    t = Trust(chain=chain)
    seal = header.get("results_sha256")
    if seal is not None and seal != results_seal(results):
        t.problems.append(RESULTS_EDITED)
    if checklist is None:
        t.policy_known = False
        if entries:
            t.problems.append("the project does not load, so signatures and the approver rule "
                              "were not checked; fix it (latchbook check) and verify again")
    else:
        t.policy_sha256 = checklist.policy_sha256
    if not chain.ok and (chain.first_bad or 0) > len(entries):
        t.problems.append(chain.messages[0] if chain.messages else "the history was cut short")
    signs = checklist is not None and signing(checklist)
    allowed = allowed_signers(checklist) if checklist is not None else None
    have_signers = allowed is not None and allowed.exists()
    for e in entries:
        c = EntryCheck(e.position, e.seq)
        t.entries[e.position] = c
        if chain.first_bad is not None and e.position >= chain.first_bad:
            c.problems.append(next((m for m in chain.messages), "the chain breaks here")
                              if e.position == chain.first_bad else
                              f"comes after the break in the chain at entry {chain.first_bad}")
            continue
        if checklist is None:
            c.signature = "not checked"
            continue
        current = e.policy_sha256 == t.policy_sha256
        required = signs and current
        if e.signature:
            if have_signers:
                ok, text = ssh_verify(entry_bytes(e.raw), e.signature, allowed, e.login)
                if ok:
                    c.signature = "good"
                    t.signatures_good += 1
                else:
                    c.signature = "bad"
                    detail = text.splitlines()[-1] if text else "no detail"
                    c.problems.append(f"its SSH signature is not a good signature by "
                                      f"{e.login or '?'} from {allowed} ({detail})")
            else:
                c.signature = "not checked"
                if required:
                    c.problems.append("its SSH signature cannot be checked: the allowed_signers "
                                      f"file {allowed or '(none named)'} is not there")
        elif required:
            c.problems.append("it is not SSH-signed, though the signing policy it was made "
                              "under requires signatures")
        if e.kind == "approval" and current:
            c.problems += approval_problems(e, entries, t.entries, checklist)
    if entries and checklist is not None and signs \
            and entries[-1].policy_sha256 == t.policy_sha256 and chain.ok:
        sig = header.get("head_signature")
        by = str(header.get("head_by", ""))
        if not isinstance(sig, str) or not sig:
            t.head_signature = "none"
            t.problems.append("the header's head (entry count and last hash) is not signed: "
                              "the header was rewritten outside Latchbook, perhaps after "
                              "entries were cut off the end")
        elif have_signers:
            ok, _ = ssh_verify(head_bytes(project_name, len(entries), entries[-1].entry_sha256),
                               sig, allowed, by)
            t.head_signature = "good" if ok else "bad"
            if not ok:
                t.problems.append("the header's signed head does not match this history "
                                  f"({len(entries)} entries ending {entries[-1].entry_sha256[:12]}"
                                  "): entries were cut off or added outside Latchbook")
    elif not signs:
        t.head_signature = "not required"
    if checklist is not None and not signs and entries:
        t.notes.append("entries are not SSH-signed: the hash chain shows edits up to its head, "
                       "but anyone who can write the file can rewrite it from any entry and "
                       "re-hash the rest")
    t.notes.append(FILE_ALONE)
    return t


__all__ = ["FILE_ALONE", "RESULTS_EDITED", "EntryCheck", "Trust", "approval_problems",
           "verify_history"]
