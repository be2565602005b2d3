"""The product line: variant precedence, the status matrix and its exit code."""

from __future__ import annotations

import io
import json
import shutil
from pathlib import Path
from types import SimpleNamespace

import pytest

from reviewer.diff import origin_of
from reviewer.line import (
    matrix_exit_code,
    render_matrix,
    stage_state,
    status_matrix,
)
from reviewer.project import load_project

LINE = Path(__file__).resolve().parents[2] / "projects" / "kiln-line"


@pytest.fixture(scope="module")
def matrix():
    return status_matrix([LINE])


def _row(m, name):
    return next(r for r in m.rows if Path(r.path).name == name)


def test_variant_precedence_through_two_levels():
    """A value comes from the nearest file that sets it: variant, its base, then the base's."""
    p = load_project(LINE / "kiln-120-2k.toml")
    assert [Path(c).name for c in p.chain] == ["kiln-120-2k.toml", "kiln-120-1k.toml",
                                               "kiln-base.toml"]
    assert p.stages["power"].params["load"]["r"].nom == pytest.approx(6.5)
    assert p.stages["trigger"].params["timing_c"].nom == pytest.approx(180e-9)
    assert p.stages["snubber"].params["c"].nom == pytest.approx(68e-9)
    assert p.stages["snubber"].params["r"].nom == pytest.approx(62.0)
    assert p.supply["frequency"].nom == pytest.approx(60.0)
    origin = {k: Path(origin_of(p, k)).name for k in (
        "stages.power.load.r", "stages.trigger.timing_c", "stages.snubber.c",
        "stages.snubber.r", "supply.frequency", "parts.Q1.vdrm")}
    assert origin == {"stages.power.load.r": "kiln-120-2k.toml",
                      "stages.trigger.timing_c": "kiln-120-1k.toml",
                      "stages.snubber.c": "kiln-120-1k.toml",
                      "stages.snubber.r": "kiln-base.toml",
                      "supply.frequency": "kiln-120-1k.toml",
                      "parts.Q1.vdrm": "kiln-base.toml"}


def test_matrix_rows_and_columns(matrix):
    """Four projects, base first; the columns are the line's stages in file order."""
    assert [Path(r.path).name for r in matrix.rows] == [
        "kiln-base.toml", "kiln-120-1k.toml", "kiln-230-2k.toml", "kiln-120-2k.toml"]
    assert matrix.stages == ["trigger", "gate", "power", "snubber", "commutation"]
    assert _row(matrix, "kiln-120-2k.toml").variant_of == "kiln-120-1k.toml"


def test_failing_variant_fails(matrix):
    """The 120 V 2 kW variant keeps the 1 kW heatsink: its power stage fails on Tj."""
    row = _row(matrix, "kiln-120-2k.toml")
    assert row.cells["power"].state == "fail" and row.state == "fail"
    assert "power.junction" in row.cells["power"].detail
    assert row.cells["power"].checks["power.junction"].startswith("fail")


def test_stale_variant_is_stale(matrix):
    """The 120 V 1 kW variant's snubber changed after signing: that stage reads stale."""
    row = _row(matrix, "kiln-120-1k.toml")
    assert row.cells["snubber"].state == "stale"
    assert row.counts["stale"] > 0
    assert any("stale" in label for label in row.cells["snubber"].checks.values())


def test_waived_and_unsigned(matrix):
    """The base's waived leakage shows as waived; a variant nobody signed shows unsigned."""
    base = _row(matrix, "kiln-base.toml")
    # "stale" only once a later version of a check reads different inputs than were signed.
    assert base.cells["snubber"].state in ("waived", "stale")
    assert base.cells["snubber"].checks["snubber.leakage"].startswith("marginal")
    unsigned = _row(matrix, "kiln-230-2k.toml")
    assert unsigned.record == ""
    assert all(c.state in ("unsigned", "marginal", "fail", "n/a")
               for c in unsigned.cells.values())
    assert unsigned.cells["commutation"].state == "unsigned"


def test_exit_code_and_json(matrix, capsys):
    """A failing or stale variant makes the build fail (1); the JSON carries every stage."""
    from reviewer.cli import main

    assert matrix_exit_code(matrix) == 1
    assert main(["status", "--matrix", str(LINE), "--json"]) == 1
    doc = json.loads(capsys.readouterr().out)
    assert doc["exit_code"] == 1 and doc["command"] == "status --matrix"
    rows = {Path(r["file"]).name: r for r in doc["projects"]}
    stages = {n: {s["id"]: s["state"] for s in r["stages"]} for n, r in rows.items()}
    assert stages["kiln-120-2k.toml"]["power"] == "fail"
    assert stages["kiln-120-1k.toml"]["snubber"] == "stale"
    assert rows["kiln-120-2k.toml"]["chain"][-1].endswith("kiln-base.toml")
    assert sorted({s for r in stages.values() for s in r}) == sorted(matrix.stages)


def test_render_is_plain_text(tmp_path):
    """File names that look like rich markup are shown as written, never interpreted."""
    dest = tmp_path / "line"
    shutil.copytree(LINE, dest)
    odd = dest / "kiln[bold]x.toml"
    odd.write_text('[project]\nname = "odd [red]name"\nrevision = "B"\n'
                   'variant_of = "kiln-base.toml"\n', encoding="utf-8")
    m = status_matrix([dest])
    buf = io.StringIO()
    render_matrix(m, buf, base_dir=dest, width=200)
    out = buf.getvalue()
    assert "kiln[bold]x.toml" in out
    assert "stale" in out and "fail" in out


def test_broken_project_is_a_row_and_exit_2(tmp_path):
    """A project that does not load is reported in its row, and the exit code is 2."""
    (tmp_path / "bad.toml").write_text('[project]\nname = "x"\n', encoding="utf-8")
    m = status_matrix([tmp_path])
    assert len(m.rows) == 1 and "[conditions] table is missing" in m.rows[0].error
    assert matrix_exit_code(m) == 2


def test_change_to_base_makes_variant_stale(tmp_path):
    """Editing the base after a variant was signed makes the variant's sign-off stale."""
    from reviewer.review import sign

    dest = tmp_path / "line"
    shutil.copytree(LINE, dest)
    sign(dest / "kiln-230-2k.toml", stage="commutation",
         note="natural commutation reviewed for the 2 kW element")
    before = _row(status_matrix([dest / "kiln-230-2k.toml"]), "kiln-230-2k.toml")
    assert before.cells["commutation"].state == "pass"
    base = dest / "kiln-base.toml"
    base.write_text(base.read_text("utf-8").replace('frequency = "50 Hz"', 'frequency = "60 Hz"'),
                    encoding="utf-8")
    after = _row(status_matrix([dest / "kiln-230-2k.toml"]), "kiln-230-2k.toml")
    assert after.cells["commutation"].state == "stale"


def _st(check, status, signoff="signed", waiver="", approval=""):
    return SimpleNamespace(check=check, status=status, signoff=signoff, waiver=waiver,
                           approval=approval, label=status)


@pytest.mark.parametrize(("states", "want"), [
    ([_st("a", "pass"), _st("b", "fail", waiver="stale", signoff="stale")], "fail"),
    ([_st("a", "pass", signoff="stale"), _st("b", "marginal")], "stale"),
    ([_st("a", "marginal"), _st("b", "fail", waiver="waived")], "marginal"),
    ([_st("a", "pass"), _st("b", "fail", waiver="waived")], "waived"),
    ([_st("a", "pass"), _st("b", "pass", signoff="unsigned")], "unsigned"),
    ([_st("a", "pass"), _st("b", "not-applicable", signoff="unsigned")], "pass"),
    ([_st("a", "not-applicable", signoff="unsigned")], "n/a"),
])
def test_stage_state_precedence(states, want):
    """fail > stale > marginal > waived > unsigned > pass; nothing applicable is n/a."""
    assert stage_state(states).state == want
