"""The table of common units agrees with pint, and loading a demo does not need pint."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from reviewer import unitgen, units
from reviewer.unitdata import UNITS
from reviewer.units import DIMS

ROOT = Path(__file__).resolve().parents[2]


def test_table_is_what_pint_derives_today():
    # Exact equality: the table's floats must be pint's own, or inputs hashes would move.
    assert unitgen.derive() == UNITS


@pytest.mark.parametrize("unit", ["kohm", "nF", "uH", "mA", "V/us", "A^2*s", "degC", "K/W",
                                  "%/K", "V*us", "delta_degC", "ms", "kV"])
def test_each_dimension_matches_pint(unit):
    for dim, (si, _, _) in DIMS.items():
        assert units._unit_factor(unit, dim) == unitgen.pint_factor(unit, dim, si), (unit, dim)


def test_a_unit_outside_the_table_still_goes_to_pint():
    assert "kiloohm" not in UNITS
    units._unit_factor.cache_clear()
    assert units._unit_factor("kiloohm", "resistance") == (1000.0, 0.0)
    assert units._unit_factor("kiloohm", "voltage") is None


def test_degc_is_absolute_only():
    assert units._unit_factor("degC", "temperature") == (1.0, 273.15)
    assert units._unit_factor("degC", "temperature_difference") is None


def test_loading_and_checking_a_demo_imports_no_heavy_library():
    code = ("import sys; from reviewer.cli import main; main(['check', 'projects/kiln-230.toml',"
            " 'projects/flasher-dc.toml']);"
            " heavy = {'pint', 'scipy', 'textual', 'matplotlib', 'rich', 'tomlkit'};"
            " print(sorted(m for m in sys.modules if m.split('.')[0] in heavy), file=sys.stderr)")
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True)
    assert out.stderr.strip().splitlines()[-1] == "[]"
