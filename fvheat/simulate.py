"""The pipeline from a validated case to its solution: mesh → assemble → solve → evaluate."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from fvheat.assembly.system import System
from fvheat.case.model import Case
from fvheat.evaluate.balance import EnergyBalance, stored_heat_change
from fvheat.evaluate.probes import probe_operator
from fvheat.evaluate.surfaces import SurfaceResult, boundary_heat_flows, surface_results
from fvheat.mesh.mesh import Mesh
from fvheat.mesh.rectilinear import build_mesh
from fvheat.solve.linear import Method
from fvheat.solve.steady import solve_steady
from fvheat.solve.transient import evolve

#: called after every time step with (t, duration) in s
Progress = Callable[[float, float], None]


@dataclass
class History:
    """Saved states of a transient run: times (s), probe temperatures (°C, times × probes),
    boundary heat flows (W/m, times × boundaries) and, if kept, the cell fields (°C)."""

    times: list[float] = field(default_factory=list)
    probes: list[np.ndarray] = field(default_factory=list)
    flows: list[np.ndarray] = field(default_factory=list)
    fields: list[np.ndarray] = field(default_factory=list)


@dataclass
class Solution:
    """Everything a run produced. ``temperature`` is the cell field (°C) at ``time`` (s):
    the end time of a transient run, 0 for a steady one."""

    case: Case
    mesh: Mesh
    system: System
    temperature: np.ndarray
    time: float
    surfaces: dict[str, SurfaceResult]
    probes: dict[str, float]
    balance: EnergyBalance
    history: History | None = None


def simulate(
    case: Case,
    *,
    mesh: Mesh | None = None,
    method: Method = "auto",
    progress: Progress | None = None,
    keep_fields: bool = True,
) -> Solution:
    """Solve ``case`` (steady, or transient when it has ``[time]``)."""
    mesh = mesh if mesh is not None else build_mesh(case)
    system = System.build(case, mesh)
    probe_op = probe_operator(mesh, np.array([p.at for p in case.probes]).reshape(-1, 2))
    names = [b.name for b in case.boundaries]

    if case.time is None:
        temp = solve_steady(system, 0.0, method=method)
        flows = boundary_heat_flows(system, temp, 0.0)
        balance = EnergyBalance(dict(zip(names, map(float, flows), strict=True)), 0.0)
        return _solution(case, mesh, system, temp, 0.0, probe_op, balance, None)

    ts = case.time
    n_steps = round(ts.duration / ts.step)
    save = max(1, round(ts.save_every / ts.step))
    if ts.initial_temperature == "steady":
        temp0 = solve_steady(system, 0.0, method=method)
    else:
        temp0 = np.full(mesh.n_cells, float(ts.initial_temperature))
    history = History()

    def record(t: float, temp: np.ndarray, flows: np.ndarray) -> None:
        history.times.append(t)
        history.probes.append(probe_op @ temp)
        history.flows.append(flows)
        if keep_fields:
            history.fields.append(temp.copy())

    flows_old = boundary_heat_flows(system, temp0, 0.0)
    record(0.0, temp0, flows_old)
    energy = np.zeros(len(names))
    temp, t = temp0, 0.0
    for k, (t, temp) in enumerate(
        evolve(system, temp0, ts.step, n_steps, theta=ts.theta, method=method), start=1
    ):
        flows = boundary_heat_flows(system, temp, t)
        energy += ts.step * (ts.theta * flows + (1.0 - ts.theta) * flows_old)
        flows_old = flows
        if k % save == 0 or k == n_steps:
            record(t, temp, flows)
        if progress is not None:
            progress(t, ts.duration)
    stored = stored_heat_change(system.capacity, temp0, temp)
    balance = EnergyBalance(dict(zip(names, map(float, energy), strict=True)), stored)
    return _solution(case, mesh, system, temp, t, probe_op, balance, history)


def _solution(case, mesh, system, temp, t, probe_op, balance, history) -> Solution:
    values = probe_op @ temp
    probes = {p.name: float(v) for p, v in zip(case.probes, values, strict=True)}
    return Solution(
        case, mesh, system, temp, t, surface_results(system, temp, t), probes, balance, history
    )
