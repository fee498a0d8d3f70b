"""``fvheat run``: load, mesh, solve, write, report to the terminal."""

from __future__ import annotations

import json
import sys
from pathlib import Path

from fvheat.cautions import CAUTION
from fvheat.cli.console import print_warnings
from fvheat.output.workers import RUN_WORKERS, FigureWorkers
from fvheat.run import run_to_folder
from fvheat.simulate import Progress
from fvheat.study import Study


def default_out(case_file: Path) -> Path:
    """Default output folder: ``<case stem>_results`` in the current folder."""
    return Path(f"{case_file.stem}_results")


def run_case(
    case_file: Path,
    out: Path | None,
    overrides: tuple[str, ...],
    *,
    quiet: bool,
    as_json: bool,
    grid_check: bool | None = None,
    plots: bool = True,
    sensitivities: bool | None = None,
    fields: str = "all",
) -> Study:
    """:func:`fvheat.run.run_to_folder`, with a progress bar and the results printed."""
    out = out if out is not None else default_out(case_file)
    show = not quiet and not as_json

    def job(progress: Progress | None, workers: FigureWorkers) -> tuple[Study, dict]:
        return run_to_folder(
            case_file,
            out,
            overrides,
            grid_check=grid_check,
            plots=plots,
            fields=fields,
            progress=progress,
            sensitivities=sensitivities,
            workers=workers,
        )

    # the bar only on a terminal: on a pipe or a log file it would leave control
    # characters and an empty line before any message
    bar = show and sys.stderr.isatty()
    # figure workers are forked first, before any thread (the bar's) or solve exists
    with FigureWorkers(RUN_WORKERS if plots else 0) as workers:
        study, summary = _with_progress(job, workers) if bar else job(None, workers)
    if as_json:
        sys.stdout.write(json.dumps(summary, indent=2) + "\n")
    elif not quiet:
        _print_results(study, out, summary["solve_seconds"])
        print_warnings(study.all_warnings)
    return study


def _with_progress(job, workers: FigureWorkers):
    from rich.console import Console
    from rich.progress import BarColumn, Progress, TextColumn, TimeRemainingColumn

    with Progress(
        TextColumn("solving"),
        BarColumn(),
        TextColumn("{task.percentage:>3.0f} %"),
        TimeRemainingColumn(),
        transient=True,
        console=Console(stderr=True),
    ) as bar:
        task = bar.add_task("t", total=1.0)

        def update(t: float, duration: float) -> None:
            bar.update(task, completed=t / duration)

        return job(update, workers)


def _print_results(study: Study, out: Path, elapsed: float) -> None:
    from rich.console import Console
    from rich.table import Table

    con = Console()
    solution = study.solution
    case = solution.case
    when = f" at t = {solution.time:g} s" if case.transient else ""
    table = Table(title=f"{case.title}{when}", title_justify="left")
    table.add_column("boundary")
    table.add_column("heat flow W/m", justify="right")
    table.add_column("min θ_s °C", justify="right")
    table.add_column("at (x, y) m")
    ext = solution.extremes
    if ext is not None:
        table.add_column("lowest θ_s over the run °C", justify="right")
        table.add_column("highest θ_s over the run °C", justify="right")
    for name, r in solution.surfaces.items():
        cells = [
            name,
            f"{r.heat_flow:.4f}",
            f"{r.min_temperature:.2f}",
            f"({r.min_at[0]:.3f}, {r.min_at[1]:.3f})",
        ]
        if ext is not None:
            cells += [_over_run(ext.lowest.get(name)), _over_run(ext.highest.get(name))]
        table.add_row(*cells)
    con.print(table)
    if ext is not None:
        f = ext.factor_dict()
        if f.get("f_min_over_run") is not None:
            at = f["f_min_over_run_at"]
            con.print(
                f"lowest temperature factor over the run f(t) = {f['f_min_over_run']:.4f} at "
                f"t = {f['f_min_over_run_time_s'] / 3600:.4g} h on {f['f_min_over_run_boundary']}"
                f" ({at[0]:.3f}, {at[1]:.3f}) m (run's own surface resistances; "
                f"{f['f_over_run_skipped_steps']} of {f['f_over_run_steps']} steps skipped: "
                "|θ_i − θ_e| < 1 K)"
            )
        for key, e in ext.phase.items():
            unit = "m²" if key == "frozen_area" else "m"
            con.print(
                f"largest {key} over the run: {e.value:.3f} {unit} at t = {e.time / 3600:.4g} h"
            )
    for name, v in solution.probes.items():
        con.print(f"probe {name}: {v:.2f} °C")
    if study.junction is not None:
        con.print(_junction_table(study))
    if study.coupling is not None:
        con.print(_coupling_table(study))
        for p in study.coupling.points:
            weights = ", ".join(f"{v:.4f}" for v in p.g)
            con.print(
                f"  coldest point of {p.environment}: {p.temperature:.2f} °C at "
                f"({p.at[0]:.3f}, {p.at[1]:.3f}) m on {p.boundary}; weighting factors g = {weights}"
            )
    if study.grid is not None:
        g = study.grid
        con.print(
            f"grid check: Σ|Φ| changes {100 * g.change:.3f} % from {g.cells} to "
            f"{g.cells_refined} cells — {'pass' if g.passed else 'FAIL'} (limit 1 %, ISO 10211)"
        )
        for name, (a, b) in g.quantities.items():
            rel = f", {100 * (b - a) / abs(b):+.3f} %" if b != 0.0 else ""
            label = "ψ" if name == "psi" else name
            con.print(f"  {label} on both grids: {a:.5g} → {b:.5g} (change {b - a:+.3g}{rel})")
    if study.sensitivities is not None:
        from fvheat.cli.sensitivity_table import print_sensitivities

        print_sensitivities(con, study.sensitivities)
    bal = solution.balance
    con.print(
        f"mesh {solution.mesh.kind}, cells {solution.mesh.n_cells}; "
        f"energy balance: {bal.describe()}; "
        f"solved in {elapsed:.2f} s; results in {out}/"
    )
    con.print(f"[dim]Caution: {CAUTION}[/dim]")


def _over_run(e) -> str:
    """'θ at t = … h' of an over-the-run extreme, '–' when there is none."""
    return "–" if e is None else f"{e.value:.2f} at {e.time / 3600:.4g} h"


def _coupling_table(study: Study):
    from rich.table import Table

    c = study.coupling
    assert c is not None
    ok = "pass" if c.symmetry_error < 1e-8 and c.row_sum_error < 1e-8 else "CHECK"
    t = Table(
        title=(
            "coupling coefficients L W/(m·K) (ISO 10211; off-diagonal ≥ 0, diagonal = row sum); "
            f"symmetry {c.symmetry_error:.1e}, row sums {c.row_sum_error:.1e}: {ok}"
        ),
        title_justify="left",
    )
    t.add_column("environment")
    for name in c.environments:
        t.add_column(name, justify="right")
    for name, row in zip(c.environments, c.matrix, strict=True):
        t.add_row(name, *(f"{v:.5f}" for v in row))
    return t


def _junction_table(study: Study):
    from rich.table import Table

    j = study.junction
    assert j is not None
    t = Table(
        title=f"junction ({j.dimensions} dimensions)", title_justify="left", show_header=False
    )
    t.add_column("quantity")
    t.add_column("value", justify="right")
    t.add_row("θ_i / θ_e", f"{j.theta_i:g} / {j.theta_e:g} °C")
    t.add_row("L2D", f"{j.l2d:.4f} W/(m·K)")
    for f in j.flanking:
        src = {"layers": "from layers", "given": "given"}.get(f.source, f.source)
        others = [f"{v:g} {k}" for k, v in f.lengths.items() if k != j.dimensions]
        more = f"; {', '.join(others)}" if others else ""
        t.add_row(f"  U·l {f.name}", f"{f.u_value:.4f} × {f.length:g} ({src}{more})")
    psi = "ψ_g" if j.ground is not None else "ψ"
    t.add_row(f"{psi} ({j.dimensions.replace('_', ' ')})", f"{j.psi:.4f} W/(m·K)")
    for system, value in j.psi_by_dimensions.items():
        if system != j.dimensions:
            t.add_row(f"{psi} ({system.replace('_', ' ')})", f"{value:.4f} W/(m·K)")
    if j.psi_note is not None:
        t.add_row("", j.psi_note)
    if j.ground is not None:
        g = j.ground
        t.add_row(
            "  ground floor (ISO 13370)",
            f"B' {g.width:g} m, λ_g {g.soil_conductivity:g}, w {g.wall_thickness:.3g} m, "
            f"R_f {g.r_f:.3f}, d_t {g.d_t:.3f} m: U {g.u_value:.4f} W/(m²·K)",
        )
    if j.u_f is not None:
        t.add_row("U_f", f"{j.u_f:.3f} W/(m²·K)")
    verdict = "" if j.f_rsi_pass is None else (" pass" if j.f_rsi_pass else " FAIL")
    limit = "" if j.f_rsi_limit is None else f" (limit {j.f_rsi_limit:g}){verdict}"
    t.add_row("f_Rsi", f"{j.f_rsi:.4f}{limit}")
    t.add_row(
        "θ_si,min",
        f"{j.theta_si_min:.2f} °C at ({j.theta_si_min_at[0]:.3f}, {j.theta_si_min_at[1]:.3f}) m",
    )
    t.add_row("  from the", j.f_rsi_from)
    if j.dew_point is not None:
        t.add_row(
            "dew point / surface RH", f"{j.dew_point:.2f} °C / {100 * (j.surface_rh or 0):.0f} %"
        )
    return t
