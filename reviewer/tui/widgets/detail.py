"""The detail of one check: the question, the method, the inputs at the worst corner, the
values, the source, what would fix it, the notes and the cautions.

The inputs are the check's own corner table (``Result.evaluation``): row 0 is the nominal, the
worst row is the one that set the margin. Which project value each input came from is what
the check's ``bind`` gathered, asked again here (binding reads the project; it computes
nothing). In a variant each input also names the file its value came from.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
from rich.text import Text
from textual.widgets import Static

from reviewer.engine import Result
from reviewer.errors import LatchbookError
from reviewer.fmt import eng, show
from reviewer.model import Project
from reviewer.registry import CHECKS, Context
from reviewer.states import ATTENTION
from reviewer.textsafe import visible
from reviewer.tui import present
from reviewer.tui.safety import SAFETY_LINE, cautions_for


@dataclass
class InputRow:
    """One input the check read: its name, where it came from, nominal and worst-corner text,
    and (in a variant) the file that gave the value ("" when none did: a default)."""

    name: str
    path: str
    nominal: str
    worst: str
    varies: bool
    source: str = ""


def input_rows(result: Result, project: Project,
               origin: Callable[[str], str] | None = None) -> list[InputRow]:
    """The inputs of a result with their values at the nominal row and the worst row;
    ``origin`` maps an input's path to the file its value came from."""
    defn = CHECKS.get(result.check)
    stage = project.stages.get(result.stage)
    ev = result.evaluation
    if defn is None or stage is None or ev is None:
        return []
    try:
        bound = defn.bind(Context(project, stage))
    except LatchbookError:
        return []
    rows = []
    for name in ev.names:
        inp = bound.inputs.get(name)
        if inp is not None and not present.shown_path(inp.path):
            continue
        arr = np.asarray(ev.inputs[name])
        dim = inp.value.dim if inp else ""
        path = inp.path.split("#")[0] + (" (assumed)" if inp and "#assumed" in inp.path else "") \
            if inp else "?"
        if inp is not None and "#none" in inp.path:
            continue
        rows.append(InputRow(name, path, show(float(arr[0]), dim), show(float(arr[ev.worst_row]),
                             dim), bool(arr.min() != arr.max()),
                             origin(inp.path) if origin is not None and inp else ""))
    return rows


def _head(text: str) -> Text:
    return Text(f"\n{text}\n", style="bold underline")


def detail_head(result: Result, limits: dict[str, float]) -> Text:
    """The first lines of the detail: the check, its status, margin, worst vs limit, summary."""
    out = Text()
    out.append(visible(f"{result.stage} · {result.check}   "), style="bold")
    out.append_text(present.status_text(result.status))
    out.append("   margin ")
    out.append_text(present.margin_text(result.margin))
    if result.status == "marginal" and result.margin is not None and result.margin < 0:
        out.append(" (an advisory check: past its level it reads marginal, never fail)",
                   style="dim")
    out.append("   worst vs limit ")
    out.append_text(present.worst_vs_limit(result, limits))
    out.append("\n")
    out.append(visible(result.summary) + "\n")
    return out


def entry_lines(role: str, entry: Any, state: str) -> Text:
    """One entry covering a check, as the lead reads it: what, who, when, the entry number,
    whether it still holds, and the note."""
    out = Text()
    meaning = getattr(entry, "meaning", "") or role
    out.append(f"  {role} ", style="bold")
    out.append(f"({meaning}) ")
    out.append_text(present.review_text(state))
    out.append(f"  entry #{entry.seq}\n", style="bold")
    at = entry.at.strftime("%Y-%m-%d %H:%M UTC") if getattr(entry, "at", None) else "no date"
    out.append(f"    by {entry.who()} on {at}\n")
    note = getattr(entry, "note", "")
    out.append(f"    “{note}”\n" if note else "    (no note)\n", style="" if note else "dim")
    return out


def detail_text(result: Result, project: Project, *, review: str, changed: object,
                signing: bool, limits: dict[str, float], head: bool = True,
                origin: Callable[[str], str] | None = None,
                covering: list[tuple[str, Any, str]] | None = None) -> Text:
    """Everything the detail view says about one check, as one Text (no markup parsed);
    ``head=False`` leaves out :func:`detail_head` (the screen shows it above the analysis);
    ``origin`` (variants): an input's path → the file its value came from; ``covering``: the
    record's entries in force on the check (Session.covering)."""
    defn = CHECKS.get(result.check)
    stage = project.stages.get(result.stage)
    out = detail_head(result, limits) if head else Text()
    if defn is not None:
        out.append_text(_head("Question"))
        out.append(defn.question + "\n")
        out.append_text(_head("Method"))
        out.append(defn.method + "\n")
    rows = input_rows(result, project, origin)
    if rows:
        out.append_text(_head("Inputs read (nominal → worst corner" +
                              ("; ← the file each value comes from)" if origin else ")")))
        w = max(len(r.path) for r in rows)
        ww = max(len(r.worst) for r in rows)
        here = Path(project.path).name
        for r in rows:
            out.append(f"  {r.path:<{w}}  {r.nominal:>10}  → ", style="" if r.varies else "dim")
            out.append(f"{r.worst:<{ww}}" if origin else r.worst,
                       style="bold" if r.varies else "dim")
            if origin:
                src = r.source or "(not in any file)"
                out.append(f"  ← {src}", style="cyan" if r.source and r.source != here
                           else "dim")
            out.append("\n")
    if result.worst:
        out.append_text(_head("Worst corner"))
        out.append("  " + ", ".join(f"{present.path_text(k)} = {v}" for k, v in
                                    result.worst.items() if present.shown_path(k)) + "\n")
    if result.values:
        out.append_text(_head("Values (nominal, min … max)"))
        for name, st in result.values.items():
            out.append(f"  {name:<22} {eng(st.nominal, st.unit, si=False):>10}   "
                       f"{eng(st.min, st.unit, si=False)} … {eng(st.max, st.unit, si=False)}\n")
    if defn is not None:
        out.append_text(_head("Published source"))
        out.append(defn.source + "\n")
    if result.status in ATTENTION:
        out.append_text(_head("What would fix it"))
        out.append(visible(result.summary) + "\n")
        if defn is not None and defn.fix:
            out.append(defn.fix + "\n")
    if result.notes:
        out.append_text(_head("Notes"))
        for n in result.notes:
            out.append(f"  • {n}\n")
    out.append_text(_head("Review"))
    if signing:
        out.append("  ")
        out.append_text(present.state_text(result.status, review or "unsigned"))
        out.append("\n")
        if changed:
            out.append(f"  changed since signed: {changed}\n", style="bold yellow")
        for role, entry, state in covering or []:
            out.append_text(entry_lines(role, entry, state))
        if not covering:
            out.append("  no sign-off, approval or waiver covers this check (h: the history)\n",
                       style="dim")
        out.append(f"  inputs hash {present.short_hash(result.inputs_sha256)} (what a sign-off "
                   "binds to)\n", style="dim")
    else:
        out.append("  sign-off not available in this version\n", style="dim")
    out.append_text(_head("Cautions"))
    load = stage.params.get("load") if stage else None
    load_type = str(load.get("type", "")) if isinstance(load, dict) else ""
    for c in (defn.cautions if defn else ()) + cautions_for(stage.kind if stage else "",
                                                            load_type):
        out.append(f"  ⚠ {c}\n")
    out.append(f"\n{SAFETY_LINE}\n", style="italic")
    return out


class CheckDetail(Static):
    """A scrollable body for :func:`detail_text`."""

    DEFAULT_CSS = "CheckDetail { width: 100%; height: auto; }"

    def __init__(self, **kw: object) -> None:
        super().__init__("", markup=False, **kw)  # type: ignore[arg-type]

    def show(self, text: Text) -> None:
        """Replace the body."""
        self.update(text)
