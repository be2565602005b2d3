"""Shell completion scripts: generated from the parser, parsed by the shells, and (bash)
actually completing subcommands, options and choices."""

from __future__ import annotations

import shutil
import subprocess

import pytest

from reviewer.cli import build_parser, main
from reviewer.completion import SHELLS, script


def _complete_bash(words: list[str]) -> list[str]:
    """COMPREPLY for the command line ``words`` (the last one being completed)."""
    text = script("bash", build_parser())
    line = " ".join(f"'{w}'" for w in words)
    probe = (f"{text}\nCOMP_WORDS=({line}); COMP_CWORD={len(words) - 1}; _latchbook; "
             'printf "%s\\n" "${COMPREPLY[@]}"')
    res = subprocess.run(["bash", "--norc", "--noprofile", "-c", probe], capture_output=True,
                         text=True, check=True)
    return res.stdout.split()


def test_bash_parses_the_script(tmp_path):
    """bash -n accepts the generated script."""
    f = tmp_path / "latchbook.bash"
    f.write_text(script("bash", build_parser()), "utf-8")
    subprocess.run(["bash", "-n", str(f)], check=True)


def test_bash_completes_commands_options_and_choices():
    """Subcommands, a command's options, and an option's choices complete."""
    assert "check" in _complete_bash(["latchbook", "ch"])
    assert set(_complete_bash(["latchbook", "st"])) == {"status"}
    assert {"--junit", "--jobs"} <= set(_complete_bash(["latchbook", "check", "--j"]))
    assert _complete_bash(["latchbook", "check", "x.toml", "--distribution", ""]) == [
        "normal", "uniform"]
    assert _complete_bash(["latchbook", "completion", ""]) == list(SHELLS)


@pytest.mark.parametrize("shell", ["zsh", "fish"])
def test_other_shells_parse_the_script(shell, tmp_path):
    """zsh -n / fish -n accept their scripts (where the shell is installed)."""
    exe = shutil.which(shell)
    if exe is None:
        pytest.skip(f"{shell} is not installed here")
    f = tmp_path / f"latchbook.{shell}"
    f.write_text(script(shell, build_parser()), "utf-8")
    args = [exe, "-n", str(f)] if shell == "zsh" else [exe, "--no-execute", str(f)]
    subprocess.run(args, check=True)


def test_completion_command_prints_the_script(capsys):
    """`latchbook completion fish` prints a script naming every subcommand."""
    assert main(["completion", "fish"]) == 0
    out = capsys.readouterr().out
    for cmd in ("check", "status", "report", "completion"):
        assert f"-a {cmd} " in out
