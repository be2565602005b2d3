"""Per-project work on all cores, or on a Dask cluster, with results in input order.

:func:`ordered_map` calls ``fn`` on every item and yields the results in the order of the items,
whatever order the workers finish in, so the output of a parallel run is byte for byte the
serial one. At most a few items per worker are in flight at once, so the caller's memory does
not grow with the number of items: results are written out as they come and then dropped.

Backends: one process (``jobs=1``), a local process pool (``jobs=N``; worker processes are
forked from a single-threaded caller, so they start with the modules already imported, else
started by a fork server), or the scheduler of a ``distributed`` cluster
(``scheduler="tcp://host:port"``, the ``cluster`` extra). Each process computes identical
(check, inputs hash, limits) once (:func:`reviewer.engine.line_cache`).
"""

from __future__ import annotations

import os
import threading
from collections import deque
from collections.abc import Callable, Iterable, Iterator
from typing import TYPE_CHECKING, Any, TypeVar

from reviewer.errors import LatchbookError

if TYPE_CHECKING:
    from concurrent.futures import Future

T = TypeVar("T")
R = TypeVar("R")

AHEAD = 4  # items in flight per worker: enough to keep every core busy, few enough to stay flat
CONNECT_TIMEOUT = 10.0  # s to reach a scheduler before saying it cannot be reached


def default_jobs() -> int:
    """The cores this process may run on (all of them, unless an affinity mask says less)."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except (AttributeError, OSError):
        return max(1, os.cpu_count() or 1)


def _worker_init(compact: bool = False) -> None:
    from reviewer.engine import enable_line_cache

    enable_line_cache(compact=compact)


def _cached_call(fn: Callable[[Any], Any], item: Any, compact: bool) -> Any:
    """Run ``fn(item)`` in a cluster worker, with the line cache on for that worker."""
    _worker_init(compact)
    return fn(item)


def _context() -> Any:
    """Fork (workers start at once, modules imported) while this process has one thread;
    with other threads running (a lock one of them holds would stay held in the child)
    a fork server, which forks from a clean process; else the platform's default."""
    import multiprocessing  # here: a serial run (most commands) never pays for its import

    methods = multiprocessing.get_all_start_methods()
    if "fork" in methods and threading.active_count() == 1:
        return multiprocessing.get_context("fork")
    if "forkserver" in methods:
        ctx = multiprocessing.get_context("forkserver")
        ctx.set_forkserver_preload(["reviewer.batch", "reviewer.engine"])
        return ctx
    return multiprocessing.get_context()


def _windowed(submit: Callable[[T], Any], items: list[T], width: int,
              result: Callable[[Any], R]) -> Iterator[R]:
    pending: deque[Any] = deque()
    it = iter(items)
    for item in it:
        pending.append(submit(item))
        if len(pending) >= width:
            break
    while pending:
        first = pending.popleft()
        nxt = next(it, _END)
        if nxt is not _END:
            pending.append(submit(nxt))
        yield result(first)


_END: Any = object()


def ordered_map(fn: Callable[[T], R], items: Iterable[T], *, jobs: int = 1,
                scheduler: str | None = None, compact: bool = False) -> Iterator[R]:
    """``fn(item)`` for every item, yielded in the items' order.

    ``fn`` and the items must pickle (a module-level function, or a ``functools.partial`` of
    one). The line cache is on for the duration of the call (in this process, or in each
    worker); ``compact`` when ``fn`` needs no whole corner tables
    (:func:`reviewer.engine.line_cache`).
    """
    items = list(items)
    if scheduler:
        yield from _on_cluster(fn, items, scheduler, compact)
        return
    if jobs <= 1 or len(items) <= 1:
        from reviewer.engine import line_cache

        with line_cache(compact=compact):
            for item in items:
                yield fn(item)
        return
    from concurrent.futures import ProcessPoolExecutor

    workers = min(jobs, len(items))
    with ProcessPoolExecutor(max_workers=workers, mp_context=_context(),
                             initializer=_worker_init, initargs=(compact,)) as pool:
        def submit(item: T) -> Future[R]:
            return pool.submit(fn, item)

        yield from _windowed(submit, items, workers * AHEAD, lambda f: f.result())


def _on_cluster(fn: Callable[[T], R], items: list[T], address: str,
                compact: bool) -> Iterator[R]:
    try:
        from distributed import Client
    except ImportError:
        raise LatchbookError("--scheduler needs the cluster extra: pip install "
                             "'latchbook[cluster]'") from None
    try:
        client = Client(address, timeout=CONNECT_TIMEOUT, set_as_default=False)
    except (OSError, TimeoutError, ValueError) as exc:
        raise LatchbookError(f"cannot reach the scheduler at {address}: {exc}; start one "
                             "(dask scheduler) or check the address (tcp://HOST:PORT)") from None
    try:
        nworkers = max(1, len(client.scheduler_info().get("workers", {})))

        def submit(item: T) -> Any:
            return client.submit(_cached_call, fn, item, compact, pure=False)

        yield from _windowed(submit, items, nworkers * AHEAD, lambda f: f.result())
    finally:
        client.close()


__all__ = ["default_jobs", "ordered_map"]
