"""``latchbook export --spice STAGE [--corner nominal|worst] PROJECT [-o FILE]``.

Writes one stage of a project as a SPICE netlist (:mod:`reviewer.spice`) to standard output,
or atomically to FILE.
"""

from __future__ import annotations

import argparse
import sys
from typing import Any


def cmd_export(args: argparse.Namespace) -> int:
    """Export a stage's netlist."""
    from reviewer.engine import run_project
    from reviewer.spice import netlist

    text = netlist(run_project(args.project), args.spice, args.corner)
    if args.output:
        from reviewer.store import atomic_write

        written = atomic_write(args.output, text)
        print(f"netlist written to {written}", file=sys.stderr)
    else:
        sys.stdout.write(text)
    return 0


def register(sub: Any) -> None:
    """Add the ``export`` subcommand to the main parser's subparsers."""
    p = sub.add_parser("export", help="a stage as a SPICE netlist for a circuit simulator")
    p.add_argument("--spice", required=True, metavar="STAGE",
                   help="the stage id to export as a SPICE netlist")
    p.add_argument("--corner", choices=("nominal", "worst"), default="nominal",
                   help="nominal values (default), or the worst corner of the stage's most "
                   "critical check")
    p.add_argument("project", metavar="PROJECT")
    p.add_argument("-o", "--output", metavar="FILE", help="write here instead of stdout")
    p.set_defaults(func=cmd_export)
