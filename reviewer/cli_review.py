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

from reviewer.errors import LatchbookError, ProjectError
from reviewer.states import FAILING
from reviewer.textsafe import dump_json, message, visible

RESULT_COLUMNS = ("pass", "marginal", "fail", "blocked", "incomplete", "n/a")
REVIEW_COLUMNS = ("unsigned", "signed", "approved", "waived", "stale", "unverified")
SHORT = {"marginal": "marg", "blocked": "blkd", "incomplete": "incp", "unsigned": "unsg",
         "signed": "sign", "approved": "appr", "waived": "waiv", "stale": "stal",
         "unverified": "unvr"}


def report_error(exc: BaseException) -> int:
    """Print a command's error in words, with the cause when it is the environment's; return
    its exit code (:func:`reviewer.errors.exit_code`: 1 refused, 2 input or environment, 3
    busy)."""
    from reviewer.errors import environment_fault, exit_code

    fault = environment_fault(exc)
    text = message(exc)
    if fault is not None:
        from reviewer.store import os_fault

        hint = os_fault(fault)
        if hint not in text:
            text += f" ({hint})"
    print(f"latchbook: {text}", file=sys.stderr)
    return exit_code(exc)


def _err(exc: LatchbookError) -> int:
    return report_error(exc)


def _say(text: str) -> None:
    print(f"latchbook: {visible(text)}", file=sys.stderr, flush=True)


def _lock_args(args: argparse.Namespace, project: Path) -> dict[str, Any]:
    """``wait``/``on_wait`` for an action, after breaking the lock if the user asked."""
    if getattr(args, "break_lock", False):
        from reviewer import store

        holder = store.break_lock(project)
        if holder is None:
            _say("there was no lock to break")
        elif holder.pid == 0:
            _say(f"removed the lock file {store.lock_path(project)} (it was damaged or not "
                 "Latchbook's)")
        else:
            _say(f"broke the lock held by {holder.text()} ({holder.what})")
    return {"wait": args.wait, "on_wait": _say}


def _done(verb: str, e: Any, extra: str = "") -> None:
    if e.existing:
        print(visible(f"already {verb}: {e.title()} (a retry: that entry is already in the "
                      "history; nothing was added)"))
    else:
        print(visible(f"{verb}: {e.title()}{extra}"))


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
    from reviewer.records import sign

    try:
        p = _project(args.project)
        e = sign(p, stage=args.stage, checks=args.check or None, meaning=args.meaning,
                 note=args.note or "", ssh_key=args.ssh_key, **_lock_args(args, p))
    except LatchbookError as exc:
        return _err(exc)
    verb = "approved" if args.meaning == "approved" else "signed"
    _done(verb, e, f", {len(e.items)} check(s), entry {e.entry_sha256[:16]}")
    return 0


def cmd_waive(args: argparse.Namespace) -> int:
    """Waive a failing or marginal check with a reason."""
    from reviewer.records import waive

    try:
        p = _project(args.project)
        e = waive(p, stage=args.stage, check=args.check, note=args.note, ssh_key=args.ssh_key,
                  **_lock_args(args, p))
    except LatchbookError as exc:
        return _err(exc)
    status = e.items[0].get("status", "fail") if e.items else "fail"
    _done("waived", e, f" ({args.stage}/{args.check} now reads {status} | waived)")
    return 0


def cmd_revoke(args: argparse.Namespace) -> int:
    """Revoke an earlier entry by its seq (an entry that does not exist is named first, before
    anything is said about the note)."""
    from reviewer.records import load_record, revoke
    from reviewer.records.actions import revocable_text
    from reviewer.records.chain import COVERING

    try:
        rec = load_record(_project(args.project))
        target = next((e for e in rec.entries if e.seq == args.entry), None)
        if target is None or target.kind not in COVERING:
            what = (f"there is no entry #{args.entry}" if target is None else
                    f"entry #{args.entry} is a {target.kind}, which cannot be revoked")
            raise ProjectError(f"{what} (each [[entry]] in {rec.path.name} has its number as "
                               f"seq). {revocable_text(rec.entries)}", _where(rec.path))
        if args.note is None:
            raise ProjectError(f"say why entry #{args.entry} no longer holds: --note TEXT "
                               "(at least 20 characters, three different words)",
                               _where(rec.path))
        p = _project(args.project)
        e = revoke(p, seq=args.entry, note=args.note, ssh_key=args.ssh_key,
                   **_lock_args(args, p))
    except LatchbookError as exc:
        return _err(exc)
    _done("revoked", e)
    return 0


def cmd_verify(args: argparse.Namespace) -> int:
    """Check the history chain, the signatures and the staleness of every sign-off."""
    from reviewer.records import verify

    try:
        rep = verify(_project(args.project), head=args.head)
    except LatchbookError as exc:
        return _err(exc)
    if args.json:
        dump_json(rep.as_dict(), sys.stdout)
    else:
        head = rep.head[:16] or "(none)"
        if rep.history_ok:
            sig = f"; {rep.signed} SSH signature(s) good" if rep.signed else ""
            print(f"history verifies: {rep.entries} entries, head {head}{sig}")
        else:
            where = f" at entry {rep.first_bad}" if rep.first_bad else ""
            print(f"history does NOT verify{where}: nothing shown from the entries that fail "
                  "counts as signed, approved or waived")
        for m in rep.messages:
            print(f"  {visible(m)}")
        for st in rep.stale:
            print(f"  stale: {visible(st)}")
        for n in rep.notes:
            print(f"  note: {visible(n)}")
    return 0 if rep.ok else 1


def status_row_of(pr: Any) -> dict[str, Any]:
    """One project's status row from its :class:`reviewer.batch.ProjectResult`: result and
    review counts, what needs attention, and the record's head and verification."""
    from reviewer.records import counts

    if pr.error:
        return {"project": None, "file": pr.file, "error": pr.error}
    project, states = pr.run.project, pr.states
    failing = [f"{s.stage}/{s.check}" for s in states.values()
               if s.status in FAILING and s.review != "waived"]
    stale = [{"check": f"{s.stage}/{s.check}", "changed": [ch.text() for ch in s.changed]}
             for s in states.values() if s.review == "stale"]
    unverified = [{"check": f"{s.stage}/{s.check}", "entries": s.unverified_seqs,
                   "problems": s.problems} for s in states.values()
                  if s.review == "unverified"]
    return {"project": project.name, "file": pr.file, "revision": project.revision,
            "variant_of": project.variant_of or None, "counts": counts(states),
            "failing": failing, "stale": stale, "unverified": unverified,
            "record": pr.record_file or None, "entries": pr.entries, "head_sha256": pr.head,
            "verified": pr.history_ok if pr.record_file else None,
            "problems": list(pr.problems), "chain_ok": pr.history_ok,
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
    res = " ".join(f"{SHORT.get(c, c):>4}" for c in RESULT_COLUMNS)
    rev = " ".join(f"{SHORT.get(c, c):>4}" for c in REVIEW_COLUMNS)
    print(f"{'':<{w}}  {'result':<{len(res)}}  review")
    print(f"{'project':<{w}}  {res}  {rev}")
    for name, r in zip(names, rows, strict=True):
        if "error" in r:
            print(f"{name:<{w}}  cannot load: {message(r['error'])}")
            continue
        c = r["counts"]
        cells = " ".join(f"{c[k]:>4}" for k in RESULT_COLUMNS) + "  " + \
            " ".join(f"{c[k]:>4}" for k in REVIEW_COLUMNS)
        print(f"{name:<{w}}  {cells}")
    for cols in (RESULT_COLUMNS, REVIEW_COLUMNS):
        print("  " + ", ".join(f"{SHORT[k]} {k}" for k in cols if k in SHORT))
    for name, r in zip(names, rows, strict=True):
        if "error" in r:
            continue
        if r["record"] is None:
            print(f"  {name}: no review record yet")
        else:
            state = "verifies" if r["verified"] else "does NOT verify"
            print(f"  {name}: history {state}; {r['entries']} entries, head "
                  f"{r['head_sha256'][:16] or '(none)'}")
            for m in r["problems"][:3]:
                print(f"  {name}:   {visible(m)}")
        for f in r.get("failing", []):
            print(f"  {name}: {visible(f)} fails without a current waiver")
        for st in r.get("stale", []):
            why = "; ".join(st["changed"][:3])
            print(visible(f"  {name}: {st['check']} stale ({why})"))
        for u in r.get("unverified", []):
            entries = ", ".join(f"#{n}" for n in u["entries"]) or "its entry"
            print(visible(f"  {name}: {u['check']} unverified: {entries} does not verify"))


def _writer_args(p: argparse.ArgumentParser) -> None:
    from reviewer.store import DEFAULT_WAIT

    p.add_argument("--ssh-key", metavar="PATH", help=KEY_HELP)
    p.add_argument("--wait", type=float, default=DEFAULT_WAIT, metavar="SECONDS",
                   help="how long to wait for another command's save to finish "
                   f"(default {DEFAULT_WAIT:.0f})")
    p.add_argument("--break-lock", action="store_true",
                   help="remove the project's lock first, whoever holds it (for a stopped "
                   "holder or a reused pid; it names the holder it removed)")


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
    _writer_args(p)
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
    _writer_args(p)
    p.set_defaults(func=cmd_waive)

    p = sub.add_parser("revoke", help="withdraw an earlier sign-off, approval or waiver",
                       description="Append a revocation of an earlier entry; the entry stays "
                       "in the history, marked as revoked.")
    p.add_argument("project", metavar="PROJECT", help=PROJECT_HELP)
    p.add_argument("--entry", required=True, type=int, metavar="SEQ",
                   help="the entry's number in the history: the seq of its [[entry]] in "
                   "NAME.review.toml")
    p.add_argument("--note", metavar="TEXT",
                   help="why it no longer holds (at least 20 characters, three different "
                   "words); needed, but asked for only once the entry is known to exist")
    _writer_args(p)
    p.set_defaults(func=cmd_revoke)

    p = sub.add_parser("verify", help="check the review history and the sign-offs' staleness",
                       description="Check the history's hash chain, its SSH signatures and "
                       "approver rules, and which sign-offs the project's inputs have made "
                       "stale. Exit 1 when something is wrong.")
    p.add_argument("project", metavar="PROJECT", help=PROJECT_HELP)
    p.add_argument("--head", metavar="HASH",
                   help="a head hash kept elsewhere (from status, a report or a commit): the "
                   "history must still contain it, else entries were cut off")
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


__all__ = ["register", "report_error", "status_exit_code", "status_row", "status_row_of"]
