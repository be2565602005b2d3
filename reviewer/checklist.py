"""Checklists: which checks apply, their limits, manual questions and approvers.

The built-in ``standard`` checklist ships in the package (``reviewer/data``) and names every
check of the catalogue with its default limits. A product line's checklist extends it
(``extends = "standard"``, or a path to another checklist) and may

* tighten limits per check (``[limits."check.id"]``); a limit looser than the standard's needs
  a ``reason`` key in the same table saying why;
* switch checks off with a reason (``[off]``: ``"check.id" = "reason"``), which the engine
  reports as not-applicable with that reason;
* add manual questions per stage kind (``[[manual]]``: ``id``, ``stage_kind``, ``question``);
* name the approvers who may give the final approval.

A checklist's identity — name, version and the SHA-256 of its canonical resolved content — is
recorded with every result and sign-off, so a changed checklist makes sign-offs stale. Every
problem is a :class:`~reviewer.errors.ProjectError` naming the file, the table and the key.
"""

from __future__ import annotations

import copy
import difflib
import hashlib
import json
import math
import os
import re
import tomllib
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any

from reviewer.errors import ProjectError, Where
from reviewer.reasons import reason_problem
from reviewer.safeio import load_toml, read_regular

TOP_KEYS = ("checklist", "limits", "off", "manual")
CHECKLIST_MAX_DEPTH = 16  # a checklist uses three levels
HEAD_KEYS = ("name", "version", "extends", "approvers", "description", "sign_with_ssh",
             "allowed_signers", "self_approval")
MANUAL_KEYS = ("id", "stage_kind", "question")
# Pairs of limit keys where the first must not exceed the second once resolved.
ORDERED_PAIRS = (("fail_below", "marginal_below"), ("headroom_fail", "headroom_marginal"),
                 ("low", "high"))
_MANUAL_ID = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.\-]*$")


@dataclass
class Checklist:
    """A resolved checklist (after ``extends``).

    ``limits`` maps a check id to its limit keys (numbers only: they are handed to the check
    functions); ``reasons`` says why a check's limits are looser than the standard's;
    ``disabled`` maps a switched-off check to the reason; ``manual`` holds the questions
    (``id``, ``stage_kind``, ``question``) in file order, inherited ones first.
    """

    name: str
    version: str
    limits: dict[str, dict[str, float]]
    disabled: dict[str, str] = field(default_factory=dict)
    manual: list[dict[str, str]] = field(default_factory=list)
    approvers: list[str] = field(default_factory=list)
    sign_with_ssh: bool = False
    path: str = ""
    reasons: dict[str, str] = field(default_factory=dict)
    extends: str = ""
    allowed_signers: str = ""
    description: str = ""
    self_approval: bool = False
    #: SHA-256 of the allowed-signers file's bytes at load time ("" when none is named,
    #: "missing" when the named file is not there).
    signers_sha256: str = ""

    @property
    def sha256(self) -> str:
        """Hash of the canonical content: limits, switched-off checks, manual questions."""
        doc: dict[str, Any] = {"name": self.name, "version": self.version, "limits": self.limits,
                               "disabled": self.disabled, "manual": self.manual}
        if self.reasons:
            doc["reasons"] = self.reasons
        return hashlib.sha256(json.dumps(doc, sort_keys=True).encode()).hexdigest()

    def signers_path(self) -> Path | None:
        """The allowed-signers file (relative names are relative to the checklist file)."""
        return signers_path(self.allowed_signers, self.path)

    def policy(self) -> dict[str, Any]:
        """The signing policy: who may approve, whether self-approval counts, whether entries
        are SSH-signed, and the content hash of the allowed-signers file."""
        return {"approvers": list(self.approvers), "self_approval": self.self_approval,
                "sign_with_ssh": self.sign_with_ssh, "allowed_signers": self.signers_sha256}

    @property
    def policy_sha256(self) -> str:
        """Hash of :meth:`policy` (recorded with every entry: a change makes it stale)."""
        return hashlib.sha256(json.dumps(self.policy(), sort_keys=True).encode()).hexdigest()

    def identity(self) -> dict[str, str]:
        """The ``{name, version, sha256, policy_sha256}`` recorded in results and entries."""
        return {"name": self.name, "version": self.version, "sha256": self.sha256,
                "policy_sha256": self.policy_sha256}

    def limits_for(self, check: str) -> dict[str, float]:
        """The limits in force for ``check`` (empty when the checklist has none); a check added
        after version 1 of the standard starts from its defaults (:func:`later_defaults`)."""
        return {**later_defaults().get(check, {}), **self.limits.get(check, {})}

    def manual_for(self, stage_kind: str) -> list[dict[str, str]]:
        """The manual questions asked of every stage of ``stage_kind``."""
        return [m for m in self.manual if m.get("stage_kind") == stage_kind]

    def tightened(self) -> dict[str, dict[str, tuple[float, float]]]:
        """Per check, the limit keys that differ from the standard: ``key → (standard, this)``."""
        std = standard_limits()
        out: dict[str, dict[str, tuple[float, float]]] = {}
        for check, lim in self.limits.items():
            for k, v in lim.items():
                base = {**later_defaults().get(check, {}), **std.get(check, {})}.get(k)
                if base is not None and v != base:
                    out.setdefault(check, {})[k] = (base, v)
        return out


# ------------------------------------------------------------------------------ the standard

@lru_cache(maxsize=1)
def _standard_doc() -> dict[str, Any]:
    # The package's own data file (installed beside this module; importlib.resources would
    # cost every `latchbook check` a few milliseconds of imports for the same path).
    text = (Path(__file__).parent / "data" / "standard.checklist.toml").read_text("utf-8")
    return tomllib.loads(text)


def standard_limits() -> dict[str, dict[str, float]]:
    """The standard checklist's limits (a fresh copy)."""
    return {k: dict(v) for k, v in _standard_doc()["limits"].items()}


def later_defaults() -> dict[str, dict[str, float]]:
    """Default limits of the checks added after version 1 of the standard checklist.

    They live outside its ``[limits]`` so that the standard's identity, and every sign-off
    bound to it, stays as it was; a checklist sets them under ``[limits."…"]`` like any other.
    """
    return {k: dict(v) for k, v in _standard_doc().get("later_defaults", {}).items()}


def lower_is_stricter(check: str, key: str) -> bool:
    """True for the few limit keys where a lower number is the stricter limit."""
    return key in _standard_doc().get("lower_is_stricter", {}).get(check, [])


def standard() -> Checklist:
    """The built-in ``standard`` checklist."""
    doc = _standard_doc()
    head = doc["checklist"]
    manual = [dict(m) for m in copy.deepcopy(doc.get("manual", []))]
    return Checklist(head["name"], str(head["version"]), standard_limits(), manual=manual,
                     path="standard")


# ------------------------------------------------------------------------------ user files

def _near(word: str, known: Any) -> str:
    near = difflib.get_close_matches(word, list(known), n=1, cutoff=0.6)
    return f"; did you mean `{near[0]}`?" if near else ""


def _header_name(line: str) -> str | None:
    m = re.match(r"^\s*\[\[?\s*([^\]]+?)\s*\]\]?\s*(#.*)?$", line)
    return m.group(1).replace('"', "").replace(" ", "") if m else None


class _File:
    """One checklist file's text, for error locations."""

    def __init__(self, path: Path, text: str) -> None:
        self.path = path
        self.lines = text.splitlines()

    def line(self, table: str, key: str = "", nth: int = 1) -> int | None:
        """The line of ``key`` in the ``nth`` ``[table]`` (or of the header), if found."""
        want = table.replace('"', "")
        seen = 0
        head = None
        inside = False
        for n, text in enumerate(self.lines, 1):
            h = _header_name(text)
            if h is not None:
                inside = h == want and (seen := seen + 1) == nth
                if inside:
                    head = n
                continue
            if inside and key and re.match(rf'^\s*"?{re.escape(key)}"?\s*=', text):
                return n
        return head

    def top(self, name: str) -> Where:
        """Where a top-level table (or key) ``name`` first appears."""
        for n, text in enumerate(self.lines, 1):
            h = _header_name(text)
            if (h is not None and (h == name or h.startswith(name + "."))) or \
                    re.match(rf'^\s*"?{re.escape(name)}"?\s*[=.]', text):
                return Where(str(self.path), "", name, n)
        return Where(str(self.path), "", name)

    def where(self, table: str = "", key: str = "", nth: int = 1) -> Where:
        return Where(str(self.path), table, key, self.line(table, key, nth) if table else None)


def _reason_problem(text: str) -> str | None:
    return reason_problem(text)


def signers_path(ref: str, checklist_path: str) -> Path | None:
    """Where an ``allowed_signers`` reference points (None when the checklist names none)."""
    if not ref:
        return None
    p = Path(ref)
    if not p.is_absolute() and checklist_path not in ("", "standard"):
        p = Path(checklist_path).parent / p
    return p


def _signers_sha256(ref: str, checklist_path: str) -> str:
    p = signers_path(ref, checklist_path)
    if p is None:
        return ""
    try:
        return hashlib.sha256(p.read_bytes()).hexdigest()
    except OSError:
        return "missing"


def _number(val: Any) -> bool:
    return isinstance(val, (int, float)) and not isinstance(val, bool) and math.isfinite(val)


def _read(path: Path) -> str:
    where = Where(str(path), "checklist")
    try:
        data = read_regular(path, 1 << 20)
        return data.decode("utf-8").removeprefix("\ufeff")
    except FileNotFoundError:
        raise ProjectError(f"checklist file not found: {path}; give a path relative to the "
                           'project, or checklist = "standard"', where) from None
    except IsADirectoryError:
        raise ProjectError("this is a folder; give a checklist file NAME.checklist.toml",
                           where) from None
    except UnicodeDecodeError:
        raise ProjectError("not UTF-8 text; save the checklist as UTF-8", where) from None


def _catalogue() -> list[str]:
    from reviewer.schema import CATALOGUE

    return [cid for cid, _ in CATALOGUE]


def _stage_kinds() -> list[str]:
    import reviewer.stages  # noqa: F401  (registers the stage kinds)
    from reviewer.registry import STAGE_KINDS

    return list(STAGE_KINDS)


def _load_file(path: Path, seen: tuple[str, ...]) -> Checklist:
    key = str(path)
    if key in seen:
        names = " → ".join(Path(s).name for s in (*seen, key))
        raise ProjectError(f"extends makes a circle: {names}", Where(key, "checklist", "extends"))
    text = _read(path)
    f = _File(path, text)
    try:
        doc = load_toml(text, path, limit=CHECKLIST_MAX_DEPTH, error=ProjectError,
                        what="a checklist", fix="remove the extra brackets or braces")
    except tomllib.TOMLDecodeError as exc:
        m = re.search(r"line (\d+)", str(exc))
        raise ProjectError(f"not a readable TOML checklist: {exc}",
                           Where(key, line=int(m.group(1)) if m else None)) from None
    for k in doc:
        if k not in TOP_KEYS:
            raise ProjectError(f"unknown table `{k}`{_near(k, TOP_KEYS)} (a checklist has "
                               + ", ".join(f"[{t}]" for t in TOP_KEYS[:3]) + " and [[manual]])",
                               f.top(k))
    head = doc.get("checklist")
    if not isinstance(head, dict):
        raise ProjectError('the [checklist] table is missing: it needs at least name = "…" and '
                           'version = "…"', Where(key, "checklist"))
    for k in head:
        if k not in HEAD_KEYS:
            raise ProjectError(f"unknown key `{k}` in [checklist]{_near(k, HEAD_KEYS)}",
                               f.where("checklist", k))
    for k in ("name", "version"):
        if k not in head:
            raise ProjectError(f'[checklist] needs `{k}`, e.g. {k} = "'
                               + ("kiln-line" if k == "name" else "1") + '"',
                               f.where("checklist"))
    name = head["name"]
    if not isinstance(name, str) or not name.strip():
        raise ProjectError("`name` must be a non-empty string", f.where("checklist", "name"))
    version = head["version"]
    if isinstance(version, bool) or not isinstance(version, (str, int)) or not str(version):
        raise ProjectError('`version` must be a string such as "2"',
                           f.where("checklist", "version"))
    for k in ("description", "allowed_signers", "extends"):
        if k in head and not isinstance(head[k], str):
            raise ProjectError(f"`{k}` must be a string in quotes", f.where("checklist", k))
    for k in ("sign_with_ssh", "self_approval"):
        if k in head and not isinstance(head[k], bool):
            raise ProjectError(f"`{k}` must be true or false", f.where("checklist", k))

    extends = head.get("extends", "standard")
    if extends in ("", "standard"):
        base = standard()
    else:
        base_path = Path(os.path.realpath(path.parent / extends))
        if not base_path.is_file():
            raise ProjectError(f'the checklist "{extends}" it extends does not exist (looked for '
                               f'{base_path}); use extends = "standard" or a path relative to '
                               "this file", f.where("checklist", "extends"))
        base = _load_file(base_path, (*seen, key))

    limits = {k: dict(v) for k, v in base.limits.items()}
    reasons = dict(base.reasons)
    _apply_limits(doc.get("limits", {}), limits, reasons, f)
    disabled = dict(base.disabled)
    disabled.update(_read_off(doc.get("off", {}), f))
    manual = [dict(m) for m in base.manual] + _read_manual(doc.get("manual", []), base.manual, f)

    approvers = list(base.approvers)
    if "approvers" in head:
        raw = head["approvers"]
        if not isinstance(raw, list) or not all(isinstance(a, str) and a.strip() for a in raw):
            raise ProjectError('`approvers` must be a list of logins, e.g. approvers = '
                               '["lead-login"]', f.where("checklist", "approvers"))
        approvers = list(dict.fromkeys(a.strip() for a in raw))
    signers = str(head.get("allowed_signers", base.allowed_signers))
    if "allowed_signers" not in head and base.path not in ("", "standard") and signers:
        # Inherited: keep it relative to the checklist that named it.
        signers = str(signers_path(signers, base.path))
    return Checklist(name.strip(), str(version), limits, disabled, manual, approvers,
                     bool(head.get("sign_with_ssh", base.sign_with_ssh)), key, reasons,
                     str(extends or "standard"), signers, str(head.get("description", "")),
                     bool(head.get("self_approval", base.self_approval)),
                     _signers_sha256(signers, key))


def _apply_limits(raw: Any, limits: dict[str, dict[str, float]], reasons: dict[str, str],
                  f: _File) -> None:
    """Validate ``[limits."…"]`` tables and apply them over ``limits`` (in place)."""
    if not isinstance(raw, dict):
        raise ProjectError('`limits` must hold tables, e.g. [limits."power.blocking"]',
                           f.where("limits"))
    known = _catalogue()
    std = standard_limits()
    for check, lim in raw.items():
        table = f'limits."{check}"'
        if check not in known:
            raise ProjectError(f"unknown check `{check}` in [limits]{_near(check, known)}",
                               Where(str(f.path), "limits", check, f.line(table)))
        if not isinstance(lim, dict):
            raise ProjectError(f'`{check}` must be a table [limits."{check}"] of limit keys',
                               f.where("limits", check))
        later = later_defaults().get(check, {})
        allowed = list(std.get(check, {})) or list(later)
        reason = lim.get("reason")
        if reason is not None:
            if not isinstance(reason, str):
                raise ProjectError("`reason` must be a string saying why", f.where(table,
                                                                                   "reason"))
            problem = _reason_problem(reason)
            if problem:
                raise ProjectError(f"`reason`: {problem}", f.where(table, "reason"))
        for k, v in lim.items():
            if k == "reason":
                continue
            if k not in allowed:
                raise ProjectError(f"unknown limit key `{k}` for {check}{_near(k, allowed)} "
                                   f"(its limits are {', '.join(allowed)})", f.where(table, k))
            if not _number(v):
                raise ProjectError(f"`{k}` must be a finite number (no quotes, no units)",
                                   f.where(table, k))
            base = {**later, **std.get(check, {})}[k]
            looser = v > base if lower_is_stricter(check, k) else v < base
            if looser and reason is None:
                direction = "above" if lower_is_stricter(check, k) else "below"
                raise ProjectError(f"`{k}` = {v:g} is looser than the standard's {base:g} "
                                   f"({direction} it); tighten it, or add reason = \"…\" to "
                                   f"[{table}] saying why", f.where(table, k))
        merged = dict(limits.get(check, {}))
        merged.update({k: float(v) for k, v in lim.items() if k != "reason"})
        for a, b in ORDERED_PAIRS:
            if a in merged and b in merged and merged[a] > merged[b]:
                bad = b if b in lim else a
                raise ProjectError(f"`{a}` ({merged[a]:g}) must not be above `{b}` "
                                   f"({merged[b]:g})", f.where(table, bad))
        limits[check] = merged
        if reason is not None:
            reasons[check] = reason.strip()


def _read_off(raw: Any, f: _File) -> dict[str, str]:
    if not isinstance(raw, dict):
        raise ProjectError('[off] must be a table of "check.id" = "reason"', f.where("off"))
    known = _catalogue()
    out: dict[str, str] = {}
    for check, reason in raw.items():
        if check not in known:
            raise ProjectError(f"unknown check `{check}` in [off]{_near(check, known)}",
                               f.where("off", check))
        if not isinstance(reason, str):
            raise ProjectError(f'`{check}` needs a reason in quotes: "{check}" = "why it does '
                               'not apply"', f.where("off", check))
        problem = _reason_problem(reason)
        if problem:
            raise ProjectError(f"`{check}`: {problem}", f.where("off", check))
        out[check] = reason.strip()
    return out


def _read_manual(raw: Any, inherited: list[dict[str, str]], f: _File) -> list[dict[str, str]]:
    if not isinstance(raw, list):
        raise ProjectError("manual questions are [[manual]] tables with id, stage_kind and "
                           "question", f.where("manual"))
    kinds = _stage_kinds()
    ids = {m["id"] for m in inherited}
    out: list[dict[str, str]] = []
    for n, q in enumerate(raw, 1):
        if not isinstance(q, dict):
            raise ProjectError("each [[manual]] must be a table", f.where("manual", nth=n))
        for k in q:
            if k not in MANUAL_KEYS:
                raise ProjectError(f"unknown key `{k}` in [[manual]] #{n}{_near(k, MANUAL_KEYS)}",
                                   f.where("manual", k, nth=n))
        for k in MANUAL_KEYS:
            if not isinstance(q.get(k), str) or not q[k].strip():
                raise ProjectError(f"[[manual]] #{n} needs `{k}` as a non-empty string",
                                   f.where("manual", k if k in q else "", nth=n))
        qid = q["id"].strip()
        if not _MANUAL_ID.match(qid):
            raise ProjectError(f"`id` = \"{qid}\": use letters, digits, '-', '_' or '.', "
                               "e.g. id = \"fuse-class\"", f.where("manual", "id", nth=n))
        if qid in ids:
            raise ProjectError(f"duplicate manual question id `{qid}` ([[manual]] #{n}); "
                               "every question needs its own id", f.where("manual", "id", nth=n))
        kind = q["stage_kind"].strip()
        if kind not in kinds:
            raise ProjectError(f"`stage_kind` = \"{kind}\" is not a stage kind"
                               f"{_near(kind, kinds)} (kinds: {', '.join(kinds)})",
                               f.where("manual", "stage_kind", nth=n))
        ids.add(qid)
        out.append({"id": qid, "stage_kind": kind, "question": q["question"].strip()})
    return out


def load_checklist(ref: str, base_dir: Path) -> Checklist:
    """Load the checklist a project names: ``standard`` or a path relative to the project."""
    if ref in ("", "standard"):
        return standard()
    return _load_file(Path(os.path.realpath(Path(base_dir) / ref)), ())


__all__ = ["Checklist", "load_checklist", "lower_is_stricter", "standard", "standard_limits"]
