"""A small braille chart for the terminal: curves as 2×4 dots per cell, labelled axes.

Each cell holds a braille character (U+2800 + an 8-bit dot mask). Curves are drawn as connected
runs of dots; reference curves (``dotted``) light every other dot, so they stay apart from the
main curve in monochrome as well as in colour. Marked instants get a ``┴`` on the time axis.
"""

from __future__ import annotations

import numpy as np
from rich.console import RenderableType
from rich.text import Text
from textual.reactive import reactive
from textual.widget import Widget

from reviewer.fmt import eng
from reviewer.waveforms import Plot

# Dot bits of a braille cell, by (column, row) inside the cell.
_BITS = ((0x01, 0x02, 0x04, 0x40), (0x08, 0x10, 0x20, 0x80))
_STYLES = ("bold $accent", "$warning", "$secondary", "$success")


def braille_grid(width: int, height: int, curves: list[tuple[np.ndarray, np.ndarray, bool]],
                 x_range: tuple[float, float], y_range: tuple[float, float], *,
                 bars: bool = False) -> tuple[list[list[int]], list[list[int]]]:
    """Rasterise curves into ``height`` × ``width`` cells of braille dot masks.

    Returns the masks and, per cell, the index of the first curve that lit it (−1: none).
    Points outside the ranges are clipped to the edge; NaN samples break the line. With
    ``bars`` each dot column is filled from the first curve's value down to the x axis, the
    value of the nearest sample (a histogram's bins).
    """
    if bars:
        return _bar_grid(width, height, curves[0][0], curves[0][1], x_range, y_range)
    masks = [[0] * width for _ in range(height)]
    owner = [[-1] * width for _ in range(height)]
    pw, ph = width * 2, height * 4
    x0, x1 = x_range
    y0, y1 = y_range
    sx = (pw - 1) / (x1 - x0) if x1 > x0 else 0.0
    sy = (ph - 1) / (y1 - y0) if y1 > y0 else 0.0
    for ci, (xs, ys, dotted) in enumerate(curves):
        ok = np.isfinite(xs) & np.isfinite(ys)
        px = np.clip(np.round((xs - x0) * sx), 0, pw - 1)
        py = np.clip(np.round((y1 - ys) * sy), 0, ph - 1)
        prev: tuple[int, int] | None = None
        for good, fx, fy in zip(ok, px, py, strict=True):
            if not good:
                prev = None
                continue
            x, y = int(fx), int(fy)
            pts = [(x, y)] if prev is None else _segment(prev, (x, y))
            for qx, qy in pts:
                if dotted and (qx + qy) % 2:
                    continue
                cy, cx = qy // 4, qx // 2
                masks[cy][cx] |= _BITS[qx % 2][qy % 4]
                if owner[cy][cx] < 0:
                    owner[cy][cx] = ci
            prev = (x, y)
    return masks, owner


def _bar_grid(width: int, height: int, xs: np.ndarray, ys: np.ndarray,
              x_range: tuple[float, float],
              y_range: tuple[float, float]) -> tuple[list[list[int]], list[list[int]]]:
    masks = [[0] * width for _ in range(height)]
    owner = [[-1] * width for _ in range(height)]
    pw, ph = width * 2, height * 4
    x0, x1 = x_range
    y0, y1 = y_range
    px = x0 + (np.arange(pw) + 0.5) * (x1 - x0) / pw  # the centre of each dot column
    order = np.argsort(xs)
    xs, ys = np.asarray(xs, dtype=float)[order], np.asarray(ys, dtype=float)[order]
    step = float(np.median(np.diff(xs))) if xs.size > 1 else (x1 - x0)
    idx = np.clip(np.searchsorted(xs, px), 1, max(1, xs.size - 1)) if xs.size > 1 else \
        np.zeros(pw, dtype=int)
    if xs.size > 1:
        left = idx - 1
        idx = np.where(np.abs(px - xs[left]) <= np.abs(px - xs[idx]), left, idx)
    near = np.abs(px - xs[idx]) <= 0.5 * step + 1e-12 * max(1.0, abs(step))
    sy = (ph - 1) / (y1 - y0) if y1 > y0 else 0.0
    for qx in range(pw):
        y = float(ys[idx[qx]])
        if not near[qx] or not np.isfinite(y) or y <= y0:
            continue
        top = int(np.clip(round((y1 - y) * sy), 0, ph - 1))
        for qy in range(top, ph):
            cy, cx = qy // 4, qx // 2
            masks[cy][cx] |= _BITS[qx % 2][qy % 4]
            owner[cy][cx] = 0
    return masks, owner


def _segment(a: tuple[int, int], b: tuple[int, int]) -> list[tuple[int, int]]:
    """The dots from ``a`` to ``b`` (a vertical run at each column, so steep edges stay joined)."""
    (xa, ya), (xb, yb) = a, b
    n = max(abs(xb - xa), abs(yb - ya), 1)
    return [(round(xa + (xb - xa) * i / n), round(ya + (yb - ya) * i / n)) for i in range(n + 1)]


class BrailleChart(Widget):
    """Draws one :class:`~reviewer.waveforms.Plot` to fill the widget (curves, or bars)."""

    DEFAULT_CSS = """
    BrailleChart { height: 1fr; min-height: 6; }
    """
    plot: reactive[Plot | None] = reactive(None, layout=True)

    def __init__(self, plot: Plot | None = None, **kw: object) -> None:
        super().__init__(**kw)  # type: ignore[arg-type]
        self.set_reactive(BrailleChart.plot, plot)

    def _style(self, spec: str) -> str:
        """A theme colour (``$accent``) as a Rich style, from the running app's theme."""
        words = []
        for w in spec.split():
            if w.startswith("$"):
                w = self.app.theme_variables.get(w[1:], "") or ""
            if w:
                words.append(w)
        return " ".join(words)

    def render(self) -> RenderableType:
        plot = self.plot
        width, height = self.size.width, self.size.height
        if plot is None or width < 20 or height < 4:
            return Text("(too small to draw)", style="dim")
        label_w = 9
        cols, rows = width - label_w - 1, height - 3
        t = np.asarray(plot.t, dtype=float)
        ys = [np.asarray(s.y, dtype=float) for s in plot.series]
        finite = np.concatenate([y[np.isfinite(y)] for y in ys] or [np.zeros(1)])
        lo, hi = (float(finite.min()), float(finite.max())) if finite.size else (0.0, 1.0)
        if hi - lo < 1e-12 * max(1.0, abs(hi)):
            lo, hi = lo - 1.0, hi + 1.0
        pad = (hi - lo) * 0.05
        lo, hi = (0.0, hi + pad) if plot.bars else (lo - pad, hi + pad)
        x0, x1 = float(t[0]), float(t[-1])
        if plot.bars and t.size > 1:  # the bins' outer edges, so the end bars are whole
            half = 0.5 * (x1 - x0) / (t.size - 1)
            x0, x1 = x0 - half, x1 + half
        curves = [(t, y, s.dotted) for y, s in zip(ys, plot.series, strict=True)]
        masks, owner = braille_grid(cols, rows, curves, (x0, x1), (lo, hi), bars=plot.bars)
        unit = plot.series[0].unit if plot.series else ""
        out = Text(no_wrap=True, overflow="crop")
        legend = Text("  ".join(f"{'┄' if s.dotted else '━'} {s.name}" for s in plot.series))
        head = Text(plot.title, style="bold")
        head.append("  ")
        head.append_text(legend)
        head.truncate(width, overflow="ellipsis")
        out.append_text(head)
        out.append("\n")
        span = x1 - x0
        # A histogram's marks (its limit) run up through the chart as well as on the axis.
        lines = {min(cols - 1, int((x - x0) / span * cols)) for x, _ in plot.marks
                 if plot.bars and span > 0 and x0 <= x <= x1}
        for r in range(rows):
            if r == 0:
                lab = eng(hi, unit, 3)
            elif r == rows - 1:
                lab = eng(lo, unit, 3)
            elif rows > 4 and r == rows // 2:
                lab = eng((hi + lo) / 2, unit, 3)
            else:
                lab = ""
            out.append(f"{lab:>{label_w}}│", style="dim")
            for c in range(cols):
                m = masks[r][c]
                if m:
                    style = _STYLES[owner[r][c] % len(_STYLES)]
                    out.append(chr(0x2800 + m), style=self._style(style))
                elif c in lines:
                    out.append("┊", style=self._style("$error"))
                else:
                    out.append(" ")
            out.append("\n")
        axis = ["─"] * cols
        for x, _ in plot.marks:
            if span > 0 and x0 <= x <= x1:
                axis[min(cols - 1, int((x - x0) / span * (cols if plot.bars else cols - 1)))] = "┴"
        out.append(" " * label_w + "└" + "".join(axis) + "\n", style="dim")
        # Times and a histogram's values alike, in engineering notation (report units).
        left, right = eng(x0, plot.x_unit, si=False), eng(x1, plot.x_unit, si=False)
        marks = sorted({m for _, m in plot.marks})
        mid = ("┴ " + ", ".join(marks)) if marks else ""
        gap = max(1, cols - len(left) - len(right) - len(mid))
        out.append(" " * (label_w + 1) + left + " " * (gap // 2) + mid
                   + " " * (gap - gap // 2) + right, style="dim")
        return out
