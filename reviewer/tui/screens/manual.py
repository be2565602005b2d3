"""The checklist's manual questions for one stage: answer yes, no or not applicable, with a note.

Enter on a question asks for the answer (y yes, n no, x not applicable, in the dialog: the
screen's own keys keep the meaning they have everywhere), then for a note.

Answers are kept in the review record's history as notes tagged ``manual:<id>`` (append-only,
like everything there); the latest answer to a question is the one shown, and below the table
the highlighted question in full with its answer's note and who gave it.
"""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.widgets import DataTable, Static

from reviewer.tui.dialogs.choice import ChoiceDialog
from reviewer.tui.dialogs.sign import SignDialog
from reviewer.tui.screens.base import BACK, WorkbookScreen
from reviewer.tui.widgets.banner import Banner, banner_parts
from reviewer.tui.widgets.keybar import KeyBar

ANSWERS = {"y": "yes", "n": "no", "x": "not applicable"}


class ManualScreen(WorkbookScreen):
    """The manual questions of ``stage``."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [
        BACK,
        Binding("enter", "ask", "Answer"),
        Binding("h", "history", "History"),
    ]

    def __init__(self, stage: str) -> None:
        super().__init__()
        self.stage = stage

    def compose(self) -> ComposeResult:
        yield Banner()
        yield Static("", id="manual-note", markup=False)
        yield DataTable(id="manual-table", cursor_type="row")
        with VerticalScroll(id="manual-detail-box"):
            yield Static("", id="manual-detail", markup=False)
        yield KeyBar()

    def on_mount(self) -> None:
        table = self.query_one(DataTable)
        table.add_column(Text("question", style="bold"), key="q", width=57)
        table.add_column(Text("answer", style="bold"), key="a", width=14)
        self.refresh_view()
        table.focus()

    def refresh_view(self) -> None:
        s = self.session
        self.query_one(Banner).show(banner_parts(s, f"{self.stage} · manual questions"))
        qs = s.manual_questions(self.stage)
        answers = s.manual_answers(self.stage)
        table = self.query_one(DataTable)
        row = table.cursor_row
        table.clear()
        for q in qs:
            qid = q.get("id", "?")
            ans = answers.get(qid)
            cell = Text(ans[0], style="bold") if ans else Text("unanswered", style="dim")
            table.add_row(Text(f"{qid}: {q.get('question', '')}"), cell, key=qid, height=None)
        if qs:
            table.move_cursor(row=min(max(row, 0), len(qs) - 1), animate=False)
        note = "" if qs else ("the checklist asks no manual questions of a "
                              f"{s.project.stages[self.stage].kind} stage")
        if not s.review_available:
            note = "answers are kept in the review record, which this version cannot write"
        self.query_one("#manual-note", Static).update(Text(note, style="dim"))
        self._detail()

    def _current(self) -> str | None:
        table = self.query_one(DataTable)
        if table.row_count == 0:
            return None
        return str(table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value)

    def _detail(self) -> None:
        """The highlighted question in full, and its latest answer with the note and who."""
        qid = self._current()
        out = Text()
        q = next((m for m in self.session.manual_questions(self.stage) if m.get("id") == qid),
                 None)
        if q is not None:
            out.append(f"{qid}: ", style="bold")
            out.append(q.get("question", ""))
            ans = self.session.manual_answers(self.stage).get(qid or "")
            if ans is None:
                out.append("\nunanswered — Enter answers it", style="dim")
            else:
                answer, note, who = ans
                out.append("\nanswered ")
                out.append(answer, style="bold")
                out.append(f" by {who}" if who else "", style="dim")
                if note:
                    out.append(f" — {note}")
        self.query_one("#manual-detail", Static).update(out)

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        self._detail()

    def action_back(self) -> None:
        self.dismiss()

    def history_scope(self) -> tuple[str | None, str | None]:
        return self.stage, None

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        event.stop()
        self.action_ask()

    def action_ask(self) -> None:
        """Ask for the answer to the highlighted question, then for its note."""
        qid = self._current()
        if qid is None:
            self.notify("no manual question here", markup=False)
            return

        def chosen(key: str | None) -> None:
            if key in ANSWERS:
                self.action_answer(key)

        self.app.push_screen(ChoiceDialog(
            f"Answer {qid}", self._question(qid),
            [("y", "y", "yes"), ("n", "n", "no"), ("x", "x", "not applicable"),
             ("escape", "", "cancel")]), chosen)

    def _question(self, qid: str) -> Text:
        q = next((m for m in self.session.manual_questions(self.stage) if m.get("id") == qid),
                 {})
        return Text(str(q.get("question", "")))

    def action_answer(self, key: str) -> None:
        table = self.query_one(DataTable)
        if table.row_count == 0:
            return
        qid = self._current() or ""
        answer = ANSWERS[key]
        refusal = "" if not self.session.read_only else \
            f"read-only ({self.session.read_only_reason})"
        what = Text(f"{self.stage} · {qid}: {answer}")

        def done(note: str | None) -> None:
            if note is None:
                return
            self.background(f"recording {qid}", lambda: self.session.answer_manual(
                stage=self.stage, qid=qid, answer=answer, note=note),
                lambda e: f"{qid}: {answer} (entry #{getattr(e, 'seq', '?')})")

        self.app.push_screen(SignDialog(f"Answer {qid}", what, meaning=f"answer: {answer}",
                                        refusal=refusal), done)
