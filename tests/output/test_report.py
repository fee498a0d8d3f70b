"""The HTML report is self-contained (images embedded, no external references), parses as
HTML, and has every section; the Markdown report has the same sections and figure links."""

from __future__ import annotations

import base64
import json
from html.parser import HTMLParser
from typing import ClassVar

import pytest

from fvheat.cautions import CAUTION
from fvheat.evaluate.humidity import SATURATION_BASIS
from fvheat.output.report.document import SECTION_IDS

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


class Collector(HTMLParser):
    """Headings with their ids, every src/href, and the open/close balance of elements."""

    VOID: ClassVar[set[str]] = {"meta", "img", "br", "hr", "link", "input"}

    def __init__(self):
        super().__init__()
        self.ids: list[str] = []
        self.refs: list[tuple[str, str, str]] = []
        self.stack: list[str] = []
        self.errors: list[str] = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag in {"h1", "h2", "h3"} and a.get("id"):
            self.ids.append(a["id"])
        for key in ("src", "href"):
            if key in a:
                self.refs.append((tag, key, a[key] or ""))
        if tag not in self.VOID:
            self.stack.append(tag)

    def handle_endtag(self, tag):
        if not self.stack or self.stack[-1] != tag:
            self.errors.append(f"unexpected </{tag}>")
        else:
            self.stack.pop()


@pytest.fixture(params=["steady", "transient"])
def folder(request, steady_results, transient_results):
    return steady_results if request.param == "steady" else transient_results


def parse(folder) -> tuple[str, Collector]:
    text = (folder / "report.html").read_text(encoding="utf-8")
    p = Collector()
    p.feed(text)
    p.close()
    return text, p


def test_html_is_well_formed_and_has_every_section(folder):
    text, p = parse(folder)
    assert text.startswith("<!DOCTYPE html>")
    assert p.errors == [] and p.stack == []
    for ident in SECTION_IDS:
        assert ident in p.ids, ident
    assert CAUTION in text
    summary = json.loads((folder / "summary.json").read_text())
    assert summary["case_sha256"] in text


def test_html_embeds_its_images_and_links_nothing_outside(folder):
    text, p = parse(folder)
    assert "http" not in text and 'src="file' not in text
    index = json.loads((folder / "figures" / "figures.json").read_text())
    imgs = [v for tag, key, v in p.refs if tag == "img"]
    assert len(imgs) == len(index) >= 3
    prefix = "data:image/png;base64,"
    embedded = []
    for src in imgs:
        assert src.startswith(prefix)
        data = base64.b64decode(src[len(prefix) :], validate=True)
        assert data.startswith(PNG_SIGNATURE)
        embedded.append(data)
    # every figure of the index once (the temperature map in the summary, the rest later)
    files = [(folder / entry["png"]).read_bytes() for entry in index]
    assert sorted(embedded) == sorted(files)
    for _, key, v in p.refs:
        if key == "href":
            assert v.startswith("#") and v[1:] in p.ids


def test_junction_results_and_verdict_in_the_report(steady_results):
    text, _ = parse(steady_results)
    j = json.loads((steady_results / "summary.json").read_text())["junction"]
    assert f"{j['psi']:.4f} W/(m·K)" in text
    assert f"{j['L2D']:.4f} W/(m·K)" in text
    assert f"{j['f_Rsi']:.3f}" in text and f"{j['theta_si_min']:.2f} °C" in text
    verdict = "meets" if j["f_Rsi_pass"] else "does NOT meet"
    assert verdict in text
    # the saturation basis of the dew point is stated in summary.json and in the table
    assert j["dew_point_basis"] == SATURATION_BASIS
    assert "<td>dew point basis</td>" in text and SATURATION_BASIS in text


def test_report_without_junction_says_so(transient_results):
    text, _ = parse(transient_results)
    assert "No [junction] declared" in text


def test_markdown_has_the_same_sections_and_existing_figures(folder):
    import re

    md = (folder / "report.md").read_text(encoding="utf-8")
    html_titles = re.findall(
        r'<h[23] id="[^"]+">([^<]+)</h[23]>', (folder / "report.html").read_text(encoding="utf-8")
    )
    from html import unescape

    # Markdown shows text literally by escaping markup with backslashes
    md_titles = [
        re.sub(r"\\(.)", r"\1", m.group(1)) for m in re.finditer(r"^#{2,3} (.+)$", md, flags=re.M)
    ]
    assert md_titles == [unescape(t) for t in html_titles]
    links = re.findall(r"!\[(?:\\.|[^\]\\])*\]\(<([^>]+)>\)", md)
    assert links and all((folder / link).is_file() for link in links)
