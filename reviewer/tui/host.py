"""What a workbook screen may ask of the app that shows it: a small interface, so that the
screens never import the app (the app imports them) and each screen stands on its own.

:class:`~reviewer.tui.app.Workbook` implements it; a test may give a screen any object that
does.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Protocol

if TYPE_CHECKING:
    from reviewer.engine import Result
    from reviewer.tui.session import Session


class Host(Protocol):
    """The app, as the screens see it."""

    session: Session
    filter_key: str

    def cycle_filter(self) -> str:
        """Step the attention filter shared by the overview and the stages; returns it."""
        ...

    def recompute(self, paths: list[str] | None) -> None:
        """Recompute the checks that depend on ``paths`` (None: every check)."""
        ...

    def start_yield(self, stage: str | None) -> None:
        """Run Monte Carlo on a stage's checks (None: the whole project)."""
        ...

    def start_aid(self, result: Result, name: str) -> None:
        """Compute the passing range of one input of ``result`` (once per inputs hash)."""
        ...

    def open_stage(self, stage: str) -> None:
        """Show one stage's checklist."""
        ...

    def open_check(self, stage: str, check: str, *, waveform: bool = False) -> None:
        """Show one check's detail (or its waveform)."""
        ...

    def open_manual(self, stage: str) -> None:
        """Show the manual questions of a stage."""
        ...

    def open_history(self, stage: str | None = None, check: str | None = None) -> None:
        """Show the review record's history, filtered to a stage or one check."""
        ...

    def notify_warnings(self) -> None:
        """Say which values lie outside their usual band (after an edit added one)."""
        ...

    def show_help(self) -> None:
        """Show every key and the cautions."""
        ...
