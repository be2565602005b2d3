"""Loading and validating project files: every error names file, table, key (and line)."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from reviewer.errors import ProjectError
from reviewer.project import load_project, load_project_text

DEMO = Path(__file__).resolve().parents[2] / "projects" / "kiln-230.toml"


def write(tmp_path: Path, text: str, name: str = "p.toml") -> Path:
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def demo_text() -> str:
    return DEMO.read_text(encoding="utf-8")


def test_demo_projects_load():
    """Every demo project loads and validates; values are in SI."""
    for f in sorted(DEMO.parent.glob("*.toml")):
        p = load_project(f)
        assert p.stages, f
    p = load_project(DEMO)
    assert p.supply["voltage"].hi == pytest.approx(253.0)
    assert p.stages["trigger"].params["timing_r"].lo == pytest.approx(5.6e3)
    assert p.parts["Q1"].cold["igt"].nom == pytest.approx(35e-3)


def test_unknown_key_suggests_the_nearest(tmp_path):
    """A misspelt key names the table, the key, the line and the nearest known key."""
    text = demo_text().replace('timing_c = "100 nF', 'timming_c = "100 nF')
    with pytest.raises(ProjectError) as info:
        load_project(write(tmp_path, text))
    msg = str(info.value)
    assert "unknown key `timming_c`" in msg and "[stages.trigger]" in msg
    assert "did you mean `timing_c`" in msg
    line = next(n for n, t in enumerate(text.splitlines(), 1) if t.startswith("timming_c"))
    assert f"p.toml:{line}" in msg


def test_unknown_table_suggests_the_nearest(tmp_path):
    """A misspelt top-level table is named with a suggestion."""
    text = demo_text().replace("[supply]", "[suply]")
    with pytest.raises(ProjectError, match=r"unknown table `suply`.*did you mean `supply`"):
        load_project(write(tmp_path, text))


def test_link_to_missing_part(tmp_path):
    """A stage naming a part that does not exist is an error naming the key."""
    text = demo_text().replace('ujt = "U1"', 'ujt = "U7"')
    with pytest.raises(ProjectError, match=r'\[stages.trigger\] key `ujt`: `ujt` names part "U7"'):
        load_project(write(tmp_path, text))


def test_link_to_part_of_wrong_type(tmp_path):
    """A UJT oscillator pointed at an SCR says which type it needs."""
    text = demo_text().replace('ujt = "U1"', 'ujt = "Q1"')
    with pytest.raises(ProjectError, match=r'needs a ujt part, but "Q1" is a scr'):
        load_project(write(tmp_path, text))


def test_link_to_missing_stage(tmp_path):
    """A link to a stage id that does not exist names the key and suggests one."""
    text = demo_text().replace('across = "power"', 'across = "powr"')
    with pytest.raises(ProjectError, match=r'`across` names stage "powr".*did you mean `power`'):
        load_project(write(tmp_path, text))


def test_link_to_stage_of_wrong_kind(tmp_path):
    """A snubber across an oscillator is rejected with the kinds it accepts."""
    text = demo_text().replace('across = "power"', 'across = "trigger"')
    with pytest.raises(ProjectError, match=r"must name a stage of kind phase-control or dc-switch"):
        load_project(write(tmp_path, text))


def test_missing_required_key(tmp_path):
    """A required key left out is named with its table."""
    text = demo_text().replace('revision = "C"\n', "")
    with pytest.raises(ProjectError, match=r"\[project\] needs `revision`"):
        load_project(write(tmp_path, text))


def test_bad_value_reports_line(tmp_path):
    """A value of the wrong dimension carries the file and line."""
    text = demo_text().replace('base1_r = "47 ohm"', 'base1_r = "47 V"')
    with pytest.raises(ProjectError) as info:
        load_project(write(tmp_path, text))
    line = next(n for n, t in enumerate(text.splitlines(), 1) if t.startswith("base1_r"))
    assert f"p.toml:{line}" in str(info.value) and "needs a resistance" in str(info.value)


def test_bad_choice_lists_the_choices(tmp_path):
    """An unknown topology lists the accepted ones."""
    text = demo_text().replace('topology = "ac-switch"', 'topology = "ac_switch"')
    with pytest.raises(ProjectError, match=r'"ac_switch" is not one of: "half-wave", "bridge", '
                                           r'"ac-switch"; did you mean `ac-switch`'):
        load_project(write(tmp_path, text))


def test_not_utf8(tmp_path):
    """Bytes that are not UTF-8 give the line and what to do."""
    p = tmp_path / "p.toml"
    p.write_bytes(demo_text().encode("utf-8").replace(b"Bench", b"B\xe9nch"))
    with pytest.raises(ProjectError, match=r"p.toml:\d+: not UTF-8 .*save the file as UTF-8"):
        load_project(p)


def test_not_toml(tmp_path):
    """A syntax error gives the line."""
    with pytest.raises(ProjectError, match=r"p.toml:2: not valid TOML"):
        load_project(write(tmp_path, '[project]\nname = "x\n'))


def test_empty_file(tmp_path):
    """An empty file says what a project needs."""
    with pytest.raises(ProjectError, match="the file is empty"):
        load_project(write(tmp_path, "  \n"))


def test_huge_file(tmp_path):
    """A file larger than any project is refused before parsing."""
    with pytest.raises(ProjectError, match="a project is at most 1024 KiB"):
        load_project(write(tmp_path, "# x\n" * 300_000))


def test_missing_file(tmp_path):
    """A path that does not exist is a clear error."""
    with pytest.raises(ProjectError, match="no such file"):
        load_project(tmp_path / "nope.toml")


def test_nan_is_rejected(tmp_path):
    """TOML allows nan; the format does not."""
    text = re.sub(r"turns_ratio = \S+", "turns_ratio = nan", demo_text())
    with pytest.raises(ProjectError, match=r"key `turns_ratio`.*NaN and infinity"):
        load_project(write(tmp_path, text))


def test_variant_inherits_and_overrides():
    """A variant takes the base's values and replaces the ones it names."""
    base = load_project(DEMO)
    var = load_project(DEMO.parent / "kiln-120.toml")
    assert var.variant_of == "kiln-230.toml"
    assert var.supply["voltage"].nom == pytest.approx(120.0)
    assert var.supply["frequency"].nom == pytest.approx(60.0)
    assert var.stages["trigger"].params["timing_c"] == base.stages["trigger"].params["timing_c"]
    assert var.stages["trigger"].params["zener"].nom == pytest.approx(15.0)
    assert var.origin["supply.voltage"].endswith("kiln-120.toml")
    assert var.origin["parts.Q1.vdrm"].endswith("kiln-230.toml")


def test_variant_of_variant(tmp_path):
    """Variants resolve to any depth."""
    base = write(tmp_path, demo_text(), "base.toml")
    write(tmp_path, '[project]\nname = "a"\nrevision = "1"\nvariant_of = "base.toml"\n'
          '[supply]\nvoltage = "240 V ±6%"\n', "a.toml")
    b = write(tmp_path, '[project]\nname = "b"\nrevision = "1"\nvariant_of = "a.toml"\n'
              '[stages.snubber]\nc = "220 nF"\n', "b.toml")
    p = load_project(b)
    assert p.supply["voltage"].nom == pytest.approx(240.0)
    assert p.stages["snubber"].params["c"].nom == pytest.approx(220e-9)
    assert p.chain[-1] == str(base)


def test_variant_cycle(tmp_path):
    """Two files naming each other as base is a clear error."""
    write(tmp_path, '[project]\nname = "a"\nrevision = "1"\nvariant_of = "b.toml"\n', "a.toml")
    write(tmp_path, '[project]\nname = "b"\nrevision = "1"\nvariant_of = "a.toml"\n', "b.toml")
    with pytest.raises(ProjectError, match=r"variant_of makes a circle: a.toml → b.toml → a.toml"):
        load_project(tmp_path / "a.toml")


def test_variant_missing_base(tmp_path):
    """A base that does not exist is named with where it was looked for."""
    p = write(tmp_path, '[project]\nname = "a"\nrevision = "1"\nvariant_of = "gone.toml"\n')
    with pytest.raises(ProjectError, match=r'the base project "gone.toml" does not exist'):
        load_project(p)


def test_line_sync_needs_zener(tmp_path):
    """sync = "line" without a clamp voltage says what to add."""
    text = demo_text().replace('zener = "20 V ±5%"\n', "")
    with pytest.raises(ProjectError, match=r'sync = "line" needs zener'):
        load_project(write(tmp_path, text))


def test_load_project_text_validates_unsaved_edits(tmp_path):
    """Edited text validates as if it were the file, without touching the disk."""
    p = write(tmp_path, demo_text())
    edited = demo_text().replace('timing_c = "100 nF ±10%"', 'timing_c = "220 nF ±10%"')
    proj = load_project_text(edited, p)
    assert proj.stages["trigger"].params["timing_c"].nom == pytest.approx(220e-9)
    assert p.read_text(encoding="utf-8") == demo_text()
    with pytest.raises(ProjectError, match="needs a capacitance"):
        load_project_text(edited.replace('"220 nF ±10%"', '"220 V"'), p)
