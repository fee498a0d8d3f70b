"""``fvheat sweep --scheduler``: the same table from a Dask cluster as from local workers."""

from __future__ import annotations

import contextlib
import random
import socket
import subprocess
import sys
import threading

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


class Server:
    """A TCP server on 127.0.0.1 that is not a Dask scheduler: it answers every connection
    with bytes that are not Dask's protocol (``garbage``), or never answers at all."""

    def __init__(self, garbage: bool):
        self.sock = socket.create_server(("127.0.0.1", 0))
        self.address = f"tcp://127.0.0.1:{self.sock.getsockname()[1]}"
        self.garbage = garbage
        self.open: list[socket.socket] = []
        threading.Thread(target=self.serve, daemon=True).start()

    def serve(self) -> None:
        rng = random.Random(3)
        while True:
            try:
                conn, _ = self.sock.accept()
            except OSError:  # closed
                return
            self.open.append(conn)
            if self.garbage:
                with contextlib.suppress(OSError):
                    conn.sendall(rng.randbytes(256))

    def close(self) -> None:
        for conn in self.open:
            conn.close()
        self.sock.close()


@pytest.fixture
def server(request):
    s = Server(garbage=request.param == "garbage")
    yield s
    s.close()


def sweep_on(address: str, out) -> list[str]:
    return [
        "sweep",
        str(CASE),
        "--vary",
        "mesh.max_cell=0.1",
        "-o",
        str(out),
        "--scheduler",
        address,
    ]


@pytest.mark.parametrize(
    ("server", "message"),
    [
        ("garbage", "no Dask scheduler answers there"),
        ("silent", "no answer from a Dask scheduler within 1 s"),
    ],
    indirect=["server"],
)
def test_a_server_that_is_not_a_scheduler_is_bad_input(
    tmp_path, capsys, monkeypatch, server, message
):
    monkeypatch.setattr("fvheat.sweep.dask_executor.CONNECT_TIMEOUT", 1)
    out = tmp_path / "s"
    assert main(sweep_on(server.address, out)) == 2
    err = capsys.readouterr().err
    assert err == f"fvheat: error: --scheduler {server.address}: {message}\n"
    assert not out.exists()


@pytest.mark.parametrize(
    ("address", "message"),
    [
        ("nonsense", "not a scheduler address (missing port number"),
        ("tcp://127.0.0.1:notaport", "not a scheduler address (invalid literal"),
        (
            "ftp://127.0.0.1:9",
            "no Dask scheduler answers there (ValueError: unknown address scheme",
        ),
    ],
)
def test_a_malformed_scheduler_address_is_bad_input(tmp_path, capsys, address, message):
    assert main(sweep_on(address, tmp_path / "s")) == 2
    err = capsys.readouterr().err
    assert err.startswith(f"fvheat: error: --scheduler {address}: {message}")
    assert err.count("\n") == 1


@pytest.mark.parametrize("server", ["garbage"], indirect=True)
def test_no_traceback_when_the_program_ends_after_a_bad_scheduler(tmp_path, server):
    # a client that failed to start used to hang a minute at exit, then print a traceback
    result = subprocess.run(
        [sys.executable, "-m", "fvheat", *sweep_on(server.address, tmp_path / "s")],
        capture_output=True,
        text=True,
        timeout=120,
        check=False,
    )
    assert result.returncode == 2
    assert result.stderr.startswith(f"fvheat: error: --scheduler {server.address}: ")
    assert "Traceback" not in result.stderr and "Exception ignored" not in result.stderr
