"""The waveform panel: one braille chart per plot of a check, or the reason there is none."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.widgets import Static

from reviewer.tui.widgets.canvas import BrailleChart
from reviewer.waveforms import Picture


class WaveformView(VerticalScroll):
    """Shows a :class:`~reviewer.waveforms.Picture`; it scrolls and takes the focus, like the
    detail it stands in for."""

    DEFAULT_CSS = """
    WaveformView { height: 1fr; }
    WaveformView > #wave-note { height: auto; color: $text-muted; }
    """

    def compose(self) -> ComposeResult:
        yield Static("", id="wave-note", markup=False)

    def show(self, pic: Picture) -> None:
        """Replace the charts with those of ``pic``."""
        for chart in self.query(BrailleChart):
            chart.remove()
        note = Text()
        if pic.plots:
            note.append(f"at the {'worst corner' if pic.corner == 'worst' else 'nominal'}"
                        " (o: the other corner)", style="bold")
            if pic.nominal_used:
                note.append("; taken at nominal (not read by this check): "
                            + ", ".join(pic.nominal_used))
            for plot in pic.plots:
                for n in plot.notes:
                    note.append(f"\n{n}")
            self.mount_all([BrailleChart(p) for p in pic.plots],
                           before=self.query_one("#wave-note"))
        else:
            note.append(pic.reason)
        self.query_one("#wave-note", Static).update(note)
