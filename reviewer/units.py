"""The value grammar of project and checklist files, and the one pint registry.

A value is parsed once, at load, into a :class:`~reviewer.model.Value` holding SI magnitudes:
``"47 kohm ±5%"``, ``"4k7"`` (IEC 60062 RKM code for resistance and capacitance keys),
``"230 V +10% -15%"``, ``"0.7 V ±0.1 V"``, ``{ min = "10 kohm", max = "110 kohm" }`` or a bare
number for a dimensionless key. The number and the unit are split by a strict pattern of our
own before pint sees them (pint alone would evaluate ``"2*3 V"`` and can raise odd errors on
garbage). Every rejection is a :class:`~reviewer.errors.ValueGrammarError` that names the key
and says what to type.
"""

from __future__ import annotations

import difflib
import math
import re
import unicodedata
from functools import lru_cache
from typing import Any

from reviewer.errors import ValueGrammarError, Where
from reviewer.model import Value
from reviewer.unitdata import UNITS

# dimension name -> (SI unit pint converts to, how to say it, an example to type)
DIMS: dict[str, tuple[str, str, str]] = {
    "resistance": ("ohm", "a resistance", '"47 kohm" or "4k7"'),
    "capacitance": ("farad", "a capacitance", '"100 nF" or "100n"'),
    "inductance": ("henry", "an inductance", '"50 uH"'),
    "voltage": ("volt", "a voltage", '"230 V"'),
    "current": ("ampere", "a current", '"10 mA"'),
    "time": ("second", "a time", '"10 ms"'),
    "frequency": ("hertz", "a frequency", '"50 Hz"'),
    "angle": ("radian", "an angle", '"60 deg"'),
    "temperature": ("kelvin", "a temperature", '"-10 degC" or "263 K"'),
    "temperature_difference": ("kelvin", "a temperature difference", '"10 K" or "10 delta_degC"'),
    "thermal_resistance": ("kelvin / watt", "a thermal resistance", '"1.8 K/W"'),
    "power": ("watt", "a power", '"0.5 W"'),
    "energy": ("joule", "an energy", '"50 uJ"'),
    "i2t": ("ampere ** 2 * second", "an I²t", '"50 A^2*s"'),
    "voltage_rate": ("volt / second", "a rate of rise of voltage", '"100 V/us"'),
    "current_rate": ("ampere / second", "a rate of rise of current", '"50 A/us"'),
    "volt_seconds": ("volt * second", "a volt-second product", '"200 V*us"'),
    "tempco": ("1 / kelvin", "a temperature coefficient", '"0.5 %/K"'),
    "dimensionless": ("", "a plain number", "0.65"),
}

_NUM = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
_UNIT = r"[A-Za-z_%][A-Za-z_0-9%]*(?:\s*(?:\*\*|[*/^])\s*[A-Za-z_0-9%]+)*"
_VALUE_RE = re.compile(rf"^\s*(?P<num>{_NUM})\s*(?P<unit>{_UNIT})?\s*$")
_TOL_SYM = re.compile(r"^(?P<head>.*?)\s*(?:±|\+/-|\+-)\s*(?P<tol>.+)$")
_TOL_ASYM = re.compile(
    rf"^(?P<head>.*?)\s*\+\s*(?P<up>{_NUM}\s*%)\s*-\s*(?P<down>{_NUM}\s*%)\s*$"
)
_RES_RKM = re.compile(r"^(?:(\d+)([LRKMGTk])(\d*)|([LR])(\d+))$")
_CAP_RKM = re.compile(r"^(?:(\d+)([pnuµmF])(\d*)|([pnuµm])(\d+))$")
_RES_MULT = {"L": 1e-3, "R": 1.0, "K": 1e3, "k": 1e3, "M": 1e6, "G": 1e9, "T": 1e12}
_CAP_MULT = {"p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "m": 1e-3, "F": 1.0}
_RANGE_KEYS = ("min", "max", "nom")
MAX_VALUE_CHARS = 200  # "1.23e-4 kohm +10% -15%" is 22; anything this long is not a value


def registry() -> Any:
    """The one pint registry (created on first use; offset auto-conversion stays off)."""
    from reviewer.unitgen import registry as pint_registry

    return pint_registry()


def _normalise(text: str) -> str:
    text = unicodedata.normalize("NFKC", text)
    text = text.replace("Ω", "ohm").replace("Ω", "ohm").replace("°C", "degC").replace("°", "deg")
    return text.replace("μ", "u").replace("µ", "u").replace("−", "-").strip()


def _err(msg: str, where: Where) -> ValueGrammarError:
    return ValueGrammarError(msg, where)


def _needs(dim: str, where: Where) -> str:
    _, what, example = DIMS[dim]
    return f"`{where.key}` needs {what}: write e.g. {example}"


@lru_cache(maxsize=512)
def _unit_factor(unit: str, dim: str) -> tuple[float, float] | None:
    """(scale, offset) converting ``unit`` to the SI unit of ``dim``; None if it does not fit.

    The common units come from a table pint derived (:mod:`reviewer.unitdata`, checked against
    pint in the tests), so a project in them loads without importing pint; pint itself
    converts anything else.
    """
    known = UNITS.get(unit)
    if known is not None:
        return known.get(dim)
    from reviewer.unitgen import pint_factor

    return pint_factor(unit, dim, DIMS[dim][0])


def _rkm(text: str, dim: str) -> float | None:
    """The value of an RKM code, or None if ``text`` is not one for this dimension."""
    if dim == "resistance":
        m = _RES_RKM.match(text)
        mult = _RES_MULT
    elif dim == "capacitance":
        m = _CAP_RKM.match(text)
        mult = _CAP_MULT
    else:
        return None
    if not m:
        return None
    left, letter, right = (m.group(1), m.group(2), m.group(3)) if m.group(1) else (
        "", m.group(4), m.group(5))
    number = (int(left) if left else 0) + (int(right) / 10 ** len(right) if right else 0.0)
    return number * mult[letter]


def _single(text: str, dim: str, where: Where) -> tuple[float, str]:
    """Parse one number with its unit (no tolerance) to (SI magnitude, unit as written)."""
    if not text:
        raise _err(f"empty value; {_needs(dim, where)}", where)
    rkm = _rkm(text, dim)
    if rkm is not None:
        return rkm, text
    if dim in ("capacitance",) and re.fullmatch(r"\d+[KMGR]\d*", text):
        raise _err(f'"{text}" is not read as a capacitance (K, M, G and R are resistance '
                   f"letters or marking codes); {_needs(dim, where)}", where)
    if dim == "inductance" and re.fullmatch(r"\d*[RLKMnpu]\d+|\d+[RLKMnpu]\d*", text):
        raise _err(f'"{text}": inductances need an explicit unit; {_needs(dim, where)}', where)
    m = _VALUE_RE.match(text)
    if not m:
        if re.match(rf"^\s*{_NUM}\s*[*/+^-]", text) or re.search(r"\d\s*[*/+]\s*\d", text):
            raise _err(f'"{text}": arithmetic is not allowed in a value; write the result, '
                       f"e.g. {DIMS[dim][2]}", where)
        if text.lower() in ("nan", "inf", "-inf", "+inf", "infinity"):
            raise _err(f'"{text}" is not a number; {_needs(dim, where)}', where)
        raise _err(f'cannot read "{text}"; {_needs(dim, where)}', where)
    number = float(m.group("num"))
    unit = (m.group("unit") or "").strip()
    if not math.isfinite(number):
        raise _err(f'"{text}" is not a finite number; {_needs(dim, where)}', where)
    if not unit:
        if dim == "dimensionless":
            return number, ""
        if re.fullmatch(r"\d{3}", text.strip()):
            raise _err(f'"{text}" has no unit (three-digit marking codes are not read); '
                       f"{_needs(dim, where)}", where)
        raise _err(f'"{text}" has no unit; {_needs(dim, where)}', where)
    if dim == "dimensionless":
        if unit == "%":
            return number / 100, unit
        raise _err(f'`{where.key}` is a plain number: write e.g. {DIMS[dim][2]} (no unit)', where)
    factor = _unit_factor(unit, dim)
    if factor is None:
        what = _describe(unit)
        hint = f' ("{unit}" is {what})' if what else f' ("{unit}" is not a unit for this key)'
        if dim == "temperature_difference" and unit in ("degC", "degF"):
            hint = " (degC is an absolute temperature; a rise or difference is K or delta_degC)"
        if dim == "temperature" and unit.startswith("delta_"):
            hint = (f" ({unit} is a temperature difference; an absolute temperature is "
                    f'"{m.group("num")} degC" or kelvin, e.g. "308 K")')
        raise _err(f'"{text}" does not fit{hint}; {_needs(dim, where)}', where)
    scale, offset = factor
    si = number * scale + offset
    if not math.isfinite(si):
        raise _err(f'"{text}" is too large to compute with; check the exponent and the unit '
                   "prefix", where)
    return si, unit


def _describe(unit: str) -> str:
    """What kind of quantity ``unit`` measures, for error messages ("" when unknown)."""
    for dim in DIMS:
        if dim != "dimensionless" and _unit_factor(unit, dim) is not None:
            return DIMS[dim][1]
    return ""


def _tolerance(nom: float, tol: str, dim: str, where: Where) -> tuple[float, float]:
    tol = tol.strip()
    if tol.endswith("%"):
        try:
            p = float(tol[:-1])
        except ValueError:
            raise _err(f'cannot read the tolerance "{tol}"; write e.g. "±5%"', where) from None
        if dim == "temperature":
            raise _err("a percentage tolerance on an absolute temperature has no meaning; "
                       'give a range: { min = "-10 degC", max = "45 degC" }', where)
        _check_pct(p, where)
        return nom * (1 - p / 100), nom * (1 + p / 100)
    delta_dim = "temperature_difference" if dim == "temperature" else dim
    delta, _ = _single(tol, delta_dim, where)
    if delta < 0:
        raise _err(f'the tolerance "{tol}" must be positive', where)
    return nom - delta, nom + delta


def _check_pct(p: float, where: Where) -> None:
    if not math.isfinite(p) or p < 0:
        raise _err(f"a tolerance must be a positive percentage, not {p}%", where)
    if p >= 100:
        raise _err(f"a tolerance of {p:g}% (100% or more) leaves nothing of the value; "
                   "give a range instead: { min = …, max = … }", where)


def parse_value(raw: Any, dim: str, where: Where, *, allow_zero: bool = False,
                allow_negative: bool = False) -> Value:
    """Parse a project value of dimension ``dim`` into a Value (SI magnitudes).

    ``raw`` is what tomllib gave: a string, a number (only for dimensionless keys) or a table
    with ``min``/``max`` and optional ``nom``.

    >>> v = parse_value("4k7 ±5%", "resistance", Where(key="timing_r"))
    >>> round(v.nom), round(v.lo), round(v.hi)
    (4700, 4465, 4935)
    >>> round(parse_value("-10 degC", "temperature", Where(key="at")).nom, 2)
    263.15
    """
    if dim not in DIMS:
        raise ValueError(f"unknown dimension {dim}")
    if isinstance(raw, dict):
        v = _parse_range(raw, dim, where)
    elif isinstance(raw, bool) or raw is None:
        raise _err(f"`{where.key}` cannot be {str(raw).lower()}; {_needs(dim, where)}", where)
    elif isinstance(raw, (int, float)):
        if not math.isfinite(raw):
            raise _err(f"`{where.key}` is {raw}: NaN and infinity are not values; "
                       f"{_needs(dim, where)}", where)
        if dim != "dimensionless":
            raise _err(f"the bare number {raw} has no unit; {_needs(dim, where)}", where)
        x = float(raw)
        v = Value(x, x, x, dim, "", str(raw), where)
    elif isinstance(raw, str):
        v = _parse_string(raw, dim, where)
    else:
        raise _err(f"`{where.key}` must be a value such as {DIMS[dim][2]}, not a "
                   f"{type(raw).__name__}", where)
    _check_sign(v, dim, where, allow_zero=allow_zero, allow_negative=allow_negative)
    return v


def _parse_string(raw: str, dim: str, where: Where) -> Value:
    if len(raw) > MAX_VALUE_CHARS:
        raise _err(f"the value is {len(raw)} characters long; a value is a number, a unit and "
                   f"perhaps a tolerance: {_needs(dim, where)}", where)
    text = _normalise(raw)
    lo = hi = None
    m = _TOL_ASYM.match(text)
    if m:
        head = m.group("head")
        nom, unit = _single(head, dim, where)
        up = float(m.group("up").rstrip("% "))
        down = float(m.group("down").rstrip("% "))
        _check_pct(up, where)
        _check_pct(down, where)
        if dim == "temperature":
            raise _err("a percentage tolerance on an absolute temperature has no meaning", where)
        lo, hi = nom * (1 - down / 100), nom * (1 + up / 100)
    else:
        m = _TOL_SYM.match(text)
        if m:
            nom, unit = _single(m.group("head"), dim, where)
            lo, hi = _tolerance(nom, m.group("tol"), dim, where)
        else:
            nom, unit = _single(text, dim, where)
    if lo is None or hi is None:
        lo = hi = nom
    lo, hi = min(lo, hi), max(lo, hi)
    return Value(nom, lo, hi, dim, unit, raw, where)


def _parse_range(raw: dict[str, Any], dim: str, where: Where) -> Value:
    for key in raw:
        if key not in _RANGE_KEYS:
            near = difflib.get_close_matches(key, _RANGE_KEYS, n=1)
            hint = f"; did you mean `{near[0]}`?" if near else ""
            raise _err(f"unknown key `{key}` in the range for `{where.key}`{hint} "
                       "(a range has min, max and optional nom)", where)
    if "min" not in raw or "max" not in raw:
        raise _err(f"the range for `{where.key}` needs both min and max, e.g. "
                   f"{{ min = {DIMS[dim][2].split(' or ')[0]}, max = … }}", where)
    ends = {}
    for key in raw:
        sub = raw[key]
        if isinstance(sub, dict):
            raise _err(f"`{where.key}.{key}` must be a single value", where)
        inner = parse_value(sub, dim, where, allow_zero=True, allow_negative=True)
        if inner.varies:
            raise _err(f"`{where.key}.{key}` is one end of a range: give it without a "
                       "tolerance", where)
        ends[key] = inner.nom
    lo, hi = ends["min"], ends["max"]
    if lo > hi:
        raise _err(f"the range for `{where.key}` has min > max; swap them", where)
    nom = ends.get("nom", (lo + hi) / 2)
    if not lo <= nom <= hi:
        raise _err(f"`{where.key}.nom` lies outside min … max", where)
    text = "{ " + ", ".join(f"{k} = {raw[k]!r}" for k in raw) + " }"
    return Value(nom, lo, hi, dim, "", text.replace("'", '"'), where, is_range=True)


def _check_sign(v: Value, dim: str, where: Where, *, allow_zero: bool,
                allow_negative: bool) -> None:
    if dim == "temperature":
        if v.lo <= 0:
            raise _err("a temperature below absolute zero is impossible", where)
        return
    if not allow_negative and v.lo < 0:
        raise _err(f"`{where.key}` cannot be negative; {_needs(dim, where)}", where)
    if not allow_zero and not allow_negative and v.lo <= 0:
        raise _err(f"`{where.key}` must be greater than zero; {_needs(dim, where)}", where)
