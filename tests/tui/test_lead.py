"""Pilot tests of the team lead's side of the workbook at 80×24, on a tmp copy of the kiln
product line: opening a review record, the attention filter, approvals, where each value comes
from in a variant, and the manual questions. One behaviour per test, its rule in the docstring.
"""

from __future__ import annotations

import asyncio
import shutil
import socket
from pathlib import Path

import pytest

from reviewer import cli, store
from reviewer.review import load_record
from reviewer.tui import attention
from reviewer.tui.app import Workbook
from reviewer.tui.dialogs.edit_value import EditValueDialog
from reviewer.tui.dialogs.sign import SignDialog
from reviewer.tui.screens.manual import ManualScreen
from reviewer.tui.screens.overview import OverviewScreen
from reviewer.tui.screens.stage import StageScreen
from reviewer.tui.session import Session, project_of_record
from reviewer.tui.widgets.tables import ChecklistTable, StageTable
from tests.tui.conftest import PROJECTS, screen_text, settle

SIZE = (80, 24)


def run(coro):
    return asyncio.run(coro)


@pytest.fixture
def line(tmp_path: Path) -> Path:
    """A tmp copy of the whole kiln-line folder (base, variants, checklist, records)."""
    dest = tmp_path / "kiln-line"
    shutil.copytree(PROJECTS / "kiln-line", dest)
    return dest


def as_login(monkeypatch: pytest.MonkeyPatch, login: str) -> None:
    """Make both the workbook and the review module see ``login`` as the user."""
    from reviewer.records import actions

    person = store.Person(login, login, socket.gethostname())
    monkeypatch.setattr(store, "current_person", lambda: person)
    monkeypatch.setattr(actions, "current_person", lambda: person)


def footer(app) -> str:
    """The key bar of the screen on top, as plain text (it wraps over lines at 80×24)."""
    from reviewer.tui.widgets.keybar import KeyBar

    return " ".join(app.screen.query_one(KeyBar).plain().split())


def footer_keys(app) -> list[tuple[str, str, bool]]:
    """The key bar's entries: (key, what it does, whether it applies now)."""
    from reviewer.tui.widgets.keybar import KeyBar

    return app.screen.query_one(KeyBar).keys


def keys_of(table) -> list[str]:
    return [str(k.value) for k in table.rows]


async def press_filter_until(pilot, app, label: str) -> None:
    """Press f until the filter called ``label`` is on; the banner names it (unless all)."""
    for _ in range(4):
        await pilot.press("f")
        await pilot.pause()
        if attention.BY_KEY[app.filter_key].label == label:
            banner = screen_text(app).splitlines()[0]
            assert ("filter:" not in banner) if app.filter_key == "all" else \
                (f"filter: {label}" in banner)
            return
    raise AssertionError(f"filter {label} never came up")


# -- 1. opening a review record -------------------------------------------------------------

def test_open_review_record_opens_its_project_read_only(line, monkeypatch):
    """`latchbook open NAME.review.toml` opens the record's project (its [review] project key,
    relative to the record) read-only, and nothing can be edited there."""
    record = line / "kiln-120-1k.review.toml"
    seen: dict[str, object] = {}

    def fake_run(self: Workbook, *, mouse: bool = True) -> int:
        async def go():
            async with self.run_test(size=SIZE) as pilot:
                await settle(pilot, self)
                seen["path"] = self.session.path
                seen["read_only"] = self.session.read_only
                seen["banner"] = screen_text(self).splitlines()[0]
                seen["note"] = str(self.screen.query_one("#overview-note").render())
                await pilot.press("e")
                await pilot.pause()
                seen["after_e"] = type(self.screen)
        run(go())
        return 0

    monkeypatch.setattr(Workbook, "run", fake_run)
    before = (line / "kiln-120-1k.toml").read_bytes()
    assert cli.main(["open", str(record)]) == 0
    assert Path(seen["path"]).resolve() == (line / "kiln-120-1k.toml").resolve()
    assert seen["read_only"] is True
    assert "Studio kiln controller, 120 V 1 kW" in seen["banner"]
    assert "READ-ONLY" in seen["banner"]
    assert "lead's view of kiln-120-1k.review.toml" in seen["note"]
    assert seen["after_e"] is OverviewScreen
    assert (line / "kiln-120-1k.toml").read_bytes() == before
    assert not store.journal_path(line / "kiln-120-1k.toml").exists()


def test_open_with_read_only_still_opens_the_project_itself(line, monkeypatch):
    """`--read-only` on a project keeps working as before: that project, read-only, and it
    is not the lead's view (no approvals from it)."""
    seen: dict[str, object] = {}

    def fake_run(self: Workbook, *, mouse: bool = True) -> int:
        seen.update(path=self.session.path, ro=self.session.read_only,
                    lead=self.session.lead_view, approve=self.session.approval_problem())
        return 0

    monkeypatch.setattr(Workbook, "run", fake_run)
    assert cli.main(["open", str(line / "kiln-base.toml"), "--read-only"]) == 0
    assert Path(seen["path"]).name == "kiln-base.toml"
    assert seen["ro"] is True and seen["lead"] is False
    assert "read-only" in str(seen["approve"])


def test_review_record_naming_a_missing_project_exits_2(line, capsys):
    """A record whose project key names no file is refused before the screen changes, with
    the file it looked for."""
    rec = line / "kiln-base.review.toml"
    rec.write_text(rec.read_text().replace('project = "kiln-base.toml"',
                                           'project = "kiln-gone.toml"', 1))
    assert cli.main(["open", str(rec)]) == 2
    err = capsys.readouterr().err
    assert "kiln-gone.toml" in err and "not there" in err


def test_project_of_record_refuses_a_record_not_kept_beside_its_project(line):
    """A record copied under another name does not hold that project's sign-offs: refused,
    naming the record that does."""
    copy = line / "copy.review.toml"
    shutil.copyfile(line / "kiln-base.review.toml", copy)
    with pytest.raises(Exception, match="kept in kiln-base.review.toml"):
        project_of_record(copy)
    assert project_of_record(line / "kiln-base.review.toml").name == "kiln-base.toml"


# -- 2. the attention filter ----------------------------------------------------------------

def test_attention_filter_shows_only_the_stale_checks_of_the_stale_variant(line):
    """In the variant whose sign-offs went stale, "attention" lists only the stages with a
    stale check and, in the power stage, the stale one and the checks its record never signed
    (power.harmonics and power.fault came after the sign-off); passing signed checks are
    hidden. "stale only" narrows it to the stale one. The banner names the filter."""
    async def go():
        app = Workbook(Session(line / "kiln-120-1k.toml", record=line / "kiln-120-1k.review.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await press_filter_until(pilot, app, "attention")
            assert keys_of(app.screen.query_one(StageTable)) == ["power", "snubber"]
            app.screen.query_one(StageTable).select_key("power")
            await pilot.press("enter")
            await pilot.pause()
            assert isinstance(app.screen, StageScreen)
            table = app.screen.query_one(ChecklistTable)
            assert keys_of(table) == ["power.blocking", "power.harmonics", "power.fault"]
            text = screen_text(app)
            assert "filter: attention" in text.splitlines()[0]
            assert "STALE" in text and "power.output" not in text
            await press_filter_until(pilot, app, "stale only")
            assert keys_of(table) == ["power.blocking"]
            await press_filter_until(pilot, app, "fails only")
            assert keys_of(table) == []
            assert "none of the 13 checks of power" in screen_text(app)
    run(go())


def test_attention_filter_shows_the_waived_check_of_the_base(line):
    """In the base, whose open points are a waived marginal check and the two checks its
    record never signed (power.harmonics and power.fault came after the sign-off),
    "attention" lists those stages and in the snubber only the waived check; "all checks"
    brings every row back."""
    async def go():
        app = Workbook(Session(line / "kiln-base.toml", record=line / "kiln-base.review.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await press_filter_until(pilot, app, "attention")
            stages = app.screen.query_one(StageTable)
            assert keys_of(stages) == ["power", "snubber"]
            stages.select_key("snubber")
            await pilot.press("enter")
            await pilot.pause()
            table = app.screen.query_one(ChecklistTable)
            assert keys_of(table) == ["snubber.leakage"]
            assert "waived" in screen_text(app)
            for _ in range(3):
                await pilot.press("f")
                await pilot.pause()
            assert app.filter_key == "all"
            assert len(keys_of(table)) == 6
    run(go())


def test_cursor_survives_the_filter_change(line):
    """A row the filter keeps keeps the cursor; a row it hides hands the cursor to the next
    row shown after it (on the overview and in a stage's checklist)."""
    async def go():
        app = Workbook(Session(line / "kiln-120-1k.toml", record=line / "kiln-120-1k.review.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            stages = app.screen.query_one(StageTable)
            stages.select_key("gate")  # passing and signed: hidden under "attention"
            await press_filter_until(pilot, app, "attention")
            assert stages.current_key == "power"
            stages.select_key("snubber")
            await press_filter_until(pilot, app, "stale only")
            assert stages.current_key == "snubber"
            await press_filter_until(pilot, app, "all checks")
            app.open_stage("snubber")
            await pilot.pause()
            table = app.screen.query_one(ChecklistTable)
            table.select_key("snubber.discharge")  # signed and current: hidden
            await pilot.pause()
            await press_filter_until(pilot, app, "attention")
            assert table.current_key == "snubber.resistor-power"
            assert app.screen.check == "snubber.resistor-power"
            table.select_key("snubber.capacitor")
            await pilot.pause()
            await press_filter_until(pilot, app, "stale only")
            assert table.current_key == "snubber.capacitor"
    run(go())


def test_filter_key_is_in_the_footer_and_the_help(line):
    """f Filter shows in the footer of the overview and of a stage, and the help states what
    each filter keeps."""
    from reviewer.tui.attention import FILTERS

    async def go():
        app = Workbook(Session(line / "kiln-base.toml", record=line / "kiln-base.review.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            assert "f Filter" in footer(app)
            app.open_stage("power")
            await pilot.pause()
            assert "f Filter" in footer(app)
            await pilot.press("question_mark")
            await pilot.pause()
            body = str(app.screen.query_one("Static").render())
            for f in FILTERS:
                assert f.label in body and f.rule in body
    run(go())


# -- 3. approvals ---------------------------------------------------------------------------

def test_non_approver_is_refused_naming_the_approvers_before_review_is_asked(line,
                                                                             monkeypatch):
    """Someone not among the checklist's approvers sees no Approve key; pressing a anyway
    shows a refusal naming the approvers, and reviewer.review.sign is never called."""
    import reviewer.review as review

    as_login(monkeypatch, "bench-engineer")
    calls: list[object] = []
    monkeypatch.setattr(review, "sign", lambda *a, **k: calls.append((a, k)))
    before = load_record(line / "kiln-base.toml").entries

    async def go():
        app = Workbook(Session(line / "kiln-base.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            assert ("a", "Approve", False) in footer_keys(app)  # shown, dimmed
            app.screen.query_one(StageTable).select_key("trigger")
            await pilot.press("a")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            err = str(app.screen.query_one("#sign-error").render())
            assert "bench-engineer is not an approver" in err and "kiln-lead" in err
            assert not app.screen.query("#sign-note")
            await pilot.press("enter")
            await pilot.press("escape")
            await pilot.pause()
            app.session.close()
    run(go())
    assert calls == []
    assert len(load_record(line / "kiln-base.toml").entries) == len(before)


def test_approver_approves_a_stage_from_the_lead_view(line, monkeypatch):
    """An approver opening the review record sees a Approve, the dialog names the approvers,
    and Enter appends an approval entry (the project file is not touched)."""
    as_login(monkeypatch, "kiln-lead")
    project = line / "kiln-base.toml"
    before = project.read_bytes()

    async def go():
        app = Workbook(Session(project, record=line / "kiln-base.review.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            assert "a Approve" in footer(app)
            app.screen.query_one(StageTable).select_key("trigger")
            await pilot.press("a")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            assert "approvers (kiln-line): kiln-lead" in screen_text(app)
            await pilot.press("enter")
            for _ in range(400):
                await pilot.pause(0.05)
                if load_record(project).entries[-1].kind == "approval":
                    break
            await settle(pilot, app)
            assert app.session.review("trigger", "osc.window") == "approved"
    run(go())
    last = load_record(project).entries[-1]
    assert last.kind == "approval" and last.stage == "trigger"
    assert last.by["login"] == "kiln-lead"
    assert project.read_bytes() == before


# -- 4. where values come from ----------------------------------------------------------------

def test_inputs_read_name_the_file_each_value_came_from(line):
    """In a variant, the check detail's inputs name their file: the base for an inherited
    value, the variant for one it overrides."""
    async def go():
        app = Workbook(Session(line / "kiln-230-2k.toml", read_only=True))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("power", "power.output")
            await pilot.pause()
            body = str(app.screen.query_one("#detail").render()).splitlines()
            voltage = next(x for x in body if x.strip().startswith("supply.voltage"))
            load = next(x for x in body if x.strip().startswith("stages.power.load.r"))
            assert voltage.rstrip().endswith("← kiln-base.toml")
            assert load.rstrip().endswith("← kiln-230-2k.toml")
    run(go())


def test_a_project_without_variants_shows_no_origins(workdir):
    """A project that is not a variant has one file: the inputs carry no ← file."""
    async def go():
        app = Workbook(Session(workdir / "kiln-230.toml", read_only=True))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("power", "power.output")
            await pilot.pause()
            body = str(app.screen.query_one("#detail").render())
            assert "Inputs read" in body and "←" not in body
    run(go())


def test_editing_a_base_value_in_a_variant_says_it_becomes_an_override(line):
    """The edit dialog of an inherited value names the base and says the edit goes into the
    variant as an override; saving writes the variant only, the base keeps its bytes."""
    base, variant = line / "kiln-base.toml", line / "kiln-230-2k.toml"
    base_before = base.read_bytes()

    async def go():
        app = Workbook(Session(variant))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.screen.edit_path("stages.power.heatsink.rth_sa")
            await pilot.pause()
            dialog = app.screen
            assert isinstance(dialog, EditValueDialog)
            said = str(dialog.query_one("#edit-origin").render())
            assert "kiln-base.toml" in said and "override" in said and "kiln-230-2k.toml" in said
            dialog.query_one("#edit-input").value = "2 K/W"
            await pilot.press("enter")
            await settle(pilot, app)
            await pilot.press("ctrl+s")
            await pilot.pause()
            assert not app.session.dirty
            assert app.session.origin_of("stages.power.heatsink.rth_sa") == "kiln-230-2k.toml"
            app.session.close()
    run(go())
    assert base.read_bytes() == base_before
    assert 'rth_sa = "2 K/W"' in variant.read_text()


def test_editing_a_value_the_variant_gives_says_so(line):
    """A value the variant itself gives is edited in place, and the dialog says so."""
    async def go():
        app = Workbook(Session(line / "kiln-230-2k.toml"), recompute=False)
        async with app.run_test(size=SIZE) as pilot:
            await pilot.pause()
            app.screen.edit_path("stages.power.load.r")
            await pilot.pause()
            said = str(app.screen.query_one("#edit-origin").render())
            assert "kiln-230-2k.toml (this file)" in said and "override" not in said
            app.session.close()
    run(go())


# -- 5. manual questions --------------------------------------------------------------------

def test_manual_answer_is_recorded_and_shows_after_reopening(line):
    """y on a manual question, with a note, appends a manual:<id> note to the history; the
    answer, its note and who gave it show when the project is opened again."""
    project = line / "kiln-base.toml"

    async def answer():
        app = Workbook(Session(project))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_stage("power")
            await pilot.pause()
            await pilot.press("m")
            await pilot.pause()
            assert isinstance(app.screen, ManualScreen)
            table = app.screen.query_one("#manual-table")
            assert keys_of(table) == ["fuse-class", "thermal-cutout", "heatsink-guard"]
            table.move_cursor(row=1, animate=False)
            await pilot.pause()
            assert "independent thermal cut-out" in str(
                app.screen.query_one("#manual-detail").render())
            await pilot.press("enter")  # the answer is asked in a dialog of its own
            await pilot.pause()
            await pilot.press("y")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            app.screen.query_one("#sign-note").value = "bimetal cut-out at 300 degC on the lid"
            await pilot.press("enter")
            for _ in range(400):
                await pilot.pause(0.05)
                if load_record(project).entries[-1].checks == ["manual:thermal-cutout"]:
                    break
            await settle(pilot, app)
            app.session.close()

    async def reopen():
        app = Workbook(Session(project))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_manual("power")
            await pilot.pause()
            table = app.screen.query_one("#manual-table")
            assert str(table.get_cell("thermal-cutout", "a")) == "yes"
            assert str(table.get_cell("heatsink-guard", "a")) == "unanswered"
            table.move_cursor(row=1, animate=False)
            await pilot.pause()
            detail = str(app.screen.query_one("#manual-detail").render())
            assert "answered yes" in detail and "bimetal cut-out" in detail
            app.session.close()

    run(answer())
    last = load_record(project).entries[-1]
    assert last.kind == "note" and last.stage == "power"
    assert last.note == "manual thermal-cutout: yes — bimetal cut-out at 300 degC on the lid"
    run(reopen())


def test_manual_answers_are_refused_in_the_lead_view(line):
    """The lead's view changes nothing but approvals: answering a question is refused."""
    async def go():
        app = Workbook(Session(line / "kiln-base.toml", record=line / "kiln-base.review.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_manual("power")
            await pilot.pause()
            await pilot.press("enter")
            await pilot.pause()
            await pilot.press("n")
            await pilot.pause()
            assert isinstance(app.screen, SignDialog)
            assert "read-only" in str(app.screen.query_one("#sign-error").render())
    run(go())


def test_ctrl_q_is_in_every_key_bar_and_quits_from_a_stage(line):
    """Every screen's key bar lists ^q (it wraps instead of leaving keys out); the key quits
    from a stage too."""
    async def go():
        app = Workbook(Session(line / "kiln-base.toml", read_only=True))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            assert "^q Quit" in footer(app)
            app.open_stage("power")
            await pilot.pause()
            assert "^q Quit" in footer(app) and "esc Back" in footer(app)
            await pilot.press("ctrl+q")
            await pilot.pause()
        return app.return_value

    assert run(go()) == 0
