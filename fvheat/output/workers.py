"""Figure workers: processes that draw a run's figures next to the process that solves.

``fvheat run`` starts them before it loads the case: each imports matplotlib and warms its
font cache on the core the solver leaves idle (the sparse solves run on one core; the
workers at a lower priority, so that they never take the solver's core), and the
first draws the mesh figure in memory as soon as the mesh is made. Once
``summary.json`` is written the run sends each worker the fields its figures need (views
of the saved states, pickled: about 50 MB and 0.03 s at 1 M cells) and a group of figure
names; the workers draw in parallel while the run itself writes the field files. A job
sent to a worker still busy (with the mesh figure, in a small case) waits behind the
earlier one, so the run gives that worker less and never waits to send. Each
figure file is written atomically, as when drawn in the run's own process, and the run
writes the figure index from the workers' records.

Workers are forked, so they start in milliseconds and share the parent's imports; where
``fork`` is not available (or only one core is), the run draws its figures itself. A
worker ignores Ctrl-C (the run stops it) and never prints: an error while drawing is sent
back and raised in the run.
"""

from __future__ import annotations

import contextlib
import multiprocessing
import os
import pickle
import signal
import threading
import traceback
import warnings
from collections.abc import Callable, Sequence
from multiprocessing.connection import Connection
from multiprocessing.reduction import ForkingPickler
from typing import Any

#: how long (s) closing waits for a worker to leave before stopping it
CLOSE_WAIT = 5.0
#: figure workers ``fvheat run`` starts (at most one per core)
RUN_WORKERS = 2
#: workers run at this lower priority: their warm-up must not slow the solve (measured at
#: 1 M cells: meshing 0.26 → 0.16 s, the run 4.5 → 4.3 s), and the run waits for them only
#: when it has nothing else to do
NICENESS = 10


class WorkerLost(RuntimeError):
    """A figure worker ended without an answer (killed, out of memory): its figures must
    be drawn elsewhere; the pool is not used again."""


def available_cores() -> int:
    """Cores this process may run on."""
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # not on every platform
        return os.cpu_count() or 1


def worker_count(requested: int) -> int:
    """Workers to start for ``requested``: none without ``fork`` or with a single core."""
    if requested <= 0 or "fork" not in multiprocessing.get_all_start_methods():
        return 0
    return min(requested, available_cores()) if available_cores() > 1 else 0


class FigureWorkers:
    """Up to ``n`` forked worker processes, started at once (see the module text); use as a
    context manager, or call :meth:`close`."""

    def __init__(self, n: int = 2) -> None:
        self._conns: list[Connection] = []
        self._procs: list[Any] = []
        self._lost = ""  # why the pool is not used again
        # (worker, writer) per job submitted and not collected, in the order submitted
        self._jobs: list[tuple[int, _Sender]] = []
        ctx = multiprocessing.get_context("fork") if worker_count(n) else None
        for _ in range(worker_count(n)):
            assert ctx is not None
            ours, theirs = ctx.Pipe()
            proc = ctx.Process(target=_serve, args=(theirs, ours), daemon=True)
            with warnings.catch_warnings():
                # Python ≥ 3.12 warns of fork in a process with threads: the run forks
                # before it starts any; the BLAS library's own threads handle fork
                warnings.filterwarnings("ignore", "This process", DeprecationWarning)
                proc.start()
            theirs.close()
            self._conns.append(ours)
            self._procs.append(proc)

    def __len__(self) -> int:
        return len(self._procs)

    def __enter__(self) -> FigureWorkers:
        return self

    def __exit__(self, kind: type[BaseException] | None, *exc: object) -> None:
        self.close(wait=kind is None)

    def submit(
        self,
        fn: Callable[..., Any],
        jobs: Sequence[tuple[Any, ...]],
        to: Sequence[int] | None = None,
    ) -> None:
        """Start ``fn(*job)`` for every job, job ``i`` in worker ``to[i]`` (default: worker
        ``i``), after the jobs that worker has already; :meth:`results` collects them."""
        to = list(range(len(jobs))) if to is None else list(to)
        if len(to) != len(jobs) or any(not 0 <= i < len(self._conns) for i in to):
            raise ValueError(f"{len(jobs)} jobs for workers {to} of {len(self._conns)}")
        if self._lost:
            raise WorkerLost(self._lost)
        for i, job in zip(to, jobs, strict=True):
            earlier = [sender for w, sender in self._jobs if w == i]
            # pickled here, written by a thread (after the worker's earlier jobs): a worker
            # still busy reads its job only afterwards, and the run must not wait for that
            # (a 1 M-cell view is 50 MB)
            payload = ForkingPickler.dumps((fn, job))
            self._jobs.append((i, _Sender(self._conns[i], payload, earlier[-1:])))

    @property
    def pids(self) -> list[int]:
        """Process ids of the workers."""
        return [int(p.pid) for p in self._procs]

    @property
    def busy(self) -> int:
        """Jobs submitted and not collected yet."""
        return len(self._jobs)

    def working(self) -> list[bool]:
        """Per worker: whether it has a job whose answer has not arrived yet (a worker with
        one job whose answer waits to be collected is not working)."""
        return [
            any(w == i for w, _ in self._jobs) and not conn.poll()
            for i, conn in enumerate(self._conns)
        ]

    def results(self) -> list[Any]:
        """The results of the submitted jobs, in the order submitted, once every one has
        ended. The error of a failed job is raised; a worker that died is a
        :class:`WorkerLost`."""
        replies = []
        dead: set[int] = set()
        for i, sender in self._jobs:
            try:
                if i in dead or not sender.sent():
                    raise EOFError
                replies.append(self._conns[i].recv())
            except (EOFError, OSError):
                dead.add(i)
                pid = self._procs[i].pid
                replies.append(("died", f"figure worker {pid} ended without an answer"))
        self._jobs = []
        for kind, value in replies:
            if kind == "died":
                self._lost = value
                raise WorkerLost(value)
        for kind, value in replies:
            if kind == "error":
                raise value
        return [value for _, value in replies]

    def close(self, *, wait: bool = True) -> None:
        """Ask every worker to leave and stop those that do not within ``CLOSE_WAIT`` s
        (at once unless ``wait``: a run that failed does not wait for their warm-up)."""
        # a job still being written cannot be followed by the note to leave: stop them
        stop = not wait or any(s.running() for _, s in self._jobs)
        for conn, proc in zip(self._conns, self._procs, strict=True):
            if stop:
                proc.terminate()
                continue
            try:
                conn.send(None)
            except (OSError, ValueError):  # already gone
                pass
        for _, sender in self._jobs:  # a write to a stopped worker fails at once
            sender.sent()
        for conn in self._conns:
            conn.close()
        for proc in self._procs:
            proc.join(0.0 if stop else CLOSE_WAIT)
            if proc.is_alive():
                proc.terminate()
                proc.join()
        self._conns, self._procs, self._jobs = [], [], []


class _Sender:
    """Writes one pickled job to a worker's pipe in a thread (a blocking write releases
    the interpreter lock), once the writers ``after`` (of the worker's earlier jobs) are
    done; :meth:`sent` waits for it and says whether it arrived."""

    def __init__(
        self, conn: Connection, payload: memoryview | bytes, after: Sequence[_Sender] = ()
    ) -> None:
        self._ok = False
        self._thread = threading.Thread(
            target=self._send, args=(conn, payload, after), name="fvheat-figure-job", daemon=True
        )
        self._thread.start()

    def _send(
        self, conn: Connection, payload: memoryview | bytes, after: Sequence[_Sender]
    ) -> None:
        if not all(earlier.sent() for earlier in after):
            return  # the pipe broke on an earlier job: results() says so
        try:
            conn.send_bytes(payload)
            self._ok = True
        except Exception:  # the worker is gone or the pipe closed: results() says so
            pass

    def running(self) -> bool:
        """Whether the job is still being written."""
        return self._thread.is_alive()

    def sent(self) -> bool:
        """Wait until the job is written; whether it was."""
        self._thread.join()
        return self._ok


def _serve(conn: Connection, parents_end: Connection) -> None:
    """A worker's life: warm up, then run jobs until told to leave (None or a closed pipe)."""
    parents_end.close()  # so that the pipe reads as closed when the run goes away
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # the run decides; no traceback here
    with contextlib.suppress(OSError):
        os.nice(NICENESS)  # the solve goes first; the figures take what it leaves
    try:
        _warm_up()
    except Exception:  # the first job will fail with the real error
        pass
    while True:
        try:
            msg = conn.recv()
        except (EOFError, OSError):
            return
        if msg is None:
            return
        fn, args = msg
        try:
            reply: tuple[str, Any] = ("ok", fn(*args))
        except BaseException as err:  # sent to the run, which raises it
            conn.send(("error", _portable(err)))
            continue
        conn.send(reply)


def _portable(err: BaseException) -> BaseException:
    """``err`` if it survives pickling both ways, else a RuntimeError with its traceback."""
    try:
        pickle.loads(pickle.dumps(err))
        return err
    except Exception:
        return RuntimeError("".join(traceback.format_exception(err, limit=3)).strip())


def _warm_up() -> None:
    """Import the figure code and draw one small figure (fonts and the Agg renderer)."""
    import io

    from fvheat.output.plots import figures, style  # noqa: F401  (the import is the point)

    fig = style.new_figure(2.0, 1.0)
    fig.text(0.5, 0.5, "θ 20 °C", ha="center")
    fig.savefig(io.BytesIO(), format="png")
