"""Before a signature: exactly what is signed, its meaning, and a note (required to waive).

The dialog refuses (and says why) while there are unsaved edits, when the project is
read-only, or when this version cannot sign; it returns the note, or None when cancelled.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Input, Label, Static


class SignDialog(ModalScreen[str | None]):
    """Show ``what`` (a Text listing the checks, their status and inputs hash) and take a note."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, title: str, what: Text, *, meaning: str, note_required: bool = False,
                 refusal: str = "", note_check: Callable[[str], str | None] | None = None) -> None:
        super().__init__()
        self.note_check = note_check
        self.title_text = title
        self.what = what
        self.meaning = meaning
        self.note_required = note_required
        self.refusal = refusal

    def compose(self) -> ComposeResult:
        with Vertical(id="sign-box"):
            yield Label(Text(self.title_text, style="bold"))
            with VerticalScroll(id="sign-what"):
                yield Static(self.what, markup=False)
            yield Label(Text(f"meaning: {self.meaning}", style="bold"))
            if self.refusal:
                yield Static(Text(f"✗ cannot sign: {self.refusal}", style="bold red"),
                             id="sign-error", markup=False)
                yield Label(Text("Esc: close", style="dim"))
            else:
                label = "justification (required)" if self.note_required else "note (optional)"
                yield Input(placeholder=label, id="sign-note")
                yield Static("", id="sign-error", markup=False)
                yield Label(Text("Enter: sign   Esc: cancel", style="dim"))

    def on_mount(self) -> None:
        if not self.refusal:
            self.query_one("#sign-note", Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        note = event.value.strip()
        problem = None
        if self.note_required:
            problem = self.note_check(note) if self.note_check else (
                None if note else "a justification is required")
        if problem:
            self.query_one("#sign-error", Static).update(
                Text(f"✗ {problem}: say why this is acceptable", style="bold red"))
            return
        self.dismiss(note)

    def action_cancel(self) -> None:
        self.dismiss(None)
