"""Sweep variants: full grids, zipped lists, variants files and their canonical keys."""

from __future__ import annotations

import itertools

import pytest

from fvheat.errors import CaseError
from fvheat.sweep.values import split_values, toml_text
from fvheat.sweep.variants import Variant, parse_vary, vary_variants
from fvheat.sweep.variants_file import read_variants_file


def test_full_grid_has_every_combination_last_key_fastest():
    keys, variants = vary_variants(["a.x=1,2", "b.y=0.1,0.2,0.3"])
    assert keys == ["a.x", "b.y"]
    expected = [
        (("a.x", a), ("b.y", b)) for a, b in itertools.product(["1", "2"], ["0.1", "0.2", "0.3"])
    ]
    assert [v.params for v in variants] == expected
    assert variants[0].overrides == ("a.x=1", "b.y=0.1")


def test_zip_pairs_the_lists():
    _, variants = vary_variants(["a=1,2,3", "b=x,y,z"], zipped=True)
    assert [v.overrides for v in variants] == [("a=1", "b=x"), ("a=2", "b=y"), ("a=3", "b=z")]


def test_zip_needs_equal_lengths():
    with pytest.raises(CaseError, match=r"--zip.*a: 2, b: 3"):
        vary_variants(["a=1,2", "b=1,2,3"], zipped=True)


def test_commas_inside_arrays_tables_and_quotes_do_not_split():
    text = '[0, 1],[2, 3], {mean = 0, amplitude = 8}, "a,b"'
    assert split_values(text) == ["[0, 1]", "[2, 3]", "{mean = 0, amplitude = 8}", '"a,b"']


@pytest.mark.parametrize(
    ("spec", "message"),
    [
        ("a.b", "expected dotted.path=value1"),
        ("=1,2", "empty key"),
        ("a=1,,2", "empty value"),
        ("a=", "a: no values after '='"),
        ("a= ", "a: no values after '='"),
        ("a=1,", "empty value"),
    ],
)
def test_bad_vary_specs_name_the_argument(spec, message):
    with pytest.raises(CaseError, match=message) as info:
        parse_vary(spec)
    assert str(info.value).startswith("--vary")


def test_the_same_key_twice_is_an_error():
    with pytest.raises(CaseError, match="two --vary"):
        vary_variants(["a=1", "a=2"])


def test_key_is_canonical_over_order_and_number_spelling():
    one = Variant((("a", "2.0"), ("b", "x")))
    two = Variant((("b", '"x"'), ("a", "2.00")))
    assert one.key == two.key == '{"a":2.0,"b":"x"}'
    assert one.digest == two.digest and len(one.digest) == 8
    assert Variant((("a", "2.5"),)).key != one.key


def test_repeated_values_run_once():
    _, variants = vary_variants(["a=1,1.0,2"])
    assert [v.overrides for v in variants] == [("a=1",), ("a=2",)]


def test_toml_text_round_trips_through_toml():
    import tomllib

    for value in [0.035, 3, True, "eps", [1, 2.5], {"mean": 0, "amplitude": 8.0}, -1e-7]:
        assert tomllib.loads(f"v = {toml_text(value)}")["v"] == value


def test_csv_and_toml_variants_files_list_the_same_variants(tmp_path):
    csv_file = tmp_path / "v.csv"
    csv_file.write_text(
        "materials.slab.conductivity,regions.3.material\n"
        "# a comment row\n"
        "2.3,slab\n"
        "1.6,thermal_break\n"
        "2.5,\n",
        encoding="utf-8",
    )
    toml_file = tmp_path / "v.toml"
    toml_file.write_text(
        '[[variant]]\n"materials.slab.conductivity" = 2.3\n"regions.3.material" = "slab"\n'
        "[[variant]]\nmaterials.slab.conductivity = 1.6\n"
        'regions.3.material = "thermal_break"\n'
        '[[variant]]\n"materials.slab.conductivity" = 2.5\n',
        encoding="utf-8",
    )
    csv_keys, from_csv = read_variants_file(csv_file)
    toml_keys, from_toml = read_variants_file(toml_file)
    assert csv_keys == toml_keys == ["materials.slab.conductivity", "regions.3.material"]
    assert [v.key for v in from_csv] == [v.key for v in from_toml]
    assert from_csv[2].params == (("materials.slab.conductivity", "2.5"),)


def test_variants_file_errors_name_the_file_and_line(tmp_path):
    bad = tmp_path / "bad.csv"
    bad.write_text("a,b\n1,2\n3\n", encoding="utf-8")
    with pytest.raises(CaseError, match=r"bad\.csv: line 3: 1 cells, the header has 2"):
        read_variants_file(bad)
    with pytest.raises(CaseError, match=r"\.csv or \.toml"):
        read_variants_file(tmp_path / "v.json")
    with pytest.raises(CaseError, match="not found"):
        read_variants_file(tmp_path / "missing.csv")


def test_a_variants_file_with_a_byte_order_mark_reads_as_without(tmp_path):
    # spreadsheet programs save "CSV UTF-8" with a byte-order mark before the header
    text = "materials.slab.conductivity,regions.3.material\n2.3,slab\n1.6,thermal_break\n"
    plain, marked = tmp_path / "plain.csv", tmp_path / "marked.csv"
    plain.write_text(text, encoding="utf-8")
    marked.write_bytes(b"\xef\xbb\xbf" + text.encode("utf-8"))
    keys, variants = read_variants_file(marked)
    assert keys[0] == "materials.slab.conductivity"  # no "\ufeff" in front of the first key
    assert (keys, variants) == read_variants_file(plain)
    toml_file = tmp_path / "marked.toml"
    toml_file.write_bytes(b'\xef\xbb\xbf[[variant]]\n"materials.slab.conductivity" = 2.3\n')
    assert read_variants_file(toml_file)[0] == ["materials.slab.conductivity"]
