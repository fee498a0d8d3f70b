"""The validated case: plain dataclasses, built only by :mod:`fvheat.case.load`.

Units are SI throughout (m, W/(m·K), kg/m³, J/(kg·K), W/(m²·K), s); temperatures in °C.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

import numpy as np

from fvheat.case.signals import Signal

#: default first cell size at re-entrant corners of exchanging surfaces, m (see MeshSettings)
CORNER_CELL = 0.001
#: default ``[mesh] max_cells``: about 2 GB for a steady run, 5 GB for a transient one
#: (fvheat.mesh.size), far above what a junction needs (the demo cases use 2 000 to 66 000
#: cells) and within an ordinary workstation's memory
DEFAULT_MAX_CELLS = 2_000_000


@dataclass(frozen=True)
class MeshSettings:
    """Grid controls: largest and smallest cell edge (m), the largest neighbour size ratio,
    and the first cell size (m) at re-entrant corners of exchanging surfaces (where the
    lowest inside surface temperature sits); None: the smaller of ``min_cell``/2 and 1 mm.
    ``max_cells``: the largest grid (columns × rows) the mesher builds."""

    max_cell: float
    min_cell: float
    growth: float = 1.3
    corner_cell: float | None = None
    #: "auto" (default: triangles when a region outline or boundary edge is sloped),
    #: "triangles" or "rectilinear"
    kind: str = "auto"
    #: a mesh file (any format meshio reads; ``[mesh] file``), resolved against the case file
    file: Path | None = None
    file_sha256: str | None = None
    max_cells: int = DEFAULT_MAX_CELLS

    @property
    def corner_size(self) -> float:
        """First cell size at re-entrant corners, m."""
        if self.corner_cell is not None:
            return self.corner_cell
        return min(0.5 * self.min_cell, CORNER_CELL)


@dataclass(frozen=True)
class Phase:
    """Properties of the frozen (solid) phase of a phase-change material; None = as unfrozen."""

    conductivity: float | None = None
    density: float | None = None
    specific_heat: float | None = None


@dataclass(frozen=True)
class Material:
    """A material. ``conductivity`` W/(m·K), ``density`` kg/m³, ``specific_heat`` J/(kg·K).

    ``latent_heat`` (J/kg) is released on freezing across ``phase_change`` = (solidus,
    liquidus) °C; the base properties are those of the unfrozen phase and ``frozen`` those
    below the solidus. ``emissivity`` is informational (surfaces take theirs from boundaries).
    ``cavity``: an air cavity of equivalent conductivity made from a region's ``cavity``.
    ``source``: where the values come from (a library entry's source, the case file, ...).
    """

    name: str
    conductivity: float
    density: float | None = None
    specific_heat: float | None = None
    emissivity: float | None = None
    latent_heat: float | None = None
    phase_change: tuple[float, float] | None = None
    frozen: Phase | None = None
    cavity: bool = False
    source: str | None = None

    @property
    def volumetric_heat_capacity(self) -> float | None:
        """ρ·c in J/(m³·K), or None when either is missing."""
        if self.density is None or self.specific_heat is None:
            return None
        return self.density * self.specific_heat


@dataclass(frozen=True)
class Region:
    """A painted area of one material: the outline ``vertices`` (n, 2) m, counter-clockwise,
    minus the ``holes`` (outlines (k, 2) m); ``is_box`` for axis-aligned boxes. ``name`` is
    the optional name of its ``[[regions]]`` entry and ``entry`` that entry's index (one
    entry taking its shapes from a drawing layer gives one Region per closed shape)."""

    material: str
    vertices: np.ndarray = field(repr=False)
    is_box: bool = False
    name: str | None = None
    entry: int = 0
    holes: tuple[np.ndarray, ...] = field(default=(), repr=False)

    @property
    def key(self) -> str:
        """The case key of the region's entry (regions the tool adds itself, such as the
        soil block of ``[ground]``, have a negative entry and are named after their table)."""
        return f"regions.{self.entry}" if self.entry >= 0 else "ground"

    @property
    def label(self) -> str:
        """``region 'name' (regions.N)`` or ``regions.N``, for messages."""
        return f"region {self.name!r} ({self.key})" if self.name else self.key

    @property
    def bounds(self) -> tuple[float, float, float, float]:
        """(x0, y0, x1, y1) of the region's bounding box, m."""
        lo = self.vertices.min(axis=0)
        hi = self.vertices.max(axis=0)
        return float(lo[0]), float(lo[1]), float(hi[0]), float(hi[1])


@dataclass(frozen=True)
class Geometry:
    """The ``[geometry]`` table: the length unit of the case file (``"m"``, ``"cm"`` or
    ``"mm"``; the case holds metres after loading) and the drawing regions and boundaries
    may take their shapes from (its path, as resolved against the case file, and the
    SHA-256 of its bytes)."""

    units: str = "m"
    drawing: Path | None = None
    drawing_sha256: str | None = None

    def as_dict(self) -> dict[str, str | None]:
        """For summary.json and inputs.json."""
        return {
            "units": self.units,
            "drawing": None if self.drawing is None else str(self.drawing),
            "drawing_sha256": self.drawing_sha256,
        }


@dataclass(frozen=True)
class Project:
    """The ``[project]`` table: free text naming the project, its reference, the client,
    the author and checker of the work, its date and notes (None: not given)."""

    name: str | None = None
    reference: str | None = None
    client: str | None = None
    author: str | None = None
    checker: str | None = None
    date: str | None = None
    notes: str | None = None

    def as_dict(self) -> dict[str, str]:
        """The given keys, for summary.json and the report."""
        return {k: v for k, v in vars(self).items() if v}


BoundaryKind = Literal["surface", "temperature", "flux"]


@dataclass(frozen=True)
class Boundary:
    """Conditions on the exterior faces lying on ``edges`` (segments ((x0, y0), (x1, y1)), m).

    kind ``"surface"``: exchange with air at ``air_temperature`` through the surface
    coefficient ``convection`` (W/(m²·K); 1/resistance for a combined surface resistance)
    and, when ``emissivity`` > 0, grey-body radiation to ``radiant_temperature``; an
    optional ``heat_flux`` (W/m², into the body) is absorbed at the surface.
    kind ``"temperature"``: fixed surface ``temperature``.
    kind ``"flux"``: imposed ``heat_flux`` only.
    """

    name: str
    edges: tuple[tuple[tuple[float, float], tuple[float, float]], ...]
    kind: BoundaryKind
    convection: float = 0.0
    emissivity: float = 0.0
    air_temperature: Signal | None = None
    radiant_temperature: Signal | None = None
    temperature: Signal | None = None
    heat_flux: Signal | None = None
    resistance: float | None = None

    @property
    def radiative(self) -> bool:
        """Whether the surface exchanges long-wave radiation (ε > 0)."""
        return self.kind == "surface" and self.emissivity > 0.0

    @property
    def ties_temperature(self) -> bool:
        """Whether the boundary ties the surface to a temperature (fixed, or exchange with
        air or radiant surroundings), which a steady field needs somewhere."""
        return self.kind == "temperature" or (
            self.kind == "surface" and (self.convection > 0 or self.emissivity > 0)
        )

    @property
    def reference_temperature(self) -> Signal | None:
        """The temperature the boundary ties the body to: the fixed surface temperature, or
        the air temperature of a surface exchange (None for a flux-only boundary)."""
        return self.temperature if self.kind == "temperature" else self.air_temperature


@dataclass(frozen=True)
class Probe:
    """A named point (m) whose temperature is reported."""

    name: str
    at: tuple[float, float]


@dataclass(frozen=True)
class ProbeLine:
    """A named line from ``start`` to ``end`` (m) along which a phase-change front position
    is reported (distance from ``start``)."""

    name: str
    start: tuple[float, float]
    end: tuple[float, float]


@dataclass(frozen=True)
class Condensation:
    """Condensation-risk hours on the surfaces of ``boundaries`` during a transient run: room
    air at ``air_temperature`` (°C) and ``relative_humidity`` (%), mould threshold (%), the
    surfaces at ``surface_resistances`` (a second run when they differ from the heat-loss
    ones; :mod:`fvheat.case.resistances`)."""

    boundaries: tuple[str, ...]
    air_temperature: Signal
    relative_humidity: Signal
    mould_threshold: float = 80.0
    surface_resistances: SurfaceResistances = field(
        default_factory=lambda: SurfaceResistances(None)
    )


Scheme = Literal["backward_euler", "crank_nicolson"]


@dataclass(frozen=True)
class TimeSettings:
    """Transient run: ``duration``, ``step`` and ``save_every`` in s.

    ``initial_temperature`` is a value in °C or ``"steady"`` (the steady field of the
    t = 0 conditions). With ``periodic`` the run repeats ``duration`` (one period of the
    boundary conditions) until the largest cell-temperature change from one cycle to the
    next is below ``periodic_tolerance`` (K), at most ``max_cycles`` times; results are
    those of the last cycle. With ``adaptive_tolerance`` (K) every step is subdivided where
    step doubling shows a larger temperature error (outputs stay at the step times).
    """

    duration: float
    step: float
    initial_temperature: float | Literal["steady"]
    save_every: float
    scheme: Scheme = "backward_euler"
    periodic: bool = False
    periodic_tolerance: float = 1e-4
    max_cycles: int = 200
    adaptive_tolerance: float | None = None

    @property
    def theta(self) -> float:
        """Implicitness of the θ-scheme: 1 for backward Euler, 1/2 for Crank–Nicolson."""
        return 1.0 if self.scheme == "backward_euler" else 0.5


#: ISO 13788 inside surface resistance for opaque surfaces, m²·K/W (from memory)
CONDENSATION_RSI = 0.25
#: the value that asks for the heat-loss surface resistances
HEAT_LOSS = "heat_loss"


@dataclass(frozen=True)
class SurfaceResistances:
    """Inside surface resistances (m²·K/W) of a surface-temperature solve, by boundary name;
    ``values`` None: the heat-loss resistances, as the user asked. ``defaulted``: the
    boundaries given :data:`CONDENSATION_RSI` because the case set nothing for them."""

    values: dict[str, float] | None
    defaulted: tuple[str, ...] = ()

    def describe(self, key: str) -> str:
        """One line for consoles and reports: which resistances and why (``key`` is the
        case key that sets them)."""
        if self.values is None:
            return f"the heat-loss surface resistances ({key} = {HEAT_LOSS!r})"
        given = {n: r for n, r in self.values.items() if n not in self.defaulted}
        parts = []
        if given:
            groups: dict[float, list[str]] = {}
            for n, r in given.items():
                groups.setdefault(r, []).append(n)
            listed = "; ".join(f"{r:g} m²·K/W on {', '.join(ns)}" for r, ns in groups.items())
            parts.append(f"R_si = {listed} ({key})")
        if self.defaulted:
            which = "every checked inside surface" if not given else ", ".join(self.defaulted)
            parts.append(
                f"R_si = {CONDENSATION_RSI:g} m²·K/W on {which} (ISO 13788 value for opaque "
                f"surfaces, from memory; the default where {key} sets nothing: set it per "
                "surface, e.g. 0.13 on glazing and frames)"
            )
        return "; ".join(parts)


Dimensions = Literal["internal", "overall_internal", "external"]


@dataclass(frozen=True)
class Flanking:
    """A flanking element of a junction: its length ``length`` (m, in the junction's
    primary dimension system), its lengths in every dimension system given (``lengths``:
    system → m, the primary one included) and U-value, given (``u_value``, W/(m²·K)) or
    taken from the model's layers along ``cut`` (a segment across the element from surface
    to surface)."""

    name: str
    length: float
    u_value: float | None = None
    cut: tuple[tuple[float, float], tuple[float, float]] | None = None
    thickness: float | None = None
    lengths: dict[str, float] = field(default_factory=dict)


@dataclass(frozen=True)
class Environment:
    """One environment of a junction with more than two (ISO 10211 coupling coefficients):
    its ``name`` and the boundaries exchanging with it (one common temperature)."""

    name: str
    boundaries: tuple[str, ...]


@dataclass(frozen=True)
class Junction:
    """Thermal-bridge evaluation (ISO 10211): warm-side and cold-side boundaries, flanking
    elements, the dimension system of their lengths, and the surface-temperature checks.

    ``surface_resistances`` are the inside surface resistances of the surface-temperature
    solve f_Rsi and θ_si,min come from (:mod:`fvheat.case.resistances`);
    ``f_rsi_limit`` is the pass/fail criterion, applied over the ``f_rsi_boundaries``
    (default: all inside ones); ``indoor_humidity`` (0–1) enables the dew-point check;
    ``frame_width`` (m) turns the ψ of a frame section with an insulating panel into U_f
    (ISO 10077-2); ``centre`` (m) locates the junction for the cut-off-plane check.
    ``environments`` (two or more) ask for the coupling coefficients between them; then
    ``inside`` and ``outside`` may be empty (no ψ, f_Rsi: see :attr:`pair`).
    """

    inside: tuple[str, ...]
    outside: tuple[str, ...]
    flanking: tuple[Flanking, ...] = ()
    dimensions: Dimensions = "internal"
    surface_resistances: SurfaceResistances = field(
        default_factory=lambda: SurfaceResistances(None)
    )
    f_rsi_limit: float | None = None
    f_rsi_boundaries: tuple[str, ...] | None = None
    indoor_humidity: float | None = None
    frame_width: float | None = None
    centre: tuple[float, float] | None = None
    grid_check: bool = False
    environments: tuple[Environment, ...] = ()

    @property
    def pair(self) -> bool:
        """Whether a warm and a cold side are declared (L2D, ψ, f_Rsi are evaluated)."""
        return bool(self.inside and self.outside)


@dataclass(frozen=True)
class Ground:
    """The ``[ground]`` table: a slab-on-ground edge with the soil block built around it
    (see :mod:`fvheat.case.ground`). Lengths in m, x and y coordinates of the section.

    ``width`` is the floor's characteristic dimension B' (ISO 13370); ``floor_edge`` the x of
    the inside face of the external wall; ``ground_level`` the y of the outside ground
    surface; ``wall_outside`` the x where the ground surface meets the wall's outside face;
    ``interior`` (−1 or +1) the direction of the building's inside along x; ``soil`` the
    soil material's name; ``boundary`` the outside boundary the ground surface joins;
    ``floor_boundary`` the floor surface; ``floor_resistance`` R_f (m²·K/W) and
    ``wall_thickness`` w when given (else taken from the model)."""

    width: float
    floor_edge: float
    ground_level: float
    wall_outside: float
    soil: str
    boundary: str
    floor_boundary: str
    floor_resistance: float | None = None
    wall_thickness: float | None = None

    @property
    def interior(self) -> float:
        """−1 when the building lies towards −x of the floor edge, +1 towards +x."""
        return -1.0 if self.wall_outside > self.floor_edge else 1.0

    @property
    def symmetry_x(self) -> float:
        """x of the floor's symmetry plane, 0.5·B' inside the floor edge (adiabatic)."""
        return self.floor_edge + self.interior * 0.5 * self.width

    @property
    def thickness(self) -> float:
        """w: the wall thickness given, else the floor edge to the outside face at ground."""
        if self.wall_thickness is not None:
            return self.wall_thickness
        return abs(self.wall_outside - self.floor_edge)


SolverMethod = Literal["auto", "direct", "amg"]


@dataclass(frozen=True)
class SolverSettings:
    """Linear-solver choice, the ``[solver]`` table (see :mod:`fvheat.solve.linear`).

    ``method``: ``"direct"`` (sparse LU factorisation), ``"amg"`` (conjugate gradients with
    an algebraic-multigrid preconditioner) or ``"auto"``: AMG-CG for a steady solve of more
    than ``amg_above`` cells or a time-stepping matrix of more than ``transient_amg_above``
    cells, the factorisation otherwise. ``tolerance``: relative residual at which AMG-CG
    stops; ``max_iterations``: its iteration limit per solve.
    """

    method: SolverMethod = "auto"
    tolerance: float = 1e-10
    max_iterations: int = 200
    amg_above: int = 50_000
    transient_amg_above: int = 2_000_000


@dataclass(frozen=True)
class Case:
    """A fully validated case. ``source`` is the case file (for messages and relative paths)."""

    title: str
    source: Path
    mesh: MeshSettings
    materials: dict[str, Material]
    regions: tuple[Region, ...]
    boundaries: tuple[Boundary, ...]
    probes: tuple[Probe, ...] = ()
    time: TimeSettings | None = None
    probe_lines: tuple[ProbeLine, ...] = ()
    condensation: Condensation | None = None
    junction: Junction | None = None
    solver: SolverSettings = field(default_factory=SolverSettings)
    ground: Ground | None = None
    geometry: Geometry | None = None
    parameters: dict[str, float] = field(default_factory=dict)
    sensitivities: bool = False
    project: Project | None = None

    @property
    def transient(self) -> bool:
        """Whether the case has a ``[time]`` table (a transient run)."""
        return self.time is not None

    @property
    def imposes_heat_flux(self) -> bool:
        """Whether a boundary imposes a heat flux (solar gain, a heated surface)."""
        return any(b.heat_flux is not None for b in self.boundaries)

    def boundary(self, name: str) -> Boundary:
        """The boundary called ``name``."""
        for b in self.boundaries:
            if b.name == name:
                return b
        raise KeyError(name)
