"""The SQLite results store: WAL mode, one row per variant, attempts, and its identity."""

from __future__ import annotations

import json
import sqlite3

import pytest

from fvheat.errors import CaseError
from fvheat.sweep.store import SweepStore, folder_name
from fvheat.sweep.variants import Variant
from fvheat.sweep.worker import Outcome

A = Variant((("k", "1"),))
B = Variant((("k", "2"),))


def test_wal_mode_and_no_duplicate_rows(tmp_path):
    path = tmp_path / "sweep.sqlite"
    with SweepStore(path) as store:
        first = store.add([A, B])
        again = store.add([B, A, Variant((("k", "2.0"),)), Variant((("k", "3"),))])
        assert store.db.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
    assert [r.id for r in first] == [1, 2]
    assert [r.id for r in again] == [2, 1, 2, 3]  # 2.0 is the value 2: the same variant
    with SweepStore(path) as store:
        rows = store.rows()
    assert len(rows) == len({r.key for r in rows}) == 3
    assert rows[0].output == folder_name(1, A) == f"v0001_{A.digest}"
    assert all(r.status == "pending" and r.attempts == 0 for r in rows)


def test_attempts_and_outcomes_are_recorded(tmp_path):
    with SweepStore(tmp_path / "sweep.sqlite") as store:
        (row,) = store.add([A])
        store.dispatched(row.id)
        store.record(row.id, Outcome("failed", "case.toml: k: must be > 0"))
        store.dispatched(row.id)
        done = store.record(row.id, Outcome("done", None, {"psi": 0.25}, 1.5))
    assert done.status == "done" and done.message is None
    assert done.results == {"psi": 0.25} and done.attempts == 2
    assert done.started is not None and done.finished is not None
    assert done.started < done.finished


def test_a_folder_belongs_to_one_case_and_one_set_of_overrides(tmp_path):
    path = tmp_path / "sweep.sqlite"
    with SweepStore(path) as store:
        store.claim("/x/case.toml", "abc", ["mesh.max_cell=0.1"], "title")
        store.claim("/y/moved.toml", "abc", ["mesh.max_cell=0.1"], "title")  # same contents
    with SweepStore(path) as store, pytest.raises(CaseError, match="other case file contents"):
        store.claim("/x/case.toml", "def", ["mesh.max_cell=0.1"], "title")
    with SweepStore(path) as store, pytest.raises(CaseError, match="other --set overrides"):
        store.claim("/x/case.toml", "abc", [], "title")


def test_readonly_store_cannot_write(tmp_path):
    path = tmp_path / "sweep.sqlite"
    with SweepStore(path) as store:
        store.add([A])
    with SweepStore(path, readonly=True) as store:
        assert len(store.rows()) == 1
        with pytest.raises(CaseError, match=r"sweep database error: .*readonly"):
            store.add([B])


def test_not_a_database_is_bad_input(tmp_path):
    junk = tmp_path / "sweep.sqlite"
    junk.write_text("not sqlite at all, just text " * 20, encoding="utf-8")
    with pytest.raises(CaseError, match=r"damaged sweep database \(file is not a database\)"):
        SweepStore(junk, readonly=True)


def test_a_database_of_an_older_version_gains_the_inputs_column(tmp_path):
    path = tmp_path / "sweep.sqlite"
    with sqlite3.connect(path) as con:  # the schema before input files were recorded
        con.executescript(
            "CREATE TABLE meta (name TEXT PRIMARY KEY, value TEXT NOT NULL);"
            "CREATE TABLE variants (id INTEGER PRIMARY KEY AUTOINCREMENT, key TEXT NOT NULL "
            "UNIQUE, params TEXT NOT NULL, status TEXT NOT NULL DEFAULT 'pending', message "
            "TEXT, results TEXT, output TEXT NOT NULL DEFAULT '', started TEXT, finished "
            "TEXT, attempts INTEGER NOT NULL DEFAULT 0, seconds REAL);"
            "INSERT INTO meta VALUES ('case_sha256', 'abc'), ('fixed_overrides', '[]');"
            "INSERT INTO variants (key, params, output) "
            """VALUES ('{"k":1.0}', '{"k": "1"}', 'v1');"""
        )
    con.close()
    with SweepStore(path, readonly=True) as store:  # read as it is
        assert store.rows()[0].inputs == {}
    with SweepStore(path) as store:
        store.claim("/x/case.toml", "abc", [], "title", {"weather.csv": "f00"})
        assert json.loads(store.meta()["inputs"]) == {"weather.csv": "f00"}  # recorded now
        store.record(1, Outcome("done", None, {"psi": 0.2}, 1.0, {"weather.csv": "f00"}))
        assert store.row(1).inputs == {"weather.csv": "f00"}
    with SweepStore(path) as store, pytest.raises(CaseError, match=r"weather\.csv changed since"):
        store.claim("/x/case.toml", "abc", [], "title", {"weather.csv": "bad"})
