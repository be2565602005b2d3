"""Review-record commands: ``sign``, ``waive``, ``revoke``, ``verify`` and ``status``.

``register(sub)`` adds them to the ``latchbook`` parser. Each command returns its exit code:
0 done (or nothing wrong), 1 refused or wrong (a failing check without a current waiver, a stale
sign-off, a broken history, a locked project), 2 bad input (no such file, an unknown stage, a
record that is not a regular file, is a symbolic link or is read-only).
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path
from typing import Any

from reviewer.errors import LatchbookError, ProjectError, UnsafeFileError
from reviewer.states import FAILING
from reviewer.textsafe import dump_json, message, visible

COLUMNS = ("pass", "marginal", "fail", "blocked", "incomplete", "waived", "stale", "unsigned")


def _err(exc: LatchbookError) -> int:
    print(f"latchbook: {message(exc)}", file=sys.stderr)
    return 2 if isinstance(exc, (ProjectError, UnsafeFileError)) else 1


def _project(path: str) -> Path:
    from reviewer.safeio import refusal

    p = Path(path)
    why = refusal(p)
    if why is not None and not os.path.lexists(p):
        raise ProjectError("no such project file; give the path to NAME.toml", _where(p))
    if why is not None:
        raise ProjectError(f"{why} (give the path to a project file NAME.toml)", _where(p))
    return p


def _where(p: Path) -> Any:
    from reviewer.errors import Where

    return Where(str(p))


def cmd_sign(args: argparse.Namespace) -> int:
    """Sign a stage (or ``*``) as reviewed or approved."""
    from reviewer.review import sign

    try:
        e = sign(_project(args.project), stage=args.stage, checks=args.check or None,
                 meaning=args.meaning, note=args.note or "", ssh_key=args.ssh_key)
    except LatchbookError as exc:
        return _err(exc)
    print(visible(f"signed: {e.title()}, {len(e.items)} check(s), entry {e.entry_sha256[:16]}"))
    return 0


def cmd_waive(args: argparse.Namespace) -> int:
    """Waive a failing or marginal check with a reason."""
    from reviewer.review import waive

    try:
        e = waive(_project(args.project), stage=args.stage, check=args.check, note=args.note,
                  ssh_key=args.ssh_key)
    except LatchbookError as exc:
        return _err(exc)
    print(visible(f"waived: {e.title()} ({args.stage}/{args.check} now reads fail — waived)"))
    return 0


def cmd_revoke(args: argparse.Namespace) -> int:
    """Revoke an earlier entry by its seq (an entry that does not exist is named first, before
    anything is said about the note)."""
    from reviewer.review import load_record, revoke

    try:
        rec = load_record(_project(args.project))
        if not any(e.seq == args.entry for e in rec.entries):
            have = (f"the history has entries #1 to #{len(rec.entries)}" if rec.entries
                    else "there is no review history yet")
            raise ProjectError(f"there is no entry #{args.entry}: {have} (each [[entry]] in "
                               f"{rec.path.name} has its number as seq)", _where(rec.path))
        e = revoke(_project(args.project), seq=args.entry, note=args.note, ssh_key=args.ssh_key)
    except LatchbookError as exc:
        return _err(exc)
    print(visible(f"revoked: {e.title()}"))
    return 0


def cmd_verify(args: argparse.Namespace) -> int:
    """Check the history chain, the signatures and the staleness of every sign-off."""
    from reviewer.review import verify

    try:
        rep = verify(_project(args.project))
    except LatchbookError as exc:
        return _err(exc)
    if args.json:
        dump_json({"ok": rep.ok, "first_bad": rep.first_bad, "entries": rep.entries,
                   "ssh_signatures_good": rep.signed, "head_sha256": rep.head,
                   "messages": rep.messages, "stale": rep.stale}, sys.stdout)
    else:
        if rep.ok:
            print(f"history intact: {rep.entries} entries, head {rep.head[:16] or '(none)'}")
        else:
            where = f" at entry {rep.first_bad}" if rep.first_bad else ""
            print(f"history BROKEN{where}")
        for m in rep.messages:
            print(f"  {visible(m)}")
        for s in rep.stale:
            print(f"  stale: {visible(s)}")
    return 0 if rep.ok else 1


def status_row_of(pr: Any) -> dict[str, Any]:
    """One project's status row from its :class:`reviewer.batch.ProjectResult`."""
    from reviewer.review import counts

    if pr.error:
        return {"project": None, "file": pr.file, "error": pr.error}
    project, states = pr.run.project, pr.states
    failing = [f"{s.stage}/{s.check}" for s in states.values()
               if s.status in FAILING and s.waiver != "waived"]
    stale = [{"check": f"{s.stage}/{s.check}", "changed": [ch.text() for ch in s.changed]}
             for s in states.values() if "stale" in (s.signoff, s.approval, s.waiver)]
    return {"project": project.name, "file": pr.file, "revision": project.revision,
            "variant_of": project.variant_of or None, "counts": counts(states),
            "failing": failing, "stale": stale, "chain_ok": pr.history_ok,
            "first_bad": pr.first_bad}


def status_row(path: Path) -> dict[str, Any]:
    """One project's status: counts, failing and stale checks, and the chain's state."""
    from reviewer.batch import compute

    row = status_row_of(compute(path))
    if "error" in row:
        raise ProjectError(row["error"], _where(path))
    return row


def status_exit_code(outcome: Any) -> int:
    """2 when a project cannot be read; 1 when a check fails unwaived, a sign-off is stale or
    a history is broken; else 0."""
    if outcome.errors:
        return 2
    return 1 if {"fail", "stale", "unverified"} & set(outcome.verdicts) else 0


def _missing(paths: list[str]) -> None:
    """Refuse a path that is neither a folder nor a regular file (missing, a pipe, a device)."""
    for item in paths:
        p = Path(item)
        if not p.is_dir() and not p.is_file():
            from reviewer.safeio import refusal

            why = refusal(p) or "no such file or folder"
            raise ProjectError(why.replace("no such file", "no such file or folder"), _where(p))


def cmd_status(args: argparse.Namespace) -> int:
    """One row per project or variant: pass, marginal, fail, waived, stale, unsigned."""
    from reviewer.cli_run import drive

    paths = args.paths or ["."]
    try:
        _missing(paths)
        if args.matrix:
            return _matrix(args, paths)
        rows: list[dict[str, Any]] = []
        code = drive(args, "status", paths, exit_code=status_exit_code,
                     each=lambda pr: rows.append(status_row_of(pr)), recursive=False,
                     want_json=args.json)
    except LatchbookError as exc:
        return _err(exc)
    if not args.json:
        _print_status(rows)
    return code


def _matrix(args: argparse.Namespace, paths: list[str]) -> int:
    from reviewer.cli_run import drive
    from reviewer.line import MatrixBuilder, matrix_exit_code, render_matrix

    b = MatrixBuilder()
    code = drive(args, "status --matrix", paths, exit_code=lambda _: matrix_exit_code(b.matrix()),
                 each=b.add, want_json=args.json)
    if not args.json:
        render_matrix(b.matrix())
    return code


def _print_status(rows: list[dict[str, Any]]) -> None:
    names = [visible(Path(r["file"]).name) for r in rows]
    w = max([len(n) for n in names] + [7])
    print(f"{'project':<{w}}  " + "  ".join(f"{c:>8}" for c in COLUMNS))
    for name, r in zip(names, rows, strict=True):
        if "error" in r:
            print(f"{name:<{w}}  cannot load: {message(r['error'])}")
            continue
        cells = "  ".join(f"{r['counts'][c]:>8}" for c in COLUMNS)
        extra = "" if r["chain_ok"] else f"  history broken at entry {r['first_bad']}"
        print(f"{name:<{w}}  {cells}{extra}")
    for name, r in zip(names, rows, strict=True):
        for f in r.get("failing", []):
            print(f"  {name}: {visible(f)} fails without a current waiver")
        for s in r.get("stale", []):
            why = "; ".join(s["changed"][:3])
            print(visible(f"  {name}: {s['check']} stale ({why})"))


PROJECT_HELP = "the project file, NAME.toml (its record is NAME.review.toml beside it)"
KEY_HELP = ("the SSH private key to sign the entry with, when the checklist asks for "
            "SSH-signed entries (default ~/.ssh/id_ed25519)")


def register(sub: Any) -> None:
    """Add the review-record subcommands to ``sub`` (an ``add_subparsers()`` object)."""
    p = sub.add_parser("sign", help="sign a stage as reviewed or approved",
                       description="Record a sign-off of a stage's checks in NAME.review.toml, "
                       "bound to a hash of exactly the inputs those checks read.")
    p.add_argument("project", metavar="PROJECT", help=PROJECT_HELP)
    p.add_argument("--stage", required=True, metavar="ID",
                   help="the stage id as in [stages.ID], or * for every stage")
    p.add_argument("--check", action="append", metavar="ID",
                   help="sign only this check of the stage, e.g. gate.trigger (repeat for "
                   "more; default: every check of the stage)")
    p.add_argument("--meaning", choices=("reviewed", "approved"), default="reviewed",
                   help="reviewed: you checked the results (default); approved: the lead's "
                   "approval, which the checklist may restrict to named approvers")
    p.add_argument("--note", default="", metavar="TEXT",
                   help="what you looked at or why you sign (kept in the history)")
    p.add_argument("--ssh-key", metavar="PATH", help=KEY_HELP)
    p.set_defaults(func=cmd_sign)

    p = sub.add_parser("waive", help="accept a failing or marginal check, with a reason",
                       description="Record that a failing or marginal result is accepted, and "
                       "why. The check keeps its result word and reads 'waived' beside it.")
    p.add_argument("project", metavar="PROJECT", help=PROJECT_HELP)
    p.add_argument("--stage", required=True, metavar="ID",
                   help="the stage id as in [stages.ID]")
    p.add_argument("--check", required=True, metavar="ID",
                   help="the check to waive, e.g. snubber.leakage (see `latchbook check`)")
    p.add_argument("--note", required=True, metavar="TEXT",
                   help="why the result is acceptable (at least 20 characters, three "
                   "different words)")
    p.add_argument("--ssh-key", metavar="PATH", help=KEY_HELP)
    p.set_defaults(func=cmd_waive)

    p = sub.add_parser("revoke", help="withdraw an earlier sign-off, approval or waiver",
                       description="Append a revocation of an earlier entry; the entry stays "
                       "in the history, marked as revoked.")
    p.add_argument("project", metavar="PROJECT", help=PROJECT_HELP)
    p.add_argument("--entry", required=True, type=int, metavar="SEQ",
                   help="the entry's number in the history: the seq of its [[entry]] in "
                   "NAME.review.toml")
    p.add_argument("--note", required=True, metavar="TEXT",
                   help="why it no longer holds (at least 20 characters, three different "
                   "words)")
    p.add_argument("--ssh-key", metavar="PATH", help=KEY_HELP)
    p.set_defaults(func=cmd_revoke)

    p = sub.add_parser("verify", help="check the review history and the sign-offs' staleness",
                       description="Check the history's hash chain, its SSH signatures and "
                       "approver rules, and which sign-offs the project's inputs have made "
                       "stale. Exit 1 when something is wrong.")
    p.add_argument("project", metavar="PROJECT", help=PROJECT_HELP)
    p.add_argument("--json", action="store_true", help="JSON on standard output")
    p.set_defaults(func=cmd_verify)

    p = sub.add_parser("status", help="one row per project: pass, fail, waived, stale ...",
                       description="Each project's counts of results and review states. "
                       "Exit 1 when a check fails without a current waiver, a sign-off is "
                       "stale or a history is broken; 2 when a project does not load.")
    p.add_argument("paths", nargs="*", metavar="DIR|PROJECT",
                   help="project files, or folders to look in for NAME.toml files "
                   "(default: the current folder)")
    p.add_argument("--json", action="store_true", help="JSON on standard output")
    p.add_argument("--matrix", action="store_true",
                   help="projects × stages, searching folders recursively (a product line)")
    from reviewer.cli_run import add_output_args

    add_output_args(p)
    p.set_defaults(func=cmd_status)


__all__ = ["register", "status_exit_code", "status_row", "status_row_of"]
