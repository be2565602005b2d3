"""The command line: exit codes 0/1/2, the JSON document's shape, nothing written by default."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from reviewer.cli import main
from reviewer.states import RESULTS

PROJECTS = Path(__file__).resolve().parents[2] / "projects"


def run(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "reviewer.cli", *args], capture_output=True,
                          text=True, cwd=cwd)


def test_check_json_shape(capsys):
    """--json gives the versioned document: format, tool, a list of projects, checks."""
    code = main(["check", str(PROJECTS / "flasher-dc.toml"), "--json"])
    doc = json.loads(capsys.readouterr().out)
    assert doc["format"] == "latchbook.results/1" and doc["command"] == "check"
    assert doc["tool"].startswith("latchbook ")
    [project] = doc["projects"]  # a list even for one project
    assert set(project["checklist"]) == {"name", "version", "sha256", "policy_sha256"}
    assert project["warnings"] == []
    assert project["record"] is None and project["checks"]
    for r in project["checks"]:
        assert "review" not in r  # no review record: no review word
        assert r["result"] in RESULTS
        for v in r["values"].values():
            assert set(v) == {"nominal", "min", "max", "unit"}
    window = next(r for r in project["checks"] if r["check"] == "osc.window")
    assert window["values"]["r_max"]["unit"] == "ohm" and len(window["inputs_sha256"]) == 64
    assert code == doc["exit_code"] and code in (0, 1)


def test_several_projects_give_a_list(capsys):
    """With several projects, --json lists them in the order given."""
    main(["check", str(PROJECTS / "flasher-dc.toml"), str(PROJECTS / "kiln-230.toml"), "--json"])
    docs = json.loads(capsys.readouterr().out)["projects"]
    assert [d["name"] for d in docs] == ["Beacon flasher, 24 V",
                                         "Bench kiln element controller"]


def test_failing_check_exits_1(tmp_path, capsys):
    """A project with a failing check exits 1 and names the failure in the table."""
    text = (PROJECTS / "flasher-dc.toml").read_text(encoding="utf-8")
    p = tmp_path / "f.toml"
    p.write_text(text.replace('timing_r = "1 Mohm ±5%"', 'timing_r = "4.7 Mohm ±5%"'),
                 encoding="utf-8")
    assert main(["check", str(p)]) == 1
    out = capsys.readouterr().out
    assert "osc.window" in out and "fail" in out


def test_bad_input_exits_2_without_traceback(tmp_path):
    """A broken project gives one clear line on stderr and exit 2."""
    p = tmp_path / "broken.toml"
    shutil.copy(PROJECTS / "kiln-230.toml", p)
    p.write_text(p.read_text(encoding="utf-8").replace('"26.5 ohm ±5%"', '"26.5 V"'),
                 encoding="utf-8")
    res = run("check", str(p))
    assert res.returncode == 2
    assert "Traceback" not in res.stderr
    assert "broken.toml" in res.stderr and "needs a resistance" in res.stderr


@pytest.mark.parametrize("args", [["check", "/nonexistent/x.toml"], ["check", "."]])
def test_missing_or_folder_exits_2(args):
    """Paths that are not project files exit 2 with a message."""
    res = run(*args)
    assert res.returncode == 2 and "Traceback" not in res.stderr and "latchbook:" in res.stderr


def test_check_writes_nothing_by_default(tmp_path):
    """Without --record, check leaves the folder as it was."""
    for f in PROJECTS.glob("*.toml"):
        shutil.copy(f, tmp_path / f.name)
    before = sorted(p.name for p in tmp_path.iterdir())
    run("check", *(str(p) for p in sorted(tmp_path.glob("*.toml"))))
    assert sorted(p.name for p in tmp_path.iterdir()) == before


def test_no_arguments_copies_the_demo_and_prints_its_table(tmp_path):
    """Without a terminal, plain `latchbook` copies the demo beside the user and prints it."""
    res = run(cwd=tmp_path)
    assert res.returncode == 0, res.stderr
    assert (tmp_path / "latchbook-demo" / "kiln-230.toml").is_file()
    for name in ("charger-12v.toml", "motor-dc.toml", "heater-burst.toml"):  # all demos
        assert (tmp_path / "latchbook-demo" / name).is_file()
    assert "Bench kiln element controller" in res.stdout
    assert "latchbook open" in res.stdout
