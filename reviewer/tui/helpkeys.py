"""What the help screen and the recovery question say, gathered from the app's state (kept out
of app.py so that the app stays a router)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

from rich.text import Text
from textual.binding import Binding, BindingType

from reviewer import store
from reviewer.tui import attention
from reviewer.tui.screens.base import WorkbookScreen
from reviewer.tui.screens.check import CheckScreen
from reviewer.tui.screens.history import HistoryScreen
from reviewer.tui.screens.manual import ManualScreen
from reviewer.tui.screens.overview import OverviewScreen
from reviewer.tui.screens.stage import StageScreen


def sections(app: Any) -> list[tuple[str, list[BindingType]]]:
    """Each screen's keys, as the help lists them."""
    return [
        ("Everywhere", [*app.BINDINGS, *WorkbookScreen.BINDINGS]),
        ("Stages (first screen)", list(OverviewScreen.BINDINGS)),
        ("A stage's checklist", list(StageScreen.BINDINGS)),
        ("A check", list(CheckScreen.BINDINGS)),
        ("Manual questions", list(ManualScreen.BINDINGS)),
        ("History of the review record", list(HistoryScreen.BINDINGS)),
        ("In a dialog (its keys are shown in it)",
         [Binding("enter", "", "check and accept"), Binding("escape", "", "cancel")]),
    ]


def notes(app: Any) -> Text:
    """The filters, the two vocabularies and who may approve."""
    out = Text()
    out.append("Filter (f, on the stages and a stage's checklist)\n", style="bold underline")
    for f in attention.FILTERS:
        mark = "▸ " if f.key == app.filter_key else "  "
        out.append(f"{mark}{f.label:<16}", style="bold")
        out.append(f"{f.rule}\n")
    out.append("\nResult and review\n", style="bold underline")
    out.append("  A check has a result (pass, marginal, fail, blocked, incomplete, error, n/a: "
               "what the computation says) and a review state (unsigned, signed, approved, "
               "waived, stale, unverified: what the record says), shown side by side as "
               "\"FAIL | waived\". A waiver never turns a result into a pass.\n")
    out.append("\nApproval (a)\n", style="bold underline")
    out.append(f"  {app.session.approvers_text()}. An approval covers checks that already have "
               "a current reviewed sign-off; the review record decides and refuses anyone "
               "else. Opening NAME.review.toml is the lead's view: read-only values, approvals "
               "allowed.\n")
    return out


def journal_text(journal: store.Journal, path: Path) -> Text:
    """The body of the recovery question: what the journal holds."""
    body = Text(f"{len(journal.edits)} unsaved edit(s) from {journal.saved_at} by "
                f"{journal.by.get('login', '?')}:\n")
    for e in journal.edits[:8]:
        body.append(f"  {e.path} = {e.text}\n")
    if journal.base_changed(path):
        body.append("The file changed on disk since then: check each edit.\n",
                    style="bold yellow")
    return body
