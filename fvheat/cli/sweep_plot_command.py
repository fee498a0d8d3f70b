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
    from fvheat.sweep.plot import draw, plot_lines, sweep_title
    from fvheat.sweep.store import DB_NAME, SweepStore
    from fvheat.sweep.table import from_store

    database = source / DB_NAME if source.is_dir() else source
    table = from_store(database)
    with SweepStore(database, readonly=True) as store:
        meta = store.meta()
    base = meta.get("title", database.parent.name)
    lines = plot_lines(table, x, y, series, where)
    if out is None:
        out = database.parent / f"{_slug(y)}_vs_{_slug(x)}.png"
    points = sum(len(line.x) for line in lines)
    draw(
        lines,
        x,
        y,
        series,
        sweep_title(y, x, series, where),
        out,
        subtitle=f"sweep of {base!r}: {points} finished variants",
        length_unit=_length_unit(meta.get("case_file")),
    )
    if not quiet:
        print(f"plot: {out}")
        print(f"Caution: {CAUTION}")
    return out


def _length_unit(case_file: str | None) -> str:
    """The length unit of the swept case file ([geometry] units; m when not readable)."""
    import tomllib

    if not case_file:
        return "m"
    try:
        data = tomllib.loads(Path(case_file).read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return "m"
    units = (data.get("geometry") or {}).get("units", "m")
    return units if units in ("m", "cm", "mm") else "m"


def _slug(name: str) -> str:
    return re.sub(r"[^A-Za-z0-9_.-]+", "_", name)
