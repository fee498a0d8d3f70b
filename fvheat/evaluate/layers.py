"""U-value of a flanking element from the model's own layers along a cut (ISO 6946 layer sum)."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from fvheat.assembly.properties import conductivity
from fvheat.case.model import Boundary, Case
from fvheat.mesh.mesh import Mesh

Segment = tuple[tuple[float, float], tuple[float, float]]


@dataclass(frozen=True)
class LayerCut:
    """The 1-D layer sequence along a cut: (material, thickness m, conductivity W/(m·K)) from
    the first end to the second, with the surface resistances at the two ends (m²·K/W) and
    the boundaries they come from (``ends``: names, start then end)."""

    layers: tuple[tuple[str, float, float], ...]
    r_start: float
    r_end: float
    ends: tuple[str, str] | None = field(default=None, compare=False)

    @property
    def thickness(self) -> float:
        """Total thickness of the layers, m."""
        return float(sum(d for _, d, _ in self.layers))

    @property
    def resistance(self) -> float:
        """Total resistance R_si + Σ d/λ + R_se, m²·K/W."""
        return self.r_start + sum(d / k for _, d, k in self.layers) + self.r_end

    @property
    def u_value(self) -> float:
        """Thermal transmittance U = 1/R, W/(m²·K)."""
        return 1.0 / self.resistance


class CutError(ValueError):
    """A cut that does not cross the body from one surface to another along a grid row."""


def layer_cut(case: Case, mesh: Mesh, cut: Segment) -> LayerCut:
    """Read the layers crossed by the segment ``cut`` (m): an axis-aligned one on the
    rectilinear grid (the case's own grid when ``mesh`` has none, e.g. on the triangle
    mesh), a sloped one on the case's geometry (:mod:`fvheat.evaluate.sloped_cut`: it must
    cross the element perpendicular to its surfaces).

    The cut must lie inside one row (or column) of cells, or on a grid line with the same
    layers and end conditions on both sides (a line the mesher put inside a layer), not on
    a material interface; its ends must be on boundary faces whose boundaries are surface
    resistances (or convection without radiation) or fixed temperatures (resistance 0).
    """
    (x0, y0), (x1, y1) = cut
    if x0 != x1 and y0 != y1:  # sloped: read on the geometry itself
        from fvheat.evaluate.sloped_cut import sloped_layers

        layers, r_start, r_end, ends = sloped_layers(case, cut)
        return LayerCut(tuple(layers), r_start, r_end, ends)
    if mesh.grid is None:
        # the layers are the case's geometry: read them on the case's rectilinear grid
        from fvheat.mesh.rectilinear import build_mesh

        mesh = build_mesh(case)
    g = mesh.grid
    assert g is not None
    if y0 == y1 and x0 != x1:
        along, lines, other, pos, (lo, hi) = 0, g.x, g.y, y0, sorted((x0, x1))
    elif x0 == x1 and y0 != y1:
        along, lines, other, pos, (lo, hi) = 1, g.y, g.x, x0, sorted((y0, y1))
    else:
        raise CutError("a cut must have a non-zero length")
    tol = 1e-9 * max(float(np.ptp(g.x)), float(np.ptp(g.y)), 1.0)
    on_line = np.flatnonzero(np.abs(other - pos) <= tol)
    if on_line.size:
        # A grid line: acceptable only when the rows (columns) on both sides read the same
        # layers, i.e. the line is one the mesher placed inside a layer, not a material edge.
        k = int(on_line[0])
        sides: list[LayerCut | None] = []
        for row in (k - 1, k):
            try:
                sides.append(_read(case, mesh, along, lines, row, lo, hi, tol, cut))
            except CutError:
                sides.append(None)
        if sides[0] is None or sides[0] != sides[1]:
            raise CutError(
                f"the cut runs along a material edge (the grid line at {pos:g} m has different "
                "layers or surfaces on its two sides); move it into a layer"
            )
        return sides[0]
    row = int(np.searchsorted(other, pos)) - 1
    if not 0 <= row < other.size - 1:
        raise CutError("the cut lies outside the model")
    return _read(case, mesh, along, lines, row, lo, hi, tol, cut)


def _read(
    case: Case,
    mesh: Mesh,
    along: int,
    lines: np.ndarray,
    row: int,
    lo: float,
    hi: float,
    tol: float,
    cut: Segment,
) -> LayerCut:
    """The layers of grid row (``along`` = 0) or column (``along`` = 1) ``row`` between the
    grid lines at ``lo`` and ``hi`` (m), reported from the cut's first point."""
    g = mesh.grid
    assert g is not None
    (x0, y0), (x1, y1) = cut
    if not 0 <= row < (g.y.size if along == 0 else g.x.size) - 1:
        raise CutError("the cut lies outside the model")
    first, last = np.searchsorted(lines, [lo - tol, hi - tol])
    if (
        first >= lines.size
        or last >= lines.size
        or abs(lines[first] - lo) > tol
        or abs(lines[last] - hi) > tol
    ):
        raise CutError("both ends of the cut must lie on the body's surfaces")
    idx = g.cell_index[row, first:last] if along == 0 else g.cell_index[first:last, row]
    if idx.size == 0:
        raise CutError("the cut is shorter than one cell: it must cross the element")
    if np.any(idx < 0):
        raise CutError("the cut crosses a part outside the body")
    k = conductivity(case, mesh)[idx]
    d = np.diff(lines[first : last + 1])
    names = [mesh.material_names[m] for m in mesh.material[idx]]
    layers: list[tuple[str, float, float]] = []
    for n, dd, kk in zip(names, d, k, strict=True):
        if layers and layers[-1][0] == n:
            layers[-1] = (n, layers[-1][1] + float(dd), float(kk))
        else:
            layers.append((n, float(dd), float(kk)))
    normal = np.zeros(2)
    normal[along] = -1.0
    r_start, b_start = _surface_resistance(case, mesh, int(idx[0]), normal)
    r_end, b_end = _surface_resistance(case, mesh, int(idx[-1]), -normal)
    if (x1 < x0) or (y1 < y0):  # report from the cut's first point
        layers.reverse()
        r_start, r_end = r_end, r_start
        b_start, b_end = b_end, b_start
    return LayerCut(tuple(layers), r_start, r_end, (b_start, b_end))


def _surface_resistance(case: Case, mesh: Mesh, cell: int, normal: np.ndarray) -> tuple[float, str]:
    """Surface resistance (m²·K/W) of the boundary face of ``cell`` facing ``normal``, and
    the boundary's name."""
    faces = np.flatnonzero((mesh.b_cell == cell) & (np.abs(mesh.b_normal @ normal - 1.0) < 1e-9))
    if faces.size == 0 or mesh.b_boundary[faces[0]] < 0:
        raise CutError("each end of the cut must be on a boundary with a surface resistance")
    return end_resistance(case.boundaries[int(mesh.b_boundary[faces[0]])])


def end_resistance(b: Boundary) -> tuple[float, str]:
    """Surface resistance (m²·K/W) a cut ending on boundary ``b`` takes (0 on a fixed
    temperature), and the boundary's name; :class:`CutError` for a boundary without one."""
    if b.kind == "temperature":
        return 0.0, b.name
    if b.kind != "surface" or b.radiative or b.convection <= 0.0:
        raise CutError(
            f"boundary {b.name!r} at the end of the cut has no surface resistance "
            "(give it `resistance` or `convection` without radiation)"
        )
    return 1.0 / b.convection, b.name
