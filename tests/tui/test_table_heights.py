"""Row heights of the stage table, worked out from the column widths, are the ones Textual's
DataTable measures by rendering the cells (``height=None``), before and after the results."""

from __future__ import annotations

import asyncio
from pathlib import Path

from rich.text import Text

from reviewer.tui.app import Workbook
from reviewer.tui.session import Session
from reviewer.tui.widgets.tables import StageTable
from tests.tui.conftest import settle


async def _measured(table: StageTable, cells: list[Text], pilot) -> int:
    """The height Textual gives a row of ``cells`` when it measures them itself."""
    table.add_row(*cells, key="probe", height=None)
    await pilot.pause()
    await pilot.pause()
    height = table.rows["probe"].height
    table.remove_row("probe")
    await pilot.pause()
    return height


def _check(path: Path, size: tuple[int, int]) -> None:
    async def go() -> None:
        app = Workbook(Session(path))
        async with app.run_test(size=size) as pilot:
            await settle(pilot, app)
            table = app.screen.query_one(StageTable)
            cols = [key for _, key, _ in table.COLUMNS]
            keys = [str(k.value) for k in table.rows]
            heights = {}
            for key in keys:
                cells = [table.get_cell(key, c) for c in cols]
                heights[key] = (table.rows[key].height, await _measured(table, cells, pilot))
            assert all(ours == theirs for ours, theirs in heights.values()), heights
            assert max(h for h, _ in heights.values()) >= 2  # a folded kind is there
            app.session.close()
    asyncio.run(go())


def test_heights_match_textual_measurement(workdir: Path) -> None:
    for name in ("kiln-230.toml", "flasher-dc.toml"):  # line-, capacitor-commutation fold
        _check(workdir / name, (80, 24))


def test_long_stage_name_wraps_like_textual(workdir: Path) -> None:
    """A stage id longer than its column (no hyphen to break at) is wrapped, not cut."""
    path = workdir / "kiln-230.toml"
    text = path.read_text()
    assert "[stages.snubber]" in text
    path.write_text(text.replace("[stages.snubber]", "[stages.snubberofthekilnmain]"))
    _check(path, (80, 24))
