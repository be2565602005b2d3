"""Share one solution among the checks that ask for it with identical inputs.

Several checks solve the same line-synchronised firing angle from the same corner or sample
arrays, and several checks read the same stage waveform (means, RMS, segments) from the same
rows. Inside a :func:`shared` block, a function decorated with :func:`memoised` computes once
per distinct set of inputs (compared by their values, not by identity) and hands every caller
its own copy of the result (an array, or a dict of arrays); outside such a block it simply
computes. The block is per thread (a context variable), so a worker computing in the
background shares nothing with another. The functions stay pure: the same inputs give the
same array either way.
"""

from __future__ import annotations

import functools
from collections import deque
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from contextvars import ContextVar
from typing import Any, TypeVar

import numpy as np

F = TypeVar("F", bound=Callable[..., Any])

#: What one block keeps at most [bytes of inputs and results]; the oldest entries go first. A
#: large project's whole run is one block, and a check that searches (golden sections over R)
#: asks for many waveforms it never asks for again.
MAX_BYTES = 64 * 2**20


class _Store(dict):  # type: ignore[type-arg]
    """Fingerprint → [(inputs, result)], with the entries in the order they came and their
    size, so that the block stays under :data:`MAX_BYTES`."""

    def __init__(self) -> None:
        super().__init__()
        self.order: deque[tuple[tuple[Any, ...], tuple[dict[str, Any], Any], int]] = deque()
        self.nbytes = 0

    def add(self, key: tuple[Any, ...], entry: tuple[dict[str, Any], Any]) -> None:
        size = _size(entry[0]) + _size(entry[1])
        self.setdefault(key, []).append(entry)
        self.order.append((key, entry, size))
        self.nbytes += size
        while self.nbytes > MAX_BYTES and len(self.order) > 1:
            old_key, old, old_size = self.order.popleft()
            bucket = self[old_key]
            bucket[:] = [e for e in bucket if e is not old]
            if not bucket:
                del self[old_key]
            self.nbytes -= old_size

    def clear(self) -> None:
        super().clear()
        self.order.clear()
        self.nbytes = 0


def _size(x: Any) -> int:
    if isinstance(x, dict):
        return sum(_size(v) for v in x.values())
    return int(x.nbytes) if isinstance(x, np.ndarray) else 0


_STORE: ContextVar[_Store | None] = ContextVar("latchbook_shared_solutions", default=None)


@contextmanager
def shared() -> Iterator[None]:
    """Within this block memoised functions share their results (nested blocks share the
    outer block's store; the store is dropped when the outermost block ends)."""
    if _STORE.get() is not None:
        yield
        return
    token = _STORE.set(_Store())
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


def _plain(v: Any) -> bool:
    """Choices compared as they are (``None`` must not become NaN: it means "absent")."""
    return v is None or isinstance(v, (str, bool))


def _canon(kwargs: dict[str, Any]) -> Inputs:
    return {k: v if _plain(v) else np.asarray(v, dtype=float) for k, v in kwargs.items()}


def _fingerprint(name: str, inputs: Inputs) -> tuple[Any, ...]:
    """A cheap key: names, shapes and a few sampled elements of every input. Entries under
    one key are told apart by comparing every input exactly (:func:`_same`)."""
    parts: list[Any] = [name]
    for k in sorted(inputs):
        v = inputs[k]
        if _plain(v):
            parts.append((k, v))
        else:
            step = max(1, v.size // 8)  # v.flat: a few elements, no copy of a broadcast input
            parts.append((k, v.shape, v.flat[::step].tobytes()))
    return tuple(parts)


def _bits(x: np.ndarray) -> np.ndarray:
    """The float64 array as its bit patterns (equal bit for bit, NaN included; no copy)."""
    return x.view(np.uint64)


def _same(a: Inputs, b: Inputs) -> bool:
    for k, x in a.items():
        y = b[k]
        if _plain(x) or _plain(y):
            if type(x) is not type(y) or x != y:
                return False
        elif x.shape != y.shape or not np.array_equal(_bits(x), _bits(y)):
            return False
    return True


def _copy(result: Any) -> Any:
    """A caller's own copy: an array, or a dict of arrays (a waveform's named values)."""
    if isinstance(result, dict):
        return {k: np.array(v, copy=True) for k, v in result.items()}
    return np.array(result, copy=True)


def memoised(fn: F) -> F:
    """Share ``fn``'s results (keyword arguments only; an array or a dict of arrays) inside a
    :func:`shared` block."""
    name = f"{fn.__module__}.{fn.__qualname__}"

    @functools.wraps(fn)
    def wrapper(**kwargs: Any) -> Any:
        store = _STORE.get()
        if store is None:
            return fn(**kwargs)
        inputs = _canon(kwargs)
        key = _fingerprint(name, inputs)
        for seen, result in store.get(key, ()):
            if _same(seen, inputs):
                return _copy(result)
        # Keep copies of the inputs and of the result: a caller may reuse its arrays for
        # something else, and a result may be a view of an input.
        kept = {k: v if _plain(v) else v.copy() for k, v in inputs.items()}
        result = _copy(fn(**kwargs))
        store.add(key, (kept, result))
        return _copy(result)

    return wrapper  # type: ignore[return-value]
