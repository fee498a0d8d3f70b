"""Case loading: a valid case becomes the expected dataclasses; bad input names file and key."""

import os
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pytest

from fvheat.case import load_case, parse_case
from fvheat.case.fields import number, table
from fvheat.case.load import SECTIONS, register_section
from fvheat.case.model import Case, Phase
from fvheat.case.signals import Constant, Cosine, Series
from fvheat.errors import CaseError

# An invented demo wall: concrete with an insulation layer, inside surface on the right.
CASE = """\
title = "demo wall"

[mesh]
max_cell = 0.02

[materials.concrete]
conductivity = 2.3
density = 2400
specific_heat = 1000

[materials.insulation]
conductivity = 0.035
density = 30
specific_heat = 1400
emissivity = 0.9

[[regions]]
material = "concrete"
box = [0.0, 0.0, 0.2, 1.0]

[[regions]]
material = "insulation"
polygon = [[0.2, 0.0], [0.2, 1.0], [0.3, 1.0], [0.35, 0.0]]

[[boundaries]]
name = "inside"
edges = [[[0.3, 1.0], [0.35, 0.0]]]
air_temperature = 20.0
resistance = 0.13

[[boundaries]]
name = "outside"
edges = [[[0.0, 0.0], [0.0, 1.0]]]
air_temperature = { mean = 0.0, amplitude = 8.0, period = 86400, phase = 3600 }
convection = 25
emissivity = 0.9
radiant_temperature = -5
heat_flux = 40

[[boundaries]]
name = "floor-cut"
edges = [[[0.0, 0.0], [0.2, 0.0]], [[0.2, 0.0], [0.35, 0.0]]]
heat_flux = 0

[[probes]]
name = "A"
at = [0.1, 0.5]
"""

WEATHER = "time_s,t_out,sun\n0,-5,0\n3600,-7,100\n7200,-6,250\n"

TIME = """
[time]
duration = 7200
step = 600
initial_temperature = 10
"""


def write(folder: Path, text: str, name: str = "case.toml") -> Path:
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


@pytest.fixture
def case_file(tmp_path: Path) -> Path:
    write(tmp_path, WEATHER, "weather.csv")
    return write(tmp_path, CASE)


def test_minimal_case_round_trips_with_defaults(case_file: Path):
    case = load_case(case_file)

    assert case.title == "demo wall"
    assert case.source == case_file
    assert case.mesh.max_cell == 0.02
    assert case.mesh.min_cell == pytest.approx(0.004)  # default max_cell / 5
    assert case.mesh.growth == 1.3
    assert list(case.materials) == ["concrete", "insulation"]
    concrete = case.materials["concrete"]
    assert (concrete.conductivity, concrete.density, concrete.specific_heat) == (2.3, 2400, 1000)
    assert concrete.volumetric_heat_capacity == 2.4e6
    assert concrete.emissivity is None and concrete.latent_heat is None
    assert case.materials["insulation"].emissivity == 0.9

    box = case.regions[0]
    assert box.material == "concrete" and box.is_box
    np.testing.assert_array_equal(box.vertices, [[0, 0], [0.2, 0], [0.2, 1], [0, 1]])
    assert box.bounds == (0.0, 0.0, 0.2, 1.0)

    inside, outside, floor = case.boundaries
    assert inside.kind == "surface"
    assert inside.resistance == 0.13
    assert inside.convection == pytest.approx(1 / 0.13)
    assert inside.emissivity == 0.0 and not inside.radiative
    assert inside.air_temperature == Constant(20.0)
    assert inside.radiant_temperature == Constant(20.0)  # defaults to the air temperature
    assert inside.edges == (((0.3, 1.0), (0.35, 0.0)),)
    assert inside.heat_flux is None and inside.temperature is None

    assert outside.kind == "surface" and outside.radiative
    assert (outside.convection, outside.emissivity, outside.resistance) == (25.0, 0.9, None)
    assert outside.air_temperature == Cosine(mean=0.0, amplitude=8.0, period=86400.0, phase=3600.0)
    assert outside.radiant_temperature == Constant(-5.0)
    assert outside.heat_flux == Constant(40.0)

    assert floor.kind == "flux" and floor.name == "floor-cut"
    assert floor.heat_flux == Constant(0.0)
    assert floor.edges == (((0.0, 0.0), (0.2, 0.0)), ((0.2, 0.0), (0.35, 0.0)))
    assert floor.air_temperature is None

    assert [(p.name, p.at) for p in case.probes] == [("A", (0.1, 0.5))]
    assert case.time is None and not case.transient


def test_values_are_floats_and_vertices_read_only(case_file: Path):
    case = load_case(case_file)
    assert type(case.materials["concrete"].density) is float
    assert type(case.boundaries[0].edges[0][0][0]) is float
    with pytest.raises(ValueError):
        case.regions[0].vertices[0, 0] = 5.0


def test_title_defaults_to_file_stem_and_optional_sections(tmp_path: Path):
    text = CASE.replace('title = "demo wall"\n', "").split("[[probes]]")[0]
    case = load_case(write(tmp_path, text, "slab_edge.toml"))
    assert case.title == "slab_edge"
    assert case.probes == ()


def test_mesh_settings_given(case_file: Path):
    case = load_case(case_file, ["mesh.min_cell=0.001", "mesh.growth=1.15"])
    assert (case.mesh.max_cell, case.mesh.min_cell, case.mesh.growth) == (0.02, 0.001, 1.15)


def test_time_defaults(tmp_path: Path):
    case = load_case(write(tmp_path, CASE + TIME))
    assert case.transient
    t = case.time
    assert (t.duration, t.step, t.initial_temperature) == (7200.0, 600.0, 10.0)
    assert t.save_every == 600.0  # default: every step
    assert t.scheme == "backward_euler" and t.theta == 1.0


def test_time_steady_start_and_crank_nicolson(tmp_path: Path):
    path = write(tmp_path, CASE + TIME)
    case = load_case(
        path,
        ['time.initial_temperature="steady"', "time.save_every=1800", "time.scheme=crank_nicolson"],
    )
    assert case.time.initial_temperature == "steady"
    assert case.time.save_every == 1800.0
    assert case.time.theta == 0.5


def test_save_every_multiple_within_round_off(tmp_path: Path):
    path = write(tmp_path, CASE + TIME)
    case = load_case(path, ["time.step=0.1", "time.save_every=0.3"])  # 0.3/0.1 = 2.9999999999999996
    assert case.time.save_every == 0.3


def test_cosine_defaults_and_values(case_file: Path):
    case = load_case(case_file, ["boundaries.0.air_temperature={mean = 18, period = 3600}"])
    signal = case.boundaries[0].air_temperature
    assert signal == Cosine(mean=18.0, amplitude=0.0, period=3600.0, phase=0.0)
    outside = load_case(case_file).boundaries[1].air_temperature
    assert outside.at(3600.0) == pytest.approx(8.0)  # peak at t = phase
    assert outside.at(3600.0 + 43200.0) == pytest.approx(-8.0)


def test_csv_series(tmp_path: Path):
    write(
        tmp_path,
        "# outdoor conditions\ntime_s, t_out ,sun\n\n0,-5,0\n3600,-7,100\n7200,-6,250\n",
        "weather.csv",
    )
    path = write(tmp_path, CASE + TIME)
    case = load_case(
        path,
        [
            'boundaries.1.air_temperature={file = "weather.csv", column = "t_out"}',
            'boundaries.1.heat_flux={file = "weather.csv", column = "sun"}',
        ],
    )
    outside = case.boundaries[1]
    air = outside.air_temperature
    assert isinstance(air, Series)
    np.testing.assert_array_equal(air.times, [0, 3600, 7200])
    np.testing.assert_array_equal(air.values, [-5, -7, -6])
    assert air.column == "t_out"
    assert Path(air.source) == tmp_path / "weather.csv"
    assert air.at(1800.0) == pytest.approx(-6.0)
    np.testing.assert_array_equal(outside.heat_flux.values, [0, 100, 250])


def test_csv_path_is_relative_to_case_file(tmp_path: Path):
    (tmp_path / "cases").mkdir()
    (tmp_path / "data").mkdir()
    write(tmp_path / "data", WEATHER, "w.csv")
    path = write(tmp_path / "cases", CASE)
    case = load_case(
        path, ['boundaries.0.air_temperature={file = "../data/w.csv", column = "t_out"}']
    )
    np.testing.assert_array_equal(case.boundaries[0].air_temperature.values, [-5, -7, -6])


def test_clockwise_polygon_is_stored_counter_clockwise(case_file: Path):
    clockwise = "[[0.2, 0.0], [0.2, 1.0], [0.3, 1.0], [0.35, 0.0]]"
    region = load_case(case_file, [f"regions.1.polygon={clockwise}"]).regions[1]
    assert not region.is_box
    v = region.vertices
    signed_area = 0.5 * np.sum(v[:, 0] * np.roll(v[:, 1], -1) - np.roll(v[:, 0], -1) * v[:, 1])
    assert signed_area == pytest.approx(0.125)  # trapezoid (0.1 + 0.15) / 2 * 1, positive = CCW
    np.testing.assert_array_equal(v, [[0.35, 0.0], [0.3, 1.0], [0.2, 1.0], [0.2, 0.0]])


def test_counter_clockwise_polygon_kept_and_closing_vertex_dropped(case_file: Path):
    ccw = "[[0, 0], [1, 0], [0.5, 1], [0, 0]]"
    region = load_case(case_file, [f"regions.1.polygon={ccw}"]).regions[1]
    np.testing.assert_array_equal(region.vertices, [[0, 0], [1, 0], [0.5, 1]])


def test_concave_polygon_accepted(case_file: Path):
    ell = "[[0, 0], [1, 0], [1, 0.2], [0.2, 0.2], [0.2, 1], [0, 1]]"
    region = load_case(case_file, [f"regions.1.polygon={ell}"]).regions[1]
    assert len(region.vertices) == 6 and not region.is_box


def test_upright_rectangle_polygon_becomes_box(case_file: Path):
    rect = "[[0.3, 1.0], [0.3, 0.0], [0.2, 0.0], [0.2, 1.0]]"  # clockwise, starts top right
    region = load_case(case_file, [f"regions.1.polygon={rect}"]).regions[1]
    assert region.is_box
    np.testing.assert_array_equal(region.vertices, [[0.2, 0], [0.3, 0], [0.3, 1], [0.2, 1]])


def test_latent_heat_material(case_file: Path):
    soil = (
        "materials.soil={conductivity = 1.5, density = 1800, specific_heat = 1400, "
        "latent_heat = 100000, phase_change = [-0.5, 0.0], "
        "frozen = {conductivity = 2.2, specific_heat = 900}}"
    )
    m = load_case(case_file, [soil]).materials["soil"]
    assert m.latent_heat == 100000.0
    assert m.phase_change == (-0.5, 0.0)
    assert m.frozen == Phase(conductivity=2.2, density=None, specific_heat=900.0)


def test_fixed_temperature_boundary(case_file: Path):
    case = load_case(
        case_file,
        ["boundaries.2={name = 'ground', edges = [[[0, 0], [0.2, 0]]], temperature = 10}"],
    )
    ground = case.boundaries[2]
    assert ground.kind == "temperature" and ground.temperature == Constant(10.0)
    assert ground.convection == 0.0 and ground.heat_flux is None


def test_parse_case_from_dict_does_not_mutate_input(tmp_path: Path):
    data = {
        "mesh": {"max_cell": 0.05},
        "materials": {"brick": {"conductivity": 0.8}},
        "regions": [{"material": "brick", "box": [0, 0, 1, 1]}],
        "boundaries": [{"name": "face", "edges": [[[0, 0], [0, 1]]], "temperature": 5}],
    }
    case = parse_case(data, tmp_path / "from_script.toml", ["mesh.max_cell=0.1"])
    assert case.title == "from_script"
    assert case.mesh.max_cell == 0.1 and case.mesh.min_cell == pytest.approx(0.02)
    assert data["mesh"]["max_cell"] == 0.05


@dataclass(frozen=True)
class _CaseWithExtra(Case):
    extra: float | None = None


def test_sections_can_be_registered(tmp_path: Path, monkeypatch: pytest.MonkeyPatch):
    seen = {}

    def extra(value, ctx):
        seen["materials"] = list(ctx.parsed["materials"])  # earlier sections are visible
        if value is None:
            return None
        tbl = table(value, "extra", allowed=("tolerance",))
        return number(tbl, "tolerance", "extra", gt=0)

    monkeypatch.setattr("fvheat.case.load.SECTIONS", dict(SECTIONS))
    monkeypatch.setattr("fvheat.case.load.Case", _CaseWithExtra)
    register_section("extra", extra)
    case = load_case(write(tmp_path, CASE + "\n[extra]\ntolerance = 1e-9\n"))
    assert case.extra == 1e-9
    assert seen == {"materials": ["concrete", "insulation"]}
    assert load_case(write(tmp_path, CASE, "plain.toml")).extra is None
    with pytest.raises(CaseError, match=r"case.toml: extra.tolerance: must be greater than 0"):
        load_case(tmp_path / "case.toml", ["extra.tolerance=0"])
    with pytest.raises(ValueError, match="already registered"):
        register_section("extra", extra)


# --- errors --------------------------------------------------------------------------------

BAD_CSV = {
    "text.csv": "time_s,t_out\n0,-5\n3600,cold\n7200,-6\n",
    "back.csv": "time_s,t_out\n0,-5\n3600,-7\n3600,-6\n",
    "short.csv": "time_s,t_out\n0,-5\n3600,-7\n",
    "semi.csv": "time_s;t_out\n0;-5\n",
    "frozen.csv": "time_s,t_out\n0,-5\n3600,-300\n7200,-6\n",
    "late.csv": "time_s,t_out\n60,-5\n7200,-6\n",
}


def series(name: str, column: str = "t_out") -> str:
    return f'boundaries.1.air_temperature={{file = "{name}", column = "{column}"}}'


# (id, text edits [(old, new)], overrides, expected key path, expected words in the message)
ERRORS = [
    ("unknown top-level", [("[mesh]", "colour = 1\n[mesh]")], [], "colour", "allowed keys"),
    ("typo", [], ["mesh.max_cel=0.1"], "mesh.max_cel", "did you mean 'max_cell'"),
    ("missing max_cell", [("max_cell = 0.02\n", "")], [], "mesh.max_cell", "missing"),
    ("no mesh", [("[mesh]\nmax_cell = 0.02\n", "")], [], "mesh", "missing"),
    ("bool number", [], ["mesh.max_cell=true"], "mesh.max_cell", "expected a number, got boolean"),
    ("string number", [], ["mesh.max_cell=fine"], "mesh.max_cell", "got string 'fine'"),
    ("nan", [], ["mesh.max_cell=nan"], "mesh.max_cell", "finite"),
    ("min > max", [], ["mesh.min_cell=0.05"], "mesh.min_cell", "must not exceed max_cell"),
    ("growth 1", [], ["mesh.growth=1"], "mesh.growth", "greater than 1"),
    ("growth 4", [], ["mesh.growth=4"], "mesh.growth", "at most 3"),
    (
        "k zero",
        [],
        ["materials.concrete.conductivity=0"],
        "materials.concrete.conductivity",
        "at least 1e-05",
    ),
    ("k missing", [("conductivity = 2.3\n", "")], [], "materials.concrete.conductivity", "missing"),
    (
        "emissivity",
        [],
        ["materials.insulation.emissivity=1.5"],
        "materials.insulation.emissivity",
        "at most 1",
    ),
    (
        "bad material name",
        [("[materials.insulation]", '[materials."mineral wool"]')],
        [],
        "materials.mineral wool",
        "only letters",
    ),
    (
        "latent without range",
        [],
        ["materials.concrete.latent_heat=3e5"],
        "materials.concrete.phase_change",
        "required with latent_heat",
    ),
    (
        "range without latent",
        [],
        ["materials.concrete.phase_change=[-1, 0]"],
        "materials.concrete.latent_heat",
        "required with phase_change",
    ),
    (
        "range reversed",
        [],
        ["materials.concrete.phase_change=[0, -1]", "materials.concrete.latent_heat=1e5"],
        "materials.concrete.phase_change",
        "below liquidus",
    ),
    (
        "frozen negative",
        [],
        [
            "materials.concrete.phase_change=[-1, 0]",
            "materials.concrete.latent_heat=1e5",
            "materials.concrete.frozen={conductivity = -2}",
        ],
        "materials.concrete.frozen.conductivity",
        "at least 1e-05",
    ),
    (
        "unknown material",
        [],
        ["regions.1.material=unobtainium"],
        "regions.1.material",
        "defined: concrete, insulation",
    ),
    ("box reversed", [], ["regions.0.box=[0.2, 0, 0, 1]"], "regions.0.box", "x1 > x0"),
    ("box short", [], ["regions.0.box=[0, 0, 1]"], "regions.0.box", "[x0, y0, x1, y1]"),
    (
        "box and polygon",
        [],
        ["regions.0.polygon=[[0, 0], [1, 0], [0, 1]]"],
        "regions.0",
        "exactly one of box",
    ),
    (
        "bow tie",
        [],
        ["regions.1.polygon=[[0, 0], [1, 1], [1, 0], [0, 1]]"],
        "regions.1.polygon",
        "intersects itself",
    ),
    (
        "bow tie off-centre",
        [],
        ["regions.1.polygon=[[0, 0], [2, 1], [2, 0], [0, 1.5]]"],
        "regions.1.polygon",
        "edge 0 (vertex 0 to 1) meets edge 2",
    ),
    (
        "folded back",
        [],
        ["regions.1.polygon=[[0, 0], [2, 0], [1, 0], [1, 1]]"],
        "regions.1.polygon",
        "intersects itself",
    ),
    (
        "collinear polygon",
        [],
        ["regions.1.polygon=[[0, 0], [1, 1], [2, 2]]"],
        "regions.1.polygon",
        "one line",
    ),
    (
        "two-point polygon",
        [],
        ["regions.1.polygon=[[0, 0], [1, 1]]"],
        "regions.1.polygon",
        "at least 3",
    ),
    (
        "bad vertex",
        [],
        ["regions.1.polygon=[[0, 0], [1, 0], [1]]"],
        "regions.1.polygon.2",
        "point [x, y]",
    ),
    ("no regions", [], ["regions=[]"], "regions", "at least one"),
    (
        "duplicate boundary",
        [],
        ["boundaries.1.name=inside"],
        "boundaries.1.name",
        "already used by boundaries.0.name",
    ),
    (
        "boundary name space",
        [],
        ["boundaries.0.name=inner face"],
        "boundaries.0.name",
        "only letters",
    ),
    (
        "resistance and convection",
        [],
        ["boundaries.0.convection=7.7"],
        "boundaries.0.convection",
        "not allowed with resistance",
    ),
    (
        "surface without coefficient",
        [("resistance = 0.13\n", "")],
        [],
        "boundaries.0.resistance",
        "needs resistance",
    ),
    (
        "resistance without air",
        [("air_temperature = 20.0\n", "")],
        [],
        "boundaries.0.air_temperature",
        "required with resistance",
    ),
    (
        "temperature and air",
        [],
        ["boundaries.0.temperature=20"],
        "boundaries.0.temperature",
        "not both",
    ),
    (
        "temperature and flux",
        [],
        ["boundaries.2.temperature=20"],
        "boundaries.2.heat_flux",
        "fixed temperature",
    ),
    ("no condition", [("heat_flux = 0\n", "")], [], "boundaries.2", "no condition"),
    (
        "radiant without emissivity",
        [],
        ["boundaries.0.radiant_temperature=5"],
        "boundaries.0.radiant_temperature",
        "needs emissivity",
    ),
    (
        "single segment",
        [],
        ["boundaries.0.edges=[[0.3, 1.0], [0.35, 0.0]]"],
        "boundaries.0.edges.0",
        "edges = [[[x0, y0], [x1, y1]]]",
    ),
    (
        "zero-length edge",
        [],
        ["boundaries.2.edges.1=[[0.2, 0.0], [0.2, 0.0]]"],
        "boundaries.2.edges.1",
        "0 m long",
    ),
    (
        "bad coordinate",
        [],
        ["boundaries.2.edges.1.1.0=a"],
        "boundaries.2.edges.1.1.0",
        "expected a number",
    ),
    ("no edges", [], ["boundaries.0.edges=[]"], "boundaries.0.edges", "non-empty"),
    (
        "below absolute zero",
        [],
        ["boundaries.0.air_temperature=-300"],
        "boundaries.0.air_temperature",
        "absolute zero",
    ),
    (
        "period zero",
        [],
        ["boundaries.1.air_temperature.period=0"],
        "boundaries.1.air_temperature.period",
        "at least 0.001",
    ),
    (
        "cosine without mean",
        [],
        ["boundaries.1.air_temperature={amplitude = 3, period = 60}"],
        "boundaries.1.air_temperature.mean",
        "missing",
    ),
    (
        "cosine key typo",
        [],
        ["boundaries.1.air_temperature.phse=0"],
        "boundaries.1.air_temperature.phse",
        "did you mean 'phase'",
    ),
    (
        "cosine below zero K",
        [],
        ["boundaries.1.air_temperature.amplitude=300"],
        "boundaries.1.air_temperature",
        "mean - |amplitude|",
    ),
    (
        "signal of wrong type",
        [],
        ["boundaries.2.heat_flux=[1, 2]"],
        "boundaries.2.heat_flux",
        "{mean, amplitude, period, phase}",
    ),
    ("csv missing", [], [series("nowhere.csv")], "boundaries.1.air_temperature.file", "not found"),
    (
        "csv column",
        [],
        [series("weather.csv", "t_in")],
        "boundaries.1.air_temperature.column",
        "columns: time_s, t_out, sun",
    ),
    (
        "csv text",
        [],
        [series("text.csv")],
        "boundaries.1.air_temperature",
        "text.csv line 3: 'cold'",
    ),
    (
        "csv time order",
        [],
        [series("back.csv")],
        "boundaries.1.air_temperature",
        "back.csv line 4: time 3600 s is not after",
    ),
    (
        "csv semicolons",
        [],
        [series("semi.csv")],
        "boundaries.1.air_temperature.file",
        "separated by commas",
    ),
    (
        "csv below zero K",
        [],
        [series("frozen.csv")],
        "boundaries.1.air_temperature",
        "frozen.csv line 3",
    ),
    (
        "series too short",
        [("", TIME)],
        [series("short.csv")],
        "boundaries.1.air_temperature",
        "ends at t = 3600 s",
    ),
    (
        "series starts late",
        [("", TIME)],
        [series("late.csv")],
        "boundaries.1.air_temperature",
        "starts at t = 60 s",
    ),
    (
        "save_every",
        [("", TIME)],
        ["time.save_every=1000"],
        "time.save_every",
        "whole multiple of step = 600 s",
    ),
    (
        "save_every < step",
        [("", TIME)],
        ["time.save_every=300"],
        "time.save_every",
        "whole multiple",
    ),
    ("step > duration", [("", TIME)], ["time.step=10000"], "time.step", "longer than"),
    (
        "initial word",
        [("", TIME)],
        ["time.initial_temperature=cold"],
        "time.initial_temperature",
        '"steady"',
    ),
    ("scheme", [("", TIME)], ["time.scheme=rk4"], "time.scheme", "'backward_euler'"),
    ("time missing step", [("", TIME.replace("step = 600\n", ""))], [], "time.step", "missing"),
    (
        "density for transient",
        [("density = 30\n", ""), ("", TIME)],
        [],
        "materials.insulation.density",
        "regions.1",
    ),
    ("probe at", [], ["probes.0.at=[0.1]"], "probes.0.at", "point [x, y]"),
    ("probe unknown key", [], ["probes.0.z=1"], "probes.0.z", "allowed keys here: name, at"),
    (
        "all flux",
        [
            ("air_temperature = 20.0\nresistance = 0.13\n", "heat_flux = 5\n"),
            ("convection = 25\nemissivity = 0.9\nradiant_temperature = -5\n", ""),
            (
                "air_temperature = { mean = 0.0, amplitude = 8.0, period = 86400, phase = 3600 }\n",
                "",
            ),
        ],
        [],
        "boundaries",
        "steady field",
    ),
    (
        "override index",
        [],
        ["regions.9.material=steel"],
        "--set regions.9.material",
        "out of range",
    ),
    ("override scalar", [], ["title.x=1"], "--set title.x", "single value"),
]


def _edit(text: str, edits: list[tuple[str, str]]) -> str:
    for old, new in edits:
        if old == "":
            text += new
        else:
            assert old in text, old
            text = text.replace(old, new, 1)
    return text


@pytest.mark.parametrize(
    ("edits", "overrides", "key", "words"),
    [pytest.param(*e[1:], id=e[0]) for e in ERRORS],
)
def test_errors_name_file_and_key(tmp_path: Path, edits, overrides, key, words):
    for name, text in {"weather.csv": WEATHER, **BAD_CSV}.items():
        write(tmp_path, text, name)
    path = write(tmp_path, _edit(CASE, edits))
    with pytest.raises(CaseError) as info:
        load_case(path, overrides)
    err = info.value
    message = str(err)
    assert "\n" not in message
    assert message.startswith(f"{path}: {key}: "), message
    assert words in message, message
    assert (err.file, err.key) == (str(path), key)


def test_a_huge_resistance_is_still_a_surface(case_file: Path):
    # The steady check only needs some exchange: 1/1e9 W/(m²·K) is tiny but not zero.
    case = load_case(case_file, ["boundaries.0.resistance=1e9"])
    assert case.boundaries[0].convection == pytest.approx(1e-9)


def test_duplicate_probe_name(case_file: Path):
    text = case_file.read_text() + '\n[[probes]]\nname = "A"\nat = [0.2, 0.5]\n'
    path = write(case_file.parent, text, "two_probes.toml")
    with pytest.raises(CaseError, match=r"two_probes.toml: probes.1.name: name 'A' is already "):
        load_case(path)


def test_toml_syntax_error_is_one_line(tmp_path: Path):
    path = write(tmp_path, CASE.replace("max_cell = 0.02", "max_cell = "))
    with pytest.raises(CaseError) as info:
        load_case(path)
    message = str(info.value)
    assert "\n" not in message
    assert message.startswith(f"{path}: TOML syntax error: ")
    assert "line 4" in message
    assert info.value.key is None


def test_missing_case_file(tmp_path: Path):
    path = tmp_path / "absent.toml"
    with pytest.raises(CaseError, match=r"absent.toml: case file not found$"):
        load_case(path)


def test_first_error_wins_in_section_order(case_file: Path):
    with pytest.raises(CaseError, match=r": mesh.max_cell: "):
        load_case(case_file, ["regions.0.material=steel", "mesh.max_cell=-1"])


@pytest.mark.parametrize("kind", ["fifo", "device", "folder", "huge"])
def test_csv_series_must_be_a_regular_file_of_sane_size(tmp_path: Path, kind, monkeypatch):
    """A FIFO would block the run, /dev/zero never ends, a folder cannot be read, and a
    file over the size limit is refused: one line naming the key, before any reading."""
    path = write(tmp_path, CASE + TIME)
    if kind == "fifo":
        os.mkfifo(tmp_path / "w.csv")
        target = "w.csv"
    elif kind == "device":
        target = "/dev/zero"
    elif kind == "folder":
        (tmp_path / "w.csv").mkdir()
        target = "w.csv"
    else:
        write(tmp_path, WEATHER, "w.csv")
        monkeypatch.setattr("fvheat.case.values.MAX_CSV_BYTES", 10)
        target = "w.csv"
    with pytest.raises(CaseError) as info:
        load_case(path, [f'boundaries.1.air_temperature={{file = "{target}", column = "t_out"}}'])
    msg = str(info.value)
    assert "boundaries.1.air_temperature" in msg and "\n" not in msg
    assert ("MB; series files up to" in msg) if kind == "huge" else ("not a regular file" in msg)
