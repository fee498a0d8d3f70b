"""``inputs.json``: the validated inputs of a run, as the report shows them.

Written next to ``summary.json`` so that ``fvheat report DIR`` can rebuild the report from
the results folder alone: materials with the area each covers, boundary conditions in
words, probes, mesh and time settings, junction settings, and the case file's text.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import numpy as np

from fvheat.case.model import Boundary, Case, Geometry
from fvheat.case.signals import Constant, Cosine, Series
from fvheat.mesh.mesh import Mesh
from fvheat.output.files import atomic_write_text

INPUTS_FILE = "inputs.json"
#: case files longer than this (bytes) are not copied into inputs.json
MAX_CASE_TEXT = 200_000


def describe_signal(sig: Any, unit: str) -> str:
    """A boundary value in words: '20 °C', '4 ± 7 °C (period 24 h, peak at 15 h)', ..."""
    if isinstance(sig, Constant):
        return f"{sig.value:g} {unit}"
    if isinstance(sig, Cosine):
        return (
            f"{sig.mean:g} ± {sig.amplitude:g} {unit} (cosine, period {sig.period / 3600:g} h, "
            f"peak at t = {sig.phase / 3600:g} h)"
        )
    if isinstance(sig, Series):
        return f"{unit} from {Path(sig.source).name or 'a CSV file'}, column {sig.column!r}"
    return str(sig)


def describe_boundary(b: Boundary) -> str:
    """The condition of a boundary in one line (units included)."""
    if b.kind == "temperature":
        return f"surface held at {describe_signal(b.temperature, '°C')}"
    parts = []
    if b.kind == "surface":
        parts.append(f"air {describe_signal(b.air_temperature, '°C')}")
        if b.resistance is not None:
            parts.append(f"R_s = {b.resistance:g} m²·K/W")
        else:
            if b.convection > 0:
                parts.append(f"h = {b.convection:g} W/(m²·K)")
            if b.emissivity > 0:
                parts.append(
                    f"ε = {b.emissivity:g} to {describe_signal(b.radiant_temperature, '°C')}"
                )
    if b.heat_flux is not None:
        parts.append(f"imposed flux {describe_signal(b.heat_flux, 'W/m²')} into the body")
    return ", ".join(parts)


def case_inputs(case: Case, mesh: Mesh) -> dict[str, Any]:
    """The inputs dictionary (see the module docstring); SI units, temperatures in °C."""
    _, piece_material, piece_volume = mesh.pieces()  # exact where cells straddle materials
    area = np.bincount(piece_material, weights=piece_volume, minlength=len(mesh.material_names))
    cells = np.bincount(mesh.material, minlength=len(mesh.material_names))
    index = {n: k for k, n in enumerate(mesh.material_names)}
    materials = []
    for name, m in case.materials.items():
        k = index.get(name)
        materials.append(
            {
                "name": name,
                "conductivity": m.conductivity,
                "density": m.density,
                "specific_heat": m.specific_heat,
                "latent_heat": m.latent_heat,
                "phase_change": list(m.phase_change) if m.phase_change else None,
                "cells": int(cells[k]) if k is not None else 0,
                "area": float(area[k]) if k is not None else 0.0,
                "source": m.source,
            }
        )
    boundaries = []
    for k, b in enumerate(case.boundaries):
        sel = mesh.b_boundary == k
        boundaries.append(
            {
                "name": b.name,
                "kind": b.kind,
                "condition": describe_boundary(b),
                "faces": int(sel.sum()),
                "length": float((mesh.b_area[sel] * mesh.b_exchange[sel]).sum()),
            }
        )
    text = None
    src = Path(case.source)
    if src.is_file() and src.stat().st_size <= MAX_CASE_TEXT:
        text = src.read_text(encoding="utf-8", errors="replace")
    out: dict[str, Any] = {
        "title": case.title,
        "case_file": str(case.source),
        "geometry": (case.geometry or Geometry()).as_dict(),
        "materials": materials,
        "boundaries": boundaries,
        "adiabatic_faces": int((mesh.b_boundary < 0).sum()),
        "probes": [{"name": p.name, "at": list(p.at)} for p in case.probes],
        "parameters": dict(case.parameters),
        "mesh_settings": {
            "max_cell": case.mesh.max_cell,
            "min_cell": case.mesh.min_cell,
            "growth": case.mesh.growth,
            "corner_cell": case.mesh.corner_size,
            "kind": mesh.kind,
            "file": None if case.mesh.file is None else str(case.mesh.file),
            "file_sha256": case.mesh.file_sha256,
        },
        "time": None,
        "junction": None,
        "case_text": text,
    }
    if case.time is not None:
        t = case.time
        out["time"] = {
            "duration": t.duration,
            "step": t.step,
            "save_every": t.save_every,
            "initial_temperature": t.initial_temperature,
            "scheme": t.scheme,
        }
    if case.junction is not None:
        j = case.junction
        out["junction"] = {
            "inside": list(j.inside),
            "outside": list(j.outside),
            "dimensions": j.dimensions,
            "condensation_resistance": j.surface_resistances.values,
            "condensation_resistance_defaulted": list(j.surface_resistances.defaulted),
            "f_rsi_limit": j.f_rsi_limit,
            "indoor_humidity": j.indoor_humidity,
            "frame_width": j.frame_width,
            "environments": {e.name: list(e.boundaries) for e in j.environments},
        }
    if case.ground is not None:
        g = case.ground
        out["ground"] = {
            "width": g.width,
            "floor_edge": g.floor_edge,
            "ground_level": g.ground_level,
            "wall_outside": g.wall_outside,
            "soil": g.soil,
            "boundary": g.boundary,
            "floor_boundary": g.floor_boundary,
            "floor_resistance": g.floor_resistance,
            "wall_thickness": g.wall_thickness,
        }
    return out


def write_inputs(out: str | Path, case: Case, mesh: Mesh) -> Path:
    """Write ``inputs.json`` into the results folder ``out``, atomically."""
    text = json.dumps(case_inputs(case, mesh), indent=2, allow_nan=False) + "\n"
    return atomic_write_text(Path(out) / INPUTS_FILE, text)
