#!/usr/bin/env python3
"""How much of fvheat's public API is typed and documented (read from the source with ast).

A public function is a function or method whose name does not start with ``_``, defined at
module level or in a public class (nested classes too) of a module whose name does not start
with ``_``; functions nested in functions are not counted, nor ``@overload`` signatures (their
implementation is). Typed: every parameter (except the ``self``/``cls`` of a method) and the
return value are annotated. Documented: the function has a docstring.

    python scripts/api_coverage.py            # percentages and what is missing
    python scripts/api_coverage.py --check    # exit 1 unless both are 100 %

Paths in :data:`EXCLUDED` (relative to the repository) are skipped.
"""

from __future__ import annotations

import argparse
import ast
import sys
from dataclasses import dataclass, field
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = ROOT / "fvheat"

#: package folders left out of the count (one entry per folder; none today)
EXCLUDED: tuple[str, ...] = ()


@dataclass
class Function:
    """One public function or method and what it lacks."""

    file: str
    line: int
    name: str
    untyped: list[str] = field(default_factory=list)
    documented: bool = True

    @property
    def typed(self) -> bool:
        """Whether every parameter and the return value are annotated."""
        return not self.untyped


@dataclass
class Report:
    """Every public function found, with percentages."""

    functions: list[Function]

    def _share(self, ok: int) -> float:
        return 100.0 * ok / len(self.functions) if self.functions else 100.0

    @property
    def typed(self) -> float:
        """Share of typed public functions, %."""
        return self._share(sum(f.typed for f in self.functions))

    @property
    def documented(self) -> float:
        """Share of documented public functions, %."""
        return self._share(sum(f.documented for f in self.functions))


def _is_overload(node: ast.FunctionDef | ast.AsyncFunctionDef) -> bool:
    for d in node.decorator_list:
        target = d.func if isinstance(d, ast.Call) else d
        name = target.attr if isinstance(target, ast.Attribute) else getattr(target, "id", "")
        if name == "overload":
            return True
    return False


def _is_static(node: ast.FunctionDef | ast.AsyncFunctionDef) -> bool:
    return any(getattr(d, "id", "") == "staticmethod" for d in node.decorator_list)


def _untyped(node: ast.FunctionDef | ast.AsyncFunctionDef, method: bool) -> list[str]:
    """Names of the unannotated parameters (and ``return``) of ``node``."""
    a = node.args
    params = [*a.posonlyargs, *a.args]
    if method and not _is_static(node) and params:
        params = params[1:]  # self / cls
    params += a.kwonlyargs
    params += [p for p in (a.vararg, a.kwarg) if p is not None]
    missing = [p.arg for p in params if p.annotation is None]
    if node.returns is None:
        missing.append("return")
    return missing


def _walk(body: list[ast.stmt], file: str, prefix: str, method: bool) -> list[Function]:
    out: list[Function] = []
    for node in body:
        if isinstance(node, ast.ClassDef) and not node.name.startswith("_"):
            out += _walk(node.body, file, f"{prefix}{node.name}.", True)
        elif isinstance(node, ast.FunctionDef | ast.AsyncFunctionDef):
            if node.name.startswith("_") or _is_overload(node):
                continue
            out.append(
                Function(
                    file,
                    node.lineno,
                    prefix + node.name,
                    _untyped(node, method),
                    bool(ast.get_docstring(node)),
                )
            )
    return out


def public_functions(
    package: Path = PACKAGE, excluded: tuple[str, ...] = EXCLUDED
) -> list[Function]:
    """Every public function of the modules under ``package`` outside ``excluded``."""
    root = package.parent
    skip = [root / e for e in excluded]
    out: list[Function] = []
    for path in sorted(package.rglob("*.py")):
        if any(path.is_relative_to(s) for s in skip):
            continue
        if path.stem.startswith("_") and path.stem not in ("__init__", "__main__"):
            continue
        rel = path.relative_to(root).as_posix()
        tree = ast.parse(path.read_text(encoding="utf-8"), filename=rel)
        out += _walk(tree.body, rel, "", False)
    return out


def report(package: Path = PACKAGE, excluded: tuple[str, ...] = EXCLUDED) -> Report:
    """The coverage report of ``package``."""
    return Report(public_functions(package, excluded))


def main(argv: list[str] | None = None) -> int:
    """Print the report; with ``--check``, exit 1 unless everything is typed and documented."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--check", action="store_true", help="exit 1 below 100 %%")
    args = parser.parse_args(argv)
    rep = report()
    for f in rep.functions:
        lacks = []
        if f.untyped:
            lacks.append(f"untyped: {', '.join(f.untyped)}")
        if not f.documented:
            lacks.append("no docstring")
        if lacks:
            print(f"{f.file}:{f.line}: {f.name} ({'; '.join(lacks)})")
    n = len(rep.functions)
    skipped = f" (excluded: {', '.join(EXCLUDED)})" if EXCLUDED else ""
    print(f"{n} public functions{skipped}")
    print(f"typed:      {rep.typed:6.2f} %")
    print(f"documented: {rep.documented:6.2f} %")
    if args.check and (rep.typed < 100.0 or rep.documented < 100.0):
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
