"""One check in full: the detail (question, method, inputs at the worst corner, source, fix,
cautions) and, where a picture helps, its waveform in braille."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.widgets import ContentSwitcher, Footer

from reviewer.tui.screens.base import WorkbookScreen
from reviewer.tui.waveforms import picture
from reviewer.tui.widgets.banner import Banner, banner_text
from reviewer.tui.widgets.detail import CheckDetail, detail_text
from reviewer.tui.widgets.waveform import WaveformView


class CheckScreen(WorkbookScreen):
    """Detail and waveform of ``(stage, check)``; v switches between them."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [
        Binding("escape", "back", "Back"),
        Binding("v", "toggle_view", "Wave"),
        Binding("n", "toggle_corner", "Corner"),
        Binding("c", "sign_check", "Sign"),
        Binding("w", "waive", "Waive"),
        Binding("ctrl+z", "undo", "Undo", show=False),
        Binding("ctrl+s", "save", "Save", show=False),
    ]

    def __init__(self, stage: str, check: str, *, waveform: bool = False) -> None:
        super().__init__()
        self.stage = stage
        self.check = check
        self.corner = "worst"
        self.start_on_wave = waveform

    def compose(self) -> ComposeResult:
        yield Banner(id="banner")
        with ContentSwitcher(initial="detail-scroll", id="check-switch"):
            with VerticalScroll(id="detail-scroll"):
                yield CheckDetail(id="detail")
            yield WaveformView(id="wave")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        if self.start_on_wave:
            self.query_one(ContentSwitcher).current = "wave"
        self.refresh_view()
        self.query_one("#detail-scroll").focus()

    def refresh_view(self) -> None:
        s = self.session
        self.query_one(Banner).show(banner_text(s, f"{self.stage} · {self.check}"))
        r = s.result(self.stage, self.check)
        detail = self.query_one(CheckDetail)
        if r is None:
            detail.show(Text("computing…", style="italic"))
            return
        detail.show(detail_text(r, s.project, sign_state=s.sign_state(self.stage, self.check),
                                changed=s.sign_changed(self.stage, self.check),
                                signing=s.review_available,
                                limits=s.checklist.limits_for(self.check)))
        if self.query_one(ContentSwitcher).current == "wave":
            self.query_one(WaveformView).show(picture(r, s.project, self.corner))

    def action_toggle_view(self) -> None:
        sw = self.query_one(ContentSwitcher)
        sw.current = "detail-scroll" if sw.current == "wave" else "wave"
        self.refresh_view()

    def action_toggle_corner(self) -> None:
        self.corner = "nominal" if self.corner == "worst" else "worst"
        self.refresh_view()

    def action_back(self) -> None:
        self.dismiss()

    def edit_candidates(self) -> tuple[str, list[tuple[str, str, bool]]]:
        r = self.session.result(self.stage, self.check)
        read = list(r.snapshot.get("inputs", {})) if r else []
        return f"Change a value read by {self.check}", self._values_of(self.stage, read)

    def action_sign_check(self) -> None:
        self.sign_stage(self.stage, [self.check], "reviewed")

    def action_waive(self) -> None:
        self.waive_check(self.stage, self.check)


__all__ = ["CheckScreen"]
