"""The README's set-up commands are the ones CI runs."""

from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_ci_runs_the_readme_test_command():
    """.ci/run's last line is, to the letter, the README's test command."""
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8").strip().splitlines()[-1]
    assert ci in (ROOT / "README.md").read_text(encoding="utf-8")
    assert "pytest" in ci


def test_readme_carries_the_safety_cautions():
    """The README says the circuits are dangerous and claims no compliance."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    assert "## Safety" in text and "does not" in text and "compliant with any standard" in text


def test_readme_tours_every_demo_project():
    """Every demo project is named in the README's tour, the burst demo in a command too."""
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    tour = text[text.index("## A short tour"):]
    for f in sorted((ROOT / "projects").glob("*.toml")):
        assert f"`projects/{f.name}`" in tour, f.name
    assert "latchbook check projects/heater-burst.toml" in tour
    assert "flicker" in tour[tour.index("projects/heater-burst.toml` —"):]
