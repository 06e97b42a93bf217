"""Worker processes for the per-strip stages of a build (detailing, sheet layout, previews).

Strips are independent once the project is read, so a floor of many strips is shared out
over worker processes; the results come back in strip order, so the outputs are the same
bytes whatever the number of workers. A few strips are done in this process: starting
workers costs more than it saves.

The shared inputs of a stage (the project, the design code, the marked details) reach the
workers once, through the pool's initializer (inherited without copying where the platform
forks), and each task is only an index into them.
"""

from __future__ import annotations

__all__ = [
    "PARALLEL_FROM_STRIPS",
    "fork_shares_memory",
    "ignore_interrupts",
    "map_indexed",
    "start_indexed",
    "worker_count",
]

import multiprocessing
import os
import signal
import sys
from collections.abc import Callable, Sequence
from concurrent.futures import ProcessPoolExecutor
from typing import Any, TypeVar

T = TypeVar("T")

#: Projects with more strips than this are detailed in worker processes ("a handful" less).
PARALLEL_FROM_STRIPS = 6

_CONTEXT: Any = None


def worker_count(n_items: int, requested: int | None = None) -> int:
    """Worker processes for ``n_items`` strips: ``requested`` (``--jobs``) when given, else
    one per CPU for more than :data:`PARALLEL_FROM_STRIPS` strips, else none (0: this process)."""
    if requested is not None:
        return max(0, min(requested, n_items)) if requested > 1 else 0
    if n_items <= PARALLEL_FROM_STRIPS:
        return 0
    cpus = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    cpus = cpus or 1
    return min(cpus, n_items) if cpus > 1 else 0


def ignore_interrupts() -> None:
    """In a worker: leave Ctrl-C to the main process (which stops the build and says so in
    one line) instead of printing a traceback from every worker."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)


def _set_context(context: Any) -> None:
    global _CONTEXT
    ignore_interrupts()
    _CONTEXT = context


def _call(task: tuple[Callable[[Any, int], Any], int]) -> Any:
    fn, index = task
    return fn(_CONTEXT, index)


def fork_shares_memory() -> bool:
    """True where workers are forked and so see this process's objects without pickling
    (objects that cannot be pickled, such as an open drawing, may then be shared)."""
    return sys.platform.startswith("linux")


def _mp_context() -> multiprocessing.context.BaseContext:
    # fork shares the (read-only) inputs without pickling them; elsewhere spawn is the default.
    if fork_shares_memory():
        return multiprocessing.get_context("fork")
    return multiprocessing.get_context()


def map_indexed(
    fn: Callable[[Any, int], T],
    context: Any,
    n_items: int,
    *,
    workers: int,
    on_done: Callable[[int], None] | None = None,
) -> list[T]:
    """``[fn(context, i) for i in range(n_items)]``, in that order, over ``workers`` processes
    (none when ``workers`` is 0). ``fn`` must be a module-level function and must not raise
    for an expected failure: return it as a value. ``on_done(i)`` is called as item i is done."""
    if workers <= 0 or n_items <= 1:
        out: list[T] = []
        for i in range(n_items):
            out.append(fn(context, i))
            if on_done is not None:
                on_done(i)
        return out
    chunk = max(1, min(8, n_items // (4 * workers)))
    tasks: Sequence[tuple[Callable[[Any, int], T], int]] = [(fn, i) for i in range(n_items)]
    with ProcessPoolExecutor(
        max_workers=workers,
        mp_context=_mp_context(),
        initializer=_set_context,
        initargs=(context,),
    ) as pool:
        out = []
        for i, result in enumerate(pool.map(_call, tasks, chunksize=chunk)):
            out.append(result)
            if on_done is not None:
                on_done(i)
        return out


class Pending:
    """Work started by :func:`start_indexed`; :meth:`results` waits for it (in order)."""

    def __init__(self, fn, context, n_items: int, pool, futures) -> None:
        self._fn, self._context, self._n = fn, context, n_items
        self._pool, self._futures = pool, futures

    def results(self, on_done: Callable[[int], None] | None = None) -> list:
        if self._pool is None:  # no workers: the work is done now, here
            return map_indexed(self._fn, self._context, self._n, workers=0, on_done=on_done)
        try:
            out = []
            for i, future in enumerate(self._futures):
                out.append(future.result())
                if on_done is not None:
                    on_done(i)
            return out
        finally:
            self._pool.shutdown(wait=True, cancel_futures=True)


def start_indexed(
    fn: Callable[[Any, int], T], context: Any, n_items: int, *, workers: int
) -> Pending:
    """Like :func:`map_indexed`, but returns at once: this process may do other work while
    the workers compute; ``.results()`` then gives the list. Without workers (0) nothing is
    computed until ``.results()`` is called."""
    if workers <= 0 or n_items <= 1:
        return Pending(fn, context, n_items, None, None)
    pool = ProcessPoolExecutor(
        max_workers=min(workers, n_items),
        mp_context=_mp_context(),
        initializer=_set_context,
        initargs=(context,),
    )
    futures = [pool.submit(_call, (fn, i)) for i in range(n_items)]
    return Pending(fn, context, n_items, pool, futures)
