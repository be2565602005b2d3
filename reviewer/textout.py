"""Plain-text tables for the command line, fitted to the width they are read at.

The width is ``COLUMNS`` when set (shells, CI runners and ``COLUMNS=100 latchbook …`` set it),
else the terminal's own width, else :data:`PIPE_WIDTH` for a pipe or file. Cells that carry a
meaning (state words, margins, names) are never cut; only prose wraps, and only between words:
a number stays with its unit and a relation sign with its number. No line ends in spaces.
Colour (ANSI) only on a terminal, and never with ``NO_COLOR`` or ``TERM=dumb``.
"""

from __future__ import annotations

import os
import re
import textwrap
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

PIPE_WIDTH = 110
MIN_WIDTH = 40
GAP = "  "
_NBSP = "\u00a0"
# "26.4 V", "≤ 180 nF", "× 2": keep each pair on one line when wrapping.
_UNIT_SPACE = re.compile(r"(?<=\d) (?=[A-Za-zµΩ°%×²]\S{0,8}(?:\s|$))")
_SIGN_SPACE = re.compile(r"(?<=[≤≥<>=×~≈]) (?=[\d−+\-.∞])")

_ANSI = {"green": "32", "yellow": "33", "bold yellow": "1;33", "red": "31", "bold red": "1;31",
         "magenta": "35", "bold magenta": "1;35", "cyan": "36", "dim": "2", "bold": "1"}


def _isatty(stream: Any) -> bool:
    try:
        return bool(stream.isatty())
    except (AttributeError, ValueError):
        return False


def width_for(stream: Any) -> int:
    """The width to lay a table out at for ``stream`` (at least :data:`MIN_WIDTH`)."""
    env = os.environ.get("COLUMNS", "").strip()
    if env.isdigit() and int(env) > 0:
        return max(MIN_WIDTH, int(env))
    if _isatty(stream):
        try:
            return max(MIN_WIDTH, os.get_terminal_size(stream.fileno()).columns)
        except (OSError, AttributeError, ValueError):
            pass
    return PIPE_WIDTH


def colour_for(stream: Any) -> bool:
    """True when ``stream`` is a terminal that wants colour."""
    if os.environ.get("NO_COLOR") or os.environ.get("TERM") == "dumb":
        return False
    return _isatty(stream)


def paint(text: str, style: str, colour: bool) -> str:
    """``text`` in ``style`` (a key of the small ANSI table) when ``colour``; else as is."""
    code = _ANSI.get(style)
    if not colour or not code or not text:
        return text
    return f"\x1b[{code}m{text}\x1b[0m"


def wrap(text: str, width: int) -> list[str]:
    """Lines of at most ``width`` characters, broken only between words (a word longer than
    the line stands alone on its line rather than being cut)."""
    glued = _SIGN_SPACE.sub(_NBSP, _UNIT_SPACE.sub(_NBSP, text))
    lines = textwrap.wrap(glued, max(1, width), break_long_words=False,
                          break_on_hyphens=False) or [""]
    return [ln.replace(_NBSP, " ") for ln in lines]


@dataclass
class Col:
    """A column: its header and whether its cells align right."""

    header: str
    right: bool = False


def _cell(text: str, w: int, right: bool) -> str:
    return text.rjust(w) if right else text.ljust(w)


def grid(cols: Sequence[Col], rows: Sequence[Sequence[str]], *,
         styles: Sequence[Sequence[str]] | None = None, colour: bool = False) -> list[str]:
    """Fixed columns, each as wide as its widest cell; no cell is cut, no line ends in spaces.

    ``styles`` (same shape as ``rows``) names the style of each cell, "" for none.
    """
    widths = widths_of(cols, rows)
    out = [GAP.join(_cell(c.header, w, c.right) for c, w in zip(cols, widths, strict=True))
           .rstrip(),
           GAP.join("─" * w for w in widths)]
    for n, r in enumerate(rows):
        cells = []
        for i, (c, w) in enumerate(zip(cols, widths, strict=True)):
            text = _cell(r[i], w, c.right)
            style = styles[n][i] if styles else ""
            if style and r[i]:
                pad = len(text) - len(r[i])
                text = (" " * pad + paint(r[i], style, colour)) if c.right else \
                    (paint(r[i], style, colour) + " " * pad)
            cells.append(text)
        out.append(GAP.join(cells).rstrip())
    return out


def widths_of(cols: Sequence[Col], rows: Sequence[Sequence[str]]) -> list[int]:
    """The width each column of :func:`grid` takes."""
    return [max([len(c.header)] + [len(r[i]) for r in rows]) for i, c in enumerate(cols)]


def with_prose(cols: Sequence[Col], rows: Sequence[Sequence[str]], prose: Sequence[str],
               header: str, width: int, *, styles: Sequence[Sequence[str]] | None = None,
               colour: bool = False, min_prose: int = 44, indent: int = 4) -> list[str]:
    """A grid with one prose column: beside the fixed columns when at least ``min_prose``
    characters are left for it, else wrapped under each row, indented by ``indent``."""
    widths = widths_of(cols, rows)
    fixed = sum(widths) + len(GAP) * len(widths)
    room = width - fixed
    beside = room >= min_prose
    lines = grid(cols, rows, styles=styles, colour=colour)
    head, rule, body = lines[0], lines[1], lines[2:]
    if beside:
        head = head.ljust(fixed) + header
        rule = rule + GAP + "─" * min(room, max([len(header)] + [len(p) for p in prose]))
    out = [head, rule]
    for line, text in zip(body, prose, strict=True):
        if beside:
            parts = wrap(text, room)
            out.append((line + " " * max(0, fixed - len(_strip_ansi(line))) + parts[0]).rstrip())
            out += [(" " * fixed + p).rstrip() for p in parts[1:]]
        else:
            out.append(line)
            if text:
                out += [(" " * indent + p).rstrip() for p in wrap(text, width - indent)]
    return out


_ANSI_RE = re.compile(r"\x1b\[[0-9;]*m")


def _strip_ansi(text: str) -> str:
    return _ANSI_RE.sub("", text)


def blocks(lead: Sequence[Col], lead_rows: Sequence[Sequence[str]], body: Sequence[Col],
           body_rows: Sequence[Sequence[str]], width: int, *,
           lead_styles: Sequence[Sequence[str]] | None = None,
           body_styles: Sequence[Sequence[str]] | None = None,
           colour: bool = False) -> list[str]:
    """A wide table as blocks of columns that each fit ``width``, every block repeating the
    ``lead`` columns (the row names), separated by a blank line. A column wider than the
    room left stands in a block of its own rather than being cut."""
    lw = widths_of(lead, lead_rows)
    room = width - sum(lw) - len(GAP) * len(lw)
    bw = widths_of(body, body_rows)
    groups: list[list[int]] = []
    used = 0
    for i, w in enumerate(bw):
        if groups and used + len(GAP) + w <= room:
            groups[-1].append(i)
            used += len(GAP) + w
        else:
            groups.append([i])
            used = w
    out: list[str] = []
    for g in groups:
        if out:
            out.append("")
        cols = [*lead, *(body[i] for i in g)]
        rows = [[*lr, *(br[i] for i in g)] for lr, br in zip(lead_rows, body_rows, strict=True)]
        styles = None
        if lead_styles or body_styles:
            ls = lead_styles or [[""] * len(lead)] * len(lead_rows)
            bs = body_styles or [[""] * len(body)] * len(body_rows)
            styles = [[*a, *(b[i] for i in g)] for a, b in zip(ls, bs, strict=True)]
        out += grid(cols, rows, styles=styles, colour=colour)
    return out


__all__ = ["Col", "PIPE_WIDTH", "blocks", "colour_for", "grid", "paint", "width_for", "with_prose",
           "wrap"]
