"""The corner table: row 0 the nominal, then every combination of the varying inputs' points
in the order ``itertools.product`` gives (the first input varies slowest)."""

from __future__ import annotations

import itertools

from reviewer.engine import build_corners
from reviewer.model import Value
from reviewer.registry import Input


def test_every_combination_once_in_product_order():
    inputs = {
        "r": Input("stages.s.r", Value(100.0, 90.0, 110.0, "resistance")),
        "v": Input("supply.voltage", Value(230.0, 230.0, 230.0, "voltage")),
        "c": Input("stages.s.c", Value(1e-6, 0.8e-6, 1.2e-6, "capacitance"), sweep=3),
        "t": Input("conditions.ambient", Value(25.0, -10.0, 60.0, "temperature")),
    }
    arrays, varying, note = build_corners(inputs)
    assert note == "" and varying == ["r", "c", "t"]
    points = [[90.0, 110.0], [230.0], [0.8e-6, 1e-6, 1.2e-6], [-10.0, 60.0]]
    rows = [(100.0, 230.0, 1e-6, 25.0), *itertools.product(*points)]
    got = list(zip(*(arrays[k].tolist() for k in ("r", "v", "c", "t")), strict=True))
    assert got == rows
