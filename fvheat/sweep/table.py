"""One table of many runs: from a sweep's database or from ``fvheat run`` output folders.

Columns: the parameters (varied keys named by their dotted path as given; for run folders
every ``--set`` key), ``status``, the main results (:func:`~fvheat.sweep.results.main_results`),
``message`` and ``output``. Timing fields never appear, so tables of repeated runs are equal.
"""

from __future__ import annotations

import csv
import io
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from fvheat.errors import CaseError
from fvheat.output.files import atomic_write_text
from fvheat.output.summary_shape import read_summary
from fvheat.sweep.results import main_results
from fvheat.sweep.store import DB_NAME, SweepStore
from fvheat.sweep.values import display_value


@dataclass
class Table:
    """Rows of ``{column: value}``; ``params`` are the parameter columns, ``results`` the
    result columns, each in first-seen order."""

    params: list[str] = field(default_factory=list)
    results: list[str] = field(default_factory=list)
    rows: list[dict[str, Any]] = field(default_factory=list)

    @property
    def columns(self) -> list[str]:
        """All columns in order: parameters, status, results, message, output."""
        return [*self.params, "status", *self.results, "message", "output"]

    def add(
        self, params: dict[str, str], status: str, results: dict[str, float], **extra: Any
    ) -> None:
        """Append one row; parameter values are value texts (shown as in the case file)."""
        _extend(self.params, params)
        _extend(self.results, results)
        row = {k: display_value(v) for k, v in params.items()}
        self.rows.append({**row, "status": status, **results, **extra})

    def merge(self, other: Table) -> None:
        """Append another table's rows (columns are united)."""
        _extend(self.params, other.params)
        _extend(self.results, other.results)
        self.rows.extend(other.rows)


def _extend(names: list[str], new: Sequence[str] | dict[str, Any]) -> None:
    names.extend(k for k in new if k not in names)


def from_store(path: str | Path, keys: Sequence[str] = (), *, readonly: bool = True) -> Table:
    """The table of a sweep database (``DIR/sweep.sqlite`` or ``DIR``); ``keys`` put the
    parameter columns in that order (others follow in first-seen order). ``readonly=False``
    is for the sweep's coordinator (which leaves no WAL files behind when it closes)."""
    path = Path(path)
    if path.is_dir():
        path = path / DB_NAME
    table = Table(params=list(keys))
    with SweepStore(path, readonly=readonly) as store:
        for row in store.rows():
            table.add(row.params, row.status, row.results, message=row.message, output=row.output)
    return table


def from_run(folder: str | Path) -> Table:
    """The one-row table of a ``fvheat run`` output folder (or its summary.json)."""
    folder = Path(folder)
    summary_path = folder if folder.suffix == ".json" else folder / "summary.json"
    try:
        summary = read_summary(summary_path, "cannot read the summary")
    except FileNotFoundError:
        raise CaseError(
            "no summary.json here (not a fvheat run folder?)", file=str(summary_path)
        ) from None
    params: dict[str, str] = {}
    for o in summary.get("overrides", []):
        key, _, text = o.partition("=")
        params[key.strip()] = text.strip()
    table = Table()
    output = str(summary_path.parent)
    results = {**main_results(summary), **over_run_results(summary)}
    table.add(params, "done", results, message=None, output=output)
    return table


def over_run_results(summary: dict[str, Any]) -> dict[str, float]:
    """Extremes over a transient run: ``min_temperature_over_run_<boundary>`` and
    ``max_temperature_over_run_<boundary>`` (°C), ``f_min_over_run`` (junction cases) and
    ``max_<measure>`` (frozen area m², fronts m) when present."""
    out: dict[str, float] = {}
    for name, b in summary.get("boundaries", {}).items():
        for key in ("min_temperature_over_run", "max_temperature_over_run"):
            if b.get(key) is not None:
                out[f"{key}_{name}"] = b[key]
    f = (summary.get("junction") or {}).get("f_min_over_run")
    if f is not None:
        out["f_min_over_run"] = f
    for key, v in (summary.get("phase_change_max") or {}).items():
        out[f"max_{key}"] = v["value"]
    return out


def collect(sources: Sequence[str | Path]) -> Table:
    """One table of every source, in order: a sweep folder or its ``sweep.sqlite`` gives
    all its variants, a run folder or its ``summary.json`` gives one row."""
    if not sources:
        raise CaseError("give at least one run folder or sweep database", key="collect")
    table = Table()
    for source in sources:
        p = Path(source)
        is_store = p.suffix in (".sqlite", ".db") or (p.is_dir() and (p / DB_NAME).is_file())
        table.merge(from_store(p) if is_store else from_run(p))
    return table


def csv_text(table: Table) -> str:
    """The table as CSV text: floats in full precision (they read back exactly), empty
    cells for missing values."""
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    columns = table.columns
    writer.writerow(columns)
    for row in table.rows:
        writer.writerow([_cell(row.get(c)) for c in columns])
    return buf.getvalue()


def write_csv(table: Table, path: str | Path) -> Path:
    """Write the table as CSV, atomically."""
    return atomic_write_text(path, csv_text(table))


def _cell(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, float):
        return repr(value)
    return str(value)
