"""Bad input of every family (file, syntax, values, units, bounds, configuration, links,
variants, records, hostile text) gives exit 2 (or, for a merely unusual value, a warning), a message
with the words that tell the user what to do, no traceback, no raw control character, and leaves
the folder exactly as it was."""

from __future__ import annotations

import hashlib
import json
import os
import stat
from collections import Counter
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import pytest

from reviewer.cli import main

PROJECTS = Path(__file__).resolve().parents[2] / "projects"
KILN = (PROJECTS / "kiln-230.toml").read_text(encoding="utf-8")
FLASH = (PROJECTS / "flasher-dc.toml").read_text(encoding="utf-8")
ESC, BEL, RLO = "\x1b", "\x07", "\u202e"


def edit(base: str, *swaps: tuple[str, str]) -> str:
    """``base`` with each ``old`` replaced (first occurrence) by ``new``; every old must exist."""
    for old, new in swaps:
        assert old in base, old
        base = base.replace(old, new, 1)
    return base


def kiln(*swaps: tuple[str, str]) -> str:
    return edit(KILN, *swaps)


def flash(*swaps: tuple[str, str]) -> str:
    return edit(FLASH, *swaps)


Setup = Callable[[Path], list[str]]


@dataclass(frozen=True)
class Case:
    """One bad input: a project text (written as ``p.toml``) or a setup that builds the folder
    and returns the command line; the exit code; the words the message must contain."""

    id: str
    family: str
    words: tuple[str, ...]
    text: str | None = None
    setup: Setup | None = None
    command: tuple[str, ...] = ("check",)
    code: int = 2


CASES: list[Case] = []


def case(id: str, family: str, words: str | tuple[str, ...], text: str | None = None, *,
         setup: Setup | None = None, command: tuple[str, ...] = ("check",),
         code: int = 2) -> None:
    CASES.append(Case(id, family, (words,) if isinstance(words, str) else words, text, setup,
                      command, code))


def kv(key: str, old: str, new: str) -> tuple[str, str]:
    return (f"{key} = {old}", f"{key} = {new}")


# ----------------------------------------------------------------------------------- file

def _write(name: str, data: bytes | str) -> Setup:
    def setup(d: Path) -> list[str]:
        p = d / name
        p.write_bytes(data.encode() if isinstance(data, str) else data)
        return [str(p)]
    return setup


def _fifo(d: Path) -> list[str]:
    os.mkfifo(d / "pipe.toml")
    return [str(d / "pipe.toml")]


def _loop(d: Path) -> list[str]:
    (d / "a.toml").symlink_to(d / "b.toml")
    (d / "b.toml").symlink_to(d / "a.toml")
    return [str(d / "a.toml")]


def _dangling(d: Path) -> list[str]:
    (d / "gone.toml").symlink_to(d / "nowhere.toml")
    return [str(d / "gone.toml")]


def _folder(d: Path) -> list[str]:
    (d / "sub.toml").mkdir()
    return [str(d / "sub.toml")]


for cmd in (("check",), ("report", "--format", "md"), ("status",), ("sign", "--stage", "*"),
            ("verify",), ("open",), ("diff", "/dev/null"), ("waive", "--stage", "power",
                                                        "--check", "power.blocking", "--note",
                                                        "the lid switch opens both poles"),
            ("export", "--spice", "power")):
    tag = cmd[0]
    case(f"fifo-{tag}", "file", ("named pipe", "regular file"), setup=_fifo, command=cmd)
    case(f"dev-zero-{tag}", "file", ("device", "regular file"),
         setup=lambda d: ["/dev/zero"], command=cmd)
    case(f"symlink-loop-{tag}", "file", "loops", setup=_loop, command=cmd)


def _odd_folder(d: Path) -> list[str]:
    (d / "k.toml").write_text(KILN, encoding="utf-8")
    _loop(d)
    _fifo(d)
    return [str(d)]


for cmd in (("status", "--matrix"), ("status",), ("status", "--matrix", "--json")):
    case(f"folder-odd-{'-'.join(c.strip('-') for c in cmd)}", "file",
         ("a.toml", "loops", "pipe.toml", "named pipe"), setup=_odd_folder, command=cmd)
case("missing", "file", "no such file", setup=lambda d: [str(d / "nope.toml")])
case("dangling-link", "file", "no such file", setup=_dangling)
case("folder", "file", "folder", setup=_folder)
case("empty", "file", "empty", setup=_write("p.toml", ""))
case("blank", "file", "empty", setup=_write("p.toml", "\n  \n\t\n"))
case("latin1", "file", ("not UTF-8", "save the file as UTF-8"),
     setup=_write("p.toml", KILN.replace("Bench", "B\xe9nch").encode("latin-1")))
case("huge", "file", ("1024 KiB", "project is at most"),
     setup=_write("p.toml", "# padding\n" * 120_000))
case("binary", "file", "not UTF-8", setup=_write("p.toml", bytes(range(256)) * 4))
case("bom-then-garbage", "file", "not valid TOML",
     setup=_write("p.toml", b"\xef\xbb\xbf[project\n"))
case("utf16", "file", "not UTF-8", setup=_write("p.toml", KILN.encode("utf-16")))

# --------------------------------------------------------------------------------- syntax

case("unclosed-table", "syntax", "not valid TOML", kiln(("[supply]", "[supply")))
case("duplicate-key", "syntax", "not valid TOML", kiln(('vdrm = "800 V"',
                                                       'vdrm = "800 V"\nvdrm = "900 V"')))
case("duplicate-stage", "syntax", "not valid TOML", KILN + '\n[stages.power]\nkind = "x"\n')
case("unterminated-string", "syntax", "not valid TOML", kiln(('"Bench kiln', '"Bench kiln\n')))
case("bare-word", "syntax", "not valid TOML", kiln(('vrrm = "800 V"', "vrrm = 800 volts")))
case("deep-arrays", "syntax", ("p.toml:2", "nested too deep", "remove the extra brackets"),
     "[project]\nname = " + "[" * 5000 + "]" * 5000 + "\n")
case("deep-inline", "syntax", ("p.toml:2", "nested too deep", "remove the extra brackets"),
     "[project]\nname = " + "{a = " * 5000 + "1" + "}" * 5000 + "\n")
case("deep-inline-strings", "syntax", ("p.toml:4", "nested too deep"),
     '[project]\nname = "[[[[[[[[[[[[[[[[[[[[[[[["  # [[[[[[[[[[[[[[[[[[[[[\n\nx = '
     + "{a = " * 5000 + "1" + "}" * 5000 + "\n")
case("nesting-20", "syntax", ("p.toml:2", "nested more than 16"),
     "[project]\nname = " + "[" * 20 + "1" + "]" * 20 + "\n")
case("deep-tables", "syntax", "nested more than 16", "[" + ".".join(["t"] * 40) + "]\nx = 1\n")
case("unknown-table", "syntax", ("unknown table `suply`", "did you mean `supply`"),
     kiln(("[supply]", "[suply]")))
_SUPPLY = ('[supply]\nkind = "ac"\nvoltage = "230 V +10% -10%"\nfrequency = "50 Hz"\n'
           'inductance = "50 uH"        # source and wiring\n')
case("supply-not-table", "syntax", "`supply` must be a table",
     "supply = 5\n" + kiln((_SUPPLY, "")))
case("no-supply", "syntax", "[supply] table is missing", kiln((_SUPPLY, "")))
case("no-name", "syntax", "[project] needs `name`",
     kiln(('name = "Bench kiln element controller"\n', "")))
case("no-revision", "syntax", "[project] needs `revision`", kiln(('revision = "C"\n', "")))
case("no-stages", "syntax", "no stages", kiln(("[stages.trigger]", "[xtrigger]")).split(
    "[xtrigger]")[0] + "[stages]\n")
case("unknown-key", "syntax", ("unknown key `timming_r`", "did you mean `timing_r`"),
     kiln(("timing_r =", "timming_r =")))
case("unknown-part-key", "syntax", ("unknown key `vdmr`", "did you mean `vdrm`"),
     kiln(("vdrm =", "vdmr =")))
case("stage-not-table", "syntax", "must be a table", kiln(("[stages.commutation]\nkind = "
                                                          '"line-commutation"\nfor = "power"',
                                                          "[stages]\ncommutation = 3")))

# --------------------------------------------------------------------------------- values

case("eta-above-1", "values", ("`eta`", "0 < eta < 1", "ratio of resistances"),
     kiln(kv("eta", "{ min = 0.56, max = 0.75 }", "1.2")))
case("eta-spread-max-1.05", "values", ("`eta`", "0 < eta < 1"),
     kiln(kv("eta", "{ min = 0.56, max = 0.75 }", "{ min = 0.56, max = 1.05 }")))
case("eta-one", "values", "0 < eta < 1", kiln(kv("eta", "{ min = 0.56, max = 0.75 }", "1")))
case("eta-zero", "values", "`eta`", kiln(kv("eta", "{ min = 0.56, max = 0.75 }", "0")))
case("eta-percent-over", "values", "0 < eta < 1", kiln(kv("eta", "{ min = 0.56, max = 0.75 }",
                                                       '"120%"')))
case("duty-1.5", "values", ("`duty`", "0 < duty ≤ 1", "fraction of the time on"),
     flash(kv("duty", "0.5", "1.5")))
case("duty-zero", "values", ("`duty`", "greater than zero"), flash(kv("duty", "0.5", "0")))
case("duty-150-percent", "values", "0 < duty ≤ 1", flash(kv("duty", "0.5", '"150%"')))
case("firing-190", "values", ("`firing`", "0° ≤ firing ≤ 180°", "reverse-biased"),
     kiln(('topology = "ac-switch"\ngate = "gate"',
           'topology = "ac-switch"\nfiring = { min = "15 deg", max = "190 deg" }')))
case("firing-negative", "values", "`firing`",
     kiln(('topology = "ac-switch"\ngate = "gate"',
           'topology = "ac-switch"\nfiring = { min = "-5 deg", max = "150 deg" }')))
case("firing-rad-too-big", "values", "180°",
     kiln(('topology = "ac-switch"\ngate = "gate"', 'topology = "ac-switch"\nfiring = "4 rad"')))
case("target-200deg", "values", ("`target`", "target ≤ 180°"),
     kiln(kv("target", '{ min = "30 deg", max = "150 deg" }',
             '{ min = "30 deg", max = "200 deg" }')))
case("ambient-delta", "values", ("temperature difference", "degC"),
     kiln(kv("ambient", '{ min = "-10 degC", max = "45 degC" }', '"35 delta_degC"')))
case("ambient-range-delta", "values", "temperature difference",
     kiln(kv("ambient", '{ min = "-10 degC", max = "45 degC" }',
             '{ min = "0 delta_degC", max = "35 delta_degC" }')))
case("ambient-kelvin-as-rise", "values", ("`ambient`", "K is absolute"),
     kiln(kv("ambient", '{ min = "-10 degC", max = "45 degC" }', '"35 K"')))
case("ambient-below-absolute-zero", "values", "absolute zero",
     kiln(kv("ambient", '{ min = "-10 degC", max = "45 degC" }',
             '{ min = "-300 degC", max = "45 degC" }')))
case("ambient-percent", "values", "percentage tolerance",
     kiln(kv("ambient", '{ min = "-10 degC", max = "45 degC" }', '"25 degC ±10%"')))
case("cold-at-40", "values", ("`at`", "at < 25 °C", "lowest rated temperature"),
     kiln(('cold = { at = "-40 degC"', 'cold = { at = "40 degC"')))
case("cold-at-25", "values", "below 25 °C", kiln(('cold = { at = "-40 degC"',
                                                  'cold = { at = "25 degC"')))
case("cold-at-delta", "values", "temperature difference",
     kiln(('cold = { at = "-40 degC"', 'cold = { at = "-40 delta_degC"')))
case("tj-max-20", "values", ("`tj_max`", "25 °C < tj_max"), kiln(kv("tj_max", '"125 degC"',
                                                                '"20 degC"')))
case("tj-max-400", "values", "`tj_max`", kiln(kv("tj_max", '"125 degC"', '"400 degC"')))
case("vdrm-80MV", "values", ("`vdrm`", "≤ 100 kV", "check the unit prefix"),
     kiln(kv("vdrm", '"800 V"', '"80 MV"')))
case("freq-1e-300", "values", ("`frequency`", "100 mHz ≤ frequency ≤ 100 kHz"),
     kiln(kv("frequency", '"50 Hz"', '"1e-300 Hz"')))
case("freq-1MHz", "values", "`frequency`", kiln(kv("frequency", '"50 Hz"', '"1 MHz"')))
case("voltage-1e308", "values", "`voltage`",
     kiln(kv("voltage", '"230 V +10% -10%"', '"1e308 V"')))
case("timing-c-1e308", "values", "`timing_c`", kiln(kv("timing_c", '"100 nF ±10%"',
                                                       '"1e308 F"')))
case("overflow-prefix", "values", "too large", kiln(kv("vdrm", '"800 V"', '"1e306 kV"')))
case("overflow-number", "values", "finite", kiln(kv("vdrm", '"800 V"', '"1e400 V"')))
case("nan-string", "values", "not a number", kiln(kv("vdrm", '"800 V"', '"nan"')))
case("inf-bare", "values", "NaN and infinity", kiln(kv("eta", "{ min = 0.56, max = 0.75 }",
                                                       "inf")))
case("nan-bare", "values", "NaN and infinity", kiln(kv("eta", "{ min = 0.56, max = 0.75 }",
                                                       "nan")))
case("snubber-r-tiny", "values", "`r`", kiln(kv("r", '"33 ohm ±5%"', '"1e-300 ohm"')))
case("negative-r", "values", "cannot be negative", kiln(kv("r", '"33 ohm ±5%"', '"-33 ohm"')))
case("zero-c", "values", "greater than zero", kiln(kv("c", '"100 nF ±10%"', '"0 nF"')))
case("tolerance-100", "values", "100% or more", kiln(kv("r", '"33 ohm ±5%"', '"33 ohm ±100%"')))
case("tolerance-negative", "values", "tolerance", kiln(kv("r", '"33 ohm ±5%"',
                                                          '"33 ohm ±-5 ohm"')))
case("min-above-max", "values", "min > max", kiln(kv("ambient",
                                                     '{ min = "-10 degC", max = "45 degC" }',
                                                     '{ min = "45 degC", max = "-10 degC" }')))
case("nom-outside", "values", "outside min … max",
     kiln(kv("timing_r", '{ min = "5.6 kohm", max = "155.6 kohm" }',
             '{ min = "5.6 kohm", max = "155.6 kohm", nom = "1 Mohm" }')))
case("range-missing-max", "values", "needs both min and max",
     kiln(kv("timing_r", '{ min = "5.6 kohm", max = "155.6 kohm" }', '{ min = "5.6 kohm" }')))
case("range-unknown-key", "values", ("unknown key `mx`", "did you mean `max`"),
     kiln(kv("timing_r", '{ min = "5.6 kohm", max = "155.6 kohm" }',
             '{ min = "5.6 kohm", mx = "155.6 kohm" }')))
case("range-end-toleranced", "values", "without a tolerance",
     kiln(kv("timing_r", '{ min = "5.6 kohm", max = "155.6 kohm" }',
             '{ min = "5.6 kohm ±5%", max = "155.6 kohm" }')))
case("arithmetic", "values", "arithmetic", kiln(kv("vdrm", '"800 V"', '"2*400 V"')))
case("bool-value", "values", "cannot be true", kiln(kv("vdrm", '"800 V"', "true")))
case("array-value", "values", "must be a value", kiln(kv("vdrm", '"800 V"', '["800 V"]')))
case("empty-value", "values", "empty value", kiln(kv("vdrm", '"800 V"', '""')))
case("turns-ratio-huge", "values", "`turns_ratio`", kiln(kv("turns_ratio", "1.5", "1e6")))
case("turns-ratio-zero", "values", "greater than zero", kiln(kv("turns_ratio", "1.5", "0")))
case("devices-zero", "values", "whole number", kiln(("devices = 2", "devices = 0")))
case("devices-float", "values", "whole number", kiln(("devices = 2", "devices = 2.5")))
case("freewheel-string", "values", "true or false",
     kiln(('topology = "ac-switch"', 'topology = "bridge"\nfreewheel = "yes"')))
case("topology-typo", "values", ('not one of', "did you mean `bridge`"),
     kiln(('topology = "ac-switch"', 'topology = "brige"')))
case("supply-kind-typo", "values", "not one of", kiln(('kind = "ac"', 'kind = "acc"')))
case("step-word", "values", 'must be "line", "dc" or a voltage', kiln(('step = "line"',
                                                                        'step = "peak"')))
case("step-1e308", "values", "`step`", kiln(('step = "line"', 'step = "1e308 V"')))
case("required-negative", "values", "`required`",
     kiln(('required = { min = "100 W", max = "1.4 kW" }',
           'required = { min = "-100 W", max = "1.4 kW" }')))
case("target-wrong-dim", "values", "must be a range of frequency or angle",
     kiln(kv("target", '{ min = "30 deg", max = "150 deg" }', '{ min = "3 V", max = "5 V" }')))
case("enclosure-rise-1000", "values", "`enclosure_rise`", kiln(('enclosure_rise = "10 K"',
                                                                'enclosure_rise = "1000 K"')))
case("rbb-tempco-huge", "values", "`rbb_tempco`", kiln(('pd = "300 mW"\n',
                                                        'pd = "300 mW"\nrbb_tempco = "500 %/K"\n')))
case("value-200k-chars", "values", ("200002 characters long", "needs a voltage"),
     kiln(kv("vdrm", '"800 V"', '"' + "8" * 200_000 + ' V"')))
case("key-200k-chars", "syntax", ("unknown key", "kkkk…(200000 characters)"),
     kiln(('vdrm = "800 V"', 'vdrm = "800 V"\n' + "k" * 200_000 + ' = "1 V"')))
case("name-number", "values", "must be a string", kiln(('name = "Bench kiln element '
                                                        'controller"', "name = 5")))

# ---------------------------------------------------------------------------------- units

case("voltage-for-r", "units", ('"10 V" does not fit', "a resistance"),
     kiln(kv("r", '"33 ohm ±5%"', '"10 V"')))
case("no-unit", "units", "has no unit", kiln(kv("vdrm", '"800 V"', '"800"')))
case("bare-number-voltage", "units", "bare number 800 has no unit",
     kiln(kv("vdrm", '"800 V"', "800")))
case("marking-code", "units", "three-digit marking", kiln(kv("c", '"100 nF ±10%"', '"104"')))
case("rkm-for-voltage", "units", ('"8k0" does not fit', "needs a voltage"),
     kiln(kv("vdrm", '"800 V"', '"8k0"')))
case("cap-rkm-resistance-letter", "units", "not read as a capacitance",
     kiln(kv("c", '"100 nF ±10%"', '"4K7"')))
case("inductance-rkm", "units", "explicit unit", kiln(kv("inductance", '"200 uH"', '"2u2"')))
case("hz-for-time", "units", "a time", kiln(kv("itsm_duration", '"10 ms"', '"10 Hz"')))
case("nf-for-inductance", "units", "an inductance", kiln(kv("inductance", '"200 uH"',
                                                            '"200 nF"')))
case("degc-for-rise", "units", "delta_degC", kiln(('enclosure_rise = "10 K"',
                                                   'enclosure_rise = "10 degC"')))
case("kw-for-rth", "units", "a thermal resistance", kiln(kv("rth_jc", '"1.5 K/W"', '"1.5 kW"')))
case("unit-on-eta", "units", "plain number", kiln(kv("eta", "{ min = 0.56, max = 0.75 }",
                                                     '"0.6 V"')))
case("garbage-unit", "units", "not a unit", kiln(kv("vdrm", '"800 V"', '"800 bananas"')))
case("dvdt-as-voltage", "units", "rate of rise", kiln(kv("dvdt", '"200 V/us"', '"200 V"')))
case("i2t-as-current", "units", "an I²t", kiln(kv("i2t", '"128 A^2*s"', '"128 A"')))
case("angle-as-time", "units", "angle", kiln(kv("target", '{ min = "30 deg", max = "150 deg" }',
                                               '{ min = "30 ms", max = "150 ms" }')))
case("percent-tol-on-temperature", "units", "percentage tolerance",
     kiln(kv("tj_max", '"125 degC"', '"125 degC +10% -10%"')))
case("volt-seconds-as-voltage", "units", "volt-second", kiln(kv("volt_seconds", '"200 V*us"',
                                                               '"200 V"')))

# ------------------------------------------------------------------------- configuration

case("zener-on-free", "configuration", ("`zener`", "free-running", 'sync = "line"'),
     flash(('sync = "free"', 'sync = "free"\nzener = "15 V"')))
case("zener-without-sync", "configuration", ("`zener`", "free-running"),
     flash(('sync = "free"\n', 'zener = "15 V"\n')))
case("firing-and-gate", "configuration", ("both `firing` and `gate`", "Remove `firing`"),
     kiln(('topology = "ac-switch"', 'topology = "ac-switch"\nfiring = "90 deg"')))
case("turns-ratio-direct", "configuration", ("`turns_ratio`", 'coupling = "direct"'),
     flash(('coupling = "direct"', 'coupling = "direct"\nturns_ratio = 2')))
for key, val in (("volt_seconds", '"200 V*us"'), ("isolation", '"4 kV"'),
                 ("required_isolation", '"3 kV"'), ("coupling_capacitance", '"2 pF"')):
    case(f"{key}-direct", "configuration", (f"`{key}`", "pulse transformer"),
         flash(('coupling = "direct"', f'coupling = "direct"\n{key} = {val}')))
case("transformer-no-turns", "configuration", ("turns ratio", "add turns_ratio"),
     kiln(("turns_ratio = 1.5\n", "")))
case("step-dc-on-ac", "configuration", ('step = "dc"', 'write step = "line"'),
     kiln(('step = "line"', 'step = "dc"')))
_SNUB_DC = '\n[stages.snub]\nkind = "rc-snubber"\nacross = "lamp"\nr = "47 ohm"\nc = "47 nF"\n'
case("step-line-on-dc", "configuration", ('step = "line"', 'write step = "dc"'),
     FLASH + _SNUB_DC + 'step = "line"\n')
case("sync-line-on-dc", "configuration", ('sync = "line" needs an AC supply', 'sync = "free"'),
     flash(('sync = "free"', 'sync = "line"\nzener = "15 V"'),
           ('target = { min = "0.5 Hz", max = "2 Hz" }', "")))
case("angle-target-free", "configuration", ("frequency range", 'sync = "free"'),
     flash(('target = { min = "0.5 Hz", max = "2 Hz" }',
            'target = { min = "30 deg", max = "150 deg" }')))
case("freq-target-line", "configuration", ("firing-angle range", 'sync = "line"'),
     kiln(kv("target", '{ min = "30 deg", max = "150 deg" }', '{ min = "40 Hz", max = "60 Hz" }')))
case("free-oscillator-no-firing", "configuration", ("free-running", "Add firing ="),
     kiln(('sync = "line"\n', 'sync = "free"\n'), ('zener = "20 V ±5%"\n', ""),
          kv("target", '{ min = "30 deg", max = "150 deg" }', '{ min = "40 Hz", max = "60 Hz" }')))
case("freewheel-ac-switch", "configuration", ("`freewheel`", "ac-switch"),
     kiln(('topology = "ac-switch"', 'topology = "ac-switch"\nfreewheel = true')))
case("dc-switch-on-ac", "configuration", ("dc-switch stage needs a DC supply", "phase-control"),
     flash(('kind = "dc"', 'kind = "ac"\nfrequency = "50 Hz"')))
case("phase-control-on-dc", "configuration", "needs an AC supply",
     kiln(('kind = "ac"', 'kind = "dc"'), ('frequency = "50 Hz"\n', ""),
          ('sync = "line"\n', ""), ('zener = "20 V ±5%"\n', ""),
          ('target = { min = "30 deg", max = "150 deg" }', "")))
case("dc-with-frequency", "configuration", "DC supply has no frequency",
     flash(('kind = "dc"', 'kind = "dc"\nfrequency = "50 Hz"')))
case("ac-without-frequency", "configuration", "AC supply needs frequency",
     kiln(('frequency = "50 Hz"\n', "")))
case("line-sync-no-zener", "configuration", 'sync = "line" needs zener',
     kiln(('zener = "20 V ±5%"\n', "")))
case("phase-control-no-firing", "configuration", "needs `firing",
     kiln(('gate = "gate"\nload', "load")))
case("unknown-stage-kind", "configuration", ("needs kind", "did you mean `rc-snubber`"),
     kiln(('kind = "rc-snubber"', 'kind = "rc-snuber"')))
case("unknown-part-type", "configuration", ('needs type = "scr"', "did you mean `scr`"),
     kiln(('type = "scr"', 'type = "scrr"')))
case("cold-on-ujt", "configuration", "only an SCR or a triac part has a cold table",
     kiln(('pd = "300 mW"\n', 'pd = "300 mW"\ncold = { at = "-40 degC" }\n')))
case("cold-not-table", "configuration", "cold must be a table",
     kiln(('cold = { at = "-40 degC", igt = "35 mA", vgt = "2 V" }', 'cold = "-40 degC"')))
case("cold-no-at", "configuration", "needs `at`",
     kiln(('cold = { at = "-40 degC", igt = "35 mA", vgt = "2 V" }', 'cold = { igt = "35 mA" }')))
case("load-no-r", "configuration", "needs `r`",
     kiln(('load = { r = "26.5 ohm ±5%", cold_r = "24 ohm" }', 'load = { cold_r = "24 ohm" }')))
case("heatsink-no-rth-sa", "configuration", "needs `rth_sa`",
     kiln(('heatsink = { rth_cs = "0.5 K/W", rth_sa = "1.2 K/W", devices = 2 }',
           'heatsink = { rth_cs = "0.5 K/W" }')))
case("fuse-no-i2t", "configuration", "needs `i2t`",
     kiln(('fuse = { rating = "10 A", i2t = "80 A^2*s" }', 'fuse = { rating = "10 A" }')))
case("kind-list", "syntax", "needs kind = one of", kiln(('kind = "rc-snubber"', "kind = []")))
case("kind-table", "syntax", "needs kind = one of", kiln(('kind = "rc-snubber"',
                                                         "kind = { a = 1 }")))
case("type-list", "syntax", 'needs type = "scr"', kiln(('type = "scr"', 'type = ["scr"]')))
case("huge-verify", "file", ("1024 KiB", "project is at most"),
     setup=_write("p.toml", "# padding\n" * 120_000), command=("verify",))
case("deep-open", "file", ("p.toml:2", "nested too deep"),
     setup=_write("p.toml", "[project]\nname = " + "[" * 5000 + "]" * 5000 + "\n"),
     command=("open",))
case("huge-open", "file", ("1024 KiB", "project is at most"),
     setup=_write("p.toml", "# padding\n" * 120_000), command=("open",))
case("deep-verify", "file", ("p.toml:2", "nested too deep"),
     setup=_write("p.toml", "[project]\nname = " + "[" * 5000 + "]" * 5000 + "\n"),
     command=("verify",))
case("load-not-table", "configuration", "must be a table",
     kiln(('load = { r = "26.5 ohm ±5%", cold_r = "24 ohm" }', 'load = "26.5 ohm"')))
case("load-unknown-key", "configuration", ("unknown key `rr`", "did you mean `r`"),
     kiln(('load = { r = "26.5 ohm ±5%"', 'load = { rr = "26.5 ohm ±5%"')))

# ---------------------------------------------------------------------------------- links

case("scr-missing-part", "links", ('names part "Q9"', "not in [parts]"),
     kiln(('scr = "Q1"', 'scr = "Q9"')))
case("scr-is-ujt", "links", ('needs a scr part', '"U1" is a ujt'),
     kiln(('scr = "Q1"', 'scr = "U1"')))
case("ujt-is-scr", "links", ('needs a ujt part', '"Q1" is a scr'),
     kiln(('ujt = "U1"', 'ujt = "Q1"')))
case("source-missing", "links", ('names stage "trig"', "did you mean `trigger`"),
     kiln(('source = "trigger"', 'source = "trig"')))
case("source-not-oscillator", "links", ("must name a stage of kind", "is phase-control"),
     kiln(('source = "trigger"', 'source = "power"')))
case("across-oscillator", "links", ("must name a stage of kind", "is ujt-oscillator"),
     kiln(('across = "power"', 'across = "trigger"')))
case("for-missing", "links", 'names stage "pwr"', kiln(('for = "power"', 'for = "pwr"')))
case("for-dc-switch-kind", "links", "must name a stage of kind",
     flash(('for = "lamp"', 'for = "blink"')))
case("gate-names-power", "links", "must name a stage of kind",
     kiln(('gate = "gate"', 'gate = "power"')))
case("scr-list-missing", "links", 'names part "Q2"', kiln(('scr = "Q1"', 'scr = ["Q1", "Q2"]')))
case("scr-empty-list", "links", "designator or a list", kiln(('scr = "Q1"', "scr = []")))
case("scr-number", "links", "designator or a list", kiln(('scr = "Q1"', "scr = 1")))
case("part-not-table", "links", "must be a table [parts.Q3]",
     kiln(("[parts.U1]", '[parts]\nQ3 = "x"\n[parts.U1]')))
case("put-is-ujt", "links", ("needs a put part", "is a ujt"),
     flash(('put = "U2"', 'put = "U3"')) + '\n[parts.U3]\ntype = "ujt"\neta = 0.6\n'
     'rbb = "7 kohm"\nip = "5 uA"\niv = "4 mA"\nvv = "2 V"\nvd = "0.5 V"\n')

# ------------------------------------------------------------------------------- variants

def _variant(ref: str, extra: Callable[[Path], None] | None = None) -> Setup:
    def setup(d: Path) -> list[str]:
        (d / "base.toml").write_text(KILN, encoding="utf-8")
        if extra is not None:
            extra(d)
        v = d / "v.toml"
        v.write_text(f'[project]\nname = "variant"\nrevision = "A"\nvariant_of = {ref}\n',
                     encoding="utf-8")
        return [str(v)]
    return setup


def _outside(d: Path) -> None:
    (d / "sneak.toml").symlink_to("/etc/passwd")


def _base_fifo(d: Path) -> None:
    os.mkfifo(d / "pipe.toml")


def _circle(d: Path) -> None:
    (d / "w.toml").write_text('[project]\nname = "w"\nrevision = "A"\nvariant_of = "v.toml"\n')


def _base_dir(d: Path) -> None:
    (d / "dir.toml").mkdir()


def _bad_base(d: Path) -> None:
    (d / "broken.toml").write_text(edit(KILN, kv("eta", "{ min = 0.56, max = 0.75 }", "1.3")))


def _sub_base(d: Path) -> None:
    (d / "sub").mkdir()
    (d / "sub" / "inner.toml").write_text('[project]\nname = "i"\nrevision = "A"\n'
                                          'variant_of = "../base.toml"\n')


_WHERE = "outside the folder of the project that names it"
case("variant-parent", "variants", (_WHERE, "a folder below it"), setup=_variant('"../x.toml"'))
case("variant-passwd", "variants", _WHERE, setup=_variant('"../../../../../../etc/passwd"'))
case("variant-absolute", "variants", _WHERE, setup=_variant('"/etc/passwd"'))
case("variant-shadow", "variants", _WHERE, setup=_variant('"/etc/shadow"'))
case("variant-link-outside", "variants", _WHERE, setup=_variant('"sneak.toml"', _outside))
case("variant-not-toml", "variants", "must name a project file NAME.toml",
     setup=_variant('"base.txt"'))
case("variant-missing", "variants", ('"nope.toml" does not exist', "relative to this file"),
     setup=_variant('"nope.toml"'))
case("variant-self", "variants", "makes a circle", setup=_variant('"v.toml"'))
case("variant-circle", "variants", ("makes a circle", "w.toml"), setup=_variant('"w.toml"',
                                                                               _circle))
case("variant-fifo", "variants", "named pipe", setup=_variant('"pipe.toml"', _base_fifo))
case("variant-dir", "variants", "folder", setup=_variant('"dir.toml"', _base_dir))
case("variant-number", "variants", "must be a file name", setup=_variant("5"))
case("variant-empty", "variants", "must be a file name", setup=_variant('""'))
case("variant-bad-base", "variants", ("broken.toml", "`eta`"), setup=_variant('"broken.toml"',
                                                                              _bad_base))
case("variant-chain-escapes", "variants", (_WHERE, "inner.toml"),
     setup=lambda d: (_sub_base(d), _variant('"sub/inner.toml"')(d))[1])

# -------------------------------------------------------------------------------- records

def _record(make: Callable[[Path], None]) -> Setup:
    def setup(d: Path) -> list[str]:
        (d / "k.toml").write_text(KILN, encoding="utf-8")
        make(d / "k.review.toml")
        return [str(d / "k.toml")]
    return setup


def _rec_link(p: Path) -> None:
    other = p.parent / "other.toml"
    other.write_text(FLASH)
    p.symlink_to(other)


def _rec_dangling(p: Path) -> None:
    p.symlink_to(p.parent / "elsewhere" / "made.toml")


def _rec_readonly(p: Path) -> None:
    p.write_text('[review]\nproject = "k.toml"\n')
    os.chmod(p, 0o444)


def _rec_fifo(p: Path) -> None:
    os.mkfifo(p)


def _rec_loop(p: Path) -> None:
    p.symlink_to(p)


def _rec_dir(p: Path) -> None:
    p.mkdir()


for name, make, words in (("link", _rec_link, ("symbolic link", "other.toml")),
                          ("dangling-link", _rec_dangling, ("symbolic link", "made.toml")),
                          ("read-only", _rec_readonly, ("read-only", "444")),
                          ("fifo", _rec_fifo, ("named pipe",)),
                          ("loop", _rec_loop, ("loops",))):
    case(f"record-{name}-check", "records", words, setup=_record(make),
         command=("check", "--record"))
    case(f"record-{name}-sign", "records", words, setup=_record(make),
         command=("sign", "--stage", "power", "--note", "looked at it"))
    case(f"record-{name}-waive", "records", words, setup=_record(make),
         command=("waive", "--stage", "power", "--check", "power.blocking", "--note",
                  "the lid switch opens both poles of the element"))
    if name in ("fifo", "loop"):  # reading through a link, or a read-only file, is fine
        case(f"record-{name}-verify", "records", words, setup=_record(make),
             command=("verify",))
case("record-dir-check", "records", "cannot", setup=_record(_rec_dir), command=("check",
                                                                             "--record"))
_DEEP_RECORD = '[review]\nproject = "k.toml"\nx = ' + "[" * 5000 + "]" * 5000 + "\n"
for cmd in (("check", "--record"), ("sign", "--stage", "power", "--note", "looked at it"),
            ("waive", "--stage", "power", "--check", "power.blocking", "--note",
             "the lid switch opens both poles of the element"),
            ("revoke", "--entry", "1", "--note", "signed the wrong revision"), ("verify",),
            ("status",), ("report", "--format", "md")):
    case(f"record-deep-{cmd[0]}", "records",
         ("k.review.toml:3", "nested too deep", "restore it from version control"),
         setup=_record(lambda p: p.write_text(_DEEP_RECORD)), command=cmd)
case("record-deep-diff", "records", ("k.review.toml:3", "nested too deep"),
     setup=lambda d: (_record(lambda p: p.write_text(_DEEP_RECORD))(d),
                      [str(d / "k.review.toml"), str(d / "k.review.toml")])[1],
     command=("diff",))
case("record-nesting-40", "records", ("k.review.toml:3", "nested more than 32"),
     setup=_record(lambda p: p.write_text('[review]\nproject = "k.toml"\nx = ' + "[" * 40
                                          + "]" * 40 + "\n")), command=("verify",))
case("record-not-utf8", "records", "not UTF-8",
     setup=_record(lambda p: p.write_bytes(b"\xff\xfe[review]")), command=("check", "--record"))
case("record-not-toml", "records", "not valid TOML",
     setup=_record(lambda p: p.write_text("[review\n")), command=("check", "--record"))
case("sign-unknown-stage", "records", ("no stage `pwr`", "the stages are"),
     setup=_record(lambda p: None), command=("sign", "--stage", "pwr"))
case("waive-unknown-stage", "records", "no stage `pwr`", setup=_record(lambda p: None),
     command=("waive", "--stage", "pwr", "--check", "power.blocking", "--note",
              "the lid switch opens both poles of the element"))


def _lock(make: Callable[[Path], None]) -> Setup:
    def setup(d: Path) -> list[str]:
        (d / "k.toml").write_text(KILN, encoding="utf-8")
        make(d / "k.lock")
        return [str(d / "k.toml")]
    return setup


def _lock_other(p: Path) -> None:
    (p.parent / "other.toml").write_text(FLASH)
    p.symlink_to("other.toml")


def _lock_huge(p: Path) -> None:
    p.write_text("{" + " " * 100_000 + "}")


_LOCK_CMDS = {"sign": ("sign", "--stage", "power", "--note", "looked at it"),
              "waive": ("waive", "--stage", "power", "--check", "power.blocking", "--note",
                        "the lid switch opens both poles of the element"),
              "check": ("check", "--record")}
for name, make, what in (("fifo", os.mkfifo, "named pipe"),
                         ("zero", lambda p: p.symlink_to("/dev/zero"), "symbolic link"),
                         ("link", _lock_other, "symbolic link (to other.toml)"),
                         ("dangling", lambda p: p.symlink_to("gone"), "symbolic link"),
                         ("dir", lambda p: p.mkdir(), "folder"),
                         ("huge", _lock_huge, "100002 bytes")):
    for tag, cmd in _LOCK_CMDS.items():
        case(f"lock-{name}-{tag}", "records", ("k.lock", what, "--break-lock"),
             setup=_lock(make), command=cmd)


def _signed(d: Path) -> list[str]:
    (d / "k.toml").write_text(KILN, encoding="utf-8")
    assert main(["sign", str(d / "k.toml"), "--stage", "power", "--note", "looked at it"]) == 0
    assert main(["revoke", str(d / "k.toml"), "--entry", "1", "--note",
                 "signed against the wrong drawing revision"]) == 0
    assert main(["sign", str(d / "k.toml"), "--stage", "gate"]) == 0
    return [str(d / "k.toml")]


for tag, cmd in (("short-note", ("--note", "x")), ("no-note", ()),
                 ("long-note", ("--note", "x" * 5000))):
    case(f"revoke-no-entry-{tag}", "records",
         ("there is no entry #9", "Entries that can be revoked: #3 signoff of stage gate"),
         setup=_signed, command=("revoke", "--entry", "9", *cmd))
case("revoke-a-revocation", "records", ("entry #2 is a revoke", "can be revoked: #3"),
     setup=_signed, command=("revoke", "--entry", "2", "--note", "x"))
case("revoke-without-note", "records", ("say why entry #3 no longer holds", "--note TEXT"),
     setup=_signed, command=("revoke", "--entry", "3"))


def _report_to(make: Callable[[Path], None]) -> Setup:
    def setup(d: Path) -> list[str]:
        (d / "k.toml").write_text(KILN, encoding="utf-8")
        make(d / "out.md")
        return [str(d / "k.toml"), "-o", str(d / "out.md")]
    return setup


case("report-to-link", "records", ("out.md", "symbolic link", "Nothing was written"),
     setup=_report_to(lambda p: p.symlink_to(p.parent / "elsewhere.md")),
     command=("report", "--format", "md"))
case("report-to-read-only", "records", ("out.md", "read-only"),
     setup=_report_to(lambda p: (p.write_text("old"), os.chmod(p, 0o444))),
     command=("report", "--format", "md"))
case("report-html-to-link", "records", ("out.md", "symbolic link"),
     setup=_report_to(lambda p: p.symlink_to(p.parent / "elsewhere.md")),
     command=("report", "--format", "html"))
case("project-link-write", "records", "symbolic link",
     setup=lambda d: (_rec_link(d / "k.review.toml"), (d / "k.toml").write_text(KILN),
                      [str(d / "k.toml")])[2], command=("check", "--record"))

# --------------------------------------------------------------------------- hostile text

case("esc-in-key", "hostile text", ("unknown key", "\\x1b]0;"),
     kiln(('vdrm = "800 V"', 'vdrm = "800 V"\n"v\\u001b]0;owned\\u0007" = "1 V"')))
case("bidi-in-key", "hostile text", ("unknown key", "⟨U+202E⟩"),
     kiln(('vdrm = "800 V"', 'vdrm = "800 V"\n"vdrm\\u202e" = "1 V"')))
case("esc-in-value", "hostile text", ("cannot read", "\\x1b[2J"),
     kiln(kv("vdrm", '"800 V"', '"800\\u001b[2J V"')))
case("osc8-in-value", "hostile text", "\\x1b]8;;",
     kiln(kv("vdrm", '"800 V"', '"\\u001b]8;;http://x\\u001b\\\\800 V"')))
case("esc-in-part-link", "hostile text", ('names part', "\\x1b[31m"),
     kiln(('scr = "Q1"', 'scr = "Q\\u001b[31m1"')))
case("bidi-in-stage-link", "hostile text", ("names stage", "⟨U+202E⟩"),
     kiln(('for = "power"', 'for = "pow\\u202eer"')))
case("esc-in-kind", "hostile text", ("needs kind", "\\x1b"),
     kiln(('kind = "rc-snubber"', 'kind = "rc\\u001b[2Jsnubber"')))
case("c1-csi-in-choice", "hostile text", ("not one of", "\\x9b"),
     kiln(('topology = "ac-switch"', 'topology = "ac\\u009b2Jswitch"')))
case("bel-in-table-name", "hostile text", ("unknown table", "\\x07"),
     KILN + '\n["x\\u0007y"]\nz = 1\n')
case("esc-in-variant", "hostile text", ("\\x1b]0;", "does not exist"),
     setup=_variant('"b\\u001b]0;t\\u0007.toml"'))
case("esc-in-file-name", "hostile text", ("no such file", "\\x1b]0;"),
     setup=lambda d: [str(d / "k\x1b]0;owned\x07.toml")])
case("bidi-in-file-name", "hostile text", ("no such file", "⟨U+202E⟩"),
     setup=lambda d: [str(d / "k\u202elmth.toml")])
case("esc-in-checklist", "hostile text", ("checklist", "\\x1b"),
     kiln(('line = "kiln"', 'line = "kiln"\nchecklist = "x\\u001b[2J.checklist.toml"')))
case("esc-in-range-key", "hostile text", ("unknown key", "\\x1b"),
     kiln(kv("timing_r", '{ min = "5.6 kohm", max = "155.6 kohm" }',
             '{ min = "5.6 kohm", "m\\u001bx" = "155.6 kohm" }')))
case("esc-in-stage-arg", "hostile text", ("no stage", "\\x1b]0;"),
     setup=_record(lambda p: None), command=("sign", "--stage", "x\x1b]0;t\x07"))
case("bidi-in-unit", "hostile text", "⟨U+202E⟩", kiln(kv("vdrm", '"800 V"', '"800 \\u202eV"')))

# ------------------------------------------------------------------- warnings (loads, warns)

WARNINGS: list[tuple[str, str, tuple[str, ...]]] = [
    ("vdrm-20kV", kiln(kv("vdrm", '"800 V"', '"20 kV"')), ("`vdrm`", "usual 10 V … 10 kV")),
    ("freq-10Hz", kiln(kv("frequency", '"50 Hz"', '"10 Hz"')), ("`frequency`", "usual")),
    ("ambient-100C", kiln(kv("ambient", '{ min = "-10 degC", max = "45 degC" }',
                             '{ min = "-10 degC", max = "100 degC" }')), ("`ambient`", "85 °C")),
    ("eta-0.95", kiln(kv("eta", "{ min = 0.56, max = 0.75 }", "{ min = 0.56, max = 0.95 }")),
     ("`eta`", "0.4 … 0.9")),
    ("igt-2A", kiln(kv("igt", '"15 mA"', '"2 A"')), ("`igt`", "usual")),
    ("tq-5ms", kiln(kv("tq", '"80 us"', '"5 ms"')), ("`tq`", "usual")),
    ("timing-c-10mF", flash(kv("timing_c", '"1 uF ±10%"', '"10 mF ±10%"')), ("`timing_c`",)),
    ("duty-tiny", flash(kv("duty", "0.5", "0.0001")), ("`duty`", "0.001 … 1")),
    ("supply-2kV", flash(kv("voltage", '"24 V ±10%"', '"2 kV ±10%"')), ("`voltage`",)),
    ("cold-at-10C", kiln(('cold = { at = "-40 degC"', 'cold = { at = "10 degC"')),
     ("`at`", "−65 °C … 0 °C")),
    ("tj-max-80C", kiln(kv("tj_max", '"125 degC"', '"80 degC"')), ("`tj_max`",)),
]


# -------------------------------------------------------------------------------- tests

RAW = ("\x1b", "\x07", "\x9b", "\u202e", "\u2066")


def snapshot(folder: Path) -> dict[str, tuple[object, ...]]:
    """Every entry under ``folder``: kind, content hash or link target, mode, owner (pipes and
    devices are never opened)."""
    out: dict[str, tuple[object, ...]] = {}
    for root, dirs, files in os.walk(folder, followlinks=False):
        for name in dirs + files:
            p = Path(root) / name
            st = os.lstat(p)
            key = str(p.relative_to(folder))
            if stat.S_ISLNK(st.st_mode):
                out[key] = ("link", os.readlink(p))
            elif stat.S_ISREG(st.st_mode):
                out[key] = ("file", hashlib.sha256(p.read_bytes()).hexdigest(), st.st_mode,
                            st.st_uid, st.st_gid)
            else:
                out[key] = ("other", st.st_mode)
    return out


def test_the_table_covers_every_family():
    families = Counter(c.family for c in CASES)
    assert set(families) == {"file", "syntax", "values", "units", "configuration", "links",
                             "variants", "records", "hostile text"}
    assert len(CASES) + len(WARNINGS) >= 150
    assert len({c.id for c in CASES}) == len(CASES)


@pytest.mark.parametrize("c", CASES, ids=[c.id for c in CASES])
def test_bad_input(c: Case, tmp_path: Path, capsys: pytest.CaptureFixture[str],
                   monkeypatch: pytest.MonkeyPatch):
    monkeypatch.chdir(tmp_path)
    if c.setup is not None:
        args = c.setup(tmp_path)
    else:
        p = tmp_path / "p.toml"
        p.write_text(c.text or "", encoding="utf-8")
        args = [str(p)]
    before = snapshot(tmp_path)
    cmd = list(c.command)
    code = main([cmd[0], *args, *cmd[1:]])
    out, err = capsys.readouterr()
    text = out + err
    assert code == c.code, text
    assert "Traceback" not in text
    for word in c.words:
        assert word in text, f"{word!r} not in {text!r}"
    if c.id.startswith("revoke-no-entry") or c.id == "revoke-a-revocation":
        assert "too short" not in text and "reason" not in text
    for raw in RAW:
        assert raw not in text
    assert snapshot(tmp_path) == before


@pytest.mark.parametrize("name,text,words", WARNINGS, ids=[w[0] for w in WARNINGS])
def test_unusual_value_warns(name: str, text: str, words: tuple[str, ...], tmp_path: Path,
                             capsys: pytest.CaptureFixture[str]):
    p = tmp_path / "p.toml"
    p.write_text(text, encoding="utf-8")
    code = main(["check", str(p), "--json"])
    out, err = capsys.readouterr()
    assert code in (0, 1) and "Traceback" not in out + err
    [project] = json.loads(out)["projects"]
    warnings = project["warnings"]
    assert len(warnings) == 1, warnings
    for word in words:
        assert word in warnings[0]
    assert "p.toml" in warnings[0] and "check the value" in warnings[0]
    main(["check", str(p)])
    table = capsys.readouterr().out
    assert f"warning: {warnings[0]}" in table.replace("\n", " ") or \
        "warning:" in table and words[0] in table


def test_demos_load_without_warnings(capsys: pytest.CaptureFixture[str]):
    root = Path(__file__).resolve().parents[2] / "projects"
    demos = [*root.glob("*.toml"), *(root / "kiln-line").glob("kiln-*[0-9a-z].toml")]
    demos = [d for d in demos if not d.name.endswith((".review.toml", ".checklist.toml"))]
    assert len(demos) >= 7
    for d in demos:
        assert main(["check", str(d), "--json"]) in (0, 1)
        assert json.loads(capsys.readouterr().out)["projects"][0]["warnings"] == [], d.name


def test_a_byte_order_mark_is_accepted(tmp_path: Path, capsys: pytest.CaptureFixture[str]):
    p = tmp_path / "bom.toml"
    p.write_bytes(b"\xef\xbb\xbf" + (Path(__file__).resolve().parents[2] / "projects" /
                                     "flasher-dc.toml").read_bytes())
    assert main(["check", str(p), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["projects"][0]["name"] == "Beacon flasher, 24 V"


def test_a_byte_order_mark_on_a_review_record_is_accepted(tmp_path: Path,
                                                        capsys: pytest.CaptureFixture[str]):
    """An editor that saves with a BOM does not make the history unreadable; the next
    entry is appended and the history still verifies."""
    p = tmp_path / "k.toml"
    p.write_text(KILN, encoding="utf-8")
    assert main(["sign", str(p), "--stage", "power", "--note", "looked at it"]) == 0
    rec = tmp_path / "k.review.toml"
    rec.write_bytes(b"\xef\xbb\xbf" + rec.read_bytes())
    assert main(["verify", str(p)]) == 0
    assert main(["sign", str(p), "--stage", "gate", "--note", "looked at it too"]) == 0
    assert main(["verify", str(p)]) == 0
    out = capsys.readouterr().out
    assert "history verifies: 2 entries" in out


def test_listing_a_folder_reads_no_more_than_a_project_may_hold(tmp_path: Path):
    """Which files of a folder are projects is judged without reading a huge file whole (its
    own load then says it is too large)."""
    import tracemalloc

    import reviewer.project  # noqa: F401  (imported first: its import is not the read)
    from reviewer.batch import skip_reason

    huge = tmp_path / "huge.toml"
    huge.write_text("#" * (20 << 20))
    tracemalloc.start()
    try:
        assert skip_reason(huge) is None
        peak = tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()
    assert peak < 4 << 20, peak
