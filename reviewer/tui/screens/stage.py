"""One stage's checklist: every check with its result, worst against limit, margin and
sign-off, the highlighted check's summary below; Enter opens its detail. Under the attention
filter (f) only the checks that pass it are listed."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.widgets import Static

from reviewer.schema import CATALOGUE
from reviewer.states import WAIVABLE
from reviewer.textsafe import visible
from reviewer.tui import attention, present
from reviewer.tui.screens.base import BACK, WorkbookScreen
from reviewer.tui.widgets.banner import Banner, banner_parts
from reviewer.tui.widgets.keybar import KeyBar
from reviewer.tui.widgets.tables import ChecklistTable


class StageScreen(WorkbookScreen):
    """The checklist of ``stage``."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [
        BACK,
        Binding("enter", "open_check", "Detail"),
        Binding("s", "sign", "Sign stage"),
        Binding("c", "sign_check", "Sign"),
        Binding("w", "waive", "Waive"),
        Binding("m", "manual", "Manual"),
        Binding("a", "approve", "Approve"),
        Binding("r", "revoke", "Revoke"),
        Binding("h", "history", "History"),
        Binding("y", "yield", "Yield"),
        Binding("f", "cycle_filter", "Filter"),
    ]

    def __init__(self, stage: str) -> None:
        super().__init__()
        self.stage = stage
        self.check: str | None = None

    def compose(self) -> ComposeResult:
        yield Banner(id="banner")
        yield ChecklistTable(id="checklist")
        with VerticalScroll(id="stage-summary-box"):
            yield Static("", id="stage-summary", markup=False)
        yield KeyBar()

    def on_mount(self) -> None:
        self.refresh_view()
        self.query_one(ChecklistTable).focus()

    def checks(self) -> list[str]:
        """The stage's checks, in catalogue order."""
        st = self.session.project.stages.get(self.stage)
        return [cid for cid, kinds in CATALOGUE if st is not None and st.kind in kinds]

    def refresh_view(self) -> None:
        s = self.session
        if self.stage not in s.project.stages:
            self.dismiss()
            return
        kind = s.project.stages[self.stage].kind
        self.query_one(Banner).show(banner_parts(s, self.stage, self.filter_label(), kind))
        results = {r.check: r for r in s.run.results if r.stage == self.stage}
        table = self.query_one(ChecklistTable)
        every = self.checks()
        shown = every if self.filter_key == "all" else \
            [c for c in every if s.check_matches(self.filter_key, self.stage, c)]
        table.show(shown, results, order=every,
                   review=lambda c: s.review(self.stage, c),
                   changed={c for st, c in s.changed if st == self.stage},
                   signing=s.review_available,
                   yields=lambda c: s.yield_of(self.stage, c))
        self.check = table.current_key
        self._summary(len(shown), len(every))

    def _summary(self, shown: int | None = None, every: int | None = None) -> None:
        r = self.session.result(self.stage, self.check) if self.check else None
        out = Text()
        if self.filter_key != "all" and shown is not None and not shown:
            f = attention.BY_KEY[self.filter_key]
            out.append(f"filter {f.label}: none of the {every} checks of {visible(self.stage)} has "
                       f"{f.rule}" if self.session.computed else
                       f"filter {f.label}: waiting for the results", style="magenta")
            out.append("\nf shows the next filter; f again until all checks shows them all",
                       style="dim")
        elif r is not None:
            out.append(f"{r.check}: ", style="bold")
            out.append_text(present.state_text(r.status, self.session.review(self.stage,
                                                                             r.check)))
            y = self.session.yield_of(self.stage, r.check)
            if y is not None:
                out.append("  Monte Carlo: ", style="bold")
                out.append_text(present.yield_cell(y))
                out.append(" of the samples fail", style="bold")
            out.append(f"  {visible(r.summary)}")
        elif self.check:
            out.append(f"{self.check}: computing…", style="italic")
        self.set_static("#stage-summary", out)

    def on_checklist_table_check_highlighted(self, event: ChecklistTable.CheckHighlighted) -> None:
        self.check = event.check
        self._summary()
        self.refresh_bindings()

    def applies_now(self, action: str) -> bool:
        if action == "waive":
            r = self.session.result(self.stage, self.check) if self.check else None
            return super().applies_now(action) and r is not None and r.status in WAIVABLE
        if action == "manual":
            return bool(self.session.manual_questions(self.stage))
        return super().applies_now(action)

    def on_checklist_table_check_chosen(self, event: ChecklistTable.CheckChosen) -> None:
        self.host.open_check(self.stage, event.check)

    def action_open_check(self) -> None:
        if self.check:
            self.host.open_check(self.stage, self.check)

    def action_back(self) -> None:
        self.dismiss()

    def edit_candidates(self) -> tuple[str, list[tuple[str, str, bool]]]:
        r = self.session.result(self.stage, self.check) if self.check else None
        read = list(r.snapshot.get("inputs", {})) if r else []
        return (f"Change a value of {self.stage}" + (f" (• read by {self.check})" if r else ""),
                self._values_of(self.stage, read))

    def action_sign(self) -> None:
        self.sign_stage(self.stage, None, "reviewed")

    def action_approve(self) -> None:
        self.sign_stage(self.stage, None, "approved")

    def action_sign_check(self) -> None:
        if self.check:
            self.sign_stage(self.stage, [self.check], "reviewed")

    def action_waive(self) -> None:
        if self.check:
            self.waive_check(self.stage, self.check)
        else:
            self.notify("no check here to waive", markup=False)

    def action_revoke(self) -> None:
        self.revoke_entry()

    def action_yield(self) -> None:
        self.host.start_yield(self.stage)

    def action_manual(self) -> None:
        self.host.open_manual(self.stage)

    def history_scope(self) -> tuple[str | None, str | None]:
        return self.stage, None
