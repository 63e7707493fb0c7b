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
import signal
import threading
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import msgspec
import numpy as np
import pyarrow as pa
import pyarrow.parquet as pq

from workbench.case.errors import InputError
from workbench.study.evaluate import evaluate_chunk, prepare
from workbench.study.plan import BLOCK, Plan
from workbench.study.sampling import unit_design

#: Default chunk: one Monte Carlo block. A batch's check arrays hold variants × results × check
#: kinds × segments values each; at 4,096 variants of a 20-segment, 5-result shaft a worker
#: peaks near 0.2 GB above its own, and the scheduler's cost per chunk (about 10 ms) stays a
#: few per cent of the chunk's solve (benchmark: tests/benchmarks/bench_study.py).
DEFAULT_CHUNK = BLOCK
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
    from dask.distributed import Client  # noqa: PLC0415 - heavy; only when running

    if scheduler is not None:
        try:
            client = Client(scheduler, timeout="10s")
        except (OSError, TimeoutError, ValueError) as error:
            msg = f"no dask scheduler answers at {scheduler!r} ({type(error).__name__})"
            raise InputError("--scheduler", msg) from None
        with client:
            yield client
        return
    with local_cluster(workers) as cluster, Client(cluster) as client:
        yield client


def local_cluster(workers: int | None = None) -> Any:
    """A ``LocalCluster`` of ``workers`` processes (the cores by default), one thread each.

    A face that keeps a cluster across runs makes its own client of it (and closes both).
    """
    from dask.distributed import LocalCluster  # noqa: PLC0415 - heavy; only when running

    with _workers_ignore_ctrl_c():
        return LocalCluster(
            n_workers=workers or os.cpu_count() or 1,
            threads_per_worker=1,
            processes=True,
            dashboard_address=":0",  # its HTTP routes on a free port, never a taken 8787
            silence_logs=logging.ERROR,
            env=ONE_THREAD,
        )


@contextmanager
def _workers_ignore_ctrl_c() -> Iterator[None]:
    """Start worker processes with SIGINT ignored.

    Ctrl-C reaches the whole process group, and only this process (which stops the study and
    keeps its rows) should act on it; the workers are closed with the cluster. An ignored signal
    stays ignored in a spawned process.
    """
    if threading.current_thread() is not threading.main_thread():
        yield  # signal handlers belong to the main thread (a face may run a study elsewhere)
        return
    previous = signal.signal(signal.SIGINT, signal.SIG_IGN)
    try:
        yield
    finally:
        signal.signal(signal.SIGINT, previous)


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
    in_process: bool = False,
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
    in_process
        Run the chunks one after another in this thread, with no cluster (a small study in a
        face: starting a local cluster takes longer than its chunks). The rows are the same.

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
    written = _Rows(Path(output), count, progress)
    written.path.unlink(missing_ok=True)  # replaced: never an older study's rows under its name
    running: dict[Any, int] = {}
    stopped, width, previous = False, 1, None
    try:
        if in_process:
            stopped = _run_in_process(case_text, plan_json, bounds, design, written, cancel)
        else:
            with _client(client, workers, scheduler) as active:
                width = len(active.scheduler_info(n_workers=-1)["workers"]) or 1
                try:
                    stopped = _run_chunks(active, case_text, plan_json, bounds, design, width,
                                          running, written, cancel)  # fmt: skip
                except KeyboardInterrupt:
                    stopped = True
                finally:
                    previous = _ignore_ctrl_c()  # stopping or done: the closing must finish
                    if running:
                        active.cancel(list(running))
    except KeyboardInterrupt:  # while the cluster was starting: nothing written
        stopped = True
    finally:
        written.close()
        if previous is not None:
            signal.signal(signal.SIGINT, previous)
    # However the loop ended (a Ctrl-C may end dask's iterator quietly), fewer rows than the
    # plan's is a stopped study. The rows reported are those the closed file holds: a Ctrl-C
    # landing inside the writer must not leave a count the file does not bear out.
    kept = written.kept()
    stopped = stopped or kept < count
    return StudyOutcome(written.path, kept, count, stopped, written.seconds, width,
                        chunk_size)  # fmt: skip


def _run_in_process(
    case_text: str | bytes,
    plan_json: str | bytes,
    bounds: list[tuple[int, int]],
    design: np.ndarray | None,
    written: _Rows,
    cancel: Callable[[], bool] | threading.Event | None,
) -> bool:
    """The chunks in order in this thread (the same task a worker runs); whether stopped."""
    for start, stop in bounds:
        rows = None if design is None else np.ascontiguousarray(design[start:stop])
        written.write(evaluate_chunk(case_text, plan_json, start, stop, rows))
        if _stop_asked(cancel):
            return True
    return False


class _Rows:
    """The parquet file: chunks written in variant order, one row group each."""

    def __init__(self, path: Path, total: int, progress: Callable[[Progress], None] | None):
        self.path, self.total, self.progress = path, total, progress
        self.started = time.perf_counter()
        self.writer: Any = None
        self.done = self.chunks = 0

    @property
    def seconds(self) -> float:
        return time.perf_counter() - self.started

    def write(self, table: Any) -> None:
        if self.writer is None:
            self.writer = pq.ParquetWriter(self.path, table.schema)
        self.writer.write_table(table)
        self.done += table.num_rows
        self.chunks += 1
        if self.progress is not None:
            self.progress(Progress(self.done, self.total, self.chunks, self.seconds))

    def close(self) -> None:
        if self.writer is not None:
            self.writer.close()
            self.writer = None

    def kept(self) -> int:
        """Rows the closed file holds, read from its footer (0 if nothing was written)."""
        try:
            return int(pq.read_metadata(self.path).num_rows)
        except (OSError, pa.ArrowException):  # nothing written, or no footer: no row kept
            return 0


def _run_chunks(
    active: Any,
    case_text: str | bytes,
    plan_json: str | bytes,
    bounds: list[tuple[int, int]],
    design: np.ndarray | None,
    width: int,
    running: dict[Any, int],
    written: _Rows,
    cancel: Callable[[], bool] | threading.Event | None,
) -> bool:
    """Submit the chunks a window at a time and write them in order; whether it was stopped."""
    from dask.distributed import as_completed  # noqa: PLC0415 - heavy; only when running

    # Keys of this run's own (hash=False): a run after another on one client scatters the same
    # case text, and the earlier run's release of a shared key would lose the later run's data.
    case_future, plan_future = active.scatter([case_text, plan_json], broadcast=True, hash=False)
    pending: dict[int, Any] = {}

    def submit(number: int) -> Any:
        start, stop = bounds[number]
        rows = None if design is None else np.ascontiguousarray(design[start:stop])
        future = active.submit(evaluate_chunk, case_future, plan_future, start, stop, rows,
                               pure=False)  # fmt: skip
        running[future] = number
        return future

    queue = iter(range(len(bounds)))
    window = width * IN_FLIGHT_PER_WORKER
    # range first: zip stops on it before taking one more chunk from the queue.
    # The client's own loop: it need not be the process's default client (a face's is not).
    finished = as_completed(
        [submit(n) for _, n in zip(range(window), queue, strict=False)], loop=active.loop
    )
    for future in finished:
        number = running.pop(future)
        pending[number] = future.result()
        future.release()
        while written.chunks in pending:  # write in variant order
            written.write(pending.pop(written.chunks))
            if _stop_asked(cancel):
                return True
        # Chunks held for their turn count against the window: memory stays bounded.
        while len(running) + len(pending) < window:
            waiting = next(queue, None)
            if waiting is None:
                break
            finished.add(submit(waiting))
    return False


def _ignore_ctrl_c() -> Any:
    """Ignore SIGINT from here on (main thread only); the handler it replaced, or ``None``."""
    if threading.current_thread() is not threading.main_thread():
        return None
    return signal.signal(signal.SIGINT, signal.SIG_IGN)


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
