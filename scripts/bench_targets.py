"""Measurements of ``scripts/bench.py`` beyond the solves: figures, field-file codecs,
start-up imports and sweep overhead. Imported by ``bench.py``; not a test.

Every function returns plain numbers; ``bench.py`` prints them with the targets.
"""

from __future__ import annotations

import os
import re
import shutil
import statistics
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
BALCONY = ROOT / "cases" / "balcony_slab.toml"

#: packages ``fvheat --help`` must not import, and a ``fvheat run --no-plots --fields none``
#: of a case without a drawing
HELP_MUST_NOT = ("numpy", "scipy", "matplotlib", "meshio", "dask", "distributed", "ezdxf")
RUN_MUST_NOT = ("matplotlib", "meshio", "dask", "distributed", "ezdxf", "scipy.constants")


# --- figures --------------------------------------------------------------------------------


def figure_seconds(case: Path, work: Path, repeat: int = 1) -> tuple[float, float, float, int]:
    """Solve ``case`` in this process, then time drawing every figure of its results
    folder from the fields in memory: in this process one after the other (median wall and
    CPU time, s, of ``repeat`` drawings), and as ``fvheat run`` draws them, in its figure
    workers (warm, from the moment the run hands them the fields to the last figure
    written: median wall time, s); and the cell count."""
    from fvheat.case.load import load_case
    from fvheat.output.memory import SolvedFields
    from fvheat.output.plots.figures import (
        draw_figures,
        draw_group,
        planned_figures,
        split_figures,
        states_needed,
    )
    from fvheat.output.results import ResultsFolder
    from fvheat.output.summary import build_summary, write_summary
    from fvheat.output.workers import RUN_WORKERS, FigureWorkers
    from fvheat.study import run_study

    with FigureWorkers(RUN_WORKERS) as workers:  # forked before the solve, as in a run
        study = run_study(load_case(case))
        out = work / f"figures_{case.stem}"
        shutil.rmtree(out, ignore_errors=True)
        out.mkdir(parents=True)
        write_summary(out / "summary.json", build_summary(study, ()))
        memory = SolvedFields(study.solution, study.surface_solution)
        memory.field()  # the view is built once per run anyway (fields and figures share it)
        draw_figures(out, fields=memory)  # warm: matplotlib imported, fonts cached
        times, cpu, parallel = [], [], []
        for _ in range(repeat):
            t0, c0 = time.perf_counter(), time.process_time()
            draw_figures(out, fields=memory)
            times.append(time.perf_counter() - t0)
            cpu.append(time.process_time() - c0)
            t0 = time.perf_counter()
            frozen = memory.freeze(states_needed(len(memory.field_times())))
            groups = split_figures(planned_figures(ResultsFolder.open(out), frozen), len(workers))
            to = [i for i, g in enumerate(groups) if g]
            workers.submit(draw_group, [(out, frozen, groups[i]) for i in to], to)
            workers.results()
            parallel.append(time.perf_counter() - t0)
    med = statistics.median
    return med(times), med(cpu), med(parallel), study.solution.mesh.n_cells


# --- field-file codecs ----------------------------------------------------------------------


@dataclass
class Codec:
    name: str
    write: float  # s
    read: float  # s
    mib: float
    same: bool  # read back equal to what was written


def codecs(
    case: Path, work: Path, names: tuple[str, ...] = ("none", "zlib", "lzma")
) -> list[Codec]:
    """Write the solved field of ``case`` as VTU through meshio with each compression
    (and fvheat's own appended writer: "raw", uncompressed, which it uses for large
    fields, and "raw-zlib", its zlib blocks for small ones), read it back with meshio;
    times, sizes and whether the temperatures came back equal."""
    import meshio
    import numpy as np

    from fvheat.case.load import load_case
    from fvheat.output.fields import to_meshio, vtu_arrays, vtu_topology
    from fvheat.output.view import field_view
    from fvheat.output.vtu import write_raw_vtu
    from fvheat.simulate import simulate

    view = field_view(simulate(load_case(case)))
    topology = vtu_topology(view)
    mesh = to_meshio(view, topology)
    out = []
    for name in ("raw", "raw-zlib", *names):
        path = work / f"codec_{name}.vtu"
        t0 = time.perf_counter()
        if name.startswith("raw"):
            write_raw_vtu(path, *vtu_arrays(view, topology), compress=name == "raw-zlib")
        else:
            compression = None if name == "none" else name
            meshio.vtu.write(path, mesh, binary=True, compression=compression)
        w = time.perf_counter() - t0
        t0 = time.perf_counter()
        back = meshio.read(path)
        r = time.perf_counter() - t0
        same = all(
            np.array_equal(a, b)
            for a, b in zip(
                back.cell_data["temperature"], mesh.cell_data["temperature"], strict=True
            )
        )
        out.append(Codec(name, w, r, path.stat().st_size / 2**20, same))
        path.unlink()
    return out


# --- start-up -------------------------------------------------------------------------------


@dataclass
class Startup:
    wall: float  # s, median process wall time
    imports: float  # s, sum of the top-level import times (python -X importtime)
    forbidden: list[str]  # packages imported that should not be


def _importtime(cmd: list[str]) -> tuple[float, set[str]]:
    """Total top-level import time (s) and the imported module names of ``cmd`` (a list
    of arguments after ``python -X importtime``)."""
    done = subprocess.run(
        [sys.executable, "-X", "importtime", *cmd], capture_output=True, text=True, check=True
    )
    total, names = 0, set()
    for line in done.stderr.splitlines():
        m = re.match(r"import time:\s+\d+ \|\s+(\d+) \|( *)(\S+)", line)
        if not m:
            continue
        names.add(m.group(3))
        if len(m.group(2)) == 1:  # a top-level import (one space after the bar)
            total += int(m.group(1))
    return total / 1e6, names


def _wall(cmd: list[str], repeat: int) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        subprocess.run([sys.executable, *cmd], capture_output=True, check=True)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def startup(work: Path, tiny_case: Path, repeat: int = 5) -> dict[str, Startup]:
    """``fvheat --help``, a ``fvheat run`` of a tiny case without figures and field files,
    and, for reference, Python importing only numpy and scipy.sparse.linalg."""
    out = work / "startup_run"
    run = ["-m", "fvheat", "run", str(tiny_case), "-q", "--out", str(out), "--no-plots"]
    run += ["--fields", "none"]
    cases = {
        "fvheat --help": (["-m", "fvheat", "--help"], HELP_MUST_NOT),
        "fvheat run (tiny case, --no-plots --fields none)": (run, RUN_MUST_NOT),
        "python: import numpy, scipy.sparse.linalg only": (
            ["-c", "import numpy, scipy.sparse.linalg"],
            (),
        ),
    }
    result = {}
    for label, (cmd, must_not) in cases.items():
        imports, names = _importtime(cmd)
        wall = _wall(cmd, repeat)
        result[label] = Startup(wall, imports, sorted(n for n in must_not if n in names))
    return result


# --- sweeps ---------------------------------------------------------------------------------


def study_seconds(case: Path, repeat: int = 3) -> float:
    """Median wall time (s) of load + mesh + solve + junction evaluation in this process."""
    from fvheat.case.load import load_case
    from fvheat.study import run_study

    run_study(load_case(case))
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        run_study(load_case(case))
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def sweep_wall(case: Path, work: Path, n: int, jobs: int, fields: str) -> float:
    """Wall time (s) of a ``fvheat sweep`` process of ``n`` variants of ``case`` (the
    thermal break's conductivity) on ``jobs`` workers; checks every variant finished."""
    values = ",".join(f"{0.10 + 0.005 * k:.3f}" for k in range(n))
    out = work / f"sweep_{n}_{jobs}_{fields}"
    shutil.rmtree(out, ignore_errors=True)
    cmd = [sys.executable, "-m", "fvheat", "sweep", str(case), "-q", "-j", str(jobs)]
    cmd += ["--vary", f"materials.thermal_break.conductivity={values}", "--out", str(out)]
    cmd += ["--fields", fields]
    t0 = time.perf_counter()
    subprocess.run(cmd, capture_output=True, check=True, env={**os.environ, "MPLBACKEND": "Agg"})
    wall = time.perf_counter() - t0
    done = [p for p in out.iterdir() if (p / "variant.json").is_file()]
    if len(done) != n:
        raise RuntimeError(f"sweep in {out}: {len(done)} of {n} variants finished")
    return wall


@dataclass
class SweepCost:
    study: float  # s per variant in this process (the work itself)
    per_variant: dict[str, float]  # s per variant in a sweep, by "fields=..., jobs=..."
    overhead: dict[str, float]  # per_variant − study (jobs = 1)
    scaling: float | None  # per-variant throughput with 2 workers / with 1


def sweep_cost(work: Path, few: int, many: int, repeat: int = 1) -> SweepCost:
    """Per-variant wall time of sweeps of the balcony demo: the difference between a sweep
    of ``many`` and one of ``few`` variants (start-up cancels), divided by the difference
    in variants (median of ``repeat`` pairs); with --fields none and all on one worker, and
    none on two."""
    study = study_seconds(BALCONY)

    def per_variant(jobs: int, fields: str) -> float:
        got = []
        for _ in range(repeat):
            a = sweep_wall(BALCONY, work, few, jobs, fields)
            b = sweep_wall(BALCONY, work, many, jobs, fields)
            got.append((b - a) / (many - few))
        return statistics.median(got)

    per: dict[str, float] = {}
    for fields in ("none", "all"):
        per[f"--fields {fields}, 1 worker"] = per_variant(1, fields)
    scaling = None
    if (os.cpu_count() or 1) >= 2:
        per["--fields none, 2 workers"] = per_variant(2, "none")
        scaling = per["--fields none, 1 worker"] / per["--fields none, 2 workers"]
    overhead = {k: v - study for k, v in per.items() if "1 worker" in k}
    return SweepCost(study, per, overhead, scaling)
