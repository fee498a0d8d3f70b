"""The ``[condensation]`` table: surfaces and room humidity for condensation-risk hours.

```toml
[condensation]
boundaries = ["inside"]        # surfaces to check
relative_humidity = 55         # % (constant, cosine or CSV series)
air_temperature = 20           # °C, default: the first boundary's air temperature
mould_threshold = 80           # % surface relative humidity
surface_resistance = 0.25      # m²·K/W on the checked surfaces (default 0.25, ISO 13788),
                               # per boundary { wall = 0.25, glass = 0.13 }, or "heat_loss"
```
"""

from __future__ import annotations

from typing import Any

import numpy as np

from fvheat.case.fields import (
    Context,
    Invalid,
    boundary_list,
    join,
    number,
    table,
)
from fvheat.case.model import Condensation
from fvheat.case.resistances import read_resistances
from fvheat.case.signals import Cosine, Series
from fvheat.case.values import read_signal


def parse_condensation(value: Any, ctx: Context) -> Condensation | None:
    """``[condensation]``: surfaces to check, room air temperature and humidity (%)."""
    if value is None:
        return None
    path = "condensation"
    tbl = table(
        value,
        path,
        allowed=(
            "boundaries",
            "air_temperature",
            "relative_humidity",
            "mould_threshold",
            "surface_resistance",
        ),
        required=("boundaries", "relative_humidity"),
    )
    if ctx.parsed.get("time") is None:
        raise Invalid(
            path,
            "counts condensation and mould hours over a transient run: add [time], or use "
            "[junction] indoor_humidity for the steady dew-point check at θ_si,min",
        )
    known = {b.name: b for b in ctx.parsed["boundaries"]}
    names = boundary_list(tbl["boundaries"], join(path, "boundaries"), known)
    if "air_temperature" in tbl:
        air = read_signal(
            tbl["air_temperature"], join(path, "air_temperature"), ctx, is_temperature=True
        )
    else:
        air = known[names[0]].reference_temperature
        if air is None:
            raise Invalid(
                join(path, "air_temperature"),
                f"required: boundary {names[0]!r} has no air temperature to take the room's from",
            )
    rh = read_signal(
        tbl["relative_humidity"], join(path, "relative_humidity"), ctx, is_temperature=False
    )
    values = rh.values if isinstance(rh, Series) else np.array([rh.at(0.0)])
    if isinstance(rh, Cosine):
        values = np.array([rh.mean - abs(rh.amplitude), rh.mean + abs(rh.amplitude)])
    if np.any(values < 1) or np.any(values > 100):  # below 1 %: outside the dew-point formulas
        raise Invalid(join(path, "relative_humidity"), "must stay within [1, 100] %")
    return Condensation(
        boundaries=tuple(names),
        air_temperature=air,
        relative_humidity=rh,
        mould_threshold=number(
            tbl, "mould_threshold", path, required=False, default=80.0, gt=0, le=100
        ),
        surface_resistances=read_resistances(tbl, "surface_resistance", path, tuple(names)),
    )
