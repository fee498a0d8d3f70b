"""``--set`` overrides: dotted paths, list indices, TOML values, and errors naming the override."""

import copy
import tomllib
from pathlib import Path

import pytest

from fvheat.case.load import load_case
from fvheat.case.overrides import apply_overrides
from fvheat.errors import CaseError

DATA = {
    "title": "wall",
    "mesh": {"max_cell": 0.02},
    "materials": {"concrete": {"conductivity": 2.3}, "glass.wool": {"conductivity": 0.035}},
    "regions": [
        {"material": "concrete", "box": [0, 0, 1, 1]},
        {"material": "concrete", "box": [1, 0, 2, 1]},
        {"material": "concrete", "box": [2, 0, 3, 1]},
    ],
    "boundaries": [{"name": "in", "edges": [[[0.2, 0.0], [0.2, 1.0]]], "temperature": 20}],
}


def apply(*overrides: str) -> dict:
    return apply_overrides(DATA, overrides, "case.toml")


def test_sets_nested_key():
    assert apply("mesh.max_cell=0.01")["mesh"] == {"max_cell": 0.01}


def test_list_indices_are_zero_based():
    out = apply("regions.2.material=steel")
    assert [r["material"] for r in out["regions"]] == ["concrete", "concrete", "steel"]


def test_deep_list_index():
    out = apply("boundaries.0.edges.0.1.0=0.3")
    assert out["boundaries"][0]["edges"] == [[[0.2, 0.0], [0.3, 1.0]]]


def test_input_is_not_mutated():
    before = copy.deepcopy(DATA)
    out = apply("regions.0.box.2=5", "mesh.growth=1.2")
    assert DATA == before
    assert out["regions"][0]["box"] == [0, 0, 5, 1]
    assert out["regions"][0]["box"] is not DATA["regions"][0]["box"]


def test_overrides_apply_in_order():
    assert apply("mesh.max_cell=1", "mesh.max_cell=2")["mesh"]["max_cell"] == 2


def test_no_overrides_returns_equal_copy():
    out = apply_overrides(DATA, [], "case.toml")
    assert out == DATA and out is not DATA


@pytest.mark.parametrize(
    ("text", "value"),
    [
        ("0.3", 0.3),
        ("12", 12),
        ("-4e-3", -0.004),
        ("true", True),
        ('"quoted text"', "quoted text"),
        ("'steady'", "steady"),
        ("steady", "steady"),  # not TOML: plain string
        ("My wall", "My wall"),
        ("  padded  ", "padded"),
        ("1,2", "1,2"),
        ("", ""),
        ("[1, 2]", [1, 2]),
        ("[[0, 0], [1, 0.5]]", [[0, 0], [1, 0.5]]),
        ("{mean=0, amplitude=8, period=86400}", {"mean": 0, "amplitude": 8, "period": 86400}),
        ("nan", pytest.approx(float("nan"), nan_ok=True)),
    ],
)
def test_value_is_parsed_as_toml_else_string(text, value):
    assert apply(f"title={text}")["title"] == value


def test_value_may_contain_equals_sign():
    assert apply("title=a=b")["title"] == "a=b"


def test_new_key_and_tables_are_created():
    out = apply("mesh.min_cell=0.002", "time.duration=3600", "time.step=60")
    assert out["mesh"] == {"max_cell": 0.02, "min_cell": 0.002}
    assert out["time"] == {"duration": 3600, "step": 60}


def test_quoted_key_with_dot():
    out = apply('materials."glass.wool".conductivity=0.032')
    assert out["materials"]["glass.wool"] == {"conductivity": 0.032}


def test_spaces_around_path_and_value():
    assert apply(" mesh.max_cell = 0.04 ")["mesh"]["max_cell"] == 0.04


def test_whole_list_item_replaced():
    out = apply("regions.1={material = 'steel', box = [0, 0, 0.01, 1]}")
    assert out["regions"][1] == {"material": "steel", "box": [0, 0, 0.01, 1]}


@pytest.mark.parametrize(
    ("override", "key", "words"),
    [
        ("regions.9.material=steel", "--set regions.9.material", "index 9 is out of range"),
        ("regions.3=x", "--set regions.3", "regions has 3 items (indices 0 to 2)"),
        ("regions.first.material=x", "--set regions.first.material", "no entry named 'first'"),
        ("regions.-1.material=x", "--set regions.-1.material", "(its entries have no names)"),
        ("boundaries.out.temperature=1", "--set boundaries.out.temperature", "names: in"),
        ("title.x=1", "--set title.x", "title is a single value (string 'wall')"),
        ("mesh.max_cell.value=1", "--set mesh.max_cell.value", "not a table or array"),
        ("regions.0.box.1.0=2", "--set regions.0.box.1.0", "regions.0.box.1 is a single value"),
        ("mesh.max_cell", "--set mesh.max_cell", "expected dotted.path=value"),
        ("=3", "--set =3", "empty key path"),
    ],
)
def test_errors_name_the_override(override, key, words):
    with pytest.raises(CaseError) as info:
        apply(override)
    err = info.value
    message = str(err)
    assert message.startswith(f"case.toml: {key}: "), message
    assert words in message, message
    assert "\n" not in message
    assert (err.file, err.key) == ("case.toml", key)


def test_error_in_later_override_leaves_input_untouched():
    before = copy.deepcopy(DATA)
    with pytest.raises(CaseError):
        apply("mesh.max_cell=1", "regions.7.material=x")
    assert DATA == before


def test_empty_list_index_message():
    data = {"probes": []}
    with pytest.raises(CaseError, match=r"probes has 0 items \(it is empty\)"):
        apply_overrides(data, ["probes.0.name=A"], "c.toml")


def test_entries_addressed_by_name():
    """``boundaries.in.temperature`` is ``boundaries.0.temperature``: the entry whose name
    is ``in``."""
    assert apply("boundaries.in.temperature=18") == apply("boundaries.0.temperature=18")
    assert apply("boundaries.in.temperature=18")["boundaries"][0]["temperature"] == 18


def test_duplicate_names_ask_for_an_index():
    data = {"probes": [{"name": "A", "at": [0, 0]}, {"name": "A", "at": [1, 0]}]}
    with pytest.raises(CaseError, match="2 entries of probes are named 'A'; use a 0-based"):
        apply_overrides(data, ["probes.A.at=[0.5, 0]"], "c.toml")


CASES = sorted((Path(__file__).resolve().parents[2] / "cases").glob("*.toml"))


def _named_entries(data: dict):
    """(array path, index, name) of every named table in the case's arrays of tables."""
    arrays = {k: v for k, v in data.items() if isinstance(v, list)}
    arrays.update(
        {f"junction.{k}": v for k, v in data.get("junction", {}).items() if isinstance(v, list)}
    )
    for path, items in arrays.items():
        for i, item in enumerate(items):
            if isinstance(item, dict) and isinstance(item.get("name"), str):
                yield path, i, item["name"]


@pytest.mark.parametrize("case_file", CASES, ids=[c.name for c in CASES])
def test_set_by_name_equals_set_by_index_on_demo_cases(case_file):
    """On every demo case, every named entry (boundaries, probes, probe lines, flanking
    elements, named regions) set by name gives the same case data as by index; one full
    load of each compares the validated cases."""
    data = tomllib.loads(case_file.read_text(encoding="utf-8"))
    entries = list(_named_entries(data))
    assert entries, "every demo case has named entries"
    for path, i, name in entries:
        by_name = apply_overrides(data, [f"{path}.{name}.note=1"], str(case_file))
        by_index = apply_overrides(data, [f"{path}.{i}.note=1"], str(case_file))
        assert by_name == by_index != data
    path, i, name = next((p, i, n) for p, i, n in entries if p == "boundaries")
    b = data["boundaries"][i]
    key = (
        "air_temperature"
        if "air_temperature" in b
        else "temperature"
        if "temperature" in b
        else "heat_flux"
    )
    a = load_case(case_file, [f"boundaries.{name}.{key}=3.5"])
    c = load_case(case_file, [f"boundaries.{i}.{key}=3.5"])
    assert [(b.name, b.edges, b.kind) for b in a.boundaries] == [
        (b.name, b.edges, b.kind) for b in c.boundaries
    ]
    assert getattr(a.boundaries[i], key).at(0.0) == getattr(c.boundaries[i], key).at(0.0) == 3.5


# --set reaching into a material or parameter the file does not define: a typo that would
# change nothing (every row of a sweep over it the same) is refused; a new material that a
# region uses, a library material a region names, and a defined but unused one are fine
# (case-file contract: --set overrides keys of the case; no external source needed)
CORNER = """
title = "plain wall"
[parameters]
depth = 0.3
[mesh]
max_cell = 0.05
[materials.masonry]
conductivity = 0.6
[materials.spare]
conductivity = 0.1
[[regions]]
material = "masonry"
box = [0.0, 0.0, "${depth}", 1.0]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 1.0]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.3, 0.0], [0.3, 1.0]]]
air_temperature = 0.0
resistance = 0.04
"""


@pytest.mark.parametrize(
    ("override", "words"),
    [
        ("materials.masonr.conductivity=0.3", "defines no material 'masonr' and no region"),
        ("parameters.dept=0.2", "defines no parameter 'dept' and nothing refers to it"),
    ],
)
def test_typo_in_a_created_name_refused(tmp_path, override, words):
    path = tmp_path / "case.toml"
    path.write_text(CORNER, encoding="utf-8")
    with pytest.raises(CaseError) as err:
        load_case(path, [override])
    text = str(err.value)
    assert f"--set {override.split('=')[0]}" in text and words in text


@pytest.mark.parametrize(
    "overrides",
    [
        ["materials.masonry.conductivity=0.5"],
        ["materials.spare.conductivity=0.2"],  # defined in the file, unused: a variant's
        ["parameters.depth=0.3"],
        ["regions.0.material=clay", "materials.clay.conductivity=0.9"],
    ],
)
def test_overrides_of_defined_or_used_names_accepted(tmp_path, overrides):
    path = tmp_path / "case.toml"
    path.write_text(CORNER, encoding="utf-8")
    assert load_case(path, overrides).regions


def test_typo_in_a_sweep_refused_before_any_run(tmp_path, capsys):
    from fvheat.cli.main import main

    path = tmp_path / "case.toml"
    path.write_text(CORNER, encoding="utf-8")
    out = tmp_path / "sweep"
    args = ["sweep", str(path), "--out", str(out), "--jobs", "1"]
    assert main([*args, "--vary", "materials.masonr.conductivity=0.3,0.4"]) == 2
    lines = capsys.readouterr().err.strip().splitlines()
    assert len(lines) == 1 and "'masonr'" in lines[0], lines
    assert not out.exists()
