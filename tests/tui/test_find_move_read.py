"""Pilot tests at 80×24 of finding, moving and reading: the palette, the key bar, one key one
meaning, the help, text that wraps instead of being cut, numbers people can read, and the
shape and cost of a refresh (the screens never import the app; one delivery per run)."""

from __future__ import annotations

import ast
import asyncio
import math
from pathlib import Path

from textual.binding import Binding

from reviewer.tolerance import Yield
from reviewer.tui import present
from reviewer.tui.app import Workbook
from reviewer.tui.palette import commands
from reviewer.tui.screens.base import WorkbookScreen
from reviewer.tui.screens.check import CheckScreen
from reviewer.tui.screens.help import HelpScreen
from reviewer.tui.screens.history import HistoryScreen
from reviewer.tui.screens.manual import ManualScreen
from reviewer.tui.screens.overview import OverviewScreen
from reviewer.tui.screens.stage import StageScreen
from reviewer.tui.session import Session
from reviewer.tui.widgets.keybar import KeyBar
from tests.tui.conftest import screen_text, settle

SIZE = (80, 24)
TUI = Path(__file__).resolve().parents[2] / "reviewer" / "tui"
SCREENS = (OverviewScreen, StageScreen, CheckScreen, ManualScreen, HistoryScreen)


def run(coro):
    return asyncio.run(coro)


def test_palette_finds_checks_values_stages_and_commands(kiln):
    """ctrl+p, "junction": the power stage's junction check is offered and Enter opens it;
    "report" offers the export; every check, stage and value of the project is listed, with
    waive, manual and waveform commands."""
    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            texts = [c.text for c in commands(app.screen, app)]
            for r in app.session.run.results:
                assert any(t.startswith(f"Check {r.check} · {r.stage}") for t in texts)
            for sid in app.session.project.stages:
                assert any(t.startswith(f"Stage {sid} ") for t in texts)
            assert any(t.startswith("Value stages.snubber.r = ") for t in texts)
            assert any(t.startswith("Waive ") for t in texts)
            assert any(t.startswith("Waveform of ") for t in texts)
            assert any(t.startswith("Export a report") for t in texts)
            await pilot.press("ctrl+p")
            await pilot.pause()
            await pilot.press(*"junction")
            await pilot.pause(0.5)
            await pilot.press("enter")
            await settle(pilot, app)
            assert isinstance(app.screen, CheckScreen) and app.screen.check == "power.junction"
            app.session.close()
    run(go())


def test_palette_export_writes_the_report_beside_the_project(kiln):
    """"report" → Export a report (HTML): the existing report writer writes NAME.report.html."""
    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await pilot.press("ctrl+p")
            await pilot.pause()
            await pilot.press(*"report html")
            await pilot.pause(0.5)
            await pilot.press("enter")
            for _ in range(200):
                await pilot.pause(0.05)
                if kiln.with_name("kiln-230.report.html").exists():
                    break
            await settle(pilot, app)
            app.session.close()
    run(go())
    html = kiln.with_name("kiln-230.report.html").read_text()
    assert "snubber" in html and "<html" in html.lower()


def test_palette_switches_to_another_project_of_the_folder(kiln):
    """The palette lists the folder's other projects; choosing one opens it in place."""
    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_stage("power")
            await pilot.pause()
            texts = [c.text for c in commands(app.screen, app)]
            assert "Open project kiln-120.toml" in texts and "Open project kiln-230.toml" \
                not in texts
            cmd = next(c for c in commands(app.screen, app)
                       if c.text == "Open project kiln-120.toml")
            cmd.run()
            await settle(pilot, app)
            assert app.session.path.name == "kiln-120.toml"
            assert isinstance(app.screen, OverviewScreen)
            assert "120 V" in screen_text(app)
            app.session.close()
    run(go())


def test_key_bar_lists_every_key_of_the_screen(kiln):
    """Each screen's key bar lists every key it has (its own, the editing keys, help, find,
    quit), wrapped over lines at 80 columns instead of leaving keys out."""
    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            opened = [lambda: None, lambda: app.open_stage("snubber"),
                      lambda: app.open_check("snubber", "snubber.dvdt"),
                      lambda: app.open_manual("power"), lambda: app.open_history()]
            for cls, opener in zip(SCREENS, opened, strict=True):
                opener()
                await settle(pilot, app)
                assert isinstance(app.screen, cls)
                bar = app.screen.query_one(KeyBar)
                shown = " ".join(bar.plain().split())
                for b in [*cls.BINDINGS, *WorkbookScreen.BINDINGS, *Workbook.BINDINGS]:
                    assert isinstance(b, Binding) and b.description in shown, (cls, b)
                for key in ("^s", "^z", "^p", "^q", "?"):
                    assert key in shown, (cls, key)
                assert all(len(line) <= SIZE[0] for line in bar.plain().splitlines())
            app.session.close()
    run(go())


def test_one_key_one_meaning_across_screens():
    """A key means the same on every screen (Enter and Esc, which pick and go back, apart);
    the help names keys as people write them."""
    meaning: dict[str, set[str]] = {}
    for cls in (*SCREENS, WorkbookScreen, Workbook):
        for b in Binding.make_bindings(cls.BINDINGS):
            if b.key not in ("enter", "escape"):
                meaning.setdefault(b.key, set()).add(b.action)
    clash = {k: v for k, v in meaning.items() if len(v) > 1}
    assert not clash


def test_help_reads_well(kiln):
    """The help lists each screen's keys with a space between key and meaning (no
    "question_mark / f1Help")."""
    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await pilot.press("question_mark")
            await pilot.pause()
            assert isinstance(app.screen, HelpScreen)
            body = str(app.screen.query_one("Static").render())
            assert "question_mark" not in body and "? / f1" in body
            assert "? / f1      Help" in body or "? / f1" in body.split("Help")[0]
            assert "History of the review record" in body
            app.session.close()
    run(go())


def test_stage_kinds_questions_and_summaries_wrap_at_80x24(workdir):
    """At 80×24 a long stage kind folds at its hyphen, a manual question wraps in its row and
    a summary scrolls in its box: every word is on the screen, none is cut."""
    line = workdir.parent / "line"
    import shutil

    from tests.tui.conftest import PROJECTS
    shutil.copytree(PROJECTS / "kiln-line", line)

    async def go():
        app = Workbook(Session(workdir / "kiln-230.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            text = screen_text(app)
            assert "line-" in text and "commutation" in text and "oscillator" in text
            app.open_stage("power")
            await settle(pilot, app)
            r = app.session.result("power", app.screen.check)
            summary = " ".join(str(app.screen.query_one("#stage-summary").render()).split())
            assert " ".join(r.summary.split()) in summary
            app.session.close()

    async def manual():
        app = Workbook(Session(line / "kiln-base.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_manual("power")
            await settle(pilot, app)
            text = " ".join(screen_text(app).split())
            for q in app.session.manual_questions("power"):
                for word in q["question"].split():
                    assert word in text, word
            app.session.close()
    run(go())
    run(manual())


def test_numbers_people_can_read():
    """Margins past ten times the limit are a multiple ("12×", "> 100×"), never "+902689 %";
    far below the limit they say what it would take ("needs 25×"), never "−96 %"; a Monte
    Carlo with no failing sample gives its 95 % bound; a yield where every sample is marginal
    says, in words, that the conditions are held at the worst corner."""
    assert present.margin_text(9026.89).plain == "> 100×"
    assert present.margin_text(11.128).plain == "12×"
    assert present.margin_text(0.05).plain == "+5.0 %"
    assert present.margin_text(-0.96).plain == "needs 25×"
    none = Yield(20000, 0.0, 0.0, (0.0, 1.9e-4), (0.0, 1.9e-4), [])
    assert present.yield_cell(none).plain == "< 0.02 %"
    assert "no sample failed (< 0.02 % at 95 % confidence)" in present.yield_line(none)
    allm = Yield(20000, 0.0, 1.0, (0.0, 1.9e-4), (0.9998, 1.0), [])
    assert "every sample marginal" in present.yield_line(allm)
    caveat = present.yield_caveat(allm, "marginal")
    assert "held at the worst corner" in caveat and "marginal" in caveat
    assert present.yield_caveat(Yield(100, 0.3, 0.2, (0.2, 0.4), (0.1, 0.3), []),
                                "fail") == ""
    assert not math.isnan(present.margin_text(-0.5).plain.count("−"))


def test_the_workbook_writes_numbers_as_the_command_line_does():
    """One formatting of margins and Monte Carlo shares (reviewer.fmt) in the workbook's
    cells, the command line's columns and the reports; the ratio against its limit is
    rounded toward the worse side, never shown better than it is."""
    from reviewer import fmt
    from reviewer.engine import Result

    for m in (-0.999, -0.96, -0.715, -0.5, -0.12, -0.0004, 0.0, 0.0417, 1.6, 9.4, 11.128,
              99.0, 9026.89, 2e5):
        assert present.margin_text(m).plain == fmt.margin(m), m
    for p, iv in ((0.0, (0.0, 3.84e-5)), (0.1234, (0.11, 0.13)), (1.0, (0.99996, 1.0)),
                  (0.0012, (0.001, 0.0015))):
        y = Yield(100000, p, 0.0, iv, (0.0, 1e-4), [])
        assert present.yield_cell(y).plain == fmt.share(p, iv)
    r = Result(stage="s", check="c", kind="k", status="pass", margin=1.9999 / 1.8 - 1,
               summary="")
    assert present.worst_vs_limit(r, {"fail_below": 1.8}).plain == "1.99 ≥ 1.8"


def test_every_word_of_both_vocabularies_has_a_look():
    """Each result word and each review word of reviewer.states is shown as itself, with a
    symbol for results (readable without colour); none falls back to "?"."""
    from reviewer.states import RESULTS, REVIEWS
    for word in RESULTS:
        shown = present.status_text(word).plain
        assert not shown.startswith("?") and present.STATUS[word][1].lower() in shown.lower()
    for word in REVIEWS:
        assert present.review_text(word).plain.lower() == word
    assert present.state_text("fail", "waived").plain == "✗ FAIL | waived"


def test_screens_never_import_the_app():
    """Each screen is a room of its own: no module under screens/ (nor the dialogs and
    widgets) imports reviewer.tui.app; they use reviewer.tui.host."""
    for sub in ("screens", "dialogs", "widgets"):
        for path in (TUI / sub).glob("*.py"):
            tree = ast.parse(path.read_text())
            names = [n.module for n in ast.walk(tree) if isinstance(n, ast.ImportFrom)]
            names += [a.name for n in ast.walk(tree) if isinstance(n, ast.Import)
                      for a in n.names]
            assert "reviewer.tui.app" not in names, path.name
    base = (TUI / "screens" / "base.py").read_text()
    assert "Workbook\"" not in base and "import Workbook" not in base  # no typed app either


def test_an_edit_delivers_its_results_once_and_lookups_do_not_rebuild_the_run(kiln,
                                                                              monkeypatch):
    """An edit's results reach the session in one delivery (not one per stage), and looking
    results up does not rebuild the run per lookup."""
    import reviewer.tui.session as session_mod
    from reviewer.tui.compute import Computer

    delivered: list[int] = []
    real_deliver = Computer._deliver

    def counted(self, gen, results, done, **kw):
        delivered.append(len(results))
        return real_deliver(self, gen, results, done, **kw)
    monkeypatch.setattr(Computer, "_deliver", counted)

    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            assert len(delivered) == 1 and delivered[0] == len(app.session.keys())
            app.open_stage("snubber")
            await settle(pilot, app)
            delivered.clear()
            app.screen._edited(app.session.propose("stages.snubber.r", "56 ohm ±5%"))
            await settle(pilot, app)
            assert delivered == [len(app.session.dependents(["stages.snubber.r"]))]
            built: list[int] = []
            real = session_mod.Run

            def counting(*a, **k):
                built.append(1)
                return real(*a, **k)
            monkeypatch.setattr(session_mod, "Run", counting)
            for _ in range(500):
                for r in list(app.session.results):
                    app.session.result(*r)
            assert len(built) <= 1
            app.session.close()
    run(go())


def test_key_bar_is_not_redrawn_when_nothing_it_shows_changed(kiln):
    """refresh_bindings with the same keys leaves the bar's content as it was (the stock
    footer recomposed itself on every call)."""
    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            bar = app.screen.query_one(KeyBar)
            before = bar._text
            for _ in range(5):
                app.screen.refresh_bindings()
                await pilot.pause()
            assert bar._text is before
            app.session.close()
    run(go())
