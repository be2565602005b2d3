"""The workbook app: title, styles, global keys, screen routing, and ``run_app``.

The app owns the :class:`~reviewer.tui.session.Session` (the open project) and the
:class:`~reviewer.tui.compute.Computer` (the engine in a worker thread); screens do the rest.
"""

from __future__ import annotations

import sys
from collections.abc import Iterable, Sequence
from pathlib import Path

from rich.text import Text
from textual.app import App, SystemCommand
from textual.binding import Binding
from textual.events import Resize
from textual.filter import LineFilter
from textual.screen import Screen
from textual.worker import Worker, WorkerState

from reviewer import store
from reviewer.errors import LatchbookError
from reviewer.textsafe import visible
from reviewer.tui import attention
from reviewer.tui.compute import Analyst, Computer
from reviewer.tui.dialogs.choice import ChoiceDialog
from reviewer.tui.screens.check import CheckScreen
from reviewer.tui.screens.help import HelpScreen
from reviewer.tui.screens.manual import ManualScreen
from reviewer.tui.screens.overview import OverviewScreen
from reviewer.tui.screens.stage import StageScreen
from reviewer.tui.screens.too_small import MIN_HEIGHT, MIN_WIDTH, TooSmallScreen
from reviewer.tui.session import Session
from reviewer.tui.visible import VisibleFilter


class Workbook(App[int]):
    """Latchbook's terminal workbook on one project."""

    TITLE = "Latchbook workbook"
    CSS_PATH = "app.tcss"
    BINDINGS = [
        Binding("question_mark,f1", "help", "Help"),
        Binding("ctrl+q", "leave", "Quit", priority=True),
        Binding("ctrl+p", "command_palette", "Commands", show=False, priority=True),
    ]

    def __init__(self, session: Session, *, recompute: bool = True) -> None:
        super().__init__()
        self.session = session
        self.computer = Computer(self, session)
        self.analyst = Analyst(self, session)
        self.recompute = recompute
        self.theme = "textual-dark"
        self.filter_key = "all"  # the attention filter, shared by the overview and the stages
        self._small: TooSmallScreen | None = None
        self._size_judged = False  # the size is judged once the first screen is up
        self._visible = VisibleFilter()

    def get_line_filters(self) -> Sequence[LineFilter]:
        """Textual's filters, then the one that shows control and bidi characters."""
        return [*super().get_line_filters(), self._visible]

    # -- routing ------------------------------------------------------------------------
    def on_mount(self) -> None:
        self.title = visible(f"Latchbook · {self.session.project.name}")
        self.push_screen(OverviewScreen())
        self.call_after_refresh(self.notify_warnings)
        if self.recompute and not self.session.computed:
            self.computer.start(None)
        self._offer_recovery()
        self._size_judged = True
        self.call_after_refresh(lambda: self._check_size(self.size.width, self.size.height))

    def notify_warnings(self) -> None:
        """A small notice when values of the project lie outside their usual band."""
        warnings = self.session.project.warnings
        if warnings:
            more = f" (and {len(warnings) - 3} more)" if len(warnings) > 3 else ""
            self.notify("\n".join(visible(w) for w in warnings[:3]) + more,
                        title=f"{len(warnings)} value(s) outside the usual band",
                        severity="warning", timeout=20, markup=False)

    def open_stage(self, stage: str) -> None:
        """Show one stage's checklist."""
        self.push_screen(StageScreen(stage))

    def open_check(self, stage: str, check: str) -> None:
        """Show one check's detail."""
        self.push_screen(CheckScreen(stage, check))

    def open_manual(self, stage: str) -> None:
        """Show the manual questions of a stage."""
        self.push_screen(ManualScreen(stage))

    def cycle_filter(self) -> str:
        """Step the attention filter (all → attention → fails → stale → all); returns it."""
        self.filter_key = attention.next_filter(self.filter_key)
        return self.filter_key

    def action_help(self) -> None:
        sections: list[tuple[str, list]] = [
            ("Everywhere", [*self.BINDINGS, *self._base_bindings()]),
            ("Stages (first screen)", list(OverviewScreen.BINDINGS)),
            ("A stage's checklist", list(StageScreen.BINDINGS)),
            ("A check", list(CheckScreen.BINDINGS)),
            ("Manual questions", list(ManualScreen.BINDINGS)),
            ("In a dialog", [Binding("enter", "", "check and accept"),
                             Binding("escape", "", "cancel")]),
        ]
        notes = Text()
        notes.append("Filter (f, on the stages and a stage's checklist)\n", style="bold underline")
        for f in attention.FILTERS:
            mark = "▸ " if f.key == self.filter_key else "  "
            notes.append(f"{mark}{f.label:<16}", style="bold")
            notes.append(f"{f.rule}\n")
        notes.append("\nApproval (a)\n", style="bold underline")
        notes.append(f"  {self.session.approvers_text()}. An approval covers checks that "
                     "already have a current reviewed sign-off; the review record decides and "
                     "refuses anyone else. Opening NAME.review.toml is the lead's view: "
                     "read-only values, approvals allowed.\n")
        self.push_screen(HelpScreen(sections, notes))

    @staticmethod
    def _base_bindings() -> list:
        from reviewer.tui.screens.base import WorkbookScreen

        return list(WorkbookScreen.BINDINGS)

    # -- the terminal's size --------------------------------------------------------------
    def on_resize(self, event: Resize) -> None:
        self._check_size(event.size.width, event.size.height)

    def _check_size(self, width: int, height: int) -> None:
        if not self._size_judged:
            return
        small = width < MIN_WIDTH or height < MIN_HEIGHT
        if small and self._small is None:
            self._small = TooSmallScreen(width, height)
            self.push_screen(self._small)
        elif small and self._small is not None:
            self._small.show_size(width, height)
        elif not small and self._small is not None:
            if self.screen is self._small:
                self.pop_screen()
            self._small = None

    # -- recovery and leaving -------------------------------------------------------------
    def _offer_recovery(self) -> None:
        try:
            journal = self.session.pending()
        except LatchbookError as exc:
            self.notify(str(exc), severity="error", timeout=15, markup=False)
            return
        if journal is None:
            return
        body = Text(f"{len(journal.edits)} unsaved edit(s) from {journal.saved_at} by "
                    f"{journal.by.get('login', '?')}:\n")
        for e in journal.edits[:8]:
            body.append(f"  {e.path} = {e.text}\n")
        if journal.base_changed(self.session.path):
            body.append("The file changed on disk since then: check each edit.\n",
                        style="bold yellow")

        def answer(choice: str | None) -> None:
            if choice == "recover":
                problems = self.session.recover(journal)
                self.computer.start(None)
                for p in problems:
                    self.notify(f"not recovered: {p}", severity="warning", markup=False)
                self.notify(f"recovered {len(journal.edits) - len(problems)} edit(s); they "
                            "are unsaved", markup=False)
            elif choice == "discard":
                self.session.discard_journal()
                self.notify("discarded the unsaved edits", markup=False)

        self.push_screen(ChoiceDialog("Recover unsaved edits?", body,
                                      [("r", "recover", "recover"), ("d", "discard", "discard"),
                                       ("escape", "later", "decide later")]), answer)

    def action_leave(self) -> None:
        if not self.session.dirty or self.session.read_only:
            self.exit(0)
            return

        def answer(choice: str | None) -> None:
            if choice == "save":
                try:
                    self.session.save()
                except LatchbookError as exc:
                    self.notify(str(exc), severity="error", timeout=15, markup=False)
                    return
                self.exit(0)
            elif choice == "keep":
                self.session.write_journal()
                self.exit(0)

        n = len(self.session.state.edits)
        self.push_screen(ChoiceDialog(
            "Unsaved edits", f"{n} edit(s) are not saved in {self.session.path.name}.",
            [("s", "save", "save and quit"), ("k", "keep", "quit, keep them for next time"),
             ("escape", "stay", "stay")]), answer)

    # -- workers and the command palette --------------------------------------------------
    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker.group == Computer.GROUP:
            self.computer.on_state(event)
        elif event.worker.group in (Analyst.YIELD, Analyst.AID):
            self.analyst.on_state(event)
        elif event.state == WorkerState.ERROR:
            err = event.worker.error
            self.notify(f"{event.worker.name} failed: {type(err).__name__}: {err}",
                        severity="error", timeout=15, markup=False)

    def get_system_commands(self, screen: Screen) -> Iterable[SystemCommand]:
        s = screen

        def call(name: str) -> None:
            fn = getattr(s, f"action_{name}", None)
            if fn is not None:
                fn()

        yield SystemCommand("Show every key", "The key list and the cautions", self.action_help)
        yield SystemCommand("Change a value", "Edit a value; dependent checks recompute",
                            lambda: call("edit"))
        yield SystemCommand("Step back one edit", "Undo", lambda: call("undo"))
        yield SystemCommand("Step forward one edit", "Redo", lambda: call("redo"))
        yield SystemCommand("Write the project file", "Save, keeping comments",
                            lambda: call("save"))
        yield SystemCommand("Recompute every check", "Run the engine on the whole project",
                            lambda: self.computer.start(None))
        yield SystemCommand("Monte Carlo yield", "Sample the production spreads (y)",
                            lambda: call("yield"))
        yield SystemCommand("Try the suggested value", "Design aid on a failing check (t)",
                            lambda: call("try_value"))
        yield SystemCommand("Sign the stage as reviewed", "Shows what is signed first",
                            lambda: call("sign"))
        yield SystemCommand("Approve the stage", "Approvers only (a); the review record "
                            "decides", lambda: call("approve"))
        yield SystemCommand("Cycle the attention filter", "All → attention → fails → stale (f)",
                            lambda: call("cycle_filter"))
        yield SystemCommand("Revoke a history entry", "With a reason", lambda: call("revoke"))
        yield SystemCommand("Leave the workbook", "Quit (asks about unsaved edits)",
                            self.action_leave)


def run_app(project_path: str, *, read_only: bool = False, mouse: bool = True,
            record: str | None = None) -> int:
    """Open the workbook on ``project_path``; returns the exit code.

    ``record``: the review record the user named (``latchbook open NAME.review.toml``); the
    project then opens read-only as the lead's view (see :class:`Session`).

    A SIGHUP (dropped SSH session) or SIGTERM writes the unsaved edits to the journal before
    the process ends; the next open offers them back.
    """
    try:
        session = Session(Path(project_path), read_only=read_only, record=record)
    except LatchbookError as exc:
        print(f"latchbook: {visible(exc)}", file=sys.stderr)
        return 2
    restore = store.install_hangup_handler(session.write_journal)
    try:
        code = Workbook(session).run(mouse=mouse)
    finally:
        restore()
        session.close()
    return int(code or 0)
