"""``fvheat sweep`` on local worker processes: the same numbers as separate runs, a failed
variant recorded and the rest completed, resuming without recomputing, bad arguments."""

from __future__ import annotations

import csv
import json
import math

import pytest

from fvheat.cli.main import main

from .conftest import (
    CASE,
    COARSE,
    INSULATION,
    INSULATION_VALUES,
    SLAB,
    SLAB_VALUES,
    VARY_2X3,
    stored,
    sweep_args,
)


def test_six_rows_equal_six_separate_runs(sweep_2x3, tmp_path):
    folder, _ = sweep_2x3
    rows = stored(folder)
    assert len(rows) == 6 and all(r.status == "done" for r in rows)
    assert [(r.params[SLAB], r.params[INSULATION]) for r in rows] == [
        (k, w) for k in SLAB_VALUES for w in INSULATION_VALUES
    ]
    for i, row in enumerate(rows):
        out = tmp_path / f"run{i}"
        sets = [
            "--set",
            f"{SLAB}={row.params[SLAB]}",
            "--set",
            f"{INSULATION}={row.params[INSULATION]}",
        ]
        assert main(["run", str(CASE), "--out", str(out), "-q", "--no-plots", *COARSE, *sets]) == 0
        alone = json.loads((out / "summary.json").read_text())
        # the same pipeline on the same input: equal to round-off
        assert math.isclose(row.results["psi"], alone["junction"]["psi"], rel_tol=1e-12)
        for name, b in alone["boundaries"].items():
            assert math.isclose(row.results[f"heat_flow_{name}"], b["heat_flow"], rel_tol=1e-12)
        assert (folder / row.output / "summary.json").is_file()


def test_table_has_one_column_per_varied_key_then_status_and_results(sweep_2x3):
    folder, table = sweep_2x3
    with table.open(newline="") as fh:
        reader = csv.DictReader(fh)
        header = reader.fieldnames
        lines = list(reader)
    assert header[:3] == [SLAB, INSULATION, "status"]
    assert {"psi", "L2D", "f_Rsi", "heat_flow_outside", "heat_flow_inside_wall"} <= set(header)
    assert header[-2:] == ["message", "output"]
    for line, row in zip(lines, stored(folder), strict=True):
        assert float(line["psi"]) == row.results["psi"]  # full precision in the CSV
        assert line["output"] == row.output and line["status"] == "done"
    # fvheat collect of the database gives the same table
    assert main(["collect", str(folder / "sweep.sqlite"), "--csv", str(table) + ".2", "-q"]) == 0
    assert (table.parent / (table.name + ".2")).read_text() == table.read_text()


def test_rerun_resumes_nothing_and_keeps_rows(sweep_2x3, capsys):
    folder, _ = sweep_2x3
    before = stored(folder)
    assert main(sweep_args(folder, "-q", "--jobs", "2")) == 0
    after = stored(folder)
    assert after == before  # same ids, finish times and attempt counters: nothing recomputed
    assert all(r.attempts == 1 for r in after)
    # the same variants from a variants file (values spelt differently) are the same rows
    variants = folder.parent / "same.csv"
    variants.write_text(
        f"{INSULATION},{SLAB}\n"
        + "".join(f"{w}0,{k}\n" for k in SLAB_VALUES for w in INSULATION_VALUES),
        encoding="utf-8",
    )
    assert main(sweep_args(folder, "-q", vary=("--variants", str(variants)))) == 0
    assert stored(folder) == before
    assert capsys.readouterr().out == ""


def test_failed_variant_is_recorded_and_the_others_complete(tmp_path, capsys):
    out = tmp_path / "sweep"
    args = sweep_args(out, "-j", "2", vary=("--vary", f"{SLAB}=2.3,-1,1.6"))
    assert main(args) == 1
    printed = capsys.readouterr().out
    assert "1 failed" in printed and "Caution" in printed
    rows = stored(out)
    assert [r.status for r in rows] == ["done", "failed", "done"]
    failed = rows[1]
    assert f"{SLAB}: must be at least 1e-05" in failed.message
    assert failed.results == {} and failed.attempts == 1
    # --retry-failed runs it again (and fails again); the done ones are left alone
    assert main([*args, "-q", "--retry-failed"]) == 1
    again = stored(out)
    assert again[1].attempts == 2 and again[1].status == "failed"
    assert again[0] == rows[0] and again[2] == rows[2]


@pytest.mark.parametrize(
    ("extra", "message"),
    [
        (["--vary", "materials.slab.conductivity"], "--vary materials.slab.conductivity: expected"),
        (["--vary", "a=1,2", "--vary", "b=1", "--zip"], "--zip: --zip needs lists of equal length"),
        (
            ["--vary", "materials.slab.conductivty=1,2"],
            "unknown key (did you mean 'conductivity'?)",
        ),
        (["--vary", "regions.99.material=slab"], "index 99 is out of range"),
        (
            ["--vary", "mesh.max_cell=0.1,0.2", "--set", "mesh.max_cell=0.1"],
            "both varied and fixed",
        ),
        (["--vary", f"{SLAB}=1", "--jobs", "0"], "--jobs: must be at least 1"),
        (["--vary", f"{SLAB}=1", "--jobs", "-3"], "--jobs: must be at least 1, got -3"),
        (["--vary", f"{SLAB}="], f"--vary {SLAB}: no values after '='"),
        (["--vary", f"{SLAB}=1.6,"], f"--vary {SLAB}: empty value"),
        ([], "give at least one --vary"),
    ],
)
def test_bad_sweep_arguments_exit_2_before_anything_is_written(tmp_path, capsys, extra, message):
    out = tmp_path / "sweep"
    assert main(["sweep", str(CASE), "-o", str(out), *extra]) == 2
    err = capsys.readouterr().err.strip()
    assert err.startswith("fvheat: error: ") and "\n" not in err
    assert message in err
    assert not out.exists()


def test_a_folder_keeps_its_fixed_overrides(sweep_2x3, capsys):
    folder, _ = sweep_2x3
    args = ["sweep", str(CASE), *VARY_2X3, "--set", "mesh.max_cell=0.1", "-o", str(folder)]
    assert main(args) == 2
    assert "other --set overrides" in capsys.readouterr().err


def test_a_case_completed_by_the_varied_keys_is_a_valid_sweep(tmp_path, capsys):
    # regions.3 names a material that only the varied key defines
    fixed = [*COARSE, "--set", "regions.3.material=breaker"]
    out = tmp_path / "sweep"
    vary = ["--vary", "materials.breaker.conductivity=0.15,0.3"]
    assert main(["sweep", str(CASE), *vary, *fixed, "-o", str(out), "-q"]) == 0
    psi = [r.results["psi"] for r in stored(out)]
    assert psi[0] < psi[1]  # common practice: a more conductive break bridges more
    # no variant can complete it: bad arguments, nothing written
    bad = ["--vary", "materials.breaker.conductivity=-1,-2"]
    assert main(["sweep", str(CASE), *bad, *fixed, "-o", str(tmp_path / "bad")]) == 2
    assert "unknown material 'breaker'" in capsys.readouterr().err
    assert not (tmp_path / "bad").exists()


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("", "v.csv: empty: expected a header row of dotted key paths"),
        (f"{SLAB}\n# no rows, only a comment\n", "v.csv: lists no variants"),
        (f"{SLAB},{INSULATION}\n1.6\n", "v.csv: line 2: 1 cells, the header has 2"),
        (f"{SLAB},\n1.6,\n", "v.csv: line 1: header column 2 is empty"),
        (
            "materials.slab.conductivty\n1.6\n",
            "--variants {v}: column materials.slab.conductivty: unknown key (did you mean",
        ),
    ],
    ids=["empty", "no-rows", "short-row", "unnamed-column", "misspelt-column"],
)
def test_bad_variants_files_exit_2_before_anything_is_written(tmp_path, capsys, text, message):
    variants = tmp_path / "v.csv"
    variants.write_text(text, encoding="utf-8")
    out = tmp_path / "sweep"
    assert main(["sweep", str(CASE), "--variants", str(variants), "-o", str(out)]) == 2
    err = capsys.readouterr().err.strip()
    assert err.startswith("fvheat: error: ") and "\n" not in err
    assert message.format(v=variants) in err
    assert not out.exists()


def test_repeated_variant_rows_run_once(tmp_path):
    variants = tmp_path / "v.csv"
    variants.write_text(f"{SLAB}\n1.6\n2.0\n1.60\n1.6\n", encoding="utf-8")
    out = tmp_path / "sweep"
    assert main(sweep_args(out, "-q", vary=("--variants", str(variants)))) == 0
    assert [(r.params, r.attempts) for r in stored(out)] == [({SLAB: "1.6"}, 1), ({SLAB: "2.0"}, 1)]
