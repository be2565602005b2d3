"""The product-line commands: ``latchbook report`` and ``latchbook diff``.

``report PROJECT... --format md|html [-o FILE | --out-dir DIR]`` writes review reports: one
project to standard output or ``-o FILE``; several projects, or a folder, one report each into
``--out-dir`` (on all cores; each file written atomically) with an ``index.html`` holding the
line's status matrix that links each report. ``diff OLD NEW [--json]`` compares
two project revisions or two review records and exits 0 when nothing differs, 1 when something
does, 2 on bad input.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import Any

from reviewer.textsafe import dump_json, message, visible


def cmd_report(args: argparse.Namespace) -> int:
    """Write the review report of one project, or one report per project into a folder."""
    from reviewer.report import render, write_report

    jobs = _report_jobs(args)
    if len(jobs) == 1 and not args.out_dir:
        path, _ = jobs[0]
        if args.output:
            written = write_report(path, args.format, args.output)
            print(f"report written to {visible(written)}", file=sys.stderr)
        else:
            sys.stdout.write(render(path, args.format))
        return 0
    from reviewer.cli_run import jobs_of
    from reviewer.parallel import ordered_map

    work = [(str(src), str(dest), args.format) for src, dest in jobs]
    failed = 0
    reports: dict[str, str] = {}
    for src, written, error in ordered_map(_write_one, work, jobs=jobs_of(args),
                                           scheduler=args.scheduler):
        if error:
            failed += 1
            print(f"latchbook: {message(error)}", file=sys.stderr)
        else:
            reports[src] = written
            print(f"report written to {visible(written)} ({visible(src)})", file=sys.stderr)
    if reports and args.format == "html" and args.out_dir:
        index = _write_index(reports, Path(args.out_dir))
        print(f"index written to {visible(index)}", file=sys.stderr)
    return 2 if failed else 0


def _write_index(reports: dict[str, str], out_dir: Path) -> Path:
    """The product line's index page beside the reports (``index.html``, or
    ``line-index.html`` where a project's own report already has that name)."""
    from reviewer.reports.index import write_index_for

    taken = {Path(w).resolve() for w in reports.values()}
    page = out_dir / "index.html"
    if page.resolve() in taken:
        page = out_dir / "line-index.html"
    return write_index_for(reports, page)


def _write_one(job: tuple[str, str, str]) -> tuple[str, str, str]:
    """One report, written atomically: (project, file written, error message or "")."""
    from reviewer.errors import LatchbookError
    from reviewer.report import write_report

    src, dest, fmt = job
    try:
        Path(dest).parent.mkdir(parents=True, exist_ok=True)
        return src, str(write_report(src, fmt, dest)), ""
    except LatchbookError as exc:
        return src, "", str(exc)
    except OSError as exc:
        return src, "", f"{dest}: cannot write the report: {exc.strerror}"


def _report_jobs(args: argparse.Namespace) -> list[tuple[Path, Path | None]]:
    """Each project to report on, with the file its report goes to (None: standard output).

    A folder gives every project under it, each report at the same relative place under
    ``--out-dir``; a file named directly gives ``--out-dir/NAME.html`` (or ``.md``).
    """
    from reviewer.batch import no_projects, say_skipped, select
    from reviewer.errors import ProjectError, Where

    ext = "." + args.format
    pairs: list[tuple[Path, Path | None]] = []
    several = len(args.projects) > 1 or any(Path(p).is_dir() for p in args.projects)
    out_dir = Path(args.out_dir) if args.out_dir else None
    if args.output and several:
        raise ProjectError("several projects give several reports: use --out-dir DIR "
                           "instead of -o FILE", Where(args.output))
    if out_dir is not None and out_dir.exists() and not out_dir.is_dir():
        raise ProjectError("--out-dir must be a folder (it is created if missing)",
                           Where(str(out_dir)))
    if several and out_dir is None:
        raise ProjectError("several projects give several reports: add --out-dir DIR",
                           Where(args.projects[0]))
    for item in args.projects:
        files, skipped = select([item])
        say_skipped(skipped, sys.stderr)
        root = Path(item)
        for f in files:
            if out_dir is None:
                pairs.append((f, None))
            elif root.is_dir():
                pairs.append((f, out_dir / f.relative_to(root).with_suffix(ext)))
            else:
                pairs.append((f, out_dir / (f.stem + ext)))
    if not pairs:
        raise no_projects(args.projects)
    seen: dict[Path, Path] = {}
    for src, dest in pairs:
        if dest is None:
            continue
        key = dest.resolve()
        if key in seen and seen[key].resolve() != src.resolve():
            raise ProjectError(f"{seen[key]} and {src} would both write {dest}; report them "
                               "in separate runs or from their folder", Where(str(src)))
        seen[key] = src
    return list(dict.fromkeys(pairs))


def cmd_diff(args: argparse.Namespace) -> int:
    """Compare two projects or two review records."""
    from reviewer.diff import diff_paths, render_diff

    d = diff_paths(args.old, args.new)
    if args.json:
        dump_json(d.as_dict(), sys.stdout)
    else:
        render_diff(d)
    return 1 if d.has_differences else 0


def register(sub: Any) -> None:
    """Add the ``report`` and ``diff`` subcommands to the main parser's subparsers."""
    from reviewer.cli_run import add_parallel_args

    p = sub.add_parser("report", help="a review report (Markdown or self-contained HTML)")
    p.add_argument("projects", nargs="+", metavar="PROJECT|DIR",
                   help="project files, or folders of a product line (searched recursively)")
    p.add_argument("--format", choices=("md", "html"), default="html",
                   help="md or html (default html)")
    p.add_argument("-o", "--output", metavar="FILE",
                   help="one project: write here instead of stdout")
    p.add_argument("--out-dir", metavar="DIR",
                   help="one report per project in this folder (NAME.html or NAME.md)")
    add_parallel_args(p)
    p.set_defaults(func=cmd_report)

    p = sub.add_parser("diff", help="what changed between two projects or two review records")
    p.add_argument("old", metavar="OLD",
                   help="the earlier project (NAME.toml) or review record (NAME.review.toml)")
    p.add_argument("new", metavar="NEW", help="the later one, of the same kind as OLD")
    p.add_argument("--json", action="store_true", help="JSON on standard output")
    p.set_defaults(func=cmd_diff)
