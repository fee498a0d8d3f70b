"""``fvheat sweep --out`` / ``--table`` paths that cannot be written: one line, exit 2,
before any variant runs and with nothing written."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from fvheat.cli.main import main
from fvheat.errors import CaseError
from fvheat.output.paths import check_output_file, check_output_folder

from .conftest import CASE, COARSE, SLAB


def snapshot(folder: Path) -> set[str]:
    return {str(p.relative_to(folder)) for p in folder.rglob("*")}


def sweep(tmp_path: Path, *extra: str) -> list[str]:
    return ["sweep", str(CASE), "--vary", f"{SLAB}=1.6", *COARSE, "-q", *extra]


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--out", "{f}"], "--out {f}: is a file, not a folder"),
        (["--out", "{f}/sub"], "--out {f}/sub: lies under {f}, which is a file"),
        (["--out", "{t}/s", "--table", "{d}.csv"], "--table {d}.csv: is a folder"),
        (["--out", "{t}/s", "--table", "{f}/t.csv"], "--table {f}/t.csv: lies under {f}"),
        (
            ["--out", "{t}/s", "--table", "{t}/nowhere/t.csv"],
            "--table {t}/nowhere/t.csv: the folder {t}/nowhere does not exist",
        ),
    ],
    ids=["out-is-file", "out-under-file", "table-is-folder", "table-under-file", "table-no-dir"],
)
def test_unwritable_output_paths_exit_2_before_anything_runs(tmp_path, capsys, args, message):
    f = tmp_path / "plain_file"
    f.write_text("not a folder\n", encoding="utf-8")
    d = tmp_path / "a_folder"
    (tmp_path / "a_folder.csv").mkdir()
    names = {"f": str(f), "d": str(d), "t": str(tmp_path)}
    before = snapshot(tmp_path)
    assert main(sweep(tmp_path, *(a.format(**names) for a in args))) == 2
    err = capsys.readouterr().err.strip()
    assert err.startswith(f"fvheat: error: {message.format(**names)}") and "\n" not in err
    assert snapshot(tmp_path) == before  # nothing written, no variant ran
    assert f.read_text(encoding="utf-8") == "not a folder\n"


def test_a_table_inside_the_new_sweep_folder_is_accepted(tmp_path):
    out = tmp_path / "new_sweep"
    assert main(sweep(tmp_path, "--out", str(out), "--table", str(out / "t.csv"))) == 0
    assert (out / "t.csv").read_text(encoding="utf-8").startswith(f"{SLAB},status,")


def _deny_writes_under(monkeypatch: pytest.MonkeyPatch, folder: Path) -> None:
    """Make ``os.access`` report ``folder`` and everything in it as not writable (as for a
    user without permission; tests often run as root, whom permissions do not stop)."""
    real = os.access

    def access(path: object, mode: int, **kw: object) -> bool:
        inside = Path(os.path.abspath(path)).is_relative_to(folder)  # type: ignore[arg-type]
        if inside and mode & os.W_OK:
            return False
        return real(path, mode, **kw)  # type: ignore[arg-type]

    monkeypatch.setattr("fvheat.output.paths.os.access", access)


def test_not_writable_places_are_refused(tmp_path, monkeypatch):
    locked = tmp_path / "locked"
    locked.mkdir()
    (locked / "old.csv").write_text("a\n", encoding="utf-8")
    _deny_writes_under(monkeypatch, locked)
    with pytest.raises(CaseError, match=r"--out .*locked/new: cannot create it: .*not writable"):
        check_output_folder(locked / "new", "--out")
    with pytest.raises(CaseError, match=r"--out .*locked: the folder is not writable"):
        check_output_folder(locked, "--out")
    with pytest.raises(CaseError, match=r"--table .*old\.csv: the file is not writable"):
        check_output_file(locked / "old.csv", "--table")
    with pytest.raises(CaseError, match=r"--table .*new\.csv: cannot write in .*locked"):
        check_output_file(locked / "new.csv", "--table")
    # elsewhere all is well
    check_output_folder(tmp_path / "free" / "deeper", "--out")
    check_output_file(tmp_path / "t.csv", "--table")


@pytest.mark.skipif(
    not hasattr(os, "geteuid") or os.geteuid() == 0, reason="permissions do not stop root"
)
def test_a_read_only_folder_is_refused_by_the_command(tmp_path, capsys):
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o500)
    try:
        assert main(sweep(tmp_path, "--out", str(locked / "s"))) == 2
        assert "not writable" in capsys.readouterr().err
        assert list(locked.iterdir()) == []
    finally:
        locked.chmod(0o700)
