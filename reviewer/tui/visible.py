"""The workbook's last line of defence for text from files: a line filter that shows control
and bidi characters (``\\x1b``, ``⟨U+202E⟩``) instead of sending them to the terminal.

Every strip a widget draws passes through :class:`VisibleFilter` (the app adds it to its line
filters), so no widget, notification or dialog can put a raw ESC, BEL or bidi override on the
screen, whatever text it was given. A line that grows by the shown characters is cut back to
its width so that the layout holds.
"""

from __future__ import annotations

from rich.segment import Segment
from textual.color import Color
from textual.filter import LineFilter

from reviewer.textsafe import is_clean, visible


class VisibleFilter(LineFilter):
    """Replace control and bidi characters in every segment by their visible form."""

    def apply(self, segments: list[Segment], background: Color) -> list[Segment]:
        if all(seg.control or is_clean(seg.text) for seg in segments):
            return segments
        width = sum(seg.cell_length for seg in segments)
        shown = [seg if seg.control else Segment(visible(seg.text), seg.style)
                 for seg in segments]
        return list(Segment.adjust_line_length(shown, width))
