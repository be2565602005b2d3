"""The first screen: every stage with its counts, the project's identity and overall state.

Under the attention filter (f) only the stages with a check that passes it are listed."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.widgets import Static

from reviewer import fmt
from reviewer.engine import status_counts
from reviewer.tui import attention
from reviewer.tui.screens.base import WorkbookScreen
from reviewer.tui.widgets.banner import Banner, banner_parts
from reviewer.tui.widgets.keybar import KeyBar
from reviewer.tui.widgets.tables import StageTable


class OverviewScreen(WorkbookScreen):
    """Stages and their counts; Enter opens a stage."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [
        Binding("enter", "open_stage", "Open"),
        Binding("s", "sign", "Sign stage"),
        Binding("a", "approve", "Approve"),
        Binding("r", "revoke", "Revoke"),
        Binding("h", "history", "History"),
        Binding("y", "yield", "Yield"),
        Binding("f", "cycle_filter", "Filter"),
    ]

    def compose(self) -> ComposeResult:
        yield Banner(id="banner")
        yield Static("", id="overview-note", markup=False)
        yield StageTable(id="stages")
        yield Static("", id="overview-totals", markup=False)
        yield Static("", id="overview-safety", markup=False)
        yield KeyBar()

    def on_mount(self) -> None:
        self.refresh_view()
        self.query_one(StageTable).focus()

    def refresh_view(self) -> None:
        s = self.session
        self.query_one(Banner).show(banner_parts(s, filter_label=self.filter_label()))
        note = Text()
        if s.read_only:
            note.append(f"read-only: {s.read_only_reason}", style="bold")
            if s.approvals_open:
                note.append(" — values cannot change; an approver approves a stage with "
                            "the a key", style="bold")
        if s.review_error:  # a record that cannot be read is named in every view
            note.append("\n" if note else "")
            note.append(s.review_error, style="dim")
        if not s.computed:
            note.append("  computing the checks…" if note else "computing the checks…",
                        style="italic")
        rows = s.stage_counts()
        key = self.filter_key
        if key != "all":
            rows = [c for c in rows if s.filtered_checks(key, c.stage)]
            f = attention.BY_KEY[key]
            note.append("\n" if note else "")
            note.append(f"filter {f.label}: {len(rows)} of {len(s.project.stages)} stages "
                        f"have {f.rule}" if rows or s.computed else
                        f"filter {f.label}: waiting for the results", style="magenta")
            if not rows and s.computed:
                note.append(" — none here; f shows the next filter", style="magenta")
        self.set_static("#overview-note", note)
        self.query_one(StageTable).show(rows, computing=not s.computed,
                                        order=list(s.project.stages))
        counts = status_counts(s.run.results)
        tot = Text(f" {len(s.project.stages)} stages, {len(s.run.results)} checks: ")
        tot.append("  ".join(f"{k} {v}" for k, v in sorted(counts.items())))
        sampled = [(y.fail_fraction, r) for r in s.run.results
                   if (y := s.yield_of(r.stage, r.check)) is not None]
        if sampled:
            worst, r = max(sampled, key=lambda x: x[0])
            if worst > 0:
                tot.append(f"  · Monte Carlo on {len(sampled)}: worst {fmt.share(worst)} fail "
                           f"({r.stage} · {r.check})", style="bold")
            else:
                tot.append(f"  · Monte Carlo on {len(sampled)}: no sample failed")
        self.set_static("#overview-totals", tot)
        self.set_static("#overview-safety", Text(
            "⚠ Mains circuits can kill. A pass means the computed margin meets the checklist "
            "limit; nothing here shows compliance with any standard.", style="italic dim"))

    def on_stage_table_stage_chosen(self, event: StageTable.StageChosen) -> None:
        self.host.open_stage(event.stage)

    def action_open_stage(self) -> None:
        key = self.query_one(StageTable).current_key
        if key:
            self.host.open_stage(key)

    def _stage(self) -> str | None:
        return self.query_one(StageTable).current_key

    def action_sign(self) -> None:
        if (st := self._stage()) is not None:
            self.sign_stage(st, None, "reviewed")

    def action_approve(self) -> None:
        if (st := self._stage()) is not None:
            self.sign_stage(st, None, "approved")

    def action_revoke(self) -> None:
        self.revoke_entry()

    def action_yield(self) -> None:
        self.host.start_yield(None)
