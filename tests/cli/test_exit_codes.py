"""Exit codes of ``fvheat run``: 0 success, 2 bad input, 1 numerical failure — each with a
one-line message, and nothing written when the run fails. Usage errors (a missing case, an
unknown option or command, a bad option value) exit 2 with the usage and an error line and
never a traceback, whichever typer (and click) is installed: checked as users meet them, by
running ``python -m fvheat`` in a subprocess."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
import typer
from casefiles import write_case
from wallcases import wall

from fvheat.cli.main import expand_wildcards, main

#: a steady run with a radiating outside surface (Newton on the surface temperatures)
WALL = wall("air_temperature = -5\nconvection = 10\nemissivity = 0.9\nradiant_temperature = -30")


def test_success_bad_input_and_numerical_failure(tmp_path, capsys):
    case = write_case(tmp_path, WALL)
    assert main(["run", str(case), "-o", str(tmp_path / "ok"), "-q", "--no-plots"]) == 0
    assert (tmp_path / "ok" / "summary.json").is_file()

    bad = [
        "run",
        str(case),
        "-o",
        str(tmp_path / "bad"),
        "-q",
        "--set",
        "materials.wall.conductivity=-1",
    ]
    assert main(bad) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "materials.wall.conductivity" in err
    assert not (tmp_path / "bad").exists()

    # an AMG-CG allowed one iteration cannot converge: a numerical failure, exit 1
    failing = [
        "run",
        str(case),
        "-o",
        str(tmp_path / "fail"),
        "-q",
        "--set",
        'solver.method="amg"',
        "--set",
        "solver.max_iterations=1",
    ]
    assert main(failing) == 1
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and err.startswith("fvheat: numerical failure:")
    assert not (tmp_path / "fail").exists()


def fvheat(cwd: Path, *args: str) -> subprocess.CompletedProcess[str]:
    """``python -m fvheat ARGS`` run in ``cwd`` the way a user runs it."""
    return subprocess.run(
        [sys.executable, "-m", "fvheat", *args],
        cwd=cwd,
        capture_output=True,
        text=True,
        timeout=120,
    )


@pytest.mark.parametrize(
    ("args", "error", "hint"),
    [
        (["run"], "Missing argument 'CASE'", "Usage: fvheat run [OPTIONS]"),
        (["run", "case.toml", "--bogus"], "No such option", "Usage: fvheat run [OPTIONS]"),
        (["nope"], "No such command 'nope'", "Usage: fvheat [OPTIONS] COMMAND"),
        (
            ["sweep", "case.toml", "--vary", "mesh.max_cell=0.05,0.1", "--jobs", "x"],
            "Invalid value for '--jobs'",
            "Usage: fvheat sweep [OPTIONS]",
        ),
        # the option parser raises this one without its command: no usage, but the help hint
        (
            ["run", "case.toml", "--grid-check=maybe"],
            "Option '--grid-check' does not take a value",
            "Try 'fvheat run --help' for help.",
        ),
    ],
    ids=["no-case", "unknown-option", "unknown-command", "jobs-not-integer", "flag-with-value"],
)
def test_usage_errors_exit_2_with_usage_and_no_traceback(tmp_path, args, error, hint):
    write_case(tmp_path, WALL)
    res = fvheat(tmp_path, *args)
    assert res.returncode == 2, res.stderr
    assert "Traceback" not in res.stderr
    assert f"Error: {error}" in res.stderr and hint in res.stderr
    assert res.stdout == ""
    assert [p.name for p in tmp_path.iterdir()] == ["case.toml"]  # nothing written


@pytest.mark.parametrize("args", [[], ["--help"], ["run", "--help"]], ids=["bare", "help", "run"])
def test_help_exits_0(tmp_path, args):
    res = fvheat(tmp_path, *args)
    assert res.returncode == 0, res.stderr
    assert "Traceback" not in res.stderr
    assert "Usage" in res.stdout and ("sweep" in res.stdout or "CASE" in res.stdout)


@pytest.mark.parametrize(
    ("exc", "code", "message"),
    [
        (KeyboardInterrupt, 130, "fvheat: interrupted; files already written are complete"),
        (typer.Abort, 1, "fvheat: aborted"),
    ],
    ids=["ctrl-c", "abort"],
)
def test_interrupt_and_abort_inside_a_command(tmp_path, capsys, monkeypatch, exc, code, message):
    import fvheat.cli.run_command

    def stop(*args, **kwargs):
        raise exc()

    monkeypatch.setattr(fvheat.cli.run_command, "run_case", stop)
    assert main(["run", str(write_case(tmp_path, WALL))]) == code
    assert capsys.readouterr().err.strip() == message


def test_a_bug_is_not_mistaken_for_a_usage_error(tmp_path, monkeypatch):
    """Only the parser's exceptions become exit codes: anything else keeps its traceback."""
    import fvheat.cli.run_command

    class Bug(RuntimeError):
        exit_code = 2

        def show(self) -> None:
            raise AssertionError("shown as a usage error")

    def broken(*args, **kwargs):
        raise Bug("a programming error")

    monkeypatch.setattr(fvheat.cli.run_command, "run_case", broken)
    with pytest.raises(Bug):
        main(["run", str(write_case(tmp_path, WALL))])


def test_wildcards_are_expanded_like_a_posix_shell(tmp_path):
    """What main() does on Windows, whose shells pass ``*`` through (POSIX shell globbing is
    the reference: sorted matches, ``**`` recursive, no match leaves the word unchanged)."""
    for name in ("b/summary.json", "a/summary.json", "a/deep/summary.json"):
        (tmp_path / name).parent.mkdir(parents=True, exist_ok=True)
        (tmp_path / name).write_text("{}")
    one = str(tmp_path / "*" / "summary.json")
    deep = str(tmp_path / "**" / "summary.json")
    none = str(tmp_path / "z*")
    got = expand_wildcards(["collect", one, "--csv", none])
    assert got == [
        "collect",
        str(tmp_path / "a" / "summary.json"),
        str(tmp_path / "b" / "summary.json"),
        "--csv",
        none,
    ]
    assert str(tmp_path / "a" / "deep" / "summary.json") in expand_wildcards([deep])
