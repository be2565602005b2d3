"""The line at the top of every screen: project, revision, variant, overall state, whether
there are unsaved edits or the project is read-only, the filter in force and where you are.

The line is one row; when it does not fit, the least needed parts go first (the variant note,
then the revision), then the project name is shortened, so the state, READ-ONLY, the filter
and the place always show at 80 columns.
"""

from __future__ import annotations

from rich.text import Text
from textual.widget import Widget

from reviewer.textsafe import visible
from reviewer.tui import present
from reviewer.tui.session import Session

Part = tuple[int, Text]  # (how much it is needed: 10 = always, lower goes first, the text)
NAME_MIN = 18  # the project name is never shortened below this many cells


def banner_parts(session: Session, where: str = "", filter_label: str = "",
                 where_note: str = "") -> list[Part]:
    """The banner's parts, in display order, each with how much it is needed; ``where_note``
    (e.g. a stage's kind) follows ``where`` and goes early when room is short."""
    p = session.project
    parts: list[Part] = [(10, Text(f" {visible(p.name)} ", style="bold reverse")),
                         (4, Text(f" rev {visible(p.revision)}"))]
    if p.variant_of:
        parts.append((2, Text(f" · variant of {visible(p.variant_of)}", style="dim")))
    state = Text("  ")
    state.append_text(present.state_text(*session.overall()) if session.computed
                      else present.status_text(""))
    parts.append((9, state))
    if session.dirty:
        n = len(session.state.edits)
        parts.append((8, Text(f"  ● {n} unsaved edit{'s' if n != 1 else ''}",
                              style="bold yellow")))
    if session.yield_progress is not None:
        done, total = session.yield_progress
        pct = 100 * done // total if total else 0
        parts.append((6, Text(f"  Monte Carlo {pct} %…", style="bold cyan")))
    if session.read_only:
        parts.append((9, Text("  READ-ONLY", style="bold reverse")))
    if filter_label:
        parts.append((8, Text(f"  filter: {filter_label}", style="bold magenta")))
    if where:
        parts.append((7, Text(f"  › {where}", style="bold")))
        if where_note:
            parts.append((3, Text(f" ({where_note})", style="dim")))
    return parts


def fit(parts: list[Part], width: int) -> Text:
    """Join ``parts`` into one line of at most ``width`` cells (see the module docstring)."""
    keep = list(parts)

    def total() -> int:
        return sum(t.cell_len for _, t in keep)

    while total() > width:
        droppable = [(need, -i) for i, (need, _) in enumerate(keep) if need < 7]
        if not droppable:
            break
        _, neg = min(droppable)
        del keep[-neg]
    over = total() - width
    if over > 0 and keep and keep[0][0] == 10:
        name = keep[0][1]
        plain = name.plain.strip()
        room = max(NAME_MIN, len(plain) - over)
        if room < len(plain):
            keep[0] = (10, Text(f" {plain[: room - 1]}… ", style=name.style))
    while total() > width:
        droppable = [(need, -i) for i, (need, _) in enumerate(keep) if need < 10]
        if not droppable:
            break
        _, neg = min(droppable)
        del keep[-neg]
    out = Text(no_wrap=True, overflow="ellipsis")
    for _, t in keep:
        out.append_text(t)
    return out


def banner_text(session: Session, where: str = "", *, filter_label: str = "",
                width: int | None = None) -> Text:
    """The banner's content for the session's current state (fitted to ``width`` if given)."""
    return fit(banner_parts(session, where, filter_label), width or 10_000)


class Banner(Widget):
    """The top line; it fits its parts to its own width, again on every resize."""

    DEFAULT_CSS = "Banner { height: 1; width: 100%; background: $panel; }"

    def __init__(self, **kw: object) -> None:
        super().__init__(**kw)  # type: ignore[arg-type]
        self._parts: list[Part] = []

    def show(self, content: Text | list[Part]) -> None:
        """Replace the content: a ready Text, or parts to fit (:func:`banner_parts`)."""
        self._parts = [(10, content)] if isinstance(content, Text) else list(content)
        self.refresh()

    def render(self) -> Text:
        return fit(self._parts, self.size.width or 80)
