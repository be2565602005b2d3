"""A product line's index page: the status matrix as one HTML page, linking each report.

:func:`write_line_index` takes the matrix rows (:class:`reviewer.line.Row`, or a whole
:class:`reviewer.line.Matrix`), the report written for each project (project path → report
file) and where to write the page. Links are relative to the page's folder, so the folder of
reports can be archived or moved as a whole. Self-contained like the reports: inline CSS, no
scripts, every piece of user text escaped; printable (A4, repeated table headers).
"""

from __future__ import annotations

import html
import os
from collections.abc import Iterable, Mapping
from pathlib import Path
from typing import Any
from urllib.parse import quote

from reviewer import TOOL
from reviewer.reports.html import CSS, cls, page_css
from reviewer.safety import FOOTER, SHORT
from reviewer.textsafe import visible

INDEX_CSS = """
body { max-width: 90em; }
table.matrix td, table.matrix th { white-space: nowrap; }
table.matrix td.note { white-space: normal; min-width: 18em; }
td.st a { color: inherit; }
@media print { @page { size: A4 landscape; } }
"""


def _e(x: Any) -> str:
    return html.escape(visible(x, lines=True), quote=True)


def _rows_and_stages(rows: Any, stages: Iterable[str] | None) -> tuple[list[Any], list[str]]:
    if hasattr(rows, "rows") and hasattr(rows, "stages"):
        return list(rows.rows), list(stages if stages is not None else rows.stages)
    rows = list(rows)
    if stages is None:
        seen: list[str] = []
        for r in rows:
            seen += [s for s in getattr(r, "cells", {}) if s not in seen]
        stages = seen
    return rows, list(stages)


def _href(report: str | Path, folder: Path) -> str:
    rel = os.path.relpath(Path(report).resolve(), folder.resolve())
    return quote(Path(rel).as_posix())


def _name(row: Any, base: Path) -> str:
    p = Path(row.path)
    try:
        return str(p.resolve().relative_to(base.resolve()))
    except ValueError:
        return p.name


def line_index_html(rows: Any, reports: Mapping[str, str | Path], folder: str | Path, *,
                    stages: Iterable[str] | None = None, title: str = "",
                    base_dir: str | Path | None = None, generated: str = "") -> str:
    """The index page's HTML, its links relative to ``folder`` (where the page will be)."""
    rows, cols = _rows_and_stages(rows, stages)
    folder = Path(folder)
    base = Path(base_dir) if base_dir is not None else (
        Path(os.path.commonpath([str(Path(r.path).resolve().parent) for r in rows]))
        if rows else folder)
    by_path = {str(Path(k).resolve()): v for k, v in reports.items()}
    heading = title or "Product line review status"
    h = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
         f"<title>{_e(heading)}</title>",
         f"<style>{CSS}{INDEX_CSS}{page_css(heading)}</style></head><body>",
         f"<h1>{_e(heading)}</h1>",
         f'<p class="small">{len(rows)} project(s) under {_e(base)}'
         + (f"; exported {_e(generated)}" if generated else "") + f" by {_e(TOOL)}.</p>",
         f'<div class="caution">{_e(SHORT)}</div>']
    head = ["project", "rev", "variant of", *cols, "overall", "notes"]
    body = []
    for r in rows:
        name = _name(r, base)
        report = by_path.get(str(Path(r.path).resolve()))
        link = (f'<a href="{_e(_href(report, folder))}">{_e(name)}</a>' if report
                else _e(name))
        if getattr(r, "error", ""):
            body.append(f"<tr><td>{link}</td><td></td><td></td>"
                        + "<td></td>" * len(cols)
                        + f'<td class="st fail">error</td><td class="note">{_e(r.error)}</td>'
                        "</tr>")
            continue
        cells = []
        for sid in cols:
            c = r.cells.get(sid)
            if c is None:
                cells.append("<td></td>")
                continue
            target = f"{_href(report, folder)}#stage-{quote(sid)}" if report else ""
            word = _e(c.state)
            inner = f'<a href="{_e(target)}">{word}</a>' if target else word
            cells.append(f'<td class="st {cls(c.state)}" title="{_e(c.detail)}">{inner}</td>')
        notes = [f"{sid}: {c.detail}" for sid, c in r.cells.items()
                 if c.detail and c.state not in ("pass", "n/a", "unsigned")]
        if not getattr(r, "chain_ok", True):
            notes.insert(0, "the review history is broken (latchbook verify)")
        base_of = Path(r.variant_of).name if getattr(r, "variant_of", "") else ""
        title = f'<br><span class="small">{_e(r.name)}</span>' if getattr(r, "name", "") else ""
        body.append(f"<tr><td>{link}{title}</td><td>{_e(r.revision)}</td><td>{_e(base_of)}</td>"
                    + "".join(cells)
                    + f'<td class="st {cls(r.state)}">{_e(r.state)}</td>'
                    f'<td class="note">{_e(" | ".join(notes))}</td></tr>')
    th = "".join(f"<th>{_e(x)}</th>" for x in head)
    h.append(f'<table class="matrix"><thead><tr>{th}</tr></thead><tbody>{"".join(body)}'
             "</tbody></table>")
    counts: dict[str, int] = {}
    for r in rows:
        counts[r.state] = counts.get(r.state, 0) + 1
    h.append('<p class="small">Overall: '
             + _e(", ".join(f"{k} {v}" for k, v in sorted(counts.items()))) + ".</p>")
    h.append(f"<footer><p>{_e(TOOL)}.</p><p>{_e(FOOTER)}</p></footer></body></html>")
    return "\n".join(h) + "\n"


def write_line_index(rows: Any, reports: Mapping[str, str | Path], path: str | Path,
                     **kw: Any) -> Path:
    """Write the index page at ``path`` atomically; returns the path written.

    ``rows``: the matrix rows (or the Matrix); ``reports``: project path → its report file;
    keywords as :func:`line_index_html`.
    """
    from reviewer.store import atomic_write, utc_now

    out = Path(path)
    kw.setdefault("generated", utc_now().strftime("%Y-%m-%d %H:%M:%S UTC"))
    return atomic_write(out, line_index_html(rows, reports, out.parent, **kw))


def write_index_for(reports: Mapping[str | Path, str | Path], path: str | Path, **kw: Any
                    ) -> Path:
    """The index page for reports already written (project path → report file): computes the
    status matrix of those projects and writes the page at ``path``."""
    from reviewer.line import status_matrix

    m = status_matrix(list(reports))
    return write_line_index(m, {str(k): v for k, v in reports.items()}, path, **kw)
