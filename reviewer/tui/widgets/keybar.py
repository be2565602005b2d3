"""The key bar at the bottom of every screen: every key the screen has, with what it does,
wrapped over as many lines as it needs (nothing falls off the right edge at 80 columns).

A key whose action does not apply right now is shown dimmed (pressing it says why). The bar
is redrawn only when what it would show changes, not on every ``refresh_bindings``.
"""

from __future__ import annotations

from collections.abc import Callable

from rich.text import Text
from textual.binding import Binding
from textual.geometry import Size
from textual.screen import Screen
from textual.widget import Widget

Key = tuple[str, str, bool]  # (key as shown, what it does, applies now)


def key_text(keys: list[Key], width: int = 10_000) -> Text:
    """The bar's content: ``key what`` pairs, dim where the action does not apply, laid out
    on lines of ``width`` cells; a pair is never split across lines."""
    out = Text(no_wrap=True, overflow="crop")
    used = 0
    for key, what, on in keys:
        pair = Text()
        pair.append(f" {key} ", style="reverse bold" if on else "reverse dim")
        pair.append(f" {what}", style="" if on else "dim")
        if used and used + 2 + pair.cell_len > width:
            out.append("\n")
            used = 0
        elif used:
            out.append("  ")
            used += 2
        out.append_text(pair)
        used += pair.cell_len
    return out


def screen_keys(screen: Screen[object], applies: Callable[[str], bool] | None = None) -> list[Key]:
    """Every shown key of ``screen`` (its own, its base's, the app's), one entry per action:
    keys of the same action share it (``? / f1 Help``)."""
    app = screen.app
    order: list[tuple[str, str]] = []
    keys: dict[tuple[str, str], list[str]] = {}
    own = list(Binding.make_bindings(type(screen).BINDINGS))
    rest = [b for _, b in screen._bindings]  # noqa: SLF001 - the merged map, base classes too
    for binding in [*own, *rest, *(b for _, b in app._bindings)]:  # noqa: SLF001
        if not binding.show or not binding.description:
            continue
        what = (binding.action, binding.description)
        if what not in keys:
            order.append(what)
            keys[what] = []
        shown = app.get_key_display(binding)
        if shown not in keys[what] and not any(shown in k for k in keys.values()):
            keys[what].append(shown)
    return [(" / ".join(keys[w]), w[1], applies(w[0]) if applies is not None else True)
            for w in order if keys[w]]


class KeyBar(Widget):
    """Every key of the screen it is on; docked at the bottom, as tall as its keys need."""

    DEFAULT_CSS = """
    KeyBar { dock: bottom; height: auto; max-height: 3; width: 100%; background: $panel; }
    """

    def __init__(self, **kw: object) -> None:
        super().__init__(**kw)  # type: ignore[arg-type]
        self._keys: list[Key] = []
        self._text = Text()

    def on_mount(self) -> None:
        self.screen.bindings_updated_signal.subscribe(self, self._changed)
        self._changed(self.screen)

    def on_unmount(self) -> None:
        self.screen.bindings_updated_signal.unsubscribe(self)

    def _changed(self, screen: Screen[object]) -> None:
        applies = getattr(screen, "applies_now", None)
        keys = screen_keys(screen, applies)
        if keys != self._keys:
            self._keys = keys
            self._text = key_text(keys, self.size.width or 80)
            self.refresh(layout=True)

    @property
    def keys(self) -> list[Key]:
        """What the bar shows now."""
        return list(self._keys)

    def get_content_height(self, container: Size, viewport: Size, width: int) -> int:
        return len(key_text(self._keys, width).plain.split("\n"))

    def on_resize(self) -> None:
        self._text = key_text(self._keys, self.size.width or 80)

    def render(self) -> Text:
        return self._text

    def plain(self) -> str:
        """The bar as text, one line per row (what a test reads)."""
        return self._text.plain
