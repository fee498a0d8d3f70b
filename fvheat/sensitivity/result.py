"""Sensitivity results: derivatives and elasticities by quantity and ``--set`` key, ranked."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from fvheat.evaluate.junction import JUNCTION_QUANTITIES
from fvheat.sensitivity.parameters import Parameter

#: the order quantities are shown in (heat flows follow)
QUANTITY_ORDER = tuple(JUNCTION_QUANTITIES)
#: what a user reads for each quantity
LABELS = {"psi": "ψ", "theta_si_min": "θ_si,min"}
#: derivative units by quantity
UNITS = {
    "psi": "W/(m·K)",
    "L2D": "W/(m·K)",
    "U_f": "W/(m²·K)",
    "f_Rsi": "–",
    "theta_si_min": "K",
}


@dataclass(frozen=True)
class Entry:
    """∂q/∂p (unit of q per unit of p) and the elasticity ∂q/∂p · p/q (None when q = 0)."""

    key: str
    value: float
    derivative: float
    elasticity: float | None


@dataclass(frozen=True)
class Sensitivities:
    """``quantities[name] = (value of the quantity, entries by key)``."""

    quantities: dict[str, tuple[float, dict[str, Entry]]]
    parameters: tuple[Parameter, ...]

    @classmethod
    def build(
        cls, params: list[Parameter], raw: dict[str, tuple[float, np.ndarray]]
    ) -> Sensitivities:
        """From ``raw[quantity] = (value, derivatives in the order of params)``: entries
        with the elasticity ∂q/∂p · p/q (None when q = 0)."""
        order = [q for q in QUANTITY_ORDER if q in raw] + [
            q for q in raw if q not in QUANTITY_ORDER
        ]
        out = {}
        for q in order:
            value, d = raw[q]
            entries = {}
            for p, dq in zip(params, d, strict=True):
                e = float(dq) * p.value / value if value != 0.0 else None
                entries[p.key] = Entry(p.key, p.value, float(dq), e)
            out[q] = (float(value), entries)
        return cls(out, tuple(params))

    def derivative(self, quantity: str, key: str) -> float:
        """∂quantity/∂key in the quantity's unit per unit of the key."""
        return self.quantities[quantity][1][key].derivative

    def ranked(self, quantity: str) -> list[Entry]:
        """Entries of ``quantity`` by decreasing |elasticity| (|derivative| when q = 0)."""
        entries = list(self.quantities[quantity][1].values())
        return sorted(
            entries,
            key=lambda e: -abs(e.elasticity if e.elasticity is not None else e.derivative),
        )

    @property
    def headline(self) -> str:
        """The quantity a ranked table leads with: ψ when there is a junction."""
        return next(iter(self.quantities))

    def as_dict(self) -> dict[str, Any]:
        """``{quantity: {key: {"derivative", "elasticity", "value"}}}`` plus a ``note``."""
        out: dict[str, Any] = {
            q: {
                k: {
                    "derivative": e.derivative,
                    "elasticity": e.elasticity,
                    "value": e.value,
                    "method": METHOD_FD if k.startswith("parameters.") else METHOD_ADJOINT,
                }
                for k, e in entries.items()
            }
            for q, (_, entries) in self.quantities.items()
        }
        out["note"] = NOTE
        return out


METHOD_ADJOINT = "adjoint"
METHOD_FD = "central difference of two full runs"
NOTE = (
    "discrete adjoint of the steady solve: derivative in the unit of the quantity per unit of "
    "the key, elasticity = derivative × key value / quantity value; theta_si_min and f_Rsi "
    "are differentiated at the fixed location of the minimum; keys under parameters. (geometry) "
    "are central differences of two full remeshed runs (relative step 1e-3), not adjoint"
)


def describe(s: Sensitivities, quantity: str, top: int = 3) -> str:
    """'ψ is most sensitive to …' with the leading keys and their elasticities."""
    label = LABELS.get(quantity, quantity)
    parts = [
        f"{e.key} ({e.elasticity:+.3f})" if e.elasticity is not None else e.key
        for e in s.ranked(quantity)[:top]
    ]
    return f"{label} is most sensitive to " + ", ".join(parts)
