"""The sweep's results store: one SQLite database per sweep folder (``sweep.sqlite``, WAL
mode), one row per variant. Only the coordinating process opens it.

Every change is its own committed transaction, so a killed sweep loses nothing that was
recorded. Columns of ``variants``:

``id``, ``key`` (canonical JSON of the variant's parameter values, unique), ``params`` (JSON
object: dotted key path -> value text, as given), ``status`` (pending / done / failed),
``message`` (why it failed), ``results`` (JSON object of main results), ``output`` (the
variant's folder, relative to the database's folder), ``started`` / ``finished`` (UTC ISO
times of the last attempt), ``attempts`` (times it was handed to a worker), ``seconds``
(the worker's wall time), ``inputs`` (JSON object: every file the variant's case read
besides the case file, named relative to the case file's folder -> its SHA-256).

The ``meta`` table holds the sweep's identity: ``case_file``, ``case_sha256``,
``fixed_overrides``, ``inputs`` (as for a variant, for the case with the fixed overrides),
``title``, ``created``, ``fvheat_version``.

A database SQLite cannot read, or whose integrity check fails, is refused with
:data:`DAMAGED_HINT`; every other SQLite error becomes a one-line :class:`CaseError` too.
"""

from __future__ import annotations

import functools
import json
import sqlite3
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import Any, ParamSpec, TypeVar

from fvheat import __version__
from fvheat.errors import CaseError
from fvheat.sweep.variants import Variant
from fvheat.sweep.worker import Outcome, one_line

DB_NAME = "sweep.sqlite"
STATUSES = ("pending", "done", "failed")
#: the way out of a damaged database, in its error message
DAMAGED_HINT = (
    "delete it and run the same command again: finished variants are taken back from their "
    "folders, the others run"
)
#: SQLite's own files next to a database in WAL mode
SIDE_FILES = ("-wal", "-shm")

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
    seconds REAL,
    inputs TEXT
);
"""

_P = ParamSpec("_P")
_R = TypeVar("_R")


def _sqlite_errors(method: Callable[_P, _R]) -> Callable[_P, _R]:
    """Turn SQLite errors raised by a :class:`SweepStore` method into one-line
    :class:`CaseError` naming the database file."""

    @functools.wraps(method)
    def wrapper(*args: _P.args, **kwargs: _P.kwargs) -> _R:
        try:
            return method(*args, **kwargs)
        except sqlite3.DatabaseError as err:
            store = args[0]
            raise _database_error(store.path, err) from err  # type: ignore[attr-defined]

    return wrapper


def _database_error(path: Path, err: sqlite3.DatabaseError) -> CaseError:
    """The one-line error for an SQLite error on the database at ``path``: damage (the
    file is not a database, or a page is malformed) with the way out; anything else (locked,
    disk full, no permission) as SQLite words it."""
    text = one_line(err) or type(err).__name__
    if isinstance(err, sqlite3.OperationalError) and "malformed" not in text:
        return CaseError(f"sweep database error: {text}", file=str(path))
    return CaseError(f"damaged sweep database ({text}); {DAMAGED_HINT}", file=str(path))


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
    inputs: dict[str, str] = field(default_factory=dict)


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
        if not readonly:
            self.path.parent.mkdir(parents=True, exist_ok=True)
            if not self.path.exists():
                # SQLite would replay a journal left by a deleted database into the new one
                for side in SIDE_FILES:
                    Path(f"{self.path}{side}").unlink(missing_ok=True)
        try:
            if readonly:
                uri = f"{self.path.resolve().as_uri()}?mode=ro"
                self.db = sqlite3.connect(uri, uri=True, isolation_level=None, timeout=30)
            else:
                self.db = sqlite3.connect(self.path, isolation_level=None, timeout=30)
        except sqlite3.DatabaseError as err:
            raise _database_error(self.path, err) from err
        try:
            self._check_integrity()
            if readonly:
                self.db.execute("SELECT id, key, params, status FROM variants LIMIT 1")
            else:
                self.db.execute("PRAGMA journal_mode=WAL")
                self.db.execute("PRAGMA synchronous=FULL")
                self.db.executescript(_SCHEMA)
                self._upgrade()
        except sqlite3.DatabaseError as err:
            self.db.close()
            if "no such table" in str(err):
                raise CaseError(f"not a sweep database: {err}", file=str(self.path)) from err
            raise _database_error(self.path, err) from err

    def _check_integrity(self) -> None:
        """Raise :class:`sqlite3.DatabaseError` unless SQLite's check of every page and index
        passes: a damaged page may otherwise surface only when it is read, or never, and a
        damaged index could let a variant be stored twice."""
        problems = [r[0] for r in self.db.execute("PRAGMA integrity_check(3)").fetchall()]
        if problems != ["ok"]:
            raise sqlite3.DatabaseError("integrity check failed: " + "; ".join(problems))

    def _upgrade(self) -> None:
        """Add the columns newer versions use to a database written by an older one."""
        columns = {r[1] for r in self.db.execute("PRAGMA table_info(variants)").fetchall()}
        if "inputs" not in columns:
            self.db.execute("ALTER TABLE variants ADD COLUMN inputs TEXT")

    def __enter__(self) -> SweepStore:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def close(self) -> None:
        """Close the connection (everything is already committed)."""
        self.db.close()

    # --- the sweep's identity -------------------------------------------------------------

    @_sqlite_errors
    def meta(self) -> dict[str, str]:
        """The sweep's description: case file, its SHA-256, the fixed overrides, ..."""
        return dict(self.db.execute("SELECT name, value FROM meta").fetchall())

    @_sqlite_errors
    def claim(
        self,
        case_file: str,
        case_sha256: str,
        fixed: Sequence[str],
        title: str,
        inputs: Mapping[str, str] | None = None,
    ) -> None:
        """Record which case, fixed overrides and input files this sweep runs, or check they
        are the ones already recorded: results of another case must never be mixed in.

        ``inputs`` maps every other file the case (with the fixed overrides) reads, named
        relative to the case file's folder, to its SHA-256; a file recorded before whose
        contents differ now is refused, naming the file. (A database from before input
        files were recorded takes them now.)"""
        want = {"case_sha256": case_sha256, "fixed_overrides": json.dumps(list(fixed))}
        inputs = dict(inputs or {})
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
            if "inputs" not in have:
                with self._transaction():
                    self.db.execute(
                        "INSERT OR REPLACE INTO meta VALUES ('inputs', ?)", (json.dumps(inputs),)
                    )
                return
            recorded = json.loads(have["inputs"])
            for name, sha in recorded.items():
                if name in inputs and inputs[name] != sha:
                    raise CaseError(
                        f"{Path(case_file).parent / name} changed since this sweep started "
                        "(the case reads it; its finished variants used the old contents): "
                        f"run into another --out folder, or delete {self.path.parent} to "
                        "start afresh",
                        file=str(self.path),
                    )
            return
        rows = {**want, "case_file": case_file, "title": title, "created": now()}
        rows["inputs"] = json.dumps(inputs)
        rows["fvheat_version"] = __version__
        with self._transaction():
            self.db.executemany("INSERT OR REPLACE INTO meta VALUES (?, ?)", rows.items())

    # --- variants -------------------------------------------------------------------------

    @_sqlite_errors
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
                assert cur.lastrowid is not None
                self.db.execute(
                    "UPDATE variants SET output = ? WHERE id = ?",
                    (folder_name(cur.lastrowid, v), cur.lastrowid),
                )
        by_key = {r.key: r for r in self.rows()}
        return [by_key[v.key] for v in variants]

    @_sqlite_errors
    def dispatched(self, row_id: int) -> None:
        """Mark a variant as handed to a worker: one more attempt, started now."""
        with self._transaction():
            self.db.execute(
                "UPDATE variants SET attempts = attempts + 1, started = ?, finished = NULL "
                "WHERE id = ?",
                (now(), row_id),
            )

    @_sqlite_errors
    def record(self, row_id: int, outcome: Outcome) -> Row:
        """Store a worker's outcome (done with results and the input files its case read,
        or failed with its message)."""
        if outcome.status not in ("done", "failed"):
            raise ValueError(f"unexpected status {outcome.status!r}")
        with self._transaction():
            self.db.execute(
                "UPDATE variants SET status = ?, message = ?, results = ?, finished = ?, "
                "seconds = ?, inputs = ? WHERE id = ?",
                (
                    outcome.status,
                    outcome.message,
                    json.dumps(outcome.results, allow_nan=True),
                    now(),
                    outcome.seconds,
                    json.dumps(outcome.inputs),
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

    @_sqlite_errors
    def rows(self, where: str = "") -> list[Row]:
        """All rows in id order (``where``: an SQL WHERE clause for internal use)."""
        columns = {r[1] for r in self.db.execute("PRAGMA table_info(variants)").fetchall()}
        inputs = "inputs" if "inputs" in columns else "NULL"  # read-only, older database
        cur = self.db.execute(
            "SELECT id, key, params, status, message, results, output, started, finished, "
            f"attempts, seconds, {inputs} FROM variants {where} ORDER BY id"
        )
        try:
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
                    inputs=json.loads(r[11]) if r[11] else {},
                )
                for r in cur.fetchall()
            ]
        except (ValueError, TypeError) as err:  # JSON text SQLite stored intact but garbled
            raise sqlite3.DatabaseError(f"unreadable row: {err}") from err

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
