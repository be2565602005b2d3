"""Fuzzing the inputs: the value grammar either gives a finite, ordered value or a grammar error;
random mutations of the demo projects never give a traceback, only exit 0, 1 or 2 (in-process
``reviewer.cli.main`` for speed). Fixed seed (derandomised), so a failure repeats."""

from __future__ import annotations

import contextlib
import io
import math
import re
import tempfile
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from reviewer.cli import main
from reviewer.errors import ValueGrammarError, Where
from reviewer.units import DIMS, parse_value

PROJECTS = Path(__file__).resolve().parents[2] / "projects"
DEMOS = {name: (PROJECTS / name).read_text(encoding="utf-8")
         for name in ("kiln-230.toml", "flasher-dc.toml")}
FAST = settings(derandomize=True, deadline=None, database=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])

# --------------------------------------------------------------------------- value grammar

NUMBERS = st.one_of(st.integers(-10**6, 10**6).map(str),
                    st.floats(allow_nan=True, allow_infinity=True).map(repr),
                    st.sampled_from(["0", "1e308", "1e-308", "4.7", ".5", "1.", "-0", "1e999",
                                     "nan", "inf", "2*3", "1_000", "0x10", "٣"]))
UNITS = st.sampled_from(["", " V", " mV", "kV", " ohm", " kohm", " Ω", "k", "R", "n", "u", "µ",
                         " nF", " uH", " Hz", " deg", " rad", " degC", " delta_degC", " K",
                         " K/W", " A^2*s", " V/us", " A/us", " V*us", " %/K", "%", " W",
                         " uJ", " s", " bananas", " V V", " °C", " ohm**2", " 1/K"])
TOLS = st.sampled_from(["", " ±5%", " +/-10%", " +10% -15%", " ±100%", " ±-5%", " ±0.1 V",
                        " ±1 K", " + 5%", " ±", " ±5 bananas", " +10%"])
TEXTS = st.one_of(st.builds(lambda n, u, t: n + u + t, NUMBERS, UNITS, TOLS),
                  st.text(max_size=20))
RAWS = st.one_of(TEXTS, st.floats(), st.integers(), st.booleans(), st.none(),
                 st.dictionaries(st.sampled_from(["min", "max", "nom", "mid"]),
                                 st.one_of(TEXTS, st.floats(), st.integers()), max_size=4),
                 st.lists(TEXTS, max_size=2))


@settings(FAST, max_examples=800)
@given(raw=RAWS, dim=st.sampled_from(sorted(DIMS)), zero=st.booleans(), neg=st.booleans())
def test_value_grammar_gives_a_value_or_a_grammar_error(raw, dim, zero, neg):
    try:
        v = parse_value(raw, dim, Where("f.toml", "t", "k"), allow_zero=zero, allow_negative=neg)
    except ValueGrammarError as exc:
        assert str(exc).startswith("f.toml [t] key `k`: ")
        return
    assert all(math.isfinite(x) for x in (v.lo, v.nom, v.hi))
    assert v.lo <= v.nom <= v.hi
    if dim == "temperature":
        assert v.lo > 0
    elif not neg:
        assert v.lo >= 0 and (zero or v.lo > 0)


# ------------------------------------------------------------------ project mutations

KEY_LINE = re.compile(r'^(\s*)([A-Za-z_"][\w"]*)\s*=\s*(.+)$')
POOL = ['"0 V"', '"-1 ohm"', '"1e308 V"', '"1e-300 Hz"', "nan", "inf", "0", "1.2", "-3", "true",
        '"line"', '"dc"', '"free"', '"direct"', '"transformer"', "[]", '["Q1", "U1"]', '"Q1"',
        '"U1"', '"power"', '"trigger"', '{ min = "1 V", max = "0 V" }', '{ min = 0.2, max = 0.9 }',
        '"190 deg"', '{ min = "10 deg", max = "170 deg" }', '"35 delta_degC"', '"40 degC"',
        '"80 MV"', '"4k7"', '"100n"', '"10 kohm ±5%"', '"50 Hz"', '"2 A"', '"1 mH"', '"5 ms"',
        '"1 uF ±10%"', '"\\u001b]0;x\\u0007"', '"\\u202e"', '{}', '{ r = "10 ohm" }', '"0.5"']
NEW_KEYS = ["zener = \"15 V\"", "firing = \"90 deg\"", "turns_ratio = 2", "step = \"dc\"",
            "freewheel = true", "sync = \"line\"", "duty = 1.5", "gate = \"gate\"",
            "coupling = \"transformer\"", "variant_of = \"../x.toml\"", "tq = \"1 s\"",
            "cold = { at = \"30 degC\" }", "leakage = \"1 A\"", "target = \"100 Hz\""]


def _mutate(text: str, ops: list[tuple[int, int, int]]) -> str:
    lines = text.splitlines()
    for op, a, b in ops:
        if not lines:
            break
        i = a % len(lines)
        m = KEY_LINE.match(lines[i])
        if op == 0 and m:  # replace a value
            lines[i] = f"{m.group(1)}{m.group(2)} = {POOL[b % len(POOL)]}"
        elif op == 1:  # drop a line
            del lines[i]
        elif op == 2:  # add a key that may not fit the configuration
            lines.insert(i, NEW_KEYS[b % len(NEW_KEYS)])
        elif op == 3:  # duplicate a line
            lines.insert(i, lines[i])
        elif op == 4:  # cut a line short
            lines[i] = lines[i][: b % (len(lines[i]) + 1)]
        elif op == 5:  # move a line elsewhere
            lines.insert(b % len(lines), lines.pop(i))
    return "\n".join(lines) + "\n"


OPS = st.lists(st.tuples(st.integers(0, 5), st.integers(0, 10**6), st.integers(0, 10**6)),
               min_size=1, max_size=4)


@settings(FAST, max_examples=150)
@given(demo=st.sampled_from(sorted(DEMOS)), ops=OPS)
def test_mutated_demo_never_gives_a_traceback(demo, ops):
    text = _mutate(DEMOS[demo], ops)
    with tempfile.TemporaryDirectory() as d:
        p = Path(d) / demo
        p.write_text(text, encoding="utf-8")
        out, err = io.StringIO(), io.StringIO()
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            code = main(["check", str(p), "--json"])
    assert code in (0, 1, 2), err.getvalue()
    if code == 2:
        assert err.getvalue().startswith("latchbook: ") and "Traceback" not in err.getvalue()


# ------------------------------------------------- every command, and the review records

LINE = PROJECTS / "kiln-line"
COMMANDS = [("check", "--record"), ("report", "--format", "md"), ("status",),
            ("status", "--matrix"), ("verify",), ("sign", "--stage", "power", "--note",
                                                  "looked at the power stage"),
            ("waive", "--stage", "power", "--check", "power.blocking", "--note",
             "the lid switch opens both poles of the element"),
            ("revoke", "--entry", "1", "--note", "signed against the wrong drawing"),
            ("diff", "<other>"), ("export", "--spice", "power")]


def _run(argv: list[str]) -> tuple[int, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(argv)
    return code, out.getvalue() + err.getvalue()


def _argv(cmd: tuple[str, ...], project: Path, other: Path) -> list[str]:
    rest = [str(other) if a == "<other>" else a for a in cmd[1:]]
    return [cmd[0], str(project), *rest]


@settings(FAST, max_examples=60)
@given(demo=st.sampled_from(sorted(DEMOS)), ops=OPS, cmd=st.sampled_from(COMMANDS))
def test_every_command_on_a_mutated_demo_never_gives_a_traceback(demo, ops, cmd):
    with tempfile.TemporaryDirectory() as d:
        p = Path(d) / demo
        p.write_text(_mutate(DEMOS[demo], ops), encoding="utf-8")
        other = Path(d) / "other.toml"
        other.write_text(DEMOS[demo], encoding="utf-8")
        code, text = _run(_argv(cmd, p, other))
    assert code in (0, 1, 2), text
    assert "Traceback" not in text


@settings(FAST, max_examples=60)
@given(ops=OPS, cmd=st.sampled_from(COMMANDS))
def test_every_command_on_a_mutated_review_record_never_gives_a_traceback(ops, cmd):
    """A record is written only by Latchbook, but a hand edit, a bad merge or a truncated copy
    reaches every command that reads it: exit 0, 1 or 2, never a traceback."""
    record = (LINE / "kiln-120-1k.review.toml").read_text(encoding="utf-8")
    with tempfile.TemporaryDirectory() as d:
        folder = Path(d)
        for name in ("kiln-120-1k.toml", "kiln-base.toml", "kiln-line.checklist.toml"):
            (folder / name).write_text((LINE / name).read_text(encoding="utf-8"),
                                       encoding="utf-8")
        (folder / "kiln-120-1k.review.toml").write_text(_mutate(record, ops), encoding="utf-8")
        p = folder / "kiln-120-1k.toml"
        code, text = _run(_argv(cmd, p, folder / "kiln-base.toml"))
    assert code in (0, 1, 2), text
    assert "Traceback" not in text
