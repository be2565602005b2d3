"""The review report as Markdown, its figures as SVG files in a folder beside it.

:func:`to_markdown` links each figure as ``NAME.figures/<file>.svg`` when given the folder's
name; :func:`write_markdown` writes the figures (each atomically, stale ones removed) and then
the report, so the report never links a figure that is not there.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Any

from reviewer import fmt
from reviewer.reports.figures import standalone_svg
from reviewer.safety import CAUTIONS, FOOTER
from reviewer.textsafe import markdown, visible

if TYPE_CHECKING:
    from reviewer.report import ReportData


def _md(text: Any) -> str:
    """Plain text for a Markdown table cell or line: no HTML, no links or images, no table
    breaks, control and bidi characters shown (:func:`reviewer.textsafe.markdown`)."""
    return markdown(str(text).replace("\n", " "))


def _code(text: Any) -> str:
    """User text as a Markdown code span: visible, no backtick to close it early, no table
    break (inside a code span a backslash escape would show, so nothing else is escaped)."""
    s = visible(str(text)).replace("`", "ˋ").replace("|", "\\|")
    return f"`{s}`"


def _alt(text: str) -> str:
    """Text for an image's alt text: as :func:`_md`, without brackets that could end it."""
    return _md(text).replace("\\[", "(").replace("\\]", ")")


def figures_dir(out: str | Path) -> Path:
    """The folder the figures of the report at ``out`` go to: ``NAME.figures`` beside it."""
    out = Path(out)
    return out.with_name(out.stem + ".figures")


def _link(folder: str, name: str) -> str:
    from urllib.parse import quote

    return quote(f"{folder}/{name}.svg")


def to_markdown(d: ReportData, figures: str = "") -> str:
    """The report as Markdown; with ``figures`` (the folder name) its plots are linked."""
    out: list[str] = [f"# Design review: {_md(d.name)}", ""]
    out += [f"- Revision: **{_md(d.revision)}**", f"- Project file: {_code(d.file)}",
            f"- Resolved from: {_md(d.chain)}"]
    if d.line:
        out.append(f"- Product line: {_md(d.line)}")
    c = d.checklist
    out += [f"- Checklist: {_md(c['name'])} version {_md(c['version'])} "
            f"(`{c['sha256'][:16]}`, {_md(d.checklist_file)})",
            f"- Review record: {_md(d.record) or 'none yet'}"
            + ("" if d.history_ok else f" — HISTORY BROKEN: {_md(d.history_note)}"),
            f"- Exported: {_md(d.generated)} by {_md(d.tool)}", ""]
    out += ["## Cautions", ""]
    out += [f"- **{_md(t)}.** {_md(b)}" for t, b in CAUTIONS + d.extra_cautions]
    from reviewer.report import verdict

    out += ["", "## Summary", "", f"**{_md(verdict(d))}**", ""]
    out += [f"- {_md(o)}" for o in d.outstanding]
    out += ["", "| stage | kind | result \\| review | detail |", "|---|---|---|---|"]
    out += [f"| {_md(s)} | {_md(k)} | **{_md(st)}** | {_md(det)} |"
            for s, k, st, det in d.summary]
    out += ["", "Counts: " + ", ".join(f"{k} {v}" for k, v in d.counts.items()), ""]
    if d.record:
        out += [f"History head: `{d.head or '(none)'}` ({d.entries} entries; "
                + ("verifies" if d.history_ok else "does NOT verify") + "). Check a copy "
                "of the record against it later with `latchbook verify --head HASH`.", ""]
    out += ["## Inputs", "", "| input | value | from |", "|---|---|---|"]
    out += [f"| {_code(p)} | {_md(v)} | {_md(f)} |" for p, v, f in d.inputs]
    for s in d.stages:
        out += ["", f"## Stage {_code(s.id)} ({_md(s.kind)}): {_md(s.state)}", ""]
        if s.schematic and figures:
            out += [f"![schematic of {_alt(s.id)}]({_link(figures, s.schematic_name)})", ""]
        out += ["| check | result | margin | limits | summary |", "|---|---|---|---|---|"]
        for r in s.checks:
            out.append(f"| {_md(r.check)} | {_md(r.label)} | {fmt.margin(r.margin)} | "
                       f"{_md(r.limit_text)} | {_md(r.summary)} |")
        for r in s.checks:
            if not (r.values or r.waiver or r.changed or r.worst or r.figures):
                continue
            out += ["", f"### {_md(r.check)}", ""]
            if r.values:
                out += ["| value | nominal | min | max |", "|---|---|---|---|"]
                out += [f"| {_md(n)} | {_md(a)} | {_md(b)} | {_md(cc)} |"
                        for n, a, b, cc, _ in r.values]
                out.append("")
            if r.worst:
                out.append("Worst corner: " + _md(", ".join(f"{k} = {v}"
                                                           for k, v in r.worst.items())))
            for f in r.figures:
                if figures:
                    out += ["", f"![{_alt(f.caption)}]({_link(figures, f.name)})"]
                else:
                    out += ["", f"Waveform: {_md(f.caption)} (written beside the report with "
                            "`-o FILE`)."]
            if r.figure_note:
                out += ["", f"Waveform: {_md(r.figure_note)}."]
            if r.waiver:
                out.append(f"Waiver: {_md(r.waiver)}")
            if r.changed:
                out.append("Changed since signed: " + _md("; ".join(r.changed)))
        if not s.plots:
            out += ["", f"Waveforms: {_md(s.no_plot or 'no waveform')}."]
        if s.manual:
            out += ["", "| manual question | answer | note |", "|---|---|---|"]
            out += [f"| {_md(q)} ({_code(i)}) | {_md(a)} | {_md(n)} |"
                    for i, q, a, n in s.manual]
    out += ["", "## Sign-off history", ""]
    if d.history:
        out += ["| # | kind | meaning | stage | checks | by | at | note | state now |",
                "|---|---|---|---|---|---|---|---|---|"]
        out += [f"| {h.seq} | {_md(h.kind)} | {_md(h.meaning)} | {_md(h.stage)} | "
                f"{_md(h.checks)} | {_md(h.by)} | {_md(h.at)} | {_md(h.note)} | "
                f"{_md(h.state)} |" for h in d.history]
        if d.head:
            out += ["", f"History head (anchor it in version control): `{d.head}`. "
                    f"What the record alone proves: {_md(d.anchor_note)}."]
    else:
        out.append("No sign-offs yet.")
    out += ["", "---", "", f"{_md(d.tool)}; checklist {_md(c['name'])} version "
            f"{_md(c['version'])} (sha256 {c['sha256']}).", "", _md(FOOTER), ""]
    return "\n".join(out)


def write_markdown(d: ReportData, out: str | Path) -> Path:
    """Write the figures into ``NAME.figures/`` (atomically, stale SVGs removed), then the
    report at ``out``; returns the report's path."""
    from reviewer.store import atomic_write, writable_target

    writable_target(out)  # a link or a read-only file at `out`: refused before any figure
    folder = figures_dir(out)
    files: dict[str, str] = {}
    for s in d.stages:
        if s.schematic:
            files[s.schematic_name] = s.schematic
        for r in s.checks:
            for f in r.figures:
                files[f.name] = f.svg
    if files:
        folder.mkdir(parents=True, exist_ok=True)
        for name, svg in files.items():
            atomic_write(folder / f"{name}.svg", standalone_svg(svg))
    if folder.is_dir():
        for old in folder.glob("*.svg"):
            if old.stem not in files:
                old.unlink()
    return atomic_write(out, to_markdown(d, folder.name if files else ""))
