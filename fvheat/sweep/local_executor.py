"""Run sweep tasks in worker processes on this machine (``concurrent.futures``)."""

from __future__ import annotations

import logging
import multiprocessing
import os
import signal
import sys
import threading
from collections.abc import Callable, Generator, Iterable
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool
from multiprocessing.connection import Connection

from fvheat.sweep.signals import signals_deferred
from fvheat.sweep.worker import Outcome, Task, run_task

log = logging.getLogger(__name__)


def default_jobs() -> int:
    """The number of cores this process may use."""
    if hasattr(os, "sched_getaffinity"):
        return max(1, len(os.sched_getaffinity(0)))
    return max(1, os.cpu_count() or 1)


class LocalExecutor:
    """A pool of ``jobs`` worker processes, with at most ``jobs`` variants handed out at a
    time (so a variant's start time is when a worker takes it)."""

    def __init__(self, jobs: int | None = None):
        self.jobs = jobs if jobs is not None else default_jobs()
        if self.jobs < 1:
            raise ValueError(f"jobs must be >= 1, got {self.jobs}")
        self.context = _context()
        if self.context.get_start_method() == "forkserver":
            # start the server now: it imports fvheat while the coordinator prepares
            from multiprocessing import forkserver

            forkserver.ensure_running()

    def __enter__(self) -> LocalExecutor:
        return self

    def __exit__(self, *exc: object) -> None:
        pass

    def describe(self) -> str:
        """One line naming the number of worker processes."""
        return f"{self.jobs} local worker process{'es' if self.jobs != 1 else ''}"

    def run(
        self, tasks: Iterable[Task], dispatched: Callable[[Task], None]
    ) -> Generator[tuple[Task, Outcome], None, None]:
        """Run ``tasks``, calling ``dispatched(task)`` just before each is handed out, and
        yield ``(task, outcome)`` as they finish. Closing the iterator early (an interrupt)
        cancels what is queued and stops the workers."""
        todo = iter(tasks)
        pool, lifeline = _new_pool(self.jobs, self.context)
        running: dict[Future[Outcome], Task] = {}
        finished = False
        try:
            while True:
                while len(running) < self.jobs:
                    task = next(todo, None)
                    if task is None:
                        break
                    # a signal must not cut a worker's start in half: the pool would not
                    # know the new process, which then fails noisily after the pool is gone
                    with signals_deferred():
                        dispatched(task)
                        running[pool.submit(run_task, task)] = task
                if not running:
                    break
                done, _ = wait(running, return_when=FIRST_COMPLETED)
                broken = False
                for fut in sorted(done, key=lambda f: running[f].id):
                    task = running.pop(fut)
                    outcome, lost = _outcome(fut)
                    broken = broken or lost
                    yield task, outcome
                if broken:  # a worker died: the pool is unusable, start a new one
                    _stop(pool)
                    lifeline.close()
                    pool, lifeline = _new_pool(self.jobs, self.context)
            finished = True
        finally:
            if finished:
                pool.shutdown(wait=True)
            else:
                _stop(pool)
            lifeline.close()


def _outcome(fut: Future[Outcome]) -> tuple[Outcome, bool]:
    """The task's outcome, and whether its worker process died."""
    try:
        return fut.result(), False
    except BrokenProcessPool:
        return Outcome(
            "failed",
            "a worker process ended abruptly (out of memory or killed?) while running this "
            "or another variant; run again with --retry-failed",
        ), True
    except Exception as err:  # e.g. an outcome that could not be sent back
        return Outcome("failed", f"{type(err).__name__}: {err}"), False


def _new_pool(
    jobs: int, context: multiprocessing.context.BaseContext
) -> tuple[ProcessPoolExecutor, Connection]:
    """A worker pool, and the coordinator's end of the pipe whose closing (the coordinator
    ended, even by SIGKILL) tells the workers to exit."""
    lifeline, keep = context.Pipe(duplex=False)
    pool = ProcessPoolExecutor(
        max_workers=jobs,
        mp_context=context,
        initializer=_init_worker,
        initargs=(lifeline,),
    )
    return pool, keep


def _context() -> multiprocessing.context.BaseContext:
    """Fork-server workers where available: they start clean (not a copy of a coordinator
    that runs threads) yet fast (fvheat already imported in the server)."""
    if sys.platform != "win32" and "forkserver" in multiprocessing.get_all_start_methods():
        ctx = multiprocessing.get_context("forkserver")
        # everything a variant uses, so no worker imports anything per variant
        ctx.set_forkserver_preload(
            [
                "fvheat.sweep.worker",
                "fvheat.sweep.folders",
                "fvheat.sweep.identity",
                "fvheat.cli.run_command",
                "fvheat.output.folder",
                "fvheat.output.fields",
                "meshio",
            ]
        )
        return ctx
    return multiprocessing.get_context("spawn")


def _stop(pool: ProcessPoolExecutor) -> None:
    """End the pool's worker processes now, then cancel queued tasks.

    The workers are ended first: one still starting (reading its queues from the pool)
    when the pool's queues are released would fail with a traceback on standard error."""
    procs = list((getattr(pool, "_processes", None) or {}).values())
    for p in procs:
        if p.is_alive():
            p.terminate()
    for p in procs:
        p.join(timeout=5)
    pool.shutdown(wait=False, cancel_futures=True)
    log.debug("stopped %d worker processes", len(procs))


def _init_worker(lifeline: Connection) -> None:
    """In each worker: leave Ctrl-C to the coordinator, use one BLAS thread (the workers
    already use every core), and exit as soon as the coordinator is gone (``lifeline``
    reaches end-of-file when the coordinator's end closes, however it ended)."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    try:
        from threadpoolctl import threadpool_limits

        threadpool_limits(1)
    except ImportError:  # pragma: no cover - a declared dependency
        pass

    def watch() -> None:
        try:
            while True:
                lifeline.recv_bytes()
        except (EOFError, OSError):
            os._exit(1)

    threading.Thread(target=watch, name="fvheat-lifeline", daemon=True).start()
