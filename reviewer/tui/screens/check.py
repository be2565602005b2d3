"""One check in full: the detail (question, method, inputs at the worst corner, source, fix,
cautions) with its tolerance analysis and design aid, and, where a picture helps, its waveform
in braille."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.widgets import ContentSwitcher, Static

from reviewer.aids import failing
from reviewer.engine import Result
from reviewer.states import WAIVABLE
from reviewer.tui import analysis
from reviewer.tui.dialogs.pick_value import PickValueDialog
from reviewer.tui.screens.base import BACK, WorkbookScreen
from reviewer.tui.widgets.banner import Banner, banner_parts
from reviewer.tui.widgets.detail import CheckDetail, detail_head, detail_text
from reviewer.tui.widgets.keybar import KeyBar
from reviewer.tui.widgets.tolerance import AidView, TolerancePanel, ToleranceView
from reviewer.tui.widgets.waveform import WaveformView
from reviewer.waveforms import picture


class CheckScreen(WorkbookScreen):
    """Detail and waveform of ``(stage, check)``; v switches between them."""

    CSS_PATH = Path(__file__).with_suffix(".tcss")
    BINDINGS = [
        BACK,
        Binding("v", "toggle_view", "Wave"),
        Binding("o", "toggle_corner", "Corner"),
        Binding("y", "yield", "Yield"),
        Binding("i", "aid_input", "Aid input"),
        Binding("t", "try_value", "Try"),
        Binding("c", "sign_check", "Sign"),
        Binding("w", "waive", "Waive"),
        Binding("h", "history", "History"),
    ]

    def __init__(self, stage: str, check: str, *, waveform: bool = False) -> None:
        super().__init__()
        self.stage = stage
        self.check = check
        self.corner = "worst"
        self.start_on_wave = waveform
        self.view = ToleranceView()

    def compose(self) -> ComposeResult:
        yield Banner(id="banner")
        with ContentSwitcher(initial="detail-scroll", id="check-switch"):
            with VerticalScroll(id="detail-scroll"):
                yield Static("", id="detail-head", markup=False)
                yield TolerancePanel(id="tolerance")
                yield CheckDetail(id="detail")
            yield WaveformView(id="wave")
        yield KeyBar()

    def on_mount(self) -> None:
        if self.start_on_wave:
            self.query_one(ContentSwitcher).current = "wave"
        self.refresh_view()
        self._keep_focus()

    def refresh_view(self) -> None:
        s = self.session
        self.query_one(Banner).show(banner_parts(s, f"{self.stage} · {self.check}"))
        r = s.result(self.stage, self.check)
        detail = self.query_one(CheckDetail)
        head = self.query_one("#detail-head", Static)
        if r is None:
            head.update(Text("computing…", style="italic"))
            detail.show(Text(""))
            return
        limits = s.checklist.limits_for(self.check)
        head.update(detail_head(r, limits))
        self.view = self._tolerance(r)
        self.query_one(TolerancePanel).show(self.view)
        self.refresh_bindings()
        detail.show(detail_text(r, s.project, review=s.review(self.stage, self.check),
                                covering=s.covering(self.stage, self.check),
                                origin=s.origin_of if s.has_chain else None,
                                changed=s.sign_changed(self.stage, self.check),
                                signing=s.review_available, limits=limits, head=False))
        if self.query_one(ContentSwitcher).current == "wave":
            self.query_one(WaveformView).show(picture(r, s.project, self.corner))
        self._keep_focus()

    def _keep_focus(self) -> None:
        """The pane on show has the focus (arrows and page keys scroll it), whatever was
        redrawn or switched; a dialog on top keeps its own."""
        if self.app.screen is not self:
            return
        pane = self.query_one(f"#{self.query_one(ContentSwitcher).current}")
        if self.focused is not pane:
            pane.focus()

    # -- tolerance analysis and the design aid --------------------------------------------
    def _tolerance(self, r: Result) -> ToleranceView:
        s = self.session
        y = s.yield_of(self.stage, self.check)
        view = ToleranceView(yield_=y, running=s.yield_progress is not None, status=r.status,
                             ranking=analysis.ranking(r),
                             plot=analysis.yield_plot(r, y) if y is not None else None)
        if r.evaluation is None or not failing(r):
            return view
        inputs = analysis.aid_inputs(r)
        chosen = s.aid_choice.get((self.stage, self.check))
        names = {a.name for a in inputs}
        name = chosen if chosen in names else analysis.default_aid_input(r)
        aid = AidView(offered=True, choices=len(inputs))
        view.aid = aid
        if name is None:
            return view
        inp = r.evaluation.bound.inputs[name]
        aid.name, aid.path, aid.chosen = name, inp.path, chosen == name
        key = s.aid_key(r, name)
        if key in s.aids:
            aid.aid = s.aids[key]
            x = analysis.try_value(aid.aid, inp.value) if aid.aid is not None else None
            aid.try_text = analysis.edit_text(inp.value, x) if x is not None else ""
        else:
            aid.pending = True
            self.host.start_aid(r, name)
        return view

    def applies_now(self, action: str) -> bool:
        if action == "try_value":
            return bool(self.view.aid.try_text)
        if action == "aid_input":
            return self.view.aid.offered and self.view.aid.choices > 0
        if action == "waive":
            r = self.session.result(self.stage, self.check)
            return super().applies_now(action) and r is not None and r.status in WAIVABLE
        return super().applies_now(action)

    def history_scope(self) -> tuple[str | None, str | None]:
        return self.stage, self.check

    def action_yield(self) -> None:
        self.host.start_yield(self.stage)

    def action_aid_input(self) -> None:
        r = self.session.result(self.stage, self.check)
        if r is None or not failing(r):
            self.notify("the design aid is offered for a failing or marginal check",
                        markup=False)
            return
        inputs = analysis.aid_inputs(r)
        if not inputs:
            self.notify("none of the values a designer chooses here changes this check",
                        markup=False)
            return
        current = self.view.aid.path
        cands = [(a.path, f"share {a.share * 100:.0f} %", a.path == current) for a in inputs]
        by_path = {a.path: a.name for a in inputs}

        def picked(path: str | None) -> None:
            if path is None:
                return
            self.session.aid_choice[(self.stage, self.check)] = by_path[path]
            self.refresh_view()

        self.app.push_screen(PickValueDialog(
            f"Passing range of which input of {self.check}?", cands,
            legend="• the input shown now   Enter: choose   Esc: cancel"), picked)

    def action_try_value(self) -> None:
        a = self.view.aid
        if not a.offered:
            self.notify("the design aid is offered for a failing or marginal check",
                        markup=False)
            return
        if a.pending:
            self.notify("the passing range is still being computed", markup=False)
            return
        if not a.try_text:
            self.notify(f"no value of {a.path or 'any input'} to try: choose another input (i)",
                        markup=False)
            return
        if self.session.read_only:
            self.notify(f"read-only ({self.session.read_only_reason}): nothing can be changed",
                        severity="warning", markup=False)
            return
        state = self.attempt(lambda: self.session.propose(a.path, a.try_text))
        if state is not None:
            self._edited(state)

    # -- the rest -----------------------------------------------------------------------
    def action_toggle_view(self) -> None:
        sw = self.query_one(ContentSwitcher)
        sw.current = "detail-scroll" if sw.current == "wave" else "wave"
        self.refresh_view()
        self._keep_focus()

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
