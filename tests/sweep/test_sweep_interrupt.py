"""Killing a sweep loses nothing finished, and running it again completes it without
recomputing or duplicating anything."""

from __future__ import annotations

import os
import signal
import sqlite3
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import pytest

from fvheat.cli.main import main
from fvheat.output.files import atomic_write_file, is_temporary

from .conftest import CASE, SLAB, stored

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

    killed = stored(out)
    done = {r.id: r for r in killed if r.status == "done"}
    assert 1 <= len(done) < len(killed) == 6, "the kill must come mid-sweep"
    stamps = {i: (out / r.output / "summary.json").stat().st_mtime_ns for i, r in done.items()}

    assert main([*ARGS, "-o", str(out)]) == 0

    final = stored(out)
    assert len(final) == 6 and len({r.key for r in final}) == 6  # no duplicates
    assert all(r.status == "done" for r in final)
    for r in final:
        if r.id in done:  # finished before the kill: untouched
            assert r == done[r.id]
            assert (out / r.output / "summary.json").stat().st_mtime_ns == stamps[r.id]
        else:
            assert r.attempts >= 1 and r.finished is not None


def wait_for_file(path: Path, proc: subprocess.Popen, timeout: float = 120) -> None:
    deadline = time.monotonic() + timeout
    while not path.exists():
        assert proc.poll() is None, "the sweep ended before creating its database"
        assert time.monotonic() < deadline, f"no {path.name} within {timeout} s"
        time.sleep(0.005)


#: when SIGTERM is sent: seconds after the database appears (the coordinator is then about
#: to start its workers), or after the start ("start+s": Python still starting, workers
#: starting or running; which one depends on the machine's load, so several are tried)
SIGTERM_MOMENTS = ["db+0", "db+0.03", "db+0.1", "db+0.25", "start+0.3", "start+1.0"]


@pytest.mark.parametrize("moment", SIGTERM_MOMENTS, ids=str)
def test_sigterm_while_workers_start_prints_no_traceback(tmp_path, moment):
    out = tmp_path / "sweep"
    proc = subprocess.Popen(
        [sys.executable, "-m", "fvheat", *ARGS[:-3], "--jobs", "2", "-q", "-o", str(out)],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.PIPE,
        text=True,
        start_new_session=True,
    )
    try:
        after, _, delay = moment.partition("+")
        if after == "db":
            wait_for_file(out / "sweep.sqlite", proc)
        time.sleep(float(delay))
        proc.send_signal(signal.SIGTERM)
        _, err = proc.communicate(timeout=60)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
    assert "Traceback" not in err, err
    # README: 130 as for Ctrl-C; ended by the signal itself if it came while Python was
    # still loading fvheat (0 only if the whole sweep finished first). Rarely, on a loaded
    # machine, the interrupt is seen again while the interpreter shuts down after the
    # message: Python then ends the process as for an unhandled Ctrl-C (−SIGINT)
    assert proc.returncode in (130, -signal.SIGTERM, -signal.SIGINT, 0), err
    if proc.returncode in (130, -signal.SIGINT):
        assert err.strip().endswith("fvheat: interrupted; files already written are complete")
    if os.path.isdir("/proc"):  # no worker outlives the coordinator
        deadline = time.monotonic() + 20
        while session_members(proc.pid) and time.monotonic() < deadline:
            time.sleep(0.2)
        assert session_members(proc.pid) == []


def temporary_files(folder: Path) -> list[Path]:
    return sorted(p for p in folder.rglob("*") if p.is_file() and is_temporary(p.name))


def test_temporary_names_are_those_atomic_writes_use(tmp_path):
    seen = []
    for name in ("summary.json", "cells.csv", "temperature.vtu", "README", "a.b.c.md"):
        atomic_write_file(tmp_path / name, lambda tmp: (seen.append(tmp), tmp.write_text("x")))
    assert len(seen) == 5 and all(is_temporary(p.name) for p in seen)
    assert not any(is_temporary(p.name) for p in tmp_path.iterdir())  # the renamed outputs
    assert not any(is_temporary(n) for n in (".gitignore", ".hidden.csv", "x.abcdefgh.csv"))


def test_sigkill_of_the_process_group_leaves_no_temporary_files_after_a_resume(tmp_path):
    out = tmp_path / "sweep"
    proc = subprocess.Popen(
        [sys.executable, "-m", "fvheat", *ARGS[:-3], "--jobs", "2", "-q", "-o", str(out)],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
        start_new_session=True,
    )
    try:
        # kill the moment a worker is seen writing a file (or, should every write be
        # missed, once a variant is done: the kill then still cuts runs short)
        deadline = time.monotonic() + 120
        while not temporary_files(out) and count_done(out / "sweep.sqlite") < 1:
            assert proc.poll() is None, "the sweep ended before it could be killed"
            assert time.monotonic() < deadline, "no variant finished within 120 s"
            time.sleep(0.001)
        os.killpg(proc.pid, signal.SIGKILL)
        proc.wait(timeout=60)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
    killed = stored(out)
    unfinished = [r for r in killed if r.status != "done"]
    assert unfinished, "the kill must come mid-sweep"
    left = temporary_files(out)
    if not left:
        # the kill missed every write: leave what a writer killed mid-write leaves
        fd, _ = tempfile.mkstemp(prefix=".cells.", suffix=".csv", dir=out / unfinished[0].output)
        os.close(fd)
        left = temporary_files(out)
    assert all(p.relative_to(out).parts[0].startswith("v0") for p in left), left
    # temporary-looking files that are not in a variant folder are not the sweep's
    foreign = [out / ".notes.abcd1234.txt", out / "mine" / ".cells.abcd1234.csv"]
    for path in foreign:
        path.parent.mkdir(exist_ok=True)
        path.write_text("kept\n", encoding="utf-8")

    assert main([*ARGS, "-o", str(out)]) == 0

    final = stored(out)
    assert len(final) == 6 and all(r.status == "done" for r in final)
    assert [p for p in temporary_files(out) if p not in foreign] == []
    assert all(p.read_text(encoding="utf-8") == "kept\n" for p in foreign)
