"""The workbook's command palette (ctrl+p): one keystroke to any check, value, stage, command,
or another project in the folder. Typing narrows the list (fuzzy: "junction" finds
power.junction, "report" the export).

:func:`commands` builds the list for the screen on top; :class:`WorkbookCommands` hands it to
Textual's palette. Commands act through the screen (so the same refusals apply as on its keys)
or through the host (reviewer.tui.host).
"""

from __future__ import annotations

import os
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any, cast

from textual.command import DiscoveryHit, Hit, Hits, Provider

from reviewer import states
from reviewer.project import is_project_file


@dataclass(frozen=True)
class Command:
    """One line of the palette: what it says, a line of help, and what it does."""

    text: str
    help: str
    run: Callable[[], Any]


def _call(screen: Any, name: str, *args: Any) -> Callable[[], Any]:
    def go() -> Any:
        fn = getattr(screen, name, None)
        if fn is None:
            screen.app.notify(f"not here: open a screen where it applies ({name})",
                              markup=False)
            return None
        return fn(*args)
    return go


def projects_beside(path: Path) -> list[Path]:
    """The other project files in the folder of ``path`` (the review records left out)."""
    try:
        files = sorted(path.parent.glob("*.toml"))
    except OSError:
        return []
    here = os.path.realpath(path)  # realpath: a link that loops in the folder never raises
    return [p for p in files if os.path.realpath(p) != here and is_project_file(p)]


def commands(screen: Any, host: Any) -> list[Command]:
    """Every command the palette offers on ``screen``."""
    from reviewer.waveforms import has_waveform

    s = host.session
    out = [
        Command("Help: every key", "the keys of each screen and the cautions", host.show_help),
        Command("Edit a value", "choose a value; dependent checks recompute",
                _call(screen, "action_edit")),
        Command("Undo the last edit", "ctrl+z", _call(screen, "action_undo")),
        Command("Redo an undone edit", "ctrl+y", _call(screen, "action_redo")),
        Command("Save the project file", "ctrl+s; comments are kept", _call(screen, "action_save")),
        Command("Recompute every check", "run the engine on the whole project",
                lambda: host.recompute(None)),
        Command("Monte Carlo yield of the whole project", "production spreads drawn",
                lambda: host.start_yield(None)),
        Command("Cycle the attention filter", "all → attention → fails → stale (f)",
                _call(screen, "action_cycle_filter")),
        Command("History of the review record", "who signed what, when and why (h)",
                lambda: host.open_history(None, None)),
        Command("Revoke a sign-off, approval or waiver", "with a reason (r)",
                _call(screen, "revoke_entry")),
        Command("Export a report (HTML)", f"writes {s.path.stem}.report.html beside the project",
                lambda: host.export_report("html")),
        Command("Export a report (Markdown)", f"writes {s.path.stem}.report.md",
                lambda: host.export_report("md")),
        Command("Quit the workbook", "asks about unsaved edits", host.leave),
    ]
    for sid, st in s.project.stages.items():
        out.append(Command(f"Stage {sid} ({st.kind})", "open its checklist",
                           lambda sid=sid: host.open_stage(sid)))
        out.append(Command(f"Sign stage {sid} as reviewed", "shows what is signed first",
                           _call(screen, "sign_stage", sid, None, "reviewed")))
        out.append(Command(f"Approve stage {sid}", "approvers only; the record decides",
                           _call(screen, "sign_stage", sid, None, "approved")))
        if s.manual_questions(sid):
            out.append(Command(f"Manual questions of {sid}", "answer yes, no or n/a",
                               lambda sid=sid: host.open_manual(sid)))
    for r in s.run.results:
        word = states.result_word(r.status)
        review = s.review(r.stage, r.check)
        shown = word + (f" | {review}" if review else "")
        out.append(Command(f"Check {r.check} · {r.stage}  {shown}", r.summary[:70],
                           lambda r=r: host.open_check(r.stage, r.check)))
        if has_waveform(r.check):
            out.append(Command(f"Waveform of {r.check} · {r.stage}", "the picture at the worst "
                               "corner", lambda r=r: host.open_check(r.stage, r.check,
                                                                     waveform=True)))
        if r.status in states.ATTENTION - {"error"}:
            out.append(Command(f"Waive {r.check} · {r.stage} ({word})", "needs a written reason",
                               _call(screen, "waive_check", r.stage, r.check)))
    values = getattr(screen, "_values_of", None)
    if values is not None:
        for path, current, _ in values(None, []):
            out.append(Command(f"Value {path} = {current}", "change it",
                               _call(screen, "edit_path", path)))
    for p in projects_beside(s.path):
        out.append(Command(f"Open project {p.name}", f"switch to it (in {p.parent.name}/)",
                           lambda p=p: host.switch_project(p)))
    return out


class WorkbookCommands(Provider):
    """The palette's source: :func:`commands` of the screen under it."""

    def _commands(self) -> list[Command]:
        return commands(self.screen, cast(Any, self.app))

    async def search(self, query: str) -> Hits:
        matcher = self.matcher(query)
        for c in self._commands():
            score = matcher.match(c.text)
            if score > 0:
                yield Hit(score, matcher.highlight(c.text), c.run, text=c.text, help=c.help)

    async def discover(self) -> Hits:
        for c in self._commands():
            yield DiscoveryHit(c.text, c.run, text=c.text, help=c.help)
