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
    """Revoke an earlier entry by its seq."""
    from reviewer.review import revoke

    try:
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


def _projects_in(items: list[str]) -> list[Path]:
    """The project files named, or found in the folders named (review/checklist files skipped)."""
    from reviewer.project import is_project_file

    out: list[Path] = []
    for item in items or ["."]:
        p = Path(item)
        if p.is_dir():
            out += sorted(f for f in p.glob("*.toml") if is_project_file(f))
        elif p.is_file():
            out.append(p)
        else:
            from reviewer.safeio import refusal

            why = refusal(p) or "no such file or folder"
            raise ProjectError(why.replace("no such file", "no such file or folder"), _where(p))
    return out


def status_row(path: Path) -> dict[str, Any]:
    """One project's status: counts, failing and stale checks, and the chain's state."""
    from reviewer.engine import run_project
    from reviewer.review import check_states, counts, load_record

    run = run_project(path)
    project = run.project
    rec = load_record(path)
    states = check_states(rec, run)
    c = counts(states)
    failing = [f"{s.stage}/{s.check}" for s in states.values()
               if s.status in FAILING and s.waiver != "waived"]
    stale = [{"check": f"{s.stage}/{s.check}", "changed": [ch.text() for ch in s.changed]}
             for s in states.values() if "stale" in (s.signoff, s.approval, s.waiver)]
    return {"project": project.name, "file": str(path), "revision": project.revision,
            "variant_of": project.variant_of or None, "counts": c, "failing": failing,
            "stale": stale, "chain_ok": rec.chain.ok, "first_bad": rec.chain.first_bad}


def cmd_status(args: argparse.Namespace) -> int:
    """One row per project or variant: pass, marginal, fail, waived, stale, unsigned."""
    try:
        paths = _projects_in(args.paths)
    except LatchbookError as exc:
        return _err(exc)
    if not paths:
        print("latchbook: no project files (NAME.toml) found", file=sys.stderr)
        return 2
    if args.matrix:
        from reviewer.line import matrix_exit_code, matrix_json, render_matrix, status_matrix

        try:
            m = status_matrix(args.paths or ["."])
        except LatchbookError as exc:
            return _err(exc)
        if args.json:
            dump_json(matrix_json(m), sys.stdout)
        else:
            render_matrix(m)
        return matrix_exit_code(m)
    rows: list[dict[str, Any]] = []
    bad_input = False
    for p in paths:
        try:
            rows.append(status_row(p))
        except LatchbookError as exc:
            bad_input = True
            rows.append({"project": None, "file": str(p), "error": str(exc)})
    if args.json:
        dump_json(rows, sys.stdout)
    else:
        _print_status(rows)
    if bad_input:
        return 2
    wrong = any(r["failing"] or r["stale"] or not r["chain_ok"] for r in rows)
    return 1 if wrong else 0


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


def register(sub: Any) -> None:
    """Add the review-record subcommands to ``sub`` (an ``add_subparsers()`` object)."""
    p = sub.add_parser("sign", help="sign a stage as reviewed or approved")
    p.add_argument("project", metavar="PROJECT")
    p.add_argument("--stage", required=True, metavar="ID", help="a stage id, or * for all")
    p.add_argument("--check", action="append", metavar="ID",
                   help="only this check of the stage (repeat for more)")
    p.add_argument("--meaning", choices=("reviewed", "approved"), default="reviewed")
    p.add_argument("--note", default="", metavar="TEXT")
    p.add_argument("--ssh-key", metavar="PATH",
                   help="key for SSH-signed entries (default ~/.ssh/id_ed25519)")
    p.set_defaults(func=cmd_sign)

    p = sub.add_parser("waive", help="accept a failing or marginal check, with a reason")
    p.add_argument("project", metavar="PROJECT")
    p.add_argument("--stage", required=True, metavar="ID")
    p.add_argument("--check", required=True, metavar="ID")
    p.add_argument("--note", required=True, metavar="TEXT",
                   help="why the result is acceptable (at least 20 characters)")
    p.add_argument("--ssh-key", metavar="PATH")
    p.set_defaults(func=cmd_waive)

    p = sub.add_parser("revoke", help="withdraw an earlier sign-off, approval or waiver")
    p.add_argument("project", metavar="PROJECT")
    p.add_argument("--entry", required=True, type=int, metavar="SEQ")
    p.add_argument("--note", required=True, metavar="TEXT", help="why it no longer holds")
    p.add_argument("--ssh-key", metavar="PATH")
    p.set_defaults(func=cmd_revoke)

    p = sub.add_parser("verify", help="check the review history and the sign-offs' staleness")
    p.add_argument("project", metavar="PROJECT")
    p.add_argument("--json", action="store_true")
    p.set_defaults(func=cmd_verify)

    p = sub.add_parser("status", help="one row per project: pass, fail, waived, stale ...")
    p.add_argument("paths", nargs="*", metavar="DIR|PROJECT")
    p.add_argument("--json", action="store_true")
    p.add_argument("--matrix", action="store_true",
                   help="projects × stages, searching folders recursively (a product line)")
    p.set_defaults(func=cmd_status)


__all__ = ["register", "status_row"]
