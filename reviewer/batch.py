"""Many projects, one at a time or on all cores: which files to take, and one project's work.

:func:`select` turns the paths a user gave (files, shell globs, folders) into project files,
saying which files it skipped and why (a review record, a checklist, a TOML file with no
``[project]`` table), so ``latchbook check *.toml`` runs every project instead of stopping at
the first ``NAME.review.toml``.

:func:`compute` is the whole per-project job — load, compute every check, optionally store the
results, read the review record, the per-check review states, optional Monte Carlo — and
returns a :class:`ProjectResult` that holds only what the outputs need (no corner tables), so
it is small to send back from a worker and cheap to hold. :func:`results` runs it over many
projects through :func:`reviewer.parallel.ordered_map` and yields the results in order.
"""

from __future__ import annotations

import functools
import tomllib
from collections.abc import Iterator, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from reviewer.errors import LatchbookError, ProjectError, Where

Key = tuple[str, str]


@dataclass(frozen=True)
class Options:
    """What each project's job does besides computing its checks."""

    record: bool = False
    monte_carlo: int = 0
    seed: int = 0
    distribution: str = "normal"


@dataclass
class ProjectResult:
    """One project's outcome, as every output (table, JSON, JUnit, CSV, matrix) needs it.

    ``run`` keeps the results without their corner tables; ``states`` are the review states
    (empty when there is no record); ``at_worst`` each check's values at its worst corner, in
    report units; ``waiver_notes`` the reason of each entry in force, by sequence number.
    ``error`` is the message when the project (or its record) could not be read.
    """

    file: str
    run: Any = None
    states: dict[Key, Any] = field(default_factory=dict)
    record_file: str = ""
    history_ok: bool = True
    first_bad: int | None = None
    head: str = ""
    entries: int = 0
    problems: list[str] = field(default_factory=list)
    entry_notes: dict[int, str] = field(default_factory=dict)
    at_worst: dict[Key, dict[str, float | None]] = field(default_factory=dict)
    yields: dict[Key, Any] | None = None
    warnings: list[str] = field(default_factory=list)
    error: str = ""

    @property
    def has_record(self) -> bool:
        """True when the project has a review record on disk."""
        return bool(self.record_file)


# --------------------------------------------------------------------------------------------
# Which files
# --------------------------------------------------------------------------------------------

def skip_reason(path: Path) -> str | None:
    """Why a named file is not a project (None: it is one, or its own error will say why)."""
    name = path.name
    if name.endswith(".review.toml"):
        return "a review record"
    if name.endswith(".checklist.toml"):
        return "a checklist"
    if ".mine-" in name:
        return "a copy kept aside after a conflicting save"
    if not path.is_file():
        return None  # missing: its load error names it
    if path.suffix != ".toml":
        return "not a TOML file"
    if name == "pyproject.toml":
        return "a Python package file"
    from reviewer.project import MAX_BYTES
    from reviewer.safeio import read_regular

    try:  # never more than a project may hold: a huge file is named by its load, not read
        doc = tomllib.loads(read_regular(path, MAX_BYTES).decode("utf-8-sig"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError, RecursionError,
            LatchbookError):
        return None  # a broken project: loading it gives the message with the line
    if isinstance(doc.get("project"), dict):
        return None
    if isinstance(doc.get("review"), dict):
        return "a review record"
    if isinstance(doc.get("checklist"), dict):
        return "a checklist"
    return None  # an empty or broken project: loading it says what is missing


def select(paths: Sequence[str | Path], *, folders: bool = True, recursive: bool = True
           ) -> tuple[list[Path], list[tuple[str, str]]]:
    """The project files among ``paths`` and the files skipped, with the reason.

    Folders are searched (recursively unless ``recursive`` is false; hidden folders left out)
    when ``folders`` is true; else a folder is kept as it is, and loading it says that a
    project file is needed. Files found in a folder that are not projects (review records,
    checklists) are passed over silently; only files named one by one are reported skipped.
    """
    from reviewer.project import is_project_file

    found: list[Path] = []
    skipped: list[tuple[str, str]] = []
    for item in paths:
        p = Path(item)
        if p.is_dir() and folders:
            for f in sorted(p.rglob("*.toml") if recursive else p.glob("*.toml")):
                if any(part.startswith(".") for part in f.relative_to(p).parts):
                    continue
                if is_project_file(f):
                    found.append(f)
            continue
        reason = None if p.is_dir() else skip_reason(p)
        if reason:
            skipped.append((str(p), reason))
        else:
            found.append(p)
    return list(dict.fromkeys(found)), skipped


def say_skipped(skipped: Sequence[tuple[str, str]], stream: Any) -> None:
    """One line per skipped file on ``stream`` (standard error)."""
    from reviewer.textsafe import visible

    for f, why in skipped:
        print(f"latchbook: skipped {visible(f)}: {why}, not a project", file=stream)


# --------------------------------------------------------------------------------------------
# One project's job
# --------------------------------------------------------------------------------------------

def _at_worst(res: Any) -> dict[str, float | None]:
    from reviewer.fmt import to_report
    from reviewer.registry import CHECKS

    ev = res.evaluation
    defn = CHECKS.get(res.check)
    if ev is None or defn is None:
        return {}
    out: dict[str, float | None] = {}
    for name, unit in defn.units.items():
        col = ev.outcome.values.get(name)
        if col is None:
            continue
        x = float(col[ev.worst_row])
        out[name] = to_report(x, unit) if x == x and abs(x) != float("inf") else None
    return out


def compute(path: str | Path, opts: Options = Options()) -> ProjectResult:
    """Everything the outputs need about one project (a bad project is a result with an error).

    Module-level, and its arguments pickle, so a worker process or a cluster can run it.
    """
    from reviewer.engine import run_project
    from reviewer.review import check_states, load_record, record_results

    pr = ProjectResult(str(path))
    try:
        if opts.monte_carlo:  # sampling needs this project's own, whole corner tables
            from reviewer.engine import no_line_cache

            with no_line_cache():
                run = run_project(path)
        else:
            run = run_project(path)
        if opts.record:
            record_results(run, Path(path))
        record = load_record(path, run.checklist)  # verified once, here
    except LatchbookError as exc:
        pr.error = str(exc)
        return pr
    if opts.monte_carlo:
        from reviewer.tolerance import monte_carlo_all

        # every check advances chunk by chunk together, sharing draws and firing angles
        pr.yields = monte_carlo_all(run.results, opts.monte_carlo, seed=opts.seed,
                                    distribution=opts.distribution)
    pr.at_worst = {(r.stage, r.check): _at_worst(r) for r in run.results}
    pr.warnings = [str(w) for w in getattr(run.project, "warnings", ()) or ()]
    pr.states = check_states(record, run)  # all unsigned without a record (the matrix)
    if record.exists:
        pr.record_file = str(record.path)
        pr.history_ok, pr.first_bad = record.trust.ok, record.trust.first_bad
        pr.head, pr.entries = record.head, len(record.entries)
        pr.problems = record.trust.messages()
        pr.entry_notes = {e.seq: e.note for e in record.entries}
    for r in run.results:
        r.evaluation = None  # the corner tables: most of a project's memory, not needed now
    pr.run = run
    return pr


def results(paths: Sequence[str | Path], opts: Options = Options(), *, jobs: int = 1,
            scheduler: str | None = None) -> Iterator[ProjectResult]:
    """:func:`compute` for every path, in order (on ``jobs`` cores or a cluster)."""
    from reviewer.parallel import ordered_map

    fn = functools.partial(compute, opts=opts)
    yield from ordered_map(fn, [str(p) for p in paths], jobs=jobs, scheduler=scheduler,
                           compact=True)


def no_projects(paths: Sequence[str | Path]) -> ProjectError:
    """The error for a run that found nothing to do."""
    where = Where(str(paths[0])) if paths else Where(".")
    return ProjectError("no project files (NAME.toml with a [project] table) found here", where)


__all__ = ["Options", "ProjectResult", "compute", "no_projects", "results", "say_skipped",
           "select", "skip_reason"]
