"""The sweep's results store: one SQLite database per sweep folder (``sweep.sqlite``, WAL
mode), one row per variant. Only the coordinating process opens it.

Every change is its own committed transaction, so a killed sweep loses nothing that was
recorded. Columns of ``variants``:

``id``, ``key`` (canonical JSON of the variant's parameter values, unique), ``params`` (JSON
object: dotted key path -> value text, as given), ``status`` (pending / done / failed),
``message`` (why it failed), ``results`` (JSON object of main results), ``output`` (the
variant's folder, relative to the database's folder), ``started`` / ``finished`` (UTC ISO
times of the last attempt), ``attempts`` (times it was handed to a worker), ``seconds``
(the worker's wall time).
"""

from __future__ import annotations

import json
import sqlite3
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from fvheat import __version__
from fvheat.errors import CaseError
from fvheat.sweep.variants import Variant
from fvheat.sweep.worker import Outcome

DB_NAME = "sweep.sqlite"
STATUSES = ("pending", "done", "failed")

_SCHEMA = """
CREATE TABLE IF NOT EXISTS meta (name TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS variants (
    id INTEGER PRIMARY KEY AUTOINCREMENT,
    key TEXT NOT NULL UNIQUE,
    params TEXT NOT NULL,
    status TEXT NOT NULL DEFAULT 'pending' CHECK (status IN ('pending', 'done', 'failed')),
    message TEXT,
    results TEXT,
    output TEXT NOT NULL DEFAULT '',
    started TEXT,
    finished TEXT,
    attempts INTEGER NOT NULL DEFAULT 0,
    seconds REAL
);
"""


@dataclass(frozen=True)
class Row:
    """One variant as stored."""

    id: int
    key: str
    params: dict[str, str]
    status: str
    message: str | None
    results: dict[str, float] = field(default_factory=dict)
    output: str = ""
    started: str | None = None
    finished: str | None = None
    attempts: int = 0
    seconds: float | None = None


def now() -> str:
    """The current UTC time, ISO 8601 with microseconds."""
    return datetime.now(UTC).isoformat(timespec="microseconds")


def folder_name(row_id: int, variant: Variant) -> str:
    """A variant's output folder: ``v<id, 4 digits>_<8 hex digits of its key's hash>``."""
    return f"v{row_id:04d}_{variant.digest}"


class SweepStore:
    """The database of one sweep folder. Use as a context manager, or call :meth:`close`."""

    def __init__(self, path: str | Path, *, readonly: bool = False):
        """Open (creating if needed) the database at ``path``; ``readonly`` opens an
        existing one for reading only (exports and plots, even while a sweep runs)."""
        self.path = Path(path)
        if readonly and not self.path.is_file():
            raise CaseError("no sweep database here", file=str(self.path))
        try:
            if readonly:
                uri = f"{self.path.resolve().as_uri()}?mode=ro"
                self.db = sqlite3.connect(uri, uri=True, isolation_level=None, timeout=30)
                self.db.execute("SELECT id, key, params, status FROM variants LIMIT 1")
            else:
                self.path.parent.mkdir(parents=True, exist_ok=True)
                self.db = sqlite3.connect(self.path, isolation_level=None, timeout=30)
                self.db.execute("PRAGMA journal_mode=WAL")
                self.db.execute("PRAGMA synchronous=FULL")
                self.db.executescript(_SCHEMA)
        except sqlite3.DatabaseError as err:
            raise CaseError(f"not a sweep database: {err}", file=str(self.path)) from err

    def __enter__(self) -> SweepStore:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def close(self) -> None:
        """Close the connection (everything is already committed)."""
        self.db.close()

    # --- the sweep's identity -------------------------------------------------------------

    def meta(self) -> dict[str, str]:
        """The sweep's description: case file, its SHA-256, the fixed overrides, ..."""
        return dict(self.db.execute("SELECT name, value FROM meta").fetchall())

    def claim(self, case_file: str, case_sha256: str, fixed: Sequence[str], title: str) -> None:
        """Record which case and fixed overrides this sweep runs, or check they are the ones
        already recorded: results of another case must never be mixed in."""
        want = {"case_sha256": case_sha256, "fixed_overrides": json.dumps(list(fixed))}
        have = self.meta()
        if "case_sha256" in have:
            for name, value in want.items():
                if have[name] != value:
                    what = "case file contents" if name == "case_sha256" else "--set overrides"
                    raise CaseError(
                        f"holds a sweep with other {what} (of {have.get('case_file')}, "
                        f"--set {json.loads(have['fixed_overrides']) or 'none'}); "
                        "choose another --out folder",
                        file=str(self.path),
                    )
            return
        rows = {**want, "case_file": case_file, "title": title, "created": now()}
        rows["fvheat_version"] = __version__
        with self._transaction():
            self.db.executemany("INSERT OR REPLACE INTO meta VALUES (?, ?)", rows.items())

    # --- variants -------------------------------------------------------------------------

    def add(self, variants: Iterable[Variant]) -> list[Row]:
        """Insert the variants not yet stored (as pending) and return the rows of all of
        them, in the given order; a variant already stored keeps its row."""
        variants = list(variants)
        with self._transaction():
            for v in variants:
                if self.db.execute("SELECT 1 FROM variants WHERE key = ?", (v.key,)).fetchone():
                    continue
                cur = self.db.execute(
                    "INSERT INTO variants (key, params) VALUES (?, ?)",
                    (v.key, json.dumps(dict(v.params))),
                )
                self.db.execute(
                    "UPDATE variants SET output = ? WHERE id = ?",
                    (folder_name(cur.lastrowid, v), cur.lastrowid),
                )
        by_key = {r.key: r for r in self.rows()}
        return [by_key[v.key] for v in variants]

    def dispatched(self, row_id: int) -> None:
        """Mark a variant as handed to a worker: one more attempt, started now."""
        with self._transaction():
            self.db.execute(
                "UPDATE variants SET attempts = attempts + 1, started = ?, finished = NULL "
                "WHERE id = ?",
                (now(), row_id),
            )

    def record(self, row_id: int, outcome: Outcome) -> Row:
        """Store a worker's outcome (done with results, or failed with its message)."""
        if outcome.status not in ("done", "failed"):
            raise ValueError(f"unexpected status {outcome.status!r}")
        with self._transaction():
            self.db.execute(
                "UPDATE variants SET status = ?, message = ?, results = ?, finished = ?, "
                "seconds = ? WHERE id = ?",
                (
                    outcome.status,
                    outcome.message,
                    json.dumps(outcome.results, allow_nan=True),
                    now(),
                    outcome.seconds,
                    row_id,
                ),
            )
        return self.row(row_id)

    def row(self, row_id: int) -> Row:
        """The stored row of one variant."""
        found = self.rows(f"WHERE id = {int(row_id)}")
        if not found:
            raise KeyError(row_id)
        return found[0]

    def rows(self, where: str = "") -> list[Row]:
        """All rows in id order (``where``: an SQL WHERE clause for internal use)."""
        cur = self.db.execute(
            "SELECT id, key, params, status, message, results, output, started, finished, "
            f"attempts, seconds FROM variants {where} ORDER BY id"
        )
        return [
            Row(
                id=r[0],
                key=r[1],
                params=json.loads(r[2]),
                status=r[3],
                message=r[4],
                results=json.loads(r[5]) if r[5] else {},
                output=r[6],
                started=r[7],
                finished=r[8],
                attempts=r[9],
                seconds=r[10],
            )
            for r in cur.fetchall()
        ]

    def _transaction(self) -> _Transaction:
        return _Transaction(self.db)


class _Transaction:
    """``BEGIN IMMEDIATE`` ... ``COMMIT`` (``ROLLBACK`` on error)."""

    def __init__(self, db: sqlite3.Connection):
        self.db = db

    def __enter__(self) -> None:
        self.db.execute("BEGIN IMMEDIATE")

    def __exit__(self, exc_type: Any, *exc: object) -> None:
        self.db.execute("COMMIT" if exc_type is None else "ROLLBACK")
