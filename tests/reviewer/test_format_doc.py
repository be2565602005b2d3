"""The project-format reference is generated from the schema and kept in step with it; every
value key has a physical domain and a plausible band inside it."""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping
from pathlib import Path

import pytest

import reviewer.stages  # noqa: F401
from reviewer import bounds, schema
from reviewer.formatdoc import render
from reviewer.registry import STAGE_KINDS, Param

DOC = Path(__file__).resolve().parents[2] / "docs" / "project-format.md"
DIMS_OF = {"step": ("voltage",), "target": ("frequency", "angle"),
           "required": ("power", "voltage")}


def every_key() -> Iterator[tuple[str, str, Param]]:
    """(scope, key, param) of every key the loader accepts."""
    def walk(scope: str, params: Mapping[str, Param]) -> Iterator[tuple[str, str, Param]]:
        for key, p in params.items():
            yield scope, key, p
            if p.fields:
                yield from walk(f"{scope}.{key}", p.fields)
    yield from walk("conditions", schema.CONDITIONS)
    yield from walk("supply", schema.SUPPLY)
    for ptype, params in schema.PART_TYPES.items():
        yield from walk(f"parts.{ptype}", params)
    for ptype, keys in schema.COLD_TABLES.items():
        yield from walk(f"parts.{ptype}.cold", keys)
    for name, kind in STAGE_KINDS.items():
        yield from walk(f"stages.{name}", kind.params)


def test_the_reference_is_the_generated_one():
    assert DOC.read_text(encoding="utf-8") == render(), (
        "docs/project-format.md is out of step: python -m reviewer.formatdoc > "
        "docs/project-format.md")


def test_every_key_of_the_schema_is_in_the_reference():
    text = DOC.read_text(encoding="utf-8")
    for _, key, _ in every_key():
        assert f"| `{key}` |" in text, key


@pytest.mark.parametrize("scope,key,p", [k for k in every_key()
                                          if k[2].kind in ("value", *DIMS_OF)],
                         ids=lambda x: x if isinstance(x, str) else "")
def test_band_lies_inside_the_domain(scope: str, key: str, p: Param):
    for dim in (p.dim,) if p.kind == "value" else DIMS_OF[p.kind]:
        b = bounds.bounds_for(scope, key, dim)
        d = b.domain
        lo, hi = b.band
        assert d.lo < d.hi and lo <= hi
        assert math.isfinite(d.hi) and math.isfinite(d.lo)
        assert d.lo <= lo and hi <= d.hi, (scope, key, dim)


def test_every_specific_bound_names_a_real_key():
    known = {(s, k) for s, k, _ in every_key()}
    for name in bounds.KEY:
        path = name.split("#")[0]
        scope, _, key = path.rpartition(".")
        if scope.startswith("stages.*"):
            sub = scope[len("stages.*"):]
            assert any(s.startswith("stages.") and s.count(".") == 1 + sub.count(".")
                       and s.endswith(sub) and k == key for s, k in known), name
        else:
            assert (scope, key) in known, name


def test_definitions_set_the_domains():
    """Ratios and angles by definition: η < 1 (a divider ratio), duty ≤ 1, a firing angle and a
    line-synchronised target within the half-cycle (≤ 180°), a cold table below 25 °C."""
    eta = bounds.bounds_for("parts.ujt", "eta", "dimensionless").domain
    assert not eta.inside(1.0) and not eta.inside(0.0) and eta.inside(0.999)
    duty = bounds.bounds_for("stages.dc-switch", "duty", "dimensionless").domain
    assert duty.inside(1.0) and not duty.inside(1.0001) and not duty.inside(0.0)
    for scope, key in (("stages.phase-control", "firing"), ("stages.ujt-oscillator", "target"),
                       ("stages.put-oscillator", "target")):
        d = bounds.bounds_for(scope, key, "angle").domain
        assert d.inside(math.pi) and not d.inside(math.radians(180.01))
    cold = bounds.bounds_for("parts.scr.cold", "at", "temperature").domain
    assert cold.inside(273.15 + 24.9) and not cold.inside(273.15 + 25)
