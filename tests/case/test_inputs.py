"""``case_inputs``: every file a loaded case reads, found from the case itself."""

from __future__ import annotations

from pathlib import Path

from casefiles import load
from wallcases import ROOM_HUMIDITY, SERIES_FILES, WEATHER, series_wall, write_files

from fvheat.case.inputs import case_inputs
from fvheat.sweep.identity import input_hashes, input_name


def test_a_case_without_files_reads_only_itself(tmp_path):
    case = load(tmp_path, series_wall("-5.0"))
    assert case_inputs(case) == [(tmp_path / "case.toml").absolute()]
    assert input_hashes(case) == {}


def test_boundary_and_humidity_series_are_inputs(tmp_path):
    write_files(tmp_path, SERIES_FILES)
    text = series_wall(WEATHER) + ROOM_HUMIDITY
    case = load(tmp_path, text)
    assert case_inputs(case) == [
        (tmp_path / "case.toml").absolute(),
        (tmp_path / "weather.csv").absolute(),
        (tmp_path / "data" / "room.csv").absolute(),
    ]
    hashes = input_hashes(case)
    assert list(hashes) == ["weather.csv", "data/room.csv"]  # named from the case's folder
    assert all(len(h) == 64 for h in hashes.values()) and len(set(hashes.values())) == 2


def test_one_file_read_by_two_keys_is_listed_once(tmp_path):
    (tmp_path / "weather.csv").write_text("time,t_out,t_in\n0,-5,20\n7200,0,21\n", "utf-8")
    inside = 'boundaries.inside.air_temperature={ file = "weather.csv", column = "t_in" }'
    case = load(tmp_path, series_wall(WEATHER), [inside])
    assert case_inputs(case) == [
        (tmp_path / "case.toml").absolute(),
        (tmp_path / "weather.csv").absolute(),
    ]


def test_files_outside_the_case_folder_are_named_absolutely(tmp_path):
    assert input_name(tmp_path / "a" / "b.csv", tmp_path / "case.toml") == "a/b.csv"
    elsewhere = tmp_path.parent / "elsewhere.csv"
    assert input_name(elsewhere, tmp_path / "case.toml") == elsewhere.absolute().as_posix()


def test_the_drawing_is_an_input():
    """The demo drawing case reads its case file and its DXF drawing."""
    from fvheat.case.load import load_case

    case_file = Path(__file__).resolve().parents[2] / "cases" / "undercroft_slab_edge.toml"
    inputs = case_inputs(load_case(case_file))
    assert inputs == [
        case_file.absolute(),
        (case_file.parent / "details" / "kestrel_undercroft_edge.dxf").absolute(),
    ]
