"""Parts of the body that exchange no heat with each other, and parts with no temperature
reference (only heat fluxes or adiabatic edges): their steady temperature is undefined."""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp
from scipy.sparse.csgraph import connected_components

from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.mesh.mesh import Mesh


def body_parts(mesh: Mesh) -> tuple[int, np.ndarray]:
    """Number of connected parts of the body and the part of each cell."""
    n = mesh.n_cells
    adj = sp.coo_matrix((np.ones(mesh.n_faces), (mesh.owner, mesh.neighbour)), shape=(n, n))
    return connected_components(adj, directed=False)


def island_warnings(case: Case, mesh: Mesh) -> list[str]:
    """Refuse a part with no temperature reference where a steady field is solved (a steady
    run, or a transient run starting from the steady field); warn about it otherwise, and
    about a body that falls into separate parts."""
    count, part = body_parts(mesh)
    tied = np.array([b.ties_temperature for b in case.boundaries] + [False])
    face_tied = tied[mesh.b_boundary]  # index −1 (adiabatic) takes the last entry, False
    has_tie = np.bincount(part[mesh.b_cell], weights=face_tied, minlength=count) > 0
    steady = case.time is None or case.time.initial_temperature == "steady"
    warnings = []
    for p in np.flatnonzero(~has_tie):
        where = _describe_part(case, mesh, part == p)
        message = (
            f"a part of the body {where} touches no boundary with a temperature (only heat "
            "fluxes or adiabatic edges), so its temperature is undefined"
        )
        if steady:
            raise CaseError(
                f"{message}: connect it to the rest of the body or give one of its edges a "
                "boundary with air_temperature or temperature",
                file=str(case.source),
                key="regions",
            )
        warnings.append(f"{message} in a steady state; it only follows its initial temperature")
    if count > 1:
        sizes = np.bincount(part, minlength=count)
        others = [p for p in np.argsort(-sizes)[1:]]
        listed = "; ".join(_describe_part(case, mesh, part == p) for p in others[:3])
        warnings.append(
            f"the body falls into {count} separate parts that exchange no heat ({listed}"
            f"{'; ...' if len(others) > 3 else ''}): check for a gap between regions"
        )
    return warnings


def _describe_part(case: Case, mesh: Mesh, cells: np.ndarray) -> str:
    """'around (x, y) m (regions ...)' for the cells of one part."""
    c = mesh.centres[cells]
    x, y = c[np.argmin(np.hypot(*(c - c.mean(axis=0)).T))]
    names = []
    if mesh.region is not None:
        for k in np.unique(mesh.region[cells]):
            r = case.regions[k]
            label = r.name or r.key
            if label not in names:
                names.append(label)
    else:
        names = [mesh.material_names[m] for m in np.unique(mesh.material[cells])]
    shown = ", ".join(names[:4]) + (", ..." if len(names) > 4 else "")
    return f"around ({x:.4g}, {y:.4g}) m ({shown})"
