"""The product-line commands: ``latchbook report`` and ``latchbook diff``.

``report PROJECT --format md|html [-o FILE]`` writes a review report (to standard output without
``-o``; atomically with it). ``diff OLD NEW [--json]`` compares two project revisions or two
review records and exits 0 when nothing differs, 1 when something does, 2 on bad input.
"""

from __future__ import annotations

import argparse
import sys
from typing import Any

from reviewer.textsafe import dump_json, visible


def cmd_report(args: argparse.Namespace) -> int:
    """Write the review report of one project."""
    from reviewer.report import render, write_report

    if args.output:
        written = write_report(args.project, args.format, args.output)
        print(f"report written to {visible(written)}", file=sys.stderr)
    else:
        sys.stdout.write(render(args.project, args.format))
    return 0


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
    p = sub.add_parser("report", help="a review report (Markdown or self-contained HTML)")
    p.add_argument("project", metavar="PROJECT")
    p.add_argument("--format", choices=("md", "html"), default="html",
                   help="md or html (default html)")
    p.add_argument("-o", "--output", metavar="FILE", help="write here instead of stdout")
    p.set_defaults(func=cmd_report)

    p = sub.add_parser("diff", help="what changed between two projects or two review records")
    p.add_argument("old", metavar="OLD")
    p.add_argument("new", metavar="NEW")
    p.add_argument("--json", action="store_true", help="JSON on standard output")
    p.set_defaults(func=cmd_diff)
