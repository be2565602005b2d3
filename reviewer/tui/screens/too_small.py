"""Shown while the terminal is smaller than the workbook needs; it goes when the window grows."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.screen import ModalScreen
from textual.widgets import Static

MIN_WIDTH, MIN_HEIGHT = 80, 24


def too_small_text(width: int, height: int) -> Text:
    """What the panel says."""
    return Text.assemble(
        ("The workbook needs a terminal of at least ", ""),
        (f"{MIN_WIDTH}×{MIN_HEIGHT}", "bold"),
        (f".\nThis one is {width}×{height}. Make the window larger (or the font smaller); "
         "the workbook comes back as soon as it fits.\nctrl+q quits.", ""))


class TooSmallScreen(ModalScreen[None]):
    """A clear panel with the size needed."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")

    def __init__(self, width: int, height: int) -> None:
        super().__init__()
        self.size_now = (width, height)

    def compose(self) -> ComposeResult:
        yield Static(too_small_text(*self.size_now), id="small-panel", markup=False)

    def show_size(self, width: int, height: int) -> None:
        """Update the size shown."""
        self.query_one("#small-panel", Static).update(too_small_text(width, height))
