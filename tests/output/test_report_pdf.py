"""``fvheat report DIR --pdf``: report.pdf opens, holds the key numbers and the same
sections as the HTML report, keeps table rows whole and figures on A4; ``--validation``
appends the validation table."""

from __future__ import annotations

import json
import shutil

import numpy as np
import pypdf
import pytest

from fvheat.output.report.blocks import Document, Figure, Para, Section, Table
from fvheat.output.report.pdf import render_pdf
from fvheat.output.report.pdf_layout import A4
from tests.output.conftest import run_cli


@pytest.fixture(scope="module")
def pdf_folder(steady_results, tmp_path_factory):
    out = tmp_path_factory.mktemp("pdf") / "results"
    shutil.copytree(steady_results, out)
    assert run_cli(["report", out, "--pdf", "--validation", "-q"]) == 0
    return out


def pdf_text(path) -> list[str]:
    return [page.extract_text() for page in pypdf.PdfReader(path).pages]


def test_pdf_opens_on_a4_and_holds_the_key_numbers(pdf_folder):
    reader = pypdf.PdfReader(pdf_folder / "report.pdf")
    assert len(reader.pages) >= 3
    for page in reader.pages:
        w, h = float(page.mediabox.width), float(page.mediabox.height)
        assert w == pytest.approx(72 * A4[0], abs=1) and h == pytest.approx(72 * A4[1], abs=1)
    first = reader.pages[0].extract_text()
    s = json.loads((pdf_folder / "summary.json").read_text())
    j = s["junction"]
    for text in (
        f"{j['psi']:.4f} W/(m·K)",
        f"{j['L2D']:.4f} W/(m·K)",
        f"{j['f_Rsi']:.3f} (limit",
        f"{j['theta_si_min']:.2f} °C",
        s["project"]["author"],
        s["project"]["reference"],
    ):
        assert text in first, text
    whole = "\n".join(pdf_text(pdf_folder / "report.pdf"))
    for title in ("Summary", "Inputs", "Results in detail", "Figures", "Appendix", "Case file"):
        assert title in whole
    assert "Validation on this installation" in whole and "ISO 10211" in whole
    # the case file closes the document
    assert whole.rindex("Case file") > whole.rindex("Validation on this installation")


def test_html_has_the_validation_table_and_rebuild_without_pdf_removes_it(pdf_folder):
    html = (pdf_folder / "report.html").read_text(encoding="utf-8")
    assert 'id="validation"' in html and "<th>tolerance</th>" in html
    assert html.index('id="validation"') < html.index('id="case-file"')
    assert run_cli(["report", pdf_folder, "-q"]) == 0
    assert not (pdf_folder / "report.pdf").exists()  # it would no longer match
    assert 'id="validation"' not in (pdf_folder / "report.html").read_text(encoding="utf-8")
    assert run_cli(["report", pdf_folder, "--pdf", "--validation", "-q"]) == 0


def test_table_rows_are_never_split_across_pages(tmp_path):
    """200 rows whose middle cell wraps over several lines: each row's first and last cell
    are on one page, and every page that continues the table repeats its header."""
    words = " ".join(["wrapping"] * 40)
    rows = [[f"row{k}start", f"{words} {k}", f"row{k}end"] for k in range(200)]
    doc = Document("t", "s", [Section("a", "A", 2, [Table(["first", "text", "last"], rows)])])
    render_pdf(doc, tmp_path, tmp_path / "t.pdf")
    pages = pdf_text(tmp_path / "t.pdf")
    assert len(pages) > 5
    for k in range(200):
        holding = [i for i, p in enumerate(pages) if f"row{k}start" in p]
        assert len(holding) == 1 and f"row{k}end" in pages[holding[0]], k
    for p in pages:
        if "start" in p:
            assert "first" in p and "last" in p


def test_figures_fit_the_page(tmp_path, monkeypatch):
    """A very tall and a very wide image are scaled into the page's margins."""
    from matplotlib.image import imsave

    from fvheat.output.report import pdf_layout

    imsave(tmp_path / "tall.png", np.random.default_rng(1).random((900, 100)))
    imsave(tmp_path / "wide.png", np.random.default_rng(2).random((50, 1500)))
    boxes = []
    original = pdf_layout.Pages.finish_page

    def record(self):
        if self.fig is not None:
            boxes.extend(ax.get_position().bounds for ax in self.fig.axes)
        original(self)

    monkeypatch.setattr(pdf_layout.Pages, "finish_page", record)
    blocks = [Para("x"), Figure("tall.png", "tall " * 50), Figure("wide.png", "wide")]
    render_pdf(Document("t", "s", [Section("a", "A", 2, blocks)]), tmp_path, tmp_path / "f.pdf")
    assert len(boxes) == 2
    margin_x, margin_y = pdf_layout.MARGIN / A4[0], pdf_layout.MARGIN / A4[1]
    for x, y, w, h in boxes:
        assert x >= margin_x - 1e-9 and x + w <= 1 - margin_x + 1e-9
        assert y >= margin_y - 1e-9 and y + h <= 1 - margin_y + 1e-9


def test_report_with_a_failing_validation_says_so_and_exits_1(
    steady_results, tmp_path, monkeypatch
):
    import fvheat.assembly.system as system_module

    out = tmp_path / "results"
    shutil.copytree(steady_results, out)
    original = system_module.conductivity
    monkeypatch.setattr(system_module, "conductivity", lambda c, m: 1.03 * original(c, m))
    assert run_cli(["report", out, "--validation", "-q"]) == 1
    html = (out / "report.html").read_text(encoding="utf-8")
    assert "At least one reference case FAILED" in html and "<td>NO</td>" in html
