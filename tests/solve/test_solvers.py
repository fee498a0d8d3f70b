"""Linear solvers and the ``[solver]`` table.

Reference for every agreement check: the sparse LU factorisation of the same discrete system
(exact to round-off), against which the AMG-preconditioned conjugate-gradient path must give
the same field. The energy-balance check is a property of the discretisation: interior face
fluxes cancel, so the boundary heat flows of a steady solution sum to the residual sum of
the linear solve, which the solver's constant-vector correction makes zero to round-off.

Geometries and material values are invented.
"""

from __future__ import annotations

import textwrap
from pathlib import Path

import numpy as np
import pytest
import scipy.sparse as sp

from fvheat.assembly.system import System
from fvheat.case.load import load_case
from fvheat.case.model import Case, SolverSettings
from fvheat.cli.main import main
from fvheat.errors import CaseError
from fvheat.mesh.rectilinear import build_mesh
from fvheat.mesh.select import build_mesh as build_mesh_any
from fvheat.simulate import Solution, simulate
from fvheat.solve.linear import AmgSolver, choose_method, v_cycle
from fvheat.solve.nonlinear import NewtonSolver

FIELD_AGREEMENT = 1e-8  # |ΔT| relative to the field's temperature range


def composite(outside: str = "resistance = 0.04", solver: str = "", time: str = "") -> str:
    """A wall of masonry (k = 1) with an insulation block (k = 0.04) and a steel insert
    (k = 50): 2-D, contrasts of 1250 in conductivity, graded cells (~3 000)."""
    return f"""
title = "composite wall for solver checks"
[mesh]
max_cell = 0.02
min_cell = 0.004

[materials.masonry]
conductivity = 1.0
density = 1800
specific_heat = 1000
[materials.insulation]
conductivity = 0.04
density = 30
specific_heat = 1400
[materials.steel]
conductivity = 50.0
density = 7800
specific_heat = 450

[[regions]]
material = "masonry"
box = [0.0, 0.0, 0.6, 0.8]
[[regions]]
material = "insulation"
box = [0.3, 0.0, 0.6, 0.5]
[[regions]]
material = "steel"
box = [0.25, 0.3, 0.55, 0.32]

[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.8]]]
air_temperature = 20.0
resistance = 0.13

[[boundaries]]
name = "outside"
edges = [[[0.6, 0.0], [0.6, 0.8]]]
air_temperature = -5.0
{outside}
{solver}
{time}
"""


RADIATING = """convection = 15.0
emissivity = 0.9
radiant_temperature = -25.0"""
RADIATION_ONLY = """emissivity = 0.9
radiant_temperature = -25.0"""
TRANSIENT = """[time]
duration = 36000
step = 900
initial_temperature = 10.0
save_every = 3600"""


def load(tmp_path: Path, text: str, overrides: tuple[str, ...] = ()) -> Case:
    path = tmp_path / "case.toml"
    path.write_text(textwrap.dedent(text), encoding="utf-8")
    return load_case(path, overrides)


def field_difference(a: Solution, b: Solution) -> float:
    """max |T_a − T_b| relative to the temperature range of ``b``."""
    span = float(np.ptp(b.temperature))
    return float(np.max(np.abs(a.temperature - b.temperature))) / span


def flow_difference(a: Solution, b: Solution) -> float:
    """Largest boundary heat-flow difference relative to the largest heat flow of ``b``."""
    fa = np.array([r.heat_flow for r in a.surfaces.values()])
    fb = np.array([r.heat_flow for r in b.surfaces.values()])
    return float(np.max(np.abs(fa - fb)) / np.max(np.abs(fb)))


# --- direct and AMG agree -------------------------------------------------------------------


def test_amg_gives_the_direct_field_on_a_composite(tmp_path):
    case = load(tmp_path, composite())
    direct = simulate(case, method="direct")
    amg = simulate(case, method="amg")
    assert direct.mesh.n_cells > 2000
    assert field_difference(amg, direct) <= FIELD_AGREEMENT
    assert flow_difference(amg, direct) <= FIELD_AGREEMENT
    assert amg.balance.relative <= 1e-12


def test_amg_with_second_pass_gives_the_direct_field_on_triangles(tmp_path):
    """Both meshes' matrices take the second pass of the Ruge–Stüben splitting and direct
    interpolation, the box method's (about 7 entries a row) a higher strength threshold
    too; on triangles, AMG-CG gives the field of the sparse LU factorisation (on the grid:
    the test above)."""
    from fvheat.solve.linear import coarsening

    tri = load(tmp_path, composite(), ("mesh.kind=triangles",))
    grid = load(tmp_path, composite())
    a_tri = System.build(tri, build_mesh_any(tri)).matrix
    a_grid = System.build(grid, build_mesh(grid)).matrix
    assert coarsening(a_tri)["CF"] == coarsening(a_grid)["CF"] == ("RS", {"second_pass": True})
    assert "strength" in coarsening(a_tri) and "strength" not in coarsening(a_grid)
    direct = simulate(tri, method="direct")
    amg = simulate(tri, method="amg")
    assert direct.mesh.kind == "triangles" and direct.mesh.n_cells > 2000
    assert field_difference(amg, direct) <= FIELD_AGREEMENT
    assert flow_difference(amg, direct) <= FIELD_AGREEMENT
    assert amg.balance.relative <= 1e-12


def test_case_solver_table_selects_the_method(tmp_path, monkeypatch):
    """simulate follows the case's ``[solver]`` table: AMG hierarchies are built exactly
    when the method (or the size limit of "auto") asks for them."""
    built: list[int] = []

    class Spy(AmgSolver):
        def __init__(self, a, **kwargs):
            built.append(a.shape[0])
            super().__init__(a, **kwargs)

    monkeypatch.setattr("fvheat.solve.linear.AmgSolver", Spy)
    monkeypatch.setattr("fvheat.solve.nonlinear.AmgSolver", Spy)
    cells = simulate(load(tmp_path, composite())).mesh.n_cells
    assert built == []  # "auto" and ~3 000 cells: direct
    simulate(load(tmp_path, composite(solver='[solver]\nmethod = "amg"')))
    assert built == [cells]
    simulate(load(tmp_path, composite(solver="[solver]\namg_above = 1000")))
    assert built == [cells, cells]
    simulate(load(tmp_path, composite(), ("solver.method=amg",)), method="direct")
    assert built == [cells, cells]  # the argument overrides the case


def test_balance_closes_to_round_off_at_a_loose_tolerance(tmp_path):
    """Even when CG stops at a relative residual of 1e-4, the boundary flows balance."""
    case = load(tmp_path, composite(solver='[solver]\nmethod = "amg"\ntolerance = 1e-4'))
    sol = simulate(case)
    assert sol.balance.relative <= 1e-12


def test_radiation_newton_with_amg_matches_direct(tmp_path):
    case = load(tmp_path, composite(outside=RADIATING))
    direct = simulate(case, method="direct")
    amg = simulate(case, method="amg")
    assert field_difference(amg, direct) <= FIELD_AGREEMENT
    assert flow_difference(amg, direct) <= FIELD_AGREEMENT
    assert amg.balance.relative <= 1e-9


def test_radiation_only_surface_with_amg(tmp_path):
    """No convective term: the matrix without radiation is singular (every exchanging
    face radiates or is adiabatic on that side), so the hierarchy comes from the Jacobian."""
    case = load(tmp_path, composite(outside=RADIATION_ONLY))
    direct = simulate(case, method="direct")
    amg = simulate(case, method="amg")
    assert field_difference(amg, direct) <= FIELD_AGREEMENT


def test_amg_newton_builds_one_hierarchy(tmp_path):
    """Full Newton on the radiating case with AMG: several iterations, one AMG setup."""
    case = load(tmp_path, composite(outside=RADIATING))
    system = System.build(case, build_mesh(case))
    newton = NewtonSolver(system.matrix, 1.0, method="amg")
    temp = newton.solve(lambda x: system.heat_in(x, 0.0), np.full(system.n, 10.0))
    assert newton.iterations >= 3
    assert newton.factorisations == 1
    residual, _ = system.heat_in(temp, 0.0)
    assert np.max(np.abs(residual)) <= 1e-8 * np.max(np.abs(system.sources(0.0)))


def test_transient_with_amg_matches_direct(tmp_path):
    case = load(tmp_path, composite(time=TRANSIENT))
    direct = simulate(case, method="direct")
    amg = simulate(case, method="amg")
    assert field_difference(amg, direct) <= FIELD_AGREEMENT
    assert amg.balance.relative <= 1e-9


def test_amg_solver_on_a_shifted_diagonal(tmp_path):
    """``with_diagonal`` solves A + diag(d) while keeping A's hierarchy."""
    case = load(tmp_path, composite())
    system = System.build(case, build_mesh(case))
    base = AmgSolver(system.matrix)
    d = np.zeros(system.n)
    d[system.surface.cell] = 5.0
    b = system.sources(0.0)
    x = base.with_diagonal(d).solve(b)
    shifted = system.matrix + sp.diags(d)
    assert np.linalg.norm(b - shifted @ x) <= 1e-9 * np.linalg.norm(b)


@pytest.mark.parametrize("cells", [6, 3000])
def test_v_cycle_is_pyamgs_preconditioner(tmp_path, cells):
    """The lean V-cycle applies exactly pyamg's own V-cycle preconditioner (reference:
    ``MultilevelSolver.aspreconditioner``), also for a one-level hierarchy."""
    import pyamg

    case = load(tmp_path, composite())
    system = System.build(case, build_mesh(case))
    a = system.matrix[:cells, :cells].tocsr()
    ml = pyamg.ruge_stuben_solver(a)
    assert (len(ml.levels) == 1) == (cells < 10)
    r = np.random.default_rng(1).random(cells)
    expected = ml.aspreconditioner(cycle="V").matvec(r)
    np.testing.assert_allclose(v_cycle(ml).matvec(r), expected, rtol=1e-13, atol=0.0)


# --- automatic choice -----------------------------------------------------------------------


def test_auto_choice_by_size():
    s = SolverSettings(amg_above=1000, transient_amg_above=5000)
    assert choose_method(1000, s) == "direct"
    assert choose_method(1001, s) == "amg"
    assert choose_method(4000, s, repeated=True) == "direct"
    assert choose_method(5001, s, repeated=True) == "amg"
    assert choose_method(10, SolverSettings(method="amg")) == "amg"
    assert choose_method(10**9, "direct") == "direct"


# --- the [solver] table ---------------------------------------------------------------------


def test_solver_table_defaults_and_values(tmp_path):
    assert load(tmp_path, composite()).solver == SolverSettings()
    s = load(
        tmp_path,
        composite(
            solver="[solver]\nmethod = 'direct'\ntolerance = 1e-12\nmax_iterations = 50\n"
            "amg_above = 10\ntransient_amg_above = 20"
        ),
    ).solver
    assert s == SolverSettings("direct", 1e-12, 50, 10, 20)
    assert load(tmp_path, composite(), ("solver.method=amg",)).solver.method == "amg"


@pytest.mark.parametrize(
    ("table", "message"),
    [
        ("method = 'fast'", "solver.method: must be one of 'auto', 'direct', 'amg', got 'fast'"),
        ("tolerance = 0", "solver.tolerance: must be greater than 0, got 0"),
        ("tolerance = 0.1", "solver.tolerance: must be at most 0.0001, got 0.1"),
        ("max_iterations = 2.5", "solver.max_iterations: expected a whole number, got number 2.5"),
        ("max_iterations = 0", "solver.max_iterations: must be at least 1, got 0"),
        ("amg_above = true", "solver.amg_above: expected a whole number, got boolean true"),
        ("transient_amg_above = -1", "solver.transient_amg_above: must be at least 0, got -1"),
        ("preconditioner = 'ilu'", "solver.preconditioner: unknown key"),
    ],
)
def test_solver_table_errors_are_one_line(tmp_path, table, message):
    with pytest.raises(CaseError) as err:
        load(tmp_path, composite(solver=f"[solver]\n{table}"))
    text = str(err.value)
    assert "\n" not in text
    assert text.startswith(str(tmp_path / "case.toml") + ": ")
    assert message in text


def test_solver_not_a_table(tmp_path):
    path = tmp_path / "case.toml"
    path.write_text('solver = "amg"\n' + textwrap.dedent(composite()), encoding="utf-8")
    with pytest.raises(CaseError, match=r"case.toml: solver: expected a table, got string"):
        load_case(path)


def test_cli_rejects_a_bad_solver_key_with_exit_2(tmp_path, capsys):
    path = tmp_path / "case.toml"
    path.write_text(textwrap.dedent(composite(solver="[solver]\nmethod = 'fast'")), "utf-8")
    code = main(["run", str(path), "--quiet", "--out", str(tmp_path / "out")])
    err = capsys.readouterr().err
    assert code == 2
    assert err.count("\n") == 1 and "Traceback" not in err
    assert err.startswith("fvheat: error: ") and "solver.method" in err
