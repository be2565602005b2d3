"""The tolerance panel of a check's detail: the Monte Carlo yield with a histogram of the
checked value, the sensitivity ranking as a bar list, and the design aid for a failing or
marginal check. The screen gathers what to show; the panel only lays it out."""

from __future__ import annotations

from dataclasses import dataclass, field

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.widgets import Static

from reviewer.aids import Aid
from reviewer.tolerance import Influence, Yield
from reviewer.tui import present
from reviewer.tui.widgets.canvas import BrailleChart
from reviewer.waveforms import Plot

_EIGHTHS = " ▏▎▍▌▋▊▉"
BAR = 14


@dataclass
class AidView:
    """What the design-aid part says: the input, the aid (once computed) and the try text."""

    offered: bool = False
    name: str = ""
    path: str = ""
    chosen: bool = False          # picked by the user, not the default
    pending: bool = False
    aid: Aid | None = None
    try_text: str = ""
    choices: int = 0


@dataclass
class ToleranceView:
    """Everything the panel shows for one check."""

    yield_: Yield | None = None
    running: bool = False
    ranking: list[Influence] = field(default_factory=list)
    aid: AidView = field(default_factory=AidView)
    plot: Plot | None = None
    status: str = ""  # the check's result at the corners, for the words under the yield


def bar(share: float, width: int = BAR) -> str:
    """A horizontal bar of ``share`` × ``width`` cells, in eighths."""
    eighths = max(0, min(width * 8, round(share * width * 8)))
    full, part = divmod(eighths, 8)
    return ("█" * full + (_EIGHTHS[part] if part else "")).ljust(width)


def _head(text: str, keys: str = "") -> Text:
    out = Text(f"\n{text}", style="bold underline")
    if keys:
        out.append(f"  ({keys})", style="dim")
    out.append("\n")
    return out


def yield_text(v: ToleranceView) -> Text:
    """The Monte Carlo part (the histogram is drawn below it)."""
    out = Text()
    out.append_text(_head("Monte Carlo yield", "y: run on this stage"))
    if v.yield_ is not None:
        out.append("  " + present.yield_line(v.yield_) + "\n")
        out.append("  95 % intervals; production spreads drawn (normal, tolerance = 3σ), "
                   "conditions held at the worst corner\n", style="dim")
        caveat = present.yield_caveat(v.yield_, v.status)
        if caveat:
            out.append(f"  {caveat}\n", style="yellow")
    elif v.running:
        out.append("  running…\n", style="italic")
    else:
        out.append("  not run on these inputs yet\n", style="dim")
    return out


def rest_text(v: ToleranceView, *, dominant_paths: int = 6) -> Text:
    """The histogram's notes, the sensitivity ranking and the design aid."""
    out = Text()
    if v.plot is not None:
        for n in v.plot.notes:
            out.append(f"  {n}\n", style="dim")
    out.append_text(_head("Sensitivity of the margin", "main effect over the corners"))
    ranking = [i for i in v.ranking if present.shown_path(i.path)]
    if ranking:
        top = ranking[:dominant_paths]
        w = max(len(present.path_text(i.path)) for i in top)
        for inf in top:
            out.append(f"  {present.path_text(inf.path):<{w}} ")
            out.append(bar(inf.share), style="bold" if inf is ranking[0] else "")
            out.append(f" {inf.share * 100:3.0f} %  ")
            if inf.effect:
                out.append("higher helps" if inf.effect > 0 else "lower helps", style="dim")
            out.append("\n")
        if len(ranking) > dominant_paths:
            out.append(f"  … {len(ranking) - dominant_paths} more with smaller shares\n",
                       style="dim")
    else:
        out.append("  no input varies: nothing to rank\n", style="dim")
    a = v.aid
    if a.offered:
        why = "your choice" if a.chosen else "largest share"
        keys = "i: choose the input" + (", t: try the value" if a.try_text else "")
        out.append_text(_head("Design aid", keys))
        if not a.name:
            out.append("  none of the values a designer chooses here (a resistor, capacitor, "
                       "inductor or a rating to buy) changes this check's result\n",
                       style="dim")
        elif a.pending:
            out.append(f"  passing range of {a.path} ({why}): computing…\n", style="italic")
        elif a.aid is None:
            out.append(f"  no value of {a.path} between 0.02× and 50× its value passes at "
                       f"every corner ({why}); try another input (i)\n")
        else:
            out.append(f"  {a.aid.text()}  ({why})\n")
            if a.try_text:
                out.append("  t ", style="reverse bold")
                out.append(f" try {a.path} = {a.try_text}", style="bold")
                out.append("  (an ordinary edit: ctrl+z undoes it)\n", style="dim")
    return out


class TolerancePanel(Vertical):
    """The yield with the histogram of the Monte Carlo samples, then the ranking and the aid."""

    DEFAULT_CSS = """
    TolerancePanel { height: auto; }
    TolerancePanel > #histogram { height: 10; }
    """

    def compose(self) -> ComposeResult:
        yield Static("", id="tol-yield", markup=False)
        yield BrailleChart(id="histogram")
        yield Static("", id="tol-rest", markup=False)

    def on_mount(self) -> None:
        self.query_one(BrailleChart).display = False

    def show(self, view: ToleranceView) -> None:
        """Replace what the panel shows."""
        self.query_one("#tol-yield", Static).update(yield_text(view))
        chart = self.query_one(BrailleChart)
        chart.display = view.plot is not None
        chart.plot = view.plot
        self.query_one("#tol-rest", Static).update(rest_text(view))
