"""The sign / waive / revoke / verify / status commands: output and exit codes."""

from __future__ import annotations

import argparse
import json
import re
from pathlib import Path

import pytest

from reviewer import cli_review
from reviewer.review import record_path
from reviewer.states import FAILING

from .test_review import make


def run(argv: list[str]) -> int:
    """Parse with only our subcommands registered, as the lead's CLI does, and run."""
    parser = argparse.ArgumentParser(prog="latchbook")
    cli_review.register(parser.add_subparsers(dest="command"))
    args = parser.parse_args(argv)
    return int(args.func(args))


def test_sign_then_verify_intact(tmp_path, capsys):
    """sign exits 0; verify exits 0 and says the history is intact and what anchors it."""
    p = make(tmp_path)
    assert run(["sign", str(p), "--stage", "trigger", "--check", "osc.window",
                "--meaning", "reviewed", "--note", "by hand"]) == 0
    assert "signed: #1 signoff of stage trigger" in capsys.readouterr().out
    assert run(["verify", str(p)]) == 0
    out = capsys.readouterr().out
    assert "history verifies: 1 entries" in out and "not SSH-signed" in out


def test_verify_names_first_bad_entry_and_exits_1(tmp_path, capsys):
    """A tampered entry: exit 1, and the output names the entry."""
    p = make(tmp_path)
    for note in ("one", "two"):
        assert run(["sign", str(p), "--stage", "trigger", "--check", "osc.window",
                    "--note", note]) == 0
    rp = record_path(p)
    rp.write_text(rp.read_text("utf-8").replace('note = "one"', 'note = "uno"'), "utf-8")
    capsys.readouterr()
    assert run(["verify", str(p)]) == 1
    assert "history does NOT verify at entry 1" in capsys.readouterr().out
    assert run(["verify", str(p), "--json"]) == 1
    doc = json.loads(capsys.readouterr().out)
    assert doc["ok"] is False and doc["first_bad"] == 1


def test_sign_refused_on_fail_exits_1_with_reason(tmp_path, capsys):
    """A failing check: exit 1 and a message saying how to proceed."""
    p = make(tmp_path, rmax="10 Mohm")
    assert run(["sign", str(p), "--stage", "trigger", "--check", "osc.window"]) == 1
    err = capsys.readouterr().err
    assert "osc.window fails" in err and "waive" in err and "Traceback" not in err


def test_waive_then_sign_then_revoke(tmp_path, capsys):
    """waive with a reason, sign, revoke the sign-off: each exits 0."""
    p = make(tmp_path, rmax="10 Mohm")
    assert run(["waive", str(p), "--stage", "trigger", "--check", "osc.window",
                "--note", "ok"]) == 1
    assert "too short" in capsys.readouterr().err
    assert run(["waive", str(p), "--stage", "trigger", "--check", "osc.window", "--note",
                "knob end-stop limits the pot to 90 kohm, checked on the bench"]) == 0
    assert "fail | waived" in capsys.readouterr().out
    assert run(["sign", str(p), "--stage", "trigger", "--check", "osc.window"]) == 0
    assert run(["revoke", str(p), "--entry", "2", "--note",
                "sign-off made before the bench report was filed"]) == 0
    assert run(["verify", str(p)]) == 0


def test_bad_input_exits_2(tmp_path, capsys):
    """A missing project or an unknown stage is bad input: exit 2, no traceback."""
    assert run(["sign", str(tmp_path / "nope.toml"), "--stage", "x"]) == 2
    assert "no such project file" in capsys.readouterr().err
    p = make(tmp_path)
    assert run(["sign", str(p), "--stage", "nosuch"]) == 2
    assert "the stages are trigger" in capsys.readouterr().err
    assert run(["status", str(tmp_path / "missing-dir")]) == 2
    assert run(["verify", str(tmp_path / "nope.toml")]) == 2


def test_status_counts_and_exit_codes(tmp_path, capsys):
    """status: one row per project; 1 while a fail is unwaived or a sign-off is stale."""
    good = make(tmp_path, name="good.toml")
    bad = make(tmp_path, rmax="10 Mohm", name="bad.toml")
    assert run(["sign", str(good), "--stage", "trigger", "--check", "osc.window"]) == 0
    capsys.readouterr()
    assert run(["status", str(good)]) == 0
    assert "good.toml" in capsys.readouterr().out
    assert run(["status", str(tmp_path), "--json"]) == 1  # bad.toml fails, unwaived
    rows = {Path(r["file"]).name: r for r in json.loads(capsys.readouterr().out)["projects"]}
    assert set(rows) == {"good.toml", "bad.toml"}
    failing = [f"{c['stage']}/{c['check']}" for c in rows["bad.toml"]["checks"]
               if c["result"] in FAILING]
    assert "trigger/osc.window" in failing and rows["bad.toml"]["verdict"] == "fail"
    g = rows["good.toml"]["counts"]
    assert "fail" not in g["results"] and "stale" not in g["reviews"]
    assert g["reviews"]["signed"] == 1 and rows["good.toml"]["verdict"] in ("pass", "marginal")
    # without an n/a check, unsigned = every applicable check but the signed osc.window
    applicable = sum(v for k, v in g["results"].items() if k != "not-applicable")
    assert g["reviews"]["unsigned"] + g["reviews"]["signed"] == sum(g["results"].values())
    assert applicable >= g["reviews"]["signed"]
    # Make the sign-off stale: exit 1, and the row says which input changed.
    good.write_text(good.read_text("utf-8").replace('"100 kohm"', '"120 kohm"'), "utf-8")
    assert run(["status", str(good)]) == 1
    out = capsys.readouterr().out
    assert re.search(r"good\.toml: trigger/osc\.window stale \(stages\.trigger\.timing_r: ", out)
    # Waive the failures: bad.toml no longer fails the build.
    for key in failing:
        stage, check = key.split("/")
        assert run(["waive", str(bad), "--stage", stage, "--check", check, "--note",
                    "knob end-stop limits the pot to 90 kohm, checked on the bench"]) == 0
    capsys.readouterr()
    assert run(["status", str(bad), "--json"]) == 0
    [row] = json.loads(capsys.readouterr().out)["projects"]
    assert row["counts"]["reviews"]["waived"] == len(failing) and row["verdict"] != "fail"
    waived = [c for c in row["checks"] if c.get("review") == "waived"]
    assert {c["waiver"] for c in waived} == {"knob end-stop limits the pot to 90 kohm, "
                                            "checked on the bench"}


def test_status_skips_record_and_checklist_files(tmp_path, capsys):
    """A folder scan lists projects only."""
    p = make(tmp_path, name="only.toml")
    (tmp_path / "x.checklist.toml").write_text('[checklist]\nname = "x"\n')
    assert run(["sign", str(p), "--stage", "trigger", "--check", "osc.window"]) == 0
    capsys.readouterr()
    run(["status", str(tmp_path), "--json"])
    doc = json.loads(capsys.readouterr().out)
    assert [Path(r["file"]).name for r in doc["projects"]] == ["only.toml"]


@pytest.mark.parametrize("name", ["kiln-230.toml", "kiln-120.toml", "flasher-dc.toml"])
def test_status_on_demo_projects_reports_without_traceback(name, capsys):
    """The shipped demo projects give a status row (they are fixtures, read-only here)."""
    demo = Path(__file__).resolve().parents[2] / "projects" / name
    if not demo.exists():
        pytest.skip(f"demo project {name} not present")
    code = run(["status", str(demo), "--json"])
    [row] = json.loads(capsys.readouterr().out)["projects"]
    assert code in (0, 1) and row["error"] is None
    assert sum(row["counts"]["results"].values()) == len(row["checks"]) >= 1


def test_retried_sign_reports_the_entry_it_already_wrote(tmp_path, capsys):
    """A sign killed after writing its entry, run again: the existing entry is reported, no
    duplicate is added; a different note is a new sign-off."""
    p = make(tmp_path)
    argv = ["sign", str(p), "--stage", "trigger", "--check", "osc.window", "--note", "by hand"]
    assert run(argv) == 0
    capsys.readouterr()
    assert run(argv) == 0
    assert "already signed: #1 signoff" in capsys.readouterr().out
    from reviewer.records import load_record

    assert len(load_record(p).entries) == 1
    assert run([*argv[:-1], "second look at the window"]) == 0
    assert len(load_record(p).entries) == 2


def test_verify_exits_1_on_a_stale_sign_off_as_the_readme_says(tmp_path, capsys):
    """README: verify exits 1 when a sign-off in force is stale; its JSON agrees."""
    p = make(tmp_path)
    assert run(["sign", str(p), "--stage", "trigger", "--check", "osc.window"]) == 0
    p.write_text(p.read_text().replace('max = "100 kohm"', 'max = "90 kohm"'))
    capsys.readouterr()
    assert run(["verify", str(p), "--json"]) == 1
    doc = json.loads(capsys.readouterr().out)
    assert doc["ok"] is False and doc["exit_code"] == 1 and doc["history_ok"] is True
    assert doc["stale"] and "timing_r" in doc["stale"][0]
    readme = (Path(__file__).resolve().parents[2] / "README.md").read_text()
    assert re.search(r"`verify` exits\s+1 when[^.]*stale", readme)


def test_check_json_carries_the_review_state_and_agrees_with_the_exit_code(tmp_path, capsys):
    """A waived fail: result fail, review waived with its entry number, exit 0 (the waiver
    holds); with the waiver's entry tampered, review unverified and exit 1."""
    from reviewer.cli import main

    p = make(tmp_path, rmax="10 Mohm")  # osc.window and osc.leakage fail, two are blocked
    assert run(["waive", str(p), "--stage", "trigger", "--check", "osc.window", "--note",
                "knob end-stop limits the pot to 90 kohm, checked on the bench"]) == 0
    from reviewer.states import FAILING

    from .test_review import run_of

    for r in run_of(p).results:
        if r.status in FAILING and r.check != "osc.window":
            assert run(["waive", str(p), "--stage", "trigger", "--check", r.check, "--note",
                        "the same end-stop keeps this within what the bench showed"]) == 0
    capsys.readouterr()
    assert main(["check", str(p), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    [r] = [r for r in doc["projects"][0]["checks"] if r["check"] == "osc.window"]
    assert r["result"] == "fail"
    assert r["review"] == "waived" and r["review_entries"] == [1]
    assert doc["exit_code"] == 0
    rp = record_path(p)
    rp.write_text(rp.read_text("utf-8").replace("checked on the bench", "checked by all"))
    assert main(["check", str(p), "--json"]) == 1
    doc = json.loads(capsys.readouterr().out)
    [r] = [r for r in doc["projects"][0]["checks"] if r["check"] == "osc.window"]
    assert r["review"] == "unverified" and doc["projects"][0]["record"]["history_ok"] is False
    assert doc["exit_code"] == 1


def test_check_json_without_a_record_has_no_review_field(tmp_path, capsys):
    """No record at all: no review state."""
    from reviewer.cli import main

    p = make(tmp_path)
    assert main(["check", str(p), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    proj = doc["projects"][0]
    assert proj["record"] is None and all("review" not in r for r in proj["checks"])


def test_disk_full_and_busy_have_their_own_exit_codes(tmp_path, capsys, monkeypatch):
    """check --record on a full disk: exit 2 naming the cause (not "bad input", no
    traceback); sign while a workbook holds the project: exit 3 naming the holder, never
    "opened read-only"."""
    import errno
    import subprocess
    import sys

    from reviewer.cli import main

    p = make(tmp_path)
    real = __import__("os").fsync

    def full(fd):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr("os.fsync", full)
    assert main(["check", str(p), "--record"]) == 2
    err = capsys.readouterr().err
    assert "disk is full" in err and "Traceback" not in err
    monkeypatch.setattr("os.fsync", real)
    holder = subprocess.Popen(
        [sys.executable, "-c", "import sys\nfrom reviewer.store import ProjectLock\n"
         "with ProjectLock(sys.argv[1]):\n    print('held', flush=True)\n"
         "    sys.stdin.readline()\n", str(p)],
        stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True,
        env=dict(__import__("os").environ, PYTHONPATH=str(Path(__file__).resolve().parents[2])))
    try:
        assert holder.stdout.readline().strip() == "held"
        assert run(["sign", str(p), "--stage", "trigger", "--check", "osc.window"]) == 3
        err = capsys.readouterr().err
        assert f"pid {holder.pid}" in err and "read-only" not in err
    finally:
        holder.stdin.write("\n")
        holder.stdin.close()
        holder.wait(10)
