"""Waveform figures for the reports: which checks get a plot, and each plot as inline SVG.

A plot stands beside the check it explains, at that check's own corner: the timing capacitor
beside ``osc.timing``, the step across the SCR beside the snubber's dv/dt and peak checks, the
commutation waveforms beside ``turnoff.time``, the load waveform beside ``power.output``, the
firing angle over the pot's travel beside ``diac.firing-range``, and any failing or marginal
check that has a waveform. A picture identical to one already shown in the stage is not drawn
twice; the check says where it is. Axes name the quantity and its unit ("capacitor voltage
[V]"); marker labels sit inside the figure's bounding box.
"""

from __future__ import annotations

import hashlib
import io
import math
import re
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from reviewer.reports.text import unit_symbol
from reviewer.waveforms import has_waveform, picture

MAX_POINTS = 800

# The checks whose waveform tells the reader what the check computed.
EXPLAINS = ("osc.timing", "snubber.dvdt", "snubber.peak-voltage", "turnoff.time",
            "turnoff.peak-current", "power.output", "triac.output",
            "triac.commutation", "diac.firing-range")
_QUANTITY = {"V": "voltage", "A": "current", "W": "power", "s": "time", "Hz": "frequency"}


@dataclass
class Figure:
    """One drawn plot: its caption, the SVG text and a file-safe name."""

    caption: str
    svg: str
    name: str


@dataclass
class CheckFigures:
    """The figures drawn beside one check, or a note where they are (or why there are none)."""

    figures: list[Figure] = field(default_factory=list)
    note: str = ""


def _fingerprint(plots: list[Any]) -> str:
    h = hashlib.sha256()
    for p in plots:
        h.update(p.title.encode())
        h.update(np.asarray(p.t, dtype=float).round(12).tobytes())
        for s in p.series:
            with np.errstate(over="ignore", invalid="ignore"):  # a huge value hashes as inf
                h.update(np.asarray(s.y, dtype=float).round(9).tobytes())
    return h.hexdigest()


def slug(text: str) -> str:
    return re.sub(r"[^a-z0-9]+", "-", text.lower()).strip("-")


def _picture(r: Any, project: Any) -> tuple[Any, str]:
    """(the check's picture at its worst corner, a fingerprint of its curves or "")."""
    pic = picture(r, project, "worst" if r.evaluation is not None else "nominal")
    return pic, _fingerprint(pic.plots) if pic.plots else ""


def _draw(r: Any, pic: Any) -> tuple[list[Figure], str]:
    """(figures, reason for none) for one check's picture."""
    if not pic.plots:
        return [], pic.reason
    corner = "its worst corner" if pic.corner == "worst" else "its nominal"
    cap = f"at {corner}"
    if pic.nominal_used:
        cap += "; at their nominal: " + ", ".join(pic.nominal_used)
    out = []
    for k, plot in enumerate(pic.plots):
        notes = "; ".join(plot.notes)
        try:
            svg = plot_svg(plot)
        except (ValueError, FloatingPointError) as exc:
            return [], f"no waveform: the plot could not be drawn ({exc})"
        out.append(Figure(f"{plot.title} ({cap}{'; ' + notes if notes else ''})", svg,
                          f"{slug(r.stage)}-{slug(r.check)}-{k + 1}"))
    return out, ""


def stage_figures(results: list[Any], project: Any) -> tuple[dict[str, CheckFigures], str]:
    """The figures of one stage's checks, keyed by check id, and the stage's reason for none."""
    wanted = [r for r in results if has_waveform(r.check)
              and (r.check in EXPLAINS or r.status in ("fail", "marginal"))]
    out: dict[str, CheckFigures] = {}
    seen: dict[str, str] = {}
    reason = "no waveform for this stage"
    for r in wanted:
        pic, fp = _picture(r, project)
        if fp and fp in seen:  # the same curves: drawn once, under the first check
            out[r.check] = CheckFigures(note=f"its waveform is the one shown under {seen[fp]}")
            continue
        figs, why = _draw(r, pic)
        if not figs:
            reason = why or reason
            continue
        seen[fp] = r.check
        out[r.check] = CheckFigures(figs)
    if not any(c.figures for c in out.values()):
        # Nothing the stage's explaining checks could draw: the first check that can.
        for r in results:
            if has_waveform(r.check) and r not in wanted:
                figs, why = _draw(r, _picture(r, project)[0])
                if figs:
                    out[r.check] = CheckFigures(figs)
                    break
                reason = why or reason
    return out, "" if any(c.figures for c in out.values()) else reason


def _time_scale(t_max: float) -> tuple[float, str]:
    for scale, unit in ((1.0, "s"), (1e-3, "ms"), (1e-6, "µs"), (1e-9, "ns")):
        if t_max >= 10 * scale or scale == 1e-9:
            return scale, unit
    return 1.0, "s"


def axis_label(quantity: str, unit: str) -> str:
    """``capacitor voltage [V]``; the quantity alone where there is no unit.

    >>> axis_label("load current", "A"), axis_label("samples", "")
    ('load current [A]', 'samples')
    """
    u = unit_symbol(unit)
    return f"{quantity} [{u}]" if u else quantity


def _y_quantity(plot: Any, unit: str) -> str:
    given = getattr(plot, "y_label", "")
    if given:
        return given
    return _QUANTITY.get(unit, "value")


def merge_marks(marks: list[tuple[float, str]], span: float) -> list[tuple[float, str]]:
    """Marks closer than 1.5 % of the x span share one line and one label, so that their
    labels do not print over each other.

    >>> merge_marks([(0.0, "a"), (10.0, "b"), (10.1, "c"), (10.1, "c")], 100.0)
    [(0.0, 'a'), (10.0, 'b, c')]
    """
    out: list[tuple[float, list[str]]] = []
    for x, label in sorted((m for m in marks if math.isfinite(m[0])), key=lambda m: m[0]):
        if out and abs(x - out[-1][0]) < 0.015 * span:
            if label not in out[-1][1]:
                out[-1][1].append(label)
        else:
            out.append((x, [label]))
    return [(x, ", ".join(labels)) for x, labels in out]


def plot_svg(plot: Any) -> str:
    """One chart as an inline ``<svg>`` element (no XML prolog, no metadata, no links)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure as MplFigure

    t = np.asarray(plot.t, dtype=float).reshape(-1)
    if t.size < 2 or not np.isfinite(t).any():
        raise ValueError("no samples to draw")
    step = max(1, t.size // MAX_POINTS)
    is_time = getattr(plot, "x_unit", "s") == "s"
    scale, tunit = _time_scale(float(np.nanmax(np.abs(t)))) if is_time else (1.0, plot.x_unit)
    fig = MplFigure(figsize=(7.0, 2.7), dpi=100)
    FigureCanvasAgg(fig)
    ax = fig.add_subplot(1, 1, 1)
    units = []
    for s in plot.series:
        y = np.asarray(s.y, dtype=float).reshape(-1)
        if y.size != t.size:
            continue
        if getattr(plot, "bars", False) and not units:
            width = float(np.median(np.diff(t))) / scale if t.size > 1 else 1.0
            ax.bar(t / scale, y, width=width, label=s.name, color="0.55")
        else:
            ax.plot(t[::step] / scale, y[::step], label=s.name,
                    linestyle=":" if s.dotted else "-", linewidth=0.9 if s.dotted else 1.5)
        units.append(s.unit)
    for x, label in merge_marks(plot.marks[:12], float(np.nanmax(t) - np.nanmin(t))):
        if math.isfinite(x):
            ax.axvline(x / scale, color="0.6", linewidth=0.6)
            # Above the axes, off the curves; the tight bounding box below keeps it whole.
            ax.annotate(label, (x / scale, 1.0), xycoords=("data", "axes fraction"),
                        xytext=(0, 2), textcoords="offset points", fontsize=7, color="0.3",
                        rotation=90, va="bottom", ha="center", annotation_clip=False)
    ax.set_xlabel(axis_label("time", tunit) if is_time else axis_label("value", tunit))
    if units:
        ax.set_ylabel(axis_label(_y_quantity(plot, units[0]), units[0]))
    ax.grid(True, linewidth=0.3)
    if len(units) > 1 or (units and plot.series[0].name):
        # Outside the axes, right of the plot: never over a curve or a marker label.
        ax.legend(fontsize=7, loc="upper left", bbox_to_anchor=(1.01, 1.0), frameon=False,
                  borderaxespad=0.0)
    buf = io.StringIO()  # the tight bounding box alone places everything: no layout pass
    with _svg_settings():
        fig.savefig(buf, format="svg", metadata={"Date": None}, bbox_inches="tight",
                    pad_inches=0.08)
    svg = buf.getvalue()
    svg = svg[svg.index("<svg"):]
    svg = re.sub(r"<metadata>.*?</metadata>", "", svg, flags=re.S)
    # Inline SVG in HTML needs no namespace declarations; without them the file names no URL.
    return re.sub(r'\s+xmlns(?::\w+)?="[^"]*"', "", svg, count=3)


def standalone_svg(svg: str) -> str:
    """An inline ``<svg>`` element as a file a browser opens on its own (namespace restored)."""
    ns = ' xmlns="http://www.w3.org/2000/svg"'
    if "xlink:" in svg:
        ns += ' xmlns:xlink="http://www.w3.org/1999/xlink"'
    return '<?xml version="1.0" encoding="utf-8"?>\n' + re.sub(r"^<svg\b", "<svg" + ns,
                                                                 svg.lstrip(), count=1)


class _svg_settings:
    """Text as text (small, searchable) and stable element ids while saving."""

    def __enter__(self) -> None:
        import matplotlib

        self._ctx = matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "latchbook"})
        self._ctx.__enter__()

    def __exit__(self, *exc: object) -> None:
        self._ctx.__exit__(*exc)
