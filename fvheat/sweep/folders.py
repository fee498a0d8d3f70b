"""Variant folders as the coordinator finds them on a resume.

- A worker that finishes a variant writes :data:`MARKER` (``variant.json``) last, after
  every other output: its overrides, the case digest, its main results, the SHA-256 of
  every input file and its wall time. A folder with a valid marker holds a finished
  variant even when the database never heard of it (the coordinator was killed before it
  recorded the result, or the database was deleted): :func:`finished_outcome` takes it
  back without running it again.
- :func:`folder_problem` says what is wrong with the folder of a variant the database
  holds as done (missing, summary missing or unreadable, or of another variant).
- :func:`remove_temporary_files` deletes what a writer killed mid-write leaves behind.
"""

from __future__ import annotations

import json
import os
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import Any

from fvheat import __version__
from fvheat.output.files import atomic_write_text, is_temporary
from fvheat.sweep.identity import InputCheck
from fvheat.sweep.results import main_results
from fvheat.sweep.worker import Outcome

#: written last into a finished variant's folder
MARKER = "variant.json"
SUMMARY = "summary.json"


class _Unusable(Exception):
    """A folder's file is missing or unreadable (the message says which)."""


def clear_marker(folder: Path) -> None:
    """Remove the marker before a variant (re)runs: it must never vouch for outputs being
    rewritten."""
    (Path(folder) / MARKER).unlink(missing_ok=True)


def write_marker(
    folder: Path, overrides: Sequence[str], case_sha256: str | None, outcome: Outcome
) -> None:
    """Write the marker of a finished variant (after all its other outputs)."""
    record = {
        "overrides": list(overrides),
        "case_sha256": case_sha256,
        "results": outcome.results,
        "inputs": outcome.inputs,
        "seconds": outcome.seconds,
        "fvheat_version": __version__,
    }
    atomic_write_text(Path(folder) / MARKER, json.dumps(record, indent=1, allow_nan=True) + "\n")


def folder_problem(
    folder: Path, case_file: Path, overrides: Sequence[str], results: Mapping[str, float]
) -> str | None:
    """None when ``folder`` holds the results of the variant run with ``overrides`` on
    ``case_file`` and they are ``results``; otherwise what is wrong, in a few words."""
    folder = Path(folder)
    if not folder.is_dir():
        return "its folder is missing"
    try:
        summary = _read_json(folder / SUMMARY)
        if not _same_variant(summary, case_file, overrides):
            return f"{SUMMARY} is of another variant or case file"
        if main_results(summary) != dict(results):
            return f"{SUMMARY} holds other results than the sweep database"
    except _Unusable as err:
        return str(err)
    except (KeyError, TypeError, AttributeError):
        return f"{SUMMARY} is damaged (keys missing)"
    return None


def finished_outcome(
    folder: Path, case_file: Path, overrides: Sequence[str], inputs: InputCheck
) -> Outcome | None:
    """The outcome of a variant whose folder holds a finished run of it (a valid marker,
    a matching summary, input files unchanged), else None."""
    try:
        marker = _read_json(Path(folder) / MARKER)
        results = {str(k): float(v) for k, v in marker["results"].items()}
        recorded = {str(k): str(v) for k, v in marker["inputs"].items()}
        seconds = float(marker["seconds"])
        same = sorted(marker["overrides"]) == sorted(overrides)
    except (_Unusable, KeyError, TypeError, ValueError, AttributeError):
        return None
    if not same or folder_problem(folder, case_file, overrides, results) is not None:
        return None
    if inputs.changed(recorded):
        return None
    return Outcome("done", None, results, seconds, recorded)


def remove_temporary_files(folder: Path) -> list[Path]:
    """Delete every temporary file of :func:`fvheat.output.files.atomic_write_file` in
    ``folder`` and its sub-folders (symbolic links are not followed); return them."""
    removed = []
    for root, _dirs, names in os.walk(folder):
        for name in names:
            path = Path(root) / name
            if is_temporary(name) and path.is_file() and not path.is_symlink():
                try:
                    path.unlink()
                except FileNotFoundError:
                    continue
                removed.append(path)
    return removed


def _read_json(path: Path) -> dict[str, Any]:
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise _Unusable(f"{path.name} is missing") from None
    except (OSError, UnicodeDecodeError) as err:
        raise _Unusable(f"{path.name} is unreadable ({type(err).__name__})") from None
    try:
        data = json.loads(text)
    except ValueError:
        raise _Unusable(f"{path.name} is damaged (not JSON)") from None
    if not isinstance(data, dict):
        raise _Unusable(f"{path.name} is damaged (not a JSON object)")
    return data


def _same_variant(summary: dict[str, Any], case_file: Path, overrides: Sequence[str]) -> bool:
    """Whether a summary was written by a run of ``case_file`` (these very bytes) with these
    overrides (in any order)."""
    from fvheat.output.summary import case_digest  # the digest every summary carries

    given = summary.get("overrides")
    if not isinstance(given, list) or not all(isinstance(o, str) for o in given):
        return False
    if sorted(given) != sorted(overrides):
        return False
    return summary.get("case_sha256") == case_digest(Path(case_file), tuple(given))
