"""Canonical forms and hashes: the bytes every hash and signature of a record is taken over."""

from __future__ import annotations

import hashlib
import json
import math
from collections.abc import Mapping, Sequence
from datetime import UTC, date, datetime
from datetime import time as dtime
from typing import Any


def _iso(t: datetime) -> str:
    """UTC ISO 8601 with ``Z`` (the one spelling hashed, whatever the TOML wrote)."""
    if t.tzinfo is not None:
        t = t.astimezone(UTC).replace(tzinfo=None)
        return t.isoformat() + "Z"
    return t.isoformat()  # a local date-time (not written by us) hashes as written


def _canon(x: Any) -> Any:
    """A JSON-ready form of a TOML value: NaN/inf and date-times get explicit markers."""
    if isinstance(x, bool) or x is None or isinstance(x, (int, str)):
        return x
    if isinstance(x, float):
        if math.isnan(x):
            return {"$float": "nan"}
        if math.isinf(x):
            return {"$float": "inf" if x > 0 else "-inf"}
        return x
    if isinstance(x, datetime):
        return {"$datetime": _iso(x)}
    if isinstance(x, (date, dtime)):
        return {"$datetime": x.isoformat()}
    if isinstance(x, Mapping):
        return {str(k): _canon(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_canon(v) for v in x]
    raise TypeError(f"not a TOML value: {type(x).__name__}")


def canonical_json(x: Any) -> bytes:
    """Sorted keys, no spaces, shortest float repr, UTF-8: the bytes every hash is taken of."""
    return json.dumps(_canon(x), sort_keys=True, separators=(",", ":"), ensure_ascii=False,
                      allow_nan=False).encode("utf-8")


def sha(x: Any) -> str:
    """SHA-256 of :func:`canonical_json`."""
    return hashlib.sha256(canonical_json(x)).hexdigest()


def entry_bytes(raw: Mapping[str, Any]) -> bytes:
    """The canonical bytes of an entry: everything except its own hash and signature."""
    return canonical_json({k: v for k, v in raw.items()
                           if k not in ("entry_sha256", "signature")})


def entry_hash(raw: Mapping[str, Any]) -> str:
    """``entry_sha256``: SHA-256 of :func:`entry_bytes`."""
    return hashlib.sha256(entry_bytes(raw)).hexdigest()


def head_bytes(project: str, entries: int, head: str) -> bytes:
    """What a signed head signs: the project's file name, the number of entries, the head."""
    return canonical_json({"project": project, "entries": entries, "head_sha256": head})


def snap_to_toml(snap: Mapping[str, Any]) -> dict[str, Any]:
    """The engine's snapshot in TOML: its nulls (NaN inputs, absent options) become ``nan``.

    The engine never puts NaN itself in a snapshot (it maps NaN to null and refuses NaN in the
    hash), so the mapping is reversible.
    """
    def enc(v: Any) -> Any:
        if v is None:
            return math.nan
        if isinstance(v, Mapping):
            return {k: enc(w) for k, w in v.items()}
        if isinstance(v, (list, tuple)):
            return [enc(w) for w in v]
        return v
    return enc(dict(snap))


def snap_from_toml(snap: Mapping[str, Any]) -> dict[str, Any]:
    """Inverse of :func:`snap_to_toml`."""
    def dec(v: Any) -> Any:
        if isinstance(v, float) and math.isnan(v):
            return None
        if isinstance(v, Mapping):
            return {k: dec(w) for k, w in v.items()}
        if isinstance(v, list):
            return [dec(w) for w in v]
        return v
    return dec(dict(snap))


def snap_hash(snap: Mapping[str, Any]) -> str:
    """The engine's inputs hash of a snapshot ("" for a check that read nothing)."""
    from reviewer.engine import inputs_hash

    return inputs_hash(snap) if snap else ""


def item_result(item: Mapping[str, Any]) -> dict[str, Any]:
    """The result part of a covered item (what ``results_sha256`` is taken over)."""
    return {k: item[k] for k in ("stage", "check", "status", "margin", "summary",
                                 "inputs_sha256") if k in item}


def covered_inputs_hash(items: Sequence[Mapping[str, Any]]) -> str:
    """Hash over the sorted (stage, check, inputs hash) of every covered check."""
    return sha(sorted([str(i.get("stage")), str(i.get("check")), str(i.get("inputs_sha256"))]
                      for i in items))


def covered_results_hash(items: Sequence[Mapping[str, Any]]) -> str:
    """Hash over the covered checks' results (status, margin, summary, inputs hash)."""
    return sha([item_result(i) for i in items])


def results_seal(results: Sequence[Mapping[str, Any]]) -> str:
    """The hash over the stored ``[[result]]`` tables (a hand edit to them shows)."""
    return sha(list(results))


__all__ = ["canonical_json", "covered_inputs_hash", "covered_results_hash", "entry_bytes",
           "entry_hash", "head_bytes", "item_result", "results_seal", "sha", "snap_from_toml",
           "snap_hash", "snap_to_toml"]
