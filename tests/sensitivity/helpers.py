"""Shared pieces of the sensitivity tests: the demo cases, a radiating variant, runs."""

from __future__ import annotations

from pathlib import Path

from fvheat.case.load import load_case
from fvheat.sensitivity.named import named_results
from fvheat.sensitivity.quantities import study_sensitivities
from fvheat.sensitivity.result import Sensitivities
from fvheat.study import run_study

CASES = Path(__file__).resolve().parents[2] / "cases"


def radiating_balcony(folder: Path) -> Path:
    """The balcony demo with its ceiling exchanging by convection (5 W/(m²·K)) and grey-body
    radiation (ε = 0.9, radiant temperature 18 °C) instead of a combined resistance."""
    text = (CASES / "balcony_slab.toml").read_text()
    old = (
        'name = "inside_ceiling"\nedges = [[[-1.5, 0.0], [0.0, 0.0]]]\n'
        "air_temperature = 20.0\nresistance = 0.10"
    )
    assert old in text
    new = old.replace(
        "resistance = 0.10", "convection = 5.0\nemissivity = 0.9\nradiant_temperature = 18.0"
    )
    path = folder / "balcony_radiating.toml"
    path.write_text(text.replace(old, new))
    return path


def adjoint(path: Path, overrides: tuple[str, ...] = ()) -> Sensitivities:
    """Adjoint sensitivities of one run of ``path``."""
    return study_sensitivities(run_study(load_case(path, overrides), check_grid=False))


def results(path: Path, overrides: tuple[str, ...]) -> dict[str, float]:
    """The named results of one full run (load, mesh, solve, evaluate)."""
    return named_results(run_study(load_case(path, overrides), check_grid=False, keep_fields=False))
