"""The command line: ``latchbook`` and its subcommands. ``main()`` returns the exit code.

Exit codes: 0 nothing fails, 1 a check fails (or a record is broken or stale), 2 bad input.
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from reviewer import TOOL
from reviewer.errors import LatchbookError
from reviewer.safety import SHORT
from reviewer.textsafe import message, visible

SAFETY_LINE = SHORT
DEMO = "kiln-230.toml"


def _load_run(path: str) -> Any:
    from reviewer.engine import run_project

    return run_project(path)


STYLES = {"pass": "green", "marginal": "yellow", "fail": "bold red", "error": "bold magenta",
          "blocked": "bold yellow", "incomplete": "bold yellow", "not-applicable": "dim"}


def print_table(run: Any, out: Any = None,
                yields: dict[tuple[str, str], Any] | None = None) -> None:
    """A readable table of one run, fitted to the terminal's width (or ``COLUMNS``).

    The summary stands beside the row when there is room for it, else under the row; it wraps
    between words only. Plain text without colour when piped.
    """
    from reviewer.fmt import margin, share
    from reviewer.states import result_word
    from reviewer.textout import Col, colour_for, paint, width_for, with_prose, wrap

    stream = out or sys.stdout
    width, colour = width_for(stream), colour_for(stream)
    p = run.project
    title = visible(f"{p.name} — revision {p.revision}" + (f" (variant of {p.variant_of})"
                                                            if p.variant_of else ""))
    cols = [Col("stage"), Col("check"), Col("result"), Col("margin", right=True)]
    if yields:
        cols.append(Col("MC fail", right=True))
    rows, styles, prose = [], [], []
    for r in run.results:
        cells = [visible(r.stage), visible(r.check), result_word(r.status), margin(r.margin)]
        row_styles = ["", "", STYLES.get(r.status, ""), ""]
        if yields:
            y = yields.get((r.stage, r.check))
            cells.append("" if y is None else share(y.fail_fraction, y.fail_interval))
            row_styles.append("")
        rows.append(cells)
        styles.append(row_styles)
        prose.append(visible(r.summary))
    lines = wrap(title, width) + [""]
    lines += with_prose(cols, rows, prose, "summary", width, styles=styles, colour=colour)
    for w in getattr(p, "warnings", []):
        lines += [paint(ln, "yellow", colour) for ln in wrap(f"warning: {visible(w)}", width)]
    from reviewer.engine import status_counts

    counts = status_counts(run.results)
    lines += [""] + wrap("  ".join(f"{result_word(k)}: {v}" for k, v in sorted(counts.items())),
                         width)
    stream.write("\n".join(lines) + "\n")


def cmd_check(args: argparse.Namespace) -> int:
    """Compute every check of each project; print a table or JSON (and JUnit/CSV files)."""
    from reviewer.batch import Options
    from reviewer.cli_run import drive
    from reviewer.textout import width_for, wrap

    started = time.perf_counter()
    opts = Options(record=args.record, monte_carlo=args.monte_carlo, seed=args.seed,
                   distribution=args.distribution)
    shown = [0]

    def each(pr: Any) -> None:
        shown[0] += 1
        if pr.error:
            print(f"latchbook: {message(pr.error)}", file=sys.stderr)
        elif not args.json:
            print_table(pr.run, yields=pr.yields)
            if pr.yields:
                n = next(iter(pr.yields.values())).samples
                print("\n".join(wrap(
                    f"Monte Carlo: {n} samples per check, {args.distribution} (tolerance = 3σ "
                    f"for normal), seed {args.seed}; MC fail is the share of failing samples "
                    "(with none, the 95 % interval's top). Operating conditions (supply, "
                    "ambient, settings) are held at each check's worst corner, so a yield "
                    "says how units fare there, not in everyday use.", width_for(sys.stdout))))

    mc = ({"samples": args.monte_carlo, "seed": args.seed, "distribution": args.distribution}
          if args.monte_carlo else None)
    code = drive(args, "check", args.projects, exit_code=check_exit_code, each=each, opts=opts,
                 folders=False, monte_carlo=mc, want_json=args.json)
    if not args.json:
        print("\n".join(wrap(SAFETY_LINE, width_for(sys.stdout))))
        print(f"({shown[0]} project(s) in {time.perf_counter() - started:.2f} s)")
    return code


def check_exit_code(outcome: Any) -> int:
    """2 when a project cannot be read; 1 when a check fails without a current waiver."""
    if outcome.errors:
        return 2
    return 1 if "fail" in outcome.verdicts else 0


def demo_copy(dest: Path) -> Path:
    """Copy the bundled demo tree into ``dest``, folders too (never writing into the package).

    Files already there are kept: a second run does not undo the user's edits.
    """
    import shutil
    from importlib import resources

    def copy(src: Any, target: Path) -> None:
        if os.path.islink(target):
            return  # never write through a link
        target.mkdir(parents=True, exist_ok=True)
        for item in src.iterdir():
            if item.is_dir():
                if not item.name.startswith((".", "__")):
                    copy(item, target / item.name)
            elif item.name.endswith((".toml", ".md")) \
                    and not os.path.lexists(target / item.name):  # never via a link
                with resources.as_file(item) as f:
                    shutil.copyfile(f, target / item.name)

    copy(resources.files("reviewer").joinpath("data/projects"), dest)
    return dest / DEMO


def cmd_demo(args: argparse.Namespace) -> int:
    """No arguments: open the demo project, working on a copy in the current folder."""
    project = demo_copy(Path.cwd() / "latchbook-demo")
    run_app = None
    if sys.stdout.isatty():  # the workbook (and its imports) only for a terminal
        try:
            from reviewer.tui.app import run_app
        except ImportError:
            run_app = None
    if run_app is None:
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

    p = sub.add_parser("check", help="compute every check of one or more projects",
                       description="Compute every check of each project, worst case over its "
                       "tolerances, temperatures and supply range. Exit 0 when nothing fails, "
                       "1 when a check fails without a current waiver, 2 on bad input. The "
                       "table fits the terminal, or COLUMNS when set.")
    p.add_argument("projects", nargs="+", metavar="PROJECT",
                   help="project files, NAME.toml (variants resolve their variant_of)")
    p.add_argument("--json", action="store_true", help="JSON on standard output")
    p.add_argument("--record", action="store_true",
                   help="store the results in NAME.review.toml beside each project")
    p.add_argument("--monte-carlo", type=_positive, default=0, metavar="N",
                   help="also draw N samples of every toleranced part value per check")
    p.add_argument("--seed", type=int, default=0, help="seed for --monte-carlo (default 0)")
    p.add_argument("--distribution", choices=("normal", "uniform"), default="normal",
                   help="normal with the tolerance as 3σ (default), or uniform")
    from reviewer.cli_run import add_output_args

    add_output_args(p)
    p.set_defaults(func=cmd_check)

    p = sub.add_parser("open", help="the workbook on a project (or on a review record's "
                       "project, read-only: the lead's view)")
    p.add_argument("project", metavar="PROJECT",
                   help="NAME.toml; or NAME.review.toml to open its project read-only, where "
                   "an approver may still approve")
    p.add_argument("--read-only", action="store_true",
                   help="look only: no edits, no sign-offs, no approvals; nothing is written")
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
    from reviewer import cli_export, completion

    cli_export.register(sub)
    completion.register(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; return the exit code (0, 1, 2 or 3)."""
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        if args.command is None:
            return cmd_demo(args)
        return int(args.func(args))
    except LatchbookError as exc:
        from reviewer.cli_review import report_error

        code = report_error(exc)  # what reaches here is the user's input (2), or busy (3)
        return 2 if code == 1 else code
    except RecursionError:
        # Every reader of a user's TOML refuses deep nesting itself, naming the file; this is
        # the last guard for a path that does not, and says what was being read.
        from reviewer.textsafe import visible

        what = getattr(args, "project", None) or getattr(args, "paths", None) or "a file"
        print(f"latchbook: {visible(str(what))}: a file nests tables or arrays too deep to "
              "read; check the project and its review record (and please report this "
              "command: its reader should have named the file)", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        # The reader (e.g. `head`) went away: stop quietly, as shell tools do.
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0
    except OSError as exc:
        from reviewer.errors import environment_fault

        if environment_fault(exc) is None:
            raise
        from reviewer.store import os_fault

        print(f"latchbook: {exc.filename or 'a file'}: {os_fault(exc)}", file=sys.stderr)
        return 2


if __name__ == "__main__":
    sys.exit(main())
