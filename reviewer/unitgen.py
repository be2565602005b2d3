"""Derive the table of common units (:mod:`reviewer.unitdata`) from pint.

pint is the authority on units, but importing it and building its registry costs about a fifth
of a second, more than everything else a ``latchbook check`` does. The units people actually
write (a prefix and a symbol of the key's dimension, and the usual rates and products) are
therefore converted once, by pint, into a generated table of exact factors; any other unit is
still handed to pint at load time. The tests regenerate the table and compare every entry with
pint, so the table cannot drift from it.

    python -m reviewer.unitgen      # rewrite reviewer/unitdata.py from the installed pint
"""

from __future__ import annotations

import itertools
from functools import lru_cache
from pathlib import Path
from typing import Any

# The SI prefixes people use on component values and ratings (µ is normalised to u first).
PREFIXES = ("p", "n", "u", "m", "", "k", "M", "G")
SMALL = ("n", "u", "m", "")

# Plain symbols and names that take a prefix.
SYMBOLS = (
    "ohm", "F", "farad", "H", "henry", "V", "volt", "A", "amp", "ampere", "s", "second",
    "sec", "Hz", "hertz", "W", "watt", "J", "joule",
)
# Units written without a prefix.
PLAIN = (
    "deg", "degree", "degrees", "rad", "radian", "radians", "degC", "degF", "K", "kelvin",
    "delta_degC", "delta_degF", "min", "minute", "h", "hour", "percent", "ppm",
    "K/W", "degC/W", "delta_degC/W", "K/mW", "%/K", "%/degC", "ppm/K", "1/K", "A^2*s", "A^2s",
    "A**2*s", "A2s",
)


def candidates() -> list[str]:
    """Every unit text the table covers, as the value grammar hands it over."""
    out = [p + s for p, s in itertools.product(PREFIXES, SYMBOLS)]
    out += list(PLAIN)
    out += [f"{p}{n}/{q}s" for n in ("V", "A") for p in ("", "k", "m") for q in SMALL]
    out += [f"{p}V*{q}s" for p in ("", "m", "k") for q in SMALL]
    out += [f"{p}A^2*{q}s" for p in ("", "k") for q in ("m", "")]
    return list(dict.fromkeys(out))


@lru_cache(maxsize=1)
def registry() -> Any:
    """The one pint registry (created on first use; offset auto-conversion stays off)."""
    import pint

    return pint.UnitRegistry(autoconvert_offset_to_baseunit=False)


def pint_factor(unit: str, dim: str, si: str) -> tuple[float, float] | None:
    """(scale, offset) converting ``unit`` to ``si`` according to pint; None if it does not fit.

    ``dim`` is the dimension's name in :data:`reviewer.units.DIMS`, ``si`` its SI unit.
    """
    ureg = registry()
    try:
        u = ureg.parse_units(unit.replace("%", "percent").replace("^", "**"))
        if dim == "temperature":
            if str(u).startswith("delta_"):
                return None  # a difference, never an absolute temperature
            q0 = ureg.Quantity(0.0, u).to("kelvin").magnitude
            q1 = ureg.Quantity(1.0, u).to("kelvin").magnitude
            return (q1 - q0, q0)
        if dim == "temperature_difference" and str(u) in ("degree_Celsius", "degree_Fahrenheit"):
            return None
        return (float(ureg.Quantity(1.0, u).to(si or "dimensionless").magnitude), 0.0)
    except Exception:  # pint raises many types (including AssertionError) for bad units
        return None


def derive() -> dict[str, dict[str, tuple[float, float]]]:
    """unit text → {dimension: (scale, offset)} for every candidate pint accepts somewhere."""
    from reviewer.units import DIMS

    table: dict[str, dict[str, tuple[float, float]]] = {}
    for unit in candidates():
        fits = {}
        for dim, (si, _, _) in DIMS.items():
            f = pint_factor(unit, dim, si)
            if f is not None:
                fits[dim] = (float(f[0]), float(f[1]))
        if fits:
            table[unit] = fits
    return table


def render(table: dict[str, dict[str, tuple[float, float]]]) -> str:
    """The source text of :mod:`reviewer.unitdata` (floats by repr, so they round-trip)."""
    import pint

    lines = [
        f'"""Unit factors derived from pint {pint.__version__} by reviewer/unitgen.py; do not '
        'edit.',
        "",
        "unit text → {dimension: (scale, offset)} to the dimension's SI unit. Regenerate with",
        "``python -m reviewer.unitgen``; tests/reviewer/test_unitdata.py compares it with pint.",
        '"""',
        "",
        "UNITS: dict[str, dict[str, tuple[float, float]]] = {",
    ]
    for unit, fits in table.items():
        items = [f"{d!r}: ({s!r}, {o!r})" for d, (s, o) in fits.items()]
        one = f"    {unit!r}: {{{', '.join(items)}}},"
        if len(one) <= 100:
            lines.append(one)
        else:
            lines += [f"    {unit!r}: {{", *(f"        {i}," for i in items), "    },"]
    lines.append("}")
    return "\n".join(lines) + "\n"


def main() -> None:
    """Rewrite reviewer/unitdata.py."""
    path = Path(__file__).with_name("unitdata.py")
    path.write_text(render(derive()), encoding="utf-8")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
