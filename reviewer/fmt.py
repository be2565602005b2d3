"""Engineering notation for display: SI prefixes, our unit symbols, angles in degrees."""

from __future__ import annotations

import math

_PREFIX = {-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}
_SYMBOL = {"ohm": "Ω", "degC": "°C", "deg": "°", "A^2*s": "A²s", "1": "", "K/W": "K/W",
           "V*s": "V·s", "1/K": "/K"}
# Rates are read per microsecond in this trade; temperatures and angles take no prefix.
_PER_US = {"V/s": "V/µs", "A/s": "A/µs"}
_NO_PREFIX = {"degC", "deg", "K/W", "K", "1", "%", "A^2*s"}

SI_TO_REPORT = {"deg": (180.0 / math.pi, 0.0), "degC": (1.0, -273.15)}


def to_report(x: float, unit: str) -> float:
    """Convert an SI magnitude to the report unit (radians → degrees, kelvin → °C)."""
    scale, offset = SI_TO_REPORT.get(unit, (1.0, 0.0))
    return x * scale + offset


def eng(x: float | None, unit: str = "", digits: int = 3, *, si: bool = True) -> str:
    """Format an SI magnitude in engineering notation with our unit symbols.

    ``si`` means ``x`` is in SI (radians, kelvin) and is converted to the report unit first.

    >>> eng(4700.0, "ohm")
    '4.7 kΩ'
    >>> eng(1.0471975511965976, "deg")
    '60°'
    >>> eng(2.5e7, "V/s")
    '25 V/µs'
    >>> eng(318.15, "degC")
    '45 °C'
    """
    if x is None or (isinstance(x, float) and math.isnan(x)):
        return "—"
    if si:
        x = to_report(x, unit)
    if unit in _PER_US:
        return f"{_num(x * 1e-6, digits)} {_PER_US[unit]}"
    sym = _SYMBOL.get(unit, unit)
    if unit == "deg":
        return f"{_num(x, digits)}°"
    if unit in _NO_PREFIX or x == 0 or math.isinf(x):
        return f"{_num(x, digits)} {sym}".rstrip()
    exp = int(math.floor(math.log10(abs(x)) / 3) * 3)
    exp = max(-15, min(12, exp))
    mant = x / 10**exp
    if abs(float(_num(mant, digits).replace("−", "-"))) >= 1000 and exp < 12:
        exp += 3
        mant /= 1000
    return f"{_num(mant, digits)} {_PREFIX[exp]}{sym}".rstrip()


def _num(x: float, digits: int) -> str:
    if x == 0:
        return "0"
    if math.isinf(x):
        return "∞" if x > 0 else "−∞"
    mag = int(math.floor(math.log10(abs(x))))
    decimals = max(0, digits - 1 - mag)
    text = f"{x:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text.replace("-", "−")


def span(lo: float, hi: float, unit: str) -> str:
    """A range for summaries: ``10–110 kΩ`` style (both ends formatted)."""
    a, b = eng(lo, unit), eng(hi, unit)
    return a if a == b else f"{a} – {b}"


def pct(x: float) -> str:
    """A fraction as a signed percentage."""
    return f"{x * 100:+.1f} %".replace("-", "−")


# The unit each dimension is shown in (SI base, before prefixes).
DIM_UNIT = {
    "resistance": "ohm", "capacitance": "F", "inductance": "H", "voltage": "V", "current": "A",
    "time": "s", "frequency": "Hz", "angle": "deg", "temperature": "degC",
    "temperature_difference": "K", "thermal_resistance": "K/W", "power": "W", "energy": "J",
    "i2t": "A^2*s", "voltage_rate": "V/s", "current_rate": "A/s", "volt_seconds": "V*s",
    "dimensionless": "1", "tempco": "1/K",
}


def show(x: float, dim: str) -> str:
    """Format an SI magnitude of dimension ``dim``."""
    return eng(x, DIM_UNIT.get(dim, ""))
