"""Running a command over many projects: the shared options and the streaming loop.

``check`` and ``status`` (and ``status --matrix``) all go through :func:`drive`: select the
project files (saying what was skipped), compute each project on ``--jobs`` cores or a
``--scheduler``, and hand each result, in input order, to the command's own view and to the
machine outputs asked for (``--json`` on standard output, ``--junit FILE``, ``--csv FILE``).
Nothing holds every project's results: each is written out as it comes and dropped, so memory
stays flat over a line of any size. The files appear atomically when the run ends.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from reviewer.batch import Options, ProjectResult, no_projects, results, say_skipped, select
from reviewer.parallel import default_jobs
from reviewer.textsafe import visible

if TYPE_CHECKING:
    from reviewer.outputs.csv_out import CsvWriter
    from reviewer.outputs.junit import JunitWriter


def _jobs(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number of jobs") from None
    if n < 1:
        raise argparse.ArgumentTypeError("give at least 1 job (1 runs in this process)")
    return n


def add_parallel_args(p: argparse.ArgumentParser) -> None:
    """``--jobs N`` and ``--scheduler ADDRESS``."""
    p.add_argument("--jobs", "-j", type=_jobs, default=None, metavar="N",
                   help="projects computed at once, one per core (default: all cores); the "
                   "output is the same as with 1")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="compute on a Dask cluster (tcp://HOST:PORT; needs "
                   "latchbook[cluster])")


def add_output_args(p: argparse.ArgumentParser) -> None:
    """``--junit FILE``, ``--csv FILE`` and the parallel options."""
    p.add_argument("--junit", metavar="FILE",
                   help="also write JUnit XML: a test case per project, stage and check")
    p.add_argument("--csv", metavar="FILE", help="also write one CSV row per check")
    add_parallel_args(p)


def jobs_of(args: argparse.Namespace) -> int:
    """The ``--jobs`` given, or every core."""
    return getattr(args, "jobs", None) or default_jobs()


@dataclass
class Outcome:
    """What a whole run came to: per-project verdicts, how many could not be read."""

    verdicts: list[str] = field(default_factory=list)
    errors: int = 0
    count: int = 0


def drive(args: argparse.Namespace, command: str, paths: Sequence[str], *,
          exit_code: Callable[[Outcome], int], each: Callable[[ProjectResult], None],
          opts: Options | None = None, folders: bool = True, recursive: bool = True,
          monte_carlo: dict[str, Any] | None = None, want_json: bool = False) -> int:
    """Run ``command`` over ``paths``; every project to ``each`` and to the outputs.

    Returns the exit code (``exit_code(outcome)``; 2 when nothing was found).
    """
    from reviewer.outputs import document
    from reviewer.outputs.json_out import JsonStream

    files, skipped = select(paths, folders=folders, recursive=recursive)
    say_skipped(skipped, sys.stderr)
    if not files:
        raise no_projects(paths)
    # Each writer imported only when asked for (the XML one pulls in urllib and ssl).
    junit: JunitWriter | None = None
    csv: CsvWriter | None = None
    if getattr(args, "junit", None):
        from reviewer.outputs.junit import JunitWriter

        junit = JunitWriter(args.junit)
    if getattr(args, "csv", None):
        from reviewer.outputs.csv_out import CsvWriter

        csv = CsvWriter(args.csv)
    stream: JsonStream | None = None  # opened on the first result: a run that cannot start
    out = Outcome()                   # (no scheduler) leaves standard output empty
    try:
        for pr in results(files, opts or Options(), jobs=jobs_of(args),
                          scheduler=getattr(args, "scheduler", None)):
            out.count += 1
            out.errors += bool(pr.error)
            entry = document.project_entry(pr)
            out.verdicts.append(entry["verdict"])
            if want_json and stream is None:
                stream = JsonStream(sys.stdout, document.head(command, skipped, monte_carlo))
            if stream is not None:
                stream.add(entry)
            if junit is not None:
                junit.add(pr)
            if csv is not None:
                csv.add(pr)
            each(pr)
    except BaseException:
        for w in (junit, csv):
            if w is not None:
                w.spool.close()
        raise
    code = exit_code(out)
    if stream is not None:
        stream.close(document.tail(out.verdicts, code))
    for w, what in ((junit, "JUnit XML"), (csv, "CSV")):
        if w is not None:
            print(f"{what} written to {visible(str(w.close()))}", file=sys.stderr)
    return code


__all__ = ["Outcome", "add_output_args", "add_parallel_args", "drive", "jobs_of"]
