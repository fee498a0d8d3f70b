"""Sensible and latent heat: the volumetric enthalpy of every cell as a function of T.

For a phase-change material with solidus T_s and liquidus T_l (°C), frozen heat capacity
C_f = ρ_f c_f and unfrozen C_u = ρ c (J/(m³·K)) and latent heat ρ·L (J/m³, L in J/kg with
the unfrozen density), the enthalpy per unit volume relative to the solidus is

    h(T) = C_f (T − T_s)                                     T ≤ T_s
    h(T) = C_m (T − T_s) + ρL (T − T_s)/(T_l − T_s)          T_s < T < T_l,  C_m = (C_f + C_u)/2
    h(T) = C_m (T_l − T_s) + ρL + C_u (T − T_l)              T ≥ T_l

piecewise linear and strictly increasing, so T(h) is explicit. The liquid (unfrozen)
fraction is linear across the range, and so is the conductivity between k_f and k_u.
Other materials have h(T) = C·T. Cell enthalpies below are per metre depth (J/m): h·V.
A cell made of pieces (a control volume of the triangle mesh straddling an interface) sums
its pieces: with one phase-change material among them, the others' sensible capacity adds
to both phases' capacities, so h(T) keeps the form above (shifted by a constant).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

from fvheat.case.model import Case
from fvheat.errors import CaseError
from fvheat.mesh.mesh import Mesh


@dataclass(frozen=True)
class EnthalpyModel:
    """Per-cell enthalpy parameters. ``pcm`` marks phase-change cells; elsewhere ``c_u`` is
    the heat capacity and the other arrays are unused. Capacities are per cell (J/(m·K)),
    latent heat per cell (J/m)."""

    pcm: np.ndarray
    c_f: np.ndarray
    c_u: np.ndarray
    latent: np.ndarray
    t_s: np.ndarray
    t_l: np.ndarray
    k_f: np.ndarray
    k_u: np.ndarray

    @classmethod
    def build(cls, case: Case, mesh: Mesh) -> EnthalpyModel:
        """Spread the materials' phase-change data onto the cells."""
        rows = []
        for name in mesh.material_names:
            m = case.materials[name]
            cu = m.volumetric_heat_capacity or 0.0
            if m.phase_change is None or m.latent_heat is None:
                rows.append((0.0, cu, cu, 0.0, 0.0, 0.0, m.conductivity, m.conductivity))
                continue
            fz = m.frozen
            rho_f = (fz.density if fz and fz.density else None) or m.density or 0.0
            c_f = (fz.specific_heat if fz and fz.specific_heat else None) or m.specific_heat or 0.0
            k_f = (fz.conductivity if fz and fz.conductivity else None) or m.conductivity
            lat = (m.density or 0.0) * m.latent_heat
            rows.append((1.0, rho_f * c_f, cu, lat, *m.phase_change, k_f, m.conductivity))
        rows_arr = np.array(rows, dtype=float)
        cell, material, volume = mesh.pieces()
        n = mesh.n_cells
        # a cell's phase-change material: the one of its phase-change pieces (a cell of a
        # vertex-centred mesh may straddle an interface; then the other pieces add their
        # sensible capacity to both phases, which keeps h(T) of the same form)
        is_pcm = rows_arr[material, 0] > 0
        lo = np.full(n, len(rows), dtype=np.int64)
        hi = np.full(n, -1, dtype=np.int64)
        np.minimum.at(lo, cell[is_pcm], material[is_pcm])
        np.maximum.at(hi, cell[is_pcm], material[is_pcm])
        pcm = hi >= 0
        if np.any(pcm & (lo != hi)):
            c = int(np.flatnonzero(pcm & (lo != hi))[0])
            names = f"{mesh.material_names[lo[c]]!r} and {mesh.material_names[hi[c]]!r}"
            raise CaseError(
                f"phase-change materials {names} meet at the mesh node at "
                f"({mesh.centres[c, 0]:.4g}, {mesh.centres[c, 1]:.4g}) m: a node takes one "
                'phase-change range; separate them or set [mesh] kind = "rectilinear"',
                file=str(case.source),
                key=f"materials.{mesh.material_names[hi[c]]}.phase_change",
            )
        table = rows_arr[np.where(pcm, lo, mesh.material)]

        def per_cell(column: int) -> np.ndarray:
            """Σ over each cell's pieces of the column's value per m² times the area."""
            weights = rows_arr[material, column] * volume
            return np.bincount(cell, weights=weights, minlength=n)

        c_u = per_cell(2)
        none = not is_pcm.any()  # no latent heat anywhere: c_f = c_u, no latent heat
        return cls(
            pcm=pcm,
            c_f=c_u.copy() if none else per_cell(1),
            c_u=c_u,
            latent=np.zeros(n) if none else per_cell(3),
            t_s=table[:, 4],
            t_l=table[:, 5],
            k_f=table[:, 6],
            k_u=table[:, 7],
        )

    @property
    def active(self) -> bool:
        """True when some cell has a latent heat or a phase-dependent conductivity."""
        return bool(self.pcm.any())

    @property
    def _c_m(self) -> np.ndarray:
        return 0.5 * (self.c_f + self.c_u)

    @property
    def _width(self) -> np.ndarray:
        return np.where(self.pcm, self.t_l - self.t_s, 1.0)

    def enthalpy(self, temp: np.ndarray) -> np.ndarray:
        """Cell enthalpy (J/m) at cell temperatures ``temp`` (°C)."""
        p = self.pcm
        out = self.c_u * temp
        if not p.any():
            return out
        d = temp[p] - self.t_s[p]
        w = self._width[p]
        cm, lat = self._c_m[p], self.latent[p]
        top = cm * w + lat  # enthalpy at the liquidus
        out[p] = np.where(
            d <= 0.0,
            self.c_f[p] * d,
            np.where(d < w, (cm + lat / w) * d, top + self.c_u[p] * (d - w)),
        )
        return out

    def temperature(self, h: np.ndarray) -> np.ndarray:
        """Cell temperature (°C) from cell enthalpy ``h`` (J/m): the inverse of :meth:`enthalpy`."""
        p = self.pcm
        out = np.divide(h, self.c_u, out=np.zeros_like(h), where=self.c_u > 0)
        if not p.any():
            return out
        hp = h[p]
        w = self._width[p]
        cm, lat = self._c_m[p], self.latent[p]
        top = cm * w + lat
        out[p] = self.t_s[p] + np.where(
            hp <= 0.0,
            hp / self.c_f[p],
            np.where(hp < top, hp / (cm + lat / w), w + (hp - top) / self.c_u[p]),
        )
        return out

    def capacity(self, temp: np.ndarray) -> np.ndarray:
        """dh/dT per cell (J/(m·K)): the apparent heat capacity of the segment ``temp`` is on
        (at a kink, the segment above)."""
        p = self.pcm
        out = self.c_u.copy()
        if p.any():
            d = temp[p] - self.t_s[p]
            w = self._width[p]
            out[p] = np.where(
                d < 0.0,
                self.c_f[p],
                np.where(d < w, self._c_m[p] + self.latent[p] / w, self.c_u[p]),
            )
        return out

    def liquid_fraction(self, temp: np.ndarray) -> np.ndarray:
        """Unfrozen (liquid) fraction 0–1 per cell; 1 for materials without phase change."""
        frac = np.ones_like(temp)
        p = self.pcm
        frac[p] = np.clip((temp[p] - self.t_s[p]) / self._width[p], 0.0, 1.0)
        return frac

    def conductivity(self, temp: np.ndarray) -> np.ndarray:
        """Cell conductivity (W/(m·K)), linear in the liquid fraction across the range."""
        f = self.liquid_fraction(temp)
        return self.k_f + f * (self.k_u - self.k_f)

    @functools.cached_property
    def variable_conductivity(self) -> bool:
        """Whether a phase change alters some cell's conductivity (computed once: asked
        at every time step)."""
        return bool(np.any(self.pcm & (self.k_f != self.k_u)))
