"""Running a study on dask: chunks of the batch path, rows written to parquet as chunks finish.

The chunks run on a ``dask.distributed`` cluster: by default a local one started for the study
(``LocalCluster``: one worker process per core, one thread each, BLAS pinned to one thread per
worker), or an existing cluster named by its scheduler's address. Each chunk is one task,
:func:`~workbench.study.evaluate.evaluate_chunk`, given plain values: the case text and the plan's
JSON (scattered once), the chunk's first and last variant and its rows of a global design. No
pool or queue of our own: at most a few chunks per worker are in flight (so memory stays flat),
and chunks are written in variant order as they come back (``pyarrow.parquet.ParquetWriter``,
one row group per chunk), so the file's rows are the same whatever the number of workers or the
chunk size.

A face runs a study through :func:`run_study` with ``progress`` (called after each chunk is
written, with a :class:`Progress`) and ``cancel`` (a callable polled between chunks, or a
``threading.Event``); Ctrl-C (``KeyboardInterrupt``) stops the same way. A stopped study keeps
the rows written so far (a valid parquet file) and says how many in its :class:`StudyOutcome`.
"""

from __future__ import annotations

import logging
import os
import threading
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import msgspec
import numpy as np
import pyarrow.parquet as pq

from workbench.case.errors import InputError
from workbench.study.evaluate import evaluate_chunk, prepare
from workbench.study.plan import BLOCK, Plan
from workbench.study.sampling import unit_design

#: Default chunk: whole Monte Carlo blocks, about a second of one core's solving for a
#: 20-segment shaft (the scheduler's cost per chunk stays a small share of it).
DEFAULT_CHUNK = 4 * BLOCK
#: Chunks in flight per worker: one running, one queued behind it, one coming back.
IN_FLIGHT_PER_WORKER = 3
#: Thread pools of the numerical libraries, pinned to one thread in each worker process.
ONE_THREAD = {
    name: "1"
    for name in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS",
                 "BLIS_NUM_THREADS", "VECLIB_MAXIMUM_THREADS", "NUMEXPR_NUM_THREADS")
}  # fmt: skip


@dataclass(frozen=True)
class Progress:
    """How far a study is: variants written, of how many, chunks written, seconds since start."""

    done: int
    total: int
    chunks: int
    seconds: float


@dataclass(frozen=True)
class StudyOutcome:
    """What a run did: the parquet file, rows written of the plan's, whether it was stopped."""

    path: Path
    rows: int
    total: int
    stopped: bool
    seconds: float
    workers: int
    chunk_size: int


def chunk_bounds(count: int, chunk_size: int) -> list[tuple[int, int]]:
    """The chunks' [start, stop) over ``count`` variants."""
    return [(start, min(start + chunk_size, count)) for start in range(0, count, chunk_size)]


def check_chunk_size(chunk_size: int) -> None:
    """A chunk holds whole Monte Carlo blocks.

    Raises
    ------
    InputError
        ``--chunk-size`` not a positive multiple of :data:`~workbench.study.plan.BLOCK`.
    """
    if chunk_size < BLOCK or chunk_size % BLOCK:
        msg = f"must be a positive multiple of {BLOCK} (whole blocks of random draws), not {chunk_size}"
        raise InputError("--chunk-size", msg)


@contextmanager
def study_client(workers: int | None = None, scheduler: str | None = None) -> Iterator[Any]:
    """A ``dask.distributed`` client: of the cluster at ``scheduler``, or of a local one.

    The local cluster has ``workers`` processes (the machine's cores by default), one thread
    each, BLAS pinned to one thread.
    """
    from dask.distributed import Client, LocalCluster  # noqa: PLC0415 - heavy; only when running

    if scheduler is not None:
        try:
            client = Client(scheduler, timeout="10s")
        except (OSError, TimeoutError, ValueError) as error:
            msg = f"no dask scheduler answers at {scheduler!r} ({type(error).__name__})"
            raise InputError("--scheduler", msg) from None
        with client:
            yield client
        return
    count = workers or os.cpu_count() or 1
    os.environ.update(ONE_THREAD)  # inherited by the worker processes the nannies start
    cluster = LocalCluster(
        n_workers=count,
        threads_per_worker=1,
        processes=True,
        dashboard_address=None,
        silence_logs=logging.ERROR,
        env=ONE_THREAD,
    )
    with cluster, Client(cluster) as client:
        yield client


def _stop_asked(cancel: Callable[[], bool] | threading.Event | None) -> bool:
    if cancel is None:
        return False
    if isinstance(cancel, threading.Event):
        return cancel.is_set()
    return bool(cancel())


def run_study(
    case_text: str | bytes,
    plan_json: str | bytes,
    output: str | os.PathLike[str],
    *,
    workers: int | None = None,
    scheduler: str | None = None,
    client: Any = None,
    chunk_size: int = DEFAULT_CHUNK,
    progress: Callable[[Progress], None] | None = None,
    cancel: Callable[[], bool] | threading.Event | None = None,
    unit: np.ndarray | None = None,
    plan: Plan | None = None,
) -> StudyOutcome:
    """Run a study and write its rows to a parquet file.

    Parameters
    ----------
    case_text, plan_json
        The case file's text and the plan's JSON.
    output
        The parquet file written (replaced if it exists).
    workers
        Worker processes of the local cluster (the machine's cores by default).
    scheduler
        Address of an existing ``dask.distributed`` scheduler (``tcp://host:8786``) to run on
        instead of a local cluster.
    client
        A ``dask.distributed.Client`` already open (a face or a test keeps one for many runs).
    chunk_size
        Variants per chunk (a multiple of :data:`~workbench.study.plan.BLOCK`).
    progress
        Called after each chunk is written.
    cancel
        Polled between chunks; the study stops when it returns true (or the event is set).
    unit
        (count, k) a design on the unit hypercube to run instead of the plan's sampling (the
        Saltelli plan of the Sobol indices); ``plan`` then gives the count.
    plan
        The plan to run (``plan_json`` decoded), when it differs from the text's count.

    Returns
    -------
    StudyOutcome
        Rows written and whether the study was stopped (by ``cancel`` or Ctrl-C).

    Raises
    ------
    InputError
        A bad case, plan, path, chunk size or scheduler address: before any chunk runs.
    """
    check_chunk_size(chunk_size)
    prepared = prepare(case_text, plan_json)  # every input checked before a cluster starts
    plan = plan or prepared.plan
    count = plan.count if unit is None else len(unit)
    design = unit if unit is not None else unit_design(plan)
    bounds = chunk_bounds(count, chunk_size)
    path = Path(output)
    started = time.perf_counter()
    with _client(client, workers, scheduler) as active:
        case_future, plan_future = active.scatter([case_text, plan_json], broadcast=True)
        width = len(active.scheduler_info(n_workers=-1)["workers"]) or 1
        done, stopped, writer = 0, False, None
        pending: dict[int, Any] = {}
        running: dict[Any, int] = {}
        following = 0

        def submit(number: int) -> Any:
            start, stop = bounds[number]
            rows = None if design is None else np.ascontiguousarray(design[start:stop])
            future = active.submit(
                evaluate_chunk, case_future, plan_future, start, stop, rows, pure=False
            )
            running[future] = number
            return future

        from dask.distributed import as_completed  # noqa: PLC0415

        queue = iter(range(len(bounds)))
        first = [
            submit(number)
            for number, _ in zip(queue, range(width * IN_FLIGHT_PER_WORKER), strict=False)
        ]
        finished = as_completed(first)
        try:
            for future in finished:
                number = running.pop(future)
                pending[number] = future.result()
                future.release()
                while following in pending:  # write in variant order
                    table = pending.pop(following)
                    if writer is None:
                        writer = pq.ParquetWriter(path, table.schema)
                    writer.write_table(table)
                    done += table.num_rows
                    following += 1
                    if progress is not None:
                        progress(Progress(done, count, following, time.perf_counter() - started))
                if _stop_asked(cancel):
                    stopped = True
                    break
                waiting = next(queue, None)
                if waiting is not None:
                    finished.add(submit(waiting))
        except KeyboardInterrupt:
            stopped = True
        finally:
            if running:
                active.cancel(list(running))
            if writer is not None:
                writer.close()
    return StudyOutcome(
        path, done, count, stopped, time.perf_counter() - started, width, chunk_size
    )


@contextmanager
def _client(client: Any, workers: int | None, scheduler: str | None) -> Iterator[Any]:
    if client is not None:
        yield client
        return
    with study_client(workers, scheduler) as made:
        yield made


def plan_with_count(plan: Plan, count: int) -> bytes:
    """A plan's JSON with another number of variants (the Saltelli plan's)."""
    document = msgspec.to_builtins(plan)
    document["sampling"]["count"] = count
    document["sampling"]["method"] = "latin_hypercube"  # a global design, given as ``unit``
    return msgspec.json.encode(document)
