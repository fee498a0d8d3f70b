"""Sensitivities of a steady run's results to every material conductivity and every surface
coefficient: boundary heat flows, and with a junction L2D, ψ, U_f (heat-loss solve) and
θ_si,min, f_Rsi (surface-temperature solve).

Heat flows and L2D come from one adjoint solve per boundary on the heat-loss solve's
factorisation (L2D is their sum over the warm side divided by θ_i − θ_e); ψ adds the
explicit derivative of the flanking terms Σ U·l (layer cuts: U = 1/(R_si + Σ d/λ + R_se),
differentiated analytically; the ISO 13370 ground-floor U by a central difference of its
closed-form expression, no solve); U_f = ψ/b_f. θ_si,min is the surface temperature at the
minimising point — the derivative is that of the value at this fixed point (the location of
the minimum does not move in the derivative), from one adjoint solve on the
surface-temperature solve; f_Rsi = (θ_si,min − θ_e)/(θ_i − θ_e).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from fvheat.case.model import Case, SolverSettings
from fvheat.case.sensitivities import sensitivity_problem
from fvheat.errors import CaseError
from fvheat.evaluate.ground import ground_floor
from fvheat.evaluate.junction import FlankingResult, JunctionResult
from fvheat.evaluate.surfaces import SurfacePointMap
from fvheat.sensitivity.adjoint import derivatives, face_partials
from fvheat.sensitivity.parameters import Parameter, case_parameters
from fvheat.sensitivity.result import Sensitivities
from fvheat.simulate import Solution
from fvheat.study import Study


def check_sensitivities_possible(case: Case) -> None:
    """:class:`CaseError` when adjoint sensitivities do not apply to ``case``."""
    problem = sensitivity_problem(case)
    if problem is not None:
        raise CaseError(problem, file=str(case.source), key="--sensitivities")


#: with sensitivities, "auto" solves steady problems directly up to this many cells (instead
#: of SolverSettings.amg_above): a kept LU factorisation makes every adjoint solve a cheap
#: back-substitution, while each AMG-CG adjoint costs a full CG solve. Measured crossover on
#: 2 cores (scripts/bench.py --sensitivities and by hand): about 150 000 cells.
DIRECT_LIMIT = 150_000


def case_for_sensitivities(case: Case) -> Case:
    """``case`` with the direct solver preferred up to :data:`DIRECT_LIMIT` cells when its
    ``[solver]`` is left at "auto" with the default AMG threshold (same results to the
    solver tolerance)."""
    s = case.solver
    if s.method != "auto" or s.amg_above != SolverSettings().amg_above:
        return case
    return replace(case, solver=replace(s, amg_above=max(s.amg_above, DIRECT_LIMIT)))


#: finite-difference columns to append: parameters, derivatives (quantities × parameters)
#: and the quantity names of its rows
Extra = tuple[list[Parameter], np.ndarray, list[str]]


def study_sensitivities(study: Study, extra: Extra | None = None) -> Sensitivities:
    """Adjoint sensitivities of a steady ``study``'s heat flows and junction results, with
    the ``extra`` (finite-difference) columns appended."""
    solution = study.solution
    case = solution.case
    check_sensitivities_possible(case)
    params = case_parameters(case)
    names = [b.name for b in case.boundaries]
    # the boundary flows of a steady state sum to zero for every p (Σ_cells R = Σ_b Φ_b = 0):
    # the last one's derivative is minus the sum of the others', one adjoint solve fewer
    values, d = _solve(solution, params, _flow_weights(solution, len(names) - 1), set())
    values = np.append(values, -values.sum()) if names else values
    d = np.vstack([d, -d.sum(axis=0)]) if names else d
    flows = [solution.surfaces[n].heat_flow for n in names]
    out: dict[str, tuple[float, np.ndarray]] = {
        f"heat_flow_{n}": (float(flows[k]), d[k]) for k, n in enumerate(names)
    }
    j = study.junction
    if j is not None and case.junction is not None:
        out.update(_junction(study, j, params, values, d))
    if extra is not None:
        more, d_more, rows = extra
        for q, (v, dq) in out.items():
            out[q] = (v, np.concatenate([dq, d_more[rows.index(q)]]))
        params = params + more
    return Sensitivities.build(params, out)


def _junction(
    study: Study,
    j: JunctionResult,
    params: list[Parameter],
    flows: np.ndarray,
    d_flows: np.ndarray,
) -> dict[str, tuple[float, np.ndarray]]:
    case = study.solution.case
    junction = case.junction
    assert junction is not None
    names = [b.name for b in case.boundaries]
    dtheta = j.theta_i - j.theta_e
    inside = [names.index(n) for n in junction.inside]
    d_l2d = d_flows[inside].sum(axis=0) / dtheta
    d_flank = _flanking_derivative(case, study, j.flanking, params)
    d_psi = d_l2d - d_flank
    out = {"L2D": (j.l2d, d_l2d), "psi": (j.psi, d_psi)}
    if j.u_f is not None and junction.frame_width is not None:
        out["U_f"] = (j.u_f, d_psi / junction.frame_width)
    surface = study.surface_solution or study.solution
    # the condensation resistances replace these boundaries' own (even when the values
    # happen to be equal and no separate solve is needed): their keys do not reach f_Rsi
    r = junction.surface_resistances.values
    replaced = set(r) if r is not None else set()
    weights = _coldest_point_weights(surface, junction.f_rsi_boundaries or junction.inside)
    condensation = {
        n: i
        for i, p in enumerate(params)
        if p.kind == "condensation"
        for n in (sorted(replaced) if p.name == "" else [p.name])
    }
    theta, d_theta = _solve(surface, params, weights, replaced, condensation)
    out["theta_si_min"] = (float(theta[0]), d_theta[0])
    out["f_Rsi"] = (j.f_rsi, d_theta[0] / dtheta)
    return out


def _solve(
    solution: Solution,
    params: list[Parameter],
    weights: tuple[np.ndarray, np.ndarray],
    skip: set[str],
    condensation: dict[str, int] | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """Values and derivatives with respect to ``params`` (in their own units) of the
    quantities of face ``weights`` (heat flow, face temperature) on ``solution``;
    boundaries in ``skip`` do not depend on their own parameter in this solve but on the
    condensation-resistance parameter ``condensation[name]`` (index), when given."""
    condensation = condensation or {}
    system = solution.system
    mesh = solution.mesh
    index = {(p.on_boundary, p.name): i for i, p in enumerate(params) if p.kind != "parameter"}
    material_param = np.array([index.get((False, m), -1) for m in mesh.material_names], dtype=int)
    boundary_param = np.array(
        [
            condensation.get(b.name, -1) if b.name in skip else index.get((True, b.name), -1)
            for b in system.surface.boundaries
        ],
        dtype=int,
    )
    values, d = derivatives(
        system,
        solution.temperature,
        weights[0],
        weights[1],
        material_param,
        boundary_param,
        len(params),
        factor=solution.factor,
        method=solution.case.solver,
    )
    # derivatives with respect to h → with respect to the parameter
    h = {b.name: b.convection for b in system.surface.boundaries if b.kind == "surface"}
    for i, p in enumerate(params):
        if p.on_boundary:
            d[:, i] *= p.from_h(h[p.name])
        elif p.kind == "condensation":
            d[:, i] *= p.from_h(1.0 / p.value)
    return values, d


def _flow_weights(solution: Solution, count: int) -> tuple[np.ndarray, np.ndarray]:
    """Face weights giving the heat flows of the first ``count`` boundaries (faces × count)."""
    s = solution.system.surface
    wf = np.zeros((s.bid.size, max(count, 0)))
    keep = s.bid < count
    wf[np.flatnonzero(keep), s.bid[keep]] = 1.0
    return wf, np.zeros_like(wf)


def _coldest_point_weights(
    solution: Solution, candidates: tuple[str, ...]
) -> tuple[np.ndarray, np.ndarray]:
    """Face-temperature weights of the lowest surface point on ``candidates`` (the point
    :func:`fvheat.evaluate.junction.evaluate_junction` takes θ_si,min from)."""
    system = solution.system
    s = system.surface
    names = [b.name for b in s.boundaries]
    coldest = min(candidates, key=lambda n: solution.surfaces[n].min_temperature)
    ts = face_partials(system, solution.temperature).ts
    pmap = SurfacePointMap.build(system.mesh, s)
    temps = pmap.temperatures(ts)
    on = np.flatnonzero(pmap.bid == names.index(coldest))
    k = int(on[np.argmin(temps[on])])
    nf = s.bid.size
    wt = np.zeros((nf, 1))
    face, part = k % nf, k // nf
    wt[face, 0] = 1.0
    if part > 0 and pmap.use[part - 1][face]:
        other, w = int(pmap.neighbour[part - 1][face]), float(pmap.weight[part - 1][face])
        wt[face, 0] += w
        wt[other, 0] -= w
    return np.zeros_like(wt), wt


def _flanking_derivative(
    case: Case, study: Study, flanks: list[FlankingResult], params: list[Parameter]
) -> np.ndarray:
    """d(Σ U·l)/dp over the flanking elements (W/(m·K) per unit of each parameter)."""
    out = np.zeros(len(params))
    conv = {b.name: b.convection for b in case.boundaries if b.kind == "surface"}
    for f in flanks:
        cut = f.cut
        if cut is None:
            continue
        u2l = cut.u_value**2 * f.length
        for i, p in enumerate(params):
            if p.kind == "conductivity":
                out[i] += u2l * sum(dd / (k * k) for m, dd, k in cut.layers if m == p.name)
            elif p.on_boundary and cut.ends is not None:
                for r, end in zip((cut.r_start, cut.r_end), cut.ends, strict=True):
                    if end == p.name and r > 0.0:
                        h = conv[p.name]
                        out[i] += u2l / (h * h) * p.from_h(h)  # dU/dh = U²/h²
    if case.ground is not None:
        out += _ground_derivative(case, study, params)
    return out


def _ground_derivative(case: Case, study: Study, params: list[Parameter]) -> np.ndarray:
    """d(U·l)/dp of the ISO 13370 ground-floor term by central differences of its
    closed-form expression (relative step 1e-6, absolute at 0; no solve)."""
    mesh = study.solution.mesh
    if mesh.grid is None:  # the floor layers are read on the case's grid: build it once
        from fvheat.mesh.rectilinear import build_mesh

        mesh = build_mesh(case)
    out = np.zeros(len(params))
    for i, p in enumerate(params):
        if p.kind not in ("conductivity", "resistance", "convection"):
            continue  # the floor's U does not depend on it
        step = 1e-6 * abs(p.value) or 1e-6  # a convection coefficient may be 0
        vals = []
        for v in (p.value + step, p.value - step):
            g = ground_floor(with_parameter(case, p, v), mesh)
            vals.append(g.u_value * g.length)
        out[i] = (vals[0] - vals[1]) / (2 * step)
    return out


def with_parameter(case: Case, p: Parameter, value: float) -> Case:
    """``case`` with parameter ``p`` (a conductivity or a boundary's coefficient) set to
    ``value`` (no re-validation)."""
    if p.kind not in ("conductivity", "resistance", "convection"):
        raise ValueError(f"cannot set {p.key} here")
    if p.kind == "conductivity":
        mats = dict(case.materials)
        mats[p.name] = replace(mats[p.name], conductivity=value)
        return replace(case, materials=mats)
    bounds = []
    for b in case.boundaries:
        if b.name == p.name:
            h = 1.0 / value if p.kind == "resistance" else value
            b = replace(b, convection=h, resistance=value if p.kind == "resistance" else None)
        bounds.append(b)
    return replace(case, boundaries=tuple(bounds))
