"""Edit one value: validated by the same loader the files use, the error shown inline.

The dialog returns the validated new state of the project (never a half-checked text), or None
when cancelled. What was typed goes through ``reviewer.edits.apply_edit`` (tomlkit edit,
re-read, whole-project validation) before Enter is accepted.

In a variant, ``origin`` says which file the value comes from and where the edit goes (the
workbook writes only the file it opened: a base value edited there becomes an override).
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, Static

from reviewer.errors import LatchbookError
from reviewer.tui.session import State


class EditValueDialog(ModalScreen[State | None]):
    """Type a new value for ``path``; Enter checks it, Escape leaves it as it was."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, path: str, current: str, hint: str,
                 validate: Callable[[str, str], State], *, origin: str = "") -> None:
        super().__init__()
        self.origin = origin
        self.path = path
        self.current = current
        self.hint = hint
        self.validate = validate

    def compose(self) -> ComposeResult:
        with Vertical(id="edit-box"):
            yield Label(Text(f"Change {self.path}", style="bold"))
            yield Label(Text(f"now: {self.current or '(not given)'}", style="dim"))
            if self.origin:
                yield Static(Text(self.origin, style="bold" if "override" in self.origin
                                  else "dim"), id="edit-origin", markup=False)
            yield Input(value=self.current, id="edit-input", select_on_focus=True)
            yield Static(Text(self.hint, style="dim"), id="edit-hint")
            yield Static("", id="edit-error", markup=False)
            yield Label(Text("Enter: check and apply   Esc: cancel", style="dim"))

    def on_mount(self) -> None:
        self.query_one("#edit-input", Input).focus()

    def on_input_changed(self, event: Input.Changed) -> None:
        self.query_one("#edit-error", Static).update("")

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        try:
            state = self.validate(self.path, event.value)
        except LatchbookError as exc:
            err = self.query_one("#edit-error", Static)
            err.update(Text(f"✗ {exc.bare}", style="bold red"))
            return
        self.dismiss(state)

    def action_cancel(self) -> None:
        self.dismiss(None)
