"""A seeded mutator of case files: the demo cases made small and quick, then broken in the
ways users and scripts break them (keys deleted, types changed, extreme numbers, huge or
odd text, list items swapped or duplicated, wrong units, ``--set`` overrides, and the
absurd values of the classes an earlier adversarial pass found).

Everything is drawn from one ``random.Random(seed)``, so a failing case is reproduced by
its seed and index (:func:`make_cases`).
"""

from __future__ import annotations

import copy
import math
import random
import tomllib
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

CASES = Path(__file__).resolve().parents[2] / "cases"

Path_ = tuple[str | int, ...]

EXTREME_NUMBERS: tuple[Any, ...] = (
    0,
    -1,
    0.0,
    -0.0,
    1e308,
    -1e308,
    math.nan,
    math.inf,
    -math.inf,
    1e-300,
    1e-9,
    1e6,
    2**63 - 1,
    -(2**63),
)
ODD_TEXT: tuple[str, ...] = (
    "",
    "x" * 20_000,
    "θ ☃ Ω λ — ü",
    "\u202eevil\u202c",
    r"$\frac{$",
    r"$x^{2$ and $$ \\ {",
    "a\tb",
    "../../outside",
    "/dev/zero",
    "<script>alert(1)</script> & ' \"",
    "name with spaces",
    "日本語",
    "%s %d {0} {name}",
)
OTHER_TYPES: tuple[Any, ...] = (True, "text", [], [1, 2], {}, {"a": 1}, 1, 2.5, [[0, 0], [1, 1]])
SET_VALUES: tuple[str, ...] = (
    "0",
    "-1",
    "1e308",
    "nan",
    "inf",
    "-inf",
    "1e-300",
    '"text"',
    "text",
    "[1, 2]",
    "[]",
    "{a = 1}",
    "true",
    r"$\frac{$",
    "",
    "[[0, 0], [1e308, 1]]",
    '"θ☃"',
    "{mean = 0, amplitude = 5, period = 1e-9}",
    "{file = '/dev/zero', column = 'x'}",
)


@dataclass
class Mutant:
    """One fuzz case: its TOML data, ``--set`` overrides, the command and what was done."""

    index: int
    source: str
    data: Any
    overrides: list[str] = field(default_factory=list)
    command: str = "run"
    plots: bool = False
    quiet: bool = True
    steps: list[str] = field(default_factory=list)
    #: TOML text appended to the written file (a table given twice is a syntax error no
    #: data-level mutation can make)
    extra_text: str = ""


def demo_cases() -> dict[str, dict[str, Any]]:
    """Every demo case, read as data and made small and quick (:func:`quick`)."""
    out = {}
    for path in sorted(CASES.glob("*.toml")):
        with path.open("rb") as f:
            out[path.name] = quick(tomllib.load(f))
    return out


def quick(data: dict[str, Any]) -> dict[str, Any]:
    """The case with coarse cells, no corner refinement, at most 100 000 cells, no grid
    check and a transient run of a few steps, so a solve takes a fraction of a second."""
    d = copy.deepcopy(data)
    mesh = d.get("mesh", {})
    if "max_cell" in mesh:
        mesh["max_cell"] = mesh["max_cell"] * 3
        mesh["min_cell"] = min(mesh.get("min_cell", mesh["max_cell"] / 5) * 3, mesh["max_cell"])
        mesh["corner_cell"] = mesh["min_cell"]
        # a mutation that makes a valid but fine grid (growth near 1, a huge body) is
        # refused in a moment instead of solved for seconds
        mesh["max_cells"] = 100_000
    junction = d.get("junction")
    if isinstance(junction, dict):
        junction["grid_check"] = False
    time = d.get("time")
    if isinstance(time, dict):
        if time.get("periodic"):
            time["step"] = time["duration"] / 8
            time["save_every"] = time["step"] * 2
            time["periodic_tolerance"] = 0.05
        else:
            time["duration"] = 4 * time["step"]
            time["save_every"] = 2 * time["step"]
    return d


# --- walking the data ----------------------------------------------------------------------


def paths(data: Any, prefix: Path_ = ()) -> Iterator[tuple[Path_, Any]]:
    """Every (path, value) in ``data``, tables and arrays included, depth first."""
    if isinstance(data, dict):
        for k, v in data.items():
            yield (*prefix, k), v
            yield from paths(v, (*prefix, k))
    elif isinstance(data, list):
        for i, v in enumerate(data):
            yield (*prefix, i), v
            yield from paths(v, (*prefix, i))


def get(data: Any, path: Path_) -> Any:
    for k in path:
        data = data[k]
    return data


def put(data: Any, path: Path_, value: Any) -> None:
    get(data, path[:-1])[path[-1]] = value


def delete(data: Any, path: Path_) -> None:
    parent = get(data, path[:-1])
    del parent[path[-1]]


def dotted(path: Path_) -> str:
    """The ``--set`` form of a path: dotted, 0-based indices."""
    return ".".join(str(k) for k in path)


# --- mutations -----------------------------------------------------------------------------

Mutation = Callable[[random.Random, Any], str | None]


def _pick(rng: random.Random, data: Any, want: Callable[[Any], bool]) -> Path_ | None:
    found = [p for p, v in paths(data) if want(v)]
    return rng.choice(found) if found else None


def _is_number(v: Any) -> bool:
    return isinstance(v, int | float) and not isinstance(v, bool)


def delete_key(rng: random.Random, data: Any) -> str | None:
    p = _pick(rng, data, lambda v: True)
    if p is None:
        return None
    delete(data, p)
    return f"delete {dotted(p)}"


def change_type(rng: random.Random, data: Any) -> str | None:
    p = _pick(rng, data, lambda v: True)
    if p is None:
        return None
    value = copy.deepcopy(rng.choice(OTHER_TYPES))
    put(data, p, value)
    return f"{dotted(p)} = {value!r}"


def extreme_number(rng: random.Random, data: Any) -> str | None:
    p = _pick(rng, data, _is_number)
    if p is None:
        return None
    value = rng.choice(EXTREME_NUMBERS)
    put(data, p, value)
    return f"{dotted(p)} = {value!r}"


def odd_text(rng: random.Random, data: Any) -> str | None:
    p = _pick(rng, data, lambda v: isinstance(v, str))
    if p is None:
        p = ("title",) if isinstance(data, dict) else None
    if p is None:
        return None
    value = rng.choice(ODD_TEXT)
    put(data, p, value)
    return f"{dotted(p)} = {value[:40]!r}"


def swap_items(rng: random.Random, data: Any) -> str | None:
    p = _pick(rng, data, lambda v: isinstance(v, list) and len(v) >= 2)
    if p is None:
        return None
    items = get(data, p)
    i, j = rng.sample(range(len(items)), 2)
    items[i], items[j] = items[j], items[i]
    return f"swap {dotted(p)}[{i}] and [{j}]"


def duplicate_item(rng: random.Random, data: Any) -> str | None:
    p = _pick(rng, data, lambda v: isinstance(v, list) and v and isinstance(v[0], dict))
    if p is None:
        p = _pick(rng, data, lambda v: isinstance(v, dict) and v)
        if p is None or not isinstance(get(data, p[:-1]), dict):
            return None
        # a table given twice: the same content under a second, similar name
        parent = get(data, p[:-1])
        parent[f"{p[-1]}_copy"] = copy.deepcopy(get(data, p))
        return f"duplicate table {dotted(p)}"
    items = get(data, p)
    items.append(copy.deepcopy(rng.choice(items)))
    return f"duplicate an entry of {dotted(p)}"


def wrong_units(rng: random.Random, data: Any) -> str | None:
    if rng.random() < 0.3 and isinstance(data, dict):
        units = rng.choice(["mm", "cm", "m", "in", ""])
        data.setdefault("geometry", {})
        if isinstance(data["geometry"], dict):
            data["geometry"]["units"] = units
            return f"geometry.units = {units!r}"
    p = _pick(rng, data, lambda v: isinstance(v, list) and v and all(map(_is_number, v)))
    if p is None:
        return None
    factor = rng.choice([1000.0, 0.001, 100.0, -1.0])
    put(data, p, [x * factor for x in get(data, p)])
    return f"{dotted(p)} × {factor:g}"


def unknown_key(rng: random.Random, data: Any) -> str | None:
    p = _pick(rng, data, lambda v: isinstance(v, dict))
    target = get(data, p) if p is not None else data
    name = rng.choice(["max_cel", "conductivty", "colour", "θ", "edges2"])
    target[name] = 1
    return f"add {dotted(p or ())}.{name}"


def _set_key(data: Any, path: Path_, value: Any) -> bool:
    """Set ``path`` when its parent exists (tables created as needed); False otherwise."""
    node = data
    for k in path[:-1]:
        if isinstance(node, dict):
            node = node.setdefault(k, {})
        elif isinstance(node, list) and isinstance(k, int) and k < len(node):
            node = node[k]
        else:
            return False
        if not isinstance(node, dict | list):
            return False
    if isinstance(node, dict):
        node[path[-1]] = value
        return True
    return False


def known_class(rng: random.Random, data: Any) -> str | None:
    """An absurd value of a class an earlier adversarial pass found."""
    if not isinstance(data, dict):
        return None
    choice = rng.randrange(15)
    mats = data.get("materials")
    bnds = data.get("boundaries")
    name = rng.choice(list(mats)) if isinstance(mats, dict) and mats else None
    b = rng.randrange(len(bnds)) if isinstance(bnds, list) and bnds else None
    edits: list[tuple[Path_, Any]] = []
    if choice == 0 and data.get("probe_lines"):
        edits = [(("probe_lines", 0, "end"), [1e3, 1e3])]
    elif choice == 0:
        edits = [(("probes",), [{"name": "far", "at": [50.0, 50.0]}])]
    elif choice == 1:  # a box off by round-off from its neighbour, a segment of round-off
        regions = data.get("regions")
        if isinstance(regions, list) and regions and isinstance(regions[0], dict):
            box = regions[0].get("box")
            if isinstance(box, list) and len(box) == 4 and all(map(_is_number, box)):
                edits = [(("regions", 0, "box"), [box[0], box[1], box[0] + 1e-13, box[3]])]
        if b is not None:
            edits.append((("boundaries", b, "edges"), [[[0.0, 0.0], [1e-13, 0.0]]]))
    elif choice == 2 and name:
        key = rng.choice(["conductivity", "density", "specific_heat"])
        edits = [(("materials", name, key), rng.choice([1e-30, 1e30, 1e-300, 1e300]))]
    elif choice == 3 and b is not None:
        edits = [(("boundaries", b, "convection"), rng.choice([1e7, 1e12]))]
    elif choice == 4 and b is not None:
        key = rng.choice(["air_temperature", "temperature", "radiant_temperature"])
        edits = [(("boundaries", b, key), rng.choice([1e5, 20000.0, -300.0, -273.15]))]
    elif choice == 5 and b is not None:
        period = rng.choice([1e-4, 1e-9, 0.0009])
        edits = [
            (("boundaries", b, "air_temperature"), {"mean": 0, "amplitude": 5, "period": period})
        ]
    elif choice == 6:
        edits = [(("time", "duration"), 1e7), (("time", "step"), 1.0)]
        if isinstance(data.get("time"), dict):
            edits.append((("time", "save_every"), 1e6))
    elif choice == 7 and isinstance(data.get("regions"), list) and data["regions"]:
        r = rng.randrange(len(data["regions"]))
        region = data["regions"][r]
        if isinstance(region, dict):
            region.pop("material", None)
            eps = rng.choice([1e-9, 1e-300, 0.001])
            edits = [(("regions", r, "cavity"), {"heat_flow": "+x", "emissivity": eps})]
    elif choice == 8:
        rh = rng.choice([0.001, 1e-9, 0.5, 0.9])
        if isinstance(data.get("junction"), dict):
            edits = [(("junction", "indoor_humidity"), rh)]
        elif b is not None and isinstance(bnds[b], dict) and "name" in bnds[b]:
            table_ = {"boundaries": [bnds[b]["name"]], "relative_humidity": rh}
            edits = [(("condensation",), table_)]
    elif choice == 9 and isinstance(data.get("junction"), dict):
        # a flanking cut lying along one grid line (on a region's edge)
        regions = data.get("regions") or []
        box = next((r.get("box") for r in regions if isinstance(r, dict) and "box" in r), None)
        if isinstance(box, list) and len(box) == 4 and all(map(_is_number, box)):
            cut = [[box[0], box[1]], [box[2], box[1]]]
            edits = [
                (("junction", "flanking"), [{"name": "cut_on_line", "cut": cut, "length": 1.0}])
            ]
    elif choice == 10 and isinstance(bnds, list):
        # every surface an imposed flux: no temperature reference (a singular matrix)
        edits = [
            (("boundaries", k), {"name": f"f{k}", "edges": e.get("edges", []), "heat_flux": 1.0})
            for k, e in enumerate(bnds)
            if isinstance(e, dict)
        ]
    elif choice == 11 and b is not None:
        edits = [(("boundaries", b, "emissivity"), rng.choice([1e-12, 1.0000001, 0.0]))]
    elif choice == 12:
        edits = [(("mesh", "max_cells"), rng.choice([1, 10, 2**62, 1e308]))]
    elif choice == 13:
        edits = [(("mesh", "growth"), rng.choice([1.0000000001, 3.0, 1e308]))]
    elif choice == 14:  # a device where a file is read (read for ever unless refused)
        if isinstance(data.get("geometry"), dict) and "drawing" in data["geometry"]:
            edits = [(("geometry", "drawing"), "/dev/zero")]
        elif b is not None:
            edits = [(("boundaries", b, "air_temperature"), {"file": "/dev/zero", "column": "x"})]
    done = [dotted(p) for p, v in edits if _set_key(data, p, v)]
    return f"known class {choice}: {', '.join(done)}" if done else None


MUTATIONS: tuple[Mutation, ...] = (
    delete_key,
    change_type,
    extreme_number,
    extreme_number,
    odd_text,
    swap_items,
    duplicate_item,
    wrong_units,
    unknown_key,
    known_class,
    known_class,
)


def gentle(rng: random.Random, data: Any) -> str | None:
    """A change a valid case survives, so the run reaches its outputs: odd title text
    (markup, unicode, huge), a conductivity scaled within a factor of two, a constant
    air temperature moved by up to 10 K."""
    choice = rng.randrange(3)
    if choice == 0:
        data["title"] = rng.choice(ODD_TEXT)
        return f"title = {data['title'][:40]!r}"
    if choice == 1:
        found = [
            (k, m) for k, m in data.get("materials", {}).items()
            if isinstance(m, dict) and _is_number(m.get("conductivity"))
        ]  # fmt: skip
        if not found:
            return None
        name, mat = rng.choice(found)
        mat["conductivity"] = mat["conductivity"] * rng.uniform(0.5, 2.0)
        return f"materials.{name}.conductivity scaled"
    found = [
        (k, b) for k, b in enumerate(data.get("boundaries", []))
        if isinstance(b, dict) and _is_number(b.get("air_temperature"))
    ]  # fmt: skip
    if not found:
        return None
    k, b = rng.choice(found)
    b["air_temperature"] = b["air_temperature"] + rng.uniform(-10.0, 10.0)
    return f"boundaries.{k}.air_temperature moved"


def set_overrides(rng: random.Random, data: Any) -> list[str]:
    """One to three ``--set`` overrides of existing (and sometimes made-up) keys."""
    out = []
    leaves = [p for p, v in paths(data) if not isinstance(v, dict | list)]
    for _ in range(rng.randint(1, 3)):
        if leaves and rng.random() < 0.85:
            key = dotted(rng.choice(leaves))
        else:
            key = rng.choice(["nope.x", "regions.99.material", "mesh..max_cell", "", "a=b"])
        out.append(f"{key}={rng.choice(SET_VALUES)}")
    return out


def make_cases(seed: int, count: int) -> list[Mutant]:
    """``count`` mutants of the demo cases, reproducible from ``seed``: 1 to 3 mutations
    each, a third of them with ``--set`` overrides; about one in five runs only
    ``fvheat check``; about 15 % get only :func:`gentle` changes (valid cases whose runs
    reach the outputs, one in twelve with figures); one in ten is not quiet."""
    rng = random.Random(seed)
    demos = demo_cases()
    names = sorted(demos)
    out = []
    for i in range(count):
        source = rng.choice(names)
        data = copy.deepcopy(demos[source])
        m = Mutant(index=i, source=source, data=data)
        mild = rng.random() < 0.15  # a run that reaches its outputs, often with figures
        for _ in range(rng.randint(1, 3)):
            step = (gentle if mild else rng.choice(MUTATIONS))(rng, data)
            if step:
                m.steps.append(step)
        if not mild and rng.random() < 0.33:
            m.overrides = set_overrides(rng, data)
        if not mild and rng.random() < 0.03:
            tables = [k for k, v in data.items() if isinstance(v, dict)]
            if tables:
                m.extra_text = f"\n[{rng.choice(tables)}]\nmax_cell = 1\n"
                m.steps.append("a table given twice")
        m.command = "check" if not mild and rng.random() < 0.2 else "run"
        m.plots = m.command == "run" and rng.random() < (1 / 12 if mild else 1 / 60)
        m.quiet = rng.random() >= 0.1
        out.append(m)
    return out
