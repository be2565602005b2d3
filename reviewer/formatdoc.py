"""The project-format reference (``docs/project-format.md``), generated from the schema.

Every key of every table, with what it takes, whether it is required, its physical domain (an
error outside it) and its plausible band (a warning outside it), and the configuration rules.
A test compares the file with :func:`render`, so the reference cannot drift from the loader.
Regenerate with ``python -m reviewer.formatdoc > docs/project-format.md``.
"""

from __future__ import annotations

from collections.abc import Iterator, Mapping

import reviewer.stages  # noqa: F401  (registers the stage kinds)
from reviewer import bounds, schema
from reviewer.registry import STAGE_KINDS, Param
from reviewer.units import DIMS

RULES = (
    '`zener` only with `sync = "line"` (a free-running oscillator has no clamp to use).',
    '`sync = "line"` only on an AC supply; a `target` is a firing-angle range with '
    '`sync = "line"` and a frequency range otherwise.',
    'A gate drive with `coupling = "direct"` takes none of `turns_ratio`, `volt_seconds`, '
    '`isolation`, `required_isolation`, `coupling_capacitance`; `coupling = "transformer"` '
    "needs `turns_ratio`.",
    "A phase-control stage needs an AC supply and `firing` or `gate`; not both when the gate's "
    "oscillator is line-synchronised (its timing sets the angle), and `firing` when it is "
    "free-running (its pulses are not tied to the line), unless `control = \"burst\"` (whole "
    "cycles fired at the voltage zero).",
    "`freewheel` is not for an `ac-switch` (the load sees AC).",
    "A dc-switch stage needs a DC supply.",
    "A triac part's `dvdt_c` and `didt_c` come together ((dv/dt)c is rated at that (di/dt)c); "
    "its gate data are per quadrant: `igt_q1`…`igt_q3`, `vgt_q1`…`vgt_q3` required, `_q4` "
    "where the datasheet gives it, and the same names in its `cold` table. Triac stages "
    "(`triac-phase-control`, `triac-gate`) need an AC supply, and a `triac-gate` named as a "
    "stage's `gate` fires that stage's `triac`; a `line-commutation` stage is not for a triac "
    "(triac.commutation checks its turn-off).",
    'A snubber\'s `step = "dc"` only on a DC supply, `step = "line"` only on an AC supply.',
    "`variant_of` names a `.toml` file in the folder of the file that names it, or below; "
    "circles are refused.",
    "Ratings that are merely absent (a snubber's `c_voltage`, an SCR's `tq`) are not input "
    "errors: the check that needs one says so in its result.",
)

FILES = (
    "A project file is a regular UTF-8 file of at most 1 MiB (a byte-order mark is accepted); "
    "a pipe, a device or a looping symlink is refused before it is opened; tables and arrays "
    "nest at most 16 levels.",
    "Latchbook never writes through a symbolic link and never replaces a file without write "
    "permission.",
)


def _what(p: Param) -> str:
    if p.kind == "value":
        if p.dim == "dimensionless":
            return 'a plain number (or a percentage, "65%")'
        return f"{DIMS[p.dim][1]}, e.g. {DIMS[p.dim][2]}"
    if p.kind == "choice":
        return "one of " + ", ".join(f'`"{c}"`' for c in p.choices)
    if p.kind == "step":
        return " or ".join(f'`"{c}"`' for c in p.choices) + ", or a voltage"
    if p.kind == "target":
        return "a range of frequency or of firing angle"
    if p.kind == "required":
        return "a range of load power or of load voltage"
    if p.kind == "part":
        return f"the designator of a {p.part_type} part"
    if p.kind == "parts":
        return "a designator, or a list of them"
    if p.kind == "stage":
        return "the id of a stage of kind " + " or ".join(p.stage_kinds)
    if p.kind == "number":
        return "a whole number, 1 or more"
    if p.kind == "bool":
        return "true or false"
    if p.kind == "table":
        return "a table (below)"
    return "text"


def _dims(p: Param) -> tuple[str, ...]:
    if p.kind == "value":
        return (p.dim,)
    return {"step": ("voltage",), "target": ("frequency", "angle"),
            "required": ("power", "voltage")}.get(p.kind, ())


def _limits(p: Param, scope: str, key: str) -> tuple[str, str]:
    doms, bands = [], []
    for dim in _dims(p):
        b = bounds.bounds_for(scope, key, dim)
        zero = " (or 0)" if p.allow_zero and b.domain.lo > 0 and dim != "temperature" else ""
        doms.append(bounds.domain_text(b.domain, dim) + zero)
        bands.append(bounds.band_text(b.band, dim))
    return "; ".join(doms) or "—", "; ".join(bands) or "—"


def _table(title: str, params: Mapping[str, Param], scope: str,
           short: str = "") -> Iterator[str]:
    yield f"### {title}"
    yield ""
    yield "| key | takes | required | domain (error outside) | usual band (warning outside) |"
    yield "|---|---|---|---|---|"
    nested = []
    for key, p in params.items():
        dom, band = _limits(p, scope, key)
        yield f"| `{key}` | {_what(p)} | {'yes' if p.required else ''} | {dom} | {band} |"
        if p.kind == "table" and p.fields:
            nested.append((key, p.fields))
    yield ""
    for key, fields in nested:
        yield from _table(f"{short or title} → `{key}`", fields, f"{scope}.{key}")


def render() -> str:
    """The whole reference as Markdown text."""
    out = ["# Latchbook project format: keys, domains and bands", "",
           "Generated from the loader's schema by `python -m reviewer.formatdoc`; a test keeps it "
           "in step. Values follow the value grammar (README). The *domain* is what physics "
           "allows: a value outside it is an input error (exit 2) that says what to write. The "
           "*usual band* is what SCR control circuits use: a value outside it loads, with a "
           "warning in `check` (its table and `--json` `warnings`) and in the workbook. A value "
           "with a tolerance or a range is checked at both ends.", "",
           "## Files", ""]
    out += [f"- {f}" for f in FILES]
    out += ["", "## Tables every project has", ""]
    out += _table("[project]", schema.PROJECT, "project")
    out += _table("[conditions]", schema.CONDITIONS, "conditions")
    out += _table("[supply]", schema.SUPPLY, "supply")
    out += ["## Parts", ""]
    for ptype, params in schema.PART_TYPES.items():
        out += _table(f'[parts.ID] type = "{ptype}"', {**schema.PART_COMMON, **params},
                      f"parts.{ptype}")
    for ptype, keys in schema.COLD_TABLES.items():
        out += _table(f'[parts.ID] type = "{ptype}" → `cold`', keys, f"parts.{ptype}.cold")
    out += ["## Stages", ""]
    for name, kind in STAGE_KINDS.items():
        out += _table(f'[stages.ID] kind = "{name}" — {kind.about}', kind.params,
                      f"stages.{name}", f'[stages.ID] kind = "{name}"')
    out += ["## Configuration rules", ""]
    out += [f"- {r}" for r in RULES]
    return "\n".join(out) + "\n"


if __name__ == "__main__":
    import sys

    sys.stdout.write(render())
