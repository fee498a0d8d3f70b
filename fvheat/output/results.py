"""Reading a results folder written by ``fvheat run``: summary, inputs, fields, time series.

Plots and the report are drawn from the folder, so ``fvheat plot DIR`` and
``fvheat report DIR`` reproduce what the run wrote.
"""

from __future__ import annotations

import csv
import json
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from fvheat.errors import CaseError
from fvheat.output.fields import FIELDS_DIR, META_FILE, read_field, read_surface_field
from fvheat.output.inputs import INPUTS_FILE
from fvheat.output.summary_shape import read_summary
from fvheat.output.triangle_fields import FORMAT as TRIANGLE_FORMAT
from fvheat.output.triangle_view import AnyFieldView, TriangleFieldView, TriangleShape

SUMMARY_FILE = "summary.json"
TIMESERIES_FILE = "timeseries.csv"
FIGURES_DIR = "figures"


@dataclass(frozen=True)
class TimeSeries:
    """Saved times (s), probe temperatures (°C) and boundary heat flows (W/m) by name, and
    with latent heat the frozen area (m², None without) and front positions (m, NaN where
    there is no front) by column name without its unit suffix."""

    times: np.ndarray
    probes: dict[str, np.ndarray]
    flows: dict[str, np.ndarray]
    frozen_area: np.ndarray | None = None
    fronts: dict[str, np.ndarray] = field(default_factory=dict)


@dataclass
class ResultsFolder:
    """A results folder and its ``summary.json``; other files are read on demand."""

    path: Path
    summary: dict[str, Any]
    _meta: dict[str, Any] | None = field(default=None, repr=False)
    _shape: TriangleShape | None = field(default=None, repr=False)

    @classmethod
    def open(cls, path: str | Path) -> ResultsFolder:
        """Open ``path``; :class:`CaseError` when it holds no readable ``summary.json``."""
        path = Path(path)
        f = path / SUMMARY_FILE
        if not f.is_file():
            raise CaseError(
                "no summary.json here; give the folder `fvheat run CASE --out DIR` wrote",
                file=str(path),
            )
        return cls(path, read_summary(f, "cannot read it"))

    @property
    def title(self) -> str:
        """The run's title (empty when it had none)."""
        return str(self.summary.get("title", ""))

    @property
    def transient(self) -> bool:
        """Whether the folder holds a transient run."""
        return self.summary.get("mode") == "transient"

    def inputs(self) -> dict[str, Any] | None:
        """``inputs.json``, or None when the folder has none."""
        f = self.path / INPUTS_FILE
        if not f.is_file():
            return None
        return json.loads(f.read_text(encoding="utf-8"))

    def field_meta(self) -> dict[str, Any]:
        """The field index (grid lines, names, files); CaseError when missing."""
        if self._meta is None:
            f = self.path / FIELDS_DIR / META_FILE
            if not f.is_file():
                raise CaseError(
                    "no field files (fields/fields.json); run the case again to write them",
                    file=str(self.path),
                )
            self._meta = json.loads(f.read_text(encoding="utf-8"))
        return self._meta

    def field_times(self) -> list[float]:
        """Times (s) of the saved fields."""
        return [float(e["time_s"]) for e in self.field_meta()["files"]]

    def field(self, index: int = -1) -> AnyFieldView:
        """Saved field number ``index`` (default: the last one, i.e. the end time)."""
        meta = self.field_meta()
        if meta.get("format") == TRIANGLE_FORMAT:
            entry = meta["files"][index]
            return self._triangles(entry["file"], float(entry["time_s"]))
        return read_field(self.path, index, meta)

    def surface_field(self) -> AnyFieldView | None:
        """The junction's surface-temperature field (f_Rsi, θ_si,min), None when the run
        took them from the heat-loss field."""
        meta = self.field_meta()
        if meta.get("format") == TRIANGLE_FORMAT:
            name = meta.get("surface_solve")
            return self._triangles(name, 0.0) if name else None
        return read_surface_field(self.path, meta)

    def _triangles(self, name: str, time: float) -> TriangleFieldView:
        """The triangle-mesh field in ``fields/name``; the triangles are read once."""
        from fvheat.output.triangle_fields import read_triangle_field

        view = read_triangle_field(
            self.path / FIELDS_DIR / name, self.field_meta(), time, self._shape
        )
        self._shape = view.shape
        return view

    def timeseries(self) -> TimeSeries | None:
        """``timeseries.csv`` split into probes and boundaries, or None when absent."""
        f = self.path / TIMESERIES_FILE
        if not f.is_file():
            return None
        with f.open(newline="", encoding="utf-8") as fh:
            rows = list(csv.reader(fh))
        # an empty cell is a value that does not exist at that time (e.g. no front yet)
        values = [[v if v else "nan" for v in row] for row in rows[1:]]
        header, data = rows[0], np.array(values, dtype=float).reshape(-1, len(rows[0]))
        probes = {
            h.removeprefix("temperature_"): data[:, k]
            for k, h in enumerate(header)
            if h.startswith("temperature_")
        }
        flows = {
            h.removeprefix("heat_flow_"): data[:, k]
            for k, h in enumerate(header)
            if h.startswith("heat_flow_")
        }
        fronts = {
            h.removesuffix("_m"): data[:, k] for k, h in enumerate(header) if h.startswith("front_")
        }
        frozen = data[:, header.index("frozen_area_m2")] if "frozen_area_m2" in header else None
        return TimeSeries(data[:, header.index("time_s")], probes, flows, frozen, fronts)
