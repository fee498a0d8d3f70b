"""Layers along a sloped cut, read from the case's geometry (not from a mesh).

A flanking element that is not axis-aligned (a pitched roof, a tilted wall) has its U-value
from the layers a straight cut crosses, perpendicular to the element's surfaces: the cut
is split where it crosses a region outline or hole, each piece takes the material painted
at its middle (the last region containing it), and the ends take the surface resistances
of the boundaries they lie on (ISO 6946 layer sum, as for the grid's axis-aligned cuts).
"""

from __future__ import annotations

import numpy as np
import shapely

from fvheat.case.model import Boundary, Case
from fvheat.mesh.geometry import points_in_polygon

#: largest angle (degrees) between the cut and a surface's normal at either end
PERPENDICULAR_DEG = 1.0


def sloped_layers(
    case: Case, cut: tuple[tuple[float, float], tuple[float, float]]
) -> tuple[list[tuple[str, float, float]], float, float, tuple[str, str]]:
    """(material, thickness m, conductivity W/(m·K)) from the cut's first point to its
    second, the surface resistances (m²·K/W) there and the boundaries they come from.
    Raises the junction's :class:`~fvheat.evaluate.layers.CutError` for a cut off the body
    or not across it."""
    from fvheat.evaluate.layers import CutError

    p0, p1 = np.asarray(cut[0], float), np.asarray(cut[1], float)
    length = float(np.hypot(*(p1 - p0)))
    if length <= 0.0:
        raise CutError("a cut must have a non-zero length")
    line = shapely.LineString([p0, p1])
    params = {0.0, 1.0}
    for r in case.regions:
        for ring in (r.vertices, *r.holes):
            hit = line.intersection(shapely.LinearRing(ring))
            for g in shapely.get_parts(hit):
                for xy in np.asarray(g.coords):
                    params.add(float(line.project(shapely.Point(xy), normalized=True)))
    u = np.unique(np.round(np.array(sorted(params)), 12))
    mids = p0 + np.outer(0.5 * (u[1:] + u[:-1]), p1 - p0)
    owner = np.full(len(mids), -1)
    for k, r in enumerate(case.regions):
        inside = points_in_polygon(mids[:, 0], mids[:, 1], r.vertices)
        for hole in r.holes:
            inside &= ~points_in_polygon(mids[:, 0], mids[:, 1], hole)
        owner[inside] = k
    if np.any(owner < 0):
        raise CutError("the cut crosses a part outside the body")
    layers: list[tuple[str, float, float]] = []
    for k, d in zip(owner, np.diff(u) * length, strict=True):
        m = case.regions[int(k)].material
        if layers and layers[-1][0] == m:
            layers[-1] = (m, layers[-1][1] + float(d), layers[-1][2])
        else:
            layers.append((m, float(d), case.materials[m].conductivity))
    t = (p1 - p0) / length
    (r0, b0), (r1, b1) = _end_resistance(case, p0, t), _end_resistance(case, p1, t)
    return layers, r0, r1, (b0, b1)


def _end_resistance(case: Case, p: np.ndarray, t: np.ndarray) -> tuple[float, str]:
    """Surface resistance (m²·K/W) of the boundary the cut's end ``p`` lies on, and its
    name; the cut (direction ``t``) must cross that surface perpendicularly."""
    from fvheat.evaluate.layers import CutError, end_resistance

    tol = 1e-9 * max(float(np.max(np.abs(p))), 1.0)
    found: Boundary | None = None
    for b in case.boundaries:
        for a, e in b.edges:
            a_, e_ = np.asarray(a, float), np.asarray(e, float)
            d = e_ - a_
            s = float(np.clip((p - a_) @ d / (d @ d), 0.0, 1.0))
            if np.hypot(*(p - a_ - s * d)) <= tol:
                along = abs(float(d @ t)) / float(np.hypot(*d))
                if along > np.sin(np.radians(PERPENDICULAR_DEG)):
                    raise CutError(
                        f"the cut meets boundary {b.name!r} at an angle: a cut must cross the "
                        "element perpendicular to its surfaces"
                    )
                found = b
    if found is None:
        raise CutError("each end of the cut must be on a boundary with a surface resistance")
    return end_resistance(found)
