"""The report opens with the results (project, key numbers, the temperature map, the
cautions), then the inputs and the details, and ends with the case file; every material
row says where its values come from."""

from __future__ import annotations

import json
from html.parser import HTMLParser

from fvheat.case.materials import GIVEN
from fvheat.cautions import CAUTION
from tests.output.conftest import run_demo


class Sections(HTMLParser):
    """The report's <main> split at its h2 headings: id, title and the text and images
    of each section (h3 subsections belong to the h2 before them)."""

    def __init__(self) -> None:
        super().__init__()
        self.sections: list[dict] = []
        self.in_main = False
        self.heading: str | None = None

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "main":
            self.in_main = True
        elif self.in_main and tag == "h2":
            self.sections.append({"id": a.get("id"), "title": "", "text": "", "imgs": 0})
            self.heading = "h2"
        elif self.in_main and tag == "img" and self.sections:
            self.sections[-1]["imgs"] += 1

    def handle_endtag(self, tag):
        if tag == "main":
            self.in_main = False
        if tag == "h2":
            self.heading = None

    def handle_data(self, data):
        if not (self.in_main and self.sections):
            return
        key = "title" if self.heading else "text"
        self.sections[-1][key] += data


def sections(folder):
    p = Sections()
    p.feed((folder / "report.html").read_text(encoding="utf-8"))
    return p.sections


def test_first_section_holds_project_key_numbers_map_and_cautions(steady_results):
    s = json.loads((steady_results / "summary.json").read_text())
    j = s["junction"]
    first = sections(steady_results)[0]
    assert first["id"] == "summary"
    text = first["text"]
    # the demo's [project] table, as summary.json holds it
    assert s["project"]["author"] == "A. Example" and s["project"]["date"] == "2026-11-30"
    for value in s["project"].values():
        assert value in text
    for system, psi in j["psi_by_dimensions"].items():
        assert f"ψ, {system.replace('_', ' ')} dimensions" in text
        assert f"{psi:.4f} W/(m·K)" in text
    assert f"{j['L2D']:.4f} W/(m·K)" in text
    verdict = "pass" if j["f_Rsi_pass"] else "FAIL"
    assert f"{j['f_Rsi']:.3f} (limit {j['f_Rsi_limit']:g}: {verdict})" in text
    assert f"{j['theta_si_min']:.2f} °C at ({j['theta_si_min_at'][0]:.3f}," in text
    assert f"{j['dew_point']:.2f} °C" in text
    assert first["imgs"] == 1  # the temperature map
    assert CAUTION in text
    for w in s["warnings"]:
        assert w in text


def test_transient_summary_gives_the_worst_values_over_the_run(transient_results):
    s = json.loads((transient_results / "summary.json").read_text())
    text = sections(transient_results)[0]["text"]
    for name, b in s["boundaries"].items():
        assert f"lowest θ_s over the run, {name}" in text
        assert f"{b['min_temperature_over_run']:.2f} °C" in text


def test_order_results_inputs_details_appendix_with_the_case_file_last(steady_results):
    ids = [sec["id"] for sec in sections(steady_results)]
    assert ids == ["summary", "inputs", "results", "plots", "appendix"]
    html = (steady_results / "report.html").read_text(encoding="utf-8")
    last_h3 = html.rsplit("<h3 ", 1)[1]
    assert last_h3.startswith('id="case-file"') and "<pre>" in last_h3
    assert "[project]" in last_h3  # the case text itself


def test_project_author_can_be_set_on_the_command_line(tmp_path):
    out = tmp_path / "r"
    assert run_demo("balcony_slab", out, "--no-plots", "--set", "project.author=C. Other") == 0
    s = json.loads((out / "summary.json").read_text())
    assert s["project"]["author"] == "C. Other"
    assert "C. Other" in sections(out)[0]["text"]


def test_every_material_row_names_its_source(steady_results):
    inputs = json.loads((steady_results / "inputs.json").read_text())
    assert all(m["source"] for m in inputs["materials"])
    # the balcony demo types every value into the case file
    assert {m["source"] for m in inputs["materials"]} == {GIVEN}
    html = (steady_results / "report.html").read_text(encoding="utf-8")
    assert "<th>source of the values</th>" in html and f"<td>{GIVEN}</td>" in html


LIBRARY_CASE = """
title = "library sources"
[mesh]
max_cell = 0.05
[materials.block]
library = "clay_brick"
conductivity = 0.6
[[regions]]
material = "block"
box = [0.0, 0.0, 0.2, 0.3]
[[regions]]
material = "mineral_wool"
box = [0.2, 0.0, 0.3, 0.3]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.3]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.3, 0.0], [0.3, 0.3]]]
air_temperature = 0.0
resistance = 0.04
"""


def test_library_rows_give_the_library_source_and_say_from_memory(tmp_path):
    from fvheat.properties.library import lookup
    from tests.output.conftest import run_cli

    case = tmp_path / "lib.toml"
    case.write_text(LIBRARY_CASE, encoding="utf-8")
    assert run_cli(["run", case, "-o", tmp_path / "r", "-q", "--no-plots"]) == 0
    inputs = json.loads((tmp_path / "r" / "inputs.json").read_text())
    src = {m["name"]: m["source"] for m in inputs["materials"]}
    wool = lookup("mineral_wool").source
    assert src["mineral_wool"] == f"library entry mineral_wool: {wool}"
    assert "from memory" in wool  # the library says so (fvheat/properties/materials.toml)
    assert src["block"].startswith("library entry clay_brick: ")
    assert src["block"].endswith(f"; conductivity {GIVEN}")
    html = (tmp_path / "r" / "report.html").read_text(encoding="utf-8")
    assert 'Rows whose source says "from memory"' in html.replace("&quot;", '"')
