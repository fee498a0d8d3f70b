"""Command-line interface (typer). Thin: every command calls the library.

Exit codes: 0 success, 1 numerical failure, 2 bad input (one-line message naming the file
and key; no traceback).
"""

from __future__ import annotations

import sys
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

CaseArg = Annotated[Path, typer.Argument(help="Case file (TOML).", show_default=False)]
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


@app.command()
def run(
    case_file: CaseArg,
    out: Annotated[
        Path | None,
        typer.Option(
            "--out", "-o", help="Output folder [default: CASE-STEM_results].", show_default=False
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
) -> None:
    """Solve a case and write summary.json (and timeseries.csv when transient) to OUT."""
    from fvheat.cli.run_command import run_case

    run_case(case_file, out, tuple(set_ or ()), quiet=quiet, as_json=as_json, grid_check=grid_check)


@app.command()
def check(case_file: CaseArg, set_: SetOpt = None) -> None:
    """Validate a case and mesh it, printing mesh statistics, without solving."""
    from fvheat.cli.run_command import check_case

    check_case(case_file, tuple(set_ or ()))


@app.command()
def materials() -> None:
    """List the built-in material library with its sources."""
    from fvheat.cli.materials_command import print_library

    print_library()


def main(argv: list[str] | None = None) -> int:
    """Entry point: run the app and map fvheat errors to exit codes and one-line messages."""
    try:
        app(args=argv, prog_name="fvheat", standalone_mode=False)
    except CaseError as err:
        print(f"fvheat: error: {err}", file=sys.stderr)
        return 2
    except FvheatError as err:
        print(f"fvheat: numerical failure: {err}", file=sys.stderr)
        return 1
    except KeyboardInterrupt:
        print("fvheat: interrupted; files already written are complete", file=sys.stderr)
        return 130
    except Exception as err:  # click usage errors and the like
        import click

        if isinstance(err, click.exceptions.ClickException):
            err.show()
            return err.exit_code
        if isinstance(err, click.exceptions.Exit):
            return err.exit_code
        raise
    return 0


if __name__ == "__main__":
    sys.exit(main())
