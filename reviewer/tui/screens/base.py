"""What every workbook screen shares: the session, the edit / undo / redo / save flow, the
sign-off and approval dialogs, the attention filter, and the boundary where a user's mistake
becomes a message, not a traceback.

Screens reach the app only through :class:`reviewer.tui.host.Host` (they never import it).
Every key a screen has is in its key bar; a key whose action does not apply now is dimmed
there (:meth:`WorkbookScreen.applies_now`) and, pressed anyway, says why.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any, cast

from rich.text import Text
from textual.binding import Binding
from textual.screen import Screen
from textual.widgets import Static

from reviewer import states
from reviewer.edits import shown_text
from reviewer.errors import LatchbookError
from reviewer.fmt import DIM_UNIT
from reviewer.model import Value
from reviewer.states import WAIVABLE
from reviewer.tui import attention, present
from reviewer.tui.dialogs.edit_value import EditValueDialog
from reviewer.tui.dialogs.pick_value import PickValueDialog
from reviewer.tui.dialogs.revoke import RevokeDialog
from reviewer.tui.dialogs.sign import SignDialog
from reviewer.tui.host import Host
from reviewer.tui.messages import AnalysisChanged, ResultsChanged
from reviewer.tui.session import Session, State
from reviewer.units import DIMS

BACK = Binding("escape", "back", "Back")

HINT = ('Same grammar as the file: 47 kohm ±5%, 4k7, 230 V +10% -15%, '
        '{ min = "10 kohm", max = "110 kohm" }')


#: What the signer declares, by meaning (a waiver's words follow the result it covers).
DECLARATION = {"reviewed": "I reviewed these results against the checklist.",
               "approved": "I approve this stage's review."}
WAIVER_WORDS = {
    "fail": "I accept this failure, for the reason given.",
    "marginal": "I accept this marginal result (it meets the limit, with less than the "
                "checklist's margin to spare), for the reason given.",
}


def waiver_words(result: str) -> str:
    """What a waiver of a check with ``result`` declares."""
    return WAIVER_WORDS.get(result, f"I accept this {states.result_word(result)} result, "
                                    "for the reason given.")


class WorkbookScreen(Screen[None]):
    """Base of the workbook's screens."""

    BINDINGS = [
        Binding("e", "edit", "Edit"),
        Binding("ctrl+z", "undo", "Undo"),
        Binding("ctrl+y", "redo", "Redo"),
        Binding("ctrl+s", "save", "Save"),
    ]

    @property
    def host(self) -> Host:
        """The app, as far as a screen may use it."""
        return cast(Host, self.app)

    @property
    def session(self) -> Session:
        """The open project."""
        return self.host.session

    # -- refresh ------------------------------------------------------------------------
    def refresh_view(self) -> None:
        """Show the session's current state (each screen fills this in)."""

    def set_static(self, selector: str, content: Text | str) -> None:
        """Show ``content`` in the Static ``selector``, only if it differs from what it shows:
        an update lays the whole screen out again (a Static is as tall as its text)."""
        shown: dict[str, Text | str] = self.__dict__.setdefault("_static_shown", {})
        if selector in shown and shown[selector] == content:
            return
        shown[selector] = content
        self.query_one(selector, Static).update(content)

    def refresh_all(self) -> None:
        """Show the current state, and the footer keys that apply to it."""
        self.refresh_view()
        self.refresh_bindings()

    def on_screen_resume(self) -> None:
        self.refresh_all()

    def on_results_changed(self, event: ResultsChanged) -> None:
        self.refresh_all()

    def on_analysis_changed(self, event: AnalysisChanged) -> None:
        self.refresh_view()

    # -- which keys apply ---------------------------------------------------------------
    def applies_now(self, action: str) -> bool:
        """Whether ``action`` applies in the current state (else its key is dimmed)."""
        s = self.session
        if action == "edit":
            return not s.read_only
        if action == "undo":
            return not s.read_only and s.can_undo
        if action == "redo":
            return not s.read_only and s.can_redo
        if action == "save":
            return not s.read_only and s.dirty
        if action in ("sign", "sign_check", "waive", "revoke"):
            return not s.read_only and s.review_available
        if action == "approve":
            return not s.approval_problem()
        return True

    def action_help(self) -> None:
        self.host.show_help()

    def action_history(self) -> None:
        """The review record's history (the history screen narrows it to where you are)."""
        self.host.open_history(*self.history_scope())

    def history_scope(self) -> tuple[str | None, str | None]:
        """The stage and check the history opens filtered to (None: everything)."""
        return None, None

    # -- the attention filter -----------------------------------------------------------
    @property
    def filter_key(self) -> str:
        """The filter in force (shared by the overview and every stage's checklist)."""
        return self.host.filter_key

    def filter_label(self) -> str:
        """The banner's word for the filter ("" when every check shows)."""
        return "" if self.filter_key == "all" else attention.BY_KEY[self.filter_key].label

    def action_cycle_filter(self) -> None:
        f = attention.BY_KEY[self.host.cycle_filter()]
        self.refresh_all()
        self.notify(f"filter: {f.label} — {f.rule}", markup=False)

    def attempt(self, fn: Callable[[], Any]) -> Any:
        """Run a user action; a LatchbookError becomes a notification (other errors propagate)."""
        try:
            return fn()
        except LatchbookError as exc:
            self.notify(str(exc),
                        title="not done", severity="error", timeout=8, markup=False)
            return None

    # -- editing ------------------------------------------------------------------------
    def edit_candidates(self) -> tuple[str, list[tuple[str, str, bool]]]:
        """The dialog title and the values offered for editing (each screen narrows it)."""
        return "Change a value", self._values_of(None, [])

    def _values_of(self, stage_id: str | None, read: list[str]) -> list[tuple[str, str, bool]]:
        p = self.session.project
        paths: list[str] = []
        for q in read:
            if "#none" not in q:
                paths.append(q.split("#")[0])
        stage_ids = [stage_id] if stage_id else list(p.stages)
        for sid in stage_ids:
            st = p.stages[sid]
            for key, v in st.params.items():
                if isinstance(v, Value):
                    paths.append(f"stages.{sid}.{key}")
                elif isinstance(v, dict):
                    paths += [f"stages.{sid}.{key}.{k}" for k, x in v.items()
                              if isinstance(x, Value)]
            refs = [v for k, v in st.params.items() if isinstance(v, (str, list))
                    and k in ("ujt", "put", "scr", "triac")]
            for ref in [r for x in refs for r in (x if isinstance(x, list) else [x])]:
                part = p.parts.get(ref)
                if part is not None:
                    paths += [f"parts.{ref}.{k}" for k, v in part.params.items()
                              if isinstance(v, Value)]
        paths += [f"supply.{k}" for k, v in p.supply.items() if isinstance(v, Value)]
        paths += [f"conditions.{k}" for k, v in p.conditions.items() if isinstance(v, Value)]
        out, seen = [], set()
        read_set = {q.split("#")[0] for q in read}
        for path in paths:
            if path in seen:
                continue
            seen.add(path)
            raw = self.session.current_raw(path)
            out.append((path, "(not given)" if raw is None else shown_text(raw),
                        path in read_set))
        return out

    def action_edit(self) -> None:
        if self.session.read_only:
            self.notify(f"read-only ({self.session.read_only_reason}): nothing can be changed",
                        severity="warning", markup=False)
            return
        title, candidates = self.edit_candidates()
        if not candidates:
            self.notify("nothing to edit here", markup=False)
            return
        self.app.push_screen(PickValueDialog(title, candidates), self._picked)

    def _picked(self, path: str | None) -> None:
        if path is None:
            return
        self.edit_path(path)

    def edit_path(self, path: str) -> None:
        """Open the edit dialog for one value."""
        raw = self.session.current_raw(path)
        current = "" if raw is None else shown_text(raw)
        value = self.session.project.lookup(path)
        hint = HINT
        if isinstance(value, Value) and value.dim in DIMS:
            hint = f"{DIMS[value.dim][1]} ({DIM_UNIT.get(value.dim, '')}), e.g. " \
                   f"{DIMS[value.dim][2]}.  {HINT}"
        self.app.push_screen(EditValueDialog(path, current, hint, self.session.propose,
                                             origin=self.session.edit_goes_where(path)),
                             self._edited)

    def _edited(self, state: State | None) -> None:
        if state is None:
            return
        paths = [state.edits[-1].path] if state.edits else None
        before = set(self.session.project.warnings)
        # The journal (a synced file write) goes after the repaint: the table first.
        self.session.push(state, journal=False)
        self.app.call_after_refresh(self.session.write_journal)
        self.host.recompute(paths)
        # No toast: the banner counts the unsaved edits and Δ marks what the edit changed
        # (a toast would cover the banner at 80 columns and cost a repaint of its own).
        if set(self.session.project.warnings) - before:
            self.host.notify_warnings()
        self.refresh_all()

    def action_undo(self) -> None:
        if self.session.read_only:
            self.notify(f"read-only ({self.session.read_only_reason}): nothing to undo",
                        markup=False)
            return
        before = self.session.index
        undone = self.session.undo()
        if undone is None:
            self.notify("nothing to undo", markup=False)
            return
        self.host.recompute(self.session.edited_paths(before, self.session.index))
        self.notify(f"undone: {undone.label}", markup=False)
        self.refresh_all()

    def action_redo(self) -> None:
        if self.session.read_only:
            self.notify(f"read-only ({self.session.read_only_reason}): nothing to redo",
                        markup=False)
            return
        before = self.session.index
        redone = self.session.redo()
        if redone is None:
            self.notify("nothing to redo", markup=False)
            return
        self.host.recompute(self.session.edited_paths(before, self.session.index))
        self.notify(f"redone: {redone.label}", markup=False)
        self.refresh_all()

    def action_save(self) -> None:
        if not self.session.dirty:
            self.notify("nothing to save", markup=False)
            return
        written = self.attempt(self.session.save)
        if written is not None:
            self.notify(f"saved {written.name}", markup=False)
            self.refresh_all()

    # -- signing ------------------------------------------------------------------------
    def refusal(self, meaning: str = "reviewed") -> str:
        """Why signing with ``meaning`` is refused right now ("" when it is allowed).

        An approval is refused early, naming the approvers, when this user is not one of
        them; reviewer.review.sign stays the authority and checks again.
        """
        s = self.session
        if meaning == "approved":
            problem = s.approval_problem()
            if problem:
                return problem
        elif s.read_only:
            return f"read-only ({s.read_only_reason})"
        if not s.review_available:
            return "sign-off not available in this version"
        if s.review_error and s.record is None:
            return f"the review record cannot be read: {s.review_error}"
        if s.dirty:
            return "there are unsaved edits: save them (ctrl+s) or undo them first"
        if not s.computed:
            return "the checks are still being computed"
        return ""

    def what_is_signed(self, stage: str, checks: list[str] | None, meaning: str) -> Text:
        """The list a signer sees: each check, its result and its inputs hash, and the meaning."""
        out = Text()
        rows = [r for r in self.session.run.results if r.stage == stage
                and (checks is None or r.check in checks)]
        out.append(f"stage {stage}: {len(rows)} check(s)\n", style="bold")
        for r in rows:
            out.append(f"  {r.check:<24} ")
            out.append_text(present.status_text(r.status))
            out.append(f"  inputs {present.short_hash(r.inputs_sha256)}\n", style="dim")
        if meaning == "waived":
            if rows and rows[0].status in WAIVABLE:  # else the refusal below says why not
                out.append(waiver_words(rows[0].status))
        else:
            out.append(DECLARATION.get(meaning, meaning))
        if meaning == "approved":
            out.append(f"\n{self.session.approvers_text()}", style="bold")
        out.append(f"\nsigned as {self._login()}; the record is tamper-evident, not "
                   "tamper-proof", style="dim")
        return out

    def _login(self) -> str:
        try:
            from reviewer.store import current_person

            return current_person().login
        except (ImportError, KeyError):
            return "?"

    def sign_stage(self, stage: str, checks: list[str] | None, meaning: str = "reviewed") -> None:
        """Ask, then sign ``stage`` (or some of its checks)."""
        what = f"stage {stage}" if checks is None else ", ".join(checks)
        title = f"Approve {what}" if meaning == "approved" else f"Sign {what} as {meaning}"

        def done(note: str | None) -> None:
            if note is None:
                return
            self.background(f"signing {stage}", lambda: self.session.sign(
                stage=stage, checks=checks, meaning=meaning, note=note),
                lambda e: f"signed {stage} as {meaning} (entry #{getattr(e, 'seq', '?')})")

        self.app.push_screen(SignDialog(title, self.what_is_signed(stage, checks, meaning),
                                        meaning=meaning, refusal=self.refusal(meaning)), done)

    def waive_check(self, stage: str, check: str) -> None:
        """Ask for the justification, then waive a failing check."""
        r = self.session.result(stage, check)
        refusal = self.refusal()
        if not refusal and r is not None and r.status == "error":
            refusal = "a computation error cannot be waived: it is a defect; please report it"
        elif not refusal and (r is None or r.status not in WAIVABLE):
            refusal = ("only a check that needs attention can be waived (" + ", ".join(
                sorted(WAIVABLE)) + f"); this one is {states.result_word(r.status)}"
                if r is not None else "the check has no result yet")

        def done(note: str | None) -> None:
            if note is None:
                return
            self.background(f"waiving {stage} · {check}", lambda: self.session.waive(
                stage=stage, check=check, note=note),
                lambda e: f"waived {stage} · {check} (entry #{getattr(e, 'seq', '?')}): "
                          f"reported as {states.result_word(r.status if r else 'fail')} | "
                          "waived")

        self.app.push_screen(SignDialog(f"Waive {stage} · {check}",
                                        self.what_is_signed(stage, [check], "waived"),
                                        meaning="waived", note_required=True,
                                        refusal=refusal, note_check=self.session.note_problem),
                             done)

    def background(self, what: str, fn: Callable[[], Any],
                   said: Callable[[Any], str]) -> None:
        """Run a review action off the UI thread (it recomputes from disk), then say what it did.

        A LatchbookError is shown as a notification; anything else reaches the app's worker
        report (never swallowed).
        """
        self.notify(f"{what}…", markup=False)
        app = self.app

        def work() -> None:
            try:
                value = fn()
            except LatchbookError as exc:
                app.call_from_thread(app.notify, str(exc), title="not done", severity="error",
                                     timeout=12, markup=False)
                return
            app.call_from_thread(self._after_review, said(value))

        app.run_worker(work, name=what, group="review", thread=True, exit_on_error=False)

    def _after_review(self, message: str) -> None:
        self.notify(message, markup=False)
        self.refresh_all()
        if self.app.screen is not self:
            self.app.screen.post_message(ResultsChanged(True))

    def revoke_entry(self, only: int | None = None) -> None:
        """Choose an entry of the history (or take entry ``only``) and revoke it, with a
        reason."""
        refusal = self.refusal()
        lines = [(e.seq, f"{e.title()}  {e.at or ''}") for e in self.session.entries()
                 if e.kind in ("signoff", "approval", "waiver")
                 and (only is None or e.seq == only)]

        def done(answer: tuple[int, str] | None) -> None:
            if answer is None:
                return
            seq, note = answer
            self.background(f"revoking entry #{seq}",
                            lambda: self.session.revoke(seq=seq, note=note),
                            lambda e: f"revoked entry #{seq} (entry #{getattr(e, 'seq', '?')})")

        self.app.push_screen(RevokeDialog(lines, refusal), done)
