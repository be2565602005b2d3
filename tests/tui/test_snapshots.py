"""Text snapshots of a few screens at 80×24, fixed theme, no clock and no paths on screen.

Rewrite them with LATCHBOOK_UPDATE_SNAPSHOTS=1 when a change is intended (the overview also
changes when a check's result changes)."""

from __future__ import annotations

import asyncio

from reviewer.tui.app import Workbook
from reviewer.tui.session import Session
from tests.tui.conftest import settle

SIZE = (80, 24)


def test_overview_snapshot(kiln, snapshot):
    """The first screen of the 230 V kiln project."""
    async def go():
        app = Workbook(Session(kiln))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            snapshot(app, "overview-kiln-230")
            app.session.close()
    asyncio.run(go())


def test_edit_dialog_snapshot(kiln, snapshot):
    """The edit dialog with a refused value and its message."""
    async def go():
        app = Workbook(Session(kiln), recompute=False)
        async with app.run_test(size=SIZE) as pilot:
            await pilot.pause()
            app.screen.edit_path("stages.snubber.r")
            await pilot.pause()
            app.screen.query_one("#edit-input").value = "10 V"
            await pilot.press("enter")
            await pilot.pause()
            snapshot(app, "edit-dialog-refused")
            app.session.close()
    asyncio.run(go())


def test_too_small_snapshot(kiln, snapshot):
    """The panel shown in a 70×20 terminal."""
    async def go():
        app = Workbook(Session(kiln), recompute=False)
        async with app.run_test(size=(70, 20)) as pilot:
            await pilot.pause()
            await pilot.pause()
            snapshot(app, "too-small-70x20")
            app.session.close()
    asyncio.run(go())


def test_lead_view_attention_snapshot(tmp_path, snapshot):
    """The lead's view of the stale 120 V variant under the attention filter, in the power
    stage: READ-ONLY and the filter in the banner, only the stale check listed."""
    import shutil

    from tests.tui.conftest import PROJECTS

    line = tmp_path / "kiln-line"
    shutil.copytree(PROJECTS / "kiln-line", line)

    async def go():
        app = Workbook(Session(line / "kiln-120-1k.toml", record=line / "kiln-120-1k.review.toml"))
        async with app.run_test(size=SIZE) as pilot:
            await settle(pilot, app)
            await pilot.press("f")
            await pilot.pause()
            app.open_stage("power")
            await pilot.pause()
            await pilot.pause()
            snapshot(app, "lead-view-attention-power")
    asyncio.run(go())
