"""The code stays lint-free, type-checked and documented: ruff, mypy (configured in
pyproject.toml) and scripts/api_coverage.py run as part of the suite, so the README's test
command (and CI) runs them. The tools are skipped, with the reason, when not installed."""

from __future__ import annotations

import importlib.util
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


def _load_api_coverage():
    spec = importlib.util.spec_from_file_location(
        "api_coverage", ROOT / "scripts" / "api_coverage.py"
    )
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up there
    spec.loader.exec_module(module)
    return module


api_coverage = _load_api_coverage()


def _run(args: list[str]) -> subprocess.CompletedProcess[str]:
    return subprocess.run(args, cwd=ROOT, capture_output=True, text=True, timeout=600)


def test_ruff_check_is_clean() -> None:
    if importlib.util.find_spec("ruff") is None:
        pytest.skip("ruff is not installed (pip install -e '.[test]')")
    out = _run([sys.executable, "-m", "ruff", "check", "."])  # settings from pyproject.toml
    assert out.returncode == 0, out.stdout + out.stderr


@pytest.mark.slow  # about 25 s without a mypy cache
def test_mypy_is_clean() -> None:
    if importlib.util.find_spec("mypy") is None:
        pytest.skip("mypy is not installed (pip install -e '.[test]')")
    out = _run([sys.executable, "-m", "mypy"])  # files and settings from pyproject.toml
    assert out.returncode == 0, out.stdout + out.stderr
    assert "Success" in out.stdout


def test_public_api_fully_typed_and_documented() -> None:
    rep = api_coverage.report()
    missing = [
        f"{f.file}:{f.line} {f.name}" for f in rep.functions if not (f.typed and f.documented)
    ]
    assert len(rep.functions) > 300  # the walk found the package
    assert not missing, "untyped or undocumented public functions:\n" + "\n".join(missing)
    assert rep.typed == rep.documented == 100.0


def test_api_coverage_counts_what_is_missing(tmp_path: Path) -> None:
    """The coverage walk itself: a made-up package with one gap of each kind."""
    pkg = tmp_path / "pkg"
    (pkg / "skipped").mkdir(parents=True)
    (pkg / "__init__.py").write_text("")
    (pkg / "_private.py").write_text("def hidden(x): pass\n")
    (pkg / "skipped" / "mod.py").write_text("def ignored(x): pass\n")
    (pkg / "mod.py").write_text(
        "from typing import overload\n"
        "def good(x: int, *a: int, **k: int) -> int:\n    '''Doc.'''\n    return x\n"
        "def no_return(x: int):\n    '''Doc.'''\n"
        "def no_doc(x: int) -> None:\n    pass\n"
        "def _private(x): pass\n"
        "@overload\ndef over(x: int) -> int: ...\n"
        "def over(x: int) -> int:\n    '''Doc.'''\n    return x\n"
        "class C:\n"
        "    def method(self, y) -> None:\n        '''Doc.'''\n"
        "    @staticmethod\n    def static(y: int) -> None:\n        '''Doc.'''\n"
        "    def __init__(self, z): pass\n"
        "    def outer(self) -> None:\n        '''Doc.'''\n        def inner(q): pass\n"
        "class _Hidden:\n    def visible(self, q): pass\n"
    )
    rep = api_coverage.report(pkg, ("pkg/skipped",))
    found = {f.name: f for f in rep.functions}
    assert set(found) == {"good", "no_return", "no_doc", "over", "C.method", "C.static", "C.outer"}
    assert found["no_return"].untyped == ["return"]
    assert found["C.method"].untyped == ["y"]
    assert not found["no_doc"].documented and found["no_doc"].typed
    assert found["good"].typed and found["C.static"].typed and found["over"].typed
    assert rep.typed == pytest.approx(100 * 5 / 7)
    assert rep.documented == pytest.approx(100 * 6 / 7)


#: the contributor guide's rule: small modules with one job each (common practice)
MOST_LINES = 500


def test_no_module_exceeds_the_line_limit() -> None:
    """Every module of the package holds at most MOST_LINES lines."""
    lines = {
        str(p.relative_to(ROOT)): len(p.read_text(encoding="utf-8").splitlines())
        for p in sorted((ROOT / "fvheat").rglob("*.py"))
    }
    long = {name: n for name, n in lines.items() if n > MOST_LINES}
    assert long == {}, f"split these modules (at most {MOST_LINES} lines): {long}"
