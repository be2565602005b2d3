"""Writing a review record: results, sign-offs, waivers, revocations, approvals, notes.

Every command that appends takes the project's lock (waiting, bounded, for another command's
short write), loads and verifies the record once, refuses to append on a history that does not
verify (and says how to recover), computes the results afresh from the files on disk, and
writes the record atomically with the old history byte for byte and one entry more. A retry
of an operation whose entry is already the one in force reports that entry instead of adding a
duplicate.
"""

from __future__ import annotations

import contextlib
import math
import threading
import tomllib
from collections.abc import Callable, Iterator, Mapping, Sequence
from datetime import datetime
from pathlib import Path
from typing import Any

import tomli_w

from reviewer import TOOL
from reviewer.errors import ProjectError, RecordError, Where
from reviewer.reasons import reason_problem
from reviewer.records.canon import (
    canonical_json,
    covered_inputs_hash,
    covered_results_hash,
    entry_hash,
    results_seal,
    snap_to_toml,
)
from reviewer.records.chain import COVERING, KINDS, Entry
from reviewer.records.policy import sign_entry, sign_head, signing_key
from reviewer.records.record import Record, load_record, split_history
from reviewer.records.staleness import check_states, in_force
from reviewer.records.trust import approval_problems
from reviewer.states import FAILING, WAIVABLE
from reviewer.store import (
    DEFAULT_WAIT,
    ProjectLock,
    current_person,
    file_sha256,
    pending_journal,
    save_checked,
    utc_now,
)

OnWait = Callable[[str], object] | None


# --------------------------------------------------------------------------------------------
# Tables as written
# --------------------------------------------------------------------------------------------

def result_table(res: Any) -> dict[str, Any]:
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


def covered_item(res: Any) -> dict[str, Any]:
    """A covered check as an entry records it: the result and the snapshot of its inputs."""
    it: dict[str, Any] = {"stage": res.stage, "check": res.check, "status": res.status}
    if res.margin is not None and math.isfinite(res.margin):
        it["margin"] = float(res.margin)
    it["summary"] = res.summary
    it["inputs_sha256"] = res.inputs_sha256
    it["snapshot"] = snap_to_toml(res.snapshot or {})
    return it


def _render(header: dict[str, Any], results: list[dict[str, Any]], entries_text: str) -> str:
    head = tomli_w.dumps({"review": header} | ({"result": results} if results else {}))
    if not entries_text:
        return head
    return head.rstrip("\n") + "\n\n" + entries_text


def _header(rec: Record, ident: Mapping[str, str], computed_at: Any,
            results: list[dict[str, Any]], n: int, head: str,
            head_sig: tuple[str, str] | None) -> dict[str, Any]:
    h: dict[str, Any] = {"project": rec.project_path.name, "tool": TOOL,
                         "checklist": dict(ident)}
    if isinstance(computed_at, datetime):
        h["computed_at"] = computed_at
    h["results_sha256"] = results_seal(results)
    h["entries"] = n
    h["head_sha256"] = head
    if head_sig is None and rec.header.get("head_sha256") == head \
            and isinstance(rec.header.get("head_signature"), str):
        # The head did not move (results refreshed only): its signature still holds.
        head_sig = (str(rec.header["head_signature"]), str(rec.header.get("head_by", "")))
    if head_sig is not None:
        h["head_signature"], h["head_by"] = head_sig
    return h


def _write(rec: Record, *, results: list[dict[str, Any]], ident: Mapping[str, str],
           computed_at: Any, new_entry: dict[str, Any] | None = None,
           key: Path | None = None) -> Path:
    """Write the record: new header and results, the old history verbatim, maybe one entry."""
    entries_text = rec.entries_text
    new_raw = [e.raw for e in rec.entries]
    if new_entry is not None:
        block = tomli_w.dumps({"entry": [new_entry]})
        if entries_text and not entries_text.endswith("\n"):
            entries_text += "\n"
        entries_text = entries_text + ("\n" if entries_text else "") + block
        new_raw.append(new_entry)
    head = str(new_raw[-1].get("entry_sha256", "")) if new_raw else ""
    head_sig = None
    if new_entry is not None and key is not None:
        head_sig = (sign_head(rec.project_path.name, len(new_raw), head, key),
                    str(new_entry["by"]["login"]))
    header = _header(rec, ident, computed_at, results, len(new_raw), head, head_sig)
    text = _render(header, results, entries_text)
    # The history must come back exactly: every old entry, in order, then the new one.
    doc = tomllib.loads(text)
    back = doc.get("entry", [])
    if [canonical_json(e) for e in back] != [canonical_json(e) for e in new_raw] \
            or not split_history(text)[1].startswith(rec.entries_text):
        raise RecordError("the review record is not laid out as Latchbook writes it, so the "
                          "history cannot be kept byte for byte; nothing was written. Restore "
                          "it from version control", Where(str(rec.path)))
    return save_checked(rec.path, text, rec.sha256)


def _refresh(run: Any) -> dict[str, Any]:
    results = [result_table(r) for r in run.results]
    return {"results": results, "ident": run.checklist.identity(), "computed_at": utc_now()}


# --------------------------------------------------------------------------------------------
# The lock, the files, the rules
# --------------------------------------------------------------------------------------------

_IN_PROCESS = threading.RLock()


@contextlib.contextmanager
def writing(project_path: Path, what: str, wait: float = DEFAULT_WAIT,
            on_wait: OnWait = None) -> Iterator[ProjectLock]:
    """The project's lock (waiting up to ``wait`` s), plus a mutex for this process's threads.

    The file lock is re-entrant per process (the workbook holds it for its session and signs
    from a worker thread), so threads of one process are serialised here instead. When it had
    to wait, ``on_wait`` hears for whom, and then how long it waited.
    """
    with _IN_PROCESS:
        lock = ProjectLock(project_path, what=what, wait=wait, on_wait=on_wait)
        with lock:
            if lock.waited > 0.05 and on_wait is not None:
                on_wait(f"waited {lock.waited:.1f} s for the lock")
            yield lock


def fresh_run(project_path: Path) -> tuple[Any, dict[str, str]]:
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
    signers = checklist.signers_path()
    if signers is not None:
        files[str(signers)] = file_sha256(signers) or ""
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


RECOVER = ("Restore the record from version control (a copy that `latchbook verify` passes), "
           "or, if the signers or approvers were changed, put back the policy the entries were "
           "made under; `latchbook verify` lists every problem")


def verified_for_write(project_path: Path, checklist: Any = None, *,
                       entries_too: bool = True) -> Record:
    """The record, loaded and verified; refused when the history does not verify."""
    rec = load_record(project_path, checklist)
    trust = rec.trust
    if not trust.policy_known:
        raise RecordError("the project does not load, so the history cannot be verified and "
                          "nothing was added; fix the project first (latchbook check)",
                          Where(str(project_path)))
    if not trust.history_ok:
        first = trust.messages()[0] if trust.messages() else "it does not verify"
        where = f" at entry {trust.first_bad}" if trust.first_bad else ""
        what = "nothing was added" if entries_too else "nothing was written"
        raise RecordError(f"the history does not verify{where} ({first}); {what}. {RECOVER}",
                          Where(str(rec.path)))
    return rec


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


def _already(rec: Record, entry: Mapping[str, Any]) -> Entry | None:
    """The entry in force that ``entry`` would repeat (a retry), or None.

    Same kind, stage, checks, person, note, checklist and covered inputs and results, and it is
    still the one in force for every check it covers.
    """
    same = ("kind", "stage", "checks", "note", "inputs_sha256", "results_sha256", "checklist",
            "revokes")
    latest, _ = in_force(rec.entries, rec.trust)
    for e in reversed(rec.entries):
        if e.kind not in COVERING and (e.kind, e.stage, e.checks) != \
                (entry["kind"], entry["stage"], entry["checks"]):
            continue
        if not rec.trust.entry_ok(e) or e.login != entry["by"]["login"]:
            if e.kind not in COVERING:
                return None  # a later note on the same thing: a new one is not a retry
            continue
        if any(canonical_json(e.raw.get(k)) != canonical_json(entry.get(k)) for k in same):
            if e.kind not in COVERING:
                return None
            continue
        if e.kind in COVERING and any(latest[e.kind].get(k, (None,))[0] is not e
                                      for k in e.keys):
            continue
        e.existing = True
        return e
    return None


# --------------------------------------------------------------------------------------------
# Commands
# --------------------------------------------------------------------------------------------

def record_results(run: Any, project_path: str | Path, *, wait: float = DEFAULT_WAIT,
                   on_wait: OnWait = None) -> Path:
    """Store ``run``'s results in the record, keeping every history entry byte for byte.

    Refused (nothing written) when the history does not verify: rewriting the header would
    hide a cut. Returns the record's path.
    """
    project_path = Path(project_path)
    with writing(project_path, "record", wait, on_wait):
        rec = load_record(project_path, run.checklist)
        if rec.entries:
            rec = verified_for_write(project_path, run.checklist, entries_too=False)
        return _write(rec, **_refresh(run))


def sign(project_path: str | Path, *, stage: str, checks: Sequence[str] | None = None,
         meaning: str = "reviewed", note: str = "", unsaved: bool = False,
         ssh_key: str | Path | None = None, wait: float = DEFAULT_WAIT,
         on_wait: OnWait = None) -> Entry:
    """Sign a stage (or ``"*"``, the whole project) as reviewed or approved.

    The results are computed afresh from the file on disk and recorded with the entry. Refused
    while the project has unsaved edits, while a covered check fails (or errors, is blocked or
    incomplete) without a current waiver; ``approved`` is refused for someone not among the
    checklist's approvers, for a covered check without a current reviewed sign-off, and for
    one whose sign-off is the approver's own (unless the checklist says ``self_approval``).
    A retry of a sign-off already in force returns that entry (``existing``).
    """
    project_path = Path(project_path)
    if meaning not in ("reviewed", "approved"):
        raise ProjectError(f"meaning `{meaning}` is not known; use reviewed or approved")
    kind = "signoff" if meaning == "reviewed" else "approval"
    with writing(project_path, "sign", wait, on_wait):
        _refuse_unsaved(project_path, unsaved)
        run, files = fresh_run(project_path)
        rec = verified_for_write(project_path, run.checklist)
        chosen = _select(run, stage, checks, project_path)
        entry = _new_entry(rec, kind=kind, stage=stage, checks=_checks_field(stage, chosen),
                           items=[covered_item(r) for r in chosen], note=note,
                           ident=run.checklist.identity())
        again = _already(rec, entry)
        if again is not None:
            return again
        states = check_states(rec, run)
        where = Where(str(project_path))
        failing = [r for r in chosen if r.status in FAILING
                   and states[(r.stage, r.check)].waiver != "waived"]
        if failing:
            verb = {"fail": "fails", "error": "errors"}
            what = "; ".join(f"{r.stage}/{r.check} {verb.get(r.status, 'is ' + r.status)}" +
                             (" (a computation error cannot be waived: fix it)"
                              if r.status == "error" else "") for r in failing)
            raise RecordError(f"not signed: {what}. Fix the design, or waive the check with a "
                              "reason (latchbook waive), then sign", where)
        if kind == "approval":
            _approval_allowed(rec, run, chosen, states, where, entry)
        key = signing_key(run.checklist, ssh_key, project_path)
        entry = sign_entry(entry, run.checklist, key, project_path)
        _unchanged(files, project_path)
        _write(rec, new_entry=entry, key=key, **_refresh(run))
        return _entry_of(entry)


def _approval_allowed(rec: Record, run: Any, chosen: Sequence[Any], states: Mapping,
                      where: Where, entry: dict[str, Any]) -> None:
    me = current_person()
    cl = run.checklist
    if cl.approvers and me.login not in cl.approvers:
        raise RecordError(f"not approved: {me.login} is not an approver of checklist "
                          f"{cl.name} ({', '.join(cl.approvers)})", where)
    unreviewed = [f"{r.stage}/{r.check}" for r in chosen
                  if states[(r.stage, r.check)].signoff != "signed"]
    if unreviewed:
        raise RecordError("not approved: these have no current reviewed sign-off: "
                          + ", ".join(unreviewed[:8])
                          + (" …" if len(unreviewed) > 8 else ""), where)
    # The read-time rule, applied to the entry about to be written (one rule, two places).
    e = Entry.from_raw(entry, len(rec.entries) + 1)
    problems = [p for p in approval_problems(e, [*rec.entries, e], rec.trust.entries, cl)
                if p.startswith("self-approval")]
    if problems:
        raise RecordError(f"not approved: {me.login} signed these as reviewed and cannot also "
                          f"approve them ({problems[0]}). Someone else approves, or the "
                          "checklist says self_approval = true", where)


def waive(project_path: str | Path, *, stage: str, check: str, note: str,
          unsaved: bool = False, ssh_key: str | Path | None = None,
          wait: float = DEFAULT_WAIT, on_wait: OnWait = None) -> Entry:
    """Accept a failing or marginal check with a written reason (it stays "fail | waived").

    The reason must have substance (:func:`reason_problem`). The waiver binds to the inputs the
    check reads now: any change to them makes it stale.
    """
    project_path = Path(project_path)
    problem = reason_problem(note)
    if problem:
        raise RecordError(f"not waived: {problem}. Write why the result is acceptable "
                          "(e.g. the measured value, the test that covers it, who decided)",
                          Where(str(project_path)))
    with writing(project_path, "waive", wait, on_wait):
        _refuse_unsaved(project_path, unsaved)
        run, files = fresh_run(project_path)
        rec = verified_for_write(project_path, run.checklist)
        [res] = _select(run, stage, [check], project_path)
        entry = _new_entry(rec, kind="waiver", stage=stage, checks=[check],
                           items=[covered_item(res)], note=note, ident=run.checklist.identity())
        again = _already(rec, entry)
        if again is not None:
            return again
        if res.status not in WAIVABLE:
            why = ("a computation error cannot be waived: fix its input or report it"
                   if res.status == "error" else f"it is {res.status}; there is nothing to waive")
            raise RecordError(f"not waived: {stage}/{check}: {why}", Where(str(project_path)))
        key = signing_key(run.checklist, ssh_key, project_path)
        entry = sign_entry(entry, run.checklist, key, project_path)
        _unchanged(files, project_path)
        _write(rec, new_entry=entry, key=key, **_refresh(run))
        return _entry_of(entry)


def _append_plain(project_path: Path, *, kind: str, stage: str, checks: list[str], note: str,
                  revokes: int | None, ssh_key: str | Path | None, rec: Record) -> Entry:
    checklist = rec.checklist
    entry = _new_entry(rec, kind=kind, stage=stage, checks=checks, items=[], note=note,
                       ident=checklist.identity(), revokes=revokes)
    again = _already(rec, entry)
    if again is not None:
        return again
    key = signing_key(checklist, ssh_key, project_path)
    entry = sign_entry(entry, checklist, key, project_path)
    _write(rec, results=rec.results, ident=rec.header.get("checklist", checklist.identity()),
           computed_at=rec.header.get("computed_at"), new_entry=entry, key=key)
    return _entry_of(entry)


def revoke(project_path: str | Path, *, seq: int, note: str,
           ssh_key: str | Path | None = None, wait: float = DEFAULT_WAIT,
           on_wait: OnWait = None) -> Entry:
    """Withdraw an earlier sign-off, approval or waiver (by its seq), with a reason.

    The entry is judged before the note: one that does not exist, or cannot be revoked, is
    named with the list of entries that can be.
    """
    project_path = Path(project_path)
    with writing(project_path, "revoke", wait, on_wait):
        rec = verified_for_write(project_path)
        target = next((e for e in rec.entries if e.seq == seq), None)
        if target is None or target.kind not in COVERING:
            what = (f"there is no entry #{seq}" if target is None else
                    f"entry #{seq} is a {target.kind}; only sign-offs, approvals and waivers "
                    "can be revoked")
            raise RecordError(f"{what}. {revocable_text(rec.entries)}", Where(str(rec.path)))
        problem = reason_problem(note)
        if problem:
            raise RecordError(f"not revoked: {problem}. Say why entry #{seq} no longer holds",
                              Where(str(project_path)))
        earlier = next((e for e in rec.entries if e.kind == "revoke" and e.revokes == seq), None)
        if earlier is not None:
            if earlier.login == current_person().login and earlier.note == note.strip():
                earlier.existing = True
                return earlier
            raise RecordError(f"entry #{seq} is already revoked (by entry #{earlier.seq})",
                              Where(str(rec.path)))
        return _append_plain(project_path, kind="revoke", stage=target.stage,
                             checks=list(target.checks), note=note, revokes=seq,
                             ssh_key=ssh_key, rec=rec)


def revocable_text(entries: Sequence[Entry]) -> str:
    """The entries that can still be revoked, in words (for a refusal that names the choice)."""
    gone = {e.revokes for e in entries if e.kind == "revoke"}
    able = [e for e in entries if e.kind in COVERING and e.seq not in gone]
    if not entries:
        return "There is no review history yet: nothing to revoke"
    if not able:
        return f"None of the {len(entries)} entries can be revoked (none is a standing " \
            "sign-off, approval or waiver)"
    shown = "; ".join(e.title() for e in able[:8])
    more = f"; and {len(able) - 8} more" if len(able) > 8 else ""
    return f"Entries that can be revoked: {shown}{more}"


def add_note(project_path: str | Path, *, note: str, stage: str = "*",
             checks: Sequence[str] = (), ssh_key: str | Path | None = None,
             wait: float = DEFAULT_WAIT, on_wait: OnWait = None) -> Entry:
    """Add a note to the history (it signs nothing and changes no state)."""
    project_path = Path(project_path)
    if not note.strip():
        raise RecordError("a note needs some text", Where(str(project_path)))
    with writing(project_path, "note", wait, on_wait):
        rec = verified_for_write(project_path)
        return _append_plain(project_path, kind="note", stage=stage, checks=list(checks),
                             note=note, revokes=None, ssh_key=ssh_key, rec=rec)


__all__ = ["RECOVER", "add_note", "covered_item", "fresh_run", "record_results",
           "result_table", "revoke", "sign", "verified_for_write", "waive", "writing"]
