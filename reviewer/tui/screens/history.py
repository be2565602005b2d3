"""The review record's history: every entry with who, when, what, why, its number and where it
stands (verified or not; in force, stale, superseded, revoked). Typing in the filter narrows it
to a stage or a check; r revokes the highlighted entry, a approves what it signed.

Signatures and the chain are verified in a worker (``verify`` may run ssh-keygen); until it
answers, the chain as read is shown and the entries read "checking".
"""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.widgets import DataTable, Input, Static

from reviewer.errors import LatchbookError
from reviewer.tui import history
from reviewer.tui.screens.base import BACK, WorkbookScreen
from reviewer.tui.widgets.banner import Banner, banner_parts
from reviewer.tui.widgets.keybar import KeyBar

STATE_STYLE = {"in force": "green", "stale": "bold yellow", "unverified": "bold red",
               "superseded": "dim", "recorded": "dim"}


class HistoryScreen(WorkbookScreen):
    """The history of the review record, filtered to ``stage`` / ``check`` when given."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [
        BACK,
        Binding("slash", "find", "Filter"),
        Binding("r", "revoke", "Revoke"),
        Binding("a", "approve", "Approve"),
    ]

    def __init__(self, stage: str | None = None, check: str | None = None) -> None:
        super().__init__()
        self.scope = " ".join(x for x in (check or stage,) if x)
        self.first_bad: int | None = None
        self.checking = True
        self.verify_note = ""
        self.rows: list[history.HistoryRow] = []

    def compose(self) -> ComposeResult:
        yield Banner()
        yield Input(value=self.scope, placeholder="filter: a stage or a check (gate, "
                    "snubber.leakage)", id="history-filter")
        yield DataTable(id="history-table", cursor_type="row")
        with VerticalScroll(id="history-detail-box"):
            yield Static("", id="history-detail", markup=False)
        yield KeyBar()

    def on_mount(self) -> None:
        table = self.query_one(DataTable)
        for label, key, width in (("#", "seq", 3), ("when (UTC)", "when", 16), ("who", "who", 10),
                                  ("what", "what", 28), ("state", "state", 12)):
            table.add_column(Text(label, style="bold"), key=key, width=width)
        rec = getattr(self.session.record, "chain", None)
        self.first_bad = getattr(rec, "first_bad", None)
        self.refresh_view()
        table.focus()
        self._verify()

    def _verify(self) -> None:
        app, session = self.app, self.session

        def work() -> None:
            try:
                rep = session.verify()
            except LatchbookError as exc:
                app.call_from_thread(self._verified, None, str(exc))
                return
            app.call_from_thread(self._verified, rep, "")

        app.run_worker(work, name="verify the record", group="verify", thread=True,
                       exit_on_error=False)

    def _verified(self, rep: object, problem: str) -> None:
        self.checking = False
        if rep is None:
            self.verify_note = f"not verified: {problem}"
        else:
            first = getattr(rep, "first_bad", None)
            if first is not None:
                self.first_bad = first if self.first_bad is None else min(first, self.first_bad)
            msgs = list(getattr(rep, "messages", []))
            self.verify_note = ("verified: " if getattr(rep, "ok", False) else "NOT verified: ") \
                + ("; ".join(msgs[:3]) if msgs else "chain and signatures hold")
        if self.is_attached:
            self.refresh_view()

    # -- showing ----------------------------------------------------------------------
    def refresh_view(self) -> None:
        s = self.session
        self.query_one(Banner).show(banner_parts(s, "history"))
        every = history.rows(s.entries(), s.check_states, first_bad=self.first_bad,
                             checking=self.checking)
        typed = self.query_one("#history-filter", Input).value
        self.rows = [r for r in every if r.matches(typed)]
        table = self.query_one(DataTable)
        at = table.cursor_row
        table.clear()
        for r in self.rows:
            state = Text(r.state, style=STATE_STYLE.get(r.state, "dim"))
            what = Text(r.what, style="bold")
            what.append(f"\n{r.short_where}", style="")
            table.add_row(Text(str(r.seq)), Text(r.when), Text(r.login), what, state,
                          key=str(r.seq), height=None)
        if self.rows:
            table.move_cursor(row=min(max(at, 0), len(self.rows) - 1), animate=False)
        self._detail()

    def current(self) -> history.HistoryRow | None:
        """The highlighted entry."""
        table = self.query_one(DataTable)
        if not self.rows or not 0 <= table.cursor_row < len(self.rows):
            return None
        return self.rows[table.cursor_row]

    def _detail(self) -> None:
        r = self.current()
        out = Text()
        s = self.session
        if not s.entries():
            out.append("no entries yet: sign-offs, approvals, waivers, revocations and manual "
                       "answers appear here", style="dim")
        elif r is None:
            out.append("no entry names that stage or check; clear the filter (/)", style="dim")
        else:
            out.append(f"entry #{r.seq}  {r.what}  ", style="bold")
            out.append(r.state, style=STATE_STYLE.get(r.state, "dim"))
            out.append(f"\n{r.where}\nby {r.who} on {r.when} UTC"
                       + (", SSH-signed" if r.ssh else "") + "\n")
            out.append(f"“{r.note}”\n" if r.note else "(no note)\n",
                       style="" if r.note else "dim")
            out.append(f"verification: {r.verification}", style="bold" if
                       r.verification == "unverified" else "dim")
        if self.verify_note:
            out.append(f"\n{self.verify_note}", style="dim")
        self.query_one("#history-detail", Static).update(out)

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        self._detail()

    def on_input_changed(self, event: Input.Changed) -> None:
        self.refresh_view()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        self.query_one(DataTable).focus()

    # -- acting -------------------------------------------------------------------------
    def applies_now(self, action: str) -> bool:
        r = self.current()
        if action == "revoke":
            return super().applies_now(action) and r is not None and \
                r.kind in history.COVERING and not r.standing.startswith("revoked")
        if action == "approve":
            return super().applies_now(action) and r is not None and r.kind == "signoff"
        return super().applies_now(action)

    def action_find(self) -> None:
        self.query_one("#history-filter", Input).focus()

    def action_back(self) -> None:
        if self.focused is self.query_one("#history-filter", Input):
            self.query_one(DataTable).focus()
            return
        self.dismiss()

    def action_revoke(self) -> None:
        r = self.current()
        if r is None or r.kind not in history.COVERING:
            self.notify("choose a sign-off, approval or waiver to revoke", markup=False)
            return
        self.revoke_entry(only=r.seq)

    def action_approve(self) -> None:
        r = self.current()
        if r is None or r.kind != "signoff" or r.stage == "*":
            self.notify("choose a reviewed sign-off of one stage to approve what it signed",
                        markup=False)
            return
        self.sign_stage(r.stage, list(r.checks) or None, "approved")

    def edit_candidates(self) -> tuple[str, list[tuple[str, str, bool]]]:
        return "Change a value", self._values_of(None, [])


__all__ = ["HistoryScreen"]
