"""Sensitivities to ``[parameters]`` entries (geometry) by central finite differences.

A parameter may move coordinates, so the mesh changes with it and no adjoint of the
geometry exists here: each parameter costs two full runs at value ± step (relative step
:data:`STEP`, of the value; absolute :data:`STEP` when the value is 0), remeshed each time.
The result carries mesh-change noise of the order of the grid check's, so it is an estimate;
the adjoint derivatives of conductivities and surface coefficients are exact.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

import numpy as np

from fvheat.case.load import load_case
from fvheat.sensitivity.named import named_results
from fvheat.sensitivity.parameters import Parameter, quote_key
from fvheat.study import run_study

#: relative step of the central difference (a geometry step of 1e-3 × 80 mm = 0.08 mm)
STEP = 1e-3


def parameter_derivatives(
    case_file: Path, overrides: Sequence[str], parameters: dict[str, float], names: list[str]
) -> tuple[list[Parameter], np.ndarray]:
    """The parameters and d(quantity)/d(parameter) (len(names), len(parameters)) for the
    quantities ``names`` of :func:`~fvheat.sensitivity.named.named_results`."""
    params = []
    d = np.zeros((len(names), len(parameters)))
    for i, (name, value) in enumerate(parameters.items()):
        step = STEP * abs(value) if value != 0.0 else STEP
        results = []
        for v in (value + step, value - step):
            case = load_case(case_file, (*overrides, f"parameters.{quote_key(name)}={v!r}"))
            results.append(named_results(run_study(case, check_grid=False, keep_fields=False)))
        for k, q in enumerate(names):
            d[k, i] = (results[0][q] - results[1][q]) / (2.0 * step)
        params.append(Parameter(f"parameters.{quote_key(name)}", value, "parameter", name))
    return params, d
