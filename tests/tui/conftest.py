"""Fixtures for the workbook's pilot tests: a tmp copy of the demo projects, an app driver that
waits for the engine, and text snapshots of the screen.

Rewrite the snapshots with LATCHBOOK_UPDATE_SNAPSHOTS=1."""

from __future__ import annotations

import io
import os
import shutil
from pathlib import Path

import pytest
from rich.console import Console

PROJECTS = Path(__file__).resolve().parents[2] / "projects"
SNAPSHOTS = Path(__file__).resolve().parent / "snapshots"


@pytest.fixture
def workdir(tmp_path: Path) -> Path:
    """A tmp folder holding copies of every demo project (never write into projects/)."""
    for p in PROJECTS.glob("*.toml"):
        shutil.copyfile(p, tmp_path / p.name)
    return tmp_path


@pytest.fixture
def kiln(workdir: Path) -> Path:
    return workdir / "kiln-230.toml"


def comment_of(path: Path, key: str) -> str:
    """The trailing comment on the line of ``key`` in a project file (``# …``)."""
    for line in path.read_text().splitlines():
        if line.startswith(f"{key} =") and "#" in line:
            return line[line.index("#"):]
    raise AssertionError(f"{key} has no comment in {path.name}")


async def settle(pilot, app, *, timeout: float = 60.0) -> None:
    """Wait until the engine has delivered every result and no worker is left running."""
    waited = 0.0
    while waited < timeout:
        await pilot.pause(0.05)
        waited += 0.05
        busy = [w for w in app.workers if w.is_running]
        if app.session.computed and not busy:
            await pilot.pause()
            return
    raise AssertionError("the workbook did not settle")


def screen_text(app) -> str:
    """The screen as plain text (what a snapshot stores)."""
    width, height = app.size
    console = Console(width=width, height=height, file=io.StringIO(), force_terminal=True,
                      color_system="truecolor", record=True, legacy_windows=False)
    console.print(app.screen._compositor.render_update(
        full=True, screen_stack=app._background_screens))
    return "\n".join(line.rstrip() for line in console.export_text().splitlines())


@pytest.fixture
def snapshot(request: pytest.FixtureRequest):
    """Compare a screen's text with tests/tui/snapshots/NAME.txt (or rewrite it)."""
    update = os.environ.get("LATCHBOOK_UPDATE_SNAPSHOTS") == "1"

    def check(app, name: str) -> None:
        text = screen_text(app).rstrip("\n")
        path = SNAPSHOTS / f"{name}.txt"
        if update or not path.exists():
            path.write_text(text + "\n", encoding="utf-8")
            if not update:
                pytest.fail(f"snapshot {path.name} did not exist; written, check it and rerun")
            return
        expected = path.read_text(encoding="utf-8").rstrip("\n")
        assert text == expected, (f"screen differs from snapshots/{path.name}; rerun with "
                                  "LATCHBOOK_UPDATE_SNAPSHOTS=1 if the change is intended")

    return check
