"""Choose which value to change: the inputs the check read first, then the rest of the stage,
its parts, the supply and the conditions. Typing narrows the list (every word typed must be
in the path or its value); Enter takes the highlighted value."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.events import Key
from textual.screen import ModalScreen
from textual.widgets import Input, Label, OptionList
from textual.widgets.option_list import Option


def narrow(candidates: list[tuple[str, str, bool]], typed: str) -> list[int]:
    """Indexes of the candidates every word of ``typed`` is found in (path or current text),
    case ignored; a path typed in full comes first.

    >>> narrow([("stages.gate.series_r", "22 ohm", True), ("supply.voltage", "230 V", False)],
    ...        "gate r")
    [0]
    >>> narrow([("s.r_power", "2 W", False), ("s.r", "33 ohm", True)], "s.r")
    [1, 0]
    """
    words = typed.lower().split()
    hits = [i for i, (path, current, _) in enumerate(candidates)
            if all(w in f"{path} {current}".lower() for w in words)]
    exact = typed.strip().lower()
    return sorted(hits, key=lambda i: candidates[i][0].lower() != exact)


class PickValueDialog(ModalScreen[str | None]):
    """A list of ``(path, current text, marked)``; returns the chosen path or None.

    A path listed twice is offered once (the first, marked if either is)."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, title: str, candidates: list[tuple[str, str, bool]], *,
                 legend: str = "• read by this check   type to narrow   Enter: change   "
                               "Esc: cancel") -> None:
        super().__init__()
        self.title_text = title
        unique: dict[str, tuple[str, str, bool]] = {}
        for path, current, read in candidates:
            if path in unique:
                p, c, r = unique[path]
                unique[path] = (p, c, r or read)
            else:
                unique[path] = (path, current, read)
        self.candidates = list(unique.values())
        self.legend = legend
        self.shown: list[int] = list(range(len(self.candidates)))

    def compose(self) -> ComposeResult:
        with Vertical(id="pick-box"):
            yield Label(Text(self.title_text, style="bold"))
            yield Input(placeholder="type to narrow: a name, a part, a value", id="pick-filter")
            yield OptionList(*self._options(), id="pick-list")
            yield Label(Text(self.legend, style="dim"))

    def _options(self) -> list[Option]:
        w = max((len(p) for p, _, _ in self.candidates), default=10)
        out = []
        for i in self.shown:
            path, current, read = self.candidates[i]
            t = Text(f"{'•' if read else ' '} {path:<{w}}  ", style="bold" if read else "")
            t.append(current, style="dim")
            out.append(Option(t, id=str(i)))
        return out

    def on_mount(self) -> None:
        self.query_one("#pick-filter", Input).focus()
        if self.shown:
            self.query_one(OptionList).highlighted = 0

    def on_input_changed(self, event: Input.Changed) -> None:
        event.stop()
        self.shown = narrow(self.candidates, event.value)
        ol = self.query_one(OptionList)
        ol.clear_options()
        ol.add_options(self._options())
        if self.shown:
            ol.highlighted = 0

    def on_key(self, event: Key) -> None:
        # Up and Down move the list while the filter has the cursor.
        if event.key in ("down", "up") and self.focused is self.query_one("#pick-filter"):
            event.stop()
            ol = self.query_one(OptionList)
            if event.key == "down":
                ol.action_cursor_down()
            else:
                ol.action_cursor_up()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        ol = self.query_one(OptionList)
        if ol.highlighted is None or not self.shown:
            return
        self.dismiss(self.candidates[self.shown[ol.highlighted]][0])

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(self.candidates[int(event.option.id or 0)][0])

    @property
    def paths(self) -> list[str]:
        """The paths listed now (after the filter)."""
        return [self.candidates[i][0] for i in self.shown]

    def action_cancel(self) -> None:
        self.dismiss(None)
