"""Energy balance: heat in through the boundaries = change of stored heat (conservation).

Source: conservation of energy, the defining property of a finite-volume scheme
(Patankar, Numerical Heat Transfer and Fluid Flow, §4.2, from memory: fluxes computed once
per face and used by both neighbouring cells). Summed over all cells the interior face
fluxes cancel, so the discrete balance closes to round-off. Tolerance: 1e-9 relative.

The balance is checked twice: as fvheat reports it (``solution.balance``), and recomputed
here from the saved boundary heat flows (every step saved), the θ-scheme weights and the
stored heat Σ ρ·c·V·Δθ taken from the case's materials and the mesh's cell volumes.

The junction (a floor slab through an insulated brick wall) and all values are invented.
"""

from __future__ import annotations

import numpy as np
import pytest

from .helpers import report, run

DAY = 86400.0

BASE = """
title = "slab through an insulated wall"
[mesh]
max_cell = 0.04
min_cell = 0.005

[materials.brick]
conductivity = 0.6
density = 1600
specific_heat = 840
[materials.wool]
conductivity = 0.035
density = 30
specific_heat = 1030
[materials.concrete]
conductivity = 2.3
density = 2400
specific_heat = 1000

[[regions]]
material = "brick"
box = [0.0, 0.0, 0.24, 1.2]
[[regions]]
material = "wool"
box = [0.24, 0.0, 0.38, 1.2]
[[regions]]
material = "concrete"
box = [-0.8, 0.5, 0.30, 0.7]

[[boundaries]]
name = "room"
edges = [[[0.0, 0.0], [0.0, 0.5]], [[0.0, 0.7], [0.0, 1.2]], [[-0.8, 0.7], [0.0, 0.7]]]
air_temperature = ROOM
resistance = 0.13

[[boundaries]]
name = "room_below"
edges = [[[-0.8, 0.5], [0.0, 0.5]]]
air_temperature = 18.0
resistance = 0.17

[[boundaries]]
name = "facade"
edges = [[[0.38, 0.0], [0.38, 1.2]]]
air_temperature = OUTDOOR
FACADE
"""


def steady_case() -> str:
    return (
        BASE.replace("ROOM", "20.0")
        .replace("OUTDOOR", "-5.0")
        .replace("FACADE", "resistance = 0.04")
    )


def transient_case(scheme: str, step: float) -> str:
    """Two days: room air from a CSV series, outdoor air and sky as cosines, a radiating
    facade that absorbs a tabulated solar flux; start from the steady field at t = 0."""
    facade = "\n".join(
        [
            "convection = 20.0",
            "emissivity = 0.9",
            "radiant_temperature = { mean = -8.0, amplitude = 5.0, period = 86400, phase = 50400 }",
            'heat_flux = { file = "weather.csv", column = "solar" }',
        ]
    )
    return (
        BASE.replace("ROOM", '{ file = "weather.csv", column = "room" }')
        .replace("OUTDOOR", "{ mean = 2.0, amplitude = 6.0, period = 86400, phase = 50400 }")
        .replace("FACADE", facade)
        + f"""
[time]
duration = {2 * DAY}
step = {step}
initial_temperature = "steady"
save_every = {step}
scheme = "{scheme}"
"""
    )


def write_weather(folder) -> None:
    """Hourly room temperature and absorbed solar flux for two days (invented)."""
    rows = ["time_s,room,solar"]
    for hour in range(49):
        room = 20.0 + 2.0 * np.sin(hour / 3.0)
        clock = hour % 24
        solar = max(0.0, 350.0 * np.sin(np.pi * (clock - 6) / 12)) if 6 <= clock <= 18 else 0.0
        rows.append(f"{hour * 3600},{room:.3f},{solar:.1f}")
    (folder / "weather.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")


def test_steady_composite(tmp_path):
    """Steady 2-D composite: Σ boundary heat flows = 0 to 1e-9 relative."""
    sol = run(tmp_path, steady_case())
    flows = {name: s.heat_flow for name, s in sol.surfaces.items()}
    scale = sum(v for v in flows.values() if v > 0)
    rel = abs(sum(flows.values())) / scale
    report(
        "energy balance steady", flows_W_per_m=flows, relative=rel, reported=sol.balance.relative
    )
    assert rel <= 1e-9
    assert sol.balance.relative <= 1e-9


@pytest.mark.slow
@pytest.mark.parametrize("scheme", ["backward_euler", "crank_nicolson"])
def test_transient_composite(tmp_path, scheme):
    """Two days, 15 min steps, cosine outdoor air and sky, CSV room air and solar flux,
    radiating facade: energy in = stored heat change to 1e-9 relative. Recomputed here from
    the saved flows with the scheme's own weights: from the first step on for backward
    Euler, from the second for Crank–Nicolson (its first step is four backward-Euler quarter
    steps, whose flows are not saved; the run's own balance covers it)."""
    write_weather(tmp_path)
    step = 900.0
    sol = run(tmp_path, transient_case(scheme, step))
    theta = 1.0 if scheme == "backward_euler" else 0.5
    hist = sol.history
    times = np.array(hist.times)
    assert np.allclose(np.diff(times), step) and times[-1] == pytest.approx(2 * DAY)
    start = 0 if scheme == "backward_euler" else 1
    flows = np.array(hist.flows)[start:]  # (times, boundaries), W/m
    energy = step * (theta * flows[1:] + (1.0 - theta) * flows[:-1]).sum(axis=0)  # J/m
    case = sol.case
    rho_c = np.array(
        [
            case.materials[m].density * case.materials[m].specific_heat
            for m in sol.mesh.material_names
        ]
    )
    capacity = rho_c[sol.mesh.material] * sol.mesh.volumes  # J/(m·K)
    stored = float(capacity @ (hist.fields[-1] - hist.fields[start]))
    scale = max(energy[energy > 0].sum(), -energy[energy < 0].sum(), abs(stored))
    rel = abs(energy.sum() - stored) / scale
    report(
        f"energy balance transient {scheme}",
        heat_in_J_per_m=float(energy[energy > 0].sum()),
        stored_J_per_m=stored,
        relative_recomputed=rel,
        relative_reported=sol.balance.relative,
    )
    assert abs(stored) > 1e4  # the run really stores and releases heat
    assert rel <= 1e-9
    assert sol.balance.relative <= 1e-9
