"""A run's results by the names sensitivities and target goals use: ``psi``, ``L2D``,
``U_f``, ``f_Rsi``, ``theta_si_min`` (with a junction) and ``heat_flow_<boundary>``."""

from __future__ import annotations

from fvheat.evaluate.junction import JUNCTION_QUANTITIES
from fvheat.study import Study


def named_results(study: Study) -> dict[str, float]:
    """Every named quantity the study has (junction ones only with a junction; U_f only
    for a frame section), W/m, W/(m·K), W/(m²·K), °C or –."""
    out: dict[str, float] = {}
    j = study.junction
    if j is not None:
        for name, attr in JUNCTION_QUANTITIES.items():
            v = getattr(j, attr)
            if v is not None:
                out[name] = float(v)
    for name, r in study.solution.surfaces.items():
        out[f"heat_flow_{name}"] = float(r.heat_flow)
    return out


def quantity_names(study: Study) -> list[str]:
    """The names :func:`named_results` gives for this study."""
    return list(named_results(study))
