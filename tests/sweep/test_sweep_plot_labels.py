"""sweep-plot axes carry units and the title says what the sweep shows."""

from __future__ import annotations

import matplotlib.pyplot as plt

from fvheat.cli.main import main
from fvheat.sweep.labels import key_unit, result_unit, with_unit

from .conftest import INSULATION, SLAB


def test_units_of_keys_and_results():
    assert key_unit("materials.wool.conductivity") == "W/(m·K)"
    assert key_unit("regions.2.box.0") == "m" and key_unit("regions.2.box.0", "mm") == "mm"
    assert key_unit("boundaries.outside.air_temperature") == "°C"
    assert key_unit("junction.flanking.0.length.internal") == "m"
    assert key_unit("regions.wall.material") is None
    assert result_unit("psi") == "W/(m·K)" and result_unit("heat_flow_inside") == "W/m"
    assert result_unit("theta_si_min") == "°C" and result_unit("f_Rsi") == "–"
    assert with_unit("f_Rsi", "–") == "f_Rsi" and with_unit("psi", "W/(m·K)") == "psi (W/(m·K))"


def test_plot_labels_and_title(sweep_2x3, tmp_path, monkeypatch):
    folder, _ = sweep_2x3
    figures = []
    close = plt.close
    monkeypatch.setattr(plt, "close", lambda fig=None: (figures.append(fig), close(fig)))
    args = ["sweep-plot", str(folder), "--x", INSULATION, "--y", "psi", "--series", SLAB]
    assert main([*args, "--out", str(tmp_path / "p.png"), "-q"]) == 0
    (ax,) = figures[-1].axes
    # a conductivity key carries its SI unit (written out, not built by the code under test)
    assert ax.get_xlabel() == f"{INSULATION} (W/(m·K))"
    assert ax.get_ylabel() == "psi (W/(m·K))"
    title = " ".join(ax.get_title(loc="left").split())
    assert title.startswith(f"psi against {INSULATION}, one line per {SLAB}")
    assert "sweep of" in title and "finished variants" in title
    assert ax.get_legend().get_title().get_text().startswith(SLAB)
