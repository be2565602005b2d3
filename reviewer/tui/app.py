"""The workbook app: title, styles, global keys, screen routing, and ``run_app``.

The app owns the :class:`~reviewer.tui.session.Session` (the open project), the
:class:`~reviewer.tui.compute.Computer` (the engine in a worker thread) and the
:class:`~reviewer.tui.compute.Analyst`; it is the screens' :class:`~reviewer.tui.host.Host`
and they do the rest. An unhandled error keeps the journal of unsaved edits, says where to
report it, and ends the process with exit code 4.
"""

from __future__ import annotations

import sys
from collections.abc import Iterable, Sequence
from pathlib import Path

from textual.app import App, SystemCommand
from textual.binding import Binding
from textual.events import Resize
from textual.filter import LineFilter
from textual.screen import Screen
from textual.worker import Worker, WorkerState

from reviewer import store
from reviewer.engine import Result
from reviewer.errors import LatchbookError
from reviewer.textsafe import visible
from reviewer.tui import attention
from reviewer.tui.compute import Analyst, Computer
from reviewer.tui.crash import CRASHED, REPORT_TO, keep_and_explain
from reviewer.tui.dialogs.choice import ChoiceDialog
from reviewer.tui.palette import WorkbookCommands
from reviewer.tui.screens.overview import OverviewScreen
from reviewer.tui.screens.too_small import MIN_HEIGHT, MIN_WIDTH, TooSmallScreen
from reviewer.tui.session import Session
from reviewer.tui.visible import VisibleFilter

# The other screens are imported when first opened: the first screen comes up sooner.


class Workbook(App[int]):
    """Latchbook's terminal workbook on one project."""

    TITLE = "Latchbook workbook"
    CSS_PATH = "app.tcss"
    COMMANDS = {WorkbookCommands}
    BINDINGS = [
        Binding("question_mark,f1", "help", "Help"),
        Binding("ctrl+p", "command_palette", "Find", priority=True),
        Binding("ctrl+q", "leave", "Quit", priority=True),
    ]

    def __init__(self, session: Session, *, recompute: bool = True) -> None:
        super().__init__()
        self.session = session
        self.computer = Computer(self, session)
        self.analyst = Analyst(self, session)
        self.recompute_on_open = recompute
        self.theme = "textual-dark"
        self.filter_key = "all"  # the attention filter, shared by the overview and the stages
        self.crash = ""  # what run_app prints after an unhandled error
        self._small: TooSmallScreen | None = None
        self._size_judged = False  # the size is judged once the first screen is up
        self._visible = VisibleFilter()

    def get_line_filters(self) -> Sequence[LineFilter]:
        """Textual's filters, then the one that shows control and bidi characters."""
        return [*super().get_line_filters(), self._visible]

    # -- the host the screens see (reviewer.tui.host.Host) ---------------------------------
    def on_mount(self) -> None:
        self._open_first()
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

    def _open_first(self) -> None:
        self.title = visible(f"Latchbook · {self.session.project.name}")
        self.push_screen(OverviewScreen())
        self.call_after_refresh(self.notify_warnings)
        if self.recompute_on_open and not self.session.computed:
            self.call_after_refresh(self.computer.start, None)  # the table first

    def recompute(self, paths: list[str] | None) -> None:
        self.computer.start(paths)

    def start_yield(self, stage: str | None) -> None:
        self.analyst.start_yield(stage)

    def start_aid(self, result: Result, name: str) -> None:
        self.analyst.start_aid(result, name)

    def open_stage(self, stage: str) -> None:
        from reviewer.tui.screens.stage import StageScreen

        self.push_screen(StageScreen(stage))

    def open_check(self, stage: str, check: str, *, waveform: bool = False) -> None:
        from reviewer.tui.screens.check import CheckScreen

        self.push_screen(CheckScreen(stage, check, waveform=waveform))

    def open_manual(self, stage: str) -> None:
        from reviewer.tui.screens.manual import ManualScreen

        self.push_screen(ManualScreen(stage))

    def open_history(self, stage: str | None = None, check: str | None = None) -> None:
        from reviewer.tui.screens.history import HistoryScreen

        self.push_screen(HistoryScreen(stage, check))

    def cycle_filter(self) -> str:
        self.filter_key = attention.next_filter(self.filter_key)
        return self.filter_key

    def show_help(self) -> None:
        from reviewer.tui import helpkeys
        from reviewer.tui.screens.help import HelpScreen

        self.push_screen(HelpScreen(helpkeys.sections(self), helpkeys.notes(self)))

    def action_help(self) -> None:
        self.show_help()

    def export_report(self, fmt: str) -> None:
        """Write the report of the file on disk beside the project, in a worker."""
        from reviewer.report import write_report

        s = self.session
        if s.writes_nothing:
            self.notify("opened with --read-only: nothing is written, not even a report",
                        severity="warning", markup=False)
            return
        out = s.path.with_name(f"{s.path.stem}.report.{fmt}")
        unsaved = (f"; {len(s.state.edits)} unsaved edit(s) are not in it (it covers the "
                   "file on disk)") if s.dirty else ""

        def work() -> None:
            try:
                written = write_report(s.path, fmt, out)
            except LatchbookError as exc:
                self.call_from_thread(self.notify, str(exc), title="not written",
                                      severity="error", markup=False)
                return
            self.call_from_thread(self.notify, f"wrote {written.name}{unsaved}", markup=False)

        self.notify(f"writing {out.name}…", markup=False)
        self.run_worker(work, name="report", group="report", thread=True, exit_on_error=False)

    def switch_project(self, path: Path) -> None:
        """Open another project in place of this one (asks about unsaved edits first)."""
        def go() -> None:
            try:
                new = Session(path, read_only=self.session.writes_nothing)
            except LatchbookError as exc:
                self.notify(str(exc), title="not opened", severity="error", markup=False)
                return
            self.session.close()
            self.session = new
            self.computer = Computer(self, new)
            self.analyst = Analyst(self, new)
            while len(self.screen_stack) > 1:
                self.pop_screen()
            self._open_first()
            self._offer_recovery()
            self.notify(f"opened {path.name}", markup=False)

        self._unless_unsaved(go, "switching project")

    def leave(self) -> None:
        self._unless_unsaved(lambda: self.exit(0), "quitting")

    def action_leave(self) -> None:
        self.leave()

    def _unless_unsaved(self, then: object, doing: str) -> None:
        s = self.session
        if not s.dirty or s.read_only:
            then()  # type: ignore[operator]
            return

        def answer(choice: str | None) -> None:
            if choice == "save":
                try:
                    s.save()
                except LatchbookError as exc:
                    self.notify(str(exc), severity="error", timeout=15, markup=False)
                    return
                then()  # type: ignore[operator]
            elif choice == "keep":
                s.write_journal()
                then()  # type: ignore[operator]

        n = len(s.state.edits)
        self.push_screen(ChoiceDialog(
            "Unsaved edits", f"{n} edit(s) are not saved in {s.path.name} ({doing}).",
            [("s", "save", "save, then go on"), ("k", "keep", "keep them for next time"),
             ("escape", "stay", "stay")]), answer)

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

    # -- recovery -------------------------------------------------------------------------
    def _offer_recovery(self) -> None:
        try:
            journal = self.session.pending()
        except LatchbookError as exc:
            self.notify(str(exc), severity="error", timeout=15, markup=False)
            return
        if journal is None:
            return
        session = self.session

        def answer(choice: str | None) -> None:
            if choice == "recover":
                problems = session.recover(journal)
                self.computer.start(None)
                for p in problems:
                    self.notify(f"not recovered: {p}", severity="warning", markup=False)
                self.notify(f"recovered {len(journal.edits) - len(problems)} edit(s); they "
                            "are unsaved", markup=False)
            elif choice == "discard":
                session.discard_journal()
                self.notify("discarded the unsaved edits", markup=False)

        from reviewer.tui.helpkeys import journal_text

        self.push_screen(ChoiceDialog("Recover unsaved edits?",
                                      journal_text(journal, session.path),
                                      [("r", "recover", "recover"), ("d", "discard", "discard"),
                                       ("escape", "later", "decide later")]), answer)

    # -- workers, the palette, and errors -------------------------------------------------
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
        return ()  # the workbook's own commands come from WorkbookCommands

    def _handle_exception(self, error: Exception) -> None:
        # Keep the unsaved edits before anything else, then say where to report the defect.
        self.crash = keep_and_explain(self.session, error, f"{id(self):x}")
        super()._handle_exception(error)


def run_app(project_path: str, *, read_only: bool = False, mouse: bool = True,
            record: str | None = None, headless: bool = False) -> int:
    """Open the workbook on ``project_path``; returns the exit code (3 on an internal error).

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
    app = Workbook(session)
    restore = store.install_hangup_handler(lambda: app.session.write_journal())
    try:
        code = app.run(mouse=mouse, **({"headless": True} if headless else {}))
    finally:
        restore()
        app.session.close()
    if app.crash or app.return_code not in (0, None):
        print(app.crash or "latchbook: the workbook stopped on an internal error; please "
              f"report it to {REPORT_TO}", file=sys.stderr)
        return CRASHED
    return int(code or 0)
