"""`report` over many projects and folders: one report per project into --out-dir, each
written whole; a single project still goes to standard output or -o."""

from __future__ import annotations

import re
import shutil
from pathlib import Path

from reviewer.cli import main
from reviewer.report import gather, render, to_markdown

ROOT = Path(__file__).resolve().parents[2]
LINE = ROOT / "projects" / "kiln-line"


def _untimed(text: str) -> str:
    """The report without its export time."""
    return re.sub(r"\d{4}-\d\d-\d\d[ T]\d\d:\d\d(:\d\d)?( UTC)?", "<time>", text)


def test_folder_and_file_give_one_report_each(tmp_path, capsys):
    """A folder's projects keep their place under --out-dir; a named file goes to its top."""
    out = tmp_path / "reports"
    code = main(["report", str(LINE), str(ROOT / "projects" / "flasher-dc.toml"),
                 "--format", "md", "--out-dir", str(out), "--jobs", "2"])
    err = capsys.readouterr().err
    assert code == 0, err
    names = sorted(p.name for p in out.rglob("*.md"))
    assert names == ["flasher-dc.md", "kiln-120-1k.md", "kiln-120-2k.md", "kiln-230-2k.md",
                     "kiln-base.md"]
    # A written Markdown report links its figures, written beside it.
    assert _untimed((out / "kiln-base.md").read_text("utf-8")) == _untimed(
        to_markdown(gather(LINE / "kiln-base.toml"), "kiln-base.figures"))
    assert (out / "kiln-base.figures" / "trigger-schematic.svg").is_file()
    assert err.count("report written to") == 5
    assert not list(out.glob(".*.tmp"))  # no temp file left behind


def test_one_project_still_goes_to_stdout(capsys):
    """One project without --out-dir: the report on standard output, as before."""
    assert main(["report", str(LINE / "kiln-base.toml"), "--format", "md"]) == 0
    assert _untimed(capsys.readouterr().out) == _untimed(render(LINE / "kiln-base.toml", "md"))


def test_several_projects_need_an_out_dir(tmp_path, capsys):
    """-o FILE with several projects, or none of -o/--out-dir, is bad input (exit 2)."""
    two = [str(LINE / "kiln-base.toml"), str(LINE / "kiln-230-2k.toml")]
    assert main(["report", *two, "-o", str(tmp_path / "x.html")]) == 2
    assert "--out-dir" in capsys.readouterr().err
    assert main(["report", str(LINE)]) == 2
    assert "--out-dir" in capsys.readouterr().err
    assert not (tmp_path / "x.html").exists()


def test_two_projects_writing_one_file_are_refused(tmp_path, capsys):
    """Two named projects with the same file name would overwrite each other: refused first."""
    a, b = tmp_path / "a", tmp_path / "b"
    for d in (a, b):
        d.mkdir()
        shutil.copy(ROOT / "projects" / "flasher-dc.toml", d / "same.toml")
    out = tmp_path / "out"
    assert main(["report", str(a / "same.toml"), str(b / "same.toml"), "--format", "md",
                 "--out-dir", str(out)]) == 2
    assert "would both write" in capsys.readouterr().err and not out.exists()


def test_a_broken_project_does_not_stop_the_others(tmp_path, capsys):
    """The others are written; the run exits 2 and names the broken file."""
    shutil.copy(ROOT / "projects" / "flasher-dc.toml", tmp_path / "good.toml")
    (tmp_path / "bad.toml").write_text('[project]\nname = "x"\n', "utf-8")
    out = tmp_path / "out"
    assert main(["report", str(tmp_path), "--format", "md", "--out-dir", str(out)]) == 2
    assert "bad.toml" in capsys.readouterr().err
    assert (out / "good.md").is_file() and not (out / "bad.md").exists()
