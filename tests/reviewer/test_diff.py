"""`latchbook diff`: inputs with units and origins, moved results, history changes, exit codes."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from reviewer.cli import main
from reviewer.diff import diff_paths, render_diff

LINE = Path(__file__).resolve().parents[2] / "projects" / "kiln-line"


@pytest.fixture(scope="module")
def variants():
    return diff_paths(LINE / "kiln-120-1k.toml", LINE / "kiln-120-2k.toml")


def test_changed_inputs_have_units_and_origins(variants):
    """The element resistance changed: shown in engineering notation, with the file it came from."""
    ch = {c.path: c for c in variants.inputs}
    r = ch["stages.power.load.r"]
    assert r.old.startswith("12 Ω") and r.new.startswith("6.5 Ω")
    assert "6.17 Ω – 6.83 Ω" in r.new  # ±5 %
    assert (r.old_from, r.new_from) == ("kiln-120-1k.toml", "kiln-120-2k.toml")
    req = ch["stages.power.required"]
    assert req.old_from == "kiln-base.toml" and "1.6 kW" in req.new
    assert "stages.snubber.c" not in ch  # the same in both (set in kiln-120-1k)


def test_moved_results(variants):
    """power.junction moved from pass to fail; its named values show the change."""
    res = {(r.stage, r.check): r for r in variants.results}
    j = res[("power", "power.junction")]
    assert (j.old_status, j.new_status) == ("pass", "fail")
    assert j.new_margin < 0 < j.old_margin and j.inputs_changed
    assert any(v.startswith("junction_temperature:") and "°C" in v for v in j.values)
    assert ("trigger", "osc.window") not in res  # the oscillator did not change


def test_no_differences_exit_0(capsys):
    """A project against itself: no differences, exit 0."""
    assert main(["diff", str(LINE / "kiln-base.toml"), str(LINE / "kiln-base.toml")]) == 0
    assert "no differences" in capsys.readouterr().out


def test_differences_exit_1_and_json(capsys):
    """Differences exit 1; --json carries inputs, results and entries."""
    code = main(["diff", str(LINE / "kiln-base.toml"), str(LINE / "kiln-230-2k.toml"), "--json"])
    doc = json.loads(capsys.readouterr().out)
    assert code == 1 and doc["differences"] is True and doc["what"] == "projects"
    paths = [c["path"] for c in doc["inputs"]]
    assert "stages.power.load.r" in paths
    assert {"stage", "check", "old_status", "new_status", "old_margin",
            "new_margin"} <= set(doc["results"][0])


def test_bad_input_exit_2(capsys, tmp_path):
    """A project against a record, or a missing file, is bad input: exit 2."""
    assert main(["diff", str(LINE / "kiln-base.toml"),
                 str(LINE / "kiln-base.review.toml")]) == 2
    assert main(["diff", str(LINE / "kiln-base.toml"), str(tmp_path / "none.toml")]) == 2
    assert "no such file" in capsys.readouterr().err


def test_markup_is_not_interpreted(tmp_path, capsys):
    """Names that look like rich markup print as written."""
    dest = tmp_path / "line"
    shutil.copytree(LINE, dest)
    v = dest / "kiln-230-2k.toml"
    v.write_text(v.read_text("utf-8").replace('"Studio kiln controller, 230 V 2 kW"',
                                              '"kiln [bold]R[1][/bold]"'), encoding="utf-8")
    assert main(["diff", str(dest / "kiln-base.toml"), str(v)]) == 1
    assert "kiln [bold]R[1][/bold]" in capsys.readouterr().out


def test_records_added_revoked_and_gone_stale(tmp_path):
    """Between two records: a new sign-off, a revocation, and a sign-off gone stale."""
    from reviewer.review import record_path, record_results, revoke, sign

    dest = tmp_path / "line"
    shutil.copytree(LINE, dest)
    proj = dest / "kiln-230-2k.toml"
    e1 = sign(proj, stage="commutation", note="natural commutation reviewed, 2 kW element")
    old = tmp_path / "old.review.toml"
    shutil.copy(record_path(proj), old)
    sign(proj, stage="trigger", note="trigger ramp reviewed against the 50 Hz timing")
    revoke(proj, seq=e1.seq, note="commutation needs a second look after the element change")
    sign(proj, stage="commutation", note="commutation reviewed again after the second look")
    mid = tmp_path / "mid.review.toml"
    shutil.copy(record_path(proj), mid)
    d = diff_paths(old, mid)
    kinds = [(e.change, e.kind) for e in d.entries]
    assert ("added", "signoff") in kinds and ("revoked", "revoke") in kinds
    assert d.has_differences
    # Now the project changes and fresh results are recorded: the sign-offs go stale.
    proj.write_text(proj.read_text("utf-8") + '\n[supply]\nfrequency = "60 Hz"\n',
                    encoding="utf-8")
    from reviewer.line import run_project

    record_results(run_project(proj), proj)
    d2 = diff_paths(mid, record_path(proj))
    stale = [e for e in d2.entries if e.change == "gone stale"]
    assert stale and all("inputs changed" in e.detail for e in stale)
    assert any(r.inputs_changed for r in d2.results)
    out = Path(tmp_path / "out.txt")
    with out.open("w", encoding="utf-8") as fh:
        render_diff(d2, fh)
    assert "gone stale" in out.read_text("utf-8")


def test_history_rewrite_is_flagged(tmp_path):
    """An entry missing from NEW that was in OLD is reported as removed or altered."""
    from reviewer.review import record_path, sign

    dest = tmp_path / "line"
    shutil.copytree(LINE, dest)
    proj = dest / "kiln-230-2k.toml"
    sign(proj, stage="commutation", note="natural commutation reviewed, 2 kW element")
    full = tmp_path / "full.review.toml"
    shutil.copy(record_path(proj), full)
    text = full.read_text("utf-8")
    cut = tmp_path / "cut.review.toml"
    cut.write_text(text[: text.index("[[entry]]")], encoding="utf-8")
    d = diff_paths(full, cut)
    assert [e.change for e in d.entries] == ["removed or altered"]
