"""Line numbers of keys (inline tables included) come from one pass over the file."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

import reviewer.project as project
from reviewer.errors import ProjectError
from reviewer.project import line_of, load_project

DEMO = Path(__file__).resolve().parents[2] / "projects" / "kiln-230.toml"


def _many_stages(n: int) -> str:
    """The demo with its stage chain repeated: about ``n`` stages, each with inline tables."""
    text = DEMO.read_text(encoding="utf-8")
    head, _, stages = text.partition("[stages.trigger]")
    stages = "[stages.trigger]" + stages
    ids = re.findall(r"^\[stages\.([a-z]+)\]", stages, re.MULTILINE)
    out = [head]
    for i in range(max(1, n // len(ids))):
        block = stages
        for sid in ids:
            block = re.sub(rf"(\[stages\.){sid}\]", rf"\g<1>{sid}{i}]", block)
            block = re.sub(rf'= "{sid}"', f'= "{sid}{i}"', block)
        out.append(block)
    return "\n".join(out)


def test_inline_table_keys_have_their_lines():
    text = 'x = 1\n[stages.power]\nkind = "phase-control"\nload = { r = "26 ohm" }\n' \
           '[stages]\ntrigger = { kind = "x", timing_r = "1k" }\n'
    assert line_of(text, "stages.power", "kind") == 3
    assert line_of(text, "stages.power.load", "r") == 4
    assert line_of(text, "stages.trigger", "timing_r") == 6
    assert line_of(text, "stages.power.load", "nothing") is None
    assert line_of(text, "stages.power") == 2


def test_a_bad_inline_value_names_its_line(tmp_path):
    text = DEMO.read_text(encoding="utf-8")
    m = re.search(r'^(load = \{ r = ")([^"]+)(")', text, re.MULTILINE)
    assert m is not None
    bad = text[:m.start(2)] + "26 volt" + text[m.end(2):]
    line = bad[:m.start()].count("\n") + 1
    (tmp_path / "p.toml").write_text(bad, encoding="utf-8")
    with pytest.raises(ProjectError) as info:
        load_project(tmp_path / "p.toml")
    assert f"p.toml:{line}" in str(info.value)


def test_loading_reads_each_line_a_bounded_number_of_times(tmp_path, monkeypatch):
    """200 stages: the key-line patterns run about once per line, not once per line per key."""
    text = _many_stages(200)
    path = tmp_path / "big.toml"
    path.write_text(text, encoding="utf-8")
    seen = {"n": 0}

    class Counting:
        def __init__(self, pattern: re.Pattern[str]) -> None:
            self.pattern = pattern

        def match(self, line: str) -> re.Match[str] | None:
            seen["n"] += 1
            return self.pattern.match(line)

    monkeypatch.setattr(project, "_HEADER", Counting(project._HEADER))
    monkeypatch.setattr(project, "_KEYLINE", Counting(project._KEYLINE))
    monkeypatch.setattr(project.re, "match", _refuse)
    project._line_index.cache_clear()
    p = load_project(path)
    assert len(p.stages) >= 200
    assert seen["n"] <= 2 * text.count("\n") + 2


def _refuse(*args, **kwargs):
    raise AssertionError("a per-lookup rescan of the file (re.match per line)")
