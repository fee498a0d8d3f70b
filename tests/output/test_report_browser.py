"""report.html in a real headless browser (chromium, where installed; Debian's `chromium`
package in CI): at the width of an A4 page it lays out without horizontal overflow, and
every embedded image decodes."""

from __future__ import annotations

import json
import re
import shutil
import subprocess
from pathlib import Path

import pytest

CANDIDATES = ("/usr/bin/chromium", "chromium", "chromium-browser", "google-chrome")
BROWSER = next((b for b in (shutil.which(c) for c in CANDIDATES) if b), None)
pytestmark = pytest.mark.skipif(BROWSER is None, reason="no headless chromium on this machine")

#: A4 at the CSS resolution of 96 px per inch: 210 mm × 297 mm
A4_PX = (794, 1123)

PROBE = """<script>
window.addEventListener("load", () => {
  const root = document.documentElement;
  const images = Array.from(document.images);
  const broken = images.filter((i) => !(i.complete && i.naturalWidth > 0)).length;
  const wide = Array.from(document.body.querySelectorAll("*"))
    .filter((e) => e.getBoundingClientRect().right > root.clientWidth + 1)
    .map((e) => e.tagName + (e.id ? "#" + e.id : ""));
  const out = document.createElement("pre");
  out.id = "layout-probe";
  out.textContent = JSON.stringify({scroll: root.scrollWidth, client: root.clientWidth,
                                    images: images.length, broken: broken, wide: wide});
  document.body.appendChild(out);
});
</script>"""


def layout(html: Path, tmp_path: Path) -> dict:
    page = tmp_path / "probe.html"
    page.write_text(
        html.read_text(encoding="utf-8").replace("</body>", PROBE + "</body>"), encoding="utf-8"
    )
    done = subprocess.run(
        [
            str(BROWSER),
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            f"--window-size={A4_PX[0]},{A4_PX[1]}",
            "--virtual-time-budget=10000",
            "--dump-dom",
            page.as_uri(),
        ],
        capture_output=True,
        text=True,
        timeout=120,
        check=True,
    )
    found = re.search(r'<pre id="layout-probe">(.*?)</pre>', done.stdout, flags=re.S)
    assert found, done.stderr[-2000:]
    return json.loads(found.group(1).replace("&quot;", '"'))


@pytest.mark.parametrize("which", ["steady", "transient"])
def test_report_fits_a4_width_and_images_decode(which, steady_results, transient_results, tmp_path):
    folder = steady_results if which == "steady" else transient_results
    got = layout(folder / "report.html", tmp_path)
    index = json.loads((folder / "figures" / "figures.json").read_text())
    assert got["images"] == len(index) and got["broken"] == 0
    assert got["scroll"] <= got["client"], got["wide"]
    assert got["wide"] == []
