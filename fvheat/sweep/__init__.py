"""Parameter sweeps: many variants of one case, run in parallel, recorded in a resumable
SQLite store, exported as one table and plotted.

Modules: :mod:`~fvheat.sweep.variants` (``--vary`` grids and zips),
:mod:`~fvheat.sweep.variants_file` (CSV / TOML variant lists), :mod:`~fvheat.sweep.store`
(the SQLite store), :mod:`~fvheat.sweep.worker` (one variant, as ``fvheat run``),
:mod:`~fvheat.sweep.local_executor` and :mod:`~fvheat.sweep.dask_executor` (where variants
run), :mod:`~fvheat.sweep.runner` (the coordinator), :mod:`~fvheat.sweep.identity` (the
input files' SHA-256), :mod:`~fvheat.sweep.folders` (variant folders on a resume),
:mod:`~fvheat.sweep.signals` (holding signals back), :mod:`~fvheat.sweep.table` (export)
and :mod:`~fvheat.sweep.plot` (figures).

From Python::

    from fvheat.sweep import LocalExecutor, plan_sweep, run_sweep, vary_variants
    keys, variants = vary_variants(["materials.slab.conductivity=1.6,2.3"])
    plan = plan_sweep("cases/balcony_slab.toml", (), keys, variants, "sweep_out")
    report = run_sweep(plan, LocalExecutor(jobs=2))
"""

from fvheat.sweep.local_executor import LocalExecutor, default_jobs
from fvheat.sweep.runner import SweepPlan, SweepReport, plan_sweep, run_sweep
from fvheat.sweep.store import Row, SweepStore
from fvheat.sweep.table import Table, collect, csv_text, from_store, write_csv
from fvheat.sweep.variants import Variant, vary_variants
from fvheat.sweep.variants_file import read_variants_file

__all__ = [
    "LocalExecutor",
    "Row",
    "SweepPlan",
    "SweepReport",
    "SweepStore",
    "Table",
    "Variant",
    "collect",
    "csv_text",
    "default_jobs",
    "from_store",
    "plan_sweep",
    "read_variants_file",
    "run_sweep",
    "vary_variants",
    "write_csv",
]
