"""Shared fixtures: the demo projects (they double as fixtures) and copies to write into."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
PROJECTS = ROOT / "projects"


@pytest.fixture
def projects_dir() -> Path:
    """The repository's demo projects folder (read only)."""
    return PROJECTS


@pytest.fixture
def demo_copy(tmp_path: Path) -> Path:
    """A writable copy of every demo project; returns the folder."""
    for f in PROJECTS.glob("*.toml"):
        shutil.copy(f, tmp_path / f.name)
    for d in PROJECTS.iterdir():
        if d.is_dir():
            shutil.copytree(d, tmp_path / d.name)
    return tmp_path
