"""``--set`` overrides: dotted paths, list indices, TOML values, and errors naming the override."""

import copy

import pytest

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
        ("regions.first.material=x", "--set regions.first.material", "expected a 0-based index"),
        ("regions.-1.material=x", "--set regions.-1.material", "expected a 0-based index"),
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
