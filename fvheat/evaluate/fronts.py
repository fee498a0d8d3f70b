"""Phase-change measures: frozen area and front positions along probe lines."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from fvheat.assembly.enthalpy import EnthalpyModel
from fvheat.case.model import Case
from fvheat.evaluate.probes import probe_operator
from fvheat.mesh.mesh import Mesh

#: sample points along each probe line
SAMPLES = 401


@dataclass(frozen=True)
class FrontLines:
    """Precomputed operators: frozen area Σ V·(1 − f) over phase-change cells (m²) and, per
    probe line, the distances (m) from its start to the first (``front_<line>``) and the last
    (``front_far_<line>``) point where the interpolated unfrozen fraction f crosses ½ (None
    when it does not). On a line down from a frozen surface the first crossing is the frost
    depth; once a thaw starts at the surface it is the thaw front and the last crossing is
    the frost depth."""

    model: EnthalpyModel
    volumes: np.ndarray
    names: tuple[str, ...]
    samplers: tuple[sp.csr_matrix, ...]
    distances: tuple[np.ndarray, ...]

    @classmethod
    def build(cls, case: Case, mesh: Mesh, model: EnthalpyModel) -> FrontLines:
        """The sampling operators of the case's probe lines on ``mesh``."""
        samplers, distances = [], []
        for line in case.probe_lines:
            s = np.linspace(0.0, 1.0, SAMPLES)[:, None]
            a, b = np.asarray(line.start), np.asarray(line.end)
            samplers.append(probe_operator(mesh, a + s * (b - a)))
            distances.append(s[:, 0] * float(np.hypot(*(b - a))))
        return cls(
            model,
            mesh.volumes,
            tuple(li.name for li in case.probe_lines),
            tuple(samplers),
            tuple(distances),
        )

    def measure(self, temp: np.ndarray) -> dict[str, float | None]:
        """``frozen_area`` (m²) and ``front_<line>`` (m) at cell temperatures ``temp``."""
        if not self.model.active:
            return {}
        f = self.model.liquid_fraction(temp)
        out: dict[str, float | None] = {
            "frozen_area": float(np.sum(self.volumes[self.model.pcm] * (1.0 - f[self.model.pcm])))
        }
        for name, op, dist in zip(self.names, self.samplers, self.distances, strict=True):
            x = _crossings(op @ f - 0.5, dist)
            out[f"front_{name}"] = float(x[0]) if x.size else None
            out[f"front_far_{name}"] = float(x[-1]) if x.size else None
        return out


def _crossings(g: np.ndarray, dist: np.ndarray) -> np.ndarray:
    """Distances where ``g`` changes sign, linearly interpolated, in order along the line."""
    k = np.flatnonzero(np.sign(g[:-1]) * np.sign(g[1:]) < 0)
    w = g[k] / (g[k] - g[k + 1])
    return dist[k] + w * (dist[k + 1] - dist[k])
