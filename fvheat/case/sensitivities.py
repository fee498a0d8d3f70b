"""The ``[sensitivities]`` table: ask a steady run for adjoint sensitivities.

```toml
[sensitivities]
enabled = true     # same as `fvheat run CASE --sensitivities`
```
"""

from __future__ import annotations

from typing import Any

from fvheat.case.fields import Context, Invalid, describe, join, table
from fvheat.case.model import Case


def parse_sensitivities(value: Any, ctx: Context) -> bool:
    """True when ``[sensitivities] enabled = true``."""
    if value is None:
        return False
    tbl = table(value, "sensitivities", allowed=("enabled",))
    enabled = tbl.get("enabled", True)
    if not isinstance(enabled, bool):
        raise Invalid(
            join("sensitivities", "enabled"), f"expected true or false, got {describe(enabled)}"
        )
    return enabled


def sensitivity_problem(case: Case) -> str | None:
    """Why adjoint sensitivities do not apply to ``case`` (one line), or None."""
    if case.transient:
        return "sensitivities are computed for steady runs only; remove [time] or ask without"
    j = case.junction
    if j is not None and j.inside and case.imposes_heat_flux:
        return (
            "sensitivities are not available for a junction with imposed heat fluxes (its "
            "ψ and f_Rsi come from a separate solve without them)"
        )
    for name, m in case.materials.items():
        frozen = None if m.frozen is None else m.frozen.conductivity
        if m.phase_change is not None and frozen is not None and frozen != m.conductivity:
            return (
                "sensitivities are not available with phase-dependent conductivity "
                f"(material {name!r})"
            )
    return None


def check_sensitivities(case: Case) -> None:
    """Whole-case check: ``[sensitivities] enabled = true`` only where they apply."""
    if case.sensitivities and (problem := sensitivity_problem(case)) is not None:
        raise Invalid(join("sensitivities", "enabled"), problem)
