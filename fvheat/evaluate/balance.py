"""Energy balance of a run: heat in − heat out − change of stored heat."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class EnergyBalance:
    """Energies per metre depth (J/m for a transient run, W/m for a steady one).

    ``boundary``: net heat into the body through each boundary; ``stored``: increase of
    stored heat (0 when steady); ``residual`` = Σ boundary − stored; ``relative`` is the
    residual over the larger of the heat in and the heat out (or stored change).
    """

    boundary: dict[str, float]
    stored: float

    @property
    def heat_in(self) -> float:
        return float(sum(v for v in self.boundary.values() if v > 0))

    @property
    def heat_out(self) -> float:
        return float(-sum(v for v in self.boundary.values() if v < 0))

    @property
    def residual(self) -> float:
        return float(sum(self.boundary.values()) - self.stored)

    @property
    def relative(self) -> float:
        scale = max(self.heat_in, self.heat_out, abs(self.stored))
        return abs(self.residual) / scale if scale > 0 else 0.0

    def as_dict(self) -> dict[str, object]:
        return {
            "heat_in": self.heat_in,
            "heat_out": self.heat_out,
            "stored": self.stored,
            "residual": self.residual,
            "relative": self.relative,
            "boundary": dict(self.boundary),
        }
