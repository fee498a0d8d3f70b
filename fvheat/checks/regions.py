"""Regions the grid paints much smaller or larger than drawn: a sloped or curved layer
thinner than the cells, a foil that vanishes, a region wholly covered by later ones."""

from __future__ import annotations

import numpy as np
import shapely

from fvheat.case.model import Case, Region
from fvheat.mesh.mesh import Mesh

#: relative difference between painted and drawn area above which a region is reported
AREA_TOLERANCE = 0.05


def _polygon(r: Region) -> shapely.Polygon:
    return shapely.Polygon(r.vertices, [h for h in r.holes])


def region_area_warnings(case: Case, mesh: Mesh) -> list[str]:
    """One warning per ``[[regions]]`` entry whose painted area (the cells it gave their
    material) differs from its visible drawn area (its shapes minus the later regions
    painted over them) by more than :data:`AREA_TOLERANCE`, or that paints nothing."""
    if mesh.region is None:
        return []
    polys = [_polygon(r) for r in case.regions]
    if mesh.piece_region is not None and mesh.piece_volume is not None:  # exact, per piece
        painted = np.bincount(mesh.piece_region, weights=mesh.piece_volume, minlength=len(polys))
    else:
        painted = np.bincount(mesh.region, weights=mesh.volumes, minlength=len(polys))
    entries: dict[int, list[int]] = {}
    for k, r in enumerate(case.regions):
        entries.setdefault(r.entry, []).append(k)
    out = []
    covering: shapely.Geometry = shapely.Polygon()  # union of the regions painted after this entry
    for entry in sorted(entries, reverse=True):
        ks = entries[entry]
        shape = shapely.union_all([polys[k] for k in ks])
        visible = shape.difference(covering)
        covering = shapely.union_all([covering, shape])
        message = _area_message(case, case.regions[ks[0]], shape, visible, painted[ks])
        if message:
            out.append(message)
    return out[::-1]


def _area_message(case, r: Region, shape, visible, painted) -> str | None:
    drawn, got = float(visible.area), float(painted.sum())
    label = r.label
    if drawn <= 1e-9 * max(float(shape.area), 1e-300):
        return (
            f"{label} ({r.material}) is painted over entirely by later regions and gives "
            "no cell its material: remove it or check the order of the regions"
        )
    fix = f"give a smaller mesh.min_cell (now {case.mesh.min_cell:g} m) or draw it as a box"
    if got == 0.0:
        return (
            f"{label} ({r.material}) paints no cell (its {drawn:.3g} m² lie between cell "
            f"centres: thinner than the cells): {fix}"
        )
    if abs(got - drawn) > AREA_TOLERANCE * drawn:
        return (
            f"{label} ({r.material}): the grid paints {got:.4g} m² of its drawn {drawn:.4g} m² "
            f"({100 * (got / drawn - 1):+.0f} %), a sloped or curved part thinner than the "
            f"cells: {fix}"
        )
    return None
