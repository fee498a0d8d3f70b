"""A probe line must run through the body over its whole length: one that leaves it is
one line naming probe_lines.N (it was a traceback from the interpolation operator when a
sample fell where no cell is). Found by the fuzz test (tests/cli/test_fuzz.py)."""

from __future__ import annotations

import pytest
from casefiles import load

from fvheat.errors import CaseError
from fvheat.mesh.rectilinear import build_mesh

L_SHAPE = """
[mesh]
max_cell = 0.05
[materials.w]
conductivity = 1.0
[[regions]]
material = "w"
box = [0, 0, 1.0, 0.2]
[[regions]]
material = "w"
box = [0, 0.2, 0.2, 1.0]
[[boundaries]]
name = "in"
edges = [[[0, 0], [0, 1.0]]]
temperature = 20
[[probe_lines]]
name = "l"
start = {start}
end = {end}
"""


@pytest.mark.parametrize(
    ("start", "end"),
    [
        ("[0.1, 0.1]", "[-0.9, 0.1]"),  # out of the body's bounding box
        ("[0.1, 0.9]", "[0.9, 0.1]"),  # across the L's empty corner (no cell there)
        ("[0.1, 0.5]", "[1e3, 0.5]"),
    ],
)
def test_line_leaving_the_body(tmp_path, start, end):
    case = load(tmp_path, L_SHAPE.format(start=start, end=end))
    with pytest.raises(CaseError) as err:
        build_mesh(case)
    text = str(err.value)
    assert "\n" not in text
    assert ": probe_lines.0: " in text and "leaves the body at" in text


@pytest.mark.parametrize(
    ("start", "end"),
    [
        ("[0.0, 0.1]", "[1.0, 0.1]"),  # from edge to edge of the body
        ("[0.1, 1.0]", "[0.1, 0.0]"),  # down the upright, end points on the outline
        ("[0.2, 0.2]", "[0.2, 1.0]"),  # along the re-entrant edge itself
    ],
)
def test_line_inside_the_body(tmp_path, start, end):
    build_mesh(load(tmp_path, L_SHAPE.format(start=start, end=end)))
