"""The product line at a glance: projects and variants × stages, result and review of each.

:func:`status_matrix` loads every project under the given folders or files, computes each one
once, reads and verifies its review record once, and reduces the per-check states of
:mod:`reviewer.records` to two words per stage, shown side by side (``fail | waived``):

* the *result*: the worst result of its checks (:data:`reviewer.states.RESULTS` order);
* the *review*: the worst review word of its applicable checks (unverified, stale, unsigned,
  waived, signed, approved); none when the project has no review record.

``Cell.state`` keeps one word for a build's verdict, by precedence: ``unverified``, ``fail``
(a check fails or errors without a current waiver), ``blocked``, ``incomplete``, ``stale``,
``marginal``, ``waived``, ``unsigned``, ``n/a``, ``pass``.

A project that does not load is a row with its error. :func:`matrix_exit_code` gives what a build
should exit with: 2 when a project does not load, 1 when any stage fails, is stale or
unverified, or a history does not verify, else 0.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, TextIO

from reviewer.engine import run_project  # noqa: F401  (re-exported: reports import it from here)
from reviewer.states import FAILING, RESULTS, REVIEWS, result_word, review_word
from reviewer.textsafe import visible

STATES = ("unverified", "fail", "blocked", "incomplete", "stale", "marginal", "waived",
          "unsigned", "n/a", "pass")
_FLAGGED = STATES[:-2]  # every state a cell can be flagged with
STYLES = {"pass": "green", "marginal": "yellow", "fail": "bold red", "stale": "bold magenta",
          "waived": "cyan", "unsigned": "dim", "n/a": "dim", "error": "bold red",
          "unverified": "bold red", "blocked": "red", "incomplete": "red", "signed": "green",
          "approved": "bold green"}


@dataclass
class Cell:
    """One stage of one project: its state word, the per-check labels and a short detail."""

    state: str
    checks: dict[str, str] = field(default_factory=dict)
    counts: dict[str, int] = field(default_factory=dict)
    detail: str = ""
    result: str = ""
    review: str = ""

    def as_dict(self) -> dict[str, Any]:
        """JSON form."""
        return {"state": self.state, "result": self.result, "review": self.review or None,
                "detail": self.detail, "counts": dict(self.counts), "checks": dict(self.checks)}

    def text(self) -> str:
        """``fail | waived`` (the result alone without a record)."""
        return f"{self.result} | {self.review}" if self.review else self.result


@dataclass
class Row:
    """One project or variant: identity, the chain of files it resolves through, its cells."""

    path: str
    name: str = ""
    revision: str = ""
    variant_of: str = ""
    chain: list[str] = field(default_factory=list)
    checklist: dict[str, str] = field(default_factory=dict)
    cells: dict[str, Cell] = field(default_factory=dict)
    counts: dict[str, int] = field(default_factory=dict)
    state: str = ""
    error: str = ""
    record: str = ""
    chain_ok: bool = True
    head: str = ""
    problems: list[str] = field(default_factory=list)

    def as_dict(self) -> dict[str, Any]:
        """JSON form."""
        return {"file": self.path, "name": self.name or None, "revision": self.revision or None,
                "variant_of": self.variant_of or None, "chain": list(self.chain),
                "checklist": dict(self.checklist) or None, "state": self.state,
                "counts": dict(self.counts), "error": self.error or None,
                "record": self.record or None, "history_ok": self.chain_ok,
                "head_sha256": self.head or None, "problems": list(self.problems),
                "result": row_words(self)[0] if self.cells else None,
                "review": row_words(self)[1] or None,
                "stages": {k: c.as_dict() for k, c in self.cells.items()}}


@dataclass
class Matrix:
    """Rows of projects × columns of stage ids (in order of first appearance)."""

    stages: list[str]
    rows: list[Row]

    @property
    def failing(self) -> list[Row]:
        """Rows with a failing stage."""
        return [r for r in self.rows
                if any(c.state in ("fail", "blocked", "incomplete") for c in r.cells.values())]

    @property
    def stale(self) -> list[Row]:
        """Rows with a stale stage."""
        return [r for r in self.rows if any(c.state == "stale" for c in r.cells.values())]

    @property
    def unverified(self) -> list[Row]:
        """Rows whose history does not verify, or with a stage covered by such an entry."""
        return [r for r in self.rows if not r.chain_ok
                or any(c.state == "unverified" for c in r.cells.values())]

    @property
    def broken(self) -> list[Row]:
        """Rows whose project does not load."""
        return [r for r in self.rows if r.error]


def stage_state(states: Iterable[Any], *, has_record: bool = True) -> Cell:
    """Reduce the :class:`reviewer.records.CheckState` of one stage's checks to one cell."""
    sts = list(states)
    flags: dict[str, list[str]] = {s: [] for s in STATES}
    for st in sts:
        review = getattr(st, "review", None) or review_word(st)
        waived = review == "waived"
        if review == "unverified":
            flags["unverified"].append(st.check)
        if st.status in ("blocked", "incomplete") and not waived:
            flags[st.status].append(st.check)
        elif st.status in FAILING and not waived:
            flags["fail"].append(st.check)
        if review == "stale":
            flags["stale"].append(st.check)
        if st.status == "marginal" and not waived:
            flags["marginal"].append(st.check)
        if waived:
            flags["waived"].append(st.check)
        if st.status != "not-applicable" and review == "unsigned":
            flags["unsigned"].append(st.check)
    applicable = [st for st in sts if st.status != "not-applicable"]
    if not applicable and not flags["stale"] and not flags["unverified"]:
        state = "n/a"
    else:
        state = next((s for s in _FLAGGED if flags[s]), "pass")
    counts = {s: len(v) for s, v in flags.items() if v and s != "n/a"}
    detail_parts = []
    for s in _FLAGGED:
        if flags[s] and (has_record or s != "unsigned"):
            names = ", ".join(flags[s][:3]) + (" …" if len(flags[s]) > 3 else "")
            detail_parts.append(f"{s}: {names}" if s != "unsigned" else
                                f"{len(flags[s])} unsigned")
    rank = {w: i for i, w in enumerate(RESULTS)}
    result = result_word(min((st.status for st in sts), key=lambda w: rank.get(w, 0),
                             default="not-applicable"))
    reviews = [getattr(st, "review", None) or review_word(st) for st in (applicable or sts)]
    order = {w: i for i, w in enumerate(REVIEWS)}
    review = min(reviews, key=lambda w: order.get(w, 0), default="") if has_record else ""
    labels = {st.check: (f"{result_word(st.status)} | {review_word(st)}" if has_record
                         else result_word(st.status)) for st in sts}
    return Cell(state, labels, counts, "; ".join(detail_parts), result, review)


def _worst(states: Iterable[str]) -> str:
    order = {s: i for i, s in enumerate(STATES)}
    found = [s for s in states if s in order]
    return min(found, key=order.__getitem__) if found else "n/a"


def find_projects(paths: Sequence[str | Path]) -> list[Path]:
    """The project files named, and those under the folders named (recursively, sorted)."""
    from reviewer.batch import select

    return select(paths)[0]


def row_of(pr: Any) -> tuple[Row, list[str]]:
    """A project's row from its :class:`reviewer.batch.ProjectResult`, and its stage order."""
    row = Row(pr.file)
    if pr.error:
        row.error, row.state = pr.error, "error"
        return row, []
    from reviewer.records import counts

    run, p = pr.run, pr.run.project
    row.name, row.revision, row.variant_of = p.name, p.revision, p.variant_of
    row.chain = [str(c) for c in p.chain]
    row.checklist = run.checklist.identity()
    row.record = pr.record_file
    row.chain_ok = pr.history_ok
    row.head = pr.head
    row.problems = list(pr.problems)
    states = pr.states
    row.counts = counts(states)
    has_record = bool(pr.record_file)
    order = list(dict.fromkeys(r.stage for r in run.results))
    for sid in order:
        row.cells[sid] = stage_state((st for (s, _), st in states.items() if s == sid),
                                     has_record=has_record)
    row.state = _worst(c.state for c in row.cells.values())
    if not row.chain_ok and row.state not in ("unverified", "fail"):
        row.state = "unverified"
    return row, order


def row_words(row: Row) -> tuple[str, str]:
    """A row's worst result and worst review word (review "" without a record); a history
    that does not verify reads ``unverified`` whatever its stages say."""
    rank = {result_word(w): i for i, w in enumerate(RESULTS)}
    order = {w: i for i, w in enumerate(REVIEWS)}
    cells = list(row.cells.values())
    result = min((c.result for c in cells), key=lambda w: rank.get(w, 0), default="n/a")
    reviews = [c.review for c in cells if c.review]
    review = min(reviews, key=lambda w: order.get(w, 0), default="")
    if row.record and not row.chain_ok:
        review = "unverified"
    return result, review


def _sort_key(row: Row) -> tuple[str, int, str]:
    root = row.chain[-1] if row.chain else row.path
    # realpath, unlike Path.resolve, never raises: a link that loops is sorted by its name
    return (os.path.realpath(root), len(row.chain), row.path)


class MatrixBuilder:
    """Rows added one project at a time; :meth:`matrix` sorts them into the matrix."""

    def __init__(self) -> None:
        self.rows: list[Row] = []
        self.stages: list[str] = []

    def add(self, pr: Any) -> None:
        """Add one project's row (from a :class:`reviewer.batch.ProjectResult`)."""
        row, order = row_of(pr)
        self.rows.append(row)
        for sid in order:
            if sid not in self.stages:
                self.stages.append(sid)

    def matrix(self) -> Matrix:
        """Rows grouped by base project (the base, then its variants by depth)."""
        return Matrix(list(self.stages), sorted(self.rows, key=_sort_key))


def status_matrix(paths: Sequence[str | Path], *, jobs: int = 1,
                  scheduler: str | None = None) -> Matrix:
    """Projects × stages for the folders or project files in ``paths``.

    Each project is loaded and computed once (on ``jobs`` cores, or a cluster); rows come
    grouped by base project (the base, then its variants by depth); columns are stage ids in
    order of first appearance.
    """
    from reviewer.batch import results

    b = MatrixBuilder()
    for pr in results(find_projects(paths), jobs=jobs, scheduler=scheduler):
        b.add(pr)
    return b.matrix()


def matrix_exit_code(m: Matrix) -> int:
    """2 when a project does not load; 1 when a stage fails, is stale or unverified, or a
    history does not verify; else 0."""
    if m.broken or not m.rows:
        return 2
    return 1 if m.failing or m.stale or m.unverified else 0


def _display_name(row: Row, base_dir: Path | None) -> str:
    p = Path(row.path)
    if base_dir is not None:
        try:
            return str(p.resolve().relative_to(base_dir.resolve()))
        except ValueError:
            pass
    return p.name


def render_matrix(m: Matrix, out: TextIO | None = None, *, base_dir: str | Path | None = None,
                  width: int | None = None) -> None:
    """Print the matrix as plain-text tables fitted to ``width`` (default: the terminal's or
    ``COLUMNS``). The project column is in every block: when the stages do not fit beside
    it, they continue in further blocks under the first, each again named by project. State
    words are never cut, whatever words the cells hold."""
    from reviewer.textout import Col, blocks, colour_for, width_for, wrap

    stream = out or sys.stdout
    width = width or width_for(stream)
    colour = colour_for(stream)
    bd = Path(base_dir) if base_dir is not None else None
    lead_rows, lead_styles, body_rows, body_styles = [], [], [], []
    for row in m.rows:
        if row.error:
            overall = row.state
        else:
            result, review = row_words(row)
            overall = f"{result} | {review}" if review else result
        lead_rows.append([visible(_display_name(row, bd)), overall])
        lead_styles.append(["", STYLES.get(row.state, "")])
        if row.error:
            body_rows.append(["", ""] + ["" for _ in m.stages])
            body_styles.append(["", ""] + ["" for _ in m.stages])
            continue
        cells, styles = [], []
        for sid in m.stages:
            c = row.cells.get(sid)
            cells.append("—" if c is None else c.text())
            styles.append("dim" if c is None else STYLES.get(c.review or c.result, ""))
        body_rows.append([visible(row.revision),
                          visible(Path(row.variant_of).name if row.variant_of else ""), *cells])
        body_styles.append(["", "", *styles])
    body = [Col("rev"), Col("variant of"), *(Col(visible(sid)) for sid in m.stages)]
    lines = ["Review status by project and stage (result | review)", ""]
    lines += blocks([Col("project"), Col("overall")], lead_rows, body, body_rows, width,
                    lead_styles=lead_styles, body_styles=body_styles, colour=colour)
    notes: list[str] = []
    for row in m.rows:
        label = visible(_display_name(row, bd))
        if row.error:
            notes.append(f"{label}: {visible(row.error)}")
            continue
        parts = [f"{sid}: {c.detail}" for sid, c in row.cells.items()
                 if c.state in ("unverified", "fail", "blocked", "incomplete", "stale",
                                "marginal", "waived") and c.detail]
        if not row.chain_ok:
            parts.insert(0, "the review history does not verify (latchbook verify)")
        if row.record and row.head:
            parts.append(f"head {row.head[:16]}")
        if parts:
            notes.append(f"{label}: " + visible(" | ".join(parts)))
    if notes:
        lines.append("")
    for note in notes:  # each note hangs under its project name
        first, *rest = wrap(note, width - 4)
        lines += ["  " + first] + ["    " + r for r in wrap(" ".join(rest), width - 4) if r]
    code = matrix_exit_code(m)
    verdict = {0: "nothing fails, no sign-off is stale or unverified",
               1: f"{len(m.failing)} project(s) fail, {len(m.stale)} with stale sign-offs, "
                  f"{len(m.unverified)} whose review does not verify",
               2: "some projects do not load" if m.rows else "no projects found"}[code]
    lines += wrap(f"{len(m.rows)} project(s): {verdict}", width)
    stream.write("\n".join(lines) + "\n")


def summary_counts(rows: Iterable[Row]) -> Mapping[str, int]:
    """How many rows are in each overall state."""
    out: dict[str, int] = {}
    for r in rows:
        out[r.state] = out.get(r.state, 0) + 1
    return out


__all__ = ["Cell", "Matrix", "MatrixBuilder", "Row", "find_projects", "matrix_exit_code",
           "render_matrix", "row_of", "row_words", "run_project", "stage_state", "status_matrix"]
