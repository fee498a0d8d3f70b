"""The pipeline from a validated case to its solution: mesh → assemble → solve → evaluate."""

from __future__ import annotations

import logging
from collections.abc import Callable
from dataclasses import dataclass, field, replace

import numpy as np

from fvheat.assembly.enthalpy import EnthalpyModel
from fvheat.assembly.system import System
from fvheat.case.model import Case
from fvheat.case.resistances import with_surface_resistances
from fvheat.evaluate.balance import ISOTHERMAL_K, EnergyBalance
from fvheat.evaluate.condensation import CondensationHours
from fvheat.evaluate.extremes import RunExtremes
from fvheat.evaluate.fronts import FrontLines
from fvheat.evaluate.periodic import PeriodicResponse
from fvheat.evaluate.probes import PointTemperatures, point_temperatures
from fvheat.evaluate.surfaces import SurfaceResult, surface_results
from fvheat.mesh.mesh import Mesh
from fvheat.mesh.select import build_mesh
from fvheat.solve.linear import LinearSolver, Method, SolverChoice
from fvheat.solve.phase_change import evolve_enthalpy, solve_steady_phase
from fvheat.solve.steady import solve_steady, solve_steady_kept
from fvheat.solve.transient import evolve

log = logging.getLogger(__name__)

#: called after every time step with (t, duration) in s
Progress = Callable[[float, float], None]


@dataclass
class History:
    """Saved states of a transient run: times (s), probe temperatures (°C, times × probes),
    boundary heat flows (W/m, times × boundaries), phase-change measures (frozen area m²,
    front positions m; see :class:`~fvheat.evaluate.fronts.FrontLines`) and, if kept, the
    cell fields (°C)."""

    times: list[float] = field(default_factory=list)
    probes: list[np.ndarray] = field(default_factory=list)
    flows: list[np.ndarray] = field(default_factory=list)
    phase: list[dict[str, float | None]] = field(default_factory=list)
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
    periodic: PeriodicResponse | None = None
    condensation: CondensationHours | None = None
    extremes: RunExtremes | None = None
    #: steady linear runs: the solver (factorisation) of the system matrix, for adjoint solves
    factor: LinearSolver | None = None
    #: the phase model when conductivities depend on temperature (frozen ground, phase
    #: change): ``system`` is at the phases of ``temperature``, other states need their own
    phase: EnthalpyModel | None = None

    def system_at(self, temperature: np.ndarray) -> System:
        """The system with the conductivities of the phases at ``temperature`` (°C, a saved
        state of this run): ``system`` itself for the final field or without phase-dependent
        conductivity. Heat-flux fields of saved states are computed with it."""
        if self.phase is None or np.array_equal(temperature, self.temperature):
            return self.system  # (the end state comes back as the history's copy)
        return _at_phase(self.system, self.phase, temperature)


def simulate(
    case: Case,
    *,
    mesh: Mesh | None = None,
    method: Method = "auto",
    progress: Progress | None = None,
    keep_fields: bool = True,
) -> Solution:
    """Solve ``case`` (steady, or transient when it has ``[time]``).

    ``method`` other than ``"auto"`` overrides the method of the case's ``[solver]`` table.
    ``[condensation]`` hours are counted with the checked surfaces at their condensation
    surface resistances: in a second run when those differ from the heat-loss ones.
    """
    solver = case.solver if method == "auto" else replace(case.solver, method=method)
    mesh = mesh if mesh is not None else build_mesh(case)
    system = System.build(case, mesh)
    model = EnthalpyModel.build(case, mesh)
    probe_op = point_temperatures(
        mesh,
        system.surface,
        np.array([p.at for p in case.probes]).reshape(-1, 2),
        system.k_material,
    )
    names = [b.name for b in case.boundaries]

    if case.time is None:
        factor = None
        if model.variable_conductivity:
            temp = _steady(system, model, solver)
        else:
            temp, factor = solve_steady_kept(system, 0.0, method=solver)
        system = _at_phase(system, model, temp)
        flows = system.boundary_flows(temp, 0.0)
        noise = ISOTHERMAL_K * system.surface_conductance
        balance = EnergyBalance(dict(zip(names, map(float, flows), strict=True)), 0.0, noise)
        out = _solution(case, mesh, system, model, temp, 0.0, probe_op, balance, None)
        out.factor = factor
        return out

    c = case.condensation
    hours_case = None if c is None else with_surface_resistances(case, c.surface_resistances)
    count = c is not None and hours_case is None
    solution = _transient(case, mesh, system, model, probe_op, solver, progress, keep_fields, count)
    if hours_case is not None:
        solution.condensation = simulate(hours_case, mesh=mesh, keep_fields=False).condensation
    return solution


def _transient(
    case: Case,
    mesh: Mesh,
    system: System,
    model: EnthalpyModel,
    probe_op: PointTemperatures,
    method: SolverChoice,
    progress: Progress | None,
    keep_fields: bool,
    count_hours: bool,
) -> Solution:
    """Time stepping; with ``[time] periodic`` cycles are repeated until they repeat."""
    ts = case.time
    assert ts is not None
    names = [b.name for b in case.boundaries]
    n_steps = round(ts.duration / ts.step)
    save = max(1, round(ts.save_every / ts.step))
    if ts.initial_temperature == "steady":
        temp0 = _steady(system, model, method)
    else:
        temp0 = np.full(mesh.n_cells, float(ts.initial_temperature))
    lines = FrontLines.build(case, mesh, model)
    cycles = 0
    while True:
        cycles += 1
        history = History()
        periodic = PeriodicResponse.start(case, system) if ts.periodic else None
        hours = CondensationHours.start(case, system) if count_hours else None
        extremes = RunExtremes.start(case, system, model, lines)
        extremes.add(temp0, 0.0)

        def record(t: float, temp: np.ndarray, history: History = history) -> None:
            at_t = _at_phase(system, model, temp)
            history.times.append(t)
            history.probes.append(probe_op(at_t, temp, t))
            history.flows.append(at_t.boundary_flows(temp, t))
            history.phase.append(lines.measure(temp))
            if keep_fields:
                history.fields.append(temp.copy())

        record(0.0, temp0)
        # a given start temperature may be out of balance; a steady start or a repeated
        # cycle's end state is not
        damped = cycles == 1 and ts.initial_temperature != "steady"
        if model.active or ts.adaptive_tolerance is not None:
            steps = evolve_enthalpy(
                system,
                model,
                temp0,
                ts.step,
                n_steps,
                theta=ts.theta,
                method=method,
                tolerance=ts.adaptive_tolerance,
                damped_start=damped,
            )
        else:
            steps = evolve(
                system, temp0, ts.step, n_steps, theta=ts.theta, method=method, damped_start=damped
            )
        energy = np.zeros(len(names))
        temp, t = temp0, 0.0
        for k, (t, temp, heat) in enumerate(steps, start=1):
            energy += heat
            extremes.add(temp, t)
            if periodic is not None or hours is not None:
                at_t = _at_phase(system, model, temp)
                if periodic is not None:
                    periodic.add(t, at_t.boundary_flows(temp, t))
                if hours is not None:
                    hours.add(at_t, temp, t, ts.step)
            if k % save == 0 or k == n_steps:
                record(t, temp)
            if progress is not None:
                progress(t, ts.duration)
        change = float(np.max(np.abs(temp - temp0)))
        if periodic is None or change < ts.periodic_tolerance or cycles >= ts.max_cycles:
            break
        log.debug("periodic cycle %d: largest change %.3g K", cycles, change)
        temp0 = temp
    stored = float(np.sum(model.enthalpy(temp) - model.enthalpy(temp0)))
    noise = ISOTHERMAL_K * system.surface_conductance * max(t, ts.step)
    balance = EnergyBalance(dict(zip(names, map(float, energy), strict=True)), stored, noise)
    system = _at_phase(system, model, temp)
    solution = _solution(case, mesh, system, model, temp, t, probe_op, balance, history)
    if periodic is not None:
        periodic.cycles, periodic.change = cycles, change
        solution.periodic = periodic
    if hours is not None:
        solution.condensation = hours
    solution.extremes = extremes
    return solution


def _steady(system: System, model: EnthalpyModel, method: SolverChoice) -> np.ndarray:
    """Steady field, iterating on phase-dependent conductivity when there is one."""
    temp = solve_steady(system, 0.0, method=method)
    if model.variable_conductivity:
        temp = solve_steady_phase(system, model, 0.0, temp, method=method)
    return temp


def _at_phase(system: System, model: EnthalpyModel, temp: np.ndarray) -> System:
    """``system`` with the conductivities of the phases at ``temp`` (unchanged otherwise)."""
    return (
        system.with_conductivity(model.conductivity(temp))
        if model.variable_conductivity
        else system
    )


def _solution(case, mesh, system, model, temp, t, probe_op, balance, history) -> Solution:
    values = probe_op(system, temp, t)
    probes = {p.name: float(v) for p, v in zip(case.probes, values, strict=True)}
    out = Solution(
        case, mesh, system, temp, t, surface_results(system, temp, t), probes, balance, history
    )
    out.phase = model if model.variable_conductivity else None
    return out
