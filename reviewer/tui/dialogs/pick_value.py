"""Choose which value to change: the inputs the check read first, then the rest of the stage,
its parts, the supply and the conditions."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Label, OptionList
from textual.widgets.option_list import Option


class PickValueDialog(ModalScreen[str | None]):
    """A list of ``(path, current text, marked)``; returns the chosen path or None."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, title: str, candidates: list[tuple[str, str, bool]], *,
                 legend: str = "• read by this check   Enter: change   Esc: cancel") -> None:
        super().__init__()
        self.title_text = title
        self.candidates = candidates
        self.legend = legend

    def compose(self) -> ComposeResult:
        with Vertical(id="pick-box"):
            yield Label(Text(self.title_text, style="bold"))
            options = []
            w = max((len(p) for p, _, _ in self.candidates), default=10)
            for path, current, read in self.candidates:
                t = Text(f"{'•' if read else ' '} {path:<{w}}  ", style="bold" if read else "")
                t.append(current, style="dim")
                options.append(Option(t, id=path))
            yield OptionList(*options, id="pick-list")
            yield Label(Text(self.legend, style="dim"))

    def on_mount(self) -> None:
        self.query_one("#pick-list", OptionList).focus()

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(event.option.id)

    def action_cancel(self) -> None:
        self.dismiss(None)
