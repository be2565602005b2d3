"""Share one solution among the checks that ask for it with identical inputs.

Several checks solve the same line-synchronised firing angle from the same corner or sample
arrays. Inside a :func:`shared` block, a function decorated with :func:`memoised` computes
once per distinct set of inputs (compared by their values, not by identity) and hands every
caller its own copy of the result; outside such a block it simply computes. The block is per
thread (a context variable), so a worker computing in the background shares nothing with
another. The functions stay pure: the same inputs give the same array either way.
"""

from __future__ import annotations

import functools
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from contextvars import ContextVar
from typing import Any, TypeVar

import numpy as np

F = TypeVar("F", bound=Callable[..., np.ndarray])

_STORE: ContextVar[dict[tuple[Any, ...], list[tuple[dict[str, Any], np.ndarray]]] | None] = \
    ContextVar(
        "latchbook_shared_solutions", default=None)


@contextmanager
def shared() -> Iterator[None]:
    """Within this block memoised functions share their results (nested blocks share the
    outer block's store; the store is dropped when the outermost block ends)."""
    if _STORE.get() is not None:
        yield
        return
    token = _STORE.set({})
    try:
        yield
    finally:
        _STORE.reset(token)


def clear() -> None:
    """Forget what the current block has stored (e.g. between Monte Carlo chunks)."""
    store = _STORE.get()
    if store is not None:
        store.clear()


def table(name: str) -> dict[bytes, Any] | None:
    """A dictionary kept for ``name`` by the current :func:`shared` block (None outside one):
    for results shared row by row (a row's inputs as bytes → its result), where the checks
    pass different tables built from the same few distinct rows."""
    store = _STORE.get()
    if store is None:
        return None
    return store.setdefault(("table", name), {})  # type: ignore[return-value,arg-type]


Inputs = dict[str, Any]


def _canon(kwargs: dict[str, Any]) -> Inputs:
    return {k: v if isinstance(v, str) else np.asarray(v, dtype=float)
            for k, v in kwargs.items()}


def _fingerprint(name: str, inputs: Inputs) -> tuple[Any, ...]:
    """A cheap key: names, shapes and a few sampled elements of every input. Entries under
    one key are told apart by comparing every input exactly (:func:`_same`)."""
    parts: list[Any] = [name]
    for k in sorted(inputs):
        v = inputs[k]
        if isinstance(v, str):
            parts.append((k, v))
        else:
            flat = v.ravel()
            step = max(1, flat.size // 8)
            parts.append((k, v.shape, flat[::step].tobytes()))
    return tuple(parts)


def _same(a: Inputs, b: Inputs) -> bool:
    for k, x in a.items():
        y = b[k]
        if isinstance(x, str) or isinstance(y, str):
            if x != y:
                return False
        elif x.shape != y.shape or x.tobytes() != y.tobytes():  # bit for bit, NaN included
            return False
    return True


def memoised(fn: F) -> F:
    """Share ``fn``'s results (keyword arguments only) inside a :func:`shared` block."""
    name = f"{fn.__module__}.{fn.__qualname__}"

    @functools.wraps(fn)
    def wrapper(**kwargs: Any) -> np.ndarray:
        store = _STORE.get()
        if store is None:
            return fn(**kwargs)
        inputs = _canon(kwargs)
        entries = store.setdefault(_fingerprint(name, inputs), [])
        for seen, result in entries:
            if _same(seen, inputs):
                return result.copy()
        # Keep copies of the inputs: a caller may reuse its arrays for something else.
        kept = {k: v if isinstance(v, str) else v.copy() for k, v in inputs.items()}
        result = np.asarray(fn(**kwargs))
        entries.append((kept, result))
        return result.copy()

    return wrapper  # type: ignore[return-value]
