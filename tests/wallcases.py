"""A small wall case shared by tests in several folders (TOML text; all values invented).

:func:`wall` is a 0.2 m × 0.1 m wall (material "wall"), 20 °C inside through R = 0.13
(boundary "inside"), its outside boundary ("outside") and any further tables given by the
caller. :func:`series_wall` makes it a two-hour transient run through R_se = 0.04 with the
outside air temperature given (a number or a CSV series such as :data:`WEATHER`);
:data:`ROOM_HUMIDITY` adds condensation hours reading a room-humidity series;
:data:`SERIES_FILES` are the series they read (:func:`write_files` writes them beside the
case).

:data:`TRIANGLE_WALL` is a two-layer wall (0.1 m of λ = 1 and 0.1 m of λ = 0.1 W/(m·K),
0.5 m high) on the triangle mesh, 20 °C inside through R_si = 0.13 and 0 °C outside through
R_se = 0.04.
"""

from __future__ import annotations

from pathlib import Path

#: two hours from 10 °C, steps of 30 min, saved every hour
TWO_HOURS = """[time]
duration = 7200
step = 1800
initial_temperature = 10.0
save_every = 3600
"""
#: the outside air temperature as the weather series of :data:`SERIES_FILES`
WEATHER = '{ file = "weather.csv", column = "t_out" }'
ROOM_HUMIDITY = """
[condensation]
boundaries = ["inside"]
relative_humidity = { file = "data/room.csv", column = "rh" }
"""
SERIES_FILES = {
    "weather.csv": "time,t_out\n0,-5\n7200,0\n",
    "data/room.csv": "time,rh\n0,50\n7200,60\n",
}


#: a two-layer wall on the triangle mesh (see the module text)
TRIANGLE_WALL = """
title = "two-layer wall"
[mesh]
max_cell = 0.02
min_cell = 0.005
kind = "triangles"
[materials.a]
conductivity = 1.0
[materials.b]
conductivity = 0.1
[[regions]]
material = "a"
box = [0.0, 0.0, 0.2, 0.5]
[[regions]]
material = "b"
box = [0.1, 0.0, 0.2, 0.5]
[[boundaries]]
name = "inside"
edges = [[[0.2, 0.0], [0.2, 0.5]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.0, 0.0], [0.0, 0.5]]]
air_temperature = 0.0
resistance = 0.04
"""


def wall(outside: str, extra: str = "") -> str:
    """The wall; ``outside`` holds the outside boundary's keys (TOML lines), ``extra`` any
    further tables (``[time]``, probes)."""
    return f"""
[mesh]
max_cell = 0.05
[materials.wall]
conductivity = 1.0
density = 2000
specific_heat = 1000
[[regions]]
material = "wall"
box = [0.0, 0.0, 0.2, 0.1]
[[boundaries]]
name = "inside"
edges = [[[0.0, 0.0], [0.0, 0.1]]]
air_temperature = 20.0
resistance = 0.13
[[boundaries]]
name = "outside"
edges = [[[0.2, 0.0], [0.2, 0.1]]]
{outside}
{extra}"""


def series_wall(outside: str | float) -> str:
    """The two-hour transient wall with the outside air temperature ``outside`` (a TOML
    value, °C) through R_se = 0.04."""
    return wall(f"air_temperature = {outside}\nresistance = 0.04", TWO_HOURS)


def write_files(folder: Path, files: dict[str, str]) -> None:
    """Write each ``name: text`` of ``files`` below ``folder`` (folders made as needed)."""
    for name, text in files.items():
        (folder / name).parent.mkdir(parents=True, exist_ok=True)
        (folder / name).write_text(text, encoding="utf-8")
