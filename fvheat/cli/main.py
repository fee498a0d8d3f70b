"""Command-line interface (typer). Thin: every command calls the library.

Exit codes: 0 success, 1 numerical failure, 2 bad input (one-line message naming the file
and key; no traceback).
"""

from __future__ import annotations

import glob
import os
import sys
import warnings
from pathlib import Path
from typing import Annotated

import typer

from fvheat.errors import CaseError, FvheatError

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    help="2-D finite-volume heat transfer for building junctions.",
    pretty_exceptions_enable=False,
)

CaseArg = Annotated[
    Path, typer.Argument(help="Case file (TOML).", metavar="CASE", show_default=False)
]
SetOpt = Annotated[
    list[str] | None,
    typer.Option(
        "--set",
        "-s",
        help="Override a case key: dotted.path=value (repeatable).",
        show_default=False,
    ),
]
QuietOpt = Annotated[bool, typer.Option("--quiet", "-q", help="Print nothing but errors.")]
FieldsOpt = Annotated[
    str,
    typer.Option(
        "--fields",
        help="Field files (VTU) to write: all saved times, the last one, or none.",
        metavar="all|last|none",
    ),
]


@app.command()
def run(
    case_file: CaseArg,
    out: Annotated[
        Path | None,
        typer.Option(
            "--out", "-o", help="Output folder (default: CASE-STEM_results).", show_default=False
        ),
    ] = None,
    set_: SetOpt = None,
    quiet: QuietOpt = False,
    as_json: Annotated[
        bool, typer.Option("--json", help="Print summary.json instead of the table.")
    ] = False,
    grid_check: Annotated[
        bool | None,
        typer.Option(
            "--grid-check/--no-grid-check",
            help="Also solve with twice the cells (ISO 10211 grid check).",
            show_default=False,
        ),
    ] = None,
    no_plots: Annotated[
        bool, typer.Option("--no-plots", help="Skip the figures (the slowest output).")
    ] = False,
    sensitivities: Annotated[
        bool | None,
        typer.Option(
            "--sensitivities/--no-sensitivities",
            help="Derivatives of ψ, L2D, U_f, f_Rsi, θ_si,min and heat flows with respect to "
            "every conductivity and surface resistance (steady runs; adjoint).",
            show_default=False,
        ),
    ] = None,
    fields: FieldsOpt = "all",
) -> None:
    """Solve a case; write summary.json, timeseries.csv (transient), fields, cells.csv,
    figures and report.html to OUT."""
    from fvheat.cli.run_command import run_case

    run_case(
        case_file,
        out,
        tuple(set_ or ()),
        quiet=quiet,
        as_json=as_json,
        grid_check=grid_check,
        plots=not no_plots,
        sensitivities=sensitivities,
        fields=fields,
    )


@app.command()
def target(
    case_file: CaseArg,
    vary: Annotated[
        str,
        typer.Option("--vary", help="The key to change (any key --set takes).", show_default=False),
    ],
    goal: Annotated[
        str,
        typer.Option(
            "--goal",
            help='The goal, e.g. "psi<=0.20", "f_Rsi>=0.75" (psi, L2D, U_f, f_Rsi, '
            "theta_si_min, heat_flow_<boundary>).",
            show_default=False,
        ),
    ],
    between: Annotated[
        tuple[float, float] | None,
        typer.Option("--between", help="Bracket LO HI of the key's values.", show_default=False),
    ] = None,
    out: Annotated[
        Path | None,
        typer.Option(
            "--out",
            "-o",
            help="Folder of the final run (default: CASE-STEM_target).",
            show_default=False,
        ),
    ] = None,
    tolerance: Annotated[
        float | None,
        typer.Option(
            "--tolerance",
            help="Accepted distance from the target, in its unit (default 1e-4 of the target).",
            show_default=False,
        ),
    ] = None,
    set_: SetOpt = None,
    quiet: QuietOpt = False,
) -> int:
    """Find the value of one key at which a result meets a goal (bracketing root search
    over full runs); write the final run and target.json to OUT."""
    from fvheat.cli.target_command import target_case

    return target_case(
        case_file,
        vary,
        goal,
        between=between,
        out=out,
        overrides=tuple(set_ or ()),
        tolerance=tolerance,
        quiet=quiet,
    )


@app.command()
def check(
    case_file: CaseArg,
    set_: SetOpt = None,
    plot: Annotated[
        Path | None,
        typer.Option(
            "--plot",
            help="Draw the model as meshed (.png or .svg, by the suffix), before any solve.",
            show_default=False,
        ),
    ] = None,
    mesh: Annotated[bool, typer.Option("--mesh", help="Draw the grid lines in --plot.")] = False,
) -> None:
    """Validate a case and mesh it, printing mesh statistics, without solving."""
    from fvheat.cli.check_command import check_case

    check_case(case_file, tuple(set_ or ()), plot=plot, show_mesh=mesh)


@app.command()
def materials() -> None:
    """List the built-in material library with its sources."""
    from fvheat.cli.materials_command import print_library

    print_library()


@app.command()
def layers(
    drawing: Annotated[Path, typer.Argument(help="DXF drawing.", show_default=False)],
    units: Annotated[
        str, typer.Option("--units", "-u", help="Unit the drawing is in: m, cm or mm.")
    ] = "m",
) -> None:
    """List a drawing's layers: entities, closed shapes, open paths and extents."""
    from fvheat.cli.layers_command import list_layers

    list_layers(drawing, units)


ResultsArg = Annotated[
    Path,
    typer.Argument(
        help="Results folder written by `fvheat run`.", metavar="FOLDER", show_default=False
    ),
]


@app.command()
def plot(
    folder: ResultsArg,
    range_: Annotated[
        tuple[float, float] | None,
        typer.Option("--range", help="Temperature colour range LO HI (°C).", show_default=False),
    ] = None,
    zoom: Annotated[
        tuple[float, float, float, float] | None,
        typer.Option("--zoom", help="Window X0 Y0 X1 Y1 (m).", show_default=False),
    ] = None,
    quiet: QuietOpt = False,
) -> None:
    """Redraw the figures of a results folder into FOLDER/figures."""
    from fvheat.cli.plot_command import plot_folder

    plot_folder(folder, range_, zoom, quiet=quiet)


@app.command()
def report(
    folder: ResultsArg,
    pdf: Annotated[
        bool, typer.Option("--pdf", help="Also write report.pdf (A4, same content).")
    ] = False,
    validation: Annotated[
        bool,
        typer.Option(
            "--validation",
            help="Run `fvheat validate` and add its table to the report's appendix.",
        ),
    ] = False,
    quiet: QuietOpt = False,
) -> int:
    """Rebuild report.html and report.md of a results folder (and report.pdf with --pdf)."""
    from fvheat.cli.report_command import report_folder

    return report_folder(folder, pdf=pdf, validation=validation, quiet=quiet)


@app.command()
def validate(quiet: QuietOpt = False) -> int:
    """Run the reference cases (ISO 10211 case-1 form, analytic solutions) on this
    installation and print reference against computed values; exit 1 if one fails."""
    from fvheat.cli.validate_command import validate as run_checks

    return run_checks(quiet=quiet)


@app.command()
def sweep(
    case_file: CaseArg,
    vary: Annotated[
        list[str] | None,
        typer.Option(
            "--vary",
            help="Vary a case key: dotted.path=v1,v2,... (repeatable).",
            show_default=False,
        ),
    ] = None,
    variants: Annotated[
        Path | None,
        typer.Option(
            "--variants", help="Variants file (.csv or .toml), one per row.", show_default=False
        ),
    ] = None,
    zip_: Annotated[
        bool, typer.Option("--zip", help="Pair the --vary lists instead of the full grid.")
    ] = False,
    set_: SetOpt = None,
    jobs: Annotated[
        int | None,
        typer.Option(
            "--jobs",
            "-j",
            help="Worker processes (default: all cores); with --scheduler: variants in flight.",
            show_default=False,
        ),
    ] = None,
    out: Annotated[
        Path | None,
        typer.Option(
            "--out", "-o", help="Sweep folder (default: CASE-STEM_sweep).", show_default=False
        ),
    ] = None,
    table: Annotated[
        Path | None,
        typer.Option("--table", help="Also write the sweep's table as CSV.", show_default=False),
    ] = None,
    retry_failed: Annotated[
        bool, typer.Option("--retry-failed", help="Run failed variants again.")
    ] = False,
    plots: Annotated[
        bool, typer.Option("--plots", help="Also draw every variant's figures (slow).")
    ] = False,
    fields: FieldsOpt = "all",
    scheduler: Annotated[
        str | None,
        typer.Option(
            "--scheduler", help="Run on a Dask cluster at this address.", show_default=False
        ),
    ] = None,
    quiet: QuietOpt = False,
) -> int:
    """Run many variants of a case in parallel into OUT/sweep.sqlite; rerun to resume."""
    from fvheat.cli.sweep_command import sweep_case

    return sweep_case(
        case_file,
        vary or [],
        variants,
        zipped=zip_,
        fixed=tuple(set_ or ()),
        jobs=jobs,
        out=out,
        table=table,
        retry_failed=retry_failed,
        plots=plots,
        fields=fields,
        scheduler=scheduler,
        quiet=quiet,
    )


@app.command()
def collect(
    sources: Annotated[
        list[Path],
        typer.Argument(
            help="Run folders, sweep folders or sweep.sqlite files.", show_default=False
        ),
    ],
    csv_file: Annotated[
        Path | None,
        typer.Option(
            "--csv", help="Write the table here instead of printing it.", show_default=False
        ),
    ] = None,
    quiet: QuietOpt = False,
) -> None:
    """Gather many runs' summaries (or a sweep's results) into one CSV table."""
    from fvheat.cli.collect_command import collect_runs

    collect_runs(sources, csv_file, quiet=quiet)


@app.command("sweep-plot")
def sweep_plot(
    folder: Annotated[
        Path,
        typer.Argument(
            help="Sweep folder or its sweep.sqlite.", metavar="FOLDER", show_default=False
        ),
    ],
    x: Annotated[str, typer.Option("--x", help="Varied key on the x axis.", show_default=False)],
    y: Annotated[
        str, typer.Option("--y", help="Result on the y axis, e.g. psi.", show_default=False)
    ],
    series: Annotated[
        str | None,
        typer.Option("--series", help="Varied key: one line per value.", show_default=False),
    ] = None,
    where: Annotated[
        list[str] | None,
        typer.Option("--where", help="Keep rows with key=value (repeatable).", show_default=False),
    ] = None,
    out: Annotated[
        Path | None,
        typer.Option(
            "--out", "-o", help="PNG file (default: in the sweep folder).", show_default=False
        ),
    ] = None,
    quiet: QuietOpt = False,
) -> None:
    """Plot a sweep result against a varied parameter, one line per value of another."""
    from fvheat.cli.sweep_plot_command import plot_sweep

    plot_sweep(folder, x, y, series, where or [], out, quiet=quiet)


def main(argv: list[str] | None = None) -> int:
    """Entry point: run the app and map errors to exit codes and one-line messages.

    The command line is parsed and the command invoked here, not in typer's own main loop,
    so every exception arrives as raised: usage errors (exit 2, with the usage line), fvheat
    errors (2 bad input, 1 numerical failure) and Ctrl-C (130) are handled the same way with
    every typer version.
    """
    if argv is None:
        # a numerical failure is reported in one line (NaN / inf results are refused by
        # fvheat.run); numpy's floating-point warnings on the way would add lines of their own
        # (a filter, not numpy.seterr: `fvheat --help` does not import numpy)
        warnings.filterwarnings(
            "ignore",
            r"(invalid value|divide by zero|overflow|underflow) encountered",
            RuntimeWarning,
        )
        args = sys.argv[1:]
        if os.name == "nt":  # Windows shells leave wildcards to the program (typer's main did too)
            args = expand_wildcards(args)
    else:
        args = list(argv)
    command = typer.main.get_command(app)
    try:
        with command.make_context("fvheat", args) as ctx:
            code = command.invoke(ctx)
    except CaseError as err:
        print(f"fvheat: error: {err}", file=sys.stderr)
        return 2
    except FvheatError as err:
        print(f"fvheat: numerical failure: {err}", file=sys.stderr)
        return 1
    except KeyboardInterrupt:
        print("fvheat: interrupted; files already written are complete", file=sys.stderr)
        return 130
    except BrokenPipeError:
        if not _stdout_closed():
            raise
        return 1  # output piped into a program that stopped reading (`| head`)
    except Exception as err:
        parser_code = _parser_exit(err, args)
        if parser_code is None:
            raise
        return parser_code
    # a command may return its exit code (sweep: 1 when a variant failed)
    return code if isinstance(code, int) and not isinstance(code, bool) else 0


def expand_wildcards(args: list[str]) -> list[str]:
    """Replace every argument holding ``*``, ``?`` or ``[`` by the paths it matches (sorted;
    ``**`` recurses), as a POSIX shell does; an argument that matches nothing stays as is."""
    out: list[str] = []
    for a in args:
        matches = sorted(glob.glob(a, recursive=True)) if any(c in a for c in "*?[") else []
        out.extend(matches or [a])
    return out


def _stdout_closed() -> bool:
    """True when standard output is a pipe nobody reads any more; then it is pointed at
    the null device, so that Python's final flush does not fail too."""
    try:
        sys.stdout.flush()
    except BrokenPipeError:
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return True
    return False


def _parser_exit(err: Exception, args: list[str]) -> int | None:
    """Exit code for an exception of the command-line parser, after printing what it has to
    say; None for any other exception.

    The parser is click: the click package with older typer, a copy inside typer
    (``typer._click``) with newer typer. Their exception classes differ, so they are
    recognised by where they come from and by shape: a usage error has an integer
    ``exit_code`` (2) and ``show()``; ``Exit`` (``--help``) has only ``exit_code``.
    """
    if not any(c.__module__.split(".")[0] in ("click", "typer") for c in type(err).__mro__):
        return None
    name = type(err).__name__
    if name == "NoArgsIsHelpError":  # `fvheat` alone: the help is the answer, not an error
        text = str(getattr(err, "format_message", lambda: "")())
        if text.strip():  # typer's rich help is printed while the exception is made
            print(text)
        return 0
    code = getattr(err, "exit_code", None)
    show = getattr(err, "show", None)
    if isinstance(code, int) and callable(show):
        show()  # "Usage: ...", "Try 'fvheat ... --help' for help.", "Error: ..."
        if getattr(err, "ctx", False) is None:  # raised by the option parser: no usage shown
            print(f"Try '{_help_command(args)}' for help.", file=sys.stderr)
        return code
    if isinstance(code, int):
        return code
    if name == "Abort":
        print("fvheat: aborted", file=sys.stderr)
        return 1
    return None


def _help_command(args: list[str]) -> str:
    """``fvheat COMMAND --help`` for the command named in ``args``, else ``fvheat --help``."""
    names = typer.main.get_command(app).commands  # type: ignore[attr-defined]
    cmd = next((a for a in args if not a.startswith("-")), None)
    return f"fvheat {cmd} --help" if cmd in names else "fvheat --help"


if __name__ == "__main__":
    sys.exit(main())
