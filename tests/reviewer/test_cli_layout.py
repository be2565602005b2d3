"""The command line at 80 columns and in pipes: nothing cut, no trailing spaces, every
argument explained, errors in the order a user needs them."""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from reviewer import textout
from reviewer.states import RESULTS, REVIEWS, result_word

ROOT = Path(__file__).resolve().parents[2]
PROJECTS = ROOT / "projects"
DEMOS = [str(PROJECTS / n) for n in ("kiln-230.toml", "kiln-120.toml", "flasher-dc.toml")]


def run(*args: str, columns: int | None = None, cwd: Path | None = None):
    env = {k: v for k, v in os.environ.items() if k != "COLUMNS"}
    if columns is not None:
        env["COLUMNS"] = str(columns)
    return subprocess.run([sys.executable, "-m", "reviewer.cli", *args], capture_output=True,
                          text=True, env=env, cwd=cwd or ROOT)


def _words(text: str) -> set[str]:
    return set(text.split())


@pytest.mark.parametrize("columns", [60, 80, 132])
def test_check_fits_the_width_without_trailing_spaces(columns):
    out = run("check", *DEMOS, columns=columns).stdout
    lines = out.splitlines()
    assert lines and max(len(ln) for ln in lines) <= columns
    assert all(ln == ln.rstrip() for ln in lines)


def test_piped_check_without_columns_uses_the_pipe_width():
    lines = run("check", DEMOS[0]).stdout.splitlines()
    assert max(len(ln) for ln in lines) <= textout.PIPE_WIDTH


def test_summaries_are_never_squeezed_or_cut_at_80_columns():
    """Every word of every summary reaches the output whole (none split across lines)."""
    import json

    doc = json.loads(run("check", DEMOS[1], "--json").stdout)
    checks = doc["projects"][0]["checks"]
    out = run("check", DEMOS[1], columns=80).stdout
    printed = _words(out)
    for r in checks:
        missing = _words(r["summary"]) - printed
        assert not missing, (r["check"], missing)
    # The old layout left a 16-character summary column: hundreds of lines for one demo.
    assert len(out.splitlines()) < 4 * len(checks) + 20


def test_wide_terminal_puts_summaries_beside_the_row():
    out = run("check", DEMOS[2], columns=160).stdout
    row = next(ln for ln in out.splitlines() if " osc.window " in ln)
    assert "timing R" in row


def test_wrap_never_breaks_a_word_or_parts_a_number_from_its_unit():
    text = "needs C_T ≥ 180 nF and power.average-current at 26.4 V against VDRM/1.5"
    for width in range(8, 40):
        lines = textout.wrap(text, width)
        assert " ".join(lines).split() == text.split()
        assert not any(ln.endswith(("180", "26.4", "≥")) for ln in lines)


def test_a_long_word_stands_alone_rather_than_being_cut():
    assert textout.wrap("a parts.Q1.cold.il-and-more b", 6) == ["a", "parts.Q1.cold.il-and-more",
                                                                "b"]


def _line_copy(tmp_path: Path) -> Path:
    dest = tmp_path / "line"
    shutil.copytree(PROJECTS / "kiln-line", dest)
    return dest


@pytest.mark.parametrize("columns", [60, 80])
def test_matrix_keeps_the_project_column_at_narrow_widths(tmp_path, columns):
    dest = _line_copy(tmp_path)
    out = run("status", "--matrix", str(dest), columns=columns).stdout
    lines = out.splitlines()
    assert max(len(ln) for ln in lines) <= columns
    assert all(ln == ln.rstrip() for ln in lines)
    names = sorted(p.name for p in dest.glob("kiln-*.toml") if ".review" not in p.name
                   and ".checklist" not in p.name)
    headers = [ln for ln in lines if ln.startswith("project")]
    assert headers
    stages = ["trigger", "gate", "power", "snubber", "commutation"]
    seen = set()
    for h in headers:  # every block names its rows
        seen |= set(h.split()) & set(stages)
        start = lines.index(h)
        block = lines[start + 2:start + 2 + len(names)]
        assert sorted(b.split()[0] for b in block) == names
    assert seen == set(stages)


def test_matrix_cells_hold_any_state_words_whole():
    """The layout does not depend on the words: every result and review word, and pairs."""
    words = [result_word(r) for r in RESULTS] + list(REVIEWS) + ["fail | waived"]
    cols = [textout.Col("project"), *(textout.Col(f"s{i}") for i in range(len(words)))]
    rows = [["a-rather-long-project-name.toml", *words]]
    lead, body = cols[:1], cols[1:]
    lines = textout.blocks(lead, [r[:1] for r in rows], body, [r[1:] for r in rows], 40)
    text = "\n".join(lines)
    for w in words:
        assert w in text
    # A block is as wide as the room, or the name column plus one word that is wider still.
    widest = len(rows[0][0]) + len(textout.GAP) + max(len(w) for w in words + ["s10"])
    assert max(len(ln) for ln in lines) <= max(40, widest)
    assert sum(1 for ln in lines if ln.startswith("project")) > 1


SUBCOMMANDS = ["check", "open", "sign", "waive", "revoke", "verify", "status", "report", "diff"]


@pytest.mark.parametrize("sub", SUBCOMMANDS)
def test_every_argument_has_help_text(sub):
    from reviewer.cli import build_parser

    parser = build_parser()
    action = next(a for a in parser._actions if a.dest == "command")
    subparser = action.choices[sub]
    for a in subparser._actions:
        if a.dest == "help":
            continue
        assert a.help and len(a.help) > 12, (sub, a.dest)


def test_read_only_promises_no_export():
    out = run("open", "--help").stdout
    block = out[out.index("--read-only"):]
    assert "export" not in block.split("--no-mouse")[0]


def test_revoke_of_a_missing_entry_says_so_before_the_note(tmp_path):
    dest = _line_copy(tmp_path)
    r = run("revoke", str(dest / "kiln-base.toml"), "--entry", "9", "--note", "x")
    assert r.returncode == 2
    assert "there is no entry #9" in r.stderr and "too short" not in r.stderr
    assert "Traceback" not in r.stderr
    r = run("revoke", str(dest / "kiln-base.toml"), "--entry", "1", "--note", "x")
    assert "too short" in r.stderr


def test_no_colour_codes_in_a_pipe():
    out = run("check", DEMOS[0], columns=80).stdout
    assert "\x1b[" not in out
    assert not re.search(r"[┃│]", out)
