"""Energy balance of a run: heat in − heat out − change of stored heat."""

from __future__ import annotations

from dataclasses import dataclass

#: relative residual below which the balance closes (round-off of the sparse solves)
CLOSURE = 1e-8
#: driving temperature difference, K, whose heat flow through the surfaces' conductance
#: marks the round-off floor below which the body is isothermal (no heat flows)
ISOTHERMAL_K = 1e-9


@dataclass(frozen=True)
class EnergyBalance:
    """Energies per metre depth (J/m for a transient run, W/m for a steady one).

    ``boundary``: net heat into the body through each boundary; ``stored``: increase of
    stored heat (0 when steady); ``residual`` = Σ boundary − stored; ``relative`` is the
    residual over the largest of the heat in, the heat out and the stored change.
    ``noise`` (same unit) is the heat a driving difference of :data:`ISOTHERMAL_K` would
    carry through the surfaces: when no flow exceeds it the body is isothermal and the
    relative residual means nothing.
    """

    boundary: dict[str, float]
    stored: float
    noise: float = 0.0

    @property
    def heat_in(self) -> float:
        """Sum of the boundaries' net heat inflows (W/m steady, J/m transient)."""
        return float(sum(v for v in self.boundary.values() if v > 0))

    @property
    def heat_out(self) -> float:
        """Sum of the boundaries' net heat outflows (W/m steady, J/m transient)."""
        return float(-sum(v for v in self.boundary.values() if v < 0))

    @property
    def residual(self) -> float:
        """Σ boundary − stored (W/m steady, J/m transient)."""
        return float(sum(self.boundary.values()) - self.stored)

    @property
    def scale(self) -> float:
        """The largest of the heat in, the heat out and the stored change."""
        return max(self.heat_in, self.heat_out, abs(self.stored))

    @property
    def relative(self) -> float:
        """Residual over :attr:`scale` (dimensionless; 0 with no flow)."""
        return abs(self.residual) / self.scale if self.scale > 0 else 0.0

    @property
    def isothermal(self) -> bool:
        """No heat flows beyond round-off: every boundary and the body at one temperature."""
        return self.scale <= self.noise

    @property
    def closes(self) -> bool:
        """Whether the balance closes to round-off (always, when isothermal)."""
        return self.isothermal or self.relative <= CLOSURE

    def describe(self) -> str:
        """One line for consoles and reports."""
        if self.isothermal:
            return "isothermal: no heat flows (balance not meaningful)"
        verdict = "closes" if self.closes else "does NOT close"
        return f"residual {self.relative:.1e} of the largest flow: {verdict} to round-off"

    def as_dict(self) -> dict[str, object]:
        """The balance as a JSON-ready dict (W/m steady, J/m transient)."""
        return {
            "heat_in": self.heat_in,
            "heat_out": self.heat_out,
            "stored": self.stored,
            "residual": self.residual,
            "relative": self.relative,
            "isothermal": self.isothermal,
            "closes": self.closes,
            "boundary": dict(self.boundary),
        }
