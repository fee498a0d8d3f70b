"""Results holding NaN or infinity are a numerical failure: exit 1 with one line naming
the keys, and nothing written (json.dumps refused them with a traceback after the earlier
run's outputs had been cleared)."""

from __future__ import annotations

import math
from pathlib import Path

import fvheat.output.summary as summary_module
from fvheat.cli.main import main
from fvheat.output.summary import non_finite_keys


def test_non_finite_keys():
    s = {"a": 1.0, "b": {"c": [0.0, math.nan], "d": math.inf}, "e": "nan", "f": None}
    assert non_finite_keys(s) == ["b.c.1", "b.d"]
    assert non_finite_keys({"a": [1, 2.5, {"b": -0.0}]}) == []


CASES = Path(__file__).resolve().parents[2] / "cases"


def test_nan_in_summary_exits_1(tmp_path, capsys, monkeypatch):
    build = summary_module.build_summary

    def with_nan(study, overrides=()):
        out = build(study, overrides)
        out["probes"] = {"p": math.nan}
        return out

    monkeypatch.setattr(summary_module, "build_summary", with_nan)
    out = tmp_path / "out"
    code = main(["run", str(CASES / "pcm_wall.toml"), "-o", str(out), "-q", "--no-plots",
                 "--set", "time.periodic=false", "--set", "time.duration=1200",
                 "--set", "time.save_every=600"])  # fmt: skip
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 1
    assert len(err) == 1 and err[0].startswith("fvheat: numerical failure: ")
    assert "probes.p" in err[0]
    assert not out.exists()
