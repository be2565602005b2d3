"""Pilot tests of the workbook at 80×24: one behaviour per test, its rule in the docstring."""

from __future__ import annotations

import asyncio
import json
import os
import socket
import subprocess
import sys
from pathlib import Path

import pytest

from reviewer import store
from reviewer.tui.app import Workbook
from reviewer.tui.dialogs.choice import ChoiceDialog
from reviewer.tui.dialogs.edit_value import EditValueDialog
from reviewer.tui.dialogs.pick_value import PickValueDialog
from reviewer.tui.dialogs.sign import SignDialog
from reviewer.tui.screens.check import CheckScreen
from reviewer.tui.screens.help import HelpScreen
from reviewer.tui.screens.overview import OverviewScreen
from reviewer.tui.screens.stage import StageScreen
from reviewer.tui.screens.too_small import TooSmallScreen
from reviewer.tui.session import Session
from reviewer.tui.widgets.canvas import BrailleChart
from reviewer.tui.widgets.tables import ChecklistTable, StageTable
from tests.tui.conftest import comment_of, screen_text, settle

SIZE = (80, 24)


def run(coro):
    return asyncio.run(coro)


def make_app(path: Path, **kw) -> Workbook:
    return Workbook(Session(path, **kw))


async def open_stage(pilot, app, stage: str) -> StageScreen:
    table = app.screen.query_one(StageTable)
    table.select_key(stage)
    await pilot.press("enter")
    await pilot.pause()
    assert isinstance(app.screen, StageScreen)
    return app.screen


async def type_into_edit(pilot, app, path: str, text: str) -> EditValueDialog:
    app.screen.edit_path(path)
    await pilot.pause()
    dialog = app.screen
    assert isinstance(dialog, EditValueDialog)
    dialog.query_one("#edit-input").value = text
    await pilot.press("enter")
    await pilot.pause()
    return dialog


def test_overview_lists_every_stage_with_counts(kiln):
    """The first screen names the project, its revision and every stage with its counts."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            assert isinstance(app.screen, OverviewScreen)
            text = screen_text(app)
            assert "Bench kiln element controller" in text and "rev C" in text
            for stage in ("trigger", "gate", "power", "snubber", "commutation"):
                assert stage in text
            assert "pass" in text and "fail" in text
            app.session.close()
    run(go())


def test_navigation_stage_then_check_then_back(kiln):
    """Enter opens a stage's checklist, Enter again a check's detail; Escape goes back."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            stage = await open_stage(pilot, app, "trigger")
            assert "osc.window" in screen_text(app)
            stage.query_one(ChecklistTable).select_key("osc.timing")
            await pilot.press("enter")
            await pilot.pause()
            assert isinstance(app.screen, CheckScreen)
            assert app.screen.check == "osc.timing"
            await pilot.press("escape")
            await pilot.pause()
            assert isinstance(app.screen, StageScreen)
            await pilot.press("escape")
            await pilot.pause()
            assert isinstance(app.screen, OverviewScreen)
            app.session.close()
    run(go())


def test_detail_shows_question_method_inputs_source_and_cautions(kiln):
    """The detail says what the check asks, how, from which inputs, where from, and warns."""
    from reviewer.registry import CHECKS

    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("trigger", "osc.window")
            await pilot.pause()
            body = str(app.screen.query_one("#detail").render())
            defn = CHECKS["osc.window"]
            assert defn.question.split()[0] in body and "Question" in body
            assert "Method" in body and "Published source" in body
            assert "Inputs read" in body and "stages.trigger.timing_r" in body
            assert "Cautions" in body and "compliance" in body
            app.session.close()
    run(go())


def test_waveform_view_draws_braille_for_an_oscillator(kiln):
    """v shows the timing capacitor's waveform in braille; n switches to the nominal."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("trigger", "osc.timing")
            await pilot.pause()
            await pilot.press("v")
            await pilot.pause()
            text = screen_text(app)
            assert any(0x2801 <= ord(ch) <= 0x28FF for ch in text)
            assert "timing capacitor voltage" in text and "worst corner" in text
            await pilot.press("o")
            await pilot.pause()
            assert "at the nominal" in screen_text(app)
            assert app.screen.query(BrailleChart)
            app.session.close()
    run(go())


def test_no_waveform_where_there_is_nothing_to_draw(kiln):
    """A check without a waveform says so instead of drawing something."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("gate", "gate.noise")
            await pilot.pause()
            await pilot.press("v")
            await pilot.pause()
            assert "no waveform for this check" in screen_text(app)
            app.session.close()
    run(go())


def test_invalid_edit_shows_the_message_and_changes_nothing(kiln):
    """A value of the wrong dimension is refused inline; the project and file stay as they were."""
    before = kiln.read_text()

    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await open_stage(pilot, app, "trigger")
            dialog = await type_into_edit(pilot, app, "stages.trigger.timing_c", "10 V")
            assert app.screen is dialog
            err = str(dialog.query_one("#edit-error").render())
            assert "needs a capacitance" in err
            await pilot.press("escape")
            await pilot.pause()
            assert not app.session.dirty and app.session.index == 0
            app.session.close()
    run(go())
    assert kiln.read_text() == before


def test_valid_edit_recomputes_the_dependent_checks_only(kiln):
    """Accepting timing_c recomputes the checks that read it, marks them, and leaves others."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            s = app.session
            before = dict(s.results)
            await open_stage(pilot, app, "trigger")
            await type_into_edit(pilot, app, "stages.trigger.timing_c", "47 nF ±10%")
            await settle(pilot, app)
            assert s.dirty and s.project.stages["trigger"].params["timing_c"].nom == \
                pytest.approx(47e-9)
            timing = s.results[("trigger", "osc.timing")]
            assert timing.summary != before[("trigger", "osc.timing")].summary
            assert ("trigger", "osc.timing") in s.changed
            assert s.results[("snubber", "snubber.dvdt")] is before[("snubber", "snubber.dvdt")]
            assert "Δ" in screen_text(app)
            app.session.close()
    run(go())


def test_undo_and_redo_step_through_edits(kiln):
    """ctrl+z puts the old value and its results back; ctrl+y applies the edit again."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            s = app.session
            original = s.results[("trigger", "osc.timing")].summary
            await open_stage(pilot, app, "trigger")
            await type_into_edit(pilot, app, "stages.trigger.timing_c", "47 nF ±10%")
            await settle(pilot, app)
            edited = s.results[("trigger", "osc.timing")].summary
            await pilot.press("ctrl+z")
            await settle(pilot, app)
            assert not s.dirty
            assert s.results[("trigger", "osc.timing")].summary == original
            await pilot.press("ctrl+y")
            await settle(pilot, app)
            assert s.dirty and s.results[("trigger", "osc.timing")].summary == edited
            app.session.close()
    run(go())


def test_save_keeps_the_comment_and_clears_the_journal(kiln):
    """ctrl+s writes the edited value with the file's comment kept, and drops the journal."""
    comment = comment_of(kiln, "timing_r")

    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await open_stage(pilot, app, "trigger")
            await type_into_edit(pilot, app, "stages.trigger.timing_r",
                                 '{ min = "4.7 kohm", max = "104.7 kohm" }')
            assert store.journal_path(kiln).exists()
            await pilot.press("ctrl+s")
            await pilot.pause()
            assert not app.session.dirty
            app.session.close()
    run(go())
    text = kiln.read_text()
    assert f'{{ min = "4.7 kohm", max = "104.7 kohm" }}   {comment}' in text
    assert "# All part data below are invented" in text
    assert not store.journal_path(kiln).exists()


def test_save_refuses_when_the_file_changed_on_disk(kiln):
    """Someone else's change on disk is not overwritten; the edit is kept aside and unsaved."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await type_into_edit(pilot, app, "supply.inductance", "60 uH")
            kiln.write_text(kiln.read_text() + "\n# touched by someone else\n")
            await pilot.press("ctrl+s")
            await pilot.pause()
            assert app.session.dirty
            app.session.close()
    run(go())
    assert "touched by someone else" in kiln.read_text()
    assert list(kiln.parent.glob("kiln-230.mine-*.toml"))


def test_sign_off_writes_a_history_entry(kiln):
    """Signing a stage with no failures shows what is signed, then appends an entry."""
    from reviewer.review import load_record

    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            clean = [c.stage for c in app.session.stage_counts()
                     if not c.counts.get("fail") and not c.counts.get("error")]
            assert clean, "a demo stage without failures is needed"
            await open_stage(pilot, app, clean[0])
            await pilot.press("s")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            what = screen_text(app)
            assert "inputs" in what and "reviewed" in what
            await pilot.press("enter")
            for _ in range(400):
                await pilot.pause(0.05)
                if load_record(kiln).entries:
                    break
            await settle(pilot, app)
            entries = load_record(kiln).entries
            assert len(entries) == 1 and entries[0].kind == "signoff"
            assert entries[0].stage == clean[0]
            assert app.session.review(clean[0], entries[0].checks[0]) == "signed"
            app.session.close()
    run(go())


def test_sign_off_refused_while_edits_are_unsaved(kiln):
    """The sign dialog refuses, and says why, while there are unsaved edits."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await type_into_edit(pilot, app, "supply.inductance", "60 uH")
            await settle(pilot, app)
            await open_stage(pilot, app, "commutation")
            await pilot.press("s")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            assert "unsaved edits" in screen_text(app)
            assert not app.screen.query("#sign-note")
            app.session.close()
    run(go())


def test_waiver_refuses_an_empty_justification(kiln):
    """A waiver with no reason is refused inline and writes nothing."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            failing = [r for r in app.session.run.results if r.status in ("fail", "marginal")]
            assert failing, "a failing or marginal demo check is needed"
            r = failing[0]
            stage = await open_stage(pilot, app, r.stage)
            stage.query_one(ChecklistTable).select_key(r.check)
            await pilot.pause()
            await pilot.press("w")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            await pilot.press("enter")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            assert "reason is required" in str(app.screen.query_one("#sign-error").render())
            app.session.close()
    run(go())
    assert not (kiln.parent / "kiln-230.review.toml").exists()


def test_read_only_refuses_edits(kiln):
    """With --read-only everything can be looked at and the edit key changes nothing."""
    async def go():
        app = make_app(kiln, read_only=True)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            assert "READ-ONLY" in screen_text(app)
            await open_stage(pilot, app, "trigger")
            await pilot.press("e")
            await pilot.pause()
            assert isinstance(app.screen, StageScreen)
            assert not app.session.dirty
    run(go())
    assert not store.journal_path(kiln).exists()


def test_lock_held_by_someone_else_opens_read_only(kiln):
    """Another live session's lock makes the workbook read-only, naming who and since when."""
    lock = store.lock_path(kiln)
    lock.write_text(json.dumps({"format": store.LOCK_FORMAT, "login": "someone",
                                "host": socket.gethostname(), "pid": os.getppid(),
                                "started": "2026-01-02 03:04:05 UTC", "token": "x"}))
    s = Session(kiln)
    assert s.read_only and "someone" in s.read_only_reason
    assert "2026-01-02 03:04:05" in s.read_only_reason
    lock.unlink()


def test_too_small_terminal_shows_the_size_needed(kiln):
    """Below 80×24 a clear panel says what size is needed."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=(60, 20)) as pilot:
            await pilot.pause()
            assert isinstance(app.screen, TooSmallScreen)
            text = screen_text(app)
            assert "80×24" in text and "60×20" in text
            app.session.close()
    run(go())


def test_help_lists_every_key_and_the_cautions(kiln):
    """? opens the key list (every screen's bindings) with the safety line."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await pilot.press("question_mark")
            await pilot.pause()
            assert isinstance(app.screen, HelpScreen)
            body = str(app.screen.query_one("Static").render())
            for key in ("^z", "^y", "^s", "^q", "Esc", "Enter", "? / f1"):
                assert key in body
            for screen in (OverviewScreen, StageScreen, CheckScreen):
                for b in screen.BINDINGS:
                    assert b.description in body
            assert "compliance" in body
            app.session.close()
    run(go())


def test_edit_picker_offers_the_inputs_the_check_read_first(kiln):
    """e on a check lists the values it read (marked) before the rest of the stage."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            stage = await open_stage(pilot, app, "trigger")
            stage.query_one(ChecklistTable).select_key("osc.window")
            await pilot.pause()
            await pilot.press("e")
            await pilot.pause()
            assert isinstance(app.screen, PickValueDialog)
            first = app.screen.candidates[0]
            assert first[2] is True
            assert any(p == "stages.trigger.timing_r" and read
                       for p, _, read in app.screen.candidates)
            app.session.close()
    run(go())


HANGUP = """
import os, signal, sys
from reviewer import store
from reviewer.tui.session import Session
s = Session(sys.argv[1])
s.push(s.propose("supply.inductance", "75 uH"))
store.journal_path(sys.argv[1]).unlink()   # only the hang-up handler may write it now
store.install_hangup_handler(s.write_journal)
os.kill(os.getpid(), signal.SIGHUP)
"""


def test_hangup_leaves_the_edits_in_the_journal_and_the_next_open_offers_them(kiln):
    """SIGHUP writes the unsaved edits; the next open asks, and r recovers them."""
    proc = subprocess.run([sys.executable, "-c", HANGUP, str(kiln)], capture_output=True,
                          cwd=Path(__file__).resolve().parents[2], timeout=120)
    assert proc.returncode == -1  # killed by SIGHUP, after the handler ran
    journal = store.pending_journal(kiln)
    assert journal is not None and journal.edits[0].text == "75 uH"
    store.lock_path(kiln).unlink(missing_ok=True)  # its process is gone

    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await pilot.pause()
            assert isinstance(app.screen, ChoiceDialog)
            await pilot.press("r")
            await settle(pilot, app)
            assert app.session.dirty
            assert app.session.project.supply["inductance"].nom == pytest.approx(75e-6)
            app.session.close()
    run(go())


def test_a_triac_project_opens_and_shows_its_checks(tmp_path):
    """A project with triac stages opens at 80×24: its stages, the commutation check's detail
    and its cautions, with no error."""
    import shutil

    src = Path(__file__).resolve().parents[1] / "data" / "fan-triac-snubbed.toml"
    path = tmp_path / "fan.toml"
    shutil.copyfile(src, path)

    async def go():
        app = make_app(path)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            text = screen_text(app)
            for stage in ("gate", "power", "snubber"):
                assert stage in text
            assert "error" not in text.lower()
            await open_stage(pilot, app, "power")
            assert "triac.commutation" in screen_text(app)
            app.open_check("power", "triac.commutation")
            await pilot.pause()
            body = str(app.screen.query_one("#detail").render())
            assert "Question" in body and "stages.power.load.l" in body
            assert "MT2" in body  # the triac's own caution: the tab is live
            await pilot.press("v")
            await pilot.pause()
            assert "Traceback" not in screen_text(app)
            app.session.close()
    run(go())
