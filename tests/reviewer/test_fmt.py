"""Numbers people can read: limits rounded toward the safe side, margins in a readable form,
no runaway strings of zeros. The displayed text is read back with the project's own value
grammar (reviewer.units) and compared with the number it came from."""

from __future__ import annotations

import math
import re

from hypothesis import given, settings
from hypothesis import strategies as st

from reviewer.errors import Where
from reviewer.fmt import at_least, at_most, eng, margin, pct, share
from reviewer.units import parse_value

UNITS = {"ohm": "resistance", "F": "capacitance", "H": "inductance", "V": "voltage",
         "A": "current", "s": "time", "Hz": "frequency", "W": "power", "K/W":
         "thermal_resistance", "V/s": "voltage_rate", "A/s": "current_rate"}


_PLAIN_DIGITS = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁻", "0123456789-")


def read(text: str, dim: str) -> float:
    """The displayed text read back by the value grammar (×10ⁿ written as eN)."""
    return parse_value(text.replace("×10", "e").translate(_PLAIN_DIGITS), dim,
                       Where(key="shown")).nom


@settings(max_examples=400, derandomize=True, deadline=None)
@given(x=st.floats(1e-12, 1e12), unit=st.sampled_from(sorted(UNITS)))
def test_limits_round_toward_the_safe_side(x, unit):
    dim = UNITS[unit]
    lo, hi = read(at_most(x, unit), dim), read(at_least(x, unit), dim)
    assert lo <= x * (1 + 1e-12) and hi >= x * (1 - 1e-12)
    # Three significant digits: never further than 1 % from the limit.
    assert (x - lo) <= 0.01 * x * (1 + 1e-9) and (hi - x) <= 0.01 * x * (1 + 1e-9)


@settings(max_examples=300, derandomize=True, deadline=None)
@given(deg=st.floats(0.05, 359.0))
def test_angle_limits_keep_a_tenth_of_a_degree_on_the_safe_side(deg):
    x = math.radians(deg)
    lo = float(at_most(x, "deg").rstrip("°"))
    hi = float(at_least(x, "deg").rstrip("°"))
    assert lo <= deg + 1e-9 and deg - lo < 0.1 + 1e-9
    assert hi >= deg - 1e-9 and hi - deg < 0.1 + 1e-9


def test_a_limit_just_under_180_degrees_is_not_shown_as_180():
    x = math.radians(179.76)
    assert at_most(x, "deg") == "179.7°"
    assert eng(x, "deg", 4) == "179.8°"  # the nearest rounding promised more than allowed


@settings(max_examples=300, derandomize=True, deadline=None)
@given(x=st.floats(-1e-300, 1e300).filter(lambda v: v != 0), unit=st.sampled_from(
    ["W", "A", "V", "F", "ohm", "1", "degC", "K/W"]))
def test_no_runaway_digits(x, unit):
    text = eng(abs(x), unit, si=unit != "degC")
    digits = re.sub(r"[^0-9]", "", text.split("×")[0])
    assert len(digits) <= 7, text


def test_vanishing_power_reads_as_about_zero():
    assert eng(2.59e-33, "W") == "≈ 0 W"
    assert eng(2.59e-15, "W") == "2.59 fW"
    assert eng(3e20, "V") == "300×10¹⁸ V"


@settings(max_examples=400, derandomize=True, deadline=None)
@given(m=st.floats(-0.999, 1e7))
def test_margin_text_never_flatters(m):
    text = margin(m)
    if text.endswith("%"):
        shown = float(text.replace("−", "-").rstrip(" %")) / 100
        assert shown <= m + 1e-12 and abs(m) < 9.0 + 1e-9
    elif text == "needs > 100×":
        assert 1 + m <= 0.01
    elif text.startswith("needs"):
        need = float(text.split()[-1].rstrip("×"))
        assert need * (1 + m) >= 1 - 1e-9  # the factor shown is at least what it takes
        assert m <= -0.5
    elif text == "> 100×":
        assert 1 + m >= 100
    else:
        assert 10 <= int(text.rstrip("×")) <= 1 + m


def test_margin_forms_from_the_reported_cases():
    assert margin(9026.89) == "> 100×"          # was "+902689 %"
    assert margin(-0.96) == "needs 25×"  # was "marginal −96 %" on an advisory check
    assert margin(0.0) == "+0.0 %" and margin(None) == ""
    assert pct(32.907) == "+3291 %" and pct(float("nan")) == "—"


def test_share_of_no_failing_sample_is_the_interval_top():
    # 0 of 100 000: the 95 % Wilson top is 3.84e-5 (z²/(n+z²)), shown rounded up.
    assert share(0.0, (0.0, 3.84e-5)) == "< 0.004 %"   # was "<0.0038" under "fail %"
    assert share(0.0123) == "1.2 %"
    assert share(1.0, (0.99996, 1.0)) == "> 99.99 %"
