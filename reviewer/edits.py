"""Edits of a hand-written project file that keep its comments and layout (tomlkit).

Pure text in, text out: :func:`set_value` puts one value at a dotted path (``supply.voltage``,
``parts.Q1.igt``, ``stages.power.load.r``) and leaves every other byte of the file alone, the
comment after the edited value included. :func:`apply_edit` also re-reads the result with
``tomllib`` and checks that exactly the intended value changed (nothing else moved), then
validates the whole project with the loader the files use, so a typed value is accepted by the
same grammar as a value in the file.
"""

from __future__ import annotations

import math
import re
import tomllib
from pathlib import Path
from typing import Any

import tomlkit
from tomlkit.container import Container
from tomlkit.items import InlineTable, Table

from reviewer.errors import ProjectError, ValueGrammarError, Where
from reviewer.model import Project
from reviewer.project import load_project_text

_MISSING = object()

BOM = "\ufeff"  # a UTF-8 byte-order mark, as decoded text


def split_path(path: str) -> list[str]:
    """The keys of a dotted path; every key must be non-empty."""
    keys = path.split(".")
    if len(keys) < 2 or not all(keys):
        raise ProjectError(f"`{path}` is not a value's place; write e.g. supply.voltage or "
                           "stages.trigger.timing_r")
    return keys


def parse_typed(text: str, key: str = "") -> Any:
    """What the user typed in an edit field, as the TOML value it stands for.

    A TOML literal (a number, ``true``, a quoted string, an inline table such as
    ``{ min = "10 kohm", max = "110 kohm" }``) is read as TOML; anything else is a string as
    written, so ``4k7`` or ``47 kohm ±5%`` need no quotes.

    >>> parse_typed("4k7"), parse_typed("0.65"), parse_typed('{ min = 1, max = 2 }')
    ('4k7', 0.65, {'min': 1, 'max': 2})
    """
    stripped = text.strip()
    if not stripped:
        raise ValueGrammarError("empty value: type a value such as 47 kohm, 4k7 or "
                                '{ min = "10 kohm", max = "110 kohm" }', Where(key=key))
    try:
        doc = tomllib.loads(f"v = {stripped}")
    except RecursionError:
        raise ValueGrammarError("brackets or braces nested too deep to read; a value is a "
                                'number with its unit, or { min = "…", max = "…" }',
                                Where(key=key)) from None
    except tomllib.TOMLDecodeError:
        if stripped.startswith("{") or stripped.startswith("["):
            raise ValueGrammarError(
                f"cannot read {stripped!r} as a table; write e.g. "
                '{ min = "10 kohm", max = "110 kohm" } (values in quotes)',
                Where(key=key)) from None
        return stripped
    value = doc["v"]
    if isinstance(value, float) and not math.isfinite(value):
        raise ValueGrammarError(f"`{key or 'value'}` is {value}: NaN and infinity are not "
                                "values", Where(key=key))
    return value


def toml_text(raw: Any) -> str:
    """The TOML spelling of a raw value, inline tables with spaces: ``{ min = "1", max = "2" }``.

    >>> toml_text({"min": "5 kohm", "max": "100 kohm"})
    '{ min = "5 kohm", max = "100 kohm" }'
    """
    if isinstance(raw, dict):
        inner = ", ".join(f"{_key(k)} = {toml_text(v)}" for k, v in raw.items())
        return "{ " + inner + " }" if inner else "{}"
    if isinstance(raw, list):
        return "[" + ", ".join(toml_text(v) for v in raw) + "]"
    return tomlkit.item(raw).as_string()


def shown_text(raw: Any) -> str:
    """How a raw value is offered for editing: strings bare, everything else as TOML."""
    return raw if isinstance(raw, str) else toml_text(raw)


def _key(k: str) -> str:
    return k if k.replace("_", "").replace("-", "").isalnum() else tomlkit.item(k).as_string()


def _item(raw: Any) -> Any:
    """A tomlkit item for ``raw`` (parsed from its text, so inline tables keep our spacing)."""
    return tomlkit.parse(f"v = {toml_text(raw)}")["v"]


def get_raw(text: str, path: str) -> Any:
    """The raw TOML value at ``path`` in ``text``, or None when the file does not give it."""
    node: Any = tomllib.loads(text.removeprefix(BOM))
    for k in split_path(path):
        if not isinstance(node, dict) or k not in node:
            return None
        node = node[k]
    return node


def set_value(text: str, path: str, raw: Any) -> str:
    """``text`` with the value at ``path`` set to ``raw``; comments and layout kept.

    Missing tables on the way are created (a variant overriding one value of its base gets a
    ``[stages.ID]`` table of its own). ``raw`` is a TOML value: a string, a number, a boolean or
    a dict (written as an inline table). The trailing comment of a replaced value stays.

    >>> print(set_value('[s]\\nv = "1 V"   # why\\n', "s.v", "2 V"), end="")
    [s]
    v = "2 V"   # why
    """
    keys = split_path(path)
    doc = tomlkit.parse(text)
    node: Any = doc
    for depth, k in enumerate(keys[:-1]):
        if k not in node:
            if isinstance(node, InlineTable):
                node[k] = tomlkit.inline_table()
            else:
                # A table holding only sub-tables ([stages] above [stages.ID]) stays implicit.
                node[k] = tomlkit.table(is_super_table=depth == 0)
        node = node[k]
        if not isinstance(node, (Table, InlineTable, Container, dict)):
            raise ProjectError(f"`{'.'.join(keys[: depth + 1])}` is a value, not a table, so "
                               f"`{path}` cannot be set")
    last = keys[-1]
    new = _item(raw)
    old = node.get(last, _MISSING) if hasattr(node, "get") else _MISSING
    if old is not _MISSING and hasattr(old, "trivia") and hasattr(new, "trivia"):
        new.trivia.comment = old.trivia.comment
        new.trivia.comment_ws = old.trivia.comment_ws
    node[last] = new
    return tomlkit.dumps(doc)


def _without(doc: dict[str, Any], keys: list[str]) -> dict[str, Any]:
    """A deep copy of a parsed document with the value at ``keys`` removed."""
    out = {k: (_without(v, []) if isinstance(v, dict) else v) for k, v in doc.items()}
    if not keys:
        return out
    node = out
    for k in keys[:-1]:
        nxt = node.get(k)
        if not isinstance(nxt, dict):
            return out
        nxt = dict(nxt)
        node[k] = nxt
        node = nxt
    node.pop(keys[-1], None)
    return out


def _prune(doc: Any) -> Any:
    """Drop empty tables (a created ``[stages.ID]`` holding only the edited key)."""
    if not isinstance(doc, dict):
        return doc
    out = {k: _prune(v) for k, v in doc.items()}
    return {k: v for k, v in out.items() if not (isinstance(v, dict) and not v)}


def check_intent(before: str, after: str, path: str, raw: Any) -> None:
    """Raise unless ``after`` equals ``before`` with exactly the value at ``path`` set to ``raw``.

    This is the guard against an edit library moving or retyping something else.
    """
    keys = split_path(path)
    old, new = tomllib.loads(before.removeprefix(BOM)), tomllib.loads(after.removeprefix(BOM))
    got = get_raw(after, path)
    if got != raw or type(got) is not type(raw):
        raise ProjectError(f"the edit of `{path}` did not come out as typed (read back "
                           f"{got!r}); the file was not changed")
    if _prune(_without(old, keys)) != _prune(_without(new, keys)):
        raise ProjectError(f"the edit of `{path}` changed other values of the file; the file "
                           "was not changed")


_HEADER = re.compile(r"^\s*\[(?P<name>[A-Za-z0-9_.-]+)\]\s*(#.*)?$")
_SIMPLE = re.compile(r'^(?P<lead>\s*)(?P<key>[A-Za-z0-9_-]+)(?P<eq>\s*=\s*)'
                     r'(?P<val>"(?:[^"\\\n]|\\.)*"|[-+]?[0-9][0-9_.eE+-]*|true|false)'
                     r'(?P<rest>\s*(?:#.*)?)$')


def set_in_line(text: str, path: str, raw: Any) -> str | None:
    """The quick way for the usual edit: the key written as ``key = "…"`` on a line of its
    own table is replaced in place, its comment kept. None when the file spells it any other
    way (the caller then uses :func:`set_value`); :func:`check_intent` verifies either way.

    >>> print(set_in_line('[s]\\nv = "1 V"   # why\\n', "s.v", "2 V"), end="")
    [s]
    v = "2 V"   # why
    >>> set_in_line('[s]\\nv = { min = "1 V", max = "2 V" }\\n', "s.v", "3 V") is None
    True
    """
    keys = split_path(path)
    if len(keys) < 2 or isinstance(raw, (dict, list)):
        return None
    table, key = ".".join(keys[:-1]), keys[-1]
    lines = text.splitlines(keepends=True)
    current: str | None = ""
    hits = []
    for i, line in enumerate(lines):
        body = line.rstrip("\r\n")
        if body.lstrip().startswith("[["):
            current = None
            continue
        head = _HEADER.match(body)
        if head:
            current = head["name"]
            continue
        if current == table:
            m = _SIMPLE.match(body)
            if m and m["key"] == key:
                hits.append((i, m, line[len(body):]))
    if len(hits) != 1:
        return None
    i, m, end = hits[0]
    lines[i] = f"{m['lead']}{m['key']}{m['eq']}{toml_text(raw)}{m['rest']}{end}"
    return "".join(lines)


def apply_edit(text: str, path: str, typed: str, file_path: str | Path) -> tuple[str, Project]:
    """Set ``path`` to what the user typed, re-read the text, validate the whole project.

    Returns the new text and the project it loads as. Raises a
    :class:`~reviewer.errors.LatchbookError` whose message says what to type when the value
    does not follow the grammar (the same parser the files use); ``text`` is then untouched.
    """
    raw = parse_typed(typed, split_path(path)[-1])
    bom = BOM if text.startswith(BOM) else ""  # kept as the file has it; tomlkit refuses it
    body = text[len(bom):]
    new_body = set_in_line(body, path, raw)  # a tenth of tomlkit's time on a usual edit
    if new_body is not None:
        try:
            check_intent(body, new_body, path, raw)
        except (ProjectError, tomllib.TOMLDecodeError):
            new_body = None
    if new_body is None:
        new_body = set_value(body, path, raw)
        check_intent(body, new_body, path, raw)
    new_text = bom + new_body
    project = load_project_text(new_text, file_path)
    return new_text, project


__all__ = ["apply_edit", "check_intent", "get_raw", "parse_typed", "set_in_line", "set_value",
           "shown_text", "split_path", "toml_text"]
