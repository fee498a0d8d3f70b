"""The optional [project] table: free text, TOML dates, --set, one-line errors."""

from __future__ import annotations

import pytest

from fvheat.errors import CaseError
from tests.casefiles import load

BODY = """
[mesh]
max_cell = 0.05
[materials.a]
conductivity = 1.0
[[regions]]
material = "a"
box = [0.0, 0.0, 0.2, 0.2]
[[boundaries]]
name = "in"
edges = [[[0.0, 0.0], [0.0, 0.2]]]
temperature = 20.0
"""


def test_absent_project_is_none(tmp_path):
    assert load(tmp_path, BODY).project is None


def test_project_keys_dates_and_overrides(tmp_path):
    text = '[project]\nname = " Harbour Row "\ndate = 2026-12-01\nreference = 2031\n' + BODY
    case = load(tmp_path, text, ["project.author=J. Example", "project.checker=K. Example"])
    p = case.project
    assert (p.name, p.date, p.reference) == ("Harbour Row", "2026-12-01", "2031")
    assert (p.author, p.checker) == ("J. Example", "K. Example")
    assert p.as_dict() == {
        "name": "Harbour Row",
        "reference": "2031",
        "author": "J. Example",
        "checker": "K. Example",
        "date": "2026-12-01",
    }


@pytest.mark.parametrize(
    ("table", "key", "words"),
    [
        ('[project]\nauthor = ["a"]\n', "project.author", "expected text"),
        ("[project]\nbudget = 3\n", "project.budget", "unknown key"),
        ('project = "x"\n', "project", "expected a table"),
    ],
)
def test_bad_project_values_name_the_key(tmp_path, table, key, words):
    with pytest.raises(CaseError) as err:
        load(tmp_path, table + BODY)
    assert err.value.key == key and words in str(err.value)
    assert "\n" not in str(err.value)
