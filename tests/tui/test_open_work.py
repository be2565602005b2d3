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


def test_opening_fills_the_table_as_results_arrive(tmp_path: Path, monkeypatch) -> None:
    """The whole-project run hands over what it has as it goes (every PARTIAL seconds; 0
    here, so after each check) before the final delivery of everything, and the final
    results are those of one plain run."""
    import asyncio

    from reviewer.tui.app import Workbook
    from reviewer.tui.compute import Computer
    from tests.tui.conftest import settle

    shutil.copyfile(LINE.parent / "kiln-230.toml", tmp_path / "kiln-230.toml")
    path = tmp_path / "kiln-230.toml"
    monkeypatch.setattr(Computer, "PARTIAL", 0.0)
    deliveries: list[tuple[int, bool]] = []
    real = Computer._deliver

    def seen(self, gen, results, done, *, tell=True):
        deliveries.append((len(results), done))
        return real(self, gen, results, done, tell=tell)

    monkeypatch.setattr(Computer, "_deliver", seen)
    plain = Session(path, lock=False)
    plain.compute_all()
    expected = {(r.stage, r.check): (r.status, r.summary) for r in plain.run.results}
    plain.close()

    async def go() -> None:
        app = Workbook(Session(path))
        async with app.run_test(size=(80, 24)) as pilot:
            await settle(pilot, app)
            got = {(r.stage, r.check): (r.status, r.summary) for r in app.session.run.results}
            assert got == expected
            app.session.close()
    asyncio.run(go())
    partial = [n for n, done in deliveries if not done]
    assert len(partial) >= 3 and deliveries[-1] == (len(expected), True)
    assert sum(partial) <= len(expected)
