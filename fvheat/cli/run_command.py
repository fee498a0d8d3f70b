"""``fvheat run`` and ``fvheat check``: load, mesh, solve, write, report to the terminal."""

from __future__ import annotations

import json
import sys
import time
from pathlib import Path

from fvheat.cautions import CAUTION
from fvheat.case.load import load_case
from fvheat.mesh.rectilinear import build_mesh
from fvheat.simulate import Progress, Solution, simulate


def default_out(case_file: Path) -> Path:
    """Default output folder: ``<case stem>_results`` in the current folder."""
    return Path(f"{case_file.stem}_results")


def run_case(
    case_file: Path, out: Path | None, overrides: tuple[str, ...], *, quiet: bool, as_json: bool
) -> Solution:
    """Validate (before anything is written), solve, write the outputs, print results."""
    from fvheat.output.summary import build_summary, write_summary
    from fvheat.output.timeseries import write_timeseries

    case = load_case(case_file, overrides)
    mesh = build_mesh(case)
    out = out if out is not None else default_out(case_file)
    t0 = time.perf_counter()
    if case.transient and not quiet and not as_json:
        solution = _with_progress(lambda p: simulate(case, mesh=mesh, progress=p))
    else:
        solution = simulate(case, mesh=mesh)
    elapsed = time.perf_counter() - t0
    summary = build_summary(solution, overrides)
    summary["solve_seconds"] = elapsed
    write_summary(out / "summary.json", summary)
    if case.transient:
        write_timeseries(out / "timeseries.csv", solution)
    if as_json:
        sys.stdout.write(json.dumps(summary, indent=2) + "\n")
    elif not quiet:
        _print_results(solution, out, elapsed)
    return solution


def check_case(case_file: Path, overrides: tuple[str, ...]) -> None:
    """Validate and mesh a case; print what was found."""
    case = load_case(case_file, overrides)
    mesh = build_mesh(case)
    stats = mesh.stats()
    print(f"{case_file}: valid ({'transient' if case.transient else 'steady'}) — {case.title}")
    print("mesh: " + ", ".join(f"{k} {_fmt(v)}" for k, v in stats.items()))
    for b in case.boundaries:
        n = int((mesh.b_boundary == mesh.boundary_names.index(b.name)).sum())
        print(f"boundary {b.name}: {b.kind}, {n} faces")


def _fmt(v: float | int) -> str:
    return f"{v:.4g}" if isinstance(v, float) else str(v)


def _with_progress(job):  # noqa: ANN001, ANN202
    from rich.console import Console
    from rich.progress import BarColumn, Progress, TextColumn, TimeRemainingColumn

    with Progress(
        TextColumn("solving"), BarColumn(), TextColumn("{task.percentage:>3.0f} %"),
        TimeRemainingColumn(), transient=True, console=Console(stderr=True),
    ) as bar:
        task = bar.add_task("t", total=1.0)

        def update(t: float, duration: float) -> None:
            bar.update(task, completed=t / duration)

        return job(update)


def _print_results(solution: Solution, out: Path, elapsed: float) -> None:
    from rich.console import Console
    from rich.table import Table

    con = Console()
    case = solution.case
    when = f" at t = {solution.time:g} s" if case.transient else ""
    table = Table(title=f"{case.title}{when}", title_justify="left")
    table.add_column("boundary")
    table.add_column("heat flow W/m", justify="right")
    table.add_column("min θ_s °C", justify="right")
    table.add_column("at (x, y) m")
    for name, r in solution.surfaces.items():
        table.add_row(name, f"{r.heat_flow:.4f}", f"{r.min_temperature:.2f}",
                      f"({r.min_at[0]:.3f}, {r.min_at[1]:.3f})")
    con.print(table)
    for name, v in solution.probes.items():
        con.print(f"probe {name}: {v:.2f} °C")
    bal = solution.balance
    con.print(
        f"cells {solution.mesh.n_cells}; energy balance residual {bal.relative:.1e} (relative); "
        f"solved in {elapsed:.2f} s; results in {out}/"
    )
    con.print(f"[dim]Caution: {CAUTION}[/dim]")
