# ruff: noqa: E501  (the table of absurd values reads best one case per line)
"""Absurd coordinates and run lengths are one line naming the file and the key: every
point of a case goes through one reader (fvheat.case.fields.coordinate), limited to ±1e6 m
after the unit conversion, points taken from a drawing are checked the same way, and a run
may take at most 1 000 000 time steps."""

from __future__ import annotations

import pytest
from casefiles import write_case
from drawings import line, new_drawing, rectangle, save

from fvheat.case.load import load_case
from fvheat.cli.main import main
from fvheat.errors import CaseError

BASE = """
[mesh]
max_cell = 0.05
[materials.w]
conductivity = 1.0
[[regions]]
material = "w"
box = [0, 0, 0.3, 1.0]
[[regions]]
material = "w"
polygon = [[0.3, 0], [0.5, 0], [0.5, 0.2], [0.3, 0.2]]
[[boundaries]]
name = "in"
edges = [[[0, 0], [0, 1.0]]]
air_temperature = 20
resistance = 0.13
[[boundaries]]
name = "out"
edges = [[[0.3, 0.2], [0.3, 1.0]]]
air_temperature = -5
resistance = 0.04
[[probes]]
name = "p"
at = [0.1, 0.5]
[[probe_lines]]
name = "l"
start = [0.0, 0.5]
end = [0.3, 0.5]
[junction]
inside = ["in"]
outside = ["out"]
[[junction.flanking]]
name = "wall"
cut = [[0.0, 0.9], [0.3, 0.9]]
length = 1.0
"""

KEYS = [
    "regions.0.box.2",
    "regions.1.polygon.1.0",
    "boundaries.0.edges.0.1.1",
    "probes.0.at.0",
    "probe_lines.0.end.1",
    "junction.flanking.0.cut.0.0",
]


@pytest.mark.parametrize("key", KEYS)
@pytest.mark.parametrize("value", ["1e308", "-1e300", "2e6", "nan", "inf"])
def test_absurd_coordinate_is_one_line(tmp_path, key, value):
    case = write_case(tmp_path, BASE)
    with pytest.raises(CaseError) as err:
        load_case(case, [f"{key}={value}"])
    text = str(err.value)
    assert "\n" not in text
    assert text.startswith(f"{case}: {key}: "), text


def test_within_the_limit_in_mm(tmp_path):
    """The limit applies after the unit conversion: 9e8 mm (900 km) is accepted by the
    reader (the case then fails elsewhere or not at all), 2e9 mm (2 000 km) is not."""
    case = write_case(tmp_path, BASE.replace("[mesh]", '[geometry]\nunits = "m"\n[mesh]'))
    load_case(case)
    mm = write_case(
        tmp_path,
        '[geometry]\nunits = "mm"\n'
        + BASE.replace("max_cell = 0.05", "max_cell = 50").replace(
            "box = [0, 0, 0.3, 1.0]", "box = [0, 0, 2e9, 1000]"
        ),
        name="mm.toml",
    )
    with pytest.raises(CaseError, match=r"regions\.0\.box\.2: coordinate 2e\+06 m is beyond"):
        load_case(mm)


def test_ground_coordinates(tmp_path):
    """[ground] coordinates and a soil block reaching beyond the limit."""
    case = load_case("cases/ground_floor_edge.toml")
    assert case.ground is not None
    for key, value, where in [
        ("ground.floor_edge", "1e308", "ground.floor_edge"),
        ("ground.ground_level", "nan", "ground.ground_level"),
        ("ground.width", "1e6", "ground.width"),
    ]:
        with pytest.raises(CaseError) as err:
            load_case("cases/ground_floor_edge.toml", [f"{key}={value}"])
        assert f": {where}: " in str(err.value)


def test_drawing_coordinates(tmp_path):
    """A shape and a boundary line in a drawing far beyond the limit (a DXF holding an
    absurd number): one line naming the region's / boundary's layer key."""
    doc, msp = new_drawing()
    rectangle(msp, "WALL", (0, 0, 200, 1000))
    rectangle(msp, "FAR", (3e12, 0, 3e12 + 200, 1000))
    line(msp, "IN", (0, 0), (0, 1000))
    line(msp, "FARLINE", (3e12, 0), (3e12, 1000))
    save(doc, tmp_path / "d.dxf")
    text = """
        [geometry]
        drawing = "d.dxf"
        units = "mm"
        [mesh]
        max_cell = 50
        [[regions]]
        layer = "{region}"
        material = "clay_brick"
        [[boundaries]]
        name = "in"
        layer = "{boundary}"
        air_temperature = 20
        resistance = 0.13
        """
    far = write_case(tmp_path, text.format(region="FAR", boundary="IN"), name="far.toml")
    with pytest.raises(CaseError, match=r"regions\.0\.layer: d\.dxf: layer 'FAR'.*beyond"):
        load_case(far)
    line_far = write_case(
        tmp_path, text.format(region="WALL", boundary="FARLINE"), name="farline.toml"
    )
    with pytest.raises(CaseError, match=r"boundaries\.0\.layer: d\.dxf: layer 'FARLINE'.*beyond"):
        load_case(line_far)


def test_cli(tmp_path, capsys):
    case = write_case(tmp_path, BASE)
    assert main(["check", str(case), "--set", "probes.0.at.1=1e308"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "probes.0.at.1" in err[0]


@pytest.mark.parametrize(("duration", "step"), [("1e7", "1"), ("1e300", "1e290")])
def test_more_than_a_million_steps(duration, step):
    """duration / step beyond 1 000 000 steps: one line at time.step (a run of 1e7 steps
    ran for hours before; found by tests/cli/test_fuzz.py)."""
    with pytest.raises(CaseError, match=r": time\.step: .* time steps, more than 1,000,000"):
        load_case(
            "cases/wall_daily_cycle.toml",
            [f"time.duration={duration}", f"time.step={step}", f"time.save_every={step}"],
        )
    # a year at one-minute steps is accepted
    load_case(
        "cases/wall_daily_cycle.toml",
        ["time.duration=31536000", "time.step=60", "time.save_every=86400"],
    )


def test_periodic_cycles_count_too():
    """A periodic run repeats its cycle up to max_cycles times: 86 400 one-second steps ×
    200 cycles is refused (a fuzzed PCM case ran for many minutes); fewer cycles pass."""
    with pytest.raises(CaseError, match=r": time\.step: a periodic run of up to max_cycles = 200"):
        load_case("cases/pcm_wall.toml", ["time.step=1", "time.save_every=3600"])
    load_case("cases/pcm_wall.toml", ["time.step=60", "time.save_every=3600"])


@pytest.mark.parametrize(
    ("case", "override", "key", "words"),
    [
        # material properties far outside every building material (classes found by fuzzing)
        ("balcony_slab", "materials.slab.conductivity=1e-30", "materials.slab.conductivity", "at least 1e-05"),
        ("balcony_slab", "materials.slab.conductivity=1e308", "materials.slab.conductivity", "at most 10000"),
        ("wall_daily_cycle", "materials.brick.density=1e-30", "materials.brick.density", "at least 0.01"),
        ("wall_daily_cycle", "materials.brick.specific_heat=1e300", "materials.brick.specific_heat", "at most 100000"),
        ("frost_slab_edge", "materials.silt.latent_heat=1e12", "materials.silt.latent_heat", "at most 1e+07"),
        ("frost_slab_edge", "materials.silt.frozen.conductivity=1e9", "materials.silt.frozen.conductivity", "at most 10000"),
        # surface coefficients beyond 1e6 W/(m²·K)
        ("balcony_slab", "boundaries.3.resistance=1e-9", "boundaries.3.resistance", "at least 1e-06"),
        # temperatures above 10 000 °C: constant, cosine, a CSV column scaled
        ("wall_daily_cycle", "boundaries.0.air_temperature=20000", "boundaries.0.air_temperature", "above 10000 °C"),
        ("wall_daily_cycle", "boundaries.1.air_temperature={mean=1e5, amplitude=5, period=86400}", "boundaries.1.air_temperature", "above 10000 °C"),
        ("frost_slab_edge", "boundaries.2.air_temperature.scale=1e6", "boundaries.2.air_temperature", "at most 10000 °C"),
        ("frost_slab_edge", "boundaries.2.air_temperature.scale=1e308", "boundaries.2.air_temperature", "at most 10000 °C"),
        ("frost_slab_edge", "boundaries.2.air_temperature.scale=-1e3", "boundaries.2.air_temperature", "absolute zero"),
        # an imposed heat flux beyond 1e6 W/m² (temperatures overflowed: exit 1 buried in warnings)
        ("wall_daily_cycle", 'boundaries.1={name="outside", edges=[[[0.365, 0], [0.365, 1.2]]], heat_flux=1e308}', "boundaries.1.heat_flux", "beyond ±1e+06 W/m²"),
        # a cosine period below 1 ms
        ("wall_daily_cycle", "boundaries.1.air_temperature={mean=0, amplitude=5, period=1e-4}", "boundaries.1.air_temperature.period", "at least 0.001"),
        # a cavity surface of almost no emissivity, indoor humidity below 1 %
        ("window_frame_section", "regions.1.cavity.emissivity=1e-9", "regions.1.cavity.emissivity", "at least 0.01"),
        ("balcony_slab", "junction.indoor_humidity=0.001", "junction.indoor_humidity", "at least 1"),
    ],
)  # fmt: skip
def test_absurd_values(case, override, key, words):
    with pytest.raises(CaseError) as err:
        load_case(f"cases/{case}.toml", [override])
    text = str(err.value)
    assert "\n" not in text
    assert f": {key}: " in text and words in text, text


def test_condensation_humidity_below_one_percent():
    over = 'condensation={boundaries = ["inside"], relative_humidity = 0.5}'
    with pytest.raises(
        CaseError, match=r"condensation\.relative_humidity: must stay within \[1, 100\] %"
    ):
        load_case("cases/wall_daily_cycle.toml", [over])
    load_case("cases/wall_daily_cycle.toml", [over.replace("0.5", "1")])


def test_condensation_boundary_listed_twice():
    """As the junction's lists: a surface named twice is refused in one line."""
    over = 'condensation={boundaries = ["inside", "inside"], relative_humidity = 60}'
    with pytest.raises(
        CaseError, match=r"condensation\.boundaries: 'inside' listed more than once"
    ):
        load_case("cases/wall_daily_cycle.toml", [over])


@pytest.mark.parametrize(
    ("override", "key", "words"),
    [
        # round-off boxes, polygons, segments, cuts and lines (found by tests/cli/test_fuzz.py:
        # numpy warnings on the way to an error, a traceback from the layer cut)
        ("regions.0.box.3=1e-300", "regions.0.box", "thinner than 1e-06 m"),
        ("regions.0.box.2=1e-13", "regions.0.box", "thinner than 1e-06 m"),
        ("regions.1.polygon=[[0.3, 0], [0.5, 0], [0.5, 1e-12]]", "regions.1.polygon", "thinner than 1e-06 m"),
        ("boundaries.0.edges.0=[[0, 0], [0, 1e-13]]", "boundaries.0.edges.0", "shorter than 1e-06 m"),
        ("junction.flanking.0.cut.1=[1e-9, 0.9]", "junction.flanking.0.cut", "shorter than 1e-06 m"),
        ("probe_lines.0.end=[1e-12, 0.5]", "probe_lines.0.end", "shorter than 1e-06 m"),
    ],
)  # fmt: skip
def test_round_off_sizes(tmp_path, override, key, words):
    case = write_case(tmp_path, BASE)
    with pytest.raises(CaseError) as err:
        load_case(case, [override])
    assert f": {key}: " in str(err.value) and words in str(err.value), str(err.value)
