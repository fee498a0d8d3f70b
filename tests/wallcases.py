"""Small wall cases shared by tests in several folders (TOML text; all values invented).

- :func:`series_wall`: a 0.2 m wall, 20 °C inside, two hours transient, its outside air
  temperature given by the caller (a number or a CSV series); :data:`ROOM_HUMIDITY` adds
  condensation hours reading a room-humidity series; :data:`SERIES_FILES` are the series it
  reads (:func:`write_files` writes them beside the case).
- :func:`square_wall`: a 0.2 m square, 20 °C inside through R = 0.13, the outside surface
  given by the caller, then any further tables.
"""

from __future__ import annotations

from pathlib import Path

SERIES_WALL = """
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
air_temperature = {outside}
resistance = 0.04
[time]
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


def series_wall(outside: str | float) -> str:
    """The transient wall with the outside air temperature ``outside`` (TOML value, °C)."""
    return SERIES_WALL.format(outside=outside)


def write_files(folder: Path, files: dict[str, str]) -> None:
    """Write each ``name: text`` of ``files`` below ``folder`` (folders made as needed)."""
    for name, text in files.items():
        (folder / name).parent.mkdir(parents=True, exist_ok=True)
        (folder / name).write_text(text, encoding="utf-8")


def square_wall(outside: str, extra: str = "") -> str:
    """The square wall; ``outside`` holds the outside boundary's keys (TOML lines),
    ``extra`` any further tables (``[time]``, probes)."""
    return f"""
[mesh]
max_cell = 0.05
[materials.w]
conductivity = 1.0
density = 1000
specific_heat = 1000
[[regions]]
material = "w"
box = [0, 0, 0.2, 0.2]
[[boundaries]]
name = "in"
edges = [[[0, 0], [0, 0.2]]]
air_temperature = 20
resistance = 0.13
[[boundaries]]
name = "out"
edges = [[[0.2, 0], [0.2, 0.2]]]
{outside}
{extra}"""
