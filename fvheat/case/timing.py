"""The ``[time]`` table: transient runs, periodic cycles, adaptive steps."""

from __future__ import annotations

import math
from typing import Any, cast

from fvheat.case.fields import (
    Context,
    Invalid,
    describe,
    number,
    string,
    table,
    temperature,
    to_number,
)
from fvheat.case.model import (
    Scheme,
    TimeSettings,
)

SCHEMES = ("backward_euler", "crank_nicolson")

#: saved states of a transient run when ``save_every`` is not given: the smallest multiple
#: of the step giving at most this many (every saved state is a field kept in memory and a
#: VTU file)
DEFAULT_SAVES = 100
#: the most time steps a run may take: a year at 30 s steps (about 1 000 000 steps); more
#: is a slip in ``duration`` or ``step`` (and would run for days)
MAX_STEPS = 1_000_000


def parse_time(value: Any, ctx: Context) -> TimeSettings | None:
    """Validate the ``[time]`` table (durations in s); None (steady) when absent."""
    if value is None:
        return None
    path = "time"
    tbl = table(
        value,
        path,
        allowed=(
            "duration",
            "step",
            "initial_temperature",
            "save_every",
            "scheme",
            "periodic",
            "periodic_tolerance",
            "max_cycles",
            "adaptive_tolerance",
        ),
        required=("duration", "step", "initial_temperature"),
    )
    duration = number(tbl, "duration", path, gt=0)
    step = number(tbl, "step", path, gt=0)
    if step > duration:
        raise Invalid(
            "time.step", f"step = {step:g} s is longer than the duration = {duration:g} s"
        )
    n_steps = duration / step
    if n_steps > MAX_STEPS:
        raise Invalid(
            "time.step",
            f"duration = {duration:g} s in steps of {step:g} s makes {n_steps:.4g} time steps, "
            f"more than {MAX_STEPS:,}: give a longer step or a shorter duration",
        )
    if abs(n_steps - round(n_steps)) > 1e-9 * n_steps:
        raise Invalid(
            "time.duration",
            f"duration = {duration:g} s must be a whole number of steps of {step:g} s "
            f"(e.g. {round(n_steps) * step:g} or {(round(n_steps) + 1) * step:g})",
        )
    initial = tbl["initial_temperature"]
    if initial != "steady":
        if isinstance(initial, str):
            raise Invalid(
                "time.initial_temperature",
                f'expected a temperature (°C) or "steady", got {describe(initial)}',
            )
        initial = temperature(
            to_number(initial, "time.initial_temperature"), "time.initial_temperature"
        )
    # by default at most DEFAULT_SAVES saved states (each a field in memory and a VTU file)
    default_save = step * max(1, math.ceil(round(n_steps) / DEFAULT_SAVES))
    save_every = number(tbl, "save_every", path, required=False, default=default_save, gt=0)
    ratio = save_every / step
    if ratio < 1 - 1e-9 or abs(ratio - round(ratio)) > 1e-9 * ratio:
        lower = max(1, int(ratio)) * step
        raise Invalid(
            "time.save_every",
            f"save_every = {save_every:g} s must be a whole multiple of step = {step:g} s "
            f"(results are saved at time steps), e.g. {lower:g} or {lower + step:g}",
        )
    scheme = string(tbl, "scheme", path, required=False, default="backward_euler", choices=SCHEMES)
    periodic = tbl.get("periodic", False)
    if not isinstance(periodic, bool):
        raise Invalid("time.periodic", f"expected true or false, got {describe(periodic)}")
    max_cycles = number(tbl, "max_cycles", path, required=False, default=200, ge=1)
    if max_cycles != int(max_cycles):
        raise Invalid("time.max_cycles", f"expected a whole number, got {max_cycles:g}")
    if periodic and round(n_steps) * max_cycles > MAX_STEPS:
        raise Invalid(
            "time.step",
            f"a periodic run of up to max_cycles = {max_cycles:g} cycles of {round(n_steps):,} "
            f"steps may take {round(n_steps) * max_cycles:.4g} time steps, more than "
            f"{MAX_STEPS:,}: give a longer step or a smaller max_cycles",
        )
    return TimeSettings(
        duration=duration,
        step=step,
        initial_temperature=initial,
        save_every=save_every,
        scheme=cast("Scheme", scheme),
        periodic=periodic,
        periodic_tolerance=number(
            tbl, "periodic_tolerance", path, required=False, default=1e-4, gt=0
        ),
        max_cycles=int(max_cycles),
        adaptive_tolerance=number(tbl, "adaptive_tolerance", path, required=False, gt=0),
    )
