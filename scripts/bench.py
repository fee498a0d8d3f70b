#!/usr/bin/env python3
"""Benchmark fvheat against the bare scipy/pyamg calls it is built on and, when installed,
FiPy (a general finite-volume library), on the same problems. Not a test: it measures.

Problems (an invented composite wall section, 1 m × 1 m, uniform square cells):
masonry k = 1 W/(m·K) with an insulation block k = 0.04 W/(m·K) in its lower right part;
inside air 20 °C through R = 0.13 m²·K/W on the left, outside air through R = 0.04 m²·K/W on
the right (−5 °C steady; a daily cosine 0 ± 8 °C for the transient), top and bottom adiabatic.

- steady, n × n cells for each size (default 62 500 to 4 M cells)
- transient, 300 × 300 cells (90 k), 300 backward-Euler steps of 600 s from 10 °C

Each problem runs through
- ``bare``: a vectorised assembly written here, then pyamg Ruge–Stüben + CG to a relative
  residual of 1e-10 (steady) or one SuperLU factorisation (MMD_AT_PLUS_A ordering,
  symmetric mode) and back-substitutions (transient), in this process;
- ``bare-lu``: the steady problem with the tuned SuperLU factorisation, in this process;
- ``api``: :func:`fvheat.case.load.load_case` + :func:`fvheat.simulate.simulate`, in this process;
- ``cli``: ``fvheat run CASE --quiet`` with its default outputs (field files, cells.csv,
  figures, report; ``--cli-no-plots`` leaves the figures out) as a separate process, end to
  end; "to summary" is process start to summary.json written;
- ``fipy``: FiPy's default solver on the same discretisation (harmonic face conductivities,
  surface resistances as cell sources), when FiPy is installed (``pip install -e .[bench]``);
  its transient is timed over fewer steps and compared per step.

Then (see ``bench_targets.py``): all figures of a steady run drawn from memory (at the
smallest steady size and the one nearest 1 M cells), the VTU codecs meshio offers (write,
read back, size) at the steady size nearest 250 000 cells, start-up (``python -X
importtime``: what ``fvheat --help`` and a run without figures and field files import) and
the per-variant cost of sweeps of the balcony demo. The targets of the issue are printed
last, each with its measured value and PASS or FAIL.

Wall times are single runs unless ``--repeat`` asks for medians. On a shared machine they
vary a lot between runs: compare the ratios, which are measured within one run. Peak memory
is the peak resident set size: of the child process for ``cli``, and of this process during the run
(reset before it through /proc/self/clear_refs) for the in-process paths. Heat flows are
compared with the bare solution: largest difference over the two boundaries relative to
the largest heat flow.

    python scripts/bench.py                 # the full table (several minutes)
    python scripts/bench.py --quick         # tiny sizes, a few seconds (smoke test)
    python scripts/bench.py --quick --no-fipy
    python scripts/bench.py --repeat 3      # medians of three runs
    python scripts/bench.py --sizes 250 500 1000 --no-fipy   # without the 4 M case
"""

from __future__ import annotations

import argparse
import ctypes
import gc
import json
import os
import platform
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
import scipy
import scipy.sparse as sp
import scipy.sparse.linalg as spla

# --- the problems ---------------------------------------------------------------------------

K_MASONRY, K_INSULATION = 1.0, 0.04  # W/(m·K)
RHO_C_MASONRY, RHO_C_INSULATION = 1800.0 * 1000.0, 30.0 * 1400.0  # J/(m³·K)
INSULATION = (0.5, 0.0, 1.0, 0.6)  # box x0, y0, x1, y1 (m)
R_IN, R_OUT = 0.13, 0.04  # m²·K/W
T_IN, T_OUT_STEADY = 20.0, -5.0  # °C
T_OUT_MEAN, T_OUT_AMPLITUDE, DAY = 0.0, 8.0, 86400.0  # °C, °C, s
T_START = 10.0  # °C
RTOL = 1e-10  # relative residual of the bare AMG-CG solve
AGREEMENT = 1e-6  # heat flows must agree to this, relative
BOUNDARIES = ("inside", "outside")


@dataclass(frozen=True)
class Transient:
    """Time stepping of the transient problem: ``steps`` of ``dt`` s, a saved row every
    ``save`` steps; FiPy is run for ``fipy_steps`` steps only (it is slow)."""

    steps: int
    dt: float
    save: int
    fipy_steps: int


def case_toml(n: int, transient: Transient | None) -> str:
    """The case file of the n × n problem."""
    h = 1.0 / n
    outside = (
        f"{{ mean = {T_OUT_MEAN}, amplitude = {T_OUT_AMPLITUDE}, period = {DAY} }}"
        if transient
        else f"{T_OUT_STEADY}"
    )
    capacity = (
        ("density = 1800\nspecific_heat = 1000", "density = 30\nspecific_heat = 1400")
        if transient
        else ("", "")
    )
    time_table = (
        f"\n[time]\nduration = {transient.steps * transient.dt}\nstep = {transient.dt}\n"
        f"initial_temperature = {T_START}\nsave_every = {transient.save * transient.dt}\n"
        if transient
        else ""
    )
    return f"""title = "benchmark composite, {n} x {n} cells"
[mesh]
max_cell = {h!r}
min_cell = {h!r}

[materials.masonry]
conductivity = {K_MASONRY}
{capacity[0]}

[materials.insulation]
conductivity = {K_INSULATION}
{capacity[1]}

[[regions]]
material = "masonry"
box = [0.0, 0.0, 1.0, 1.0]

[[regions]]
material = "insulation"
box = [{", ".join(map(str, INSULATION))}]

[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 1.0]]]
air_temperature = {T_IN}
resistance = {R_IN}

[[boundaries]]
name = "outside"
edges = [[[1.0, 0.0], [1.0, 1.0]]]
air_temperature = {outside}
resistance = {R_OUT}

[[probes]]
name = "centre"
at = [0.5, 0.5]
{time_table}"""


def outside_air(t: float, transient: bool) -> float:
    """Outside air temperature (°C) at ``t`` s."""
    if not transient:
        return T_OUT_STEADY
    return T_OUT_MEAN + T_OUT_AMPLITUDE * np.cos(2.0 * np.pi * t / DAY)


# --- bare scipy / pyamg ---------------------------------------------------------------------


@dataclass
class Bare:
    """The discrete problem on n × n cells: M (W/(m·K)), per-cell capacity (J/(m·K)), and
    for each side the cells and the conductance a·A (W/(m·K)) to the air."""

    n: int
    matrix: sp.csr_matrix
    capacity: np.ndarray
    sides: dict[str, tuple[np.ndarray, np.ndarray]]

    def rhs(self, t: float, transient: bool) -> np.ndarray:
        """Heat from the air into each cell at T = 0 °C, W/m."""
        b = np.zeros(self.n * self.n)
        for name, air in (("inside", T_IN), ("outside", outside_air(t, transient))):
            cells, a = self.sides[name]
            b[cells] += a * air
        return b

    def flows(self, temp: np.ndarray, t: float, transient: bool) -> dict[str, float]:
        """Heat flow into the body through each side, W/m."""
        out = {}
        for name, air in (("inside", T_IN), ("outside", outside_air(t, transient))):
            cells, a = self.sides[name]
            out[name] = float(np.sum(a * (air - temp[cells])))
        return out


def bare_assemble(n: int) -> Bare:
    """Vectorised assembly: harmonic-mean face conductances, surface resistances eliminated."""
    h = 1.0 / n
    xc = (np.arange(n) + 0.5) * h
    x, y = np.meshgrid(xc, xc)  # row j = y, column i = x
    x0, y0, x1, y1 = INSULATION
    ins = (x > x0) & (x < x1) & (y > y0) & (y < y1)
    k = np.where(ins, K_INSULATION, K_MASONRY)
    idx = np.arange(n * n).reshape(n, n)
    # face length h, half-cell distances h/2: G = 2 k1 k2 / (k1 + k2)
    gx = 2.0 * k[:, :-1] * k[:, 1:] / (k[:, :-1] + k[:, 1:])
    gy = 2.0 * k[:-1, :] * k[1:, :] / (k[:-1, :] + k[1:, :])
    own = np.concatenate([idx[:, :-1].ravel(), idx[:-1, :].ravel()])
    nbr = np.concatenate([idx[:, 1:].ravel(), idx[1:, :].ravel()])
    g = np.concatenate([gx.ravel(), gy.ravel()])
    sides = {}
    diag = np.bincount(own, g, n * n) + np.bincount(nbr, g, n * n)
    for name, col, r in (("inside", 0, R_IN), ("outside", n - 1, R_OUT)):
        gc = k[:, col] / (0.5 * h)  # cell centre to face
        a = h * gc / (1.0 + gc * r)  # in series with the surface resistance, times length
        sides[name] = (idx[:, col], a)
        diag[idx[:, col]] += a
    cells = np.arange(n * n)
    m = sp.csr_matrix(
        (
            np.concatenate([-g, diag, -g]),
            (np.concatenate([nbr, cells, own]), np.concatenate([own, cells, nbr])),
        ),
        shape=(n * n, n * n),
    )
    rho_c = np.where(ins, RHO_C_INSULATION, RHO_C_MASONRY).ravel()
    return Bare(n, m, rho_c * h * h, sides)


def one_blas_thread():
    """Context limiting BLAS to one thread (pyamg's setup is erratic with two)."""
    from threadpoolctl import threadpool_limits

    return threadpool_limits(limits=1, user_api="blas")


def bare_steady_amg(n: int) -> dict[str, float]:
    """Assembly + pyamg Ruge–Stüben setup + CG; heat flows."""
    import pyamg

    p = bare_assemble(n)
    b = p.rhs(0.0, False)
    with one_blas_thread():
        ml = pyamg.ruge_stuben_solver(p.matrix)
        x, info = spla.cg(p.matrix, b, rtol=RTOL, atol=0.0, maxiter=500, M=ml.aspreconditioner())
    if info != 0:
        raise RuntimeError("bare AMG-CG did not converge")
    return p.flows(x, 0.0, False)


def bare_steady_lu(n: int) -> dict[str, float]:
    """Assembly + SuperLU (MMD_AT_PLUS_A, symmetric mode); heat flows."""
    p = bare_assemble(n)
    lu = spla.splu(p.matrix.tocsc(), permc_spec="MMD_AT_PLUS_A", options={"SymmetricMode": True})
    return p.flows(lu.solve(p.rhs(0.0, False)), 0.0, False)


def bare_transient(n: int, tr: Transient, record: int | None = None) -> dict[str, float]:
    """Assembly, one factorisation of C/Δt + M, back-substitution per step (backward Euler);
    heat flows at the end, or after ``record`` steps."""
    p = bare_assemble(n)
    c_dt = p.capacity / tr.dt
    lu = spla.splu(
        (sp.diags(c_dt) + p.matrix).tocsc(),
        permc_spec="MMD_AT_PLUS_A",
        options={"SymmetricMode": True},
    )
    temp = np.full(n * n, T_START)
    steps = tr.steps if record is None else record
    t = 0.0
    for k in range(1, steps + 1):
        t = k * tr.dt
        temp = lu.solve(c_dt * temp + p.rhs(t, True))
    return p.flows(temp, t, True)


# --- fvheat ---------------------------------------------------------------------------------


def fvheat_api(path: Path) -> dict[str, float]:
    """Load and simulate through the Python API; heat flows at the end."""
    from fvheat.case.load import load_case
    from fvheat.simulate import simulate

    sol = simulate(load_case(path))
    if sol.balance.relative > 1e-9:
        raise RuntimeError(f"energy balance does not close: {sol.balance.relative:.1e}")
    return {name: sol.surfaces[name].heat_flow for name in BOUNDARIES}


def cli_extra(no_plots: bool) -> list[str]:
    """Options for ``fvheat run`` beyond --quiet: none (the default outputs), or
    --no-plots."""
    return ["--no-plots"] if no_plots else []


@dataclass
class CliRun:
    wall: float
    to_summary: float
    peak_mib: float
    flows: dict[str, float]


#: Runs a command and reports its exit code, wall time, start time and peak RSS. The
#: command is started from this small process, not from the benchmark: a child started
#: from a large process inherits that process's peak RSS as its own starting value.
LAUNCHER = """
import json, os, subprocess, sys, time
started = time.time()
t0 = time.perf_counter()
proc = subprocess.Popen(sys.argv[1:], stdout=subprocess.DEVNULL)
_, status, usage = os.wait4(proc.pid, 0)
wall = time.perf_counter() - t0
proc.returncode = os.waitstatus_to_exitcode(status)
print(json.dumps([proc.returncode, wall, started, usage.ru_maxrss]))
"""


def fvheat_cli(path: Path, out: Path, extra: list[str]) -> CliRun:
    """``fvheat run`` in its own process: wall time, time to summary.json, peak RSS."""
    cmd = [sys.executable, "-m", "fvheat", "run", str(path), "--quiet", "--out", str(out), *extra]
    done = subprocess.run(
        [sys.executable, "-c", LAUNCHER, *cmd], capture_output=True, text=True, check=False
    )
    code, wall, started, maxrss = json.loads(done.stdout.strip().splitlines()[-1])
    if code != 0:
        raise RuntimeError(f"{' '.join(cmd)} failed:\n{done.stderr}")
    summary_file = out / "summary.json"
    summary = json.loads(summary_file.read_text(encoding="utf-8"))
    return CliRun(
        wall=wall,
        to_summary=summary_file.stat().st_mtime - started,
        peak_mib=maxrss / 1024.0,  # kB on Linux
        flows={name: summary["boundaries"][name]["heat_flow"] for name in BOUNDARIES},
    )


def cli_row(label: str, case: Path, out: Path, extra: list[str], repeat: int) -> Row:
    """Median wall time and time to summary.json of ``repeat`` fvheat processes."""
    runs = [fvheat_cli(case, out, extra) for _ in range(repeat)]
    to_summary = statistics.median(r.to_summary for r in runs)
    row = Row(
        label,
        "cli",
        statistics.median(r.wall for r in runs),
        max(r.peak_mib for r in runs),
        runs[-1].flows,
        f"(to summary.json {to_summary:.2f} s)",
    )
    row.extra["to_summary"] = to_summary
    return row


# --- FiPy -----------------------------------------------------------------------------------


def fipy_available() -> bool:
    try:
        import fipy  # noqa: F401
    except Exception:  # any failure to import means: not usable here
        return False
    return True


def _fipy_problem(n: int, transient: bool):
    import fipy as fp

    h = 1.0 / n
    mesh = fp.Grid2D(dx=h, dy=h, nx=n, ny=n)  # cell id = i + n·j, as in bare_assemble
    p = bare_assemble(n)
    k = fp.CellVariable(mesh=mesh, value=_k_cells(n))
    volume = h * h
    beta = np.zeros(n * n)  # W/(m³·K): surface conductance per unit cell volume
    for cells, a in p.sides.values():
        beta[cells] += a / volume
    beta_var = fp.CellVariable(mesh=mesh, value=beta)
    source = fp.CellVariable(mesh=mesh, value=p.rhs(0.0, transient) / volume)
    temp = fp.CellVariable(mesh=mesh, value=T_START, hasOld=transient)
    rhs = fp.DiffusionTerm(coeff=k.harmonicFaceValue) - fp.ImplicitSourceTerm(coeff=beta_var)
    if transient:
        rho_c = fp.CellVariable(mesh=mesh, value=p.capacity / volume)
        eq = fp.TransientTerm(coeff=rho_c) == rhs + source
    else:
        eq = rhs + source == 0
    return p, eq, temp, source, volume


def _k_cells(n: int) -> np.ndarray:
    h = 1.0 / n
    xc = (np.arange(n) + 0.5) * h
    x, y = np.meshgrid(xc, xc)
    x0, y0, x1, y1 = INSULATION
    return np.where((x > x0) & (x < x1) & (y > y0) & (y < y1), K_INSULATION, K_MASONRY).ravel()


def fipy_steady(n: int) -> dict[str, float]:
    """FiPy's default solver on the steady problem; heat flows."""
    p, eq, temp, _, _ = _fipy_problem(n, False)
    eq.solve(var=temp)
    return p.flows(np.asarray(temp.value), 0.0, False)


def fipy_transient(n: int, tr: Transient) -> tuple[dict[str, float], float]:
    """FiPy's default solver, ``tr.fipy_steps`` backward-Euler steps; heat flows and the
    time of the stepping loop alone (s)."""
    p, eq, temp, source, volume = _fipy_problem(n, True)
    t = 0.0
    t0 = time.perf_counter()
    for k in range(1, tr.fipy_steps + 1):
        t = k * tr.dt
        temp.updateOld()
        source.setValue(p.rhs(t, True) / volume)
        eq.solve(var=temp, dt=tr.dt)
    loop = time.perf_counter() - t0
    return p.flows(np.asarray(temp.value), t, True), loop


# --- measuring ------------------------------------------------------------------------------


def _status_kib(key: str) -> float | None:
    try:
        for line in Path("/proc/self/status").read_text().splitlines():
            if line.startswith(key + ":"):
                return float(line.split()[1])
    except OSError:
        return None
    return None


def reset_peak() -> bool:
    """Return freed memory to the system and reset this process's peak RSS (Linux ≥ 4.0);
    False where the reset is not possible."""
    gc.collect()
    try:
        ctypes.CDLL("libc.so.6").malloc_trim(0)
    except (OSError, AttributeError):
        pass
    try:
        Path("/proc/self/clear_refs").write_text("5")
    except OSError:
        return False
    return True


def peak_mib() -> float:
    """Peak RSS of this process (since the last reset), MiB."""
    kib = _status_kib("VmHWM")
    if kib is None:
        import resource

        kib = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return kib / 1024.0


@dataclass
class Row:
    problem: str
    path: str
    wall: float
    peak: float | None
    flows: dict[str, float]
    note: str = ""
    extra: dict[str, float] = field(default_factory=dict)


def timed(fn: Callable[[], Any], repeat: int) -> tuple[float, Any, float]:
    """Median wall time (s) of ``repeat`` calls, the last result, the largest peak RSS (MiB)."""
    times, peaks, result = [], [], None
    for _ in range(repeat):
        reset_peak()
        t0 = time.perf_counter()
        result = fn()
        times.append(time.perf_counter() - t0)
        peaks.append(peak_mib())
    return statistics.median(times), result, max(peaks)


def disagreement(flows: dict[str, float], ref: dict[str, float]) -> float:
    """Largest heat-flow difference relative to the largest reference heat flow."""
    scale = max(abs(v) for v in ref.values())
    return max(abs(flows[k] - ref[k]) for k in ref) / scale


# --- the run --------------------------------------------------------------------------------


def warm_up(use_fipy: bool) -> None:
    """Import everything the in-process paths use, so no timing includes an import."""
    import pyamg  # noqa: F401

    import fvheat.case.load
    import fvheat.simulate  # noqa: F401

    if use_fipy:
        import fipy  # noqa: F401


def machine() -> list[str]:
    """Lines describing the machine and the numerical libraries."""
    from threadpoolctl import threadpool_info

    cpu = platform.processor() or "?"
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    import pyamg

    blas = ", ".join(
        f"{i.get('internal_api')} {i.get('version')} ({i.get('architecture')}, "
        f"{i.get('num_threads')} threads)"
        for i in threadpool_info()
        if i.get("user_api") == "blas"
    )
    env = {k: os.environ[k] for k in ("OPENBLAS_CORETYPE", "OPENBLAS_L2_SIZE") if k in os.environ}
    return [
        f"machine: {os.cpu_count()} cores, {cpu}, Python {platform.python_version()}",
        f"numpy {np.__version__}, scipy {scipy.__version__}, pyamg {pyamg.__version__}",
        f"BLAS: {blas or 'unknown'}" + (f"; {env}" if env else ""),
    ]


def run(args: argparse.Namespace) -> int:
    work = Path(args.work) if args.work else Path(tempfile.mkdtemp(prefix="fvheat-bench-"))
    work.mkdir(parents=True, exist_ok=True)
    sizes = args.sizes or ([10, 20] if args.quick else [250, 500, 1000, 2000])
    tn = args.transient_n or (10 if args.quick else 300)
    steps = args.steps or (6 if args.quick else 300)
    tr = Transient(steps=steps, dt=600.0, save=min(10, steps), fipy_steps=min(20, steps))
    bad = [n for n in [*sizes, tn] if n % 10]
    if bad:
        raise SystemExit(
            f"cells per side must be multiples of 10 (the grid must fit the block): {bad}"
        )
    use_fipy = fipy_available() and not args.no_fipy
    warm_up(use_fipy)
    extra = cli_extra(args.cli_no_plots)
    rows: list[Row] = []
    lines = machine()
    for line in lines:
        print(line, flush=True)
    print(f"cases and outputs in {work}; fvheat run options: --quiet {' '.join(extra)}", flush=True)

    def add(row: Row) -> None:
        rows.append(row)
        peak = "" if row.peak is None else f", peak {row.peak:.0f} MiB"
        print(f"  {row.problem:>22s} {row.path:<8s} {row.wall:8.2f} s{peak} {row.note}", flush=True)

    # steady sizes
    for n in sizes:
        label = f"steady {n * n:,}"
        case = work / f"steady_{n}.toml"
        case.write_text(case_toml(n, None), encoding="utf-8")
        t, ref, pk = timed(lambda n=n: bare_steady_amg(n), args.repeat)
        add(Row(label, "bare", t, pk, ref))
        if not args.no_lu and n * n <= args.lu_limit:
            t, f, pk = timed(lambda n=n: bare_steady_lu(n), args.repeat)
            add(Row(label, "bare-lu", t, pk, f))
        t, f, pk = timed(lambda case=case: fvheat_api(case), args.repeat)
        add(Row(label, "api", t, pk, f))
        # --quick: one fvheat process per problem (the largest steady size) is enough
        if not args.no_cli and (not args.quick or n == sizes[-1]):
            add(cli_row(label, case, work / f"out_steady_{n}", extra, args.repeat))
        if use_fipy and n * n <= args.fipy_limit:
            t, f, pk = timed(lambda n=n: fipy_steady(n), 1)
            add(Row(label, "fipy", t, pk, f))

    # transient
    label = f"transient {tn * tn:,}×{tr.steps}"
    case = work / f"transient_{tn}.toml"
    case.write_text(case_toml(tn, tr), encoding="utf-8")
    t, ref, pk = timed(lambda: bare_transient(tn, tr), args.repeat)
    add(Row(label, "bare", t, pk, ref))
    t, f, pk = timed(lambda: fvheat_api(case), args.repeat)
    add(Row(label, "api", t, pk, f))
    if not args.no_cli:
        add(cli_row(label, case, work / f"out_transient_{tn}", extra, args.repeat))
    fipy_step = None
    if use_fipy:
        early = bare_transient(tn, tr, record=tr.fipy_steps)
        reset_peak()
        t0 = time.perf_counter()
        f, loop = fipy_transient(tn, tr)
        t = time.perf_counter() - t0
        fipy_step = loop / tr.fipy_steps
        note = f"({tr.fipy_steps} steps only; {1000 * fipy_step:.0f} ms/step)"
        row = Row(label, "fipy", t, peak_mib(), f, note)
        row.extra["reference"] = disagreement(f, early)
        add(row)

    more = measure_more(args, work, sizes)
    report(rows, sizes, tn, tr, fipy_step, args.quick, more)
    bad = [r for r in rows if _agreement(r, rows) > AGREEMENT]
    return 1 if bad else 0


def measure_more(args: argparse.Namespace, work: Path, sizes: list[int]) -> dict[str, Any]:
    """Figures, codecs, start-up and sweeps (see the module docstring), printed as they
    are measured."""
    import bench_targets as bt

    more: dict[str, Any] = {}
    if not args.no_figures:
        picks = sorted({sizes[0], min(sizes, key=lambda n: abs(n * n - 1_000_000))})
        more["figures"] = {}
        for n in picks:
            sec, cpu, par, cells = bt.figure_seconds(work / f"steady_{n}.toml", work, args.repeat)
            more["figures"][cells] = (sec, cpu, par)
            print(
                f"  figures of a steady run, {cells:,} cells, from memory: {sec:.2f} s "
                f"(CPU {cpu:.2f} s) one after the other; {par:.2f} s in the run's "
                "figure workers",
                flush=True,
            )
    if not args.no_codecs:
        n = min(sizes, key=lambda n: abs(n * n - 250_000))
        names = ("none", "zlib") if args.quick else ("none", "zlib", "lzma")
        more["codecs"] = (n * n, bt.codecs(work / f"steady_{n}.toml", work, names))
        for c in more["codecs"][1]:
            print(
                f"  VTU {c.name:>8s}, {n * n:,} cells: write {c.write:.2f} s, read {c.read:.2f} s, "
                f"{c.mib:.1f} MiB, read back equal: {c.same}",
                flush=True,
            )
    if not args.no_startup:
        tiny = work / "steady_tiny.toml"
        tiny.write_text(case_toml(10, None), encoding="utf-8")
        more["startup"] = bt.startup(work, tiny, repeat=3 if args.quick else 5)
        for label, st in more["startup"].items():
            bad = f"; imports {', '.join(st.forbidden)}" if st.forbidden else ""
            print(
                f"  start-up, {label}: {st.wall:.2f} s (imports {st.imports:.2f} s){bad}",
                flush=True,
            )
    if not args.no_sweep:
        few, many = (2, 6) if args.quick else (2, 32)
        cost = bt.sweep_cost(work, few, many, 1 if args.quick else args.repeat)
        more["sweep"] = cost
        print(
            f"  balcony demo, load + mesh + solve in this process: {cost.study:.3f} s", flush=True
        )
        for k, v in cost.per_variant.items():
            print(f"  sweep of the balcony demo, {k}: {v:.3f} s per variant", flush=True)
    return more


def _agreement(row: Row, rows: list[Row]) -> float:
    if "reference" in row.extra:
        return row.extra["reference"]
    ref = next(r for r in rows if r.problem == row.problem and r.path == "bare")
    return disagreement(row.flows, ref.flows)


def verdict(ok: bool) -> str:
    return "PASS" if ok else "FAIL"


def report(
    rows: list[Row],
    sizes: list[int],
    tn: int,
    tr: Transient,
    fipy_step: float | None,
    quick: bool,
    more: dict[str, Any] | None = None,
) -> None:
    """Print the table, the fitted exponents and the targets."""
    print()
    head = (
        f"{'problem':<24s} {'path':<8s} {'wall s':>9s} {'× bare':>8s} {'peak MiB':>9s} "
        f"{'Δflow rel':>10s}  note"
    )
    print(head)
    print("-" * len(head))
    bare = {r.problem: r.wall for r in rows if r.path == "bare"}
    for r in rows:
        ratio = r.wall / bare[r.problem]
        peak = "" if r.peak is None else f"{r.peak:9.0f}"
        print(
            f"{r.problem:<24s} {r.path:<8s} {r.wall:9.2f} {ratio:8.2f} {peak:>9s} "
            f"{_agreement(r, rows):10.1e}  {r.note}"
        )
    print(
        f"(heat flows agree when Δflow rel ≤ {AGREEMENT:g}; FiPy's transient is compared after "
        f"{tr.fipy_steps} steps with the bare loop)"
    )

    def wall(problem: str, path: str) -> float | None:
        return next((r.wall for r in rows if r.problem == problem and r.path == path), None)

    def to_summary(problem: str, path: str) -> float | None:
        return next(
            (r.extra["to_summary"] for r in rows if r.problem == problem and r.path == path),
            None,
        )

    cells = np.array([n * n for n in sizes], float)
    print()
    for path in ("bare", "api", "cli"):
        t = [wall(f"steady {n * n:,}", path) for n in sizes]
        if len(sizes) > 1 and all(v is not None for v in t):
            slope = np.polyfit(np.log(cells), np.log(np.asarray(t, float)), 1)[0]
            print(
                f"steady cost exponent ({path}, {sizes[0] ** 2:,} to {sizes[-1] ** 2:,} cells): "
                f"N^{slope:.2f}"
            )

    print()
    print("targets" + (" (quick mode: sizes too small to mean anything)" if quick else "") + ":")
    mid = min(sizes, key=lambda n: abs(n * n - 1_000_000))
    steady = f"steady {mid * mid:,}"
    transient = f"transient {tn * tn:,}×{tr.steps}"
    b_s, fp = wall(steady, "bare"), wall(steady, "fipy")
    b_t = wall(transient, "bare")
    for what, cli in (("summary.json written", to_summary), ("all outputs written", wall)):
        c_s, c_t = cli(steady, "cli"), cli(transient, "cli")
        if c_s is None or c_t is None:
            continue
        # to summary.json: the earlier targets; all outputs: this (default outputs)
        lim_s, lim_t = (2.0, 1.5) if what.startswith("summary") else (1.5, 1.3)
        outputs = cli is wall  # the all-outputs rows: say what came after summary.json
        m_s, m_t = to_summary(steady, "cli"), to_summary(transient, "cli")
        after_s = _after_summary(c_s, m_s, b_s) if outputs and m_s is not None else ""
        after_t = _after_summary(c_t, m_t, b_t) if outputs and m_t is not None else ""
        print(f"  fvheat run, process start to {what}:")
        print(
            f"    {steady}: / bare assembly+AMG-CG = {c_s / b_s:.2f} (target ≤ {lim_s:g}) "
            f"{verdict(c_s / b_s <= lim_s)}{after_s}"
        )
        if fp is not None:
            print(
                f"    {steady}: FiPy / fvheat run = {fp / c_s:.1f} (target ≥ 5) "
                f"{verdict(fp / c_s >= 5)}"
            )
        print(
            f"    {transient}: / bare factorise-once loop = {c_t / b_t:.2f} (target ≤ {lim_t:g}) "
            f"{verdict(c_t / b_t <= lim_t)}{after_t}"
        )
        if fipy_step is not None:
            per_step = c_t / tr.steps
            ratio = fipy_step / per_step
            print(
                f"    {transient}: FiPy per step / fvheat run per step = "
                f"{ratio:.1f} (target ≥ 10; fvheat {1000 * per_step:.1f} ms/step) "
                f"{verdict(ratio >= 10)}"
            )
    big = f"steady {sizes[-1] ** 2:,}"
    peak = next((r.peak for r in rows if r.problem == big and r.path == "cli"), None)
    if peak is not None:
        print(
            f"  {big}: fvheat run took {wall(big, 'cli'):.1f} s, peak {peak / 1024:.2f} GiB "
            f"(target: completes within 24 GiB) {verdict(peak / 1024 <= 24)}"
        )
    if more:
        report_more(more)


def _after_summary(end: float, mid: float, bare: float) -> str:
    """For an all-outputs row (run ``end`` s, summary.json at ``mid`` s): the time after
    summary.json (the outputs) and the ratio the run would have with outputs at no cost
    (its summary.json ratio): the floor that start-up, meshing, checks and the solve set."""
    return f"\n      ({end - mid:.2f} s after summary.json; with outputs free: {mid / bare:.2f})"


def report_more(more: dict[str, Any]) -> None:
    """The targets of the output, start-up and sweep measurements."""
    figs = more.get("figures")
    if figs:
        big = max(figs)
        wall, cpu, par = figs[big]
        print(
            f"  figures of a steady run at {big:,} cells, as fvheat run draws them (figure "
            f"workers): {par:.2f} s; one after the other {wall:.2f} s, CPU {cpu:.2f} s "
            f"(target ≤ 1.5 s) {verdict(par <= 1.5)}"
        )
        small = min(figs)
        if small != big:
            r = figs[big][1] / figs[small][1]
            print(
                f"  figures, CPU time: {big:,} cells / {small:,} cells = {r:.2f} "
                f"(target: independent of the cell count, ≤ 1.3) {verdict(r <= 1.3)}"
            )
    codecs = more.get("codecs")
    if codecs:
        cells, rows = codecs
        ok = all(c.same for c in rows)
        fastest = min(rows, key=lambda c: c.write)
        print(
            f"  field files read back by meshio with every codec at {cells:,} cells: "
            f"{verdict(ok)} (fastest to write: {fastest.name}; written in the background "
            "while the figures draw)"
        )
    for label, st in (more.get("startup") or {}).items():
        if label.startswith("fvheat"):
            what = ", ".join(st.forbidden) if st.forbidden else "nothing it does not use"
            print(
                f"  start-up, {label}: {st.wall:.2f} s, imports {what} "
                f"(target: only what it uses) {verdict(not st.forbidden)}"
            )
    cost = more.get("sweep")
    if cost is not None:
        for k, v in cost.overhead.items():
            print(
                f"  sweep overhead per variant, balcony demo, {k}: {v:.3f} s "
                f"(target < 0.15 s) {verdict(v < 0.15)}"
            )
        if cost.scaling is not None:
            print(
                f"  sweep throughput, 2 workers / 1 worker: {cost.scaling:.2f} "
                f"(target: near-linear, ≥ 1.7 on 2 cores) {verdict(cost.scaling >= 1.7)}"
            )


def sensitivity_overhead(work: Path, repeat: int, quick: bool) -> int:
    """Adjoint sensitivities against the same run without them (issue target: at most 1.3×):
    the junction demos (direct solver; the ground floor on AMG-CG) and, unless ``quick``, a
    250 000-cell section of :func:`case_toml` (AMG-CG). Median wall times of ``repeat`` runs
    of the library calls (mesh, solves, junction evaluation; no files written)."""
    from fvheat.case.load import load_case
    from fvheat.sensitivity.quantities import case_for_sensitivities, study_sensitivities
    from fvheat.study import run_study

    root = Path(__file__).resolve().parents[1] / "cases"
    cases = [
        root / f
        for f in (
            "balcony_slab.toml",
            "wall_window_junction.toml",
            "window_frame_section.toml",
            "ground_floor_edge.toml",  # 65 767 cells: AMG-CG
        )
    ]
    if not quick:
        big = work / "steady_500.toml"
        big.write_text(case_toml(500, None), encoding="utf-8")
        cases.append(big)
    print(
        "sensitivities: run without them / the run with them (direct solver preferred up to "
        "150 000 cells) / ratio (target ≤ 1.3)"
    )
    worst = 0.0
    for path in cases:
        case = load_case(path)
        tuned = case_for_sensitivities(case)
        base, full = [], []
        for _ in range(max(repeat, 3)):
            t0 = time.perf_counter()
            run_study(case, check_grid=False, keep_fields=False)
            t1 = time.perf_counter()
            study = run_study(tuned, check_grid=False, keep_fields=False)
            sens = study_sensitivities(study)
            full.append(time.perf_counter() - t1)
            base.append(t1 - t0)
        b, f = statistics.median(base), statistics.median(full)
        worst = max(worst, f / b)
        print(
            f"  {path.name:28s} {study.solution.mesh.n_cells:>8,} cells "
            f"{len(sens.quantities):2d} quantities × {len(sens.parameters):2d} keys: "
            f"{b:7.3f} s / {f:7.3f} s = {f / b:5.2f}×",
            flush=True,
        )
    return 0 if worst <= 1.3 else 1


def triangles_vs_grid(nodes: int, repeat: int = 1) -> int:
    """The steady problem at about ``nodes`` unknowns on the rectilinear grid and on the
    triangle mesh (``[mesh] kind = "triangles"``, uniform edges), end to end in this process
    (load, mesh, assemble, solve, evaluate), then as ``fvheat run`` processes with the
    default outputs; prints both and their ratios. The same heat flows are expected within
    the discretisation error (both second order)."""
    from fvheat.case.load import load_case
    from fvheat.mesh.select import build_mesh
    from fvheat.simulate import simulate

    n = max(2, round(nodes**0.5))
    grid_text = case_toml(n, None)
    # the triangle mesh keeps its areas below 1.3 × that of an equilateral triangle of the
    # target edge h: about 1.8 nodes per h² here (measured)
    h = (1.8 / nodes) ** 0.5
    old = f"max_cell = {1.0 / n!r}\nmin_cell = {1.0 / n!r}"
    tri_text = grid_text.replace(old, f'max_cell = {h!r}\nmin_cell = {h!r}\nkind = "triangles"')
    times, results, meshing, walls = {}, {}, {}, {}
    with tempfile.TemporaryDirectory() as work:
        for label, text in (("rectilinear", grid_text), ("triangles", tri_text)):
            path = Path(work) / f"{label}.toml"
            path.write_text(text, encoding="utf-8")
            spent: list[float] = []

            def job(path: Path = path, spent: list[float] = spent) -> tuple[int, float]:
                case = load_case(path)
                t0 = time.perf_counter()
                mesh = build_mesh(case)
                spent.append(time.perf_counter() - t0)
                sol = simulate(case, mesh=mesh)
                return sol.mesh.n_cells, sol.surfaces["inside"].heat_flow

            times[label], results[label], _ = timed(job, repeat)
            meshing[label] = statistics.median(spent)
            # the same case as `fvheat run` processes with every default output (field
            # files, cells.csv, figures, report): what the user waits for
            walls[label] = cli_row(label, path, Path(work) / f"out_{label}", [], repeat)
    for label in times:
        cells, flow = results[label]
        print(
            f"{label:12s} {cells:9d} unknowns  {times[label]:7.2f} s  inside {flow:.6f} W/m"
            f"  (meshing {meshing[label]:.2f} s, median)"
        )
    print(f"triangles / rectilinear wall time: {times['triangles'] / times['rectilinear']:.2f}")
    for label, row in walls.items():
        print(f"{label:12s} fvheat run, default outputs: {row.wall:7.2f} s {row.note}")
    ratio = walls["triangles"].wall / walls["rectilinear"].wall
    print(f"triangles / rectilinear, fvheat run: {ratio:.2f}")
    return 0


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--quick", action="store_true", help="tiny sizes: a smoke test of a few s")
    ap.add_argument("--sizes", type=int, nargs="+", help="steady cells per side")
    ap.add_argument("--transient-n", type=int, help="transient cells per side")
    ap.add_argument("--steps", type=int, help="transient steps")
    ap.add_argument("--repeat", type=int, default=1, help="medians of this many runs")
    ap.add_argument("--no-fipy", action="store_true", help="skip FiPy even when installed")
    ap.add_argument("--no-cli", action="store_true", help="skip the fvheat run processes")
    ap.add_argument("--no-lu", action="store_true", help="skip the bare SuperLU steady solves")
    ap.add_argument("--lu-limit", type=int, default=1_100_000, help="largest bare-lu problem")
    ap.add_argument("--fipy-limit", type=int, default=1_100_000, help="largest FiPy steady problem")
    ap.add_argument("--work", help="folder for cases and outputs [default: a new temporary one]")
    ap.add_argument("--cli-no-plots", action="store_true", help="fvheat run with --no-plots")
    ap.add_argument("--no-figures", action="store_true", help="skip the figure timing")
    ap.add_argument("--no-codecs", action="store_true", help="skip the VTU codec measurement")
    ap.add_argument("--no-startup", action="store_true", help="skip the start-up measurement")
    ap.add_argument("--no-sweep", action="store_true", help="skip the sweep measurement")
    ap.add_argument("--sensitivities", action="store_true", help="only the adjoint overhead")
    ap.add_argument(
        "--triangles", type=int, metavar="NODES", help="only: triangle mesh vs grid at NODES"
    )
    args = ap.parse_args(argv)
    if args.triangles:
        return triangles_vs_grid(args.triangles, args.repeat)
    if args.sensitivities:
        work = Path(args.work or tempfile.mkdtemp(prefix="fvheat-bench-"))
        return sensitivity_overhead(work, args.repeat, args.quick)
    return run(args)


if __name__ == "__main__":
    sys.exit(main())
