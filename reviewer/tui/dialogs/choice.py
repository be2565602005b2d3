"""A question with a few answers, each on its own key (recover edits? quit without saving?)."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.events import Key
from textual.screen import ModalScreen
from textual.widgets import Label, Static


class ChoiceDialog(ModalScreen[str | None]):
    """``choices`` are ``(key, answer, label)``; the key returns the answer, Esc returns None."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, title: str, body: Text | str, choices: list[tuple[str, str, str]]) -> None:
        super().__init__()
        self.title_text = title
        self.body = body if isinstance(body, Text) else Text(body)
        self.choices = choices

    def compose(self) -> ComposeResult:
        with Vertical(id="choice-box"):
            yield Label(Text(self.title_text, style="bold"))
            yield Static(self.body, markup=False, id="choice-body")
            line = Text()
            for key, _, label in self.choices:
                line.append(f" {key} ", style="reverse bold")
                line.append(f" {label}   ")
            yield Label(line)

    def on_key(self, event: Key) -> None:
        for key, answer, _ in self.choices:
            if event.key == key:
                event.stop()
                self.dismiss(answer)
                return

    def action_cancel(self) -> None:
        self.dismiss(None)
