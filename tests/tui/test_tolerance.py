"""Tolerance analysis and the design aid in the workbook, driven by keys at 80×24."""

from __future__ import annotations

import asyncio
from pathlib import Path

import numpy as np
import pytest

from reviewer.tolerance import monte_carlo
from reviewer.tui.app import Workbook
from reviewer.tui.dialogs.pick_value import PickValueDialog
from reviewer.tui.screens.check import CheckScreen
from reviewer.tui.session import Session
from reviewer.tui.widgets.canvas import BrailleChart
from reviewer.tui.widgets.tables import ChecklistTable
from tests.tui.conftest import screen_text, settle

SIZE = (80, 24)
N = 2000


@pytest.fixture
def slow_flasher(workdir: Path) -> Path:
    """The flasher with a 4.7 MΩ timing resistor: too slow for its target, and at the top of
    the PUT's oscillation window (osc.timing and osc.window fail)."""
    path = workdir / "flasher-dc.toml"
    text = path.read_text()
    assert 'timing_r = "1 Mohm ±5%"' in text
    path.write_text(text.replace('timing_r = "1 Mohm ±5%"', 'timing_r = "4.7 Mohm ±5%"'))
    return path


def make_app(path: Path) -> Workbook:
    app = Workbook(Session(path))
    app.analyst.samples = N
    return app


def test_power_check_waveform_renders(kiln):
    """v on a power check draws the load voltage and current in braille, not "no waveform"."""
    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("power", "power.output")
            await pilot.pause()
            await pilot.press("v")
            await pilot.pause()
            text = screen_text(app)
            assert "no waveform" not in text
            assert "load voltage over one cycle" in text and "α_min" in text
            assert any(0x2801 <= ord(ch) <= 0x28FF for ch in text)
            app.session.close()
    asyncio.run(go())


def test_monte_carlo_key_fills_the_yield_column_and_the_histogram(slow_flasher):
    """y on a stage samples its checks in a worker; the table shows each fail fraction as the
    command line writes it, and the check's detail its 95 % bound and a bar histogram of the
    checked value with its limit.
    The fraction is the one reviewer.tolerance computes for the same seed."""
    async def go():
        app = make_app(slow_flasher)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_stage("blink")
            await pilot.pause()
            table = app.screen.query_one(ChecklistTable)
            assert str(table.get_cell("osc.window", "yield")) == "—"
            await pilot.press("y")
            await settle(pilot, app)
            assert app.session.yield_progress is None
            r = app.session.result("blink", "osc.window")
            y = monte_carlo(r, N, seed=0)
            shown = app.session.yield_of("blink", "osc.window")
            assert shown.fail_fraction == y.fail_fraction and 0 < y.fail_fraction < 1
            cell = str(table.get_cell("osc.window", "yield"))
            assert cell.endswith(" %")  # as the command line's MC fail column writes it
            assert float(cell.removesuffix(" %")) == pytest.approx(y.fail_fraction * 100,
                                                                    rel=0.05)
            # Every corner of osc.timing fails, so every sample does: the 95 % bound says so.
            assert str(table.get_cell("osc.timing", "yield")).startswith("> 99.")
            assert "MC fail" in screen_text(app)
            app.open_check("blink", "osc.timing")
            await pilot.pause()
            chart = app.screen.query_one("#histogram", BrailleChart)
            assert chart.display and chart.plot is not None and chart.plot.bars
            assert int(chart.plot.series[0].y.sum()) == N
            labels = [m for _, m in chart.plot.marks]
            assert "limit" in labels
            limit = dict((m, x) for x, m in chart.plot.marks)["limit"]
            assert limit == pytest.approx(2.0)  # the 0.5 Hz target end as a period
            said = str(app.screen.query_one("#tol-yield").render())
            assert f"{N} samples" in said and "every sample failed (> 99." in said and \
                "at 95 % confidence" in said
            app.session.close()
    asyncio.run(go())


def test_monte_carlo_in_the_workbook_is_the_shared_sampler(kiln, monkeypatch):
    """y on the whole project samples every computed check in one call of the sampler the
    command line uses (draws and firing angles shared), and each yield it shows is that
    check's own Monte Carlo result for the same seed."""
    import reviewer.tui.compute as compute
    from reviewer import tolerance

    calls: list[int] = []

    def counted(results, n, **kw):
        calls.append(len(results))
        return tolerance.monte_carlo_all(results, n, **kw)

    monkeypatch.setattr(compute, "monte_carlo_all", counted)

    async def go():
        app = make_app(kiln)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            sampled = [r for r in app.session.run.results if r.evaluation is not None]
            app.analyst.start_yield(None)
            await settle(pilot, app)
            while app.session.yield_progress is not None:
                await pilot.pause(0.05)
            assert calls == [len(sampled)]
            for r in sampled:
                if r.check not in ("power.didt", "snubber.discharge", "osc.timing"):
                    continue
                alone = monte_carlo(r, N, seed=0)
                shown = app.session.yield_of(r.stage, r.check)
                assert shown is not None and alone is not None
                assert shown.fail_fraction == alone.fail_fraction
                assert shown.marginal_fraction == alone.marginal_fraction
            app.session.close()
    asyncio.run(go())


def test_monte_carlo_failure_is_reported_and_the_workbook_stays(slow_flasher, monkeypatch):
    """An exception inside the Monte Carlo worker becomes a notification, not a crash."""
    import reviewer.tui.compute as compute

    def broken(*a, **k):
        raise RuntimeError("sampler broke")

    monkeypatch.setattr(compute, "monte_carlo_all", broken)

    async def go():
        app = make_app(slow_flasher)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_stage("blink")
            await pilot.pause()
            await pilot.press("y")
            await settle(pilot, app)
            assert app.is_running and app.session.yield_progress is None
            assert any("sampler broke" in str(n.message) for n in app._notifications)
            app.session.close()
    asyncio.run(go())


def test_sensitivity_ranks_the_timing_capacitor_first(workdir):
    """Free-running period ∝ R_T·C_T: C_T at ±10 % moves the margin about twice as much as
    R_T at ±5 %, so it is listed first with about twice the share."""
    async def go():
        app = make_app(workdir / "flasher-dc.toml")
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("blink", "osc.timing")
            await pilot.pause()
            ranking = app.screen.view.ranking
            assert ranking[0].path == "stages.blink.timing_c"
            assert ranking[1].path == "stages.blink.timing_r"
            assert ranking[0].share / ranking[1].share == pytest.approx(2.0, rel=0.05)
            text = str(app.screen.query_one("#tol-rest").render())
            assert text.index("stages.blink.timing_c") < text.index("stages.blink.timing_r")
            assert "█" in text
            app.session.close()
    asyncio.run(go())


@pytest.fixture
def fast_flasher(workdir: Path) -> Path:
    """The flasher with a 220 nF timing capacitor: inside its oscillation window, but too
    fast for its 0.5–2 Hz target (osc.timing fails on its own account)."""
    path = workdir / "flasher-dc.toml"
    text = path.read_text()
    assert 'timing_c = "1 uF ±10%"' in text
    path.write_text(text.replace('timing_c = "1 uF ±10%"', 'timing_c = "220 nF ±10%"'))
    return path


def test_try_this_value_is_an_undoable_edit_that_makes_the_check_pass(fast_flasher):
    """On the failing osc.timing the aid varies the largest-share input (timing_c); t makes
    an ordinary edit with the tolerance kept, the check recomputes and passes; ctrl+z brings
    the failure back."""
    async def go():
        app = make_app(fast_flasher)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("blink", "osc.timing")
            await settle(pilot, app)
            screen = app.screen
            assert isinstance(screen, CheckScreen)
            assert screen.view.aid.path == "stages.blink.timing_c"
            assert screen.view.aid.try_text.endswith("±10%")
            assert app.session.result("blink", "osc.timing").status == "fail"
            await pilot.press("t")
            await settle(pilot, app)
            edit = app.session.state.edits[-1]
            assert edit.path == "stages.blink.timing_c" and edit.text.endswith("±10%")
            assert app.session.dirty and app.session.can_undo
            assert app.session.result("blink", "osc.timing").status == "pass"
            await pilot.press("ctrl+z")
            await settle(pilot, app)
            assert app.session.result("blink", "osc.timing").status == "fail"
            assert not app.session.dirty
            app.session.close()
    asyncio.run(go())


def test_aid_input_can_be_chosen_from_what_the_check_reads(slow_flasher):
    """i lists the inputs osc.window reads; choosing the timing R gives its passing range
    and an E24 value that, tried, makes the window pass."""
    async def go():
        app = make_app(slow_flasher)
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            app.open_check("blink", "osc.window")
            await settle(pilot, app)
            # The supply has the largest share, but it is an operating condition, not the
            # designer's to choose: the aid starts on the largest-share component value.
            assert app.screen.view.aid.path == "stages.blink.timing_r"
            await pilot.press("i")
            await pilot.pause()
            dialog = app.screen
            assert isinstance(dialog, PickValueDialog)
            paths = [p for p, _, _ in dialog.candidates]
            assert "stages.blink.timing_r" in paths and "stages.blink.supply" not in paths
            assert not [p for p in paths if p.startswith(("parts.", "supply.", "conditions."))]
            dialog.dismiss("stages.blink.timing_r")
            await settle(pilot, app)
            view = app.screen.view
            assert view.aid.path == "stages.blink.timing_r" and view.aid.chosen
            assert view.aid.aid is not None and view.aid.aid.series == 24
            assert view.aid.try_text.endswith("Mohm ±5%")
            await pilot.press("t")
            await settle(pilot, app)
            assert app.session.result("blink", "osc.window").status == "pass"
            tried = app.session.project.lookup("stages.blink.timing_r")
            assert tried.nom == pytest.approx(view.aid.aid.preferred[0])
            assert np.isclose(tried.hi / tried.nom, 1.05)
            app.session.close()
    asyncio.run(go())
