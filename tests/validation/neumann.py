"""Neumann's two-phase solution: freezing of a semi-infinite medium whose face is held below
the freezing point from t = 0.

Source: Carslaw & Jaeger, *Conduction of Heat in Solids*, 2nd ed., §11.2 (Neumann's
solution, eq. (7) for the front constant λ); the same result in Incropera & DeWitt's
phase-change discussion. The change of phase is isothermal at θ_f.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np
from scipy.optimize import brentq
from scipy.special import erf, erfc


@dataclass(frozen=True)
class Neumann:
    """A medium (frozen index s, unfrozen l; W/(m·K), kg/m³, J/(kg·K), J/kg) initially at
    ``t_init``, its face at ``t_wall``, freezing at ``t_f`` (°C)."""

    k_s: float
    k_l: float
    rho: float
    c_s: float
    c_l: float
    latent: float
    t_init: float
    t_wall: float
    t_f: float

    @property
    def a_s(self) -> float:
        """Diffusivity of the frozen phase, m²/s."""
        return self.k_s / (self.rho * self.c_s)

    @property
    def a_l(self) -> float:
        """Diffusivity of the unfrozen phase, m²/s."""
        return self.k_l / (self.rho * self.c_l)

    @property
    def nu(self) -> float:
        """√(α_s/α_l)."""
        return float(np.sqrt(self.a_s / self.a_l))

    @cached_property
    def lam(self) -> float:
        """Root λ of Neumann's transcendental equation (front at 2λ√(α_s t))."""
        nu = self.nu

        def f(lam: float) -> float:
            return (
                np.exp(-(lam**2)) / erf(lam)
                + (self.k_l / self.k_s)
                * nu
                * (self.t_f - self.t_init)
                / (self.t_f - self.t_wall)
                * np.exp(-(lam**2) * nu**2)
                / erfc(lam * nu)
                - lam * self.latent * np.sqrt(np.pi) / (self.c_s * (self.t_f - self.t_wall))
            )

        return brentq(f, 1e-6, 5.0)

    def exact(self, x: np.ndarray, t: float) -> tuple[np.ndarray, float]:
        """Temperature (°C) at depths ``x`` (m) and the front depth (m) at time ``t`` (s)."""
        a_s, a_l, lam = self.a_s, self.a_l, self.lam
        front = 2.0 * lam * np.sqrt(a_s * t)
        frozen = self.t_wall + (self.t_f - self.t_wall) * erf(x / (2 * np.sqrt(a_s * t))) / erf(lam)
        unfrozen = self.t_init - (self.t_init - self.t_f) * erfc(x / (2 * np.sqrt(a_l * t))) / erfc(
            lam * self.nu
        )
        return np.where(x < front, frozen, unfrozen), front
