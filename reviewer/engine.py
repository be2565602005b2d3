"""The check engine: corners from exactly the inputs each check reads, one array call per check.

For each stage (in link order) and each check of its kind, the engine binds the check's inputs,
builds every combination of their ends (plus sweeps where a value is not monotonic), calls the
check's pure function once on the whole corner table, and reduces the rows to a result: status,
margin, the worst corner, and every named value's nominal, minimum and maximum.

Two rules hold for every check, here rather than in each of them: a row with a non-finite value
or margin is never a pass (the check had no answer there), and a check whose premise failed
(``Bound.depends``) is ``blocked``, one missing a key it needs (``Bound.missing``) is
``incomplete``.
"""

from __future__ import annotations

import hashlib
import json
import math
import re
import warnings
from collections import OrderedDict
from collections.abc import Callable, Iterable, Iterator, Mapping
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

import reviewer.stages  # noqa: F401  (registers the stage kinds and checks)
from checks import memo
from checks.core import FAIL, MARGINAL, STATUS_NAMES, Outcome
from reviewer.checklist import Checklist, load_checklist, standard
from reviewer.errors import LatchbookError, ProjectError
from reviewer.fmt import show, to_report
from reviewer.model import Project, Stage
from reviewer.registry import CHECKS, Bound, CheckDef, Context, Input, Reduced
from reviewer.schema import CATALOGUE
from reviewer.states import FAILING

HASH_SCHEME = "latchbook.inputs/1"
MAX_VARYING = 12
SAMPLED_CORNERS = 4096


@dataclass
class Stat:
    """A named value over the corners, in its report unit."""

    nominal: float
    min: float
    max: float
    unit: str

    def as_dict(self) -> dict[str, Any]:
        """JSON form; NaN becomes null."""
        out: dict[str, Any] = {k: _finite(getattr(self, k)) for k in ("nominal", "min", "max")}
        return out | {"unit": self.unit}


@dataclass
class Evaluation:
    """The raw rows behind a result: the corner table and the outcome arrays (SI)."""

    names: list[str]
    inputs: dict[str, np.ndarray]
    outcome: Outcome
    worst_row: int
    bound: Bound
    varying: list[str]
    limits: Mapping[str, float]

    def call(self, defn: CheckDef, arrays: Mapping[str, np.ndarray]) -> Outcome:
        """Evaluate the same check on other rows (samples, scaled inputs) in one call."""
        return call(defn, self.bound, arrays, self.limits)


@dataclass
class Result:
    """One (stage, check) result."""

    stage: str
    check: str
    kind: str
    status: str
    margin: float | None
    summary: str
    worst: dict[str, str] = field(default_factory=dict)
    inputs_sha256: str = ""
    values: dict[str, Stat] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)
    snapshot: dict[str, Any] = field(default_factory=dict)
    evaluation: Evaluation | None = None
    #: What a ``blocked`` result waits for ("stage/check") or the keys an ``incomplete`` one
    #: lacks (paths); empty otherwise.
    needs: list[str] = field(default_factory=list)

    def as_dict(self) -> dict[str, Any]:
        """The JSON/record form (checks.md value names)."""
        out = {
            "stage": self.stage, "check": self.check, "status": self.status,
            "margin": _finite(self.margin), "summary": self.summary, "worst": self.worst,
            "inputs_sha256": self.inputs_sha256,
            "values": {k: v.as_dict() for k, v in self.values.items()},
            "notes": list(self.notes),
        }
        if self.needs:
            out["needs"] = list(self.needs)
        return out


@dataclass
class Run:
    """Every result of one project, with the checklist it was computed against."""

    project: Project
    checklist: Checklist
    results: list[Result]

    def by_key(self) -> dict[tuple[str, str], Result]:
        """Results keyed by (stage, check)."""
        return {(r.stage, r.check): r for r in self.results}

    @property
    def failed(self) -> bool:
        """True when any check fails, errors, is blocked or incomplete."""
        return any(r.status in FAILING for r in self.results)


def _finite(x: float | None) -> float | None:
    if x is None or (isinstance(x, float) and not math.isfinite(x)):
        return None
    return float(x)


def stage_order(project: Project) -> list[Stage]:
    """Stages ordered so that every stage comes after the stages it links to.

    Ties keep the file order. A cycle of links is an error naming the stages in it.
    """
    links: dict[str, set[str]] = {}
    for sid, st in project.stages.items():
        links[sid] = {v for k, v in st.params.items()
                      if k in ("source", "gate", "across", "for") and isinstance(v, str)
                      and v in project.stages}
    done: list[str] = []
    pending = list(project.stages)
    while pending:
        ready = [s for s in pending if links[s] <= set(done)]
        if not ready:
            raise ProjectError("stages link to each other in a circle: " + " → ".join(pending))
        done.append(ready[0])
        pending.remove(ready[0])
    return [project.stages[s] for s in done]


def build_corners(inputs: Mapping[str, Input],
                  seed: int = 0) -> tuple[dict[str, np.ndarray], list[str], str]:
    """Row 0 is the nominal; the rest every combination of each varying input's points.

    Returns the arrays, the varying input names and a note ("" unless corners were sampled).
    Two plain inputs read from the same key (a trigger's firing range reading its power
    stage's load, which that stage's check reads too) are one quantity: they share a column.
    """
    alias: dict[str, str] = {}
    seen: dict[tuple[Any, ...], str] = {}
    for name, inp in inputs.items():
        v = inp.value
        key = (inp.path, v.lo, v.nom, v.hi)
        if inp.sweep or inp.extra:
            continue
        if key in seen:
            alias[name] = seen[key]
        else:
            seen[key] = name
    names = [n for n in inputs if n not in alias]
    points: list[np.ndarray] = []
    varying: list[str] = []
    for name in names:
        inp = inputs[name]
        v = inp.value
        if inp.sweep and v.varies:
            pts = np.linspace(v.lo, v.hi, inp.sweep)
        elif v.varies:
            pts = np.array([v.lo, v.hi])
        else:
            pts = np.array([v.nom])
        extra = [x for x in inp.extra if v.lo < x < v.hi]
        if extra:
            # sorted and distinct, as np.unique gives (which would import numpy.ma: 10 ms)
            pts = np.array(sorted(set(pts.tolist()).union(extra)))
        if len(pts) > 1:
            varying.append(name)
        points.append(pts)
    note = ""
    count = math.prod(len(p) for p in points)
    n_vary_plain = sum(1 for n in varying if not inputs[n].sweep)
    if n_vary_plain > MAX_VARYING:
        rng = np.random.default_rng(seed)
        idx = [rng.integers(0, len(p), SAMPLED_CORNERS) for p in points]
        # Always include the all-low and all-high corners.
        idx = [np.concatenate([[0, len(p) - 1], i]) for p, i in zip(points, idx, strict=True)]
        cols = [p[i] for p, i in zip(points, idx, strict=True)]
        note = (f"{n_vary_plain} varying inputs: {SAMPLED_CORNERS} sampled corners instead of "
                f"all {count}")
    else:
        # np.meshgrid(*points, indexing="ij"), raveled, without its broadcasting per input:
        # the first input varies slowest, each point repeated for every combination after it
        cols = []
        after = count
        for p in points:
            after //= len(p)
            cols.append(np.tile(np.repeat(p, after), count // (len(p) * after)))
    arrays = {}
    for name, col in zip(names, cols, strict=True):
        nom = inputs[name].value.nom
        arrays[name] = np.concatenate([[nom], col])
    for name, same in alias.items():
        arrays[name] = arrays[same].copy()
    return arrays, varying, note


def _badness(out: Outcome, optional: Iterable[str]) -> tuple[np.ndarray, np.ndarray]:
    """Per row (status, margin) as :func:`reduce` ranks them: a row without a finite answer
    fails with margin −∞."""
    opt = set(optional)
    finite = np.ones(np.shape(out.margin), dtype=bool)
    for k, v in out.values.items():
        if k not in opt:
            finite &= np.isfinite(v)
    margin = np.asarray(out.margin, dtype=float)
    finite &= ~np.isnan(margin) | bool(np.isnan(margin).all())
    status = np.where(finite, out.status.astype(int), FAIL)
    return status, np.where(finite, np.nan_to_num(margin, nan=np.inf), -np.inf)


def search_worst(defn: CheckDef, bound: Bound, arrays: dict[str, np.ndarray],
                 varying: list[str], out: Outcome, limits: Mapping[str, float],
                 rounds: int = 40) -> tuple[dict[str, np.ndarray], Outcome, int]:
    """After sampled corners: a greedy search for a worse corner from the worst sampled one.

    A check that moves one way with each input is worst at one corner, which a random sample
    of the corners usually misses. Each round tries every other point of every varying input
    from the worst row so far (one array call) and moves to the worst of them while that is
    worse; the rows tried are appended to the table. Inputs read from the same key move
    together. Returns the grown arrays, the outcome over them and the number of rows added.
    """
    n0 = len(next(iter(arrays.values())))
    levels = {n: np.array(sorted(set(arrays[n][1:].tolist()))) for n in varying}
    # Columns that copy a varying one (inputs read from the same key).
    twins = {n: [m for m in arrays if m != n and m not in varying
                 and np.array_equal(arrays[m], arrays[n])] for n in varying}

    def rank(o: Outcome) -> np.ndarray:
        st, mg = _badness(o, defn.optional)
        return np.lexsort((mg, -st))

    worst = int(rank(out)[0])
    added = 0
    for _ in range(rounds):
        rows: list[int] = []
        cand: dict[str, list[np.ndarray]] = {k: [] for k in arrays}
        for n in varying:
            for x in levels[n]:
                if x == arrays[n][worst]:
                    continue
                for k in arrays:
                    cand[k].append(arrays[k][worst:worst + 1])
                cand[n][-1] = np.array([x])
                for m in twins[n]:
                    cand[m][-1] = np.array([x])
                rows.append(0)
        if not rows:
            break
        new = {k: np.concatenate(v) for k, v in cand.items()}
        with np.errstate(all="ignore"):
            got = call(defn, bound, new, limits)
        arrays = {k: np.concatenate([arrays[k], new[k]]) for k in arrays}
        size = len(next(iter(arrays.values())))
        out = Outcome({k: np.concatenate([np.broadcast_to(out.values[k], (size - len(rows),)),
                                          np.broadcast_to(got.values[k], (len(rows),))])
                       for k in out.values},
                      np.concatenate([out.margin, got.margin]),
                      np.concatenate([out.status, got.status]).astype(np.int8), out.notes)
        added += len(rows)
        best = int(rank(out)[0])
        if best == worst or best < size - len(rows):
            break  # no tried row is worse than the worst so far
        worst = best
    assert len(next(iter(arrays.values()))) == n0 + added
    return arrays, out, added


def _canon(x: float) -> float | None:
    return None if isinstance(x, float) and math.isnan(x) else float(x)


def snapshot(check: str, stage: str, bound: Bound) -> dict[str, Any]:
    """The canonical record of exactly what a check read: paths → SI values, and options."""
    ins: dict[str, Any] = {}
    for inp in bound.inputs.values():
        v = inp.value
        ins[inp.path] = [_canon(v.nom), _canon(v.lo), _canon(v.hi)]
    opts = {k: (v if isinstance(v, (str, bool, int, float, type(None))) else repr(v))
            for k, v in bound.options.items()}
    snap = {"scheme": HASH_SCHEME, "stage": stage, "check": check, "inputs": ins,
            "options": opts}
    defn = CHECKS.get(check)
    if defn is not None and defn.revision != 1:  # a revised method: earlier sign-offs go stale
        snap["method"] = defn.revision
    return snap


def inputs_hash(snap: Mapping[str, Any]) -> str:
    """SHA-256 of the canonical JSON of a snapshot (sorted keys, shortest float repr)."""
    text = json.dumps(snap, sort_keys=True, separators=(",", ":"), allow_nan=False)
    return hashlib.sha256(text.encode()).hexdigest()


def _label(path: str) -> str:
    path = path.split("#")[0]
    for head in ("stages.", "parts.", "conditions."):
        if path.startswith(head):
            return path[len(head):]
    return path


def reduce(bound: Bound, arrays: dict[str, np.ndarray], varying: list[str],
           out: Outcome, limits: Mapping[str, float],
           optional: Iterable[str] = ()) -> tuple[Reduced, int]:
    """Reduce the rows of one evaluation: overall status, smallest margin, the worst row.

    A row where a value not in ``optional`` is NaN or infinite, or whose margin is NaN while
    other rows have one (a check without a limit has none at any row), fails: the check has no
    answer there, and no answer is never a pass. Such a result carries a note naming the
    values ("no finite answer: ...").
    """
    status = out.status.astype(int)
    opt = set(optional)
    nan_margin = np.isnan(out.margin)
    finite = ~nan_margin | bool(nan_margin.all())
    bad: list[str] = []
    for k, v in out.values.items():
        if k in opt:
            continue
        ok = np.isfinite(v)
        if not ok.all():
            bad.append(k)
            finite &= ok
    status = np.where(finite, status, FAIL)
    margin = np.where(finite, out.margin, -np.inf)
    order = np.lexsort((margin, -status))
    worst = int(order[0])

    keys = list(out.values)
    cols = [np.asarray(out.values[k]) for k in keys]

    def pick(f: Any) -> dict[str, float]:
        if cols and all(c.shape == cols[0].shape and c.ndim == 1 for c in cols):
            # one call over all values at once (a min or max is exact: the same numbers)
            return dict(zip(keys, f(np.stack(cols).astype(float), axis=1).tolist(),
                            strict=True))
        return {k: float(f(v)) for k, v in zip(keys, cols, strict=True)}

    with warnings.catch_warnings():  # an all-NaN value (no valid row) reduces to NaN quietly
        warnings.simplefilter("ignore", RuntimeWarning)
        lo, hi = pick(np.nanmin), pick(np.nanmax)
    notes = list(dict.fromkeys(bound.notes + out.notes))
    if not finite.all():
        what = ", ".join(bad) if bad else "the margin"
        notes.insert(0, f"no finite answer: {what} not finite at {int((~finite).sum())} of "
                        f"{len(finite)} corners (an input outside the range the method covers?)")
    red = Reduced(
        status=STATUS_NAMES[int(status.max())],
        margin=float(out.margin[worst]) if finite[worst] else float("nan"),
        nom={k: float(v[0]) for k, v in out.values.items()},
        lo=lo, hi=hi,
        worst={k: float(v[worst]) for k, v in out.values.items()},
        worst_inputs={k: float(arrays[k][worst]) for k in varying},
        limits=limits, bound=bound, notes=notes,
    )
    return red, worst


#: What a formatted summary shows for a NaN (—) or an infinity (∞), or Python's own words.
_NON_FINITE_TEXT = re.compile(r"[—∞]|\b(nan|inf)\b", re.IGNORECASE)


def _finite_summary(status: str, summary: str, notes: list[str]) -> tuple[str, str]:
    """The last guard of the no-finite-answer rule: a summary showing a non-finite number.

    Returns (status, summary); a pass whose summary shows one becomes a fail that says so
    (a marginal one already asks for a look). Notes the summary must carry (sampled corners,
    no finite answer) are appended, so they reach every view and the JSON.
    """
    if status == "pass" and _NON_FINITE_TEXT.search(summary):
        status = "fail"
        summary = ("no finite answer: the summary shows a value that is not a number (an "
                   "input outside the range the method covers?); " + summary)
    for n in notes:
        if (n.startswith("no finite answer") or "sampled corners" in n) and n not in summary:
            summary += "; " + n
    return status, summary


def call(defn: CheckDef, bound: Bound, arrays: Mapping[str, np.ndarray],
         limits: Mapping[str, float]) -> Outcome:
    """Call a check's pure function once on whole arrays; every output broadcast to (n,)."""
    n = len(next(iter(arrays.values()))) if arrays else 1
    return defn.fn(**arrays, **bound.options, limits=limits).broadcast(n)


Computed = tuple[dict[str, np.ndarray], list[str], Outcome, Reduced, int, str]


class LineCache:
    """Each (check, inputs hash, limits) computed once across a product line.

    The inputs hash covers the stage, the check, every value it reads (nominal and both ends)
    and its options; the key adds the limits, the inputs' names, order, sweeps and interior
    points, and the binding's notes, so two variants with the same key get the same corners,
    rows, reduction and summary. The entries are shared read-only between results; the least
    recently used go first once ``size`` are held, so memory stays bounded over any number of
    projects.
    """

    def __init__(self, size: int = 256, *, compact: bool = False) -> None:
        self.size = size
        self.compact = compact
        self.entries: OrderedDict[tuple[str, str, str], Computed] = OrderedDict()
        self.hits = 0
        self.misses = 0

    def get(self, key: tuple[str, str, str]) -> Computed | None:
        """The computation stored under ``key`` (marked recently used), or None."""
        hit = self.entries.get(key)
        if hit is None:
            self.misses += 1
            return None
        self.hits += 1
        self.entries.move_to_end(key)
        return hit

    def put(self, key: tuple[str, str, str], value: Computed) -> None:
        """Store a computation, dropping the least recently used beyond ``size``."""
        self.entries[key] = value
        while len(self.entries) > self.size:
            self.entries.popitem(last=False)


_LINE_CACHE: LineCache | None = None

#: Entries kept: full entries hold whole corner tables (for plots and the workbook); compact
#: ones only the nominal and worst rows, so many more fit in the same memory.
FULL_SIZE, COMPACT_SIZE = 256, 8192


@contextmanager
def line_cache(size: int | None = None, *, compact: bool = False) -> Iterator[LineCache]:
    """Within the block, identical (check, inputs hash, limits) are computed once.

    ``compact``: results keep only the nominal and the worst row of their corner table (their
    ``evaluation``), enough for every summary, value and worst corner, not for plots, Monte
    Carlo or the workbook's corner views.
    """
    global _LINE_CACHE
    size = size or (COMPACT_SIZE if compact else FULL_SIZE)
    previous, _LINE_CACHE = _LINE_CACHE, LineCache(size, compact=compact)
    try:
        yield _LINE_CACHE
    finally:
        _LINE_CACHE = previous


@contextmanager
def no_line_cache() -> Iterator[None]:
    """Within the block, every check is computed afresh with its whole corner table."""
    global _LINE_CACHE
    previous, _LINE_CACHE = _LINE_CACHE, None
    try:
        yield
    finally:
        _LINE_CACHE = previous


def enable_line_cache(*, compact: bool = False) -> LineCache:
    """Turn the line-wide cache on for the rest of this process (a worker process)."""
    global _LINE_CACHE
    if _LINE_CACHE is None:
        _LINE_CACHE = LineCache(COMPACT_SIZE if compact else FULL_SIZE, compact=compact)
    return _LINE_CACHE


def _compact(done: Computed) -> Computed:
    """Only the nominal row and the worst row of a computation (the worst is then row 1)."""
    arrays, varying, out, red, worst, summary = done
    rows = np.array([0, worst])
    small = Outcome({k: np.asarray(v)[rows] for k, v in out.values.items()},
                    np.asarray(out.margin)[rows], np.asarray(out.status)[rows], list(out.notes))
    return {k: a[rows] for k, a in arrays.items()}, varying, small, red, 1, summary


def _computed(defn: CheckDef, bound: Bound, limits: Mapping[str, float],
              digest: str) -> Computed:
    """Corners, one array call, the reduction and the summary (once per key in a line)."""
    cache = _LINE_CACHE
    # Beyond the inputs hash: the order, names, sweeps and interior points of the inputs (they
    # shape the corner table and so the worst row) and the binding's notes (in the summary).
    shape = [[n, i.path, i.sweep, list(i.extra)] for n, i in bound.inputs.items()]
    key = (defn.id, digest, json.dumps([dict(limits), shape, bound.notes], sort_keys=True,
                                       default=repr))
    if cache is not None:
        hit = cache.get(key)
        if hit is not None:
            return hit
    arrays, varying, note = build_corners(bound.inputs)
    with np.errstate(all="ignore"):  # non-finite rows are judged in reduce, not warned
        out = call(defn, bound, arrays, limits)
    if note:
        arrays, out, added = search_worst(defn, bound, arrays, varying, out, limits)
        note += f", then {added} more on a search from the worst of them"
        out.notes.append(note)
    red, worst = reduce(bound, arrays, varying, out, limits, defn.optional)
    with np.errstate(all="ignore"):
        summary = defn.summarise(red)
    done = (arrays, varying, out, red, worst, summary)
    if cache is not None:
        if cache.compact:
            done = _compact(done)
        cache.put(key, done)
    return done


def evaluate_check(defn: CheckDef, project: Project, stage: Stage, checklist: Checklist,
                   *, strict: bool = False) -> Result:
    """Bind, build corners, compute once on arrays, reduce and summarise one check."""
    if defn.id in checklist.disabled:
        return Result(stage.id, defn.id, stage.kind, "not-applicable",
                      None, f"switched off by the checklist: {checklist.disabled[defn.id]}")
    bound = defn.bind(Context(project, stage))
    snap = snapshot(defn.id, stage.id, bound)
    digest = inputs_hash(snap)
    if bound.not_applicable:
        return Result(stage.id, defn.id, stage.kind, "not-applicable", None,
                      bound.not_applicable, inputs_sha256=digest, snapshot=snap)
    if bound.missing or bound.unmodelled:
        text = ("incomplete: " + bound.unmodelled if bound.unmodelled else
                "incomplete: " + ", ".join(f"{p} not given" for p in bound.missing)
                + " (give it, or switch the check off in the checklist)")
        return Result(stage.id, defn.id, stage.kind, "incomplete", None, text,
                      inputs_sha256=digest, snapshot=snap, needs=list(bound.missing))
    limits = checklist.limits_for(defn.id)
    try:
        arrays, varying, out, red, worst, summary = _computed(defn, bound, limits, digest)
        status, summary = _finite_summary(red.status, summary, red.notes)
    except LatchbookError:
        raise
    except Exception as exc:  # a defect in a check: report it as an error result, visibly
        if strict:
            raise
        return Result(stage.id, defn.id, stage.kind, "error", None,
                      f"the computation failed ({type(exc).__name__}: {exc}); please report it",
                      inputs_sha256=digest, snapshot=snap)
    values = {}
    for name, unit in defn.units.items():
        if name not in red.nom:
            continue
        if name in defn.optional and math.isnan(red.lo[name]):
            continue  # NaN at every row: not defined for this circuit, so not reported
        a, b, c = (to_report(d[name], unit) for d in (red.nom, red.lo, red.hi))
        values[name] = Stat(a, b, c, unit)
    worst_txt = {}
    for name in varying:
        inp = bound.inputs[name]
        worst_txt[_label(inp.path)] = show(float(arrays[name][worst]), inp.value.dim)
    margin = red.margin if math.isfinite(red.margin) and status == red.status else None
    return Result(stage.id, defn.id, stage.kind, status, margin, summary, worst_txt,
                  digest, values, list(red.notes), snap,
                  Evaluation(list(arrays), arrays, out, worst, bound, varying, limits))


def evaluate(project: Project, checklist: Checklist | None = None, *,
             only: Iterable[tuple[str, str]] | None = None, strict: bool = False,
             on_result: Callable[[Result], None] | None = None) -> Run:
    """Run every check of every stage of ``project`` (or only the given (stage, check) pairs).

    ``on_result`` is handed each result as soon as it is known, in the order of the Run (the
    workbook fills a large project's table while the rest is computed).

    Results come in the project's stage order and the catalogue's check order. A catalogue
    check that is not built yet is reported as ``not-applicable`` with that reason. A check
    whose premise (a check it depends on) fails, errors, is blocked or incomplete is
    ``blocked``; premises outside ``only`` are computed for that purpose and not returned.
    """
    checklist = checklist or standard()
    wanted = set(only) if only is not None else None
    stage_order(project)  # validates the link graph
    done: dict[tuple[str, str], Result] = {}

    def one(stage: Stage, cid: str) -> Result:
        key = (stage.id, cid)
        if key not in done:
            defn = CHECKS.get(cid)
            if defn is None or stage.kind not in defn.kinds:
                done[key] = Result(stage.id, cid, stage.kind, "not-applicable", None,
                                   "this check is not available yet in this version")
            else:
                done[key] = evaluate_check(defn, project, stage, checklist, strict=strict)
        return done[key]

    def resolved(stage: Stage, cid: str, seen: frozenset[tuple[str, str]]) -> Result:
        res = one(stage, cid)
        ev = res.evaluation
        if res.status in ("not-applicable", "error") or ev is None or (stage.id, cid) in seen:
            return res
        for dep_stage, dep_check in ev.bound.depends:
            dep_st = project.stages.get(dep_stage)
            if dep_st is None:
                continue
            dep = resolved(dep_st, dep_check, seen | {(stage.id, cid)})
            if dep.status in FAILING:
                return blocked(res, dep)
        return res

    results = []
    with memo.shared():  # checks that solve the same firing angle from the same rows share it
        for stage in project.stages.values():
            for cid, kinds in CATALOGUE:
                if stage.kind not in kinds or (wanted is not None
                                               and (stage.id, cid) not in wanted):
                    continue
                results.append(resolved(stage, cid, frozenset()))
                if on_result is not None:
                    on_result(results[-1])
    return Run(project, checklist, results)


def blocked(res: Result, dep: Result) -> Result:
    """``res`` as ``blocked`` by the failed premise ``dep``: its own numbers mean nothing."""
    return Result(res.stage, res.check, res.kind, "blocked", None,
                  f"blocked: needs {dep.check} of `{dep.stage}`, which is {dep.status}: this "
                  f"check's numbers assume it passes (fix {dep.check} first)", res.worst,
                  res.inputs_sha256, res.values, res.notes, res.snapshot, res.evaluation,
                  needs=[f"{dep.stage}/{dep.check}"])


def run_project(path: str | Path) -> Run:
    """Load a project file (variants resolved) with its checklist; compute every check once."""
    from reviewer.project import load_project

    project = load_project(path)
    return evaluate(project, load_checklist(project.checklist, Path(path).parent))


def status_counts(results: Iterable[Result]) -> dict[str, int]:
    """How many results have each status."""
    counts: dict[str, int] = {}
    for r in results:
        counts[r.status] = counts.get(r.status, 0) + 1
    return counts


__all__ = ["FAIL", "MARGINAL", "Evaluation", "LineCache", "Result", "Run", "Stat", "blocked",
           "enable_line_cache", "evaluate", "line_cache", "no_line_cache", "run_project",
           "evaluate_check", "build_corners", "inputs_hash", "snapshot", "stage_order",
           "status_counts"]
