"""Text from files and notes never reaches the terminal raw: every command's output, fed a
project whose name, revision, stage ids, file name and notes carry ESC/OSC/BEL sequences and
bidi overrides, holds no raw ESC, BEL, C1 CSI or bidi control, and shows them instead; the
Markdown report passes no link, image or HTML from user text."""

from __future__ import annotations

import contextlib
import io
import json
from pathlib import Path

import pytest

from reviewer.cli import main
from reviewer.textsafe import markdown, visible

PROJECTS = Path(__file__).resolve().parents[2] / "projects"
RAW = ("\x1b", "\x07", "\x9b", "\u202e", "\u202d", "\u2066", "\u2067", "\u2068", "\u2069")

TITLE = "\x1b]0;owned\x07"
CLEAR = "\x1b[2J\x1b[H"
LINK = "\x1b]8;;http://evil.example/\x1b\\click\x1b]8;;\x1b\\"
NAME = f"Kiln {TITLE}{CLEAR}\u202eredro{LINK} [x](javascript:alert(1)) ![i](http://e/p.png)"
STAGE = "snub\x1b[31mber\u202e"
NOTE = f"checked {TITLE} on the bench \u202eevil\u202c \x9b2J and [x](javascript:alert(1))"


def toml_str(s: str) -> str:
    """``s`` as a TOML basic string (control characters as \\u escapes)."""
    out = s.replace("\\", "\\\\").replace('"', '\\"')
    return '"' + "".join(c if c.isprintable() else f"\\u{ord(c):04x}" for c in out) + '"'


def hostile_project(folder: Path) -> Path:
    text = (PROJECTS / "kiln-230.toml").read_text(encoding="utf-8")
    for old, new in (('name = "Bench kiln element controller"', f"name = {toml_str(NAME)}"),
                     ('revision = "C"', f"revision = {toml_str('C' + TITLE)}"),
                     ("[stages.snubber]", f"[stages.{toml_str(STAGE)}]"),
                     ('c_voltage = "630 V"', 'c_voltage = "250 V"'),
                     ("[stages.commutation]", f"[stages.{toml_str('com' + CLEAR)}]")):
        assert old in text
        text = text.replace(old, new, 1)
    path = folder / f"kiln{TITLE}\u202e.toml"
    path.write_text(text, encoding="utf-8")
    return path


def run(*argv: str) -> tuple[int, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(list(argv))
    return code, out.getvalue() + err.getvalue()


def clean(text: str) -> bool:
    return not any(r in text for r in RAW)


def test_visible_shows_what_it_replaces():
    assert visible(TITLE) == "\\x1b]0;owned\\x07"
    assert visible("a\u202eb\u2066c\x9bd") == "a⟨U+202E⟩b⟨U+2066⟩c\\x9bd"
    assert visible("tab\there\nline", lines=True) == "tab\\x09here\nline"
    assert clean(visible(NAME)) and clean(visible(NOTE))


def test_markdown_passes_no_link_image_or_html():
    md = markdown("[x](javascript:alert(1)) ![i](http://e/p.png) <img src=x> <javascript:x>")
    assert "[x](" not in md and "![i](" not in md and "<" not in md
    assert md.count("\\[") == 2 and "&lt;img" in md


def test_every_command_output_is_terminal_safe(tmp_path: Path,
                                              monkeypatch: pytest.MonkeyPatch):
    monkeypatch.chdir(tmp_path)
    p = hostile_project(tmp_path)
    other = tmp_path / "other.toml"
    other.write_text(p.read_text(encoding="utf-8").replace('"250 V"', '"300 V"'),
                     encoding="utf-8")
    outputs: dict[str, tuple[int, str]] = {}
    commands = {
        "check": ("check", str(p)),
        "check-json": ("check", str(p), "--json"),
        "check-record": ("check", "--record", str(p)),
        "sign": ("sign", str(p), "--stage", "power", "--note", NOTE),
        "waive": ("waive", str(p), "--stage", STAGE, "--check", "snubber.capacitor",
                  "--note", NOTE),
        "revoke": ("revoke", str(p), "--entry", "1", "--note", NOTE),
        "verify": ("verify", str(p)),
        "verify-json": ("verify", str(p), "--json"),
        "status": ("status", str(tmp_path)),
        "status-json": ("status", str(tmp_path), "--json"),
        "matrix": ("status", "--matrix", str(tmp_path)),
        "matrix-json": ("status", "--matrix", "--json", str(tmp_path)),
        "diff": ("diff", str(p), str(other)),
        "diff-json": ("diff", str(p), str(other), "--json"),
        "report-md": ("report", str(p), "--format", "md"),
        "report-html": ("report", str(p), "--format", "html"),
        "export-snubber": ("export", str(p), "--spice", STAGE),
        "export-missing": ("export", str(p), "--spice", "no" + TITLE),
        "revoke-missing": ("revoke", str(p), "--entry", "99", "--note", NOTE),
    }
    for key, argv in commands.items():
        outputs[key] = run(*argv)
    for key, (code, text) in outputs.items():
        assert code in ((2,) if key.endswith("-missing") else (0, 1)), (key, text)
        assert clean(text), (key, [r for r in RAW if r in text])
        assert "Traceback" not in text
    # the text is there, shown rather than obeyed
    assert "\\x1b]0;owned\\x07" in outputs["check"][1]
    assert "⟨U+202E⟩" in outputs["check"][1]
    assert "\\x1b[31m" in outputs["status"][1] or "\\x1b]0;owned" in outputs["status"][1]
    md = outputs["report-md"][1]
    assert "javascript" in md and "[x](javascript" not in md and "![i](" not in md
    # JSON keeps the exact text (escaped), so scripts still see what the file says
    [project] = json.loads(outputs["check-json"][1])["projects"]
    assert project["name"] == NAME
    assert STAGE in {r["stage"] for r in project["checks"]}


def test_an_error_message_is_terminal_safe(tmp_path: Path):
    p = hostile_project(tmp_path)
    p.write_text(p.read_text(encoding="utf-8").replace(
        'vdrm = "800 V"', f'vdrm = {toml_str("800 V" + TITLE + chr(0x202E))}'), encoding="utf-8")
    code, text = run("check", str(p))
    assert code == 2 and clean(text) and "\\x1b]0;owned" in text and "⟨U+202E⟩" in text
