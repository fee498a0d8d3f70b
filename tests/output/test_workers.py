"""Figure workers (fvheat.output.workers): ``fvheat run`` draws its figures in forked
processes while it writes the field files. The pictures and the figure index must be those
the run draws itself, an error in a worker must reach the run, and a run that fails must
leave no worker behind."""

from __future__ import annotations

import json
import multiprocessing
import os
import threading
import time
from pathlib import Path

import numpy as np
import pytest

from fvheat.output.workers import FigureWorkers, worker_count

from .conftest import CASES, coarse_overrides, run_cli

pytestmark = pytest.mark.skipif(worker_count(2) == 0, reason="needs fork and two cores")


def _run(stem: str, out: Path, workers: FigureWorkers | None) -> None:
    from fvheat.run import run_to_folder

    (path,) = [c for c in CASES if c.stem == stem]
    run_to_folder(path, out, tuple(coarse_overrides(path)), workers=workers)


@pytest.mark.parametrize("stem", ["balcony_slab", "wall_daily_cycle", "eaves_pitched_roof"])
def test_workers_draw_the_figures_the_run_draws_itself(tmp_path, stem):
    from matplotlib.image import imread

    here, there = tmp_path / "here", tmp_path / "there"
    _run(stem, here, None)
    with FigureWorkers(2) as workers:
        assert len(workers) == 2
        _run(stem, there, workers)
    index = json.loads((here / "figures" / "figures.json").read_text(encoding="utf-8"))
    assert json.loads((there / "figures" / "figures.json").read_text(encoding="utf-8")) == index
    assert len(index) >= 4
    for entry in index:
        a, b = imread(here / entry["png"]), imread(there / entry["png"])
        assert a.shape == b.shape and np.array_equal(a, b), entry["name"]
    assert (there / "report.html").read_text(encoding="utf-8").count("<img") == len(index)


def _fails(message: str) -> None:
    raise ValueError(message)


def _dies() -> None:
    os._exit(3)


def _pid() -> int:
    return os.getpid()


def test_an_error_in_a_worker_is_raised_in_the_run():
    with FigureWorkers(2) as workers:
        workers.submit(_fails, [("bad figure",), ("bad figure",)])
        with pytest.raises(ValueError, match="bad figure"):
            workers.results()
        # the workers stay usable, each in its own process
        workers.submit(_pid, [(), ()])
        pids = workers.results()
        assert len(set(pids)) == 2 and os.getpid() not in pids


def _sleep_then_pid(seconds: float) -> int:
    time.sleep(seconds)
    return os.getpid()


def test_jobs_queue_behind_a_busy_worker_and_come_back_in_the_order_sent():
    """A job sent to a worker that is still busy runs after its earlier job; a free worker
    starts at once; the answers come back in the order the jobs were sent."""
    with FigureWorkers(2) as workers:
        workers.submit(_pid, [(), ()])
        first, second = workers.results()
        workers.submit(_sleep_then_pid, [(1.0,)], to=[0])
        time.sleep(0.3)
        assert workers.working() == [True, False]
        t0 = time.perf_counter()
        workers.submit(_sleep_then_pid, [(0.0,), (0.2,)], to=[1, 0])
        assert workers.results() == [first, second, first]
        # the free worker did not wait for the busy one; the busy one's second job did
        assert 0.6 < time.perf_counter() - t0 < 3.0
        assert workers.working() == [False, False]


def test_figures_go_first_to_the_worker_that_is_free():
    """split_figures: the largest figure to the worker with nothing left to draw, the
    worker still drawing (the mesh figure) gets less."""
    from fvheat.output.plots.figures import FIGURE_COST, split_figures

    names = ["temperature", "heat_flux", "temperature_surface"]
    busy = split_figures(names, 2, [FIGURE_COST["mesh"], 0.0])
    assert busy[1][0] == "temperature" and len(busy[1]) == 2 and len(busy[0]) == 1
    assert split_figures(names, 2) == [["temperature", "heat_flux"], ["temperature_surface"]]
    assert split_figures(["probes"], 2) == [["probes"], []]


def test_a_worker_that_dies_is_an_error_not_a_hang():
    with FigureWorkers(1) as workers:
        workers.submit(_dies, [()])
        with pytest.raises(RuntimeError, match="ended without an answer"):
            workers.results()


def test_a_failed_run_stops_its_workers_at_once(tmp_path, capsys):
    bad = tmp_path / "bad.toml"
    bad.write_text("[mesh]\nmax_cell = -1\n", encoding="utf-8")
    t0 = time.perf_counter()
    assert run_cli(["run", bad, "-o", tmp_path / "out", "-q"]) == 2
    assert time.perf_counter() - t0 < 5.0  # CLOSE_WAIT: the run did not wait for them
    assert multiprocessing.active_children() == []
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "Traceback" not in err[0]


def test_no_workers_without_a_request():
    assert worker_count(0) == 0
    with FigureWorkers(0) as workers:
        assert len(workers) == 0


class _Awkward(Exception):
    """An error holding something that does not pickle (a lock)."""

    def __init__(self, text: str) -> None:
        super().__init__(text)
        self.lock = threading.Lock()


def _fails_awkwardly() -> None:
    raise _Awkward("held a lock")


def test_an_error_that_does_not_pickle_arrives_as_its_traceback():
    with FigureWorkers(1) as workers:
        workers.submit(_fails_awkwardly, [()])
        with pytest.raises(RuntimeError, match="_Awkward: held a lock"):
            workers.results()


@pytest.mark.parametrize("victim", [0, 1])
def test_a_run_whose_worker_is_killed_draws_its_figures_itself(tmp_path, caplog, victim):
    """A worker killed from outside (out of memory, say) costs no output: the run draws
    the figures in its own process, the same pictures, and says so in a warning."""
    import signal

    from matplotlib.image import imread

    here, there = tmp_path / "here", tmp_path / "there"
    _run("balcony_slab", here, None)
    with FigureWorkers(2) as workers:
        pid = workers.pids[victim]
        os.kill(pid, signal.SIGKILL)
        time.sleep(0.2)  # gone before the run starts
        with caplog.at_level("WARNING"):
            _run("balcony_slab", there, workers)
    assert f"figure worker {pid} ended" in caplog.text
    index = json.loads((here / "figures" / "figures.json").read_text(encoding="utf-8"))
    assert json.loads((there / "figures" / "figures.json").read_text(encoding="utf-8")) == index
    for entry in index:
        assert np.array_equal(imread(here / entry["png"]), imread(there / entry["png"]))
    assert (there / "report.html").is_file() and (there / "fields" / "field.vtu").is_file()


def _length(data: bytes) -> int:
    return len(data)


def test_closing_while_a_large_job_is_being_written_is_quiet(monkeypatch):
    """A run that fails while its workers are still warming up and a large job (a 1 M-cell
    view is 50 MB) is on its way stops them at once: no error from the writing thread, no
    process left."""
    import threading

    seen: list[BaseException] = []
    monkeypatch.setattr(threading, "excepthook", lambda a: seen.append(a.exc_value))
    t0 = time.perf_counter()
    workers = FigureWorkers(2)
    workers.submit(_length, [(bytes(100_000_000),), (bytes(100_000_000),)])
    workers.close(wait=False)
    assert time.perf_counter() - t0 < 5.0
    assert seen == []
    assert multiprocessing.active_children() == []
