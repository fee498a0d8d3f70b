"""Per-boundary results from the same surface fluxes the solver balanced.

Surface-temperature extremes are taken over the face centres *and* the face end points.
At a corner of the section (a window reveal meeting the frame, a slab soffit meeting the
wall) the lowest inside surface temperature sits at the corner point itself, half a cell
from the nearest face centre, where the temperature changes steeply. Each face end point
gets the value of the face extrapolated linearly along the surface from the face and its
collinear neighbour on the far side (same boundary and material), the value of the face
itself where there is no such neighbour. With the mesh refined towards re-entrant corners
(:mod:`fvheat.mesh.rectilinear`) this brings the corner temperature within a few
hundredths of a kelvin of a converged reference (tests/validation/test_corner_points.py).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fvheat.assembly.boundary import SurfaceTerms
from fvheat.assembly.system import System
from fvheat.mesh.geometry import coincident_ids
from fvheat.mesh.mesh import Mesh, face_ends


@dataclass(frozen=True)
class SurfaceResult:
    """One boundary: heat flow into the body (W/m), surface-temperature extremes (°C) over
    its face centres and face end points and where they occur (m), and its exchanging
    length (m)."""

    heat_flow: float
    min_temperature: float
    min_at: tuple[float, float]
    max_temperature: float
    max_at: tuple[float, float]
    length: float

    def as_dict(self) -> dict[str, object]:
        """The surface result as a JSON-ready dict (W/m, °C, m)."""
        return {
            "heat_flow": self.heat_flow,
            "min_temperature": self.min_temperature,
            "min_at": list(self.min_at),
            "max_temperature": self.max_temperature,
            "max_at": list(self.max_at),
            "length": self.length,
        }


@dataclass(frozen=True)
class SurfacePoints:
    """Surface temperatures at points of the boundaries: every face centre, then both end
    points of every face. ``temperature`` °C, ``at`` (n, 2) m, ``bid`` boundary index."""

    temperature: np.ndarray
    at: np.ndarray
    bid: np.ndarray


@dataclass(frozen=True)
class SurfacePointMap:
    """Where the surface points of :func:`surface_points` are and how their temperatures
    follow from the face temperatures; built once per mesh and set of surface terms, so a
    time step evaluates them with a few vector operations. ``neighbour``/``use`` and
    ``weight`` per end (start point, end point) give T_end = T_f + (T_f − T_n)·w where
    ``use``, T_f elsewhere."""

    at: np.ndarray
    bid: np.ndarray
    neighbour: tuple[np.ndarray, np.ndarray]
    use: tuple[np.ndarray, np.ndarray]
    weight: tuple[np.ndarray, np.ndarray]

    @classmethod
    def build(cls, mesh: Mesh, s: SurfaceTerms) -> SurfacePointMap:
        """The point map of the surface terms ``s`` on ``mesh``."""
        face = s.face
        centre, normal, half = mesh.b_centre[face], mesh.b_normal[face], 0.5 * mesh.b_area[face]
        both = face_ends(centre, normal, mesh.b_area[face])
        ends = (both[:, 0], both[:, 1])
        # a collinear neighbour continues the face on the same line, same boundary and material
        scale = max(float(np.ptp(mesh.centres)), 1.0)
        material = mesh.material[mesh.b_cell[face]]
        straight = s.exchange == 1.0
        keys = [_point_keys(p, normal, scale) for p in ends]
        after = _match(keys[1], keys[0])  # the face that starts where this one ends
        before = _match(keys[0], keys[1])
        others, uses, weights = [], [], []
        for across in (after, before):  # start point: look beyond the end; end: before start
            ok = across >= 0
            other = np.where(ok, across, 0)
            ok &= (
                (s.bid[other] == s.bid) & (material[other] == material) & straight & straight[other]
            )
            # T_end = T_f + (T_f − T_other)·(L_f/2)/((L_f + L_other)/2)
            others.append(other)
            uses.append(ok)
            weights.append(half / (half + half[other]))
        # where the unknown sits on the surface (vertex-centred meshes) the surface field is
        # linear between the nodes: its extremes are at the nodes themselves
        node = s.at_node
        if node.any():
            vertex = mesh.centres[s.cell]
            centre = np.where(node[:, None], vertex, centre)
            ends = (
                np.where(node[:, None], vertex, ends[0]),
                np.where(node[:, None], vertex, ends[1]),
            )
            uses = [u & ~node for u in uses]
        return cls(
            at=np.concatenate([centre, *ends]),
            bid=np.tile(s.bid, 3),
            neighbour=(others[0], others[1]),
            use=(uses[0], uses[1]),
            weight=(weights[0], weights[1]),
        )

    def temperatures(self, ts: np.ndarray) -> np.ndarray:
        """Temperatures (°C) at every point from the face-centre temperatures ``ts``."""
        values = [ts]
        for other, ok, w in zip(self.neighbour, self.use, self.weight, strict=True):
            values.append(np.where(ok, ts + (ts - ts[other]) * w, ts))
        return np.concatenate(values)


def surface_points(mesh: Mesh, s: SurfaceTerms, ts: np.ndarray) -> SurfacePoints:
    """Face-centre temperatures ``ts`` (°C, one per surface face of ``s``) and the values
    extrapolated to both end points of every face."""
    m = SurfacePointMap.build(mesh, s)
    return SurfacePoints(temperature=m.temperatures(ts), at=m.at, bid=m.bid)


def _point_keys(points: np.ndarray, normal: np.ndarray, scale: float) -> np.ndarray:
    """Keys of (point, normal) pairs in units of their tolerance (1e-9 of the model's
    size, 1e-6 in the normal): rows less than 1 apart are the same point on the same line."""
    return np.column_stack([points / (1e-9 * scale), normal * 1e6])


def _match(find: np.ndarray, among: np.ndarray) -> np.ndarray:
    """For each key row of ``find``, the index of a row of ``among`` within round-off of
    it (−1 if none)."""
    if among.shape[0] == 0:
        return np.full(find.shape[0], -1)
    ids = coincident_ids(np.concatenate([among, find]), shifted=2)  # the point, not the normal
    owner = np.full(int(ids.max()) + 1, -1)
    owner[ids[: among.shape[0]]] = np.arange(among.shape[0])
    return owner[ids[among.shape[0] :]]


def surface_results(system: System, temp: np.ndarray, t: float) -> dict[str, SurfaceResult]:
    """Heat flow and surface-temperature extremes of every boundary at time ``t`` (s)."""
    s = system.surface
    ts, flux, _ = s.surface_state(temp, t)
    nb = len(s.boundaries)
    flows = np.bincount(s.bid, weights=flux, minlength=nb)
    length = np.bincount(s.bid, weights=s.area * s.exchange, minlength=nb)
    pts = surface_points(system.mesh, s, ts)
    order = np.argsort(pts.bid, kind="stable")
    starts = np.searchsorted(pts.bid[order], np.arange(nb + 1))
    out = {}
    for k, b in enumerate(s.boundaries):
        idx = order[starts[k] : starts[k + 1]]
        lo = idx[np.argmin(pts.temperature[idx])]
        hi = idx[np.argmax(pts.temperature[idx])]
        out[b.name] = SurfaceResult(
            heat_flow=float(flows[k]),
            min_temperature=float(pts.temperature[lo]),
            min_at=(float(pts.at[lo, 0]), float(pts.at[lo, 1])),
            max_temperature=float(pts.temperature[hi]),
            max_at=(float(pts.at[hi, 0]), float(pts.at[hi, 1])),
            length=float(length[k]),
        )
    return out
