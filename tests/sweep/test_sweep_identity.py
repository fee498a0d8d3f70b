"""A sweep folder belongs to one version of every file its case reads: a CSV series changed
between runs is refused on resume (naming the file), never mixed into the table."""

from __future__ import annotations

from pathlib import Path

import pytest
from wallcases import ROOM_HUMIDITY, SERIES_FILES, WEATHER, series_wall, write_files

from fvheat.cli.main import main

from .conftest import stored

WALL = series_wall(WEATHER) + ROOM_HUMIDITY
FILES = {
    **SERIES_FILES,
    "cold.csv": "time,t\n0,-10\n7200,-10\n",
    "mild.csv": "time,t\n0,5\n7200,5\n",
}


@pytest.fixture
def project(tmp_path: Path) -> Path:
    """A transient wall case reading a weather and a room-humidity series."""
    write_files(tmp_path, FILES)
    (tmp_path / "wall.toml").write_text(WALL, encoding="utf-8")
    return tmp_path


def sweep(project: Path, *vary: str) -> list[str]:
    case, out = project / "wall.toml", project / "sweep"
    return ["sweep", str(case), *vary, "-o", str(out), "-j", "1", "-q"]


def rows(project: Path):
    return stored(project / "sweep")


@pytest.mark.parametrize(
    ("changed", "edit"),
    [("weather.csv", ("7200,0", "7200,3")), ("data/room.csv", ("0,50", "0,55"))],
)
def test_a_changed_series_file_is_refused_naming_it(project, capsys, changed, edit):
    args = sweep(project, "--vary", "materials.wall.conductivity=0.5,1.0")
    assert main(args) == 0
    before = rows(project)
    assert [r.status for r in before] == ["done", "done"]
    original = (project / changed).read_text(encoding="utf-8")
    assert edit[0] in original
    (project / changed).write_text(original.replace(*edit), encoding="utf-8")

    assert main(args) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and "Traceback" not in err
    assert err.startswith(f"fvheat: error: {project / 'sweep' / 'sweep.sqlite'}: ")
    assert f"{project / changed} changed since this sweep started" in err
    assert "another --out folder" in err and f"delete {project / 'sweep'}" in err
    assert rows(project) == before  # nothing ran, nothing recorded

    # the file as it was: the sweep is whole again and resumes (nothing to do)
    (project / changed).write_text(original, encoding="utf-8")
    assert main(args) == 0
    assert rows(project) == before


def test_a_series_only_some_variants_read_is_checked_too(project, capsys):
    cold = '{ file = "cold.csv", column = "t" }'
    mild = '{ file = "mild.csv", column = "t" }'
    args = sweep(project, "--vary", f"boundaries.outside.air_temperature={cold},{mild}")
    assert main(args) == 0
    done = rows(project)
    # each variant records the files its own case read
    assert set(done[0].inputs) == {"data/room.csv", "cold.csv"}
    assert set(done[1].inputs) == {"data/room.csv", "mild.csv"}
    # mild.csv is read by the second variant only, not by the case itself
    (project / "mild.csv").write_text("time,t\n0,6\n7200,6\n", encoding="utf-8")
    assert main(args) == 2
    err = capsys.readouterr().err.strip()
    assert "\n" not in err
    assert f"{project / 'mild.csv'} changed since variant {done[1].output} was computed" in err
    assert rows(project) == done
