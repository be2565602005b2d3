"""What an installed wheel holds: the whole demo tree (product-line folder too), the results
schema, the ``python -m latchbook`` entry, the licence, and the declared dependencies."""

from __future__ import annotations

import shutil
import subprocess
import sys
import zipfile
from email.parser import Parser
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="module")
def wheel(tmp_path_factory) -> zipfile.ZipFile:
    out = tmp_path_factory.mktemp("wheel")
    src = out / "src"  # build from a copy: setuptools writes build/ and egg-info in the tree
    shutil.copytree(ROOT, src, symlinks=True, ignore=shutil.ignore_patterns(
        ".venv", ".git", "build", "dist", "*.egg-info", "__pycache__", ".*_cache"))
    res = subprocess.run([sys.executable, "-m", "pip", "wheel", str(src), "--no-deps", "-q",
                          "-w", str(out)], capture_output=True, text=True)
    if res.returncode != 0:
        pytest.fail(f"pip wheel failed:\n{res.stderr[-3000:]}")
    [whl] = out.glob("latchbook-*.whl")
    return zipfile.ZipFile(whl)


def test_wheel_holds_the_whole_demo_tree(wheel):
    """Every demo file of the repository, folders included, is package data in the wheel."""
    names = set(wheel.namelist())
    demo = ROOT / "projects"
    wanted = {f"reviewer/data/projects/{p.relative_to(demo).as_posix()}"
              for p in demo.rglob("*") if p.is_file() and p.suffix in (".toml", ".md")}
    assert any("/kiln-line/" in w for w in wanted)
    assert wanted <= names, sorted(wanted - names)
    assert "reviewer/data/results.schema.json" in names
    assert {"latchbook/__init__.py", "latchbook/__main__.py"} <= names


def test_wheel_metadata(wheel):
    """SPDX licence expression, the licence file, rich among the dependencies."""
    meta_name = next(n for n in wheel.namelist() if n.endswith(".dist-info/METADATA"))
    meta = Parser().parsestr(wheel.read(meta_name).decode())
    assert meta["License-Expression"] == "MIT"
    assert any(n.endswith("LICENSE") and ".dist-info/" in n for n in wheel.namelist())
    requires = meta.get_all("Requires-Dist") or []
    assert any(r.startswith("rich") for r in requires)
    assert any("distributed" in r and 'extra == "cluster"' in r for r in requires)


def test_python_m_latchbook():
    """`python -m latchbook` is the command line."""
    res = subprocess.run([sys.executable, "-m", "latchbook", "--version"], capture_output=True,
                         text=True)
    assert res.returncode == 0 and res.stdout.startswith("latchbook ")


def test_no_arguments_copies_the_product_line_folder(tmp_path):
    """Plain `latchbook` copies the demo tree with its product-line folder, so the README's
    line tour works from the copy."""
    res = subprocess.run([sys.executable, "-m", "latchbook"], capture_output=True, text=True,
                         cwd=tmp_path)
    assert res.returncode == 0, res.stderr
    demo = tmp_path / "latchbook-demo"
    line = demo / "kiln-line"
    assert (line / "kiln-base.toml").is_file() and (line / "kiln-line.checklist.toml").is_file()
    assert (line / "kiln-base.review.toml").is_file() and (line / "README.md").is_file()
    res = subprocess.run([sys.executable, "-m", "latchbook", "status", "--matrix", str(line)],
                         capture_output=True, text=True)
    assert res.returncode == 1 and "kiln-120-2k.toml" in res.stdout  # the failing variant
