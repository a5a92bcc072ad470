"""Checking a large batch in worker processes, with results in input order.

The files are cut into chunks; a :class:`multiprocessing.pool.Pool` checks one chunk per task
(handed out a few chunks ahead of the one awaited; the parent takes the results in input
order) and sends back the pickled :class:`~sheetlint.batch.FileResult` list, or, for a
streaming report, each file's part of the report (text and counts). The engine's working
``sheet`` of each record is dropped in the worker (it holds a location closure that does not
pickle and no report but the serial HTML one reads it); everything else is the same as in a
serial run.

Each worker enforces the per-file time limit itself (SIGALRM, see :func:`sheetlint.batch.
check_file`). The parent watches as a backstop: when a chunk is not back within its time
budget, or a worker process dies (killed for memory, a crash in a C extension), the pool is
stopped and the files from that chunk on are checked again, that chunk one file at a time in
a one-worker pool, so the file at fault is named and every other file is still checked.
"""

from __future__ import annotations

import math
import os
import pickle
import signal
import time
from collections import deque
from collections.abc import Callable, Iterator, Sequence
from typing import TYPE_CHECKING, Any

from sheetlint.batch import FileResult, check_file, render_safely
from sheetlint.engine.core import Settings

if TYPE_CHECKING:  # multiprocessing is imported only when workers start (start-up time)
    from multiprocessing.pool import Pool

#: a batch below this many files runs serially when the caller leaves ``jobs`` open: starting
#: workers costs about as much as checking this many files (measured with bench/bench_batch.py)
PARALLEL_MIN_FILES = 200
#: files per task: large enough to keep pickling and queueing cheap, small enough to balance
MAX_CHUNK = 32
#: chunks handed to the pool per worker beyond the one whose results are awaited
CHUNKS_AHEAD = 4
#: extra seconds the parent allows beyond the per-file limits before it stops a worker
GRACE_SECONDS = 10.0
#: how often the parent looks for dead workers while it waits, seconds
POLL_SECONDS = 0.25
#: the cyclic collector's thresholds in a worker (CPython's default is 700, 10, 10)
WORKER_GC_THRESHOLDS = (20_000, 20, 20)

#: what a worker was started with: settings, size limit, time limit, render
_WORKER_CONFIG: tuple[Settings | None, int | None, float | None, Any] = (None, None, None, None)


def cpu_count() -> int:
    """CPUs this process may run on."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except (AttributeError, OSError):
        return max(1, os.cpu_count() or 1)


def plan_workers(file_count: int, jobs: int | None) -> int:
    """Worker processes for a batch: 1 means serial in this process.

    ``jobs`` None: one per CPU when the batch has at least :data:`PARALLEL_MIN_FILES` files,
    else serial; ``jobs`` 0 or less: one per CPU; never more workers than files.
    """
    if file_count <= 1:
        return 1
    if jobs is None:
        wanted = cpu_count() if file_count >= PARALLEL_MIN_FILES else 1
    elif jobs <= 0:
        wanted = cpu_count()
    else:
        wanted = jobs
    return max(1, min(wanted, file_count))


def chunk_size(file_count: int, workers: int) -> int:
    """Files per task: about four tasks per worker, at most :data:`MAX_CHUNK`."""
    return max(1, min(MAX_CHUNK, math.ceil(file_count / (4 * workers))))


def check_in_workers(files: Sequence[str], settings: Settings | None, *, workers: int,
                     time_limit: float | None, max_bytes: int | None,
                     render: Callable[[FileResult], Any] | None = None) -> Iterator[Any]:
    """Check ``files`` in ``workers`` processes; yield the results in the order of ``files``.

    With ``render``, each worker applies it to its results and sends back what it returns (a
    report's part: text and counts), not the results themselves.
    """
    size = chunk_size(len(files), workers)
    chunks = [list(files[i:i + size]) for i in range(0, len(files), size)]
    config = (settings, max_bytes, time_limit, render)
    while chunks:
        try:
            pool = _start_pool(workers, config)
        except (OSError, ImportError, ValueError):  # no process support here: check serially
            for chunk in chunks:
                for path in chunk:
                    yield render_safely(render, check_file(
                        path, settings, max_bytes=max_bytes, time_limit=time_limit))
            return
        stopped_at: int | None = None
        try:
            for done, results in enumerate(_ordered_results(pool, chunks, time_limit)):
                if results is None:
                    stopped_at = done
                    break
                yield from results
        finally:
            pool.terminate()
            pool.join()
        if stopped_at is None:
            return
        yield from _isolate(chunks[stopped_at], config)
        chunks = chunks[stopped_at + 1:]


def _ordered_results(pool: Pool, chunks: list[list[str]],
                     time_limit: float | None) -> Iterator[list[Any] | None]:
    """Each chunk's results in order; None (and stop) when a chunk stalls or a worker dies.

    At most :data:`CHUNKS_AHEAD` chunks per worker are handed out beyond the one awaited, so
    that results finished early (while one slow file holds up the order) wait in this
    process in bounded number, not the whole batch's.
    """
    pids = _worker_pids(pool)
    ahead = CHUNKS_AHEAD * max(1, len(pids) if pids else 1)
    pending: deque[Any] = deque()
    handed_out = 0
    for chunk in chunks:
        while handed_out < len(chunks) and len(pending) < ahead:
            pending.append(pool.apply_async(_check_chunk, (chunks[handed_out],)))
            handed_out += 1
        budget = None if time_limit is None else len(chunk) * time_limit + GRACE_SECONDS
        payload = _wait(pending.popleft().get, pool, pids, budget)
        if payload is None:
            yield None
            return
        yield pickle.loads(payload)


def _wait(get: Callable[..., bytes], pool: Pool, pids: frozenset[int] | None,
          budget: float | None) -> bytes | None:
    """The result ``get`` gives, or None when ``budget`` seconds pass or a worker dies."""
    from multiprocessing import TimeoutError as Pending

    start = time.monotonic()
    while True:
        try:
            return get(timeout=POLL_SECONDS)
        except Pending:
            pass
        if budget is not None and time.monotonic() - start > budget:
            return None
        if pids is not None and _worker_pids(pool) != pids:
            return None  # a worker died; its task is lost and will never come back


def _isolate(chunk: list[str], config: tuple[Settings | None, int | None, float | None, Any]
             ) -> Iterator[Any]:
    """Check the files of a chunk that stalled, one at a time, each in a fresh worker if need be.

    A file that again gets no answer is the one at fault: it is reported, the others are checked.
    """
    settings, max_bytes, time_limit, render = config
    pool: Pool | None = None
    try:
        for path in chunk:
            if pool is None:
                pool = _start_pool(1, config)
            iterator = pool.imap(_check_chunk, [[path]], chunksize=1)
            budget = None if time_limit is None else time_limit + GRACE_SECONDS
            payload = _wait(iterator.next, pool, _worker_pids(pool), budget)
            if payload is not None:
                yield from pickle.loads(payload)
                continue
            pool.terminate()
            pool.join()
            pool = None
            if time_limit is not None:
                failed = FileResult(path, f"{path}: time limit of {time_limit:g} s exceeded "
                                          "(the worker checking it stopped responding or died)")
            else:
                failed = FileResult(path, f"{path}: the worker process checking this file "
                                          "died (out of memory?)")
            yield render_safely(render, failed)
    except (OSError, ImportError, ValueError):
        for path in chunk:  # pragma: no cover - only where processes cannot be started
            yield render_safely(render, check_file(path, settings, max_bytes=max_bytes,
                                                   time_limit=time_limit))
    finally:
        if pool is not None:
            pool.terminate()
            pool.join()


def _start_pool(workers: int,
                config: tuple[Settings | None, int | None, float | None, Any]) -> Pool:
    import gc
    import multiprocessing

    # objects that exist now are never collected in the workers: the collector then does not
    # touch (and so copy) the pages a forked worker shares with this process
    gc.freeze()
    try:
        methods = multiprocessing.get_all_start_methods()
        context = multiprocessing.get_context("fork" if "fork" in methods else None)
        return context.Pool(workers, initializer=_init_worker, initargs=config)
    finally:
        gc.unfreeze()  # the workers are forked: this process collects as before


def _worker_pids(pool: Pool) -> frozenset[int] | None:
    """The pids of the pool's workers (the pool replaces a dead worker with a new pid)."""
    processes = getattr(pool, "_pool", None)
    if processes is None:
        return None
    return frozenset(p.pid for p in processes if p.pid is not None)


def _init_worker(settings: Settings | None, max_bytes: int | None,
                 time_limit: float | None, render: Any) -> None:
    """Worker set-up: leave Ctrl-C to the parent, remember the settings, load the engine."""
    global _WORKER_CONFIG
    import gc

    signal.signal(signal.SIGINT, signal.SIG_IGN)
    # a record's objects hold no reference cycles (tests/test_engine_memory.py): collecting
    # less often saves about a tenth of a worker's time (bench/bench_repository.py)
    gc.set_threshold(*WORKER_GC_THRESHOLDS)
    _WORKER_CONFIG = (settings, max_bytes, time_limit, render)
    from sheetlint.relations.registry import all_relations

    all_relations()


def _check_chunk(paths: list[str]) -> bytes:
    """Worker task: check ``paths`` and return the pickled results (without ``sheet``), or
    what ``render`` makes of them."""
    settings, max_bytes, time_limit, render = _WORKER_CONFIG
    results = [render_safely(render, _portable(check_file(
        p, settings, max_bytes=max_bytes, time_limit=time_limit))) for p in paths]
    try:
        return pickle.dumps(results, protocol=pickle.HIGHEST_PROTOCOL)
    except Exception:  # something in a result does not pickle: report it per file
        return pickle.dumps([_pickle_or_error(r, render) for r in results],
                            protocol=pickle.HIGHEST_PROTOCOL)


def _portable(result: FileResult) -> FileResult:
    for record in result.records:
        record.sheet = None
    return result


def _pickle_or_error(result: Any, render: Callable[[FileResult], Any] | None) -> Any:
    try:
        pickle.dumps(result, protocol=pickle.HIGHEST_PROTOCOL)
    except Exception as exc:
        return render_safely(render, FileResult(
            result.path, f"{result.path}: internal error of sheetlint (result does not "
                         f"pickle: {type(exc).__name__}); please report it with this input"))
    return result
