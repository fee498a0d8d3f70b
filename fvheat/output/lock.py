"""One run per results folder: a lock file holding the writer's host and process id.

A second ``fvheat run`` into a folder that a live run is writing is refused; a lock left
by a run that was killed (its process no longer exists on this host) is stale and taken
over. The lock is removed when the run ends, whatever the outcome.
"""

from __future__ import annotations

import contextlib
import json
import os
import socket
import tempfile
import time
from collections.abc import Iterator
from pathlib import Path

from fvheat.errors import CaseError

LOCK_FILE = ".fvheat-run.lock"


def _alive(pid: int) -> bool:
    """Whether process ``pid`` runs on this host (a zombie, killed but not yet reaped by
    its parent, does not)."""
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:  # exists, owned by someone else
        pass
    try:
        stat = Path(f"/proc/{pid}/stat").read_text()
    except OSError:  # no /proc here: trust the signal test
        return True
    return stat.rpartition(")")[2].split()[0] not in ("Z", "X")


def _holder(lock: Path) -> dict | None:
    """The lock's content, or None when it is unreadable (being written, or damaged)."""
    try:
        data = json.loads(lock.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None
    return data if isinstance(data, dict) else None


@contextlib.contextmanager
def folder_lock(folder: Path) -> Iterator[None]:
    """Hold the lock of results ``folder`` (created if needed) for the ``with`` block."""
    folder.mkdir(parents=True, exist_ok=True)
    lock = folder / LOCK_FILE
    me = {"pid": os.getpid(), "host": socket.gethostname(), "started": time.time()}
    for _ in range(3):
        if _create(lock, json.dumps(me)):
            break
        holder = _holder(lock)
        if holder is not None and _live_elsewhere(holder):
            raise CaseError(
                f"another fvheat run (process {holder.get('pid')} on "
                f"{holder.get('host')}) is writing this folder; wait for it or give "
                f"another --out (if no run is going on, delete {LOCK_FILE})",
                file=str(folder),
            )
        if holder is None and _young(lock):  # being written (no hard links): not stale yet
            time.sleep(0.5)
            continue
        lock.unlink(missing_ok=True)  # stale: its run no longer exists
    else:
        raise CaseError(f"cannot take the lock {LOCK_FILE} of this folder", file=str(folder))
    try:
        yield
    finally:
        if (_holder(lock) or {}).get("pid") == me["pid"]:
            lock.unlink(missing_ok=True)


#: a lock younger than this (s) with no readable owner may still be being written
YOUNG_LOCK_SECONDS = 5.0


def _young(lock: Path) -> bool:
    """Whether ``lock`` exists and was modified less than YOUNG_LOCK_SECONDS ago."""
    try:
        return time.time() - lock.stat().st_mtime < YOUNG_LOCK_SECONDS
    except FileNotFoundError:
        return False


def _create(lock: Path, text: str) -> bool:
    """Create ``lock`` holding ``text`` unless it exists; False when it does. The content
    is written to a temporary file first and linked into place, so a lock is never seen
    empty (a run killed while taking it leaves no half-written lock)."""
    fd, name = tempfile.mkstemp(prefix=f"{lock.name}.", dir=lock.parent)
    tmp = Path(name)  # named like every temporary file of fvheat (files.is_temporary)
    with os.fdopen(fd, "w", encoding="utf-8") as fh:
        fh.write(text)
    try:
        os.link(tmp, lock)
    except FileExistsError:
        return False
    except OSError:  # a file system without hard links: exclusive create, then write
        try:
            fd = os.open(lock, os.O_CREAT | os.O_EXCL | os.O_WRONLY, 0o644)
        except FileExistsError:
            return False
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
    finally:
        tmp.unlink(missing_ok=True)
    return True


def _live_elsewhere(holder: dict) -> bool:
    """Whether the lock's process is alive (on another host: assumed alive)."""
    if holder.get("host") != socket.gethostname():
        return True
    pid = holder.get("pid")
    return isinstance(pid, int) and pid != os.getpid() and _alive(pid)
