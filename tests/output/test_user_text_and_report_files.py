"""User text is never markup, and the report embeds only the results folder's own figures."""

from __future__ import annotations

import base64
import json
import os
import shutil

from .conftest import CASES, coarse_overrides, run_cli

BALCONY = next(c for c in CASES if c.stem == "balcony_slab")
TITLE = r"Kestrel $\frac{$ test_{x} *bold* <b>x</b> | pipe"


def test_markup_in_the_title_draws_and_is_shown_literally(tmp_path):
    """A title with matplotlib mathtext that does not parse, Markdown and HTML: the run
    draws every figure (exit 0) and both reports show the title as typed."""
    out = tmp_path / "results"
    sets = [a for o in coarse_overrides(BALCONY) for a in ("--set", o)]
    assert run_cli(["run", BALCONY, "-o", out, "-q", *sets, "--set", f"title={TITLE}"]) == 0
    index = json.loads((out / "figures" / "figures.json").read_text())
    assert {"temperature", "heat_flux", "mesh"} <= {r["name"] for r in index}
    md = (out / "report.md").read_text()
    first = md.splitlines()[0]
    assert first == r"# Kestrel \$\\frac\{\$ test\_\{x\} \*bold\* \<b\>x\</b\> \| pipe"
    html = (out / "report.html").read_text()
    assert "<b>x</b>" not in html and "&lt;b&gt;x&lt;/b&gt;" in html


def test_report_embeds_only_its_own_figures(tmp_path):
    """figures.json altered to list a file outside the folder (absolute, through '..', and
    through a symbolic link): the rebuilt report embeds none of them."""
    out = tmp_path / "results"
    sets = [a for o in coarse_overrides(BALCONY) for a in ("--set", o)]
    assert run_cli(["run", BALCONY, "-o", out, "-q", *sets]) == 0
    secret = tmp_path / "secret.png"
    shutil.copy(out / "figures" / "mesh.png", secret)
    secret.write_bytes(secret.read_bytes() + b"SECRET-MARKER")
    os.symlink(secret, out / "figures" / "linked.png")
    index_file = out / "figures" / "figures.json"
    index = json.loads(index_file.read_text())
    for name, png in (
        ("absolute", str(secret)),
        ("dotdot", "figures/../../secret.png"),
        ("linked", "figures/linked.png"),
    ):
        index.append({"name": name, "png": png, "svg": None, "caption": f"{name} figure"})
    index_file.write_text(json.dumps(index))
    assert run_cli(["report", out, "-q"]) == 0
    html = (out / "report.html").read_text()
    marker = base64.b64encode(secret.read_bytes())[-40:].decode()
    assert marker not in html
    for name in ("absolute", "dotdot", "linked"):
        assert f"{name} figure" not in html
    assert "mesh" in html  # the run's own figures are still there


def test_damaged_figure_index_is_ignored(tmp_path):
    out = tmp_path / "results"
    sets = [a for o in coarse_overrides(BALCONY) for a in ("--set", o)]
    assert run_cli(["run", BALCONY, "-o", out, "-q", "--no-plots", *sets]) == 0
    (out / "figures").mkdir(exist_ok=True)
    (out / "figures" / "figures.json").write_text("{not json")
    assert run_cli(["report", out, "-q"]) == 0
    assert (out / "report.html").exists()
