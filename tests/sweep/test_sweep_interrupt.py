"""Killing a sweep loses nothing finished, and running it again completes it without
recomputing or duplicating anything."""

from __future__ import annotations

import os
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

from fvheat.cli.main import main
from fvheat.sweep.store import SweepStore

from .conftest import CASE, SLAB

pytestmark = pytest.mark.skipif(sys.platform == "win32", reason="POSIX signals")

#: slow enough (default mesh, finer corners, one worker) that the sweep is still running
#: when the first variant is recorded
ARGS = [
    "sweep",
    str(CASE),
    "--vary",
    f"{SLAB}=1.6,1.8,2.0,2.2,2.4,2.6",
    "--set",
    "mesh.min_cell=0.003",
    "--jobs",
    "1",
    "-q",
]


def count_done(db: Path) -> int:
    if not db.is_file():
        return 0
    try:
        with sqlite3.connect(f"{db.as_uri()}?mode=ro", uri=True) as con:
            return con.execute("SELECT count(*) FROM variants WHERE status = 'done'").fetchone()[0]
    except sqlite3.Error:  # not created yet
        return 0


def session_members(sid: int) -> list[int]:
    """Processes still in session ``sid`` (the coordinator's workers and helpers)."""
    found = []
    for entry in os.listdir("/proc"):
        if entry.isdigit():
            try:
                if os.getsid(int(entry)) == sid:
                    found.append(int(entry))
            except OSError:
                pass
    return found


@pytest.mark.parametrize("sig", [signal.SIGTERM, signal.SIGKILL], ids=["SIGTERM", "SIGKILL"])
def test_killed_sweep_resumes_without_recomputing(tmp_path, sig):
    out = tmp_path / "sweep"
    db = out / "sweep.sqlite"
    log = (tmp_path / "stderr.txt").open("w")
    proc = subprocess.Popen(
        [sys.executable, "-m", "fvheat", *ARGS, "-o", str(out)],
        stdout=subprocess.DEVNULL,
        stderr=log,
        start_new_session=True,
    )
    try:
        deadline = time.monotonic() + 120
        while count_done(db) < 1:
            assert proc.poll() is None, "the sweep ended before a variant was recorded"
            assert time.monotonic() < deadline, "no variant finished within 120 s"
            time.sleep(0.02)
        proc.send_signal(sig)
        code = proc.wait(timeout=60)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
        log.close()
    assert code == (130 if sig == signal.SIGTERM else -signal.SIGKILL)
    if sig == signal.SIGTERM:
        assert "run the same command again to resume" in (tmp_path / "stderr.txt").read_text()

    # its worker processes do not outlive the coordinator
    if os.path.isdir("/proc"):
        deadline = time.monotonic() + 20
        while session_members(proc.pid) and time.monotonic() < deadline:
            time.sleep(0.2)
        assert session_members(proc.pid) == []

    with SweepStore(db, readonly=True) as store:
        killed = store.rows()
    done = {r.id: r for r in killed if r.status == "done"}
    assert 1 <= len(done) < len(killed) == 6, "the kill must come mid-sweep"
    stamps = {i: (out / r.output / "summary.json").stat().st_mtime_ns for i, r in done.items()}

    assert main([*ARGS, "-o", str(out)]) == 0

    with SweepStore(db, readonly=True) as store:
        final = store.rows()
    assert len(final) == 6 and len({r.key for r in final}) == 6  # no duplicates
    assert all(r.status == "done" for r in final)
    for r in final:
        if r.id in done:  # finished before the kill: untouched
            assert r == done[r.id]
            assert (out / r.output / "summary.json").stat().st_mtime_ns == stamps[r.id]
        else:
            assert r.attempts >= 1 and r.finished is not None
