"""The review report as one self-contained HTML file, for the screen and for print.

Inline CSS and SVG only: no scripts, no links out, every piece of user text escaped. Each
stage's section opens with its schematic; each check's plots stand with that check. For print:
A4 pages with margins, a running header (project, revision, page n of m), table headers
repeated on every page, rows never split, and the history head kept with the history.
"""

from __future__ import annotations

import html
from typing import TYPE_CHECKING, Any

from reviewer import fmt
from reviewer.safety import CAUTIONS, FOOTER
from reviewer.textsafe import visible

if TYPE_CHECKING:
    from reviewer.report import ReportData

CSS = """
body { font: 10.5pt/1.4 system-ui, sans-serif; color: #111; margin: 2em auto; max-width: 62em;
       padding: 0 1em; }
h1 { font-size: 1.6em; margin-bottom: .2em; } h2 { border-bottom: 1px solid #999;
     margin-top: 1.6em; } h3 { font-size: 1em; margin: 1em 0 .3em; }
table { border-collapse: collapse; width: 100%; margin: .4em 0; }
th, td { border: 1px solid #bbb; padding: .2em .4em; vertical-align: top; text-align: left; }
th { background: #eee; } td.num { text-align: right; white-space: nowrap; }
thead { display: table-header-group; } tr { break-inside: avoid; }
.st { font-weight: bold; white-space: nowrap; }
.pass { color: #1a6b1a; } .marginal { color: #8a6100; } .fail, .error { color: #b00000; }
.blocked, .incomplete { color: #8a4b00; }
.stale { color: #8b008b; } .waived { color: #005f8a; } .unsigned, .na { color: #666; }
.caution { border-left: 4px solid #b00000; padding-left: .6em; margin: .3em 0; }
.meta td:first-child { width: 12em; font-weight: bold; }
figure { margin: .6em 0; } .plot svg { width: 100%; height: auto; }
.schematic svg { max-width: 100%; height: auto; }
.schematic { text-align: center; }
.check { margin-top: 1em; }
.small { font-size: .9em; color: #444; }
.head, footer { break-inside: avoid; break-before: avoid; }
footer { border-top: 1px solid #999; margin-top: 2em; padding-top: .6em; font-size: .9em; }
@page { size: A4; margin: 18mm 14mm 16mm 14mm; }
@media print {
  body { margin: 0; max-width: none; font-size: 9pt; }
  h2, h3 { break-after: avoid; } figure, .caution, table.keep, .check-head { break-inside: avoid; }
  section.stage { break-before: page; }
  .schematic svg { max-height: 9cm; }
  a { color: inherit; text-decoration: none; }
}
"""


def _e(x: Any) -> str:
    return html.escape(visible(x, lines=True), quote=True)


def css_string(text: str) -> str:
    """``text`` as a CSS string literal that cannot end the string or the style element.

    >>> css_string('kiln "A" </style>')
    '"kiln \\\\22 A\\\\22  \\\\3C /style>"'
    """
    out = []
    for ch in text:
        if ch in '"\\<' or ord(ch) < 32:
            out.append(f"\\{ord(ch):X} ")
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def page_css(title: str) -> str:
    """The running header of printed pages: the project and revision left, page n of m right."""
    return ("@page { @top-left { content: " + css_string(visible(title)) + "; font: 8pt "
            "sans-serif; "
            "color: #444; } @top-right { content: \"page \" counter(page) \" of \" "
            "counter(pages); font: 8pt sans-serif; color: #444; } }")


def cls(state: str) -> str:
    """The CSS class of a state text ("fail — waived, signed" → ``waived``)."""
    word = state.split(" ")[0].split(",")[0]
    if "waived" in state and "stale" not in state:
        word = "waived"
    if "stale" in state:
        word = "stale"
    return {"not-applicable": "na", "n/a": "na"}.get(word, word)


def _table(head: list[str], rows: list[str], keep: bool = False) -> str:
    th = "".join(f"<th>{_e(h)}</th>" for h in head)
    return (f'<table{" class=keep" if keep else ""}><thead><tr>{th}</tr></thead><tbody>'
            + "".join(rows) + "</tbody></table>")


def _figure(kind: str, svg: str, caption: str) -> str:
    return (f'<figure class="{kind}">{svg}<figcaption class="small">{_e(caption)}</figcaption>'
            "</figure>")


def to_html(d: ReportData) -> str:
    """The report as one self-contained HTML file (inline CSS and SVG, nothing external)."""
    c = d.checklist
    title = f"{d.name}, revision {d.revision}"
    h: list[str] = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
                    f"<title>Design review: {_e(d.name)} rev {_e(d.revision)}</title>",
                    f"<style>{CSS}{page_css(title)}</style></head><body>",
                    f"<h1>Design review: {_e(d.name)}</h1>"]
    meta = [("Revision", d.revision), ("Project file", d.file), ("Resolved from", d.chain)]
    if d.line:
        meta.append(("Product line", d.line))
    meta += [("Checklist", f"{c['name']} version {c['version']} ({d.checklist_file}); "
                           f"sha256 {c['sha256']}"),
             ("Review record", (d.record or "none yet")
              + ("" if d.history_ok else f" — HISTORY BROKEN: {d.history_note}")),
             ("Exported", f"{d.generated} by {d.tool}")]
    h.append('<table class="meta keep"><tbody>'
             + "".join(f"<tr><td>{_e(k)}</td><td>{_e(v)}</td></tr>" for k, v in meta)
             + "</tbody></table>")
    h.append("<h2>Cautions</h2>")
    h += [f'<div class="caution"><b>{_e(t)}.</b> {_e(b)}</div>'
          for t, b in CAUTIONS + d.extra_cautions]
    from reviewer.report import verdict

    h.append("<h2>Summary</h2>")
    h.append(f"<p><b>{_e(verdict(d))}</b></p>")
    if d.outstanding:
        h.append("<ul>" + "".join(f"<li>{_e(o)}</li>" for o in d.outstanding) + "</ul>")
    if d.record:
        h.append(f'<p class="small">History head: <code>{_e(d.head or "(none)")}</code> '
                 f"({d.entries} entries; {'verifies' if d.history_ok else 'does NOT verify'})."
                 " Check a copy of the record against it later with "
                 "<code>latchbook verify --head HASH</code>.</p>")
    h.append(_table(["stage", "kind", "result | review", "detail"],
                    [f'<tr><td>{_e(s)}</td><td>{_e(k)}</td><td class="st {cls(st)}">{_e(st)}'
                     f"</td><td>{_e(det)}</td></tr>" for s, k, st, det in d.summary]))
    h.append(f'<p class="small">Counts: {_e(", ".join(f"{k} {v}" for k, v in d.counts.items()))}'
             "</p>")
    h.append("<h2>Inputs</h2>")
    h.append(_table(["input", "value", "from"],
                    [f"<tr><td><code>{_e(p)}</code></td><td>{_e(v)}</td><td>{_e(f)}</td></tr>"
                     for p, v, f in d.inputs]))
    for s in d.stages:
        h.append(f'<section class="stage" id="stage-{_e(s.id)}"><h2>Stage {_e(s.id)} '
                 f'({_e(s.kind)}): <span class="{cls(s.state)}">{_e(s.state)}</span></h2>')
        if s.schematic:
            h.append(_figure("schematic", s.schematic,
                             f"Schematic of {s.id}: the parts and values the checks below read"))
        elif s.schematic_note:
            h.append(f'<p class="small">{_e(s.schematic_note)}.</p>')
        h.append(_table(["check", "result", "margin", "limits", "summary"],
                        [f'<tr><td>{_e(r.check)}</td><td class="st {cls(r.label)}">'
                         f'{_e(r.label)}</td><td class="num">{_e(fmt.margin(r.margin))}</td>'
                         f"<td>{_e(r.limit_text)}</td><td>{_e(r.summary)}</td></tr>"
                         for r in s.checks]))
        for r in s.checks:
            if not (r.values or r.waiver or r.changed or r.worst or r.figures):
                continue
            h.append(f'<div class="check" id="{_e(s.id)}-{_e(r.check)}">'
                     f'<div class="check-head"><h3>{_e(r.check)}</h3>')
            if r.question:
                h.append(f'<p class="small">{_e(r.question)}</p>')
            h.append("</div>")
            if r.values:
                # Each number carries its unit (engineering prefixes): no unit column.
                h.append(_table(["value", "nominal", "min", "max"],
                                [f'<tr><td>{_e(n)}</td><td class="num">{_e(a)}</td>'
                                 f'<td class="num">{_e(b)}</td><td class="num">{_e(cc)}</td>'
                                 "</tr>" for n, a, b, cc, _ in r.values], keep=True))
            if r.worst:
                h.append('<p class="small">Worst corner: '
                         + _e(", ".join(f"{k} = {v}" for k, v in r.worst.items())) + "</p>")
            for f in r.figures:
                h.append(_figure("plot", f.svg, f.caption))
            if r.figure_note:
                h.append(f'<p class="small">Waveform: {_e(r.figure_note)}.</p>')
            if r.waiver:
                h.append(f'<p class="waived"><b>Waiver:</b> {_e(r.waiver)}</p>')
            if r.changed:
                h.append(f'<p class="stale"><b>Changed since signed:</b> '
                         f'{_e("; ".join(r.changed))}</p>')
            h.append("</div>")
        if not s.plots:
            h.append(f'<p class="small">Waveforms: {_e(s.no_plot or "no waveform")}.</p>')
        if s.manual:
            h.append("<h3>Manual questions</h3>")
            h.append(_table(["question", "answer", "note"],
                            [f"<tr><td>{_e(q)} <code>{_e(i)}</code></td><td>{_e(a)}</td>"
                             f"<td>{_e(n)}</td></tr>" for i, q, a, n in s.manual]))
        h.append("</section>")
    h.append("<h2>Sign-off history</h2>")
    if d.history:
        h.append(_table(["#", "kind", "meaning", "stage", "checks", "by", "at", "note",
                         "state now"],
                        [f"<tr><td>{x.seq}</td><td>{_e(x.kind)}</td><td>{_e(x.meaning)}</td>"
                         f"<td>{_e(x.stage)}</td><td>{_e(x.checks)}</td><td>{_e(x.by)}</td>"
                         f"<td>{_e(x.at)}</td><td>{_e(x.note)}</td>"
                         f'<td class="{cls(x.state.lower())}">{_e(x.state)}</td></tr>'
                         for x in d.history]))
        if d.head:
            h.append(f'<p class="small head">History head (anchor it in version control): '
                     f"<code>{_e(d.head)}</code>. What the record alone proves: "
                     f"{_e(d.anchor_note)}.</p>")
    else:
        h.append("<p>No sign-offs yet.</p>")
    h.append(f"<footer><p>{_e(d.tool)}; checklist {_e(c['name'])} version {_e(c['version'])} "
             f"(sha256 {_e(c['sha256'])}).</p><p>{_e(FOOTER)}</p></footer></body></html>")
    return "\n".join(h) + "\n"
