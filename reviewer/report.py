"""Review reports a lead can archive and print: Markdown, or one self-contained HTML file.

A report holds the project's identity and revision (with its variant chain), the cautions, a
summary table of the stages, every resolved input with the file it came from, per stage the
checks with their values (nominal, min, max, unit), limits, margins and worst corners, the
waveform plots (inline SVG, drawn with matplotlib's Agg canvas from the checks layer's waveform
helpers), the manual questions with their answers, the whole sign-off history with names, times
and meanings, and which sign-offs are current or stale at the time of export. The footer gives
the tool and checklist versions and says what the results do not mean.

This module gathers the data once (:func:`gather`); :mod:`reviewer.reports.html` and
:mod:`reviewer.reports.markdown` lay it out, :mod:`reviewer.reports.index` writes a product
line's index page. The HTML has no external references: inline CSS (with a print stylesheet),
inline SVG, no scripts. Every piece of user text is escaped. Files are written atomically.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from reviewer import TOOL
from reviewer.fmt import eng
from reviewer.reports.figures import Figure, plot_svg, stage_figures
from reviewer.reports.html import to_html
from reviewer.reports.markdown import to_markdown, write_markdown
from reviewer.reports.text import limit_words, pretty_units
from reviewer.safety import load_cautions


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
    figures: list[Figure] = field(default_factory=list)
    figure_note: str = ""
    limit_text: str = ""


@dataclass
class StageBlock:
    """One stage: its checks, its state, its manual questions, its schematic and plots (SVG).

    ``plots`` lists every check's figures as (caption, SVG) in order; ``no_plot`` says why
    there are none.
    """

    id: str
    kind: str
    state: str
    detail: str
    checks: list[CheckRow]
    manual: list[tuple[str, str, str, str]]
    plots: list[tuple[str, str]]
    no_plot: str = ""
    schematic: str = ""
    schematic_note: str = ""
    schematic_name: str = ""  # the file name (without .svg) beside a Markdown report


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
    outstanding: list[str] = field(default_factory=list)
    entries: int = 0
    anchor_note: str = ""
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
    rows = []
    for e in record.entries:
        problems = record.trust.problems_of(e)
        if problems:
            state = "UNVERIFIED (counts for nothing): " + "; ".join(problems[:2])
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
    """The named values of a result; a value the check could not give at all is left out."""
    out = []
    for name, st in res.values.items():
        cells = [eng(x, st.unit, si=False) for x in (st.nominal, st.min, st.max)]
        if all(c == "—" for c in cells):
            continue
        out.append((name, *cells, st.unit))
    return out


def _worst(worst: dict[str, str]) -> dict[str, str]:
    """The worst corner without the inputs the project does not give (shown as "—")."""
    return {k: pretty_units(v) for k, v in worst.items() if v not in ("—", "", "nan")}


def _name_files(stages: list[StageBlock]) -> None:
    """File names for the figures beside a Markdown report, unique within the report (two ids
    may read the same once made file-safe)."""
    from reviewer.reports.figures import slug

    seen: set[str] = set()

    def unique(name: str) -> str:
        out, k = name, 1
        while out in seen:
            k += 1
            out = f"{name}-{k}"
        seen.add(out)
        return out

    for s in stages:
        s.schematic_name = unique(f"{slug(s.id)}-schematic")
        for r in s.checks:
            for f in r.figures:
                f.name = unique(f.name)


def gather(path: str | Path, *, plots: bool = True, schematics: bool = True) -> ReportData:
    """Compute the project once and collect everything the report shows."""
    from reviewer.diff import chain_text, input_rows
    from reviewer.line import run_project, stage_state
    from reviewer.records import FILE_ALONE, counts, review_view, stale_entries
    from reviewer.registry import CHECKS
    from reviewer.states import result_word
    from reviewer.store import utc_now

    path = Path(path)
    run = run_project(path)
    project, checklist = run.project, run.checklist
    view = review_view(path, run)
    record, states = view.record, view.states
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
        cell = stage_state((states[(r.stage, r.check)] for r in results),
                           has_record=record.exists)
        rows = []
        for r in results:
            cs = states[(r.stage, r.check)]
            defn = CHECKS.get(r.check)
            limits = checklist.limits_for(r.check)
            rows.append(CheckRow(
                r.check, defn.question if defn else "", r.status,
                cs.label if record.exists else result_word(r.status), r.margin,
                r.summary, _values(r), limits, _worst(dict(r.worst)),
                list(r.notes),
                notes_by_seq.get(cs.waiver_seq, "") if cs.waiver_seq else "",
                [c.text() for c in cs.changed], limit_text=limit_words(r.check, limits)))
        manual = []
        for q in checklist.manual_for(st.kind):
            a = answers.get((sid, q["id"]))
            manual.append((q["id"], q["question"], a[0] if a else "not answered",
                           f"{a[1]} ({a[2]}, {a[3]})".strip() if a else ""))
        detail = cell.detail
        unanswered = [m[0] for m in manual if m[2] == "not answered"]
        if unanswered:
            detail = "; ".join(x for x in (detail, f"{len(unanswered)} manual question(s) "
                               "not answered") if x)
        block = StageBlock(sid, st.kind, cell.text(), detail, rows, manual, [])
        if plots:
            figs, block.no_plot = stage_figures(results, project)
            for row in rows:
                cf = figs.get(row.check)
                if cf is not None:
                    row.figures, row.figure_note = cf.figures, cf.note
                    block.plots += [(f.caption, f.svg) for f in cf.figures]
        else:
            block.no_plot = "drawn when the report is written to a file (-o FILE)"
        if schematics:
            from reviewer.reports.schematic import stage_svg

            block.schematic, block.schematic_note = stage_svg(st, project)
        stages.append(block)
        summary.append((sid, st.kind, cell.text(), detail))
    _name_files(stages)
    return ReportData(
        name=project.name, revision=project.revision, file=str(path), line=project.line,
        chain=chain_text(project), checklist=checklist.identity(),
        checklist_file=checklist.path if checklist.path == "standard" else rel(checklist.path),
        tool=TOOL, generated=_when(utc_now()),
        record=rel(str(record.path)) if record.exists else "",
        history_ok=record.trust.ok,
        history_note="" if record.trust.ok else "; ".join(record.trust.messages()[:3]),
        head=record.head, summary=summary,
        inputs=[(p, pretty_units(v), rel(f)) for p, v, f in input_rows(project)
                if v not in ("", "—")],
        stages=stages, history=_history(record, states, stale), counts=counts(states),
        outstanding=outstanding(view, checklist, stages), entries=len(record.entries),
        anchor_note=FILE_ALONE, extra_cautions=load_cautions(_load_types(project)))


def _load_types(project: Any) -> list[str]:
    """The kinds of back-EMF load ("battery", "motor") among the project's stages, and
    "triac" where a stage switches with one (each brings its own cautions)."""
    loads = [st.params.get("load") for st in project.stages.values()]
    out = [str(ld["type"]) for ld in loads if isinstance(ld, dict) and "type" in ld]
    if any(st.kind == "triac-phase-control" for st in project.stages.values()):
        out.append("triac")
    return out


def outstanding(view: Any, checklist: Any, stages: list[StageBlock]) -> list[str]:
    """What stands between this design and a finished review, in words (empty: nothing).

    Failing checks without a current waiver, marginal ones, review words other than signed or
    approved, unanswered manual questions, a missing approval, and a record that does not
    verify. A report's summary never reads "pass" while any of these remains.
    """
    from reviewer.states import FAILING

    sts = list(view.states.values())
    out: list[str] = []
    if view.exists and not view.verified:
        out.append("the review history does not verify (latchbook verify)")

    def names(pick: Any) -> list[str]:
        return [f"{s.stage}/{s.check}" for s in sts if pick(s)]

    def say(what: str, found: list[str]) -> None:
        if found:
            out.append(f"{len(found)} {what}: " + ", ".join(found[:4])
                       + (" …" if len(found) > 4 else ""))

    say("failing without a current waiver",
        names(lambda s: s.status in FAILING and s.review != "waived"))
    say("marginal without a current waiver",
        names(lambda s: s.status == "marginal" and s.review != "waived"))
    say("unverified", names(lambda s: s.review == "unverified"))
    say("stale", names(lambda s: s.review == "stale"))
    applicable = [s for s in sts if s.status != "not-applicable"]
    if not view.exists:
        out.append("no review record: nothing is signed")
    else:
        say("not signed", names(lambda s: s.status != "not-applicable"
                                and s.review == "unsigned"))
    unanswered = [f"{b.id}/{m[0]}" for b in stages for m in b.manual if m[2] == "not answered"]
    say("manual question(s) not answered", unanswered)
    if applicable and not all(s.review == "approved" or s.review == "waived"
                              for s in applicable):
        who = (", ".join(checklist.approvers) if checklist.approvers
               else "an approver (the checklist names none)")
        out.append(f"approval missing: not every check is approved (by {who})")
    return out



def verdict(d: ReportData) -> str:
    """The summary's first line: never "pass" while anything is outstanding."""
    if not d.outstanding:
        return "Review complete: every check passes or is waived, is approved, and every " \
               "manual question is answered"
    return f"Review not complete: {len(d.outstanding)} thing(s) outstanding"



def render(path: str | Path, fmt: str) -> str:
    """The report of the project at ``path`` as ``md`` or ``html`` text."""
    if fmt not in ("md", "html"):
        from reviewer.errors import ProjectError

        raise ProjectError(f"unknown report format `{fmt}`; use md or html")
    data = gather(path, plots=fmt == "html", schematics=fmt == "html")
    return to_markdown(data) if fmt == "md" else to_html(data)


def write_report(path: str | Path, fmt: str, out: str | Path) -> Path:
    """Render and write the report atomically; returns the path written.

    A Markdown report gets its figures (schematics and plots) as SVG files in
    ``NAME.figures/`` beside it, linked from the text.
    """
    from reviewer.store import atomic_write

    if fmt == "md":
        return write_markdown(gather(path), out)
    return atomic_write(out, render(path, fmt))


def write_line_index(rows: Any, reports: Any, path: str | Path, **kw: Any) -> Path:
    """The product line's index page: see :func:`reviewer.reports.index.write_line_index`."""
    from reviewer.reports.index import write_line_index as write

    return write(rows, reports, path, **kw)


__all__ = ["ReportData", "gather", "plot_svg", "render", "to_html", "to_markdown",
           "write_line_index", "write_report"]
