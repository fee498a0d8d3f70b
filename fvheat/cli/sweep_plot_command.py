"""``fvheat sweep-plot``: a sweep result against a varied parameter, as a PNG."""

from __future__ import annotations

import re
from collections.abc import Sequence
from pathlib import Path

from fvheat.cautions import CAUTION


def plot_sweep(
    source: Path,
    x: str,
    y: str,
    series: str | None,
    where: Sequence[str],
    out: Path | None,
    *,
    quiet: bool,
) -> Path:
    """Plot ``y`` against ``x`` (one line per ``series`` value) from the sweep at ``source``
    (its folder or database) into ``out`` (default: ``<y>_vs_<x>.png`` in the sweep folder)."""
    from fvheat.sweep.plot import draw, plot_lines
    from fvheat.sweep.store import DB_NAME, SweepStore
    from fvheat.sweep.table import from_store

    database = source / DB_NAME if source.is_dir() else source
    table = from_store(database)
    with SweepStore(database, readonly=True) as store:
        title = store.meta().get("title", database.parent.name)
    lines = plot_lines(table, x, y, series, where)
    if out is None:
        out = database.parent / f"{_slug(y)}_vs_{_slug(x)}.png"
    draw(lines, x, y, series, title, out)
    if not quiet:
        print(f"plot: {out}")
        print(f"Caution: {CAUTION}")
    return out


def _slug(name: str) -> str:
    return re.sub(r"[^A-Za-z0-9_.-]+", "_", name)
