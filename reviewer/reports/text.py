"""Words for the reports: units written one way, and checklist limits as sentences.

Units follow the report's one style everywhere (``Ω``, ``µ``, ``°C``, ``A²s``, ``V·µs``): the
same symbols :func:`reviewer.fmt.eng` prints, applied also to the unit column and to the values
as the user wrote them. Limits read as sentences ("fails when VDRM/VRRM is below 1.5 × the peak
voltage; marginal below 2 ×") instead of the checklist's keys.
"""

from __future__ import annotations

import re
from collections.abc import Mapping

from reviewer.fmt import eng

_UNIT_COLUMN = {"ohm": "Ω", "degC": "°C", "deg": "°", "A^2*s": "A²s", "1": "", "V*s": "V·s",
                "V/s": "V/µs", "A/s": "A/µs", "1/K": "/K", "K/W": "K/W"}

# Unit words inside a value's text, longest first (prefix letters are kept).
_TEXT_SUBS = (
    (re.compile(r"A\^2\s*\*\s*s|A2s\b"), "A²s"),
    (re.compile(r"\bV\s*\*\s*([munpµ]?)s\b"), lambda m: f"V·{_micro(m.group(1))}s"),
    (re.compile(r"(?<![A-Za-z])([kMGmunpµ]?)ohms?\b"), lambda m: f"{_micro(m.group(1))}Ω"),
    (re.compile(r"\bdeg\s*C\b|\bdegC\b"), "°C"),
    (re.compile(r"\bdelta_degC\b"), "K"),
    (re.compile(r"(\d)\s*deg\b"), r"\1°"),
    (re.compile(r"\bu(F|H|s|A|V|W|J)\b"), r"µ\1"),
    (re.compile(r"/us\b"), "/µs"),
    (re.compile(r"\+/-"), "±"),
)


def _micro(prefix: str) -> str:
    return "µ" if prefix == "u" else prefix


def unit_symbol(unit: str) -> str:
    """The unit column's text for an engine unit (``A^2*s`` → ``A²s``, ``ohm`` → ``Ω``).

    >>> unit_symbol("A^2*s"), unit_symbol("ohm"), unit_symbol("V/s"), unit_symbol("1")
    ('A²s', 'Ω', 'V/µs', '')
    """
    return _UNIT_COLUMN.get(unit, unit.replace("*", "·"))


def pretty_units(text: str) -> str:
    """A value as written in a project, its unit words in the report's symbols.

    >>> pretty_units("128 A^2*s"), pretty_units("4.7 kohm ±5%"), pretty_units("-10 degC")
    ('128 A²s', '4.7 kΩ ±5%', '-10 °C')
    >>> pretty_units("200 V*us"), pretty_units("100 nF +/-10%"), pretty_units("2 uH")
    ('200 V·µs', '100 nF ±10%', '2 µH')
    """
    out = text
    for pat, rep in _TEXT_SUBS:
        out = pat.sub(rep, out)
    return out


# What the ratio of each check compares: (the quantity that must be large, what it is
# measured against). The checklist's fail_below / marginal_below apply to their ratio.
RATIOS: dict[str, tuple[str, str]] = {
    "osc.window": ("the window's upper bound", "the largest timing R"),
    "osc.timing": ("the covered range", "the target range"),
    "osc.idle-gate": ("VGD", "the idle gate voltage"),
    "osc.discharge": ("the device's rating", "the discharge stress"),
    "osc.dissipation": ("the derated rating", "the dissipation"),
    "osc.leakage": ("the charging current", "IP plus the leakage"),
    "gate.trigger": ("the gate current", "IGT (cold)"),
    "gate.peak-power": ("PGM", "the peak gate power"),
    "gate.average-power": ("PG(AV)", "the average gate power"),
    "gate.latch-time": ("the pulse width", "the width needed to latch"),
    "gate.noise": ("VGD", "the noise voltage"),
    "gate.reverse": ("VRGM", "the reverse gate voltage"),
    "gate.transformer": ("the rating", "the volt-seconds or isolation needed"),
    "power.output": ("the output range", "the required range"),
    "power.blocking": ("VDRM/VRRM", "the peak voltage"),
    "power.rms-current": ("the RMS rating", "the RMS current"),
    "power.average-current": ("the derated average rating", "the average current"),
    "power.surge": ("ITSM", "the surge peak"),
    "power.fuse": ("the device's I²t", "the fuse's clearing I²t"),
    "power.latching": ("the anode current", "IL"),
    "power.holding": ("the load current", "IH"),
    "power.didt": ("the di/dt rating", "the di/dt"),
    "power.control": ("α_min", "the load angle φ"),
    "snubber.dvdt": ("the dv/dt rating", "the dv/dt"),
    "snubber.peak-voltage": ("VDRM", "the peak voltage"),
    "snubber.discharge": ("the di/dt or surge limit", "the discharge stress"),
    "snubber.resistor-power": ("the resistor's rating", "its dissipation"),
    "snubber.capacitor": ("the capacitor's rating", "its peak voltage"),
    "turnoff.time": ("the turn-off interval t_c", "tq"),
    "turnoff.capacitor": ("the capacitor's rating", "its stress"),
    "turnoff.peak-current": ("the ring's peak current", "the load current"),
    "turnoff.reapplied-dvdt": ("the dv/dt rating", "the reapplied dv/dt"),
}


def _times(x: float, what: str) -> str:
    return what if x == 1 else f"{x:g} × {what}"


def limit_words(check: str, lim: Mapping[str, float]) -> str:
    """The limits of one check as a sentence; "" when the check has none.

    >>> limit_words("power.blocking", {"fail_below": 1.5, "marginal_below": 2.0})
    'fails when VDRM/VRRM is below 1.5 × the peak voltage; marginal below 2 × the peak voltage'
    >>> limit_words("power.rms-current", {"fail_below": 1.0, "marginal_below": 1.0})
    'fails when the RMS rating is below the RMS current'
    >>> limit_words("power.junction", {"headroom_fail": 0.0, "headroom_marginal": 25.0})
    'fails when the junction is hotter than tj_max; marginal closer than 25 K below it'
    """
    lim = dict(lim)
    parts: list[str] = []
    if "fail_below" in lim or "marginal_below" in lim:
        subj, obj = RATIOS.get(check, ("the ratio", "its reference"))
        f, m = lim.pop("fail_below", None), lim.pop("marginal_below", None)
        if f is not None:
            parts.append(f"fails when {subj} is below {_times(f, obj)}")
        if m is not None and m != f:
            parts.append(("marginal" if f is not None else f"marginal when {subj} is")
                         + f" below {_times(m, obj)}")
    if "headroom_fail" in lim or "headroom_marginal" in lim:
        f, m = lim.pop("headroom_fail", None), lim.pop("headroom_marginal", None)
        if f is not None:
            parts.append("fails when the junction is hotter than tj_max" if f == 0 else
                         f"fails closer than {f:g} K below tj_max")
        if m is not None and m != f:
            parts.append(f"marginal closer than {m:g} K below it")
    if "low" in lim and "high" in lim:
        lo, hi = lim.pop("low"), lim.pop("high")
        parts.append(f"advisory: marginal outside {lo:g}–{hi:g} × the rule-of-thumb value")
    if "touch_current" in lim:
        parts.append(f"advisory: marginal above {eng(lim.pop('touch_current'), 'A')} "
                     "of off-state current")
    parts += [f"{k.replace('_', ' ')} {v:g}" for k, v in lim.items()]
    return "; ".join(parts)
