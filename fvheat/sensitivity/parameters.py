"""The inputs a sensitivity is taken with respect to, named by their ``--set`` keys.

Every material's conductivity (``materials.NAME.conductivity``, W/(m·K); cavity materials,
whose conductivity is derived from the cavity, are left out) and every surface boundary's
exchange coefficient: ``boundaries.NAME.resistance`` (m²·K/W) when the case gives a
resistance, ``boundaries.NAME.convection`` (W/(m²·K)) otherwise. Internally every boundary
derivative is taken with respect to the surface coefficient h = 1/R and converted with
∂q/∂R = −h²·∂q/∂h. With a junction whose f_Rsi comes from surface resistances of its own
(``junction.condensation_resistance``, ISO 13788), that resistance too: one key when every
checked surface takes the same value, else ``junction.condensation_resistance.NAME`` per
boundary; only θ_si,min and f_Rsi depend on it.
"""

from __future__ import annotations

from dataclasses import dataclass

from fvheat.case.model import Case


@dataclass(frozen=True)
class Parameter:
    """One input: its ``--set`` key, its value in the case, and what it is: ``"conductivity"``
    of material ``name``, ``"resistance"`` / ``"convection"`` of boundary ``name``, or
    ``"parameter"``, a ``[parameters]`` entry (by finite differences), or
    ``"condensation"``: the junction's condensation resistance of boundary ``name`` (""
    when one value serves every checked surface)."""

    key: str
    value: float
    kind: str
    name: str

    @property
    def on_boundary(self) -> bool:
        """Whether the input is a boundary's surface resistance or convection coefficient."""
        return self.kind in ("resistance", "convection")

    def from_h(self, h: float) -> float:
        """Factor turning a derivative with respect to the surface coefficient h (W/(m²·K))
        into one with respect to this parameter: −h² for a resistance, 1 for convection."""
        return -h * h if self.kind in ("resistance", "condensation") else 1.0


def quote_key(name: str) -> str:
    """A key segment as ``--set`` reads it (quoted when it is not a bare TOML key)."""
    bare = name.replace("_", "").replace("-", "").isalnum() and name.isascii()
    return name if bare else '"' + name.replace('"', '\\"') + '"'


def case_parameters(case: Case) -> list[Parameter]:
    """The parameters of ``case``: material conductivities, boundary coefficients, then
    the junction's condensation resistances."""
    out = [
        Parameter(f"materials.{quote_key(n)}.conductivity", m.conductivity, "conductivity", n)
        for n, m in case.materials.items()
        if not m.cavity
    ]
    for b in case.boundaries:
        if b.kind != "surface":
            continue
        if b.resistance is not None:
            out.append(
                Parameter(
                    f"boundaries.{quote_key(b.name)}.resistance", b.resistance, "resistance", b.name
                )
            )
        else:
            out.append(
                Parameter(
                    f"boundaries.{quote_key(b.name)}.convection", b.convection, "convection", b.name
                )
            )
    return out + condensation_parameters(case)


#: the ``--set`` key of the junction's surface resistances for f_Rsi
CONDENSATION_KEY = "junction.condensation_resistance"


def condensation_parameters(case: Case) -> list[Parameter]:
    """The junction's condensation resistances (m²·K/W) on the surface boundaries they
    replace; none without a junction or when f_Rsi uses the heat-loss resistances."""
    j = case.junction
    if j is None or j.surface_resistances.values is None:
        return []
    kinds = {b.name: b.kind for b in case.boundaries}
    # fixed-temperature surfaces exchange through it too (case/resistances.py)
    exchanging = ("surface", "temperature")
    r = {n: v for n, v in j.surface_resistances.values.items() if kinds.get(n) in exchanging}
    if not r:
        return []
    if len(set(r.values())) == 1:
        return [Parameter(CONDENSATION_KEY, next(iter(r.values())), "condensation", "")]
    return [
        Parameter(f"{CONDENSATION_KEY}.{quote_key(n)}", v, "condensation", n) for n, v in r.items()
    ]
