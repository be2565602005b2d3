"""Revoke an earlier history entry: choose it, give the reason (required)."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, OptionList, Static
from textual.widgets.option_list import Option


class RevokeDialog(ModalScreen[tuple[int, str] | None]):
    """Entries as ``(seq, line)``; returns ``(seq, reason)`` or None."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, entries: list[tuple[int, str]], refusal: str = "") -> None:
        super().__init__()
        self.entries = entries
        self.refusal = refusal
        self.seq: int | None = None

    def compose(self) -> ComposeResult:
        with Vertical(id="revoke-box"):
            yield Label(Text("Revoke an entry of the history", style="bold"))
            if self.refusal or not self.entries:
                msg = self.refusal or "nothing to revoke: the history has no entries"
                yield Static(Text(f"✗ {msg}", style="bold red"), markup=False)
                yield Label(Text("Esc: close", style="dim"))
                return
            yield OptionList(*[Option(Text(line), id=str(seq)) for seq, line in self.entries],
                             id="revoke-list")
            yield Input(placeholder="reason (required)", id="revoke-note")
            yield Static("", id="revoke-error", markup=False)
            yield Label(Text("Enter on an entry, then the reason   Esc: cancel", style="dim"))

    def on_mount(self) -> None:
        # One entry offered (revoking from the history): it is chosen; type the reason.
        if len(self.entries) == 1 and not self.refusal:
            self.seq = self.entries[0][0]
            self.query_one("#revoke-note", Input).focus()

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.seq = int(event.option.id or 0)
        self.query_one("#revoke-note", Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        err = self.query_one("#revoke-error", Static)
        if self.seq is None:
            err.update(Text("✗ choose the entry first", style="bold red"))
            return
        if not event.value.strip():
            err.update(Text("✗ a revocation needs a reason", style="bold red"))
            return
        self.dismiss((self.seq, event.value.strip()))

    def action_cancel(self) -> None:
        self.dismiss(None)
