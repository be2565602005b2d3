"""The value grammar: what it accepts, what it rejects, and with which message."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from reviewer.errors import ValueGrammarError, Where
from reviewer.units import parse_value

W = Where("demo.toml", "stages.trigger", "timing_r")

# (input, dimension, nominal, low, high) in SI units.
GOOD = [
    ("47 kohm", "resistance", 47e3, 47e3, 47e3),
    ("47 kΩ", "resistance", 47e3, 47e3, 47e3),
    ("4k7", "resistance", 4.7e3, 4.7e3, 4.7e3),            # IEC 60062 RKM: k as alias of K
    ("4K7", "resistance", 4.7e3, 4.7e3, 4.7e3),            # IEC 60062 RKM
    ("2R2", "resistance", 2.2, 2.2, 2.2),                  # IEC 60062 RKM
    ("R47", "resistance", 0.47, 0.47, 0.47),               # IEC 60062 RKM
    ("470R", "resistance", 470.0, 470.0, 470.0),           # IEC 60062 RKM
    ("47K3", "resistance", 47.3e3, 47.3e3, 47.3e3),        # IEC 60062 RKM
    ("4M7", "resistance", 4.7e6, 4.7e6, 4.7e6),            # IEC 60062 RKM
    ("6L8", "resistance", 6.8e-3, 6.8e-3, 6.8e-3),         # IEC 60062 RKM
    ("100n", "capacitance", 100e-9, 100e-9, 100e-9),       # IEC 60062 RKM
    ("4u7", "capacitance", 4.7e-6, 4.7e-6, 4.7e-6),        # IEC 60062 RKM (u for µ)
    ("4µ7", "capacitance", 4.7e-6, 4.7e-6, 4.7e-6),        # IEC 60062 RKM
    ("4p7", "capacitance", 4.7e-12, 4.7e-12, 4.7e-12),     # IEC 60062 RKM
    ("n47", "capacitance", 0.47e-9, 0.47e-9, 0.47e-9),     # IEC 60062 RKM
    ("1µ0", "capacitance", 1e-6, 1e-6, 1e-6),              # IEC 60062 RKM
    ("100 nF", "capacitance", 100e-9, 100e-9, 100e-9),
    ("100 µF", "capacitance", 100e-6, 100e-6, 100e-6),
    ("47 kohm ±5%", "resistance", 47e3, 44.65e3, 49.35e3),
    ("47 kohm +/-5%", "resistance", 47e3, 44.65e3, 49.35e3),
    ("230 V +10% -15%", "voltage", 230.0, 195.5, 253.0),
    ("0.7 V ±0.1 V", "voltage", 0.7, 0.6, 0.8),
    ("50 Hz", "frequency", 50.0, 50.0, 50.0),
    ("1.8 K/W", "thermal_resistance", 1.8, 1.8, 1.8),
    ("60 deg", "angle", math.pi / 3, math.pi / 3, math.pi / 3),
    ("-10 degC", "temperature", 263.15, 263.15, 263.15),
    ("25 °C", "temperature", 298.15, 298.15, 298.15),
    ("-10 °C ±2 K", "temperature", 263.15, 261.15, 265.15),
    ("10 K", "temperature_difference", 10.0, 10.0, 10.0),
    ("10 delta_degC", "temperature_difference", 10.0, 10.0, 10.0),
    ("50 A^2*s", "i2t", 50.0, 50.0, 50.0),
    ("100 V/us", "voltage_rate", 1e8, 1e8, 1e8),
    ("50 A/µs", "current_rate", 5e7, 5e7, 5e7),
    ("200 V*us", "volt_seconds", 200e-6, 200e-6, 200e-6),
    ("0.5 %/K", "tempco", 0.005, 0.005, 0.005),
    ("25 mohm", "resistance", 25e-3, 25e-3, 25e-3),
    (0.65, "dimensionless", 0.65, 0.65, 0.65),
    ({"min": 0.56, "max": 0.75}, "dimensionless", 0.655, 0.56, 0.75),
    ({"min": "10 kohm", "max": "110 kohm"}, "resistance", 60e3, 10e3, 110e3),
    ({"min": "10 kohm", "max": "110 kohm", "nom": "47 kohm"}, "resistance", 47e3, 10e3, 110e3),
    ({"min": "-10 degC", "max": "45 degC"}, "temperature", 290.65, 263.15, 318.15),
    ({"min": "15 deg", "max": "165 deg"}, "angle", math.pi / 2, math.radians(15),
     math.radians(165)),
]


@pytest.mark.parametrize(("raw", "dim", "nom", "lo", "hi"), GOOD, ids=[str(g[0]) for g in GOOD])
def test_good_values_parse_to_si(raw, dim, nom, lo, hi):
    """Each accepted form gives the SI nominal and both ends."""
    v = parse_value(raw, dim, W, allow_negative=dim == "temperature")
    assert (v.nom, v.lo, v.hi) == pytest.approx((nom, lo, hi), rel=1e-12)
    assert v.dim == dim


# (input, dimension, a fragment the message must contain)
BAD = [
    ("10 V", "resistance", "needs a resistance"),
    ("47", "resistance", "has no unit"),
    (47, "resistance", "has no unit"),
    (True, "voltage", "cannot be true"),
    (float("nan"), "dimensionless", "NaN and infinity"),
    (float("inf"), "voltage", "NaN and infinity"),
    ("nan V", "voltage", "cannot read"),
    ("2*3 V", "voltage", "arithmetic is not allowed"),
    ("1+2 V", "voltage", "arithmetic is not allowed"),
    ("47 kohm ±100%", "resistance", "100% or more"),
    ("47 kohm ±150%", "resistance", "100% or more"),
    ({"min": "2 V", "max": "1 V"}, "voltage", "min > max"),
    ({"min": "1 V"}, "voltage", "needs both min and max"),
    ({"mn": "1 V", "max": "2 V"}, "voltage", "did you mean `min`"),
    ({"min": "1 V ±5%", "max": "2 V"}, "voltage", "without a tolerance"),
    ("0 ohm", "resistance", "greater than zero"),
    ("-5 V", "voltage", "cannot be negative"),
    ("47K", "capacitance", "not read as a capacitance"),          # K is a tolerance letter
    ("1R0", "capacitance", "not read as a capacitance"),          # R as pF decimal point
    ("4R7", "inductance", "explicit unit"),
    ("104", "capacitance", "three-digit marking codes"),
    ("10 degC", "temperature_difference", "a rise or difference is K"),
    ("10 furlong", "voltage", "not a unit for this key"),
    ("", "voltage", "empty value"),
    ("-300 degC", "temperature", "below absolute zero"),
    ("20 degC ±5%", "temperature", "percentage tolerance"),
    ("5 V", "dimensionless", "plain number"),
    ([1, 2], "voltage", "must be a value"),
    ("47 kohm ±-5%", "resistance", "positive percentage"),
]


@pytest.mark.parametrize(("raw", "dim", "fragment"), BAD, ids=[str(b[0]) for b in BAD])
def test_bad_values_name_the_key_and_say_what_to_type(raw, dim, fragment):
    """Each rejected input raises our error, names the key and the file, and explains."""
    with pytest.raises(ValueGrammarError) as info:
        parse_value(raw, dim, W)
    msg = str(info.value)
    assert fragment in msg
    assert "demo.toml" in msg and "timing_r" in msg


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=30), st.sampled_from(["resistance", "capacitance", "voltage",
                                              "temperature", "dimensionless", "angle"]))
def test_random_strings_raise_only_our_error(text, dim):
    """No string makes the parser raise anything but ValueGrammarError."""
    try:
        v = parse_value(text, dim, W)
    except ValueGrammarError:
        return
    assert math.isfinite(v.nom) and v.lo <= v.nom <= v.hi


@settings(max_examples=200, deadline=None)
@given(st.floats(min_value=1e-3, max_value=1e6), st.floats(min_value=0.1, max_value=50))
def test_symmetric_tolerance_brackets_the_nominal(x, tol):
    """±tol% gives lo = x(1 − tol) and hi = x(1 + tol)."""
    v = parse_value(f"{x!r} ohm ±{tol!r}%", "resistance", W)
    assert v.lo == pytest.approx(x * (1 - tol / 100), rel=1e-9)
    assert v.hi == pytest.approx(x * (1 + tol / 100), rel=1e-9)
