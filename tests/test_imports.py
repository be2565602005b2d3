"""Layering: the pure computation package loads without the UI, units or file libraries."""

from __future__ import annotations

import pkgutil
import subprocess
import sys
from pathlib import Path

import checks

ROOT = Path(__file__).resolve().parents[1]


def test_checks_import_without_ui_or_units_libraries():
    """Importing every checks module pulls in none of textual, pint, tomlkit or scipy."""
    mods = [f"checks.{m.name}" for m in pkgutil.iter_modules(checks.__path__)]
    assert "checks.core" in mods
    code = (
        "import sys\n"
        + "".join(f"import {m}\n" for m in mods)
        + "bad = [m for m in ('textual', 'pint', 'tomlkit', 'scipy', 'rich') if m in sys.modules]\n"
        + "print(','.join(bad))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT,
                         check=True)
    assert out.stdout.strip() == ""
