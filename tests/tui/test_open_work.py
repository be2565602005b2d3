"""Opening a project does each piece of work once: the file is loaded once (the review record
is verified against the session's checklist, not a second load of the project), and the
record's verdict is the one a fresh load_record gives."""

from __future__ import annotations

import shutil
from pathlib import Path

import reviewer.project as project_mod
from reviewer.review import load_record
from reviewer.tui.session import Session

LINE = Path(__file__).resolve().parents[2] / "projects" / "kiln-line"


def test_one_load_and_the_same_verdict(tmp_path: Path, monkeypatch) -> None:
    for p in LINE.iterdir():
        shutil.copyfile(p, tmp_path / p.name)
    path = tmp_path / "kiln-base.toml"
    assert (tmp_path / "kiln-base.review.toml").exists()
    loads: list[str] = []
    real = project_mod.load_project

    def counted(p, *a, **k):
        loads.append(str(p))
        return real(p, *a, **k)

    monkeypatch.setattr(project_mod, "load_project", counted)
    s = Session(path)
    try:
        assert loads == []  # the session parses its own text; nothing loads the file again
        fresh = load_record(path)
        assert s.record is not None
        assert s.record.trust.ok == fresh.trust.ok
        assert s.record.trust.messages() == fresh.trust.messages()
        assert len(s.record.entries) == len(fresh.entries) > 0
    finally:
        s.close()
