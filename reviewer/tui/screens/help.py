"""Every key of the workbook, read from the bindings themselves, and the cautions."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.screen import Screen
from textual.widgets import Static

from reviewer.tui.safety import GENERAL, SAFETY_LINE
from reviewer.tui.widgets.keybar import KeyBar

# How a key is written for people (the rest: as Textual names it, ctrl+s as ^s).
KEY_NAMES = {"question_mark": "?", "slash": "/", "escape": "Esc", "enter": "Enter"}


def key_name(key: str) -> str:
    """``question_mark,f1`` → ``? / f1``; ``ctrl+s`` → ``^s``."""
    names = []
    for k in key.split(","):
        k = k.strip()
        names.append(KEY_NAMES.get(k, "^" + k[5:] if k.startswith("ctrl+") else k))
    return " / ".join(names)


def _rows(bindings: list[BindingType]) -> list[tuple[str, str]]:
    out = []
    for b in bindings:
        if isinstance(b, Binding):
            out.append((key_name(b.key), b.description or b.action))
        elif isinstance(b, tuple):
            out.append((key_name(str(b[0])), str(b[2]) if len(b) > 2 else str(b[1])))
    return out


def help_text(sections: list[tuple[str, list[BindingType]]], notes: Text | None = None) -> Text:
    """The help page: each screen's keys, ``notes`` (the filters, who may approve), then the
    cautions."""
    out = Text()
    out.append("Latchbook workbook — keys\n", style="bold")
    for title, bindings in sections:
        out.append(f"\n{title}\n", style="bold underline")
        for key, what in _rows(bindings):
            out.append(f"  {key:<10}", style="bold")
            out.append(f" {what}\n")
    out.append("\nValues are typed in the file's grammar: 47 kohm ±5%, 4k7, 230 V +10% -15%, "
               '{ min = "10 kohm", max = "110 kohm" }, a bare number only where the key has '
               "no unit.\n")
    out.append("Sign-offs cover the file on disk: save (or undo) edits first. A waiver needs "
               "a written reason and reads \"FAIL | waived\", never pass.\n")
    out.append("ctrl+p finds any check, value, stage or command, and the other projects of "
               "the folder: type a few letters (\"junction\", \"report\").\n")
    if notes is not None:
        out.append("\n")
        out.append_text(notes)
    out.append("\nCautions\n", style="bold underline")
    for c in GENERAL:
        out.append(f"  ⚠ {c}\n")
    out.append(f"\n{SAFETY_LINE}\n", style="italic")
    return out


class HelpScreen(Screen[None]):
    """The key list; Escape or ? closes it."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [Binding("escape,question_mark,f1", "close", "Close")]

    def __init__(self, sections: list[tuple[str, list[BindingType]]],
                 notes: Text | None = None) -> None:
        super().__init__()
        self.sections = sections
        self.notes = notes

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="help-scroll"):
            yield Static(help_text(self.sections, self.notes), markup=False)
        yield KeyBar()

    def on_mount(self) -> None:
        self.query_one("#help-scroll").focus()

    def action_close(self) -> None:
        self.dismiss()
