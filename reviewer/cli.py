"""The command line: ``latchbook`` and its subcommands. ``main()`` returns the exit code.

Exit codes: 0 nothing fails, 1 a check fails (or a record is broken or stale), 2 bad input.
"""

from __future__ import annotations

import argparse
import os
import shutil
import sys
import time
from collections.abc import Sequence
from importlib import resources
from pathlib import Path
from typing import Any

from reviewer import TOOL
from reviewer.errors import LatchbookError
from reviewer.safety import SHORT
from reviewer.states import FAILING
from reviewer.textsafe import dump_json, message, safe_console, visible

SAFETY_LINE = SHORT
DEMO = "kiln-230.toml"


def _load_run(path: str) -> Any:
    from reviewer.engine import run_project

    return run_project(path)


def run_json(run: Any, yields: dict[tuple[str, str], Any] | None = None) -> dict[str, Any]:
    """The ``--json`` document of one project's run (with Monte Carlo yields when given)."""
    p = run.project
    results = []
    for r in run.results:
        d = r.as_dict()
        y = (yields or {}).get((r.stage, r.check))
        if y is not None:
            d.update(y.as_dict())
        results.append(d)
    return {
        "project": {"name": p.name, "revision": p.revision, "file": p.path,
                    "variant_of": p.variant_of or None, "line": p.line or None},
        "tool": TOOL,
        "checklist": run.checklist.identity(),
        "warnings": list(getattr(p, "warnings", [])),
        "results": results,
    }


def print_table(run: Any, out: Any = None,
                yields: dict[tuple[str, str], Any] | None = None) -> None:
    """A readable table of one run on the terminal."""
    from rich import box
    from rich.table import Table
    from rich.text import Text

    stream = out or sys.stdout
    width = None if stream.isatty() else 110
    console = safe_console(stream, width)
    p = run.project
    title = visible(f"{p.name} — revision {p.revision}" + (f" (variant of {p.variant_of})"
                                                            if p.variant_of else ""))
    table = Table(title=title, title_justify="left", expand=True, box=box.SIMPLE_HEAD,
                  pad_edge=False)
    table.add_column("stage", no_wrap=True)
    table.add_column("check", no_wrap=True)
    table.add_column("status", no_wrap=True)
    table.add_column("margin", justify="right", no_wrap=True)
    if yields:
        table.add_column("MC fail", justify="right", no_wrap=True)
    table.add_column("summary", ratio=1, overflow="fold")
    styles = {"pass": "green", "marginal": "yellow", "fail": "bold red", "error": "bold magenta",
              "blocked": "bold yellow", "incomplete": "bold yellow", "not-applicable": "dim"}
    for r in run.results:
        margin = "" if r.margin is None else f"{r.margin * 100:+.0f} %"
        shown = "n/a" if r.status == "not-applicable" else r.status
        cells = [Text(visible(r.stage)), Text(visible(r.check)),
                 Text(shown, style=styles.get(r.status, "")),
                 Text(margin)]
        if yields:
            y = yields.get((r.stage, r.check))
            cells.append(Text("" if y is None else f"{y.fail_fraction * 100:.2f} %"))
        table.add_row(*cells, Text(visible(r.summary)))
    console.print(table)
    for w in getattr(p, "warnings", []):
        console.print(Text(f"warning: {visible(w)}", style="yellow"))
    from reviewer.engine import status_counts

    counts = status_counts(run.results)
    console.print(Text("  ".join(f"{k}: {v}" for k, v in sorted(counts.items()))))


def cmd_check(args: argparse.Namespace) -> int:
    """Compute every check of each project; print a table or JSON."""
    runs = []
    started = time.perf_counter()
    for path in args.projects:
        runs.append(_load_run(path))
    if args.record:
        from reviewer.review import record_results

        for path, run in zip(args.projects, runs, strict=True):
            record_results(run, Path(path))
    all_yields = [_yields(run, args) for run in runs]
    if args.json:
        docs = [run_json(r, y) for r, y in zip(runs, all_yields, strict=True)]
        dump_json(docs[0] if len(docs) == 1 else docs, sys.stdout)
    else:
        for run, y in zip(runs, all_yields, strict=True):
            print_table(run, yields=y)
            if y:
                n = next(iter(y.values())).samples
                print(f"Monte Carlo: {n} samples per check, {args.distribution} "
                      f"(tolerance = 3σ for normal), seed {args.seed}; operating conditions held "
                      "at each check's worst corner.")
        print(f"{SAFETY_LINE}\n({len(runs)} project(s) in {time.perf_counter() - started:.2f} s)")
    return 1 if any(_fails(run, path) for run, path in zip(runs, args.projects, strict=True)) else 0


def _yields(run: Any, args: argparse.Namespace) -> dict[tuple[str, str], Any] | None:
    if not args.monte_carlo:
        return None
    from reviewer.tolerance import monte_carlo

    out = {}
    for r in run.results:
        y = monte_carlo(r, args.monte_carlo, seed=args.seed, distribution=args.distribution)
        if y is not None:
            out[(r.stage, r.check)] = y
    return out


def _fails(run: Any, path: str) -> bool:
    """A check fails without a current waiver (waivers come from the review record)."""
    failing = {(r.stage, r.check) for r in run.results if r.status in FAILING}
    if not failing:
        return False
    try:
        from reviewer.review import check_states, load_record
    except ImportError:
        return True
    states = check_states(load_record(Path(path)), run)
    return any(getattr(states.get(k), "state", "") != "waived" for k in failing)


def demo_copy(dest: Path) -> Path:
    """Copy the bundled demo projects into ``dest`` (never writing into the package)."""
    dest.mkdir(parents=True, exist_ok=True)
    src = resources.files("reviewer").joinpath("data/projects")
    for item in src.iterdir():
        target = dest / item.name
        if item.name.endswith(".toml") and not os.path.lexists(target):  # never via a link
            with resources.as_file(item) as f:
                shutil.copyfile(f, target)
    return dest / DEMO


def cmd_demo(args: argparse.Namespace) -> int:
    """No arguments: open the demo project, working on a copy in the current folder."""
    project = demo_copy(Path.cwd() / "latchbook-demo")
    try:
        from reviewer.tui.app import run_app
    except ImportError:
        run_app = None
    if run_app is None or not sys.stdout.isatty():
        print_table(_load_run(str(project)))
        print(visible(f"\nThe demo project is at {project}.\nOpen it in the workbook with: "
                      f"latchbook open {project}\n{SAFETY_LINE}", lines=True))
        return 0
    return run_app(str(project), read_only=False, mouse=True)


def cmd_open(args: argparse.Namespace) -> int:
    """The workbook on a project; on a review record (NAME.review.toml), on the project it
    belongs to (its [review] project key, relative to the record), read-only: the lead's view."""
    from reviewer.project import load_project

    try:
        from reviewer.tui.app import run_app
        from reviewer.tui.session import project_of_record
    except ImportError:
        run_app = project_of_record = None  # type: ignore[assignment]
    project, record = args.project, None
    if project.endswith(".review.toml") and project_of_record is not None:
        record, project = project, str(project_of_record(project))
    load_project(project)  # a bad file is reported here, before the screen changes
    if run_app is None:
        print("The workbook is not available in this version; use `latchbook check`.",
              file=sys.stderr)
        return 2
    return run_app(project, read_only=args.read_only, mouse=not args.no_mouse, record=record)


def _positive(text: str) -> int:
    try:
        n = int(float(text))
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number of samples") from None
    if n < 1 or n > 10_000_000:
        raise argparse.ArgumentTypeError("give between 1 and 10000000 samples")
    return n


def build_parser() -> argparse.ArgumentParser:
    """All subcommands."""
    parser = argparse.ArgumentParser(
        prog="latchbook", description="Design-review workbook for thyristor control circuits.",
        epilog=SAFETY_LINE)
    parser.add_argument("--version", action="version", version=TOOL)
    sub = parser.add_subparsers(dest="command")

    p = sub.add_parser("check", help="compute every check of one or more projects")
    p.add_argument("projects", nargs="+", metavar="PROJECT")
    p.add_argument("--json", action="store_true", help="JSON on standard output")
    p.add_argument("--record", action="store_true",
                   help="store the results in NAME.review.toml beside each project")
    p.add_argument("--monte-carlo", type=_positive, default=0, metavar="N",
                   help="also draw N samples of every toleranced part value per check")
    p.add_argument("--seed", type=int, default=0, help="seed for --monte-carlo (default 0)")
    p.add_argument("--distribution", choices=("normal", "uniform"), default="normal",
                   help="normal with the tolerance as 3σ (default), or uniform")
    p.set_defaults(func=cmd_check)

    p = sub.add_parser("open", help="the workbook on a project (or on a review record's "
                       "project, read-only: the lead's view)")
    p.add_argument("project", metavar="PROJECT",
                   help="NAME.toml; or NAME.review.toml to open its project read-only, where "
                   "an approver may still approve")
    p.add_argument("--read-only", action="store_true", help="look, export, change nothing")
    p.add_argument("--no-mouse", action="store_true",
                   help="leave the terminal's own mouse selection alone")
    p.set_defaults(func=cmd_open)

    try:
        from reviewer import cli_review
    except ImportError:
        cli_review = None  # type: ignore[assignment]
    if cli_review is not None:
        cli_review.register(sub)
    try:
        from reviewer import cli_line
    except ImportError:
        cli_line = None  # type: ignore[assignment]
    if cli_line is not None:
        cli_line.register(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; return the exit code (0, 1 or 2)."""
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        if args.command is None:
            return cmd_demo(args)
        return int(args.func(args))
    except LatchbookError as exc:
        print(f"latchbook: {message(exc)}", file=sys.stderr)
        return 2
    except RecursionError:
        print("latchbook: a file nests tables or arrays too deep to read", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        # The reader (e.g. `head`) went away: stop quietly, as shell tools do.
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0


if __name__ == "__main__":
    sys.exit(main())
