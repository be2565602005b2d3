"""What changed between two revisions of a project, or between two review records.

Two project files (``NAME.toml``): both are loaded (variants resolved) and computed; the diff
lists every resolved input whose value changed, in engineering notation with its unit and the
file it came from (base or variant), the checklist's changes, and the checks whose status or
margin moved.

Two review records (``NAME.review.toml``): the stored results whose status or margin moved (and
whose inputs changed, by hash), the history entries added (sign-offs, approvals, waivers,
revocations, notes), entries that were removed or altered (the history must only grow), and the
sign-offs that went stale or became current again — judged by :mod:`reviewer.review` against
each record's own stored results.
"""

from __future__ import annotations

import math
import sys
from collections.abc import Mapping
from dataclasses import asdict, dataclass, field
from pathlib import Path
from types import SimpleNamespace
from typing import Any, TextIO

from reviewer import fmt
from reviewer.errors import ProjectError, Where
from reviewer.fmt import eng, show
from reviewer.model import Part, Project, Stage, Value
from reviewer.textsafe import safe_console

MARGIN_ABS = 1e-9
MARGIN_REL = 1e-6


@dataclass
class InputChange:
    """One resolved input: old and new as shown (None: absent), and the file each came from."""

    path: str
    old: str | None
    new: str | None
    old_from: str = ""
    new_from: str = ""


@dataclass
class ResultChange:
    """A check whose status or margin moved (or that appeared or disappeared)."""

    stage: str
    check: str
    old_status: str | None
    new_status: str | None
    old_margin: float | None
    new_margin: float | None
    summary: str = ""
    inputs_changed: bool = False
    values: list[str] = field(default_factory=list)


@dataclass
class EntryChange:
    """A history entry added, revoked, removed or altered, gone stale or current again."""

    change: str
    seq: int
    kind: str
    title: str
    at: str = ""
    note: str = ""
    detail: str = ""


@dataclass
class Diff:
    """Everything that differs between OLD and NEW."""

    what: str
    old: str
    new: str
    header: list[tuple[str, str, str]] = field(default_factory=list)
    inputs: list[InputChange] = field(default_factory=list)
    checklist: list[tuple[str, str, str]] = field(default_factory=list)
    results: list[ResultChange] = field(default_factory=list)
    entries: list[EntryChange] = field(default_factory=list)
    info: list[tuple[str, str, str]] = field(default_factory=list)

    @property
    def has_differences(self) -> bool:
        """True when anything but the informational fields differs."""
        return bool(self.header or self.inputs or self.checklist or self.results
                    or self.entries)

    def as_dict(self) -> dict[str, Any]:
        """The ``--json`` document."""
        return {"what": self.what, "old": self.old, "new": self.new,
                "differences": self.has_differences,
                "header": [{"field": f, "old": a, "new": b} for f, a, b in self.header],
                "info": [{"field": f, "old": a, "new": b} for f, a, b in self.info],
                "inputs": [asdict(c) for c in self.inputs],
                "checklist": [{"field": f, "old": a, "new": b} for f, a, b in self.checklist],
                "results": [asdict(c) for c in self.results],
                "entries": [asdict(c) for c in self.entries]}


# ---------------------------------------------------------------------------------- inputs

def value_text(v: Any) -> str:
    """A resolved parameter as a reader sees it: ``230 V (207 V – 253 V)``, text, lists."""
    if isinstance(v, Value):
        if not v.varies:
            return show(v.nom, v.dim)
        return f"{show(v.nom, v.dim)} ({show(v.lo, v.dim)} – {show(v.hi, v.dim)})"
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, list):
        return ", ".join(str(x) for x in v)
    return str(v)


def _key(v: Any) -> Any:
    if isinstance(v, Value):
        return ("value", v.dim, v.nom, v.lo, v.hi)
    if isinstance(v, list):
        return ("list", tuple(str(x) for x in v))
    return ("text", str(v))


def _same(a: Any, b: Any) -> bool:
    ka, kb = _key(a), _key(b)
    if ka[0] != kb[0]:
        return False
    if ka[0] != "value":
        return ka == kb
    if ka[1] != kb[1]:
        return False
    return all((math.isnan(x) and math.isnan(y)) or math.isclose(x, y, rel_tol=1e-12,
                                                                 abs_tol=1e-300)
               for x, y in zip(ka[2:], kb[2:], strict=True))


def _walk(prefix: str, node: Mapping[str, Any], out: dict[str, Any]) -> None:
    for k, v in node.items():
        p = f"{prefix}.{k}"
        if isinstance(v, Mapping):
            _walk(p, v, out)
        else:
            out[p] = v


def flatten(project: Project) -> dict[str, Any]:
    """Every resolved parameter of ``project`` by dotted path (as in the project file)."""
    out: dict[str, Any] = {}
    head = {"name": project.name, "revision": project.revision, "line": project.line,
            "checklist": project.checklist, "variant_of": project.variant_of}
    for k, v in head.items():
        if v:
            out[f"project.{k}"] = v
    _walk("conditions", project.conditions, out)
    _walk("supply", project.supply, out)
    for ref, part in project.parts.items():
        _part(ref, part, out)
    for sid, st in project.stages.items():
        _stage(sid, st, out)
    return out


def _part(ref: str, part: Part, out: dict[str, Any]) -> None:
    out[f"parts.{ref}.type"] = part.type
    if part.description:
        out[f"parts.{ref}.description"] = part.description
    _walk(f"parts.{ref}", part.params, out)
    _walk(f"parts.{ref}.cold", part.cold, out)


def _stage(sid: str, st: Stage, out: dict[str, Any]) -> None:
    out[f"stages.{sid}.kind"] = st.kind
    _walk(f"stages.{sid}", st.params, out)


def origin_of(project: Project, path: str) -> str:
    """The file a resolved value came from (its base or the variant), by the nearest path."""
    parts = path.split(".")
    while parts:
        f = project.origin.get(".".join(parts))
        if f:
            return f
        parts.pop()
    return project.path


def chain_text(project: Project) -> str:
    """``kiln-120-2k.toml, based on kiln-120-1k.toml, based on kiln-base.toml``."""
    return ", based on ".join(Path(c).name for c in project.chain) or Path(project.path).name


def input_rows(project: Project) -> list[tuple[str, str, str]]:
    """``(path, value as shown, file it came from)`` for every resolved input (reports)."""
    return [(p, value_text(v), origin_of(project, p)) for p, v in flatten(project).items()]


def _short(path: str, root: Path | None) -> str:
    if not path:
        return ""
    p = Path(path)
    if root is not None:
        try:
            return str(p.resolve().relative_to(root))
        except ValueError:
            pass
    return p.name


def diff_inputs(old: Project, new: Project) -> list[InputChange]:
    """The resolved inputs whose values differ (paths in the new project's order first)."""
    a, b = flatten(old), flatten(new)
    root = Path(new.path).resolve().parent
    out: list[InputChange] = []
    for path in list(b) + [p for p in a if p not in b]:
        va, vb = a.get(path), b.get(path)
        if va is not None and vb is not None and _same(va, vb):
            continue
        out.append(InputChange(path, None if va is None else value_text(va),
                               None if vb is None else value_text(vb),
                               _short(origin_of(old, path), root) if va is not None else "",
                               _short(origin_of(new, path), root) if vb is not None else ""))
    return out


def diff_checklists(old: Any, new: Any) -> list[tuple[str, str, str]]:
    """Identity, limits, switched-off checks, manual questions and approvers that differ."""
    out: list[tuple[str, str, str]] = []
    ia, ib = old.identity(), new.identity()
    if ia != ib:
        out.append(("checklist", f"{ia['name']} v{ia['version']} ({ia['sha256'][:12]})",
                    f"{ib['name']} v{ib['version']} ({ib['sha256'][:12]})"))
    for check in sorted(set(old.limits) | set(new.limits)):
        la, lb = old.limits.get(check, {}), new.limits.get(check, {})
        for k in sorted(set(la) | set(lb)):
            if la.get(k) != lb.get(k):
                out.append((f"limit {check}.{k}", _g(la.get(k)), _g(lb.get(k))))
    for check in sorted(set(old.disabled) | set(new.disabled)):
        if old.disabled.get(check) != new.disabled.get(check):
            out.append((f"off {check}", old.disabled.get(check, "(on)"),
                        new.disabled.get(check, "(on)")))
    qa = {m["id"]: m for m in old.manual}
    qb = {m["id"]: m for m in new.manual}
    for qid in sorted(set(qa) | set(qb)):
        if qa.get(qid) != qb.get(qid):
            out.append((f"manual {qid}", qa[qid]["question"] if qid in qa else "(none)",
                        qb[qid]["question"] if qid in qb else "(none)"))
    if list(old.approvers) != list(new.approvers):
        out.append(("approvers", ", ".join(old.approvers) or "(anyone)",
                    ", ".join(new.approvers) or "(anyone)"))
    return out


def _g(x: float | None) -> str:
    return "(none)" if x is None else f"{x:g}"


# --------------------------------------------------------------------------------- results

def _moved(a: float | None, b: float | None) -> bool:
    if a is None or b is None:
        return (a is None) != (b is None)
    return abs(a - b) > MARGIN_ABS + MARGIN_REL * abs(a)


def _result_changes(old: Mapping[tuple[str, str], Any], new: Mapping[tuple[str, str], Any],
                    get: Any) -> list[ResultChange]:
    out: list[ResultChange] = []
    for key in list(new) + [k for k in old if k not in new]:
        a, b = old.get(key), new.get(key)
        sa, sb = (get(a, "status") if a else None), (get(b, "status") if b else None)
        ma, mb = (get(a, "margin") if a else None), (get(b, "margin") if b else None)
        if sa == sb and not _moved(ma, mb):
            continue
        ch = ResultChange(key[0], key[1], sa, sb, ma, mb,
                          str(get(b, "summary") or "") if b else "")
        if a and b:
            ch.inputs_changed = get(a, "inputs_sha256") != get(b, "inputs_sha256")
            ch.values = _value_changes(get(a, "values") or {}, get(b, "values") or {})
        out.append(ch)
    return out


def _stat(d: Any) -> dict[str, Any]:
    if hasattr(d, "as_dict"):
        return d.as_dict()
    return dict(d) if isinstance(d, Mapping) else {}


def _value_changes(va: Mapping[str, Any], vb: Mapping[str, Any]) -> list[str]:
    """Named values (checks.md) whose nominal, min or max moved, in engineering notation."""
    out = []
    for name in vb:
        a, b = _stat(va.get(name, {})), _stat(vb[name])
        unit = str(b.get("unit", ""))
        ends = ("nominal", "min", "max")
        if not a or any(_moved(_f(a.get(k)), _f(b.get(k))) for k in ends):
            old = _stat_text(a, unit) if a else "(absent)"
            out.append(f"{name}: {old} → {_stat_text(b, unit)}")
    return out


def _stat_text(d: Mapping[str, Any], unit: str) -> str:
    """``nominal (min – max) unit`` of a stored value, already in its report unit."""
    lo, hi = _f(d.get("min")), _f(d.get("max"))
    nom = eng(_f(d.get("nominal")), unit, si=False)
    if lo is None or hi is None or lo == hi:
        return nom
    return f"{nom} ({eng(lo, unit, si=False)} – {eng(hi, unit, si=False)})"


def _f(x: Any) -> float | None:
    return float(x) if isinstance(x, (int, float)) and not isinstance(x, bool) else None


# ---------------------------------------------------------------------------- the two modes

def is_record(path: str | Path) -> bool:
    """True for a ``NAME.review.toml`` file."""
    return Path(path).name.endswith(".review.toml")


def diff_projects(old_path: str | Path, new_path: str | Path) -> Diff:
    """Inputs, checklist and results between two project files."""
    from reviewer.line import run_project

    ra, rb = run_project(old_path), run_project(new_path)
    d = Diff("projects", str(old_path), str(new_path))
    d.inputs = diff_inputs(ra.project, rb.project)
    chain_a, chain_b = chain_text(ra.project), chain_text(rb.project)
    if chain_a != chain_b:
        d.info.append(("variant chain", chain_a, chain_b))
    d.checklist = diff_checklists(ra.checklist, rb.checklist)
    d.results = _result_changes(ra.by_key(), rb.by_key(), lambda r, k: getattr(r, k))
    return d


class _RecordRun:
    """A record's own stored results in the shape :func:`reviewer.review.check_states` reads."""

    def __init__(self, header: Mapping[str, Any], results: list[dict[str, Any]]) -> None:
        ident = dict(header.get("checklist", {}))
        self.checklist = SimpleNamespace(identity=lambda: ident)
        self._by = {(str(r.get("stage")), str(r.get("check"))):
                    SimpleNamespace(stage=str(r.get("stage")), check=str(r.get("check")),
                                    status=str(r.get("status")), margin=r.get("margin"),
                                    summary=r.get("summary", ""),
                                    inputs_sha256=r.get("inputs_sha256", ""), snapshot={},
                                    values=r.get("values", {}))
                    for r in results}

    def by_key(self) -> dict[tuple[str, str], Any]:
        return dict(self._by)


def _when(e: Any) -> str:
    return e.at.strftime("%Y-%m-%d %H:%M UTC") if e.at else ""


def diff_records(old_path: str | Path, new_path: str | Path) -> Diff:
    """Results, history entries and staleness between two review records."""
    from reviewer.review import load_record, stale_entries

    ra, rb = load_record(old_path), load_record(new_path)
    for rec, p in ((ra, old_path), (rb, new_path)):
        if not rec.exists:
            raise ProjectError("no such review record; give two NAME.review.toml files or two "
                               "project files", Where(str(p)))
    d = Diff("records", str(old_path), str(new_path))
    ha, hb = ra.header, rb.header
    for k in ("project", "checklist"):
        if ha.get(k) != hb.get(k):
            d.header.append((k, _ident(ha.get(k)), _ident(hb.get(k))))
    for k in ("tool", "computed_at"):
        if ha.get(k) != hb.get(k):
            d.info.append((k, str(ha.get(k, "")), str(hb.get(k, ""))))
    runa, runb = _RecordRun(ha, ra.results), _RecordRun(hb, rb.results)
    d.results = _result_changes(runa.by_key(), runb.by_key(), lambda r, k: getattr(r, k))

    old_hashes = [e.entry_sha256 for e in ra.entries]
    new_hashes = [e.entry_sha256 for e in rb.entries]
    common = 0
    while common < min(len(old_hashes), len(new_hashes)) and \
            old_hashes[common] == new_hashes[common]:
        common += 1
    for e in ra.entries[common:]:
        d.entries.append(EntryChange("removed or altered", e.seq, e.kind, e.title(), _when(e),
                                     e.note, "the history only grows: this entry is not in NEW "
                                     "as it was"))
    for e in rb.entries[common:]:
        change = "revoked" if e.kind == "revoke" else "added"
        problems = rb.trust.problems_of(e)
        d.entries.append(EntryChange(change, e.seq, e.kind, e.title(), _when(e), e.note,
                                     (f"UNVERIFIED, counts for nothing: {problems[0]}; "
                                      if problems else "")
                                     + f"{e.meaning}: " + ", ".join(e.checks[:6])
                                     + (" …" if len(e.checks) > 6 else "")))
    for rec, side in ((ra, "OLD"), (rb, "NEW")):
        if rec.exists and not rec.trust.ok:
            where = f" at entry {rec.trust.first_bad}" if rec.trust.first_bad else ""
            first = rec.trust.messages()[0] if rec.trust.messages() else ""
            d.info.append(("history", "", f"{side} does not verify{where}: {first}"))
    stale_a = {e.seq for e, _ in stale_entries(ra, runa)}
    stale_b = {e.entry_sha256: (e, ch) for e, ch in stale_entries(rb, runb)}
    by_key_b = runb.by_key()
    for e, changes in stale_b.values():
        if e.seq in stale_a and e.seq <= common:
            continue
        why = _stale_reason(e, changes, by_key_b)
        d.entries.append(EntryChange("gone stale", e.seq, e.kind, e.title(), _when(e), e.note,
                                     why))
    stale_b_seqs = {e.seq for e, _ in stale_b.values()}
    for seq in sorted(stale_a - stale_b_seqs):
        e = next((x for x in rb.entries if x.seq == seq), None)
        if e is not None and seq <= common:
            d.entries.append(EntryChange("current again", seq, e.kind, e.title(), _when(e),
                                         e.note, "its checks read what was signed again"))
    return d


def _stale_reason(entry: Any, changes: list[Any], by_key: Mapping[tuple[str, str], Any]) -> str:
    """Which covered checks no longer match, from the record's own results."""
    paths = {c.path for c in changes}
    parts = []
    if "checklist" in paths:
        c = next(c for c in changes if c.path == "checklist")
        parts.append(f"checklist {c.old} → {c.new}")
    moved = []
    for item in entry.items:
        key = (str(item.get("stage")), str(item.get("check")))
        res = by_key.get(key)
        if res is None:
            moved.append(f"{key[0]}/{key[1]} gone")
        elif res.inputs_sha256 != item.get("inputs_sha256"):
            moved.append(f"{key[1]} inputs changed")
        elif res.status != item.get("status"):
            moved.append(f"{key[1]} {item.get('status')} → {res.status}")
    if moved:
        parts.append(", ".join(moved[:6]) + (f" (+{len(moved) - 6} more)"
                                              if len(moved) > 6 else ""))
    return "; ".join(parts) or "no longer matches"


def _ident(v: Any) -> str:
    if isinstance(v, Mapping):
        return f"{v.get('name', '?')} v{v.get('version', '?')} ({str(v.get('sha256', ''))[:12]})"
    return "" if v is None else str(v)


def diff_paths(old: str | Path, new: str | Path) -> Diff:
    """Two projects or two records; anything else is an error that says what to give."""
    ra, rb = is_record(old), is_record(new)
    if ra != rb:
        raise ProjectError("give two project files (NAME.toml) or two review records "
                           "(NAME.review.toml), not one of each", Where(str(new)))
    from reviewer.safeio import refusal

    for p in (old, new):
        why = refusal(p)  # a pipe, a device or a link loop is named as what it is
        if why is not None:
            raise ProjectError(why, Where(str(p)))
    return diff_records(old, new) if ra else diff_projects(old, new)


# ------------------------------------------------------------------------------- rendering

def _margin(x: float | None) -> str:
    return fmt.margin(x) or "—"  # as the workbook, the command line and the reports write it


def render_diff(d: Diff, out: TextIO | None = None, *, width: int | None = None) -> None:
    """Print the diff for a terminal (rich; every piece of user text is plain, never markup)."""
    from rich.text import Text

    stream = out or sys.stdout
    if width is None and not (hasattr(stream, "isatty") and stream.isatty()):
        width = 110
    c = safe_console(stream, width)
    c.print(Text(f"{d.what}: {d.old} → {d.new}", style="bold"))
    if not d.has_differences:
        c.print(Text("no differences"))
    for title, rows in (("header", d.header), ("checklist", d.checklist)):
        if rows:
            c.print(Text(f"\n{title}", style="bold underline"))
            for f, a, b in rows:
                c.print(Text(f"  {f}: {a} → {b}"))
    if d.inputs:
        c.print(Text("\ninputs", style="bold underline"))
        for ch in d.inputs:
            line = Text(f"  {ch.path}: ")
            line.append(ch.old if ch.old is not None else "(absent)", style="red")
            line.append(" → ")
            line.append(ch.new if ch.new is not None else "(absent)", style="green")
            if ch.old_from != ch.new_from and ch.old_from and ch.new_from:
                line.append(f"   [{ch.old_from} → {ch.new_from}]", style="dim")
            elif ch.new_from or ch.old_from:
                line.append(f"   [{ch.new_from or ch.old_from}]", style="dim")
            c.print(line)
    if d.results:
        c.print(Text("\nresults", style="bold underline"))
        for r in d.results:
            line = Text(f"  {r.stage}/{r.check}: ")
            line.append(f"{r.old_status or '(absent)'} {_margin(r.old_margin)}")
            line.append(" → ")
            style = {"fail": "bold red", "blocked": "bold yellow", "incomplete": "bold yellow",
                     "marginal": "yellow", "pass": "green"}.get(
                r.new_status or "", "")
            line.append(f"{r.new_status or '(absent)'} {_margin(r.new_margin)}", style=style)
            if r.inputs_changed:
                line.append("  (inputs changed)", style="dim")
            c.print(line)
            for v in r.values:
                c.print(Text(f"      {v}", style="dim"))
    if d.entries:
        c.print(Text("\nsign-offs and history", style="bold underline"))
        for e in d.entries:
            style = {"gone stale": "bold magenta", "removed or altered": "bold red",
                     "revoked": "yellow", "added": "green"}.get(e.change, "")
            line = Text("  ")
            line.append(e.change, style=style)
            line.append(f": {e.title}" + (f" at {e.at}" if e.at else ""))
            c.print(line)
            if e.detail:
                c.print(Text(f"      {e.detail}", style="dim"))
            if e.note:
                c.print(Text(f"      note: {e.note}", style="dim"))
    if d.info:
        c.print(Text("\nalso", style="bold underline"))
        for f, a, b in d.info:
            c.print(Text(f"  {f}: {a} → {b}", style="dim"))


__all__ = ["Diff", "EntryChange", "InputChange", "ResultChange", "diff_checklists",
           "diff_inputs", "diff_paths", "diff_projects", "diff_records", "flatten",
           "input_rows", "origin_of", "render_diff", "value_text"]
