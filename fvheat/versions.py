"""Versions of installed packages, without importing them when they are not loaded yet."""

from __future__ import annotations

import sys


def package_version(name: str) -> str:
    """The version of package ``name``: from the module when it is already imported, else
    from the installed distribution's metadata; "?" when it is not installed."""
    module = sys.modules.get(name)
    if module is not None and hasattr(module, "__version__"):
        return str(module.__version__)
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version(name)
    except PackageNotFoundError:
        return "?"
