"""Run sweep tasks on a Dask distributed cluster (the optional ``distributed`` package).

The workers run the same :func:`~fvheat.sweep.worker.run_task` as local workers and need
the case file and the sweep folder at the same paths as the coordinator (a shared file
system); only the coordinator writes the sweep database.
"""

from __future__ import annotations

import asyncio
import logging
import os
import socket
from collections.abc import Callable, Generator, Iterable
from typing import Any

from fvheat.errors import CaseError
from fvheat.sweep.signals import signals_deferred
from fvheat.sweep.worker import Outcome, Task, one_line, run_task

log = logging.getLogger(__name__)

#: seconds to wait for the scheduler, and for its first worker
CONNECT_TIMEOUT = 30


class DaskExecutor:
    """Tasks handed to the Dask scheduler at ``address`` (e.g. ``tcp://10.0.0.5:8786``),
    at most ``in_flight`` at a time (default: twice the cluster's worker threads)."""

    def __init__(self, address: str, in_flight: int | None = None):
        self.address = address
        self.in_flight = in_flight
        self.client: Any = None

    def __enter__(self) -> DaskExecutor:
        where = f"--scheduler {self.address}"
        try:
            from distributed import Client
        except ImportError:
            raise CaseError(
                "needs the 'distributed' package: pip install 'fvheat[sweep]'", key=where
            ) from None
        check_scheduler(self.address)
        try:
            self.client = Client(self.address, timeout=CONNECT_TIMEOUT, set_as_default=False)
        except Exception as err:  # the checks passed, yet the client could not start
            reason = one_line(err)
            raise CaseError(f"cannot reach the Dask scheduler: {reason}", key=where) from err
        try:
            self.client.wait_for_workers(1, timeout=CONNECT_TIMEOUT)
        except (OSError, TimeoutError) as err:
            self.client.close()
            raise CaseError(f"no Dask worker joined within {CONNECT_TIMEOUT} s", key=where) from err
        return self

    def __exit__(self, *exc: object) -> None:
        if self.client is not None:
            self.client.close()
            self.client = None

    def describe(self) -> str:
        """One line naming the cluster and its worker threads."""
        return f"Dask cluster at {self.address} ({self._threads()} worker threads)"

    def check_paths(self, case_file: str, out: str) -> None:
        """Raise :class:`CaseError` unless every worker can read ``case_file`` and sees the
        folder ``out``."""
        seen = self.client.run(_sees, case_file, out)
        blind = sorted(w for w, ok in seen.items() if not ok)
        if blind:
            raise CaseError(
                f"Dask worker {blind[0]} cannot read {case_file} or see {out}: the workers "
                "need the case file and the sweep folder at the same paths (shared file system)",
                key=f"--scheduler {self.address}",
            )

    def run(
        self, tasks: Iterable[Task], dispatched: Callable[[Task], None]
    ) -> Generator[tuple[Task, Outcome], None, None]:
        """Submit ``tasks`` (calling ``dispatched(task)`` just before each) and yield
        ``(task, outcome)`` as they finish; closing the iterator early cancels the rest."""
        from distributed import as_completed

        limit = self.in_flight or max(1, 2 * self._threads())
        todo = iter(tasks)
        running: dict[str, tuple[Any, Task]] = {}
        done_iter = as_completed(loop=self.client.loop)

        def fill() -> None:
            while len(running) < limit:
                task = next(todo, None)
                if task is None:
                    return
                with signals_deferred():  # a submitted task is always known, to be cancelled
                    dispatched(task)
                    fut = self.client.submit(run_task, task, pure=False, retries=0)
                    running[fut.key] = (fut, task)
                    done_iter.add(fut)

        try:
            fill()
            while running:
                fut = next(done_iter)
                _, task = running.pop(fut.key)
                yield task, _outcome(fut)
                fut.release()
                fill()
        finally:
            if running:
                self.client.cancel([f for f, _ in running.values()])

    def _threads(self) -> int:
        return int(sum(self.client.nthreads().values()))


def check_scheduler(address: str) -> None:
    """Raise :class:`CaseError` (key ``--scheduler ADDRESS``) unless a Dask scheduler answers
    at ``address``, within :data:`CONNECT_TIMEOUT` seconds.

    Checked before a client is made: a client that fails to start (nothing listening, a
    server that is not a scheduler) leaves a half-made object that takes a minute to give
    up when the program ends, with a traceback. For tcp:// a refused connection is known at
    once; then the scheduler is asked for its identity (not for tls://, which needs the
    cluster's certificates)."""
    from distributed.comm.addressing import parse_address, parse_host_port

    where = f"--scheduler {address}"
    try:
        scheme, location = parse_address(address)
        host_port = parse_host_port(location) if scheme in ("tcp", "tls") else None
    except ValueError as err:
        raise CaseError(
            f"not a scheduler address ({one_line(err)}); expected e.g. tcp://10.0.0.5:8786",
            key=where,
        ) from None
    if host_port is not None:
        try:
            socket.create_connection(host_port, timeout=CONNECT_TIMEOUT).close()
        except TimeoutError:
            raise CaseError(
                f"cannot reach the Dask scheduler: no connection within {CONNECT_TIMEOUT} s",
                key=where,
            ) from None
        except OSError as err:
            reason = err.strerror or one_line(err)
            raise CaseError(f"cannot reach the Dask scheduler: {reason}", key=where) from None
    if scheme == "tls" or _loop_running():
        return
    try:
        reply = asyncio.run(asyncio.wait_for(_identity(address), CONNECT_TIMEOUT))
    except TimeoutError:
        raise CaseError(
            f"no answer from a Dask scheduler within {CONNECT_TIMEOUT} s", key=where
        ) from None
    except Exception as err:  # garbage from a server that is not a scheduler, a bad scheme
        detail = "" if host_port is not None else f" ({type(err).__name__}: {one_line(err)})"
        raise CaseError(f"no Dask scheduler answers there{detail}", key=where) from None
    if not isinstance(reply, dict) or reply.get("type") != "Scheduler":
        raise CaseError("the server there is not a Dask scheduler", key=where)


async def _identity(address: str) -> Any:
    """The identity a Dask server at ``address`` gives (a dict with its ``type``)."""
    from distributed.comm import connect

    comm = await connect(address, timeout=CONNECT_TIMEOUT)
    try:
        await comm.write({"op": "identity", "reply": True})
        return await comm.read()
    finally:
        await comm.close()


def _loop_running() -> bool:
    """Whether this thread runs an asyncio loop (a notebook): then no loop of our own."""
    try:
        asyncio.get_running_loop()
    except RuntimeError:
        return False
    return True


def _outcome(fut: Any) -> Outcome:
    try:
        return fut.result()
    except Exception as err:  # e.g. KilledWorker: the task took its worker down
        return Outcome("failed", f"{type(err).__name__}: {one_line(err)}")


def _sees(case_file: str, out: str) -> bool:
    """On a worker: is the case file readable and the sweep folder there?"""
    return os.access(case_file, os.R_OK) and os.path.isdir(out)
