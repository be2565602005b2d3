"""The one machine-readable shape of results: ``latchbook.results/1``.

Every machine output (``check --json``, ``status --json``, ``status --matrix --json``) is one
document: ``format``, ``tool``, ``command``, the files ``skipped``, a list of ``projects``
(always a list, even for one), the run's ``verdict`` and the command's ``exit_code``. Each
project has its identity, its record, a ``verdict``, ``warnings``, per-stage states and its
``checks``, each with a ``result`` word and, where a review record exists, a ``review`` word
(:mod:`reviewer.states`). The shape is documented in docs/results-format.md and checked by the
JSON Schema shipped as ``reviewer/data/results.schema.json``.
"""

from __future__ import annotations

import json
from collections.abc import Iterable
from importlib import resources
from typing import Any

from reviewer.batch import Key, ProjectResult
from reviewer.states import ATTENTION, FAILING, WAIVABLE, review_word

FORMAT = "latchbook.results/1"

#: A project's (and a run's) verdict, worst first. ``error``: it could not be read;
#: ``fail``: a failing, blocked, incomplete or erroring check without a current waiver (an
#: error is never waived);
#: ``unverified``: its review history is broken or an entry in force does not verify;
#: ``stale``: a sign-off, approval or waiver in force no longer matches; ``marginal``: a
#: marginal check without a current waiver; ``pass``: none of these.
VERDICTS: tuple[str, ...] = ("error", "fail", "unverified", "stale", "marginal", "pass")

#: What a sampled corner table says in a check's notes (see reviewer.engine.build_corners).
SAMPLED_MARK = "sampled corners instead of all"


def schema() -> dict[str, Any]:
    """The JSON Schema of the document (package data)."""
    text = resources.files("reviewer").joinpath("data/results.schema.json").read_text("utf-8")
    return json.loads(text)


def review_of(pr: ProjectResult, key: Key) -> str | None:
    """The review word of one check, or None when the project has no review record."""
    if not pr.has_record:
        return None
    st = pr.states.get(key)
    return review_word(st) if st is not None else None


def covered(result: str, review: str | None) -> bool:
    """A current waiver covers the result."""
    return review == "waived" and result in WAIVABLE


def waiver_reason(pr: ProjectResult, key: Key) -> str:
    """The note of the waiver in force on ``key`` ("" when there is none)."""
    st = pr.states.get(key)
    seq = getattr(st, "waiver_seq", None)
    return pr.entry_notes.get(seq, "") if seq is not None else ""


def changed(pr: ProjectResult, key: Key) -> list[str]:
    """What changed since a stale entry covering ``key`` was made."""
    st = pr.states.get(key)
    return [c.text() for c in getattr(st, "changed", [])] if st is not None else []


def verdict(pr: ProjectResult) -> str:
    """The project's verdict (see :data:`VERDICTS`)."""
    if pr.error:
        return "error"
    found = set()
    if not pr.history_ok:
        found.add("unverified")
    for r in pr.run.results:
        review = review_of(pr, (r.stage, r.check))
        ok = covered(r.status, review)
        if r.status in FAILING and not ok:
            found.add("fail")
        elif r.status == "marginal" and not ok:
            found.add("marginal")
        if review in ("stale", "unverified"):
            found.add(review)
    return next((v for v in VERDICTS if v in found), "pass")


def worst_verdict(verdicts: Iterable[str]) -> str:
    """The worst of several verdicts (``pass`` for none)."""
    order = {v: i for i, v in enumerate(VERDICTS)}
    return min(verdicts, key=order.__getitem__, default="pass")


def fix_of(check: str) -> str:
    """The check's advice on what to change (from its definition)."""
    from reviewer.registry import CHECKS

    defn = CHECKS.get(check)
    return defn.fix if defn is not None else ""


def check_entry(pr: ProjectResult, r: Any) -> dict[str, Any]:
    """One check of one project in the document."""
    key = (r.stage, r.check)
    d = r.as_dict()
    review = review_of(pr, key)
    entry: dict[str, Any] = {
        "stage": r.stage, "kind": r.kind, "check": r.check, "result": r.status,
    }
    if review is not None:
        entry["review"] = review
        st = pr.states.get(key)
        entry["review_entries"] = list(getattr(st, "seqs", []) or [])
    entry |= {
        "margin": d["margin"], "summary": r.summary,
        "fix": (fix_of(r.check) or None) if r.status in ATTENTION else None,
        "worst": d["worst"], "at_worst": pr.at_worst.get(key, {}),
        "values": d["values"], "inputs_sha256": r.inputs_sha256,
        "notes": list(r.notes),
        "sampled_corners": any(SAMPLED_MARK in n for n in r.notes),
    }
    needs = getattr(r, "needs", None)
    if needs:
        entry["needs"] = list(needs)
    if review == "waived":
        entry["waiver"] = waiver_reason(pr, key)
    if review in ("stale", "unverified"):
        entry["changed"] = changed(pr, key)
    y = (pr.yields or {}).get(key)
    if y is not None:
        entry["yield"] = y.as_dict()
    return entry


def _counts(words: Iterable[str]) -> dict[str, int]:
    out: dict[str, int] = {}
    for w in words:
        out[w] = out.get(w, 0) + 1
    return dict(sorted(out.items()))


def project_entry(pr: ProjectResult) -> dict[str, Any]:
    """One project in the document (a project that could not be read carries its error)."""
    if pr.error:
        return {"file": pr.file, "name": None, "revision": None, "variant_of": None,
                "line": None, "chain": [], "checklist": None, "record": None,
                "verdict": "error", "error": pr.error, "warnings": list(pr.warnings),
                "counts": {"results": {}, "reviews": {}}, "stages": [], "checks": []}
    from reviewer.line import stage_state

    run, p = pr.run, pr.run.project
    checks = [check_entry(pr, r) for r in run.results]
    stages = []
    for sid in dict.fromkeys(r.stage for r in run.results):
        cell = stage_state(st for (s, _), st in pr.states.items() if s == sid)
        kind = next(r.kind for r in run.results if r.stage == sid)
        stages.append({"id": sid, "kind": kind, "state": cell.state, "detail": cell.detail,
                       "result": cell.result, "review": cell.review or None})
    record = None
    if pr.has_record:
        record = {"file": pr.record_file, "history_ok": pr.history_ok,
                  "first_bad": pr.first_bad, "head_sha256": pr.head, "entries": pr.entries,
                  "problems": list(pr.problems)}
    return {
        "file": pr.file, "name": p.name, "revision": p.revision,
        "variant_of": p.variant_of or None, "line": p.line or None,
        "chain": [str(c) for c in p.chain], "checklist": run.checklist.identity(),
        "record": record, "verdict": verdict(pr), "error": None,
        "warnings": list(pr.warnings),
        "counts": {"results": _counts(c["result"] for c in checks),
                   "reviews": _counts(c["review"] for c in checks if "review" in c)},
        "stages": stages, "checks": checks,
    }


def head(command: str, skipped: Iterable[tuple[str, str]],
         monte_carlo: dict[str, Any] | None = None) -> dict[str, Any]:
    """The keys that come before the projects."""
    from reviewer import TOOL

    return {"format": FORMAT, "tool": TOOL, "command": command,
            "monte_carlo": monte_carlo,
            "skipped": [{"file": f, "reason": why} for f, why in skipped]}


def tail(verdicts: Iterable[str], exit_code: int) -> dict[str, Any]:
    """The keys that come after the projects."""
    return {"verdict": worst_verdict(verdicts), "exit_code": exit_code}


__all__ = ["FORMAT", "VERDICTS", "check_entry", "covered", "head", "project_entry", "schema",
           "tail", "verdict", "worst_verdict"]
