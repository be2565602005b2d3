"""Every value's physical domain (an error outside it) and plausible band (a warning outside it).

A *domain* is what physics allows: η is a ratio below 1, a duty at most 1, a firing angle at
most 180°, a cold table below 25 °C. A value outside it cannot describe a real circuit, so the
loader refuses it (exit 2) and says what to write. A *band* is what real SCR control circuits
use; a value outside it is legal but usually a slip of the unit or the exponent ("80 MV" for a
voltage rating), so the loader keeps it and warns.

Bounds are looked up by *scope* and key: ``parts.scr.vdrm``, ``stages.phase-control.firing``,
``stages.phase-control.load.r``, ``conditions.ambient``; then ``stages.*.key`` (a key that means
the same in every stage kind); then the default of the value's dimension. Magnitudes are SI
(ohm, farad, kelvin, radian ...). A zero that a key allows (``allow_zero``) is not checked
against the lower ends: the zero rule belongs to the value grammar.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from reviewer.errors import ProjectError, Where
from reviewer.model import Value

C0 = 273.15  # K at 0 °C
DEG = math.pi / 180.0
INF = math.inf


@dataclass(frozen=True)
class Domain:
    """Where a value is physically possible: ``lo``/``hi`` ends, open (strict) or closed."""

    lo: float = -INF
    hi: float = INF
    lo_open: bool = False
    hi_open: bool = False
    why: str = ""

    def inside(self, x: float) -> bool:
        """True when ``x`` lies inside the domain (finite values only)."""
        if not math.isfinite(x):
            return False
        above = x > self.lo if self.lo_open else x >= self.lo
        below = x < self.hi if self.hi_open else x <= self.hi
        return above and below


@dataclass(frozen=True)
class Bounds:
    """A key's domain and its plausible band ``(lo, hi)``."""

    domain: Domain
    band: tuple[float, float]


def _b(dlo: float, dhi: float, blo: float, bhi: float, why: str = "", *, lo_open: bool = False,
       hi_open: bool = False) -> Bounds:
    return Bounds(Domain(dlo, dhi, lo_open, hi_open, why), (blo, bhi))


# Per dimension: domain ends far beyond any SCR control circuit (and far from float overflow),
# band ends at what such circuits use.
DIM: dict[str, Bounds] = {
    "resistance": _b(1e-6, 1e12, 1e-4, 1e8),
    "capacitance": _b(1e-15, 1.0, 1e-12, 0.1),
    "inductance": _b(1e-12, 1e3, 1e-8, 100.0),
    "voltage": _b(1e-6, 1e6, 1e-3, 1e4),
    "current": _b(1e-12, 1e6, 1e-9, 1e4),
    "time": _b(1e-12, 1e4, 1e-9, 10.0),
    "frequency": _b(1e-6, 1e9, 1e-3, 1e6),
    "angle": _b(0.0, 2 * math.pi, 0.0, 2 * math.pi, "an angle within one cycle"),
    "temperature": _b(C0 - 100, C0 + 300, C0 - 55, C0 + 150),
    "temperature_difference": _b(0.0, 300.0, 0.0, 80.0),
    "thermal_resistance": _b(1e-4, 1e4, 1e-2, 100.0),
    "power": _b(1e-9, 1e9, 1e-6, 1e6),
    "energy": _b(1e-12, 1e6, 1e-9, 1e3),
    "i2t": _b(1e-6, 1e9, 1e-3, 1e7),
    "voltage_rate": _b(1e-3, 1e13, 1e6, 1e10),
    "current_rate": _b(1e-3, 1e13, 1e5, 1e10),
    "volt_seconds": _b(1e-12, 10.0, 1e-7, 0.1),
    "tempco": _b(-1.0, 1.0, -0.02, 0.02),
    "dimensionless": _b(1e-9, 1e9, 1e-6, 1e6),
}

_ANGLE_HALF = "the SCR is reverse-biased after 180°"
_AMBIENT_WHY = ('the air around the parts in operation; K is absolute, so "35 K" is −238 °C: '
                'write "-10 degC" or "263 K"')

KEY: dict[str, Bounds] = {
    # tables every project has
    "conditions.ambient": _b(C0 - 100, C0 + 200, C0 - 55, C0 + 85, _AMBIENT_WHY),
    "conditions.enclosure_rise": _b(0.0, 300.0, 0.0, 60.0),
    "supply.voltage": _b(1e-3, 1e5, 1.0, 1200.0),
    "supply.frequency": _b(0.1, 1e5, 16.0, 440.0, "mains is 50 or 60 Hz"),
    "supply.inductance": _b(0.0, 1.0, 0.0, 10e-3),
    # SCR
    "parts.scr.vdrm": _b(1e-3, 1e5, 10.0, 1e4, "no single thyristor is rated above 100 kV"),
    "parts.scr.vrrm": _b(1e-3, 1e5, 10.0, 1e4, "no single thyristor is rated above 100 kV"),
    "parts.scr.it_rms": _b(1e-6, 1e5, 10e-3, 1e4),
    "parts.scr.it_av": _b(1e-6, 1e5, 10e-3, 1e4),
    "parts.scr.itsm": _b(1e-6, 1e6, 0.1, 1e5),
    "parts.scr.itsm_duration": _b(1e-6, 1.0, 1e-3, 20e-3),
    "parts.scr.vt0": _b(0.0, 100.0, 0.0, 3.0),
    "parts.scr.rt": _b(0.0, 1e3, 0.0, 1.0),
    "parts.scr.tj_max": _b(C0 + 25, C0 + 250, C0 + 90, C0 + 175,
                           "it is above the datasheet's 25 °C reference", lo_open=True),
    "parts.scr.igt": _b(1e-9, 100.0, 1e-6, 1.0),
    "parts.scr.vgt": _b(1e-3, 100.0, 0.1, 5.0),
    "parts.scr.vgd": _b(1e-3, 100.0, 0.05, 2.0),
    "parts.scr.ih": _b(1e-9, 100.0, 1e-6, 1.0),
    "parts.scr.il": _b(1e-9, 100.0, 1e-6, 2.0),
    "parts.scr.tq": _b(1e-9, 1.0, 1e-6, 1e-3),
    "parts.scr.tgt": _b(1e-10, 1e-2, 1e-7, 1e-4),
    "parts.scr.vrgm": _b(1e-3, 1e3, 0.5, 30.0),
    "parts.scr.cold.at": _b(C0 - 100, C0 + 25, C0 - 65, C0 + 0,
                            "the cold table gives the values at the lowest rated temperature, "
                            'below 25 °C, e.g. at = "-40 degC"', hi_open=True),
    # triac (gate data per quadrant; the commutating ratings)
    "parts.triac.vdrm": _b(1e-3, 1e5, 10.0, 1e4, "no single thyristor is rated above 100 kV"),
    "parts.triac.it_rms": _b(1e-6, 1e5, 10e-3, 1e3),
    "parts.triac.itsm": _b(1e-6, 1e6, 0.1, 1e4),
    "parts.triac.itsm_duration": _b(1e-6, 1.0, 1e-3, 20e-3),
    "parts.triac.vt0": _b(0.0, 100.0, 0.0, 3.0),
    "parts.triac.rt": _b(0.0, 1e3, 0.0, 1.0),
    "parts.triac.tj_max": _b(C0 + 25, C0 + 250, C0 + 90, C0 + 150,
                             "it is above the datasheet's 25 °C reference", lo_open=True),
    **{f"parts.triac.igt_{q}": _b(1e-9, 100.0, 1e-6, 0.2) for q in ("q1", "q2", "q3", "q4")},
    **{f"parts.triac.vgt_{q}": _b(1e-3, 100.0, 0.1, 5.0) for q in ("q1", "q2", "q3", "q4")},
    "parts.triac.ih": _b(1e-9, 100.0, 1e-6, 0.2),
    "parts.triac.il": _b(1e-9, 100.0, 1e-6, 0.5),
    "parts.triac.tgt": _b(1e-10, 1e-2, 1e-7, 1e-4),
    # (di/dt)c is quoted in A/ms: 0.1 A/ms … 100 A/µs
    "parts.triac.didt_c": _b(1e-3, 1e13, 1e2, 1e8),
    "parts.triac.dvdt_c": _b(1e-3, 1e13, 1e5, 1e10),
    "parts.triac.cold.at": _b(C0 - 100, C0 + 25, C0 - 65, C0 + 0,
                              "the cold table gives the values at the lowest rated temperature, "
                              'below 25 °C, e.g. at = "-40 degC"', hi_open=True),
    # UJT and PUT
    "parts.ujt.eta": _b(0.0, 1.0, 0.4, 0.9, "η is a ratio of resistances, below 1",
                        lo_open=True, hi_open=True),
    "parts.ujt.rbb": _b(1.0, 1e7, 1e3, 30e3),
    "parts.ujt.ip": _b(1e-12, 1.0, 1e-9, 1e-3),
    "parts.ujt.iv": _b(1e-9, 10.0, 1e-5, 0.1),
    "parts.ujt.vv": _b(1e-3, 100.0, 0.3, 10.0),
    "parts.ujt.vd": _b(1e-3, 10.0, 0.2, 1.2),
    "parts.ujt.rb1_on": _b(0.0, 1e6, 0.0, 1e3),
    "parts.put.ip": _b(1e-12, 1.0, 1e-9, 1e-3),
    "parts.put.iv": _b(1e-9, 10.0, 1e-6, 0.1),
    "parts.put.offset": _b(1e-3, 100.0, 0.1, 2.0),
    "parts.put.vv": _b(1e-3, 100.0, 0.1, 10.0),
    "parts.put.vf": _b(1e-3, 100.0, 0.3, 5.0),
    # diac
    "parts.diac.vbo": _b(1e-3, 1e4, 10.0, 100.0),
    "parts.diac.breakback": _b(1e-3, 1e3, 1.0, 30.0),
    "parts.diac.vbo_asymmetry": _b(0.0, 1e3, 0.0, 10.0),
    "parts.diac.ibo": _b(1e-12, 10.0, 1e-9, 1e-3),
    "parts.diac.i_pulse": _b(1e-6, 1e3, 0.1, 10.0),
    "parts.diac.r_on": _b(0.0, 1e6, 0.0, 1e3),
    # diac-RC trigger
    "stages.diac-rc.pot": _b(0.0, 1e10, 0.0, 10e6),
    "stages.diac-rc.series_r": _b(0.0, 1e10, 0.0, 10e6),
    "stages.diac-rc.c": _b(1e-12, 1e-2, 1e-9, 10e-6),
    "stages.diac-rc.r2": _b(1.0, 1e10, 100.0, 10e6),
    "stages.diac-rc.c2": _b(1e-12, 1e-2, 1e-9, 10e-6),
    "stages.diac-rc.gate_r": _b(0.0, 1e6, 0.0, 10e3),
    "stages.diac-rc.load_r": _b(1e-6, 1e9, 1e-2, 1e5),
    # oscillators
    "stages.*.supply": _b(1e-3, 1e4, 1.0, 100.0),
    "stages.*.zener": _b(1e-3, 1e4, 3.0, 60.0),
    "stages.*.timing_r": _b(1.0, 1e12, 100.0, 100e6),
    "stages.*.timing_c": _b(1e-15, 1.0, 100e-12, 1e-3),
    "stages.*.target#angle": _b(0.0, math.pi, 0.0, math.pi, _ANGLE_HALF),
    "stages.*.target#frequency": _b(1e-6, 1e9, 1e-2, 1e5),
    # gate drive
    "stages.gate-drive.turns_ratio": _b(1e-3, 1e3, 0.1, 10.0),
    "stages.gate-drive.series_r": _b(1e-6, 1e9, 1.0, 100e3),
    "stages.triac-gate.series_r": _b(1e-6, 1e9, 1.0, 100e3),
    # power stages
    "stages.phase-control.firing": _b(0.0, math.pi, 0.0, math.pi, _ANGLE_HALF),
    "stages.triac-phase-control.firing": _b(0.0, math.pi, 0.0, math.pi, _ANGLE_HALF),
    "stages.triac-gate.drive": _b(1e-3, 1e4, 1.0, 400.0),
    "stages.triac-gate.drive_drop": _b(0.0, 100.0, 0.0, 5.0),
    "stages.dc-switch.duty": _b(0.0, 1.0, 1e-3, 1.0, "the fraction of the time on",
                                lo_open=True),
    "stages.*.load.r": _b(1e-6, 1e9, 1e-2, 1e5),
    "stages.*.load.cold_r": _b(1e-6, 1e9, 1e-3, 1e5),
    "stages.*.heatsink.rth_sa": _b(1e-4, 1e4, 1e-2, 100.0),
    "stages.*.heatsink.rth_cs": _b(0.0, 1e3, 0.0, 5.0),
    "stages.*.required#power": _b(0.0, 1e9, 0.0, 1e6),
    "stages.*.required#voltage": _b(0.0, 1e6, 0.0, 1200.0),
    # snubber and turn-off
    "stages.rc-snubber.step": _b(1e-3, 1e6, 1.0, 1e4),
    "stages.*.charge_voltage": _b(1e-3, 1e6, 1.0, 1e4),
}


_NO_PREFIX = ("dimensionless", "angle", "temperature", "temperature_difference", "tempco")


def bounds_for(scope: str, key: str, dim: str) -> Bounds:
    """The bounds of ``key`` in ``scope`` (``parts.scr``, ``stages.gate-drive.load`` ...).

    >>> bounds_for("parts.ujt", "eta", "dimensionless").domain.hi
    1.0
    >>> bounds_for("stages.ujt-oscillator", "target", "angle").band[1] == math.pi
    True
    """
    head, _, rest = scope.partition(".")
    names = [f"{scope}.{key}#{dim}", f"{scope}.{key}"]
    if head == "stages":
        kind, _, sub = rest.partition(".")
        wild = f"stages.*.{sub}.{key}" if sub else f"stages.*.{key}"
        names += [f"{wild}#{dim}", wild]
    for n in names:
        if n in KEY:
            return KEY[n]
    return DIM[dim]


def _show(x: float, dim: str) -> str:
    from reviewer.fmt import show

    if dim == "dimensionless":
        return f"{x:g}"
    if dim == "tempco":
        return f"{x * 100:g} %/K"
    if dim in ("i2t", "thermal_resistance"):
        return f"{x:g} " + ("A²s" if dim == "i2t" else "K/W")
    return show(x, dim)


def domain_text(d: Domain, dim: str, name: str = "x") -> str:
    """The domain as a reader would write it: ``0 < eta < 1``, ``0° ≤ firing ≤ 180°``."""
    lo = "" if d.lo == -INF else f"{_show(d.lo, dim)} {'<' if d.lo_open else '≤'} "
    hi = "" if d.hi == INF else f" {'<' if d.hi_open else '≤'} {_show(d.hi, dim)}"
    return f"{lo}{name}{hi}"


def band_text(band: tuple[float, float], dim: str) -> str:
    """The band as ``a … b``."""
    return f"{_show(band[0], dim)} … {_show(band[1], dim)}"


def check(v: Value, scope: str, key: str, where: Where, *, allow_zero: bool = False) -> str | None:
    """Refuse ``v`` outside its domain (ProjectError); return a warning outside its band."""
    b = bounds_for(scope, key, v.dim)
    d = b.domain
    ends = [x for x in (v.lo, v.nom, v.hi) if not (allow_zero and x == 0.0)]
    for x in ends:
        if not math.isfinite(x):
            raise ProjectError(f"`{key}` = {v.text}: the value is too large to compute with "
                               "(it overflows); check the exponent and the unit prefix", where)
    bad = [x for x in ends if not d.inside(x)]
    if bad:
        why = f" ({d.why})" if d.why else ""
        prefix = "" if v.dim in _NO_PREFIX else " (check the unit prefix)"
        raise ProjectError(f"`{key}` = {v.text} is not physically possible: it needs "
                           f"{domain_text(d, v.dim, key)}{why}; write a value in that "
                           f"range{prefix}", where)
    lo, hi = b.band
    out = [x for x in ends if x < lo or x > hi]
    if out:
        return (f"`{key}` = {v.text} is outside the usual {band_text(b.band, v.dim)}; "
                "check the value and its unit prefix")
    return None
