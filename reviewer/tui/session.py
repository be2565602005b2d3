"""One open project in the workbook: its text, the edits, the latest run, the lock and journal.

No Textual here: the screens read this state and ask it to change; the engine computes, the
store writes, the review module signs. Each state of the edit history is the whole project text
with the project it loads as, so undo and redo are exact and cheap.
"""

from __future__ import annotations

import importlib
import tomllib
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from types import ModuleType
from typing import Any

from reviewer import edits as edit_text
from reviewer import states, store
from reviewer.aids import Aid
from reviewer.checklist import Checklist, load_checklist
from reviewer.engine import Result, Run, evaluate
from reviewer.errors import LatchbookError, ProjectError, RecordError, Where
from reviewer.model import Project
from reviewer.project import load_project_text
from reviewer.schema import CATALOGUE
from reviewer.tolerance import Yield
from reviewer.tui import attention

Key = tuple[str, str]
NOT_SIGNED = "sign-off not available in this version"


@dataclass(frozen=True)
class State:
    """One step of the edit history: the file text, its project, and the edits that led here."""

    text: str
    project: Project
    edits: tuple[store.Edit, ...] = ()
    label: str = "as read from disk"


@dataclass
class StageCounts:
    """How a stage stands: result counts, and review counts (None: no record known).

    The two are kept apart: a waived failure counts as a ``fail`` result *and* a ``waived``
    review; it never leaves the result counts."""

    stage: str
    kind: str
    counts: dict[str, int] = field(default_factory=dict)
    waived: int | None = None
    stale: int | None = None
    unsigned: int | None = None
    unverified: int | None = None

    @property
    def state(self) -> str:
        """The worst result of the stage (reviewer.states.RESULTS order)."""
        for s in states.RESULTS:
            if self.counts.get(s):
                return s
        return "not-applicable"

    @property
    def attention(self) -> int:
        """Results that stop a build unless waived (fail, error, blocked, incomplete)."""
        return sum(n for s, n in self.counts.items() if s in states.FAILING)


def review_module() -> ModuleType | None:
    """:mod:`reviewer.review` when this version has it, else None (sign-off stays guarded)."""
    try:
        return importlib.import_module("reviewer.review")
    except ImportError:
        return None


def project_of_record(record: str | Path) -> Path:
    """The project a review record belongs to: its ``[review] project`` key, relative to the
    record. Raises a RecordError saying what is wrong (no file, no key, a record that is not
    the one the project's sign-offs are kept in)."""
    record = Path(record)
    where = Where(str(record))
    text, _ = store.read_with_hash(record)
    if text is None:
        raise RecordError("no such review record; check the path (records are "
                          "NAME.review.toml)", where)
    from reviewer.records.record import parse_record  # records load lazily (startup time)

    try:
        doc = parse_record(text, record)
    except tomllib.TOMLDecodeError as exc:
        raise RecordError(f"the review record is not valid TOML ({exc}); restore it from "
                          "version control", where) from None
    head = doc.get("review")
    name = head.get("project") if isinstance(head, dict) else None
    if not isinstance(name, str) or not name:
        raise RecordError('the record does not say whose it is: it needs [review] project = '
                          '"NAME.toml"', Where(str(record), "review", "project"))
    project = record.parent / name
    if not project.is_file():
        raise RecordError(f'the record belongs to "{name}", which is not there (looked for '
                          f"{project}); the project key is relative to the record",
                          Where(str(record), "review", "project"))
    mod = review_module()
    if mod is not None:
        kept = mod.record_path(project)
        if kept.resolve() != record.resolve():
            raise RecordError(f'the record names "{name}", whose sign-offs are kept in '
                              f"{kept.name}, not in {record.name}; open {kept.name} or the "
                              "project itself", Where(str(record), "review", "project"))
    return project


class Session:
    """The project the workbook has open and everything it knows about it.

    ``record``: the review record the session was opened from (the lead's view). The project
    is then read-only — no value, sign-off, waiver or answer changes — except that an approver
    may approve, which writes only the review record (and not even that with ``read_only``).
    """

    def __init__(self, path: str | Path, *, read_only: bool = False, lock: bool = True,
                 record: str | Path | None = None) -> None:
        self.path = Path(path)
        self.writes_nothing = read_only  # --read-only: no file at all is written
        self.lead_view = record is not None
        # The lead's view may approve (the record only); --read-only as well writes nothing.
        self.approvals_open = self.lead_view and not read_only
        self.read_only_reason = "opened with --read-only" if read_only else ""
        if record is not None:
            self.read_only_reason = f"the lead's view of {Path(record).name}" + (
                "; --read-only: nothing is written" if read_only else "")
        read_only = read_only or self.lead_view
        self.read_only = read_only
        self.lock: store.ProjectLock | None = None
        text, sha = store.read_with_hash(self.path)
        if text is None:
            raise ProjectError("no such file; check the path (projects are NAME.toml)")
        self.disk_text: str = text
        self.disk_sha: str | None = sha
        project = load_project_text(text, self.path)
        self.checklist: Checklist = load_checklist(project.checklist, self.path.parent)
        self.states: list[State] = [State(text, project)]
        self.index = 0
        self.generation = 0  # bumps on every change of state: late runs are dropped
        self.results: dict[Key, Result] = {}
        self._run: Run | None = None  # the Run of self.results, rebuilt only when they change
        self._by_key: dict[Key, Result] = {}
        self._keys: tuple[int, list[Key]] | None = None
        self.computed = False  # True once every check of the current state has a result
        self.changed: set[Key] = set()
        self._before: dict[Key, Result] = {}
        self.record: Any = None
        self.check_states: dict[Key, Any] = {}
        self.review_error = ""
        # Tolerance analysis and design aids, each kept with the inputs hash of the result it
        # was computed from: an edit that changes what a check read makes them disappear.
        self.yields: dict[Key, tuple[str, Yield]] = {}
        self.yield_progress: tuple[int, int] | None = None
        self.aids: dict[tuple[str, str, str, str], Aid | None] = {}
        self.aid_pending: set[tuple[str, str, str, str]] = set()
        self.aid_choice: dict[Key, str] = {}
        if lock and not read_only:
            self._take_lock()
        self.refresh_review()

    # -- lock ---------------------------------------------------------------------------
    def _take_lock(self) -> None:
        try:
            self.lock = store.lock_project(self.path)
        except store.LockedError as exc:
            self.read_only = True
            self.read_only_reason = exc.bare
        except LatchbookError as exc:
            self.read_only = True
            self.read_only_reason = f"cannot lock the project ({exc.bare})"

    def close(self) -> None:
        """Give up the lock (the journal stays, if edits are unsaved)."""
        if self.lock is not None:
            self.lock.release()
            self.lock = None

    # -- state --------------------------------------------------------------------------
    @property
    def state(self) -> State:
        """The current step of the history."""
        return self.states[self.index]

    @property
    def project(self) -> Project:
        """The project as currently edited."""
        return self.state.project

    @property
    def dirty(self) -> bool:
        """True when the edited text differs from what is on disk."""
        return self.state.text != self.disk_text

    @property
    def can_undo(self) -> bool:
        """True when there is an edit to step back over."""
        return self.index > 0

    @property
    def can_redo(self) -> bool:
        """True when an undone edit can be applied again."""
        return self.index < len(self.states) - 1

    def guard_write(self, what: str) -> None:
        """Raise when this session may not change anything."""
        if self.read_only:
            raise ProjectError(f"read-only ({self.read_only_reason}): cannot {what}")

    def current_raw(self, path: str) -> Any:
        """The value at ``path`` in the resolved project (a variant shows its base's value)."""
        node: Any = self.project.raw
        for k in path.split("."):
            if not isinstance(node, dict) or k not in node:
                return None
            node = node[k]
        return node

    def propose(self, path: str, typed: str) -> State:
        """Validate an edit without applying it; raises LatchbookError saying what to type."""
        self.guard_write("edit values")
        text, project = edit_text.apply_edit(self.state.text, path, typed, self.path)
        label = f"{path} = {typed.strip()}"
        return State(text, project, (*self.state.edits, store.Edit(path, typed.strip())), label)

    def push(self, state: State, *, journal: bool = True) -> None:
        """Make ``state`` current, dropping the redo tail, and journal the pending edits
        (``journal=False``: the caller writes the journal itself, right after)."""
        self.changed = set()
        del self.states[self.index + 1:]
        self.states.append(state)
        self.index += 1
        self.generation += 1
        self._invalidate()
        if journal:
            self.write_journal()

    def undo(self) -> State | None:
        """Step back one edit (the step left is returned), or None when there is none."""
        if not self.can_undo:
            return None
        undone = self.state
        self.changed = set()
        self.index -= 1
        self.generation += 1
        self._invalidate()
        self.write_journal()
        return undone

    def redo(self) -> State | None:
        """Apply the next undone edit again, or None."""
        if not self.can_redo:
            return None
        self.changed = set()
        self.index += 1
        self.generation += 1
        self._invalidate()
        self.write_journal()
        return self.state

    # -- computing ----------------------------------------------------------------------
    def keys(self) -> list[Key]:
        """Every (stage, check) of the current project, in the order the engine reports them."""
        if self._keys is None or self._keys[0] != id(self.project):
            self._keys = (id(self.project), [(sid, cid) for sid, st in self.project.stages.items()
                                             for cid, kinds in CATALOGUE if st.kind in kinds])
        return list(self._keys[1])

    def _invalidate(self) -> None:
        self._run = None

    @property
    def run(self) -> Run:
        """The results known so far, in report order, as the engine's Run (built once per
        change of results or state, not per lookup)."""
        if self._run is None or self._run.project is not self.project:
            rows = [self.results[k] for k in self.keys() if k in self.results]
            self._run = Run(self.project, self.checklist, rows)
            self._by_key = self._run.by_key()
        return self._run

    def dependents(self, paths: list[str] | None) -> list[Key]:
        """The checks an edit of ``paths`` can change (None: all of them).

        A check depends on a path when it read it (its snapshot, the same record the inputs
        hash covers) or a value inside it; a check that read nothing of its stage yet (an error,
        or no result) is recomputed with its stage, to be safe.
        """
        keys = self.keys()
        if paths is None:
            return keys
        out = []
        for key in keys:
            r = self.results.get(key)
            read = [q.split("#")[0] for q in (r.snapshot.get("inputs", {}) if r else {})]
            if r is None or not read:
                if any(p.startswith(f"stages.{key[0]}.") for p in paths) or r is None:
                    out.append(key)
                continue
            if any(q == p or q.startswith(p + ".") or p.startswith(q + ".")
                   for p in paths for q in read):
                out.append(key)
        return out

    def plan(self, paths: list[str] | None) -> tuple[int, Project, list[list[Key]]]:
        """What a worker should compute: the generation, the project and the keys per stage."""
        groups: dict[str, list[Key]] = {}
        for key in self.dependents(paths):
            groups.setdefault(key[0], []).append(key)
        self._before = dict(self.results)
        self.computed = not groups
        return self.generation, self.project, list(groups.values())

    def compute(self, project: Project, keys: list[Key],
                on_result: Callable[[Result], None] | None = None) -> list[Result]:
        """Run the engine on some checks of ``project`` (safe in a worker thread);
        ``on_result`` sees each result as it comes (:func:`reviewer.engine.evaluate`)."""
        return evaluate(project, self.checklist, only=keys, on_result=on_result).results

    def accept(self, gen: int, results: list[Result], *, done: bool) -> set[Key] | None:
        """Take results unless the project changed meanwhile; return the rows that changed.

        A row is changed when what the check read (its inputs hash) or what it found changed.
        """
        if gen != self.generation:
            return None
        changed = set()
        for r in results:
            key = (r.stage, r.check)
            o = self._before.get(key)
            if o is not None and (o.inputs_sha256, o.status, o.summary, o.margin) != (
                    r.inputs_sha256, r.status, r.summary, r.margin):
                changed.add(key)
            self.results[key] = r
        self.changed |= changed
        self._invalidate()
        if done:
            valid = set(self.keys())
            for key in [k for k in self.results if k not in valid]:
                del self.results[key]
            self._invalidate()
            self.computed = True
            self.refresh_review()
        return changed

    def compute_all(self) -> None:
        """Compute everything now, in this thread (for scripts and tests)."""
        gen, project, groups = self.plan(None)
        self.accept(gen, self.compute(project, [k for g in groups for k in g]), done=True)

    def edited_paths(self, before: int, after: int) -> list[str] | None:
        """The value paths that differ between two steps of the history (None: unknown)."""
        a, b = self.states[before].edits, self.states[after].edits
        n = min(len(a), len(b))
        if a[:n] != b[:n]:
            return None
        return sorted({e.path for e in (a[n:] or b[n:])})

    def result(self, stage: str, check: str) -> Result | None:
        """The latest result of one check."""
        self.run  # noqa: B018 - builds the index when the results changed
        return self._by_key.get((stage, check))

    def stage_counts(self) -> list[StageCounts]:
        """Per stage, in file order: result counts and the review module's sign-off counts."""
        rows: dict[str, StageCounts] = {
            sid: StageCounts(sid, st.kind) for sid, st in self.project.stages.items()}
        for r in self.run.results:
            row = rows.get(r.stage)
            if row is not None:
                row.counts[r.status] = row.counts.get(r.status, 0) + 1
        if self.record is not None and self.computed:
            for row in rows.values():
                row.waived = row.stale = row.unsigned = row.unverified = 0
            for r in self.run.results:
                word = self.review(r.stage, r.check)
                row = rows.get(r.stage)
                if row is None:
                    continue
                row.waived += word == "waived"  # type: ignore[operator]
                row.stale += word == "stale"  # type: ignore[operator]
                row.unsigned += word == "unsigned"  # type: ignore[operator]
                row.unverified += word == "unverified"  # type: ignore[operator]
        return list(rows.values())

    def overall(self) -> tuple[str, str]:
        """The project's result and review state, as two words: the worst result of any
        check, and the worst review state among the checks with that result ("" without a
        record). A waived marginal check reads ``marginal | waived``, never ``pass``."""
        rank = {w: i for i, w in enumerate(states.RESULTS)}
        results = self.run.results
        if not results:
            return "", ""
        worst = min((r.status for r in results), key=lambda w: rank.get(w, -1))
        order = {w: i for i, w in enumerate(states.REVIEWS)}
        words = [self.review(r.stage, r.check) for r in results if r.status == worst]
        words = [w for w in words if w]
        review = min(words, key=lambda w: order.get(w, -1)) if words else ""
        return worst, review

    # -- tolerance analysis and design aids ------------------------------------------------
    def store_yield(self, result: Result, y: Yield | None) -> None:
        """Keep a Monte Carlo outcome with the inputs hash of the result it sampled."""
        key = (result.stage, result.check)
        if y is None:
            self.yields.pop(key, None)
        else:
            self.yields[key] = (result.inputs_sha256, y)

    def yield_of(self, stage: str, check: str) -> Yield | None:
        """The Monte Carlo outcome of a check, if it was run on the check's current inputs."""
        got = self.yields.get((stage, check))
        r = self.result(stage, check)
        if got is None or r is None or got[0] != r.inputs_sha256:
            return None
        return got[1]

    @staticmethod
    def aid_key(result: Result, name: str) -> tuple[str, str, str, str]:
        """The key a design aid is kept under: the check, its inputs hash and the input."""
        return (result.stage, result.check, result.inputs_sha256, name)

    # -- review record (reviewer/review.py) -----------------------------------------------
    @property
    def review_available(self) -> bool:
        """True when this version can sign, waive and revoke."""
        return review_module() is not None

    def refresh_review(self) -> None:
        """Re-read the review record and the sign-off state of every check."""
        mod = review_module()
        if mod is None:
            self.record, self.check_states, self.review_error = None, {}, NOT_SIGNED
            return
        try:
            self.record = mod.load_record(self.path, self._disk_checklist())
            self.check_states = dict(mod.check_states(self.record, self.run)) \
                if self.computed else {}
            self.review_error = ""
        except LatchbookError as exc:
            self.record, self.check_states = None, {}
            self.review_error = str(exc)

    def _disk_checklist(self) -> Checklist | None:
        """The checklist of the project as on disk, for verifying the record: the session's
        own while the file is the one it read or last wrote (so the record need not load the
        whole project again: 80 ms at 50 stages), else None (the record loads it)."""
        try:
            _, sha = store.read_with_hash(self.path)
        except LatchbookError:
            return None
        return self.checklist if sha is not None and sha == self.disk_sha else None

    def review(self, stage: str, check: str) -> str:
        """The review word of one check (reviewer.states.review_word); "" with no record
        state, and for a not-applicable check nobody signed (nothing to decide)."""
        st = self.check_states.get((stage, check))
        if st is None:
            return ""
        word = states.review_word(st)
        if word == "unsigned" and st.status == "not-applicable":
            return ""
        return word

    def covering(self, stage: str, check: str) -> list[tuple[str, Any, str]]:
        """The entries in force on one check: ``(role, entry, state)`` for the sign-off, the
        approval and the waiver, each with its state word (signed, stale, approved…)."""
        st = self.check_states.get((stage, check))
        if st is None:
            return []
        by_seq = {e.seq: e for e in self.entries()}
        out = []
        for role, seq, word in (("sign-off", st.signoff_seq, st.signoff),
                                ("approval", st.approval_seq, st.approval),
                                ("waiver", st.waiver_seq, st.waiver)):
            if seq is not None and seq in by_seq:
                out.append((role, by_seq[seq], word))
        return out

    def sign_changed(self, stage: str, check: str) -> str:
        """What changed since the check was signed, in words ("" when nothing)."""
        st = self.check_states.get((stage, check))
        changes = list(getattr(st, "changed", []) or []) if st is not None else []
        return "; ".join(c.text() if hasattr(c, "text") else str(c) for c in changes)

    # -- approvals: who may approve (the checklist's rule; reviewer.review enforces it) --------
    @property
    def approvers(self) -> list[str]:
        """The checklist's approvers (empty: the checklist names none, anyone may approve)."""
        return list(self.checklist.approvers)

    def approvers_text(self) -> str:
        """Who may approve, in words."""
        if not self.approvers:
            return f"checklist {self.checklist.name} names no approvers: anyone may approve"
        return f"approvers ({self.checklist.name}): " + ", ".join(self.approvers)

    @staticmethod
    def login() -> str:
        """The login sign-offs are made as (from the password database)."""
        return store.current_person().login

    def approval_problem(self) -> str:
        """Why this user may not approve ("" when the checklist allows it).

        Only a friendly early word: reviewer.review.sign decides, and refuses on its own.
        """
        if not self.review_available:
            return NOT_SIGNED
        if self.read_only and not self.approvals_open:
            return f"read-only ({self.read_only_reason})"
        who = self.login()
        if self.approvers and who not in self.approvers:
            return (f"{who} is not an approver of checklist {self.checklist.name}; only "
                    + ", ".join(self.approvers) + " may approve")
        return ""

    # -- where values come from (variants) --------------------------------------------------
    @property
    def has_chain(self) -> bool:
        """True when the project is a variant: its values come from more than one file."""
        return len(self.project.chain) > 1

    def origin_of(self, path: str) -> str:
        """The name of the file the resolved value at ``path`` came from ("" when the project
        has no variant chain, or no file gives the value: a default or an assumption)."""
        if not self.has_chain or "#none" in path or "#assumed" in path:
            return ""
        bare = path.split("#")[0]
        got = self.project.origin.get(bare)
        head, _, last = bare.rpartition(".")
        if got is None and last in ("min", "max", "nom"):  # one end of a range { min, max }
            got = self.project.origin.get(head)
        return Path(got).name if got else ""

    def edit_goes_where(self, path: str) -> str:
        """What an edit of ``path`` does to the files, in words (variants only)."""
        if not self.has_chain:
            return ""
        here = self.path.name
        src = self.origin_of(path)
        if not src:
            return f"no file gives this value; the edit adds it to {here}"
        if src == here:
            return f"from {here} (this file); the edit changes it there"
        return (f"← {src}: the edit goes into {here} as an override; {src} is not changed "
                "(the other variants keep its value)")

    # -- the attention filter -------------------------------------------------------------
    def check_matches(self, key: str, stage: str, check: str) -> bool:
        """Whether one check passes filter ``key`` (see reviewer.tui.attention)."""
        r = self.result(stage, check)
        return attention.matches(key, r.status if r else "", self.review(stage, check))

    def filtered_checks(self, key: str, stage: str) -> list[str]:
        """The checks of ``stage`` that pass filter ``key``, in report order."""
        return [c for sid, c in self.keys() if sid == stage and self.check_matches(key, sid, c)]

    def note_problem(self, note: str) -> str | None:
        """Why a waiver or revocation reason would be refused (the review module's rule)."""
        mod = review_module()
        fn = getattr(mod, "reason_problem", None)
        if fn is not None:
            return fn(note)
        return None if note.strip() else "a reason is required"

    def _review(self, what: str, *, approving: bool = False) -> ModuleType:
        if not (approving and self.approvals_open):
            self.guard_write(what)
        mod = review_module()
        if mod is None:
            raise ProjectError(NOT_SIGNED)
        if self.dirty:
            raise ProjectError(f"there are unsaved edits: save them (ctrl+s) or undo them before "
                               f"you {what}, so that what is signed is what is on disk")
        return mod

    def sign(self, *, stage: str, checks: list[str] | None, meaning: str, note: str) -> Any:
        """Sign a stage (or some of its checks) through the review module."""
        mod = self._review("sign", approving=meaning == "approved")
        entry = mod.sign(self.path, stage=stage, checks=checks, meaning=meaning, note=note,
                         unsaved=self.dirty)
        self.refresh_review()
        return entry

    def waive(self, *, stage: str, check: str, note: str) -> Any:
        """Waive one failing check; the justification is required."""
        problem = self.note_problem(note)
        if problem:
            raise ProjectError(f"not waived: {problem}")
        mod = self._review("waive a check")
        entry = mod.waive(self.path, stage=stage, check=check, note=note, unsaved=self.dirty)
        self.refresh_review()
        return entry

    def revoke(self, *, seq: int, note: str) -> Any:
        """Revoke an earlier entry of the history; the reason is required."""
        problem = self.note_problem(note)
        if problem:
            raise ProjectError(f"not revoked: {problem}")
        mod = self._review("revoke a sign-off")
        entry = mod.revoke(self.path, seq=seq, note=note)
        self.refresh_review()
        return entry

    # -- manual questions: answers are notes in the history ---------------------------------
    def manual_questions(self, stage: str) -> list[dict[str, str]]:
        """The checklist's manual questions for the kind of ``stage``."""
        st = self.project.stages.get(stage)
        if st is None:
            return []
        return self.checklist.manual_for(st.kind)

    def manual_answers(self, stage: str) -> dict[str, tuple[str, str, str]]:
        """The latest answer to each manual question of ``stage``: id → (answer, note, who)."""
        out: dict[str, tuple[str, str, str]] = {}
        for e in self.entries():
            if getattr(e, "kind", "") != "note" or getattr(e, "stage", "") != stage:
                continue
            for c in getattr(e, "checks", []):
                if c.startswith("manual:"):
                    qid = c[len("manual:"):]
                    text = getattr(e, "note", "")
                    head, _, rest = text.partition(" — ")
                    answer = head.rsplit(": ", 1)[-1]
                    who = e.who() if hasattr(e, "who") else ""
                    out[qid] = (answer, rest, who)
        return out

    def answer_manual(self, *, stage: str, qid: str, answer: str, note: str) -> Any:
        """Record a manual answer (yes / no / not applicable) as a note of the history."""
        if answer not in ("yes", "no", "not applicable"):
            raise ProjectError("answer yes, no or not applicable")
        self.guard_write("answer a question")
        mod = review_module()
        fn = getattr(mod, "add_note", None)
        if fn is None:
            raise ProjectError(NOT_SIGNED)
        text = f"manual {qid}: {answer}" + (f" — {note.strip()}" if note.strip() else "")
        entry = fn(self.path, note=text, stage=stage, checks=[f"manual:{qid}"])
        self.refresh_review()
        return entry

    def verify(self) -> Any:
        """Verify the record (chain, results seal, SSH signatures, staleness): the review
        module's report. Slow (it recomputes and may run ssh-keygen): call it in a worker."""
        mod = review_module()
        if mod is None:
            raise ProjectError(NOT_SIGNED)
        return mod.verify(self.path)

    def entries(self) -> list[Any]:
        """The review record's history entries (empty when unknown)."""
        return list(getattr(self.record, "entries", []) or [])

    # -- saving and the journal -----------------------------------------------------------
    def save(self) -> Path:
        """Write the edited text, atomically, only if nobody changed the file since it was read."""
        self.guard_write("save")
        written = store.save_checked(self.path, self.state.text, self.disk_sha)
        self.disk_text = self.state.text
        self.disk_sha = store.file_sha256(written)
        store.clear_journal(self.path)
        return written

    def write_journal(self) -> None:
        """Keep the pending edits beside the project (cleared when there are none)."""
        if self.read_only:
            return
        pending = self.state.edits if self.dirty else ()
        store.write_journal(self.path, pending, base_sha256=self.disk_sha or "")

    def pending(self) -> store.Journal | None:
        """Unsaved edits an earlier session left, or None."""
        if self.read_only:
            return None
        return store.pending_journal(self.path)

    def recover(self, journal: store.Journal) -> list[str]:
        """Apply the journal's edits in order; return the messages of edits that no longer apply."""
        problems = []
        for e in journal.edits:
            try:
                self.push(self.propose(e.path, e.text))
            except LatchbookError as exc:
                problems.append(f"{e.path} = {e.text}: {exc.bare}")
        return problems

    def discard_journal(self) -> None:
        """Forget the unsaved edits of an earlier session."""
        store.clear_journal(self.path)

    def hangup_callback(self) -> Callable[[], None]:
        """What to do on SIGHUP/SIGTERM: write the journal (quick, never raises past store)."""
        return self.write_journal
