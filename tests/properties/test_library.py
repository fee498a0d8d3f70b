"""Built-in material library: completeness of every row and spot checks of design values.

The spot-check values are recalled, not copied: each names its source and is marked
"from memory" beside it.
"""

import math
import re
import tomllib
from pathlib import Path

import pytest

from fvheat.properties import LibraryMaterial, UnknownMaterialError, library, lookup

LIB = library()
NAMES = sorted(LIB)

# A source must cite a standard, a handbook or say it is common practice.
RECOGNISED_SOURCE = re.compile(
    r"\bISO \d{4,5}|\bEN \d{3,5}|Incropera|CIBSE|BRE BR|common practice", re.IGNORECASE
)


def test_library_has_the_materials_the_brief_lists():
    required = {
        "concrete_medium_density", "concrete_high_density",
        "concrete_reinforced_1pct", "concrete_reinforced_2pct",
        "clay_brick", "calcium_silicate_brick", "aerated_concrete_block",
        "timber_softwood", "timber_hardwood", "plywood",
        "steel", "stainless_steel", "aluminium",
        "pvc_rigid", "polyamide_66_gf25", "epdm", "silicone", "polyurethane_rigid", "butyl",
        "glass", "mineral_wool", "glass_wool", "eps", "xps", "pir_pur_board",
        "gypsum_board", "gypsum_plaster", "cement_screed", "lime_cement_render",
        "soil_clay_silt", "soil_sand_gravel", "water", "ice", "still_air",
    }  # fmt: skip
    assert required <= set(LIB), sorted(required - set(LIB))


@pytest.mark.parametrize("name", NAMES)
def test_every_row_is_complete(name):
    m = LIB[name]
    assert isinstance(m, LibraryMaterial)
    assert m.name == name
    assert re.fullmatch(r"[a-z][a-z0-9]*(_[a-z0-9]+)*", name), "ids are lowercase snake_case"
    for value in (m.conductivity, m.density, m.specific_heat):
        assert math.isfinite(value) and value > 0
    assert m.emissivity is None or 0 < m.emissivity <= 1
    assert m.source.strip()


@pytest.mark.parametrize("name", NAMES)
def test_every_source_names_a_standard_handbook_or_common_practice(name):
    assert RECOGNISED_SOURCE.search(LIB[name].source), LIB[name].source


@pytest.mark.parametrize("name", NAMES)
def test_every_source_says_the_values_are_recalled(name):
    # None of these values was copied from the standards; each row must say so.
    assert "from memory" in LIB[name].source


@pytest.mark.parametrize(
    "name", ["mineral_wool", "glass_wool", "eps", "xps", "pir_pur_board", "cellular_glass"]
)
def test_insulation_rows_are_typical_values_not_product_values(name):
    m = LIB[name]
    assert "typical product design value" in m.source
    assert "common practice" in m.source
    assert "product" in m.note.lower()
    assert 0.015 < m.conductivity < 0.06


def test_still_air_is_marked_not_for_cavities():
    note = lookup("still_air").note
    assert "NOT for air cavities" in note
    assert "equivalent_conductivity" in note


# Sources of the spot checks. All from memory: the standards were not at hand.
T3 = "ISO 10456:2007 Table 3, from memory"
T3_B1 = "ISO 10456:2007 Table 3 and ISO 10077-2:2017 Table B.1, from memory"
GROUND = "ISO 13370 ground table and ISO 10456:2007 Table 3, from memory"
EN673 = "EN 673 corrected emissivity of uncoated soda lime glass, from memory"
PANEL = "ISO 10077-2: panel of 0.035 W/(m·K) replaces the glazing for U_f, from memory"

# name, attribute, value, source
SPOT_CHECKS = [
    ("aluminium", "conductivity", 160.0, T3_B1),
    ("aluminium", "density", 2800.0, T3),
    ("aluminium", "specific_heat", 880.0, T3),
    ("steel", "conductivity", 50.0, T3_B1),
    ("steel", "density", 7800.0, T3),
    ("steel", "specific_heat", 450.0, T3),
    ("stainless_steel", "conductivity", 17.0, T3_B1),
    ("pvc_rigid", "conductivity", 0.17, T3_B1),
    ("polyamide_66_gf25", "conductivity", 0.30, T3_B1),
    ("epdm", "conductivity", 0.25, T3_B1),
    ("silicone", "conductivity", 0.35, T3_B1),  # pure silicone
    ("butyl", "conductivity", 0.24, T3_B1),  # solid / hot melt
    ("glass", "conductivity", 1.0, T3_B1),  # soda lime
    ("glass", "density", 2500.0, T3),
    ("glass", "specific_heat", 750.0, T3),
    ("glass", "emissivity", 0.837, EN673),
    ("concrete_reinforced_2pct", "conductivity", 2.5, T3),
    ("concrete_reinforced_1pct", "conductivity", 2.3, T3),
    ("concrete_high_density", "conductivity", 2.0, T3),  # 2400 kg/m³
    ("timber_softwood", "conductivity", 0.13, T3),  # 500 kg/m³
    ("gypsum_board", "conductivity", 0.21, T3),  # plasterboard 700 kg/m³
    ("water", "conductivity", 0.60, T3),  # at 10 °C
    ("ice", "conductivity", 2.3, T3),  # at -10 °C
    ("still_air", "conductivity", 0.025, T3),  # gases: air
    ("soil_clay_silt", "conductivity", 1.5, GROUND),
    ("soil_sand_gravel", "conductivity", 2.0, GROUND),
    ("glazing_substitute_panel", "conductivity", 0.035, PANEL),
]


@pytest.mark.parametrize(("name", "attribute", "value", "source"), SPOT_CHECKS)
def test_spot_check_against_recalled_design_values(name, attribute, value, source):
    assert getattr(lookup(name), attribute) == pytest.approx(value, rel=1e-12), source


@pytest.mark.parametrize(
    ("name", "rho_c"),
    [
        ("soil_clay_silt", 3.0e6),  # ISO 13370 ground table: clay or silt, from memory
        ("soil_sand_gravel", 2.0e6),  # ISO 13370 ground table: sand or gravel, from memory
        ("rock", 2.0e6),  # ISO 13370 ground table: homogeneous rock, from memory
    ],
)
def test_soil_heat_capacity_per_volume(name, rho_c):
    m = lookup(name)
    assert m.density * m.specific_heat == pytest.approx(rho_c, rel=1e-12)


def test_coated_and_bare_metals_differ_only_in_emissivity():
    # ISO 10077-2 (from memory): ε = 0.9 for coated surfaces; bare metal is much lower.
    coated, bare = lookup("aluminium"), lookup("aluminium_bare")
    assert coated.emissivity == pytest.approx(0.9)
    assert bare.emissivity is not None and bare.emissivity < 0.5
    assert (coated.conductivity, coated.density, coated.specific_heat) == (
        bare.conductivity,
        bare.density,
        bare.specific_heat,
    )


@pytest.mark.parametrize(
    ("query", "expected"),
    [
        ("aluminium", "aluminium"),
        ("Stainless steel", "stainless_steel"),
        ("  stainless-steel ", "stainless_steel"),
        ("Aluminum", "aluminium"),
        ("PVC", "pvc_rigid"),
        ("PA66_GF25", "polyamide_66_gf25"),
        ("plasterboard", "gypsum_board"),
    ],
)
def test_lookup_normalises_names_and_aliases(query, expected):
    assert lookup(query) is LIB[expected]


def test_lookup_unknown_name_suggests_close_matches():
    with pytest.raises(KeyError) as info:
        lookup("aluminim")
    assert isinstance(info.value, UnknownMaterialError)
    message = str(info.value)
    assert "'aluminim'" in message
    assert "'aluminium'" in message
    assert not message.startswith('"')  # plain message, not a quoted KeyError repr


def test_lookup_with_no_close_match_points_to_the_list():
    with pytest.raises(KeyError, match=r"library\(\)"):
        lookup("zzzz")


def test_library_returns_a_fresh_dict_each_call():
    first = library()
    first.pop("steel")
    assert "steel" in library()


def test_data_file_is_declared_as_package_data():
    pyproject = Path(__file__).resolve().parents[2] / "pyproject.toml"
    config = tomllib.loads(pyproject.read_text(encoding="utf-8"))
    package_data = config["tool"]["setuptools"]["package-data"]
    assert "materials.toml" in package_data["fvheat.properties"]
