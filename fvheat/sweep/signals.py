"""Holding back SIGINT and SIGTERM while the coordinator does something that must not be cut
in half (recording an outcome, handing a task to a worker pool that is starting a process)."""

from __future__ import annotations

import contextlib
import signal
import threading
from collections.abc import Iterator

#: the signals held back
DEFERRED = tuple(
    s for s in (getattr(signal, "SIGINT", None), getattr(signal, "SIGTERM", None)) if s is not None
)


@contextlib.contextmanager
def signals_deferred() -> Iterator[None]:
    """Hold back SIGINT and SIGTERM for the duration: one that arrives meanwhile is noted
    and raised again, for the handler in force before, as soon as the block ends.

    Python runs signal handlers in the main thread whichever thread the operating system
    delivers the signal to, so blocking the signal in one thread would not do; the
    handlers are swapped instead. Outside the main thread this does nothing."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    pending: list[int] = []

    def note(signum: int, frame: object) -> None:
        pending.append(signum)

    old = {s: signal.signal(s, note) for s in DEFERRED}
    try:
        yield
    finally:
        for s, handler in old.items():  # None: a handler not set from Python
            signal.signal(s, signal.SIG_DFL if handler is None else handler)
        for s in dict.fromkeys(pending):
            signal.raise_signal(s)
