"""``fvheat collect``: one table of many runs' summaries or of a sweep's database."""

from __future__ import annotations

import sys
from collections.abc import Sequence
from pathlib import Path

from fvheat.cautions import CAUTION


def collect_runs(sources: Sequence[Path], csv_file: Path | None, *, quiet: bool) -> None:
    """Gather ``sources`` into one table: CSV to ``csv_file`` (written atomically), or to
    standard output; the cautions go to standard error unless ``quiet``."""
    from fvheat.sweep.table import collect, csv_text, write_csv

    table = collect(sources)
    if csv_file is None:
        sys.stdout.write(csv_text(table))
    else:
        write_csv(table, csv_file)
        if not quiet:
            print(f"{len(table.rows)} rows, {len(table.columns)} columns: {csv_file}")
    if not quiet:
        print(f"Caution: {CAUTION}", file=sys.stderr)
