"""Engineering notation for display: SI prefixes, our unit symbols, angles in degrees."""

from __future__ import annotations

import math

_PREFIX = {-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}
_SYMBOL = {"ohm": "Ω", "degC": "°C", "deg": "°", "A^2*s": "A²s", "1": "", "K/W": "K/W",
           "V*s": "V·s", "1/K": "/K"}
# Rates are read per microsecond in this trade, slow ones (a triac's commutating di/dt) per
# millisecond; temperatures and angles take no prefix.
_PER_US = {"V/s": "V/µs", "A/s": "A/µs"}
_PER_MS = {"V/s": "V/ms", "A/s": "A/ms"}
_NO_PREFIX = {"degC", "deg", "K/W", "K", "1", "%", "A^2*s"}

SI_TO_REPORT = {"deg": (180.0 / math.pi, 0.0), "degC": (1.0, -273.15)}


def to_report(x: float, unit: str) -> float:
    """Convert an SI magnitude to the report unit (radians → degrees, kelvin → °C)."""
    scale, offset = SI_TO_REPORT.get(unit, (1.0, 0.0))
    return x * scale + offset


#: Below a femto-unit a value reads "≈ 0": 2.59e-33 W is zero for anyone reading a summary,
#: and no prefix can show it. From HUGE up, and for a unit that takes no prefix outside
#: SMALL_PLAIN … HUGE_PLAIN, a value is written as a mantissa times a power of ten.
TINY_PREFIXED = 1e-15
HUGE_PREFIXED = 1e15
SMALL_PLAIN = 1e-3
HUGE_PLAIN = 1e6


def eng(x: float | None, unit: str = "", digits: int = 3, *, si: bool = True,
        rounding: str = "near") -> str:
    """Format an SI magnitude in engineering notation with our unit symbols.

    ``si`` means ``x`` is in SI (radians, kelvin) and is converted to the report unit first.
    ``rounding`` is "near", or "down"/"up" for a limit a fix must stay under/above, so that
    the number shown never promises more than the computed limit allows (angles then keep a
    tenth of a degree). Values too small for any prefix read ``≈ 0``; very large ones are
    written ``1.5×10¹⁸``.

    >>> eng(4700.0, "ohm")
    '4.7 kΩ'
    >>> eng(1.0471975511965976, "deg")
    '60°'
    >>> eng(2.5e7, "V/s")
    '25 V/µs'
    >>> eng(321.0, "A/s")
    '0.321 A/ms'
    >>> eng(318.15, "degC")
    '45 °C'
    >>> eng(2.59e-33, "W")
    '≈ 0 W'
    >>> eng(3.1373687, "deg", rounding="down")
    '179.7°'
    >>> eng(179.2e-9, "F", rounding="up")
    '180 nF'
    """
    if x is None or (isinstance(x, float) and math.isnan(x)):
        return "—"
    if si:
        x = to_report(x, unit)
    if unit == "deg" and rounding != "near":
        return f"{_num(x, digits, rounding, decimals=1)}°"
    if unit in _PER_US:
        if x != 0 and math.isfinite(x) and abs(x) < 1e4:
            return f"{_num(x * 1e-3, digits, rounding)} {_PER_MS[unit]}"
        return f"{_num(x * 1e-6, digits, rounding)} {_PER_US[unit]}"
    sym = _SYMBOL.get(unit, unit)
    if unit == "deg":
        return f"{_num(x, digits)}°"
    plain = unit in _NO_PREFIX
    finite = x != 0 and math.isfinite(x)
    if finite and not plain and abs(x) < TINY_PREFIXED and rounding == "near":
        return f"≈ 0 {sym}".rstrip()
    if finite and (abs(x) >= (HUGE_PLAIN if plain else HUGE_PREFIXED)
                   or (plain and abs(x) < SMALL_PLAIN)):
        p = int(math.floor(math.log10(abs(x)) / 3) * 3)
        mant = x / 10.0**p if p > -300 else x * 1e300 / 10.0**(p + 300)
        return f"{_num(mant, digits, rounding)}×10{_sup(p)} {sym}".rstrip()
    if plain or x == 0 or math.isinf(x):
        return f"{_num(x, digits, rounding)} {sym}".rstrip()
    exp = int(math.floor(math.log10(abs(x)) / 3) * 3)
    exp = max(-15, min(12, exp))
    mant = x / 10**exp
    if abs(float(_num(mant, digits, rounding).replace("−", "-"))) >= 1000 and exp < 12:
        exp += 3
        mant /= 1000
    return f"{_num(mant, digits, rounding)} {_PREFIX[exp]}{sym}".rstrip()


def at_most(x: float, unit: str, digits: int = 3) -> str:
    """A limit a value must stay at or under, rounded down (``≤ at_most(…)`` stays true)."""
    return eng(x, unit, digits, rounding="down")


def at_least(x: float, unit: str, digits: int = 3) -> str:
    """A limit a value must reach, rounded up (``≥ at_least(…)`` stays true)."""
    return eng(x, unit, digits, rounding="up")


_SUPERSCRIPT = str.maketrans("0123456789-", "⁰¹²³⁴⁵⁶⁷⁸⁹⁻")


def _sup(n: int) -> str:
    return str(n).translate(_SUPERSCRIPT)


def _round_dir(q: float, rounding: str) -> float:
    """Round ``q`` to an integer: nearest, toward −∞ (down) or +∞ (up); a ``q`` within float
    noise of an integer is that integer (0.29·100 is 29, not 28.999…)."""
    n = round(q)
    if abs(q - n) <= 1e-9 * max(1.0, abs(q)):
        return float(n)
    return float(math.floor(q) if rounding == "down" else math.ceil(q) if rounding == "up"
                 else n)


def _num(x: float, digits: int, rounding: str = "near", *, decimals: int | None = None) -> str:
    if x == 0:
        return "0"
    if math.isinf(x):
        return "∞" if x > 0 else "−∞"
    mag = int(math.floor(math.log10(abs(x))))
    if decimals is None:
        decimals = max(0, digits - 1 - mag)
    if rounding != "near":
        x = _round_dir(x * 10**decimals, rounding) / 10**decimals
    text = f"{x:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text.replace("-", "−")


def number(x: float, digits: int = 3, rounding: str = "near") -> str:
    """A plain number (a ratio, a limit) to ``digits`` significant digits, rounded to the
    nearest or "down"/"up" toward the safe side; a minus sign, never a hyphen.

    >>> number(5.6942), number(0.28517, rounding="down"), number(1.8), number(-0.5)
    ('5.69', '0.285', '1.8', '−0.5')
    """
    if math.isnan(x):
        return "—"
    return _num(x, digits, rounding)


def span(lo: float, hi: float, unit: str) -> str:
    """A range for summaries: ``10–110 kΩ`` style (both ends formatted)."""
    a, b = eng(lo, unit), eng(hi, unit)
    return a if a == b else f"{a} – {b}"


def pct(x: float) -> str:
    """A fraction as a signed percentage: a tenth of a percent below 100 %, whole percent up
    to 10 000 %, beyond that capped there.

    >>> pct(0.025), pct(-0.4), pct(32.907), pct(1.2e6)
    ('+2.5 %', '−40.0 %', '+3291 %', '> +10000 %')
    """
    if math.isnan(x):
        return "—"
    if abs(x) >= 100:
        return "> +10000 %" if x > 0 else "−100 %"
    text = f"{x * 100:+.1f} %" if abs(x) < 1 else f"{x * 100:+.0f} %"
    return text.replace("-", "−")


def margin(m: float | None) -> str:
    """A margin (the checked metric over its fail limit, minus one) as a reader takes it in.

    −50 % … +900 % as a percentage, rounded toward the worse side; a metric of 10 to 100
    times its limit as ``12×``, beyond that ``> 100×``; a metric under half its limit as what
    it would take, ``needs 25×`` (a "−96 %" beside "marginal" on an advisory check reads as
    a contradiction); nothing at all as "" (no margin: n/a, error).

    >>> [margin(x) for x in (0.0417, 1.6, 11.128, 9026.89, -0.4996, -0.96, None)]
    ['+4.1 %', '+160 %', '12×', '> 100×', '−50 %', 'needs 25×', '']
    """
    if m is None or math.isnan(m):
        return ""
    ratio = 1.0 + m
    if ratio >= 100:
        return "> 100×"
    if ratio >= 10:
        return f"{int(_round_dir(ratio, 'down'))}×"
    if m > -0.5:
        pc = m * 100
        if abs(pc) < 10:
            return f"{_round_dir(pc * 10, 'down') / 10:+.1f} %".replace("-", "−")
        return f"{_round_dir(pc, 'down'):+.0f} %".replace("-", "−")
    if ratio <= 0.01:
        return "needs > 100×"
    return f"needs {_num(1.0 / ratio, 2, 'up')}×"


def share(p: float, interval: tuple[float, float] | None = None) -> str:
    """A fraction of samples as a percentage; none or all of them as the 95 % interval's
    bound (rounded outward), since "0 %" of a finite sample is not zero.

    >>> share(0.0, (0.0, 3.84e-5)), share(0.1234), share(1.0, (0.99996, 1.0))
    ('< 0.004 %', '12 %', '> 99.99 %')
    """
    if math.isnan(p):
        return "—"
    if p == 0:
        hi = interval[1] if interval else 0.0
        return f"< {_num(hi * 100, 1, 'up')} %" if hi > 0 else "0 %"
    if p == 1:
        lo = interval[0] if interval else 1.0
        return f"> {_num(lo * 100, 4, 'down')} %" if lo < 1 else "100 %"
    return f"{_num(p * 100, 2)} %"


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
