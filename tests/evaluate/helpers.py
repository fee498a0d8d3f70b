"""Shared helpers of the junction-evaluation tests: cases as TOML text in a temporary folder,
read by :func:`fvheat.case.load.load_case` and run by :func:`fvheat.study.run_study`."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path

from casefiles import load, write_case  # noqa: F401  (re-exported for the tests here)

from fvheat.study import Study, run_study

Point = tuple[float, float]
Segment = tuple[Point, Point]


def study(
    folder: Path,
    text: str,
    overrides: Sequence[str] = (),
    *,
    name: str = "case.toml",
    check_grid: bool = False,
) -> Study:
    """Write, load and run the TOML case ``text`` (junction results included)."""
    return run_study(load(folder, text, overrides, name), check_grid=check_grid)


def num(v: float) -> str:
    """A number written with full precision for TOML."""
    return repr(float(v))


def pt(p: Sequence[float]) -> str:
    """A TOML point [x, y]."""
    return f"[{num(p[0])}, {num(p[1])}]"


def seg(s: Segment) -> str:
    """A TOML segment [[x0, y0], [x1, y1]]."""
    return f"[{pt(s[0])}, {pt(s[1])}]"


def segs(ss: Sequence[Segment]) -> str:
    """A TOML array of segments."""
    return "[" + ", ".join(seg(s) for s in ss) + "]"


def box(b: Sequence[float]) -> str:
    """A TOML box [x0, y0, x1, y1]."""
    return "[" + ", ".join(num(v) for v in b) + "]"


def materials_toml(conductivities: dict[str, float]) -> str:
    """``[materials.NAME]`` tables with only a conductivity (W/(m·K))."""
    return "".join(
        f"\n[materials.{n}]\nconductivity = {num(k)}\n" for n, k in conductivities.items()
    )


def regions_toml(regions: Sequence[tuple[str, Sequence[float]]]) -> str:
    """``[[regions]]`` boxes (material, (x0, y0, x1, y1)), painted in order."""
    return "".join(f'\n[[regions]]\nmaterial = "{m}"\nbox = {box(b)}\n' for m, b in regions)


def surface_toml(name: str, edges: Sequence[Segment], air: float, resistance: float) -> str:
    """A ``[[boundaries]]`` entry exchanging with air through a surface resistance."""
    return (
        f'\n[[boundaries]]\nname = "{name}"\nedges = {segs(edges)}\n'
        f"air_temperature = {num(air)}\nresistance = {num(resistance)}\n"
    )


def fixed_toml(name: str, edges: Sequence[Segment], temperature: float) -> str:
    """A ``[[boundaries]]`` entry at a fixed surface temperature."""
    return (
        f'\n[[boundaries]]\nname = "{name}"\nedges = {segs(edges)}\n'
        f"temperature = {num(temperature)}\n"
    )


def iso6946_u(layers: Sequence[tuple[float, float]], r_si: float, r_se: float) -> float:
    """ISO 6946 U-value 1/(R_si + Σ d/λ + R_se) of (thickness m, λ W/(m·K)) layers."""
    return 1.0 / (r_si + sum(d / k for d, k in layers) + r_se)
