"""Review reports a lead can archive and print: Markdown, or one self-contained HTML file.

A report holds the project's identity and revision (with its variant chain), the cautions, a
summary table of the stages, every resolved input with the file it came from, per stage the
checks with their values (nominal, min, max, unit), limits, margins and worst corners, the
waveform plots (inline SVG, drawn with matplotlib's Agg canvas from the checks layer's waveform
helpers), the manual questions with their answers, the whole sign-off history with names, times
and meanings, and which sign-offs are current or stale at the time of export. The footer gives
the tool and checklist versions and says what the results do not mean.

The HTML has no external references: inline CSS (with a print stylesheet), inline SVG, no
scripts. Every piece of user text is escaped. Files are written atomically.
"""

from __future__ import annotations

import html
import io
import math
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from reviewer import TOOL
from reviewer.fmt import eng, pct
from reviewer.safety import CAUTIONS, FOOTER, load_cautions
from reviewer.textsafe import markdown, visible
from reviewer.waveforms import has_waveform, picture

MAX_POINTS = 800


@dataclass
class CheckRow:
    """One check of one stage, as the report shows it."""

    check: str
    question: str
    status: str
    label: str
    margin: float | None
    summary: str
    values: list[tuple[str, str, str, str, str]]
    limits: dict[str, float]
    worst: dict[str, str]
    notes: list[str]
    waiver: str = ""
    changed: list[str] = field(default_factory=list)


@dataclass
class StageBlock:
    """One stage: its checks, its state, its manual questions and its plots (SVG text)."""

    id: str
    kind: str
    state: str
    detail: str
    checks: list[CheckRow]
    manual: list[tuple[str, str, str, str]]
    plots: list[tuple[str, str]]
    no_plot: str = ""


@dataclass
class HistoryRow:
    """One history entry and its state at export time."""

    seq: int
    kind: str
    meaning: str
    stage: str
    checks: str
    by: str
    at: str
    note: str
    state: str


@dataclass
class ReportData:
    """Everything a report shows, gathered once."""

    name: str
    revision: str
    file: str
    line: str
    chain: str
    checklist: dict[str, str]
    checklist_file: str
    tool: str
    generated: str
    record: str
    history_ok: bool
    history_note: str
    head: str
    summary: list[tuple[str, str, str, str]]
    inputs: list[tuple[str, str, str]]
    stages: list[StageBlock]
    history: list[HistoryRow]
    counts: dict[str, int]
    extra_cautions: tuple[tuple[str, str], ...] = ()


# ---------------------------------------------------------------------------------- gather

def _manual_answers(record: Any) -> dict[tuple[str, str], tuple[str, str, str, str]]:
    """(stage, question id) → (answer, note, who, when), the latest of each.

    The workbook records an answer as a history note covering ``manual:<id>`` whose text is
    ``manual <id>: <answer> — <note>``.
    """
    out: dict[tuple[str, str], tuple[str, str, str, str]] = {}
    for e in record.trusted:
        if e.kind != "note":
            continue
        for c in e.checks:
            if not c.startswith("manual:"):
                continue
            qid = c[len("manual:"):]
            head, _, rest = e.note.partition(" — ")
            answer = head.rsplit(": ", 1)[-1].strip()
            out[(e.stage, qid)] = (answer, rest.strip(), e.who(), _when(e.at))
    return out


def _when(t: Any) -> str:
    return t.strftime("%Y-%m-%d %H:%M:%S UTC") if t is not None else ""


def _history(record: Any, states: dict[tuple[str, str], Any], stale: dict[int, list[Any]]
             ) -> list[HistoryRow]:
    revoked_by = {e.revokes: e.seq for e in record.entries if e.kind == "revoke"}
    in_force = set()
    for st in states.values():
        in_force.update(s for s in (st.signoff_seq, st.approval_seq, st.waiver_seq) if s)
    trusted = {e.seq for e in record.trusted}
    rows = []
    for e in record.entries:
        if e.seq not in trusted:
            state = "not trusted: the history breaks here or before"
        elif e.kind == "revoke":
            state = f"withdraws #{e.revokes}"
        elif e.kind == "note":
            state = "note"
        elif e.seq in revoked_by:
            state = f"revoked by #{revoked_by[e.seq]}"
        elif e.seq in stale:
            what = "; ".join(c.text() for c in stale[e.seq][:4])
            more = f" (+{len(stale[e.seq]) - 4} more)" if len(stale[e.seq]) > 4 else ""
            state = f"STALE: {what}{more}"
        elif e.seq in in_force:
            state = "current"
        else:
            state = "superseded by a later entry"
        by = e.by.get("name") or e.by.get("login", "?")
        login = f"{e.by.get('login', '?')}@{e.by.get('host', '?')}"
        rows.append(HistoryRow(e.seq, e.kind, e.meaning, e.stage,
                               ", ".join(e.checks), f"{by} ({login})", _when(e.at), e.note,
                               state))
    return rows


def _values(res: Any) -> list[tuple[str, str, str, str, str]]:
    out = []
    for name, st in res.values.items():
        out.append((name, eng(st.nominal, st.unit, si=False), eng(st.min, st.unit, si=False),
                    eng(st.max, st.unit, si=False), st.unit))
    return out


def gather(path: str | Path, *, plots: bool = True) -> ReportData:
    """Compute the project once and collect everything the report shows."""
    from reviewer.diff import chain_text, input_rows
    from reviewer.line import run_project, stage_state
    from reviewer.registry import CHECKS
    from reviewer.review import check_states, counts, load_record, stale_entries
    from reviewer.store import utc_now

    path = Path(path)
    run = run_project(path)
    project, checklist = run.project, run.checklist
    record = load_record(path)
    states = check_states(record, run)
    stale = {e.seq: ch for e, ch in stale_entries(record, run)}
    answers = _manual_answers(record)
    notes_by_seq = {e.seq: e.note for e in record.entries}
    root = path.resolve().parent

    def rel(f: str) -> str:
        try:
            return str(Path(f).resolve().relative_to(root))
        except ValueError:
            return f

    stages: list[StageBlock] = []
    summary = []
    for sid, st in project.stages.items():
        results = [r for r in run.results if r.stage == sid]
        cell = stage_state(states[(r.stage, r.check)] for r in results)
        rows = []
        for r in results:
            cs = states[(r.stage, r.check)]
            defn = CHECKS.get(r.check)
            rows.append(CheckRow(
                r.check, defn.question if defn else "", r.status, cs.label, r.margin,
                r.summary, _values(r), checklist.limits_for(r.check), dict(r.worst),
                list(r.notes),
                notes_by_seq.get(cs.waiver_seq, "") if cs.waiver_seq else "",
                [c.text() for c in cs.changed]))
        manual = []
        for q in checklist.manual_for(st.kind):
            a = answers.get((sid, q["id"]))
            manual.append((q["id"], q["question"], a[0] if a else "not answered",
                           f"{a[1]} ({a[2]}, {a[3]})".strip() if a else ""))
        block = StageBlock(sid, st.kind, cell.state, cell.detail, rows, manual, [])
        if plots:
            block.plots, block.no_plot = _stage_plots(results, project, run.results)
        stages.append(block)
        summary.append((sid, st.kind, cell.state, cell.detail))
    return ReportData(
        name=project.name, revision=project.revision, file=str(path), line=project.line,
        chain=chain_text(project), checklist=checklist.identity(),
        checklist_file=checklist.path if checklist.path == "standard" else rel(checklist.path),
        tool=TOOL, generated=_when(utc_now()),
        record=rel(str(record.path)) if record.exists else "",
        history_ok=record.chain.ok,
        history_note="" if record.chain.ok else "; ".join(record.chain.messages[:3]),
        head=record.head, summary=summary,
        inputs=[(p, v, rel(f)) for p, v, f in input_rows(project)],
        stages=stages, history=_history(record, states, stale), counts=counts(states),
        extra_cautions=load_cautions(_load_types(project)))


def _load_types(project: Any) -> list[str]:
    """The kinds of back-EMF load ("battery", "motor") among the project's stages."""
    loads = [st.params.get("load") for st in project.stages.values()]
    return [str(ld["type"]) for ld in loads if isinstance(ld, dict) and "type" in ld]


# ----------------------------------------------------------------------------------- plots

# Within a status, the check whose corner tells the most about the stage's waveform goes first.
PREFERRED = ("osc.timing", "snubber.dvdt", "turnoff.time")


def _stage_plots(results: list[Any], project: Any,
                 all_results: list[Any] | None = None) -> tuple[list[tuple[str, str]], str]:
    """The waveforms of a stage (SVG), from its most critical check that has one.

    A phase-control stage shows its load waveform first (``power.output``: both ends of the
    firing range); other stages their most critical check's picture.
    """
    rank = {"fail": 0, "error": 0, "blocked": 0, "incomplete": 0, "marginal": 1, "pass": 2}
    stage = project.stages.get(results[0].stage) if results else None
    first = "power.output" if stage is not None and stage.kind == "phase-control" else ""
    cands = sorted((r for r in results if has_waveform(r.check)),
                   key=lambda r: (r.check != first, rank.get(r.status, 3),
                                  r.check not in PREFERRED))
    reason = "no waveform for this stage"
    for r in cands:
        pic = picture(r, project, "worst" if r.evaluation is not None else "nominal")
        if not pic.plots:
            reason = pic.reason or reason
            continue
        corner = "worst corner" if pic.corner == "worst" else "nominal"
        cap = f"{r.check}, at its {corner}"
        if pic.nominal_used:
            cap += "; at their nominal: " + ", ".join(pic.nominal_used)
        out = []
        for plot in pic.plots:
            notes = "; ".join(plot.notes)
            try:
                out.append((f"{plot.title} ({cap}{'; ' + notes if notes else ''})",
                            plot_svg(plot)))
            except (ValueError, FloatingPointError) as exc:
                reason = f"no waveform: the plot could not be drawn ({exc})"
        if out:
            return out, ""
    return [], reason


def _time_scale(t_max: float) -> tuple[float, str]:
    for scale, unit in ((1.0, "s"), (1e-3, "ms"), (1e-6, "µs"), (1e-9, "ns")):
        if t_max >= 10 * scale or scale == 1e-9:
            return scale, unit
    return 1.0, "s"


def plot_svg(plot: Any) -> str:
    """One chart as an inline ``<svg>`` element (no XML prolog, no metadata, no links)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    t = np.asarray(plot.t, dtype=float).reshape(-1)
    if t.size < 2 or not np.isfinite(t).any():
        raise ValueError("no samples to draw")
    step = max(1, t.size // MAX_POINTS)
    scale, tunit = _time_scale(float(np.nanmax(t)))
    fig = Figure(figsize=(7.0, 2.6), dpi=100)
    FigureCanvasAgg(fig)
    ax = fig.add_subplot(1, 1, 1)
    units = []
    for s in plot.series:
        y = np.asarray(s.y, dtype=float).reshape(-1)
        if y.size != t.size:
            continue
        ax.plot(t[::step] / scale, y[::step], label=s.name,
                linestyle=":" if s.dotted else "-", linewidth=0.9 if s.dotted else 1.5)
        units.append(s.unit)
    for x, label in plot.marks[:12]:
        if math.isfinite(x):
            ax.axvline(x / scale, color="0.6", linewidth=0.6)
            ax.annotate(label, (x / scale, 1.0), xycoords=("data", "axes fraction"),
                        fontsize=7, color="0.35", rotation=90, va="top", ha="right")
    ax.set_xlabel(f"t [{tunit}]")
    if units:
        ax.set_ylabel(f"[{units[0]}]")
    ax.grid(True, linewidth=0.3)
    ax.legend(fontsize=7, loc="best", frameon=False)
    fig.tight_layout()
    buf = io.StringIO()
    with _svg_settings():
        fig.savefig(buf, format="svg", metadata={"Date": None})
    svg = buf.getvalue()
    svg = svg[svg.index("<svg"):]
    svg = re.sub(r"<metadata>.*?</metadata>", "", svg, flags=re.S)
    # Inline SVG in HTML needs no namespace declarations; without them the file names no URL.
    return re.sub(r'\s+xmlns(?::\w+)?="[^"]*"', "", svg, count=3)


class _svg_settings:
    """Text as text (small, searchable) and stable element ids while saving."""

    def __enter__(self) -> None:
        import matplotlib

        self._ctx = matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "latchbook"})
        self._ctx.__enter__()

    def __exit__(self, *exc: object) -> None:
        self._ctx.__exit__(*exc)


# -------------------------------------------------------------------------------- markdown

def _md(text: Any) -> str:
    """Plain text for a Markdown table cell or line: no HTML, no links or images, no table
    breaks, control and bidi characters shown (:func:`reviewer.textsafe.markdown`)."""
    return markdown(str(text).replace("\n", " "))


def _code(text: Any) -> str:
    """User text as a Markdown code span: visible, no backtick to close it early, no table
    break (inside a code span a backslash escape would show, so nothing else is escaped)."""
    s = visible(str(text)).replace("`", "ˋ").replace("|", "\\|")
    return f"`{s}`"


def _margin(x: float | None) -> str:
    return "—" if x is None else pct(x)


def _limits(lim: dict[str, float]) -> str:
    return ", ".join(f"{k} {v:g}" for k, v in lim.items()) or "—"


def to_markdown(d: ReportData) -> str:
    """The report as Markdown (waveform plots are in the HTML form)."""
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
    out += ["", "## Summary", "", "| stage | kind | state | detail |", "|---|---|---|---|"]
    out += [f"| {_md(s)} | {_md(k)} | **{_md(st)}** | {_md(det)} |"
            for s, k, st, det in d.summary]
    out += ["", "Counts: " + ", ".join(f"{k} {v}" for k, v in d.counts.items()), ""]
    out += ["## Inputs", "", "| input | value | from |", "|---|---|---|"]
    out += [f"| {_code(p)} | {_md(v)} | {_md(f)} |" for p, v, f in d.inputs]
    for s in d.stages:
        out += ["", f"## Stage {_code(s.id)} ({_md(s.kind)}): {_md(s.state)}", ""]
        out += ["| check | status | margin | limits | summary |", "|---|---|---|---|---|"]
        for r in s.checks:
            out.append(f"| {_md(r.check)} | {_md(r.label)} | {_margin(r.margin)} | "
                       f"{_md(_limits(r.limits))} | {_md(r.summary)} |")
        for r in s.checks:
            if not (r.values or r.waiver or r.changed or r.worst):
                continue
            out += ["", f"### {_md(r.check)}", ""]
            if r.values:
                out += ["| value | nominal | min | max | unit |", "|---|---|---|---|---|"]
                out += [f"| {_md(n)} | {_md(a)} | {_md(b)} | {_md(cc)} | {_md(u)} |"
                        for n, a, b, cc, u in r.values]
                out.append("")
            if r.worst:
                out.append("Worst corner: " + _md(", ".join(f"{k} = {v}"
                                                           for k, v in r.worst.items())))
            if r.waiver:
                out.append(f"Waiver: {_md(r.waiver)}")
            if r.changed:
                out.append("Changed since signed: " + _md("; ".join(r.changed)))
        if s.plots:
            out += ["", "Waveforms: " + _md("; ".join(t for t, _ in s.plots))
                    + " (drawn in the HTML report)."]
        else:
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
            out += ["", f"History head (anchor it in version control): `{d.head}`. The history "
                    "is a hash chain: tamper-evident, not tamper-proof."]
    else:
        out.append("No sign-offs yet.")
    out += ["", "---", "", f"{_md(d.tool)}; checklist {_md(c['name'])} version "
            f"{_md(c['version'])} (sha256 {c['sha256']}).", "", _md(FOOTER), ""]
    return "\n".join(out)


# ------------------------------------------------------------------------------------ html

CSS = """
body { font: 10.5pt/1.4 system-ui, sans-serif; color: #111; margin: 2em auto; max-width: 62em;
       padding: 0 1em; }
h1 { font-size: 1.6em; margin-bottom: .2em; } h2 { border-bottom: 1px solid #999;
     margin-top: 1.6em; } h3 { font-size: 1em; margin: 1em 0 .3em; }
table { border-collapse: collapse; width: 100%; margin: .4em 0; }
th, td { border: 1px solid #bbb; padding: .2em .4em; vertical-align: top; text-align: left; }
th { background: #eee; } td.num { text-align: right; white-space: nowrap; }
.st { font-weight: bold; white-space: nowrap; }
.pass { color: #1a6b1a; } .marginal { color: #8a6100; } .fail, .error { color: #b00000; }
.blocked, .incomplete { color: #8a4b00; }
.stale { color: #8b008b; } .waived { color: #005f8a; } .unsigned, .na { color: #666; }
.caution { border-left: 4px solid #b00000; padding-left: .6em; margin: .3em 0; }
.meta td:first-child { width: 12em; font-weight: bold; }
.plot svg { width: 100%; height: auto; }
.small { font-size: .9em; color: #444; }
footer { border-top: 1px solid #999; margin-top: 2em; padding-top: .6em; font-size: .9em; }
@media print {
  body { margin: 0; max-width: none; font-size: 9pt; }
  h2 { break-after: avoid; } table, .plot, .caution { break-inside: avoid; }
  section.stage { break-before: page; }
  a { color: inherit; text-decoration: none; }
}
"""


def _e(x: Any) -> str:
    return html.escape(visible(x, lines=True), quote=True)


def _cls(state: str) -> str:
    word = state.split(" ")[0].split(",")[0]
    if "waived" in state and "stale" not in state:
        word = "waived"
    if "stale" in state:
        word = "stale"
    return {"not-applicable": "na", "n/a": "na"}.get(word, word)


def to_html(d: ReportData) -> str:
    """The report as one self-contained HTML file (inline CSS and SVG, nothing external)."""
    c = d.checklist
    h: list[str] = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
                    f"<title>Design review: {_e(d.name)} rev {_e(d.revision)}</title>",
                    f"<style>{CSS}</style></head><body>",
                    f"<h1>Design review: {_e(d.name)}</h1>", '<table class="meta">']
    meta = [("Revision", d.revision), ("Project file", d.file), ("Resolved from", d.chain),
            ("Product line", d.line or "—"),
            ("Checklist", f"{c['name']} version {c['version']} ({d.checklist_file}); "
                          f"sha256 {c['sha256']}"),
            ("Review record", (d.record or "none yet")
             + ("" if d.history_ok else f" — HISTORY BROKEN: {d.history_note}")),
            ("Exported", f"{d.generated} by {d.tool}")]
    h += [f"<tr><td>{_e(k)}</td><td>{_e(v)}</td></tr>" for k, v in meta]
    h.append("</table>")
    h.append("<h2>Cautions</h2>")
    h += [f'<div class="caution"><b>{_e(t)}.</b> {_e(b)}</div>'
          for t, b in CAUTIONS + d.extra_cautions]
    h += ["<h2>Summary</h2>", "<table><tr><th>stage</th><th>kind</th><th>state</th>"
          "<th>detail</th></tr>"]
    h += [f'<tr><td>{_e(s)}</td><td>{_e(k)}</td><td class="st {_cls(st)}">{_e(st)}</td>'
          f"<td>{_e(det)}</td></tr>" for s, k, st, det in d.summary]
    h.append("</table>")
    h.append(f'<p class="small">Counts: {_e(", ".join(f"{k} {v}" for k, v in d.counts.items()))}'
             "</p>")
    h += ["<h2>Inputs</h2>", "<table><tr><th>input</th><th>value</th><th>from</th></tr>"]
    h += [f"<tr><td><code>{_e(p)}</code></td><td>{_e(v)}</td><td>{_e(f)}</td></tr>"
          for p, v, f in d.inputs]
    h.append("</table>")
    for s in d.stages:
        h.append(f'<section class="stage"><h2>Stage {_e(s.id)} ({_e(s.kind)}): '
                 f'<span class="{_cls(s.state)}">{_e(s.state)}</span></h2>')
        h.append("<table><tr><th>check</th><th>status</th><th>margin</th><th>limits</th>"
                 "<th>summary</th></tr>")
        for r in s.checks:
            h.append(f'<tr><td>{_e(r.check)}</td><td class="st {_cls(r.label)}">{_e(r.label)}'
                     f'</td><td class="num">{_e(_margin(r.margin))}</td>'
                     f"<td>{_e(_limits(r.limits))}</td><td>{_e(r.summary)}</td></tr>")
        h.append("</table>")
        for r in s.checks:
            if not (r.values or r.waiver or r.changed or r.worst):
                continue
            h.append(f"<h3>{_e(r.check)}</h3>")
            if r.question:
                h.append(f'<p class="small">{_e(r.question)}</p>')
            if r.values:
                h.append("<table><tr><th>value</th><th>nominal</th><th>min</th><th>max</th>"
                         "<th>unit</th></tr>")
                h += [f'<tr><td>{_e(n)}</td><td class="num">{_e(a)}</td><td class="num">'
                      f'{_e(b)}</td><td class="num">{_e(cc)}</td><td>{_e(u)}</td></tr>'
                      for n, a, b, cc, u in r.values]
                h.append("</table>")
            if r.worst:
                h.append('<p class="small">Worst corner: '
                         + _e(", ".join(f"{k} = {v}" for k, v in r.worst.items())) + "</p>")
            if r.waiver:
                h.append(f'<p class="waived"><b>Waiver:</b> {_e(r.waiver)}</p>')
            if r.changed:
                h.append(f'<p class="stale"><b>Changed since signed:</b> '
                         f'{_e("; ".join(r.changed))}</p>')
        if s.plots:
            for title, svg in s.plots:
                h.append(f'<figure class="plot">{svg}<figcaption class="small">{_e(title)}'
                         "</figcaption></figure>")
        else:
            h.append(f'<p class="small">Waveforms: {_e(s.no_plot or "no waveform")}.</p>')
        if s.manual:
            h.append("<h3>Manual questions</h3><table><tr><th>question</th><th>answer</th>"
                     "<th>note</th></tr>")
            h += [f"<tr><td>{_e(q)} <code>{_e(i)}</code></td><td>{_e(a)}</td><td>{_e(n)}"
                  "</td></tr>" for i, q, a, n in s.manual]
            h.append("</table>")
        h.append("</section>")
    h.append("<h2>Sign-off history</h2>")
    if d.history:
        h.append("<table><tr><th>#</th><th>kind</th><th>meaning</th><th>stage</th>"
                 "<th>checks</th><th>by</th><th>at</th><th>note</th><th>state now</th></tr>")
        h += [f"<tr><td>{x.seq}</td><td>{_e(x.kind)}</td><td>{_e(x.meaning)}</td>"
              f"<td>{_e(x.stage)}</td><td>{_e(x.checks)}</td><td>{_e(x.by)}</td>"
              f"<td>{_e(x.at)}</td><td>{_e(x.note)}</td>"
              f'<td class="{_cls(x.state.lower())}">{_e(x.state)}</td></tr>' for x in d.history]
        h.append("</table>")
        if d.head:
            h.append(f'<p class="small">History head (anchor it in version control): '
                     f"<code>{_e(d.head)}</code>. The history is a hash chain: tamper-evident, "
                     "not tamper-proof.</p>")
    else:
        h.append("<p>No sign-offs yet.</p>")
    h.append(f"<footer><p>{_e(d.tool)}; checklist {_e(c['name'])} version {_e(c['version'])} "
             f"(sha256 {_e(c['sha256'])}).</p><p>{_e(FOOTER)}</p></footer></body></html>")
    return "\n".join(h) + "\n"


def render(path: str | Path, fmt: str) -> str:
    """The report of the project at ``path`` as ``md`` or ``html`` text."""
    if fmt not in ("md", "html"):
        from reviewer.errors import ProjectError

        raise ProjectError(f"unknown report format `{fmt}`; use md or html")
    data = gather(path, plots=fmt == "html")
    return to_markdown(data) if fmt == "md" else to_html(data)


def write_report(path: str | Path, fmt: str, out: str | Path) -> Path:
    """Render and write the report atomically; returns the path written."""
    from reviewer.store import atomic_write

    return atomic_write(out, render(path, fmt))


__all__ = ["ReportData", "gather", "plot_svg", "render", "to_html", "to_markdown",
           "write_report"]
