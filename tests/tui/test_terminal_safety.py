"""The workbook draws text from files as text: names, stage ids, notes and warnings carrying
ESC/OSC/BEL sequences and bidi overrides appear on no screen raw (the pilot reads the screen)."""

from __future__ import annotations

import asyncio
import contextlib
import io
from pathlib import Path

from reviewer.cli import main
from reviewer.tui.app import Workbook
from reviewer.tui.screens.check import CheckScreen
from reviewer.tui.screens.stage import StageScreen
from reviewer.tui.session import Session
from reviewer.tui.widgets.tables import StageTable
from tests.reviewer.test_terminal_safety import NOTE, RAW, STAGE, hostile_project
from tests.tui.conftest import screen_text, settle


def test_workbook_screens_hold_no_raw_control_or_bidi(tmp_path: Path):
    p = hostile_project(tmp_path)
    p.write_text(p.read_text(encoding="utf-8").replace('tq = "80 us"', 'tq = "5 ms"'),
                 encoding="utf-8")
    with contextlib.redirect_stdout(io.StringIO()):
        assert main(["sign", str(p), "--stage", "power", "--note", NOTE]) == 0
    screens: dict[str, str] = {}

    async def go() -> None:
        app = Workbook(Session(p))
        async with app.run_test(size=(80, 24), notifications=True) as pilot:
            await settle(pilot, app)
            await pilot.pause(0.2)
            screens["overview"] = screen_text(app)
            app.screen.query_one(StageTable).select_key(STAGE)
            await pilot.press("enter")
            await pilot.pause()
            assert isinstance(app.screen, StageScreen)
            screens["stage"] = screen_text(app)
            await pilot.press("enter")
            await pilot.pause()
            assert isinstance(app.screen, CheckScreen)
            screens["detail"] = screen_text(app)
            await pilot.press("escape")
            await pilot.pause()
            await pilot.press("r")
            await pilot.pause()
            screens["revoke"] = screen_text(app)

    asyncio.run(go())
    for name, text in screens.items():
        assert not [r for r in RAW if r in text], name
    shown = "".join(screens.values())
    assert "\\x1b" in shown and "⟨U+202E⟩" in shown  # there, and visible
    assert "outside the usual band" in screens["overview"]
