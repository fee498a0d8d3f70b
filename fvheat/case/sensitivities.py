"""The ``[sensitivities]`` table: ask a steady run for adjoint sensitivities.

```toml
[sensitivities]
enabled = true     # same as `fvheat run CASE --sensitivities`
```
"""

from __future__ import annotations

from typing import Any

from fvheat.case.fields import Context, Invalid, describe, join, table


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
