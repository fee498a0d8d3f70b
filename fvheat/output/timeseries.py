"""``timeseries.csv``: probe temperatures, boundary heat flows and, with latent heat, the
frozen area and front positions at every saved time."""

from __future__ import annotations

import csv
from pathlib import Path

import numpy as np

from fvheat.output.files import atomic_write
from fvheat.simulate import Solution


def timeseries_table(solution: Solution) -> tuple[list[str], np.ndarray]:
    """Column names and values (rows = saved times) of the time-series table."""
    h = solution.history
    if h is None:
        raise ValueError("a steady solution has no time series")
    case = solution.case
    header = (
        ["time_s"]
        + [f"temperature_{p.name}" for p in case.probes]
        + [f"heat_flow_{b.name}" for b in case.boundaries]
    )
    n = len(h.times)
    phase_keys = list(h.phase[0]) if h.phase else []
    header += [f"{k}_m2" if k == "frozen_area" else f"{k}_m" for k in phase_keys]
    phase = np.array(
        [[np.nan if row[k] is None else row[k] for k in phase_keys] for row in h.phase], dtype=float
    ).reshape(n, len(phase_keys))
    data = np.column_stack(
        [
            np.asarray(h.times),
            np.asarray(h.probes).reshape(n, len(case.probes)),
            np.asarray(h.flows).reshape(n, len(case.boundaries)),
            phase,
        ]
    )
    return header, data


def write_timeseries(path: str | Path, solution: Solution) -> Path:
    """Write ``timeseries.csv`` atomically (full double precision)."""
    header, data = timeseries_table(solution)

    def write(fh) -> None:
        w = csv.writer(fh)
        w.writerow(header)
        # an empty cell where a value does not exist (e.g. no front on a line yet)
        w.writerows([["" if np.isnan(v) else repr(float(v)) for v in row] for row in data])

    return atomic_write(path, write)
