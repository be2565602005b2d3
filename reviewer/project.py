"""Load and validate a v1 project file, resolving ``variant_of`` to any depth.

Every problem is a :class:`~reviewer.errors.ProjectError` naming the file, the table, the key
and, where it can be found, the line — never a traceback. Values are parsed once here (by
:mod:`reviewer.units`) into SI magnitudes.
"""

from __future__ import annotations

import codecs
import difflib
import os
import re
import tomllib
from functools import lru_cache
from pathlib import Path
from typing import Any

import reviewer.stages  # noqa: F401  (registers the stage kinds)
from reviewer import bounds, rules, schema
from reviewer.errors import LatchbookError, ProjectError, Where
from reviewer.model import Part, Project, Stage, Value
from reviewer.registry import STAGE_KINDS, Param
from reviewer.safeio import load_toml, read_regular, refusal
from reviewer.units import parse_value

MAX_BYTES = 1 << 20
MAX_DEPTH = 16
TOP = ("project", "conditions", "supply", "parts", "stages")


def read_text(path: Path) -> str:
    """Read a user's TOML file as UTF-8 text, with clear errors for the usual accidents.

    Only a regular file is opened (never a pipe or a device), and at most :data:`MAX_BYTES`
    are read; a UTF-8 byte-order mark at the start is accepted and dropped.
    """
    where = Where(str(path))
    try:
        data = read_regular(path, MAX_BYTES, what="project")
    except FileNotFoundError:
        raise ProjectError("no such file; check the path (projects are NAME.toml)", where) from None
    except IsADirectoryError:
        raise ProjectError("this is a folder; give a project file NAME.toml", where) from None
    if data.startswith(codecs.BOM_UTF8):
        data = data[len(codecs.BOM_UTF8):]
    if not data.strip():
        raise ProjectError("the file is empty; a project needs at least [project], "
                           "[conditions], [supply], [parts.*] and [stages.*]", where)
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        raise ProjectError(f"not UTF-8 text (byte {exc.start}); save the file as UTF-8",
                           Where(str(path), line=line)) from None


def parse_toml(text: str, path: Path) -> dict[str, Any]:
    """Parse TOML text, turning syntax errors into a message with the line.

    Tables and arrays nested deeper than :data:`MAX_DEPTH` are refused (a project needs five
    levels; a parser recursing through thousands would exhaust the stack).
    """
    if text.startswith("\ufeff"):
        text = text[1:]
    try:
        return load_toml(text, path, limit=MAX_DEPTH, error=ProjectError, what="a project",
                         fix="it uses five at most, so remove the extra brackets or braces "
                             "(is this the right file?)")
    except tomllib.TOMLDecodeError as exc:
        m = re.search(r"line (\d+)", str(exc))
        raise ProjectError(f"not valid TOML: {exc}", Where(str(path),
                           line=int(m.group(1)) if m else None)) from None


_HEADER = re.compile(r"^\s*\[+\s*([^\]]+?)\s*\]+")
_KEYLINE = re.compile(r"^\s*([A-Za-z0-9_\-\"]+)\s*=")


@lru_cache(maxsize=64)
def _line_index(text: str) -> tuple[dict[str, int], dict[tuple[str, str], int],
                                     dict[str, list[tuple[int, str]]]]:
    """One pass over ``text``: the line of every table header, of every plain key in it, and
    every key line under each header (for keys inside inline tables)."""
    heads: dict[str, int] = {}
    keys: dict[tuple[str, str], int] = {}
    under: dict[str, list[tuple[int, str]]] = {}
    current = ""
    for n, line in enumerate(text.splitlines(), 1):
        m = _HEADER.match(line)
        if m:
            current = m.group(1).replace('"', "")
            heads.setdefault(current, n)
            continue
        k = _KEYLINE.match(line)
        if k:
            keys.setdefault((current, k.group(1).strip('"')), n)
            under.setdefault(current, []).append((n, line))
    return heads, keys, under


def line_of(text: str, table: str, key: str = "") -> int | None:
    """The line of ``key`` inside ``[table]`` (or of the table header) in ``text``."""
    heads, keys, under = _line_index(text)
    if key and (table, key) in keys:
        return keys[(table, key)]
    if not key or "." not in table:
        return heads.get(table)
    return _line_of_nested(under, heads, table, key)


def _line_of_nested(under: dict[str, list[tuple[int, str]]], heads: dict[str, int],
                    table: str, key: str) -> int | None:
    """A key in an inline table (``load = { r = … }`` under ``[stages.power]``, or
    ``trigger = { … }`` under ``[stages]``): the first key line under one of the table's
    ancestors that names both the key and the table's last part; else the table's header.
    Only the lines under those ancestors are read, so a lookup does not rescan the file."""
    parts = table.split(".")
    last = parts[-1]
    found: list[int] = []
    for i in range(1, len(parts)):
        for n, line in under.get(".".join(parts[:i]), ()):
            if key in line and last in line:
                found.append(n)
                break
    return min(found) if found else heads.get(table)


def _did_you_mean(key: str, known: Any) -> str:
    near = difflib.get_close_matches(key, list(known), n=1, cutoff=0.6)
    return f"; did you mean `{near[0]}`?" if near else ""


class _Loader:
    """One load of a project file and its chain of base files."""

    def __init__(self, path: Path, override: dict[str, str] | None = None) -> None:
        self.path = path
        self.override = override or {}
        self.texts: dict[str, str] = {}
        self.origin: dict[str, str] = {}
        self.chain: list[str] = []
        self.warnings: list[str] = []

    def where(self, table: str, key: str = "") -> Where:
        f = self.origin.get(f"{table}.{key}" if key else table, str(self.path))
        return Where(f, table, key, line_of(self.texts.get(f, ""), table, key))

    # -- variants -----------------------------------------------------------------------
    def resolve(self, path: Path, seen: tuple[str, ...] = ()) -> dict[str, Any]:
        key = os.path.realpath(path)
        if key in seen:
            names = " → ".join(Path(s).name for s in (*seen, key))
            raise ProjectError(f"variant_of makes a circle: {names}", Where(str(path), "project",
                               "variant_of"))
        text = self.override.get(str(path))
        if text is None:
            text = read_text(path)
        self.texts[str(path)] = text
        doc = parse_toml(text, path)
        self.chain.append(str(path))
        base_ref = doc.get("project", {}).get("variant_of") if isinstance(
            doc.get("project"), dict) else None
        if base_ref is None:
            self._mark(doc, str(path))
            return doc
        if not isinstance(base_ref, str) or not base_ref:
            raise ProjectError('variant_of must be a file name, e.g. variant_of = "base.toml"',
                               Where(str(path), "project", "variant_of"))
        base_path = (path.parent / base_ref)
        _confine(base_path, base_ref, path, Where(str(path), "project", "variant_of",
                                                  line_of(text, "project", "variant_of")))
        why = refusal(base_path)
        if why is not None and os.path.lexists(base_path):
            raise ProjectError(f'the base project "{base_ref}": {why}',
                               Where(str(path), "project", "variant_of",
                                     line_of(text, "project", "variant_of")))
        if why is not None:
            raise ProjectError(f'the base project "{base_ref}" does not exist (looked for '
                               f"{base_path}); variant_of is relative to this file",
                               Where(str(path), "project", "variant_of",
                                     line_of(text, "project", "variant_of")))
        base = self.resolve(base_path, (*seen, key))
        base_stages = set(base.get("stages", {}))
        self._mark(doc, str(path))
        merged = _merge(base, doc)
        merged.setdefault("project", {})["variant_of"] = base_ref
        missing = base_stages - set(merged.get("stages", {}))
        if missing:
            raise ProjectError("a variant may not remove a stage: " + ", ".join(sorted(missing)),
                               Where(str(path), "stages"))
        return merged

    def _mark(self, doc: dict[str, Any], file: str, prefix: str = "") -> None:
        for k, v in doc.items():
            p = f"{prefix}.{k}" if prefix else k
            self.origin[p] = file
            if isinstance(v, dict) and not _is_range(v):
                self._mark(v, file, p)

    # -- validation ---------------------------------------------------------------------
    def build(self) -> Project:
        doc = self.resolve(self.path)
        for k in doc:
            if k not in TOP:
                raise ProjectError(f"unknown table `{k}`{_did_you_mean(k, TOP)} (a project has "
                                   + ", ".join(f"[{t}]" for t in TOP) + ")", self.where(k))
        for t in TOP:
            if t not in doc:
                raise ProjectError(f"the [{t}] table is missing", Where(str(self.path)))
            if not isinstance(doc[t], dict):
                raise ProjectError(f"`{t}` must be a table", self.where(t))
        head = self.table(doc["project"], schema.PROJECT, "project")
        conditions = self.table(doc["conditions"], schema.CONDITIONS, "conditions")
        supply = self.table(doc["supply"], schema.SUPPLY, "supply")
        if supply["kind"] == "ac" and "frequency" not in supply:
            raise ProjectError('an AC supply needs frequency = "50 Hz" (or 60 Hz)',
                               self.where("supply", "frequency"))
        if supply["kind"] == "dc" and "frequency" in supply:
            raise ProjectError("a DC supply has no frequency; remove the key",
                               self.where("supply", "frequency"))
        supply.setdefault("inductance", Value.fixed(0.0, "inductance", "H"))
        parts = {ref: self.part(ref, raw) for ref, raw in doc["parts"].items()}
        stages = {sid: self.stage(sid, raw) for sid, raw in doc["stages"].items()}
        if not stages:
            raise ProjectError("the project has no stages; add at least one [stages.ID] table",
                               Where(str(self.path), "stages"))
        project = Project(str(self.path), head["name"], head["revision"], head.get("line", ""),
                          head.get("checklist", "standard"), conditions, supply, parts, stages,
                          head.get("variant_of", ""), list(self.chain), dict(self.origin), doc)
        self.links(project)
        rules.check(project, self.where)
        project.warnings = list(dict.fromkeys(self.warnings))
        return project

    def table(self, raw: dict[str, Any], params: Any, table: str,
              scope: str = "") -> dict[str, Any]:
        out: dict[str, Any] = {}
        for key, val in raw.items():
            if key not in params:
                raise ProjectError(f"unknown key `{key}` in [{table}]"
                                   f"{_did_you_mean(key, params)}", self.where(table, key))
            out[key] = self.param(val, params[key], table, key, scope or table)
        for key, p in params.items():
            if p.required and key not in raw:
                hint = f": {p.help}" if p.help else ""
                raise ProjectError(f"[{table}] needs `{key}`{hint}", self.where(table))
        return out

    def param(self, val: Any, p: Param, table: str, key: str, scope: str) -> Any:
        where = self.where(table, key)
        try:
            out = self._param(val, p, table, key, where, scope)
            if isinstance(out, Value):
                zero = p.allow_zero or p.kind in ("target", "required")  # as parsed
                warning = bounds.check(out, scope, key, where, allow_zero=zero)
                if warning:
                    self.warnings.append(f"{where.text()}: {warning}")
            return out
        except LatchbookError as exc:
            if exc.where is None or not exc.where.line:
                raise type(exc)(exc.bare, where) from None
            raise

    def _param(self, val: Any, p: Param, table: str, key: str, where: Where,
               scope: str) -> Any:
        if p.kind == "value":
            return parse_value(val, p.dim, where, allow_zero=p.allow_zero,
                               allow_negative=p.allow_negative)
        if p.kind in ("text", "choice", "part", "stage"):
            if not isinstance(val, str):
                raise ProjectError(f"`{key}` must be a string in quotes", where)
            if p.kind == "choice" and val not in p.choices:
                raise ProjectError(f'`{key}` = "{val}" is not one of: '
                                   + ", ".join(f'"{c}"' for c in p.choices)
                                   + _did_you_mean(val, p.choices), where)
            return val
        if p.kind == "parts":
            refs = [val] if isinstance(val, str) else val
            if not isinstance(refs, list) or not refs or not all(isinstance(r, str) for r in refs):
                raise ProjectError(f'`{key}` must be a designator or a list, e.g. "Q1" or '
                                   '["Q1", "Q2"]', where)
            return val
        if p.kind == "bool":
            if not isinstance(val, bool):
                raise ProjectError(f"`{key}` must be true or false (no quotes)", where)
            return val
        if p.kind == "number":
            if isinstance(val, bool) or not isinstance(val, int) or val < 1:
                raise ProjectError(f"`{key}` must be a whole number of 1 or more", where)
            return val
        if p.kind == "table":
            if not isinstance(val, dict):
                raise ProjectError(f"`{key}` must be a table, e.g. {key} = {{ … }}", where)
            return self.table(val, p.fields, f"{table}.{key}", f"{scope}.{key}")
        if p.kind == "step":
            if isinstance(val, str) and val in p.choices:
                return val
            try:
                return parse_value(val, "voltage", where)
            except LatchbookError:
                raise ProjectError(f'`{key}` must be "line", "dc" or a voltage such as '
                                   '"400 V"', where) from None
        if p.kind in ("target", "required"):
            dims = (("frequency", "angle") if p.kind == "target"
                    else ("power", "voltage", "current"))
            for d in dims:
                try:
                    return parse_value(val, d, where, allow_zero=True)
                except LatchbookError:
                    continue
            raise ProjectError(f"`{key}` must be a range of " + ", ".join(dims[:-1])
                               + f" or {dims[-1]}, e.g. "
                               + ('{ min = "40 Hz", max = "120 Hz" }' if p.kind == "target"
                                  else '{ min = "50 W", max = "1.8 kW" }'), where)
        raise AssertionError(p.kind)

    def part(self, ref: str, raw: Any) -> Part:
        table = f"parts.{ref}"
        if not isinstance(raw, dict):
            raise ProjectError(f"`{ref}` must be a table [parts.{ref}]", self.where("parts", ref))
        ptype = raw.get("type")
        if not isinstance(ptype, str) or ptype not in schema.PART_TYPES:
            raise ProjectError("needs type = " + ", ".join(f'"{t}"' for t in schema.PART_TYPES)
                               + (_did_you_mean(str(ptype), schema.PART_TYPES) if ptype else ""),
                               self.where(table, "type"))
        params = {**schema.PART_COMMON, **schema.PART_TYPES[ptype]}
        cold_raw = raw.get("cold")
        body = {k: v for k, v in raw.items() if k != "cold"}
        if cold_raw is not None and ptype not in schema.COLD_TABLES:
            raise ProjectError("only an SCR or a triac part has a cold table",
                               self.where(table, "cold"))
        values = self.table(body, params, table, f"parts.{ptype}")
        cold = {}
        if cold_raw is not None:
            if not isinstance(cold_raw, dict):
                raise ProjectError('cold must be a table, e.g. cold = { at = "-40 degC", '
                                   'igt = "30 mA" }', self.where(table, "cold"))
            cold = self.table(cold_raw, schema.COLD_TABLES[ptype], f"{table}.cold",
                              f"parts.{ptype}.cold")
        return Part(ref, ptype, {k: v for k, v in values.items() if k not in ("type",
                    "description")}, values.get("description", ""), cold, self.where(table))

    def stage(self, sid: str, raw: Any) -> Stage:
        table = f"stages.{sid}"
        if not isinstance(raw, dict):
            raise ProjectError(f"`{sid}` must be a table [stages.{sid}]",
                               self.where("stages", sid))
        kind = raw.get("kind")
        if not isinstance(kind, str) or kind not in STAGE_KINDS:  # a list or table: unhashable
            said = f'kind = "{kind}" is not a stage kind; ' if isinstance(kind, str) else ""
            raise ProjectError(said + "needs kind = one of "
                               + ", ".join(f'"{k}"' for k in STAGE_KINDS)
                               + (_did_you_mean(str(kind), STAGE_KINDS) if kind else ""),
                               self.where(table, "kind"))
        params = {"kind": Param("text"), **STAGE_KINDS[kind].params}
        values = self.table(raw, params, table, f"stages.{kind}")
        values.pop("kind")
        if values.get("sync") == "line" and "zener" not in values:
            raise ProjectError('sync = "line" needs zener = "…" (the clamp voltage)',
                               self.where(table, "sync"))
        return Stage(sid, kind, values, self.where(table))

    def _check_triac_burst(self, project: Project, st: Stage) -> None:
        """Burst control of a triac: whole cycles fired at the voltage zero, so a `burst`
        table and a gate that can fire there (a triac-gate drive, not a diac–RC network,
        which fires at a phase angle)."""
        where = self.where(f"stages.{st.id}", "control")
        if st.params.get("control") != "burst":
            raise ProjectError('`burst` needs control = "burst" in the same stage',
                               self.where(f"stages.{st.id}", "burst"))
        if "burst" not in st.params:
            raise ProjectError('control = "burst" (integral-cycle control) needs '
                               'burst = { period = 50, on = { min = 1, max = 50 } } (whole '
                               'cycles on out of every period; add pulse = "…" for the gate '
                               "pulse at each voltage zero)", where)
        gate = project.stages.get(st.get("gate", ""))
        if gate is not None and gate.kind == "diac-rc":
            raise ProjectError(f'control = "burst" fires at the voltage zero, but the gate '
                               f"`{gate.id}` is a diac–RC network, which fires at a phase "
                               'angle: use a triac-gate drive (e.g. a zero-cross opto '
                               'driver) for burst control, or control = "phase"', where)
        on, period = st.params["burst"]["on"], st.params["burst"]["period"]
        if on.hi > period or on.lo < 0 or on.lo != round(on.lo) or on.hi != round(on.hi):
            raise ProjectError(f"`burst.on` ({on.lo:g} … {on.hi:g}) must be whole cycles "
                               f"within 0 … `burst.period` ({period})",
                               self.where(f"stages.{st.id}", "burst"))

    def links(self, project: Project) -> None:
        for st in project.stages.values():
            kind = STAGE_KINDS[st.kind]
            for key, p in kind.params.items():
                val = st.params.get(key)
                if val is None:
                    continue
                where = self.where(f"stages.{st.id}", key)
                if p.kind in ("part", "parts"):
                    for ref in [val] if isinstance(val, str) else val:
                        part = project.parts.get(ref)
                        if part is None:
                            raise ProjectError(f'`{key}` names part "{ref}", which is not in '
                                               "[parts]" + _did_you_mean(ref, project.parts),
                                               where)
                        if part.type != p.part_type:
                            raise ProjectError(f'`{key}` needs a {p.part_type} part, but "{ref}" '
                                               f"is a {part.type}", where)
                if p.kind == "stage":
                    target = project.stages.get(val)
                    if target is None:
                        raise ProjectError(f'`{key}` names stage "{val}", which does not exist'
                                           + _did_you_mean(val, project.stages), where)
                    if target.kind not in p.stage_kinds:
                        hint = ("; a triac turns off by itself at its current's zero, and "
                                "triac.commutation checks that: remove this stage"
                                if target.kind == "triac-phase-control" and key == "for"
                                else "")
                        raise ProjectError(f'`{key}` must name a stage of kind '
                                           + " or ".join(p.stage_kinds)
                                           + f', but "{val}" is {target.kind}' + hint, where)
                    if target.id == st.id:
                        raise ProjectError(f"`{key}` names the stage itself", where)
            _check_emf_load(st, self.where(f"stages.{st.id}", "load"))
            if st.kind == "phase-control":
                if project.supply["kind"] != "ac":
                    raise ProjectError("a phase-control stage needs an AC supply "
                                       '(supply kind = "ac")', self.where(f"stages.{st.id}"))
                if st.params.get("control") == "burst":
                    if "burst" not in st.params or st.params.get("topology") != "ac-switch":
                        raise ProjectError('control = "burst" (integral-cycle control of a '
                                           'heater) needs topology = "ac-switch" and '
                                           'burst = { period = 50, on = { min = 1, max = 50 } }'
                                           " (whole cycles on out of every period)",
                                           self.where(f"stages.{st.id}", "control"))
                    on, period = st.params["burst"]["on"], st.params["burst"]["period"]
                    if (on.hi > period or on.lo < 0 or on.lo != round(on.lo)
                            or on.hi != round(on.hi)):
                        raise ProjectError(f"`burst.on` ({on.lo:g} … {on.hi:g}) must be whole "
                                           f"cycles within 0 … `burst.period` ({period})",
                                           self.where(f"stages.{st.id}", "burst"))
                elif "burst" in st.params:
                    raise ProjectError('`burst` needs control = "burst" in the same stage',
                                       self.where(f"stages.{st.id}", "burst"))
                elif "gate" not in st.params and "firing" not in st.params:
                    raise ProjectError('needs `firing = { min = "…", max = "…" }` or `gate` '
                                       "(a gate-drive stage)", self.where(f"stages.{st.id}"))
            if st.kind == "triac-phase-control" and (st.params.get("control") == "burst"
                                                     or "burst" in st.params):
                self._check_triac_burst(project, st)


def _confine(base: Path, ref: str, naming: Path, where: Where) -> None:
    """A base project lies in the folder tree of the project that names it, as a .toml file."""
    home = Path(os.path.realpath(naming.parent))
    try:
        real = Path(os.path.realpath(base))
    except (OSError, RuntimeError):
        real = base
    if Path(ref).is_absolute() or not real.is_relative_to(home):
        raise ProjectError(f'the base project "{ref}" is outside the folder of the project '
                           f"that names it: variant_of may only name a file in {home} or a "
                           "folder below it", where)
    if not ref.endswith(".toml"):
        raise ProjectError(f'variant_of = "{ref}" must name a project file NAME.toml', where)


def _check_emf_load(st: Stage, where: Where) -> None:
    """A back EMF (`load.e`) belongs to a rectifier: a half-wave or bridge phase-control stage."""
    load = st.params.get("load")
    if not isinstance(load, dict):
        return
    if "type" in load and "e" not in load:
        raise ProjectError(f'`load.type = "{load["type"]}"` needs the back EMF `e`, e.g. '
                           'load = { r = "0.5 ohm", e = { min = "11 V", max = "14.4 V" } }',
                           where)
    if "e" not in load:
        return
    if st.kind != "phase-control" or st.params.get("topology") not in ("half-wave", "bridge"):
        raise ProjectError("a back EMF `load.e` is for a half-wave or bridge phase-control "
                           "stage (a rectifier feeding a battery or a DC motor); remove `e` or "
                           'use topology = "half-wave" or "bridge"', where)


def _is_range(v: dict[str, Any]) -> bool:
    return bool(v) and set(v) <= {"min", "max", "nom"}


def _merge(base: dict[str, Any], over: dict[str, Any]) -> dict[str, Any]:
    """Key-by-key merge: a table merges, a value (or a range) replaces."""
    out = dict(base)
    for k, v in over.items():
        if isinstance(v, dict) and isinstance(out.get(k), dict) and not _is_range(v):
            out[k] = _merge(out[k], v)
        else:
            out[k] = v
    return out


def is_project_file(path: Path) -> bool:
    """A TOML file with a [project] table (an unreadable one counts: its error is shown)."""
    name = path.name
    if name.endswith((".review.toml", ".checklist.toml")) or name == "pyproject.toml" \
            or ".mine-" in name:  # a copy kept aside after a conflicting save
        return False
    try:
        doc = parse_toml(read_text(path), path)
    except LatchbookError:
        return True
    return isinstance(doc.get("project"), dict)


def load_project(path: str | Path) -> Project:
    """Load, resolve and validate a project file."""
    return _Loader(Path(path)).build()


def load_project_text(text: str, path: str | Path) -> Project:
    """Validate ``text`` as if it were the file at ``path`` (edits not yet saved).

    Base files of a variant are still read from disk.
    """
    return _Loader(Path(path), {str(Path(path)): text}).build()
