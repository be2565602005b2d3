"""Pilot tests at 80×24 of what the lead and the reviewer need from the workbook: no crash in
the value picker, an internal error that keeps the journal and exits non-zero, focus that
stays, the history screen, who signed what in a check's review section, and the result and
the review state shown as two things."""

from __future__ import annotations

import asyncio
import shutil
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

import reviewer.review as review
from reviewer import store
from reviewer.review import load_record
from reviewer.tui.app import Workbook
from reviewer.tui.dialogs.pick_value import PickValueDialog
from reviewer.tui.dialogs.revoke import RevokeDialog
from reviewer.tui.dialogs.sign import SignDialog
from reviewer.tui.screens.check import CheckScreen
from reviewer.tui.screens.history import HistoryScreen
from reviewer.tui.session import Session
from reviewer.tui.widgets.banner import Banner
from reviewer.tui.widgets.tables import ChecklistTable
from tests.tui.conftest import PROJECTS, screen_text, settle

SIZE = (80, 24)
ROOT = Path(__file__).resolve().parents[2]


def run(coro):
    return asyncio.run(coro)


@pytest.fixture
def line(tmp_path: Path) -> Path:
    dest = tmp_path / "kiln-line"
    shutil.copytree(PROJECTS / "kiln-line", dest)
    return dest


def test_aid_input_of_latch_time_opens_with_each_value_once(workdir):
    """kiln-120 → gate → gate.latch-time → i: the list opens (a value read twice, as both
    cold-limit temperatures are, is listed once) and offers only values a designer chooses."""
    async def go():
        app = Workbook(Session(workdir / "kiln-120.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_stage("gate")
            await pilot.pause()
            app.open_check("gate", "gate.latch-time")
            await settle(pilot, app)
            await pilot.press("i")
            await pilot.pause()
            dialog = app.screen
            assert isinstance(dialog, PickValueDialog)
            paths = dialog.paths
            assert len(paths) == len(set(paths)) and "stages.trigger.timing_c" in paths
            assert not [p for p in paths if p.startswith(("parts.", "supply.", "conditions."))]
            assert "stages.power.load.r" not in paths
            app.session.close()
    run(go())


def test_value_picker_takes_a_path_listed_twice_and_narrows_as_you_type(kiln):
    """The picker never fails on a repeated path; typing narrows the list; Enter takes the
    first left."""
    got: list[str | None] = []

    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            cands = [("stages.snubber.r", "33 ohm", False), ("stages.snubber.r", "33 ohm", True),
                     ("stages.snubber.c", "100 nF", False), ("supply.voltage", "230 V", False)]
            app.push_screen(PickValueDialog("pick", cands), got.append)
            await pilot.pause()
            dialog = app.screen
            assert dialog.paths == ["stages.snubber.r", "stages.snubber.c", "supply.voltage"]
            await pilot.press(*"snub c")
            await pilot.pause()
            assert dialog.paths == ["stages.snubber.c"]
            await pilot.press("enter")
            await pilot.pause()
            app.session.close()
    run(go())
    assert got == ["stages.snubber.c"]


def test_internal_error_keeps_the_journal_says_where_to_report_and_exits_3(kiln):
    """A defect raised inside the running workbook: the unsaved edit is journalled, stderr
    says it is a defect and where to report it, the exit code is 3 (not 0)."""
    script = textwrap.dedent(f"""
        from reviewer.tui import app as appmod
        from reviewer.tui.screens.overview import OverviewScreen

        def boom(self):
            s = self.session
            s.push(s.propose("stages.snubber.r", "47 ohm ±5%"))
            raise RuntimeError("a defect for the test")

        OverviewScreen.on_mount = lambda self: self.set_timer(0.3, lambda: boom(self))
        raise SystemExit(appmod.run_app({str(kiln)!r}, headless=True))
    """)
    proc = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                          cwd=ROOT, timeout=120)
    assert proc.returncode == 4, proc.stderr[-2000:]
    assert "internal error" in proc.stderr and "please report it" in proc.stderr
    assert "unsaved edits are kept" in proc.stderr
    journal = store.pending_journal(kiln)
    assert journal is not None and journal.edits[-1].path == "stages.snubber.r"


def test_focus_stays_on_the_pane_after_y_and_after_v(kiln):
    """After y (Monte Carlo) and after v (waveform ↔ detail) the pane on show has the focus,
    so the arrows and page keys keep scrolling it."""
    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("trigger", "osc.timing")
            await settle(pilot, app)
            await pilot.press("y")
            await settle(pilot, app)
            assert app.focused is app.screen.query_one("#detail-scroll")
            await pilot.press("v")
            await settle(pilot, app)
            assert app.focused is app.screen.query_one("#wave")
            await pilot.press("y")
            await settle(pilot, app)
            assert app.focused is app.screen.query_one("#wave")
            app.session.close()
    run(go())


def test_history_lists_every_entry_with_who_when_what_why_and_state(line):
    """h opens the history: one row per entry with its number, date, login, what and state;
    the highlighted entry in full below; the filter narrows it to a stage or a check."""
    project = line / "kiln-120-1k.toml"
    entries = load_record(project).entries
    assert entries

    async def go():
        app = Workbook(Session(project))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await pilot.press("h")
            await settle(pilot, app)
            screen = app.screen
            assert isinstance(screen, HistoryScreen)
            assert [r.seq for r in screen.rows] == [e.seq for e in entries]
            first = screen.rows[0]
            assert first.login == entries[0].by["login"] and first.note == entries[0].note
            assert first.verification == "verified"
            text = screen_text(app)
            assert f"entry #{entries[0].seq}" in text and first.when in text
            assert "stale" in text  # this variant's sign-off went stale
            screen.query_one("#history-filter").value = "no-such-stage"
            await pilot.pause()
            assert screen.rows == [] and "no entry names" in screen_text(app)
            screen.query_one("#history-filter").value = "osc.window"
            await pilot.pause()
            assert screen.rows and all("osc.window" in r.checks for r in screen.rows)
            app.session.close()
    run(go())


def test_history_from_a_check_is_filtered_to_it_and_revokes_the_highlighted_entry(line):
    """h on a check's detail opens the history filtered to that check; r revokes the
    highlighted entry (chosen already: only the reason is asked) and the record says so."""
    project = line / "kiln-120-1k.toml"
    seq = load_record(project).entries[0].seq

    async def go():
        app = Workbook(Session(project))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("trigger", "osc.window")
            await settle(pilot, app)
            await pilot.press("h")
            await settle(pilot, app)
            assert app.screen.query_one("#history-filter").value == "osc.window"
            await pilot.press("r")
            await pilot.pause()
            dialog = app.screen
            assert isinstance(dialog, RevokeDialog) and dialog.seq == seq
            dialog.query_one("#revoke-note").value = "timing capacitor changed, review again"
            await pilot.press("enter")
            for _ in range(200):
                await pilot.pause(0.05)
                if load_record(project).entries[-1].kind == "revoke":
                    break
            await settle(pilot, app)
            history = app.screen
            assert isinstance(history, HistoryScreen)
            assert history.rows[0].standing == f"revoked by #{seq + 1}" or any(
                r.standing.startswith("revoked") for r in history.rows)
            app.session.close()
    run(go())
    last = load_record(project).entries[-1]
    assert last.kind == "revoke" and last.revokes == seq


def test_history_approves_what_the_highlighted_sign_off_signed(line):
    """a on a reviewed sign-off of one stage asks to approve that stage's checks."""
    project = line / "kiln-base.toml"
    review.sign(project, stage="trigger", meaning="reviewed", note="window and timing checked")

    async def go():
        app = Workbook(Session(project))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_history()
            await settle(pilot, app)
            screen = app.screen
            row = next(i for i, r in enumerate(screen.rows)
                       if r.kind == "signoff" and r.stage != "*")
            screen.query_one("#history-table").move_cursor(row=row, animate=False)
            await pilot.pause()
            await pilot.press("a")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            assert app.screen.meaning == "approved"
            assert app.screen.title_text.startswith("Approve")
            app.session.close()
    run(go())


def test_review_section_names_signer_date_meaning_note_and_entry(line):
    """A check's review section names who signed, when, with what meaning and note, and the
    entry number, not only an inputs hash."""
    project = line / "kiln-120-1k.toml"
    e = load_record(project).entries[0]

    async def go():
        app = Workbook(Session(project))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("trigger", "osc.window")
            await settle(pilot, app)
            body = str(app.screen.query_one("#detail").render())
            assert f"entry #{e.seq}" in body and e.by["login"] in body
            assert e.at.strftime("%Y-%m-%d") in body and "(reviewed)" in body
            assert e.note[:30] in body
            app.session.close()
    run(go())


def _waive_marginals(project: Path) -> list[tuple[str, str]]:
    s = Session(project, lock=False)
    s.compute_all()
    marginal = [(r.stage, r.check) for r in s.run.results if r.status == "marginal"]
    s.close()
    for stage, check in marginal:
        review.waive(project, stage=stage, check=check,
                     note="accepted for the bench build: the lid interlock covers it")
    return marginal


def test_header_says_marginal_and_waived_as_two_things(kiln):
    """With every marginal check waived the header reads "~ marginal | waived" (never a bare
    "marginal", never pass); the checklist shows the result and the review in two columns."""
    waived = _waive_marginals(kiln)
    assert waived

    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            banner = app.screen.query_one(Banner).render().plain
            assert "~ marginal | waived" in banner
            stage, check = waived[0]
            app.open_stage(stage)
            await pilot.pause()
            table = app.screen.query_one(ChecklistTable)
            assert str(table.get_cell(check, "result")) == "~ marginal"
            assert str(table.get_cell(check, "sign")) == "waived"
            app.session.close()
    run(go())


def test_waive_dialog_of_a_marginal_check_does_not_speak_of_a_failure(kiln):
    """The waiver's declaration follows the result: a marginal check is accepted as marginal,
    not as "this failure"."""
    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            r = next(r for r in app.session.run.results if r.status == "marginal")
            app.open_check(r.stage, r.check)
            await settle(pilot, app)
            await pilot.press("w")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            what = app.screen.what.plain
            assert "failure" not in what and "I accept this marginal result" in what
            app.session.close()
    run(go())


def test_detail_shows_no_internal_names(workdir):
    """The engine's markers (``#none``, ``#assumed``) never reach the screen: not in the
    sensitivity ranking, the inputs or the worst corner."""
    async def go():
        app = Workbook(Session(workdir / "kiln-120.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            for r in app.session.run.results:
                app.open_check(r.stage, r.check)
                await settle(pilot, app)
                screen = app.screen
                assert isinstance(screen, CheckScreen)
                body = "".join(str(w.render()) for w in screen.query("Static"))
                assert "#none" not in body and "#assumed" not in body, r.check
                screen.dismiss()
                await pilot.pause()
            app.session.close()
    run(go())
