"""[mesh] max_cells: the grid's size is known from the planned 1-D lines before any 2-D
array exists, a grid beyond the limit is one line (exit 2) with the estimate and how to
raise it, and the grid check's refined grid is refused before the first solve."""

from __future__ import annotations

import numpy as np
import pytest
from casefiles import load, write_case

import fvheat.mesh.rectilinear as rectilinear
import fvheat.study as study_module
from fvheat.case.load import load_case
from fvheat.cli.main import main
from fvheat.errors import CaseError
from fvheat.mesh.grading import graded_lines, plan_lines
from fvheat.mesh.rectilinear import build_mesh, check_refined_size
from fvheat.study import GRID_CHECK_REFINE, run_study

WALL = """
[mesh]
max_cell = 0.05
{extra}
[materials.w]
conductivity = 1.0
[[regions]]
material = "w"
box = [0, 0, 0.3, 1.0]
[[regions]]
material = "w"
box = [0.3, 0, 0.5, 0.2]
[[boundaries]]
name = "in"
edges = [[[0, 0], [0, 1.0]]]
air_temperature = 20
resistance = 0.13
[[boundaries]]
name = "out"
edges = [[[0.3, 0.2], [0.3, 1.0]], [[0.3, 0.2], [0.5, 0.2]]]
air_temperature = -5
resistance = 0.04
"""


def wall(tmp_path, extra: str = "", overrides=()):
    return load(tmp_path, WALL.format(extra=extra), overrides)


@pytest.mark.parametrize("seed", range(20))
def test_planned_count_is_the_placed_count(seed):
    """The plan's cell count equals the number of cells the placed lines make."""
    rng = np.random.default_rng(seed)
    keys = np.unique(rng.uniform(-2.0, 3.0, rng.integers(2, 12)))
    max_cell = float(rng.uniform(0.01, 0.3))
    min_cell = float(rng.uniform(0.1, 1.0)) * max_cell
    first = np.where(rng.random(keys.size) < 0.3, 0.2 * min_cell, min_cell)
    plan = plan_lines(keys, max_cell, min_cell, 1.2, first)
    lines = graded_lines(keys, max_cell, min_cell, 1.2, first)
    assert plan.cells == lines.size - 1
    np.testing.assert_array_equal(plan.coordinates(), lines)


def test_grid_beyond_the_limit_refused_before_painting(tmp_path, monkeypatch):
    """Beyond max_cells: CaseError at mesh.max_cells with the count, the columns × rows,
    the memory and the --set that raises it; nothing 2-D is painted first."""
    case = wall(tmp_path, "max_cells = 500")

    def no_painting(*args, **kwargs):
        raise AssertionError("painted a grid beyond the limit")

    monkeypatch.setattr(rectilinear, "paint_regions", no_painting)
    with pytest.raises(CaseError) as err:
        build_mesh(case)
    text = str(err.value)
    assert "\n" not in text
    assert text.startswith(f"{case.source}: mesh.max_cells: the grid would have ")
    assert "more than max_cells = 500" in text
    assert "columns ×" in text and "rows" in text and "MB of memory" in text
    assert "--set mesh.max_cells=" in text


def test_estimate_is_the_grid_built(tmp_path):
    """Refused before the corner refinement, the message gives the count and the most the
    refinement can add (the limit it suggests); raised to that, the case meshes. Raised to
    just below the final grid, the refined grid is refused with its exact size."""
    with pytest.raises(CaseError) as err:
        build_mesh(wall(tmp_path, "max_cells = 500"))
    text = str(err.value)
    first = _estimate(err)
    at_most = int(text.split("up to ")[1].split(" with")[0].replace(",", ""))
    suggested = int(text.split("--set mesh.max_cells=")[1].split(")")[0])
    assert at_most > first and suggested >= at_most
    g = build_mesh(wall(tmp_path, f"max_cells = {suggested}")).grid
    final = (g.x.size - 1) * (g.y.size - 1)
    assert first < final <= at_most
    with pytest.raises(CaseError) as err:
        build_mesh(wall(tmp_path, f"max_cells = {final - 1}"))
    assert _estimate(err) == final


def _estimate(err: pytest.ExceptionInfo) -> int:
    return int(str(err.value).split("would have ")[1].split(" cells")[0].replace(",", ""))


def test_refined_grid_estimate_matches_and_is_refused_before_solving(tmp_path, monkeypatch):
    """The grid check's refined grid: estimated exactly from the base mesh (demo case),
    and a run whose refined grid exceeds max_cells stops before any solve."""
    case = load_case("cases/balcony_slab.toml")
    mesh = build_mesh(case)
    fine = build_mesh(case, refine=GRID_CHECK_REFINE).grid
    cells = (fine.x.size - 1) * (fine.y.size - 1)
    check_refined_size(case, mesh, GRID_CHECK_REFINE)  # within the default limit
    tight = load_case("cases/balcony_slab.toml", [f"mesh.max_cells={cells - 1}"])
    with pytest.raises(CaseError, match=f"refined grid .* would have {cells:,} cells"):
        check_refined_size(tight, mesh, GRID_CHECK_REFINE)

    def no_solve(*args, **kwargs):
        raise AssertionError("solved before refusing the refined grid")

    monkeypatch.setattr(study_module, "simulate", no_solve)
    with pytest.raises(CaseError, match="--no-grid-check"):
        run_study(tight, mesh=build_mesh(tight), check_grid=True)


def test_cli_refusal_is_one_line_exit_2(tmp_path, capsys):
    case = write_case(tmp_path, WALL.format(extra="max_cells = 500"))
    out = tmp_path / "out"
    assert main(["run", str(case), "-o", str(out), "-q", "--no-plots"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "mesh.max_cells" in err[0]
    assert not out.exists()
    assert main(["check", str(case), "--set", "mesh.max_cells=100000"]) == 0


@pytest.mark.parametrize(
    ("extra", "key", "words"),
    [
        ("max_cells = 4e6", None, ()),
        ('max_cells = "many"', "mesh.max_cells", ("whole number",)),
        ("max_cells = 0", "mesh.max_cells", ("at least 1",)),
        ("max_cells = 1.5", "mesh.max_cells", ("whole number",)),
        ("max_cells = 1e308", "mesh.max_cells", ("at most 1,000,000,000",)),
        ("max_cells = 4611686018427387904", "mesh.max_cells", ("at most 1,000,000,000",)),
        ("min_cell = 1e-300", "mesh.min_cell", ("at least 1e-06",)),
        ("corner_cell = 1e-300", "mesh.corner_cell", ("at least 1e-06",)),
        ("min_cell = nan", "mesh.min_cell", ("finite",)),
        ("corner_cell = inf", "mesh.corner_cell", ("finite",)),
    ],
)
def test_mesh_keys(tmp_path, extra, key, words):
    if key is None:
        assert wall(tmp_path, extra).mesh.max_cells == 4_000_000
        return
    with pytest.raises(CaseError) as err:
        wall(tmp_path, extra)
    assert f": {key}: " in str(err.value)
    for w in words:
        assert w in str(err.value)


@pytest.mark.parametrize("value", ["1e308", "1e-300", "nan", "inf", "-0.01"])
def test_absurd_max_cell(tmp_path, value):
    with pytest.raises(CaseError, match=r": mesh\.max_cell: "):
        wall(tmp_path, overrides=[f"mesh.max_cell={value}"])
