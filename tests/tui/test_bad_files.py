"""Hostile files met by the workbook at 80×24: a project or review record nested thousands of
levels deep, and something other than a lock file at the lock's name. Each gives a notice or
exit 2 naming the file, never a traceback, and writes nothing."""

from __future__ import annotations

import asyncio
import hashlib
import os
import stat
from pathlib import Path

import pytest

from reviewer.cli import main
from reviewer.tui.app import Workbook, run_app
from reviewer.tui.palette import commands
from reviewer.tui.screens.overview import OverviewScreen
from reviewer.tui.session import Session
from tests.tui.conftest import screen_text, settle
from tests.tui.test_workbook import open_stage, type_into_edit

SIZE = (80, 24)
DEEP_RECORD = '[review]\nproject = "kiln-230.toml"\nx = ' + "[" * 5000 + "]" * 5000 + "\n"
DEEP_PROJECT = '[project]\nname = ' + "{a = " * 5000 + "1" + "}" * 5000 + "\n"


def run(coro):
    return asyncio.run(coro)


def folder_state(folder: Path) -> dict[str, tuple[object, ...]]:
    """Every entry of ``folder``: kind and content hash (pipes are never opened)."""
    out: dict[str, tuple[object, ...]] = {}
    for p in sorted(folder.iterdir()):
        st = os.lstat(p)
        if stat.S_ISREG(st.st_mode):
            out[p.name] = ("file", hashlib.sha256(p.read_bytes()).hexdigest(), st.st_mode)
        else:
            out[p.name] = ("other", st.st_mode)
    return out


def notices(app: Workbook) -> str:
    return "\n".join(str(n.message) for n in app._notifications)


def test_a_deeply_nested_record_is_named_on_the_overview_and_nothing_is_written(kiln):
    """The project opens and computes; the record's problem (file, line, what to do) is shown;
    signing is refused with the same words; the folder is as it was."""
    record = kiln.with_name("kiln-230.review.toml")
    record.write_text(DEEP_RECORD)
    before = folder_state(kiln.parent)

    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE, notifications=True) as pilot:
            await settle(pilot, app)
            text = "".join(screen_text(app).split())  # the path wraps at the screen's edge
            assert "kiln-230.review.toml:3" in text and "nestedtoodeep" in text, text
            app.open_stage("power")
            await pilot.pause()
            await pilot.press("s")
            await pilot.pause()
            shown = "".join((screen_text(app) + notices(app)).split()).replace("┃", "")
            assert "cannotsign" in shown and "kiln-230.review.toml:3" in shown and \
                "nestedtoodeep" in shown, shown
            await pilot.press("escape")
            assert "Traceback" not in shown
            app.session.close()
    run(go())
    assert folder_state(kiln.parent) == before


def test_a_deeply_nested_record_in_the_leads_view_is_named(kiln):
    """Opened from the record (read-only), the record's problem is shown, not hidden behind
    the read-only note."""
    record = kiln.with_name("kiln-230.review.toml")
    record.write_text('[review]\nproject = "kiln-230.toml"\n[[result]]\nx = ' + "[" * 40
                      + "]" * 40 + "\n")
    before = folder_state(kiln.parent)

    async def go():
        app = Workbook(Session(kiln, read_only=True))
        async with app.run_test(size=SIZE, notifications=True) as pilot:
            await settle(pilot, app)
            text = "".join(screen_text(app).split())
            assert "read-only" in text and "kiln-230.review.toml:4" in text and \
                "nestedmorethan32" in text, text
            app.session.close()
    run(go())
    assert folder_state(kiln.parent) == before


def test_open_on_a_deeply_nested_record_exits_2_naming_it(kiln, capsys):
    record = kiln.with_name("kiln-230.review.toml")
    record.write_text(DEEP_RECORD)
    before = folder_state(kiln.parent)
    assert main(["open", str(record)]) == 2
    err = capsys.readouterr().err
    assert "kiln-230.review.toml:3" in err and "nested too deep" in err and \
        "restore it from version control" in err and "Traceback" not in err
    assert folder_state(kiln.parent) == before


def test_open_on_a_deeply_nested_project_exits_2_naming_it(workdir, capsys):
    deep = workdir / "deep.toml"
    deep.write_text(DEEP_PROJECT)
    before = folder_state(workdir)
    assert run_app(str(deep), headless=True) == 2
    err = capsys.readouterr().err
    assert "deep.toml:2" in err and "nested too deep" in err and "Traceback" not in err
    assert folder_state(workdir) == before


def test_switching_to_a_deeply_nested_project_is_a_notice(kiln):
    """The palette's other projects include a broken one: choosing it says why, in place."""
    deep = kiln.with_name("deep.toml")
    deep.write_text(DEEP_PROJECT)
    before = folder_state(kiln.parent)

    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE, notifications=True) as pilot:
            await settle(pilot, app)
            cmd = next(c for c in commands(app.screen, app) if c.text == "Open project deep.toml")
            cmd.run()
            await pilot.pause()
            assert app.session.path == kiln and isinstance(app.screen, OverviewScreen)
            said = notices(app)
            assert "deep.toml:2" in said and "nested too deep" in said, said
            app.session.close()
    run(go())
    assert folder_state(kiln.parent) == before


@pytest.mark.parametrize("kind", ["fifo", "zero", "folder"])
def test_something_else_at_the_locks_name_opens_read_only_naming_it(kiln, kind):
    """A pipe would block the open, /dev/zero never ends: the workbook opens read-only and
    says what is at the lock's name and what to do."""
    lp = kiln.with_name("kiln-230.lock")
    {"fifo": os.mkfifo, "zero": lambda p: p.symlink_to("/dev/zero"),
     "folder": os.mkdir}[kind](lp)
    before = folder_state(kiln.parent)

    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=(100, 30), notifications=True) as pilot:
            await settle(pilot, app)
            assert app.session.read_only
            text = " ".join(screen_text(app).split())
            assert "kiln-230.lock" in text and "--break-lock" in text, text
            app.session.close()
    run(go())
    assert folder_state(kiln.parent) == before


def test_a_deeply_nested_journal_is_a_notice_and_is_kept(kiln):
    """The unsaved-edits journal is read on open: one nested too deep says so, naming it,
    and stays where it is for the user to look at (never silently dropped)."""
    journal = kiln.with_name("kiln-230.journal")
    journal.write_text('{"format": "latchbook.journal/1"}\n' + "[" * 100_000 + "\n")
    before = folder_state(kiln.parent)

    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE, notifications=True) as pilot:
            await settle(pilot, app)
            said = notices(app)
            assert "kiln-230.journal" in said and "nested too deep" in said, said
            assert isinstance(app.screen, OverviewScreen)
            app.session.close()
    run(go())
    assert folder_state(kiln.parent) == before


@pytest.mark.parametrize("typed", ["[" * 5000, "{ a = " * 3000 + "1" + "}" * 3000,
                                   "[" * 20 + "1" + "]" * 20])
def test_a_value_nested_too_deep_is_refused_in_the_edit_dialog(kiln, typed):
    """Typed into the editor, thousands of brackets are a message under the field (the same
    parser the files use), never a crash; the project and its file stay as they were."""
    before = folder_state(kiln.parent)

    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await open_stage(pilot, app, "trigger")
            dialog = await type_into_edit(pilot, app, "stages.trigger.timing_c", typed)
            assert app.screen is dialog
            err = str(dialog.query_one("#edit-error").render())
            assert "nested" in err or "cannot read" in err, err
            await pilot.press("escape")
            await pilot.pause()
            assert not app.session.dirty
            app.session.close()
    run(go())
    assert folder_state(kiln.parent) == before


def test_the_palette_lists_a_folder_holding_a_pipe_and_a_link_loop(kiln):
    """ctrl+p offers the folder's projects; a pipe and a link that loops among them are
    offered (their load names them) and never hang or crash the listing."""
    os.mkfifo(kiln.with_name("pipe.toml"))
    kiln.with_name("a.toml").symlink_to(kiln.with_name("b.toml"))
    kiln.with_name("b.toml").symlink_to(kiln.with_name("a.toml"))
    before = folder_state(kiln.parent)

    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE, notifications=True) as pilot:
            await settle(pilot, app)
            texts = [c.text for c in commands(app.screen, app)]
            assert "Open project kiln-120.toml" in texts
            for name in ("pipe.toml", "a.toml"):
                cmd = next(c for c in commands(app.screen, app)
                           if c.text == f"Open project {name}")
                cmd.run()
                await pilot.pause()
                assert app.session.path == kiln
            said = notices(app)
            assert "named pipe" in said and "loops" in said, said
            app.session.close()
    run(go())
    assert folder_state(kiln.parent) == before
