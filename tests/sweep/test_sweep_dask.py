"""``fvheat sweep --scheduler``: the same table from a Dask cluster as from local workers."""

from __future__ import annotations

import pytest

from fvheat.cli.main import main

from .conftest import CASE, COARSE, VARY_2X3

distributed = pytest.importorskip("distributed")


def test_dask_cluster_gives_the_same_table_as_local_workers(sweep_2x3, tmp_path):
    _, local_table = sweep_2x3
    out = tmp_path / "dask_sweep"
    table = tmp_path / "dask.csv"
    with distributed.LocalCluster(
        n_workers=2,
        threads_per_worker=1,
        processes=True,
        host="127.0.0.1",
        dashboard_address=None,
    ) as cluster:
        args = ["sweep", str(CASE), *VARY_2X3, *COARSE, "-o", str(out), "-q"]
        code = main([*args, "--scheduler", cluster.scheduler_address, "--table", str(table)])
        assert code == 0
    assert table.read_text() == local_table.read_text()


def test_unreachable_scheduler_is_bad_input(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr("fvheat.sweep.dask_executor.CONNECT_TIMEOUT", 1)
    args = ["sweep", str(CASE), "--vary", "mesh.max_cell=0.1", "-o", str(tmp_path / "s")]
    assert main([*args, "--scheduler", "tcp://127.0.0.1:9"]) == 2
    err = capsys.readouterr().err
    assert "--scheduler tcp://127.0.0.1:9: cannot reach the Dask scheduler" in err
