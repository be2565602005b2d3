"""The line at the top of every screen: project, revision, variant, overall state, and
whether there are unsaved edits or the project is read-only."""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static

from reviewer.tui import present
from reviewer.tui.session import Session


def banner_text(session: Session, where: str = "") -> Text:
    """The banner's content for the session's current state."""
    p = session.project
    out = Text(no_wrap=True, overflow="ellipsis")
    out.append(f" {p.name} ", style="bold reverse")
    out.append(f" rev {p.revision}")
    if p.variant_of:
        out.append(f" · variant of {p.variant_of}", style="dim")
    out.append("  ")
    out.append_text(present.status_text(session.overall() if session.computed else ""))
    if session.dirty:
        n = len(session.state.edits)
        out.append(f"  ● {n} unsaved edit{'s' if n != 1 else ''}", style="bold yellow")
    if session.yield_progress is not None:
        done, total = session.yield_progress
        out.append(f"  Monte Carlo {done}/{total}…", style="bold cyan")
    if session.read_only:
        out.append("  READ-ONLY", style="bold reverse")
    if where:
        out.append(f"  › {where}", style="bold")
    return out


class Banner(Static):
    """The top line."""

    DEFAULT_CSS = "Banner { height: 1; width: 100%; background: $panel; }"

    def __init__(self, **kw: object) -> None:
        super().__init__("", markup=False, **kw)  # type: ignore[arg-type]

    def show(self, text: Text) -> None:
        """Replace the content."""
        self.update(text)
