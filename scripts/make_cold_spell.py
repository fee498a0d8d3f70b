"""Write cases/data/kestrel_cold_spell.csv: an invented hourly outdoor air temperature series
for the frost demo (12 days: mild, a seven-day cold spell, a thaw). Deterministic; the
values are made up for the demo, not measured weather."""

from __future__ import annotations

from pathlib import Path

import numpy as np

OUT = Path(__file__).resolve().parents[1] / "cases" / "data" / "kestrel_cold_spell.csv"


def series() -> tuple[np.ndarray, np.ndarray]:
    hours = np.arange(0, 12 * 24 + 1)
    day = hours / 24.0
    # daily mean: +4 °C, falling over a day to -14 °C, held 7 days, recovering to +3 °C
    mean = np.interp(day, [0, 1.5, 2.5, 9.5, 10.5, 12], [4.0, 4.0, -14.0, -14.0, 3.0, 3.0])
    daily = 3.0 * np.cos(2 * np.pi * (day - 14.0 / 24.0))  # warmest at 14:00
    return hours * 3600.0, np.round(mean + daily, 2)


def main() -> None:
    t, theta = series()
    lines = ["time_s,outdoor_air_C"] + [f"{a:.0f},{b:.2f}" for a, b in zip(t, theta, strict=True)]
    OUT.write_text("\n".join(lines) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()
