"""``summary.json``: the contract's results of a run, plus provenance and checks."""

from __future__ import annotations

import hashlib
import json
import math
from pathlib import Path
from typing import Any

import numpy as np

from fvheat import __version__
from fvheat.case.model import Geometry
from fvheat.cautions import CAUTION
from fvheat.output.files import atomic_write_text
from fvheat.simulate import Solution
from fvheat.study import Study


def case_digest(source: Path, overrides: tuple[str, ...] = ()) -> str:
    """SHA-256 of the case file's bytes and the overrides applied to it."""
    h = hashlib.sha256(Path(source).read_bytes())
    for o in overrides:
        h.update(b"\0" + o.encode())
    return h.hexdigest()


def build_summary(study: Study, overrides: tuple[str, ...] = ()) -> dict[str, Any]:
    """The summary dictionary: boundaries, probes, cells, energy balance, junction results,
    grid check and provenance."""
    solution = study.solution
    case = solution.case
    summary: dict[str, Any] = {
        "title": case.title,
        "project": case.project.as_dict() if case.project is not None else {},
        "case_file": str(case.source),
        "case_sha256": case_digest(case.source, overrides) if Path(case.source).is_file() else None,
        "overrides": list(overrides),
        "geometry": (case.geometry or Geometry()).as_dict(),
        "fvheat_version": __version__,
        "mode": "transient" if case.transient else "steady",
        "time_s": solution.time,
        "cells": solution.mesh.n_cells,
        "mesh": solution.mesh.stats(),
        "boundaries": {name: r.as_dict() for name, r in solution.surfaces.items()},
        "probes": dict(solution.probes),
        "temperature_range": [
            float(np.min(solution.temperature)),
            float(np.max(solution.temperature)),
        ],
        "energy_balance": solution.balance.as_dict(),
        **_phase_change(solution),
        **({"periodic": solution.periodic.as_dict()} if solution.periodic else {}),
        **({"condensation": solution.condensation.as_dict()} if solution.condensation else {}),
        "caution": CAUTION,
    }
    summary["warnings"] = study.all_warnings
    ext = solution.extremes
    if ext is not None:
        for name, b in summary["boundaries"].items():
            b.update(ext.boundary_dict(name))
        if ext.phase:
            summary["phase_change_max"] = ext.phase_dict()
    junction = study.junction.as_dict() if study.junction is not None else {}
    if ext is not None and study.junction is not None:
        junction.update(ext.factor_dict())
    if study.coupling is not None:
        junction["coupling"] = study.coupling.as_dict()
    if junction:
        summary["junction"] = junction
    if study.grid is not None:
        summary["grid_check"] = study.grid.as_dict()
    if study.sensitivities is not None:
        summary["sensitivities"] = study.sensitivities.as_dict()
    return summary


def non_finite_keys(value: Any, path: str = "") -> list[str]:
    """Dotted keys of the NaN or infinite numbers in a summary (empty when all are finite):
    such a summary is not valid JSON, and a result that cannot be trusted."""
    if isinstance(value, float):
        return [] if math.isfinite(value) else [path or "(value)"]
    if isinstance(value, dict):
        items: Any = value.items()
    elif isinstance(value, list | tuple):
        items = enumerate(value)
    else:
        return []
    return [
        k for key, v in items for k in non_finite_keys(v, f"{path}.{key}" if path else str(key))
    ]


def write_summary(path: str | Path, summary: dict[str, Any]) -> Path:
    """Write the summary as indented JSON, atomically."""
    return atomic_write_text(path, json.dumps(summary, indent=2, allow_nan=False) + "\n")


def _phase_change(solution: Solution) -> dict[str, Any]:
    """Frozen area (m²) and front positions (m) at the end time, when there is latent heat."""
    h = solution.history
    if h is None or not h.phase or not h.phase[-1]:
        return {}
    return {"phase_change": dict(h.phase[-1])}
