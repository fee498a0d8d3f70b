"""Damage on disk: a damaged sweep database is refused in one line with the way out (and a
sweep whose database was deleted takes its finished variants back from their folders);
finished variants whose folders were deleted or damaged are reported on a resume and run
again with --retry-failed."""

from __future__ import annotations

import json
import math
import random
import shutil
import sqlite3
from pathlib import Path

import pytest

from fvheat.cli.main import main
from fvheat.sweep.folders import MARKER, folder_problem
from fvheat.sweep.store import DAMAGED_HINT

from . import conftest
from .conftest import CASE, SLAB, stored

VALUES = "1.6,2.0,2.4,2.8,3.2"


def sweep_args(out: Path, *extra: str) -> list[str]:
    """The five-variant sweep into ``out``."""
    return conftest.sweep_args(out, *extra, vary=("--vary", f"{SLAB}={VALUES}"))


@pytest.fixture(scope="module")
def finished(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A finished five-variant sweep, to be copied by each test (never changed)."""
    out = tmp_path_factory.mktemp("finished") / "sweep"
    assert main(sweep_args(out, "-j", "2", "-q")) == 0
    return out


@pytest.fixture
def copy(finished: Path, tmp_path: Path) -> Path:
    out = tmp_path / "sweep"
    shutil.copytree(finished, out)
    return out


def stamps(out: Path) -> dict[str, int]:
    return {str(p.relative_to(out)): p.stat().st_mtime_ns for p in out.glob("v*/*") if p.is_file()}


def damage(db: Path, how: str) -> None:
    data = db.read_bytes()
    rng = random.Random(12)
    if how == "truncated":
        db.write_bytes(data[: len(data) // 2 + 100])
    elif how == "random bytes":
        db.write_bytes(rng.randbytes(len(data)))
    elif how == "damaged page":  # garbage over the page holding the variants table's rows
        with sqlite3.connect(db) as con:
            page = con.execute("SELECT rootpage FROM sqlite_master WHERE name = 'variants'")
            (root,) = page.fetchone()
            (size,) = con.execute("PRAGMA page_size").fetchone()
        con.close()
        start = (root - 1) * size
        db.write_bytes(data[:start] + rng.randbytes(size) + data[start + size :])
    elif how == "not a database":
        db.write_text("materials.slab.conductivity,psi\n2.3,0.5\n" * 40, encoding="utf-8")
    else:
        raise ValueError(how)


@pytest.mark.parametrize("how", ["truncated", "random bytes", "damaged page", "not a database"])
def test_a_damaged_database_is_refused_in_one_line_with_the_way_out(copy, capsys, how):
    db = copy / "sweep.sqlite"
    damage(db, how)
    damaged_bytes = db.read_bytes()
    before = stamps(copy)
    expected = f"fvheat: error: {db}: damaged sweep database ("
    for args in (sweep_args(copy, "-j", "1", "-q"), ["collect", str(copy), "-q"]):
        assert main(args) == 2
        err = capsys.readouterr().err
        assert err.startswith(expected), err
        assert err.count("\n") == 1 and "Traceback" not in err
        assert err.rstrip().endswith(DAMAGED_HINT)
    assert db.read_bytes() == damaged_bytes  # left as it was, for whoever looks into it
    assert stamps(copy) == before  # no variant ran


def test_a_deleted_database_is_rebuilt_from_the_variant_folders(finished, copy, capsys):
    before = stored(finished)
    files = stamps(copy)
    (copy / "sweep.sqlite").unlink()
    assert main(sweep_args(copy, "-j", "1")) == 0
    assert "5 finished variants taken back from their folders" in capsys.readouterr().out
    after = stored(copy)
    assert [(r.id, r.key, r.output, r.status) for r in after] == [
        (r.id, r.key, r.output, r.status) for r in before
    ]
    assert [r.results for r in after] == [r.results for r in before]
    assert all(r.attempts == 0 for r in after)  # none was handed to a worker
    assert stamps(copy) == files  # no folder was written again


def test_a_finished_variant_the_coordinator_did_not_record_is_taken_back(copy):
    rows = stored(copy)
    # variant 3 as after a coordinator killed between a worker's end and the record, and
    # variant 4 too but with the summary of another variant next to its marker
    shutil.copy(copy / rows[0].output / "summary.json", copy / rows[3].output / "summary.json")
    with sqlite3.connect(copy / "sweep.sqlite") as con:
        con.execute("UPDATE variants SET status = 'pending', results = NULL WHERE id IN (3, 4)")
    con.close()
    files = stamps(copy)
    assert main(sweep_args(copy, "-j", "1", "-q")) == 0
    after = {r.id: r for r in stored(copy)}
    assert after[3].status == "done" and after[3].results == rows[2].results
    assert after[3].attempts == rows[2].attempts  # taken back, not run
    assert stamps(copy)[f"{rows[2].output}/summary.json"] == files[f"{rows[2].output}/summary.json"]
    assert after[4].status == "done" and after[4].attempts == rows[3].attempts + 1  # ran again
    assert math.isclose(after[4].results["psi"], rows[3].results["psi"], rel_tol=1e-12)


def test_deleted_or_damaged_variant_folders_are_reported_then_rerun(copy, capsys):
    rows = stored(copy)
    folders = [copy / r.output for r in rows]
    shutil.copy(folders[0] / "summary.json", folders[3] / "summary.json")  # another variant's
    shutil.rmtree(folders[0])
    (folders[1] / "summary.json").unlink()
    (folders[2] / "summary.json").write_text('{"boundaries": {"insi', encoding="utf-8")
    expected = {
        rows[0].output: "its folder is missing",
        rows[1].output: "summary.json is missing",
        rows[2].output: "summary.json is damaged (not JSON)",
        rows[3].output: "summary.json is of another variant or case file",
    }

    # a plain resume runs nothing and warns, one line per damaged folder
    assert main(sweep_args(copy, "-j", "1")) == 0
    warnings = [
        line for line in capsys.readouterr().err.splitlines() if line.startswith("fvheat: warn")
    ]
    assert len(warnings) == 4
    for line, (output, why) in zip(warnings, expected.items(), strict=True):
        assert line.startswith(f"fvheat: warning: {output}: {why} ")
        assert line.endswith("--retry-failed runs it again")
    assert stored(copy) == rows

    # --retry-failed runs them again; the intact one is left alone
    assert main(sweep_args(copy, "-j", "2", "-q", "--retry-failed")) == 0
    assert capsys.readouterr().err == ""
    after = stored(copy)
    assert [r.attempts for r in after] == [2, 2, 2, 2, 1]
    assert after[4] == rows[4]
    case = CASE.resolve()
    fixed = ("mesh.max_cell=0.1", "mesh.min_cell=0.02")
    for r, old in zip(after, rows, strict=True):
        overrides = (*fixed, f"{SLAB}={r.params[SLAB]}")
        assert folder_problem(copy / r.output, case, overrides, r.results) is None
        assert json.loads((copy / r.output / MARKER).read_text())["results"] == r.results
        for name, value in r.results.items():  # the same pipeline on the same input
            assert math.isclose(value, old.results[name], rel_tol=1e-12, abs_tol=1e-12)


def test_a_finished_variant_whose_rerun_was_stopped_is_reported(copy, capsys):
    # as after a --retry-failed rerun of variant 5 stopped half-way (dispatched, no record)
    with sqlite3.connect(copy / "sweep.sqlite") as con:
        con.execute("UPDATE variants SET attempts = 2, finished = NULL WHERE id = 5")
    con.close()
    output = stored(copy)[4].output
    assert main(sweep_args(copy, "-j", "1")) == 0
    err = capsys.readouterr().err
    assert f"fvheat: warning: {output}: it was being run again when the sweep stopped" in err
    assert main(sweep_args(copy, "-j", "1", "-q", "--retry-failed")) == 0
    last = stored(copy)[4]
    assert last.attempts == 3 and last.finished is not None and last.status == "done"
