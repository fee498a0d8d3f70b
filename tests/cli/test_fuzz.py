"""Fuzzing the command line with mutated demo cases (:mod:`fuzzing`): whatever the case
file holds, ``fvheat run`` / ``fvheat check`` exit 0, 1 or 2 only, never with a traceback;
a refusal (2) or a numerical failure (1) is exactly one line and leaves nothing in the
fresh ``--out`` folder (``fvheat.run.run_to_folder`` removes a folder it created when the
run fails before writing into it); a success writes a ``summary.json`` without NaN or
infinity. Most cases run in-process through ``fvheat.cli.main.main`` (as the console
script does); a handful run as ``python -m fvheat`` subprocesses, their standard error a
pipe (no progress bar may appear there).

Seed and size: ``FVHEAT_FUZZ_SEED`` (default 20261203) and ``FVHEAT_FUZZ_CASES`` (default
500) in the environment; a failure names the case's index, its source and its mutations.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import traceback
from dataclasses import dataclass
from pathlib import Path

import pytest
from tomltext import dumps

from fvheat.cli.main import main

from .fuzzing import CASES, Mutant, make_cases

SEED = int(os.environ.get("FVHEAT_FUZZ_SEED", "20261203"))
COUNT = int(os.environ.get("FVHEAT_FUZZ_CASES", "500"))
#: cases run as subprocesses (each pays the interpreter's and the imports' start-up)
SUBPROCESS_CASES = 6

#: characters of a progress bar (rich's bar and spinner); they must never reach a pipe
BAR_MARKS = ("━", "╸", "╺", "⠋", "⠙", "\r")


@dataclass
class Outcome:
    code: int | None
    stdout: str
    stderr: str
    crash: str | None = None


@pytest.fixture(scope="module")
def workspace(tmp_path_factory) -> Path:
    """A folder holding the demo cases' data files and drawings, where the mutated case
    files are written (their relative file names then resolve as in ``cases/``)."""
    root = tmp_path_factory.mktemp("fuzz")
    for sub in ("data", "details"):
        shutil.copytree(CASES / sub, root / sub)
    return root


def write(m: Mutant, root: Path) -> tuple[Path, Path]:
    """The mutant's case file and its (not yet existing) results folder."""
    case = root / f"fuzz_{m.index}.toml"
    case.write_text(dumps(m.data) + m.extra_text, encoding="utf-8")
    return case, root / f"out_{m.index}"


def argv(m: Mutant, case: Path, out: Path) -> list[str]:
    args = [m.command, str(case)]
    if m.command == "run":
        args += ["-o", str(out)]
        if not m.plots:
            args.append("--no-plots")
        if m.quiet:
            args.append("-q")
    for s in m.overrides:
        args += ["--set", s]
    return args


def problems(m: Mutant, result: Outcome, out: Path) -> list[str]:
    """What is wrong with one outcome (empty when it keeps every promise)."""
    found = []
    if result.crash is not None:
        return [f"escaped main():\n{result.crash}"]
    text = result.stdout + result.stderr
    if result.code not in (0, 1, 2):
        found.append(f"exit code {result.code}")
    if "Traceback" in text:
        found.append("traceback in the output")
    if any(mark in result.stderr for mark in BAR_MARKS):
        found.append("progress bar on a standard error that is not a terminal")
    lines = [ln for ln in result.stderr.splitlines() if not ln.startswith("fvheat: warning: ")]
    if result.code in (1, 2):
        head = "fvheat: error: " if result.code == 2 else "fvheat: numerical failure: "
        if len(lines) != 1 or not lines[0].startswith(head):
            found.append(f"not one {head!r} line on stderr: {lines[:5]!r}")
        if m.command == "run" and out.exists():
            found.append(f"a failed run left {sorted(p.name for p in out.iterdir())}")
    if result.code == 0 and m.command == "run":
        summary = out / "summary.json"
        if not summary.is_file():
            found.append("success without summary.json")
        else:
            found += _not_finite(summary)
        series = out / "timeseries.csv"
        if series.is_file() and any(w in series.read_text().lower() for w in ("nan", "inf")):
            found.append("NaN or inf in timeseries.csv")
    return found


def _not_finite(path: Path) -> list[str]:
    def refuse(name: str) -> float:
        raise ValueError(name)

    try:
        json.loads(path.read_text(encoding="utf-8"), parse_constant=refuse)
    except ValueError as err:
        return [f"{err} in {path.name}"]
    return []


def report(m: Mutant, issues: list[str], result: Outcome) -> str:
    tail = (result.stderr or result.stdout).strip().splitlines()[-3:]
    return (
        f"case {m.index} (seed {SEED}) from {m.source}, {m.command}, "
        f"mutations {m.steps}, --set {m.overrides}: {'; '.join(issues)}; output tail {tail}"
    )


@pytest.mark.slow
def test_fuzz_in_process(workspace, capsys):
    mutants = make_cases(SEED, COUNT)
    failures = []
    codes = {0: 0, 1: 0, 2: 0}
    for m in mutants[SUBPROCESS_CASES:]:
        case, out = write(m, workspace)
        crash = None
        code: int | None = None
        try:
            code = main(argv(m, case, out))
        except BaseException:  # a traceback the user would have seen
            crash = traceback.format_exc()
        captured = capsys.readouterr()
        result = Outcome(code, captured.out, captured.err, crash)
        issues = problems(m, result, out)
        if issues:
            failures.append(report(m, issues, result))
        if code in codes:
            codes[code] += 1
        shutil.rmtree(out, ignore_errors=True)
    assert not failures, f"{len(failures)} of {len(mutants)} cases:\n" + "\n".join(failures[:15])
    # the mutator must reach past the loader: some runs succeed, most are refused
    assert codes[0] >= COUNT // 20 and codes[2] >= COUNT // 4, codes


@pytest.mark.slow
def test_fuzz_subprocess(workspace):
    """The first cases as users run them: ``python -m fvheat`` with pipes for output, not
    quiet (the progress bar must stay off a pipe)."""
    mutants = make_cases(SEED, COUNT)[:SUBPROCESS_CASES]
    runs = []
    for m in mutants:
        m.quiet = False
        case, out = write(m, workspace)
        proc = subprocess.Popen(
            [sys.executable, "-m", "fvheat", *argv(m, case, out)],
            stdout=subprocess.PIPE,
            stderr=subprocess.PIPE,
            text=True,
            cwd=workspace,
        )
        runs.append((m, out, proc))
    failures = []
    for m, out, proc in runs:
        stdout, stderr = proc.communicate(timeout=300)
        result = Outcome(proc.returncode, stdout, stderr)
        issues = problems(m, result, out)
        if issues:
            failures.append(report(m, issues, result))
    assert not failures, "\n".join(failures)
