"""Equivalent conductivity of unventilated air cavities (ISO 10077-2 method).

A cavity in a frame or junction section is replaced by a solid whose conductivity carries the
same heat as the air in it does by conduction, convection and radiation together:

    λ_eq = d / R_s,        1 / R_s = h_a + h_r

    d    cavity dimension in the heat-flow direction (m)
    b    cavity dimension perpendicular to the heat flow (m)

Convection and conduction, h_a in W/(m²·K) (ISO 10077-2, constants as in ISO 6946's airspace
annex; all from memory):

    horizontal heat flow:  h_a = max(C1 / d, C2 · ΔT^(1/3)),  C1 = 0.025 W/(m·K),
                                                              C2 = 0.73 W/(m²·K^(4/3))
    upward heat flow:      h_a = max(C1 / d, C3 · ΔT^(1/3)),  C3 = 1.14 W/(m²·K^(4/3))
    downward heat flow:    h_a = C1 / d

    ΔT  temperature difference across the cavity (K); ISO 10077-2 uses 10 K unless it is
        computed (from memory). C1 / d is pure conduction through still air (C1 ≈ λ_air).

Radiation, h_r in W/(m²·K) (ISO 10077-2, from memory):

    h_r = 4 σ T_m³ / (1/ε1 + 1/ε2 − 2 + 1/F)
    F   = ½ (1 + √(1 + (d/b)²) − d/b)

    T_m mean cavity temperature in kelvin (default 283.15 K = 10 °C, from memory), σ the
    Stefan–Boltzmann constant (CODATA 2018), ε1, ε2 the emissivities of the two faces
    normal to the heat flow. F is the view factor between those faces with the two side
    faces treated as re-radiating: ½ (1 + F12) with F12 = √(1 + (d/b)²) − d/b the crossed-
    strings view factor of two facing strips (Incropera & DeWitt §13.1 and §13.3.5). For
    d/b → 0, F → 1 and h_r → 4σT_m³ / (1/ε1 + 1/ε2 − 1), the parallel-plate result.

Ventilation (ISO 10077-2, from memory):

    - cavities whose smallest dimension is at most 2 mm, and cavities connected to the
      exterior or interior only by a slit at most 2 mm wide, count as unventilated
      (``ventilation="none"``);
    - slightly ventilated cavities, connected by a slit wider than 2 mm and at most 10 mm,
      take twice the unventilated λ_eq (``ventilation="slight"``);
    - well-ventilated cavities (opening wider than 10 mm) are not a material at all: their
      surfaces belong to the exterior or interior surface with that side's surface
      resistance, so ``ventilation="well"`` raises ValueError.

Not implemented (from memory, check the standard): non-rectangular cavities are converted
to an equivalent rectangle of the same area and aspect ratio first; cavities linked by slits
of at most 2 mm are handled as separate cavities; ISO 10077-2 may use C1/d alone for
horizontal flow when b is below about 5 mm. Nothing here was copied from the standard: it is
all recalled, and the constants should be checked against the current edition.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal, NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from fvheat.constants import STEFAN_BOLTZMANN

__all__ = [
    "C1",
    "C2_HORIZONTAL",
    "C2_UP",
    "DEFAULT_DELTA_T",
    "DEFAULT_MEAN_TEMPERATURE",
    "SLIGHT_VENTILATION_FACTOR",
    "STEFAN_BOLTZMANN",
    "CavityDimensions",
    "CavityResult",
    "cavity_dimensions",
    "convective_coefficient",
    "equivalent_conductivity",
    "radiative_coefficient",
    "ventilation_class",
    "view_factor",
]

Direction = Literal["horizontal", "up", "down"]
Ventilation = Literal["none", "slight", "well"]
FloatOrArray = float | NDArray[np.float64]

C1 = 0.025
"""W/(m·K): conduction term C1/d of h_a (ISO 10077-2, from memory)."""
C2_HORIZONTAL = 0.73
"""W/(m²·K^(4/3)): convection term C2·ΔT^(1/3), horizontal heat flow (from memory)."""
C2_UP = 1.14
"""W/(m²·K^(4/3)): convection term, upward heat flow (from memory)."""
DEFAULT_DELTA_T = 10.0
"""K: temperature difference across a cavity when not computed (ISO 10077-2, from memory)."""
DEFAULT_MEAN_TEMPERATURE = 283.15
"""K: mean cavity temperature, 10 °C (ISO 10077-2, from memory)."""
SLIGHT_VENTILATION_FACTOR = 2.0
"""λ_eq of a slightly ventilated cavity / λ_eq of the unventilated one (from memory)."""
UNVENTILATED_SLIT_MAX = 0.002
"""m: openings up to this width leave a cavity unventilated (from memory)."""
SLIGHT_SLIT_MAX = 0.010
"""m: openings above 2 mm and up to this width make it slightly ventilated (from memory)."""

_DIRECTIONS = ("horizontal", "up", "down")
_VENTILATIONS = ("none", "slight", "well")
_MIN_KELVIN = 200.0  # below this a "mean temperature" was almost surely given in °C


@dataclass(frozen=True)
class CavityResult:
    """Equivalent conductivity of a cavity, its parts and the inputs that produced it.

    ``lambda_eq`` W/(m·K) = ``ventilation_factor`` · d / ``r_s``; ``h_a``, ``h_r``
    W/(m²·K) and ``r_s`` = 1/(h_a + h_r) m²·K/W are those of the unventilated cavity;
    ``view_factor`` F (-). Array-valued when any numeric input was an array.
    """

    lambda_eq: FloatOrArray
    h_a: FloatOrArray
    h_r: FloatOrArray
    view_factor: FloatOrArray
    r_s: FloatOrArray
    ventilation_factor: float
    d: FloatOrArray
    b: FloatOrArray
    emissivity1: FloatOrArray
    emissivity2: FloatOrArray
    direction: Direction
    delta_t: FloatOrArray
    mean_temperature: FloatOrArray
    ventilation: Ventilation


class CavityDimensions(NamedTuple):
    """``d`` (m) along the heat flow, ``b`` (m) across it, and the ``direction`` keyword."""

    d: float
    b: float
    direction: Direction


def _array(value: ArrayLike, name: str, what: str) -> NDArray[np.float64]:
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError) as err:
        raise ValueError(f"{name} ({what}) must be a number, got {value!r}") from err
    if not np.all(np.isfinite(arr)):
        raise ValueError(f"{name} ({what}) must be finite, got {value!r}")
    return arr


def _out(arr: NDArray[np.float64]) -> FloatOrArray:
    return float(arr) if arr.ndim == 0 else arr


def _check_direction(direction: str) -> None:
    if direction not in _DIRECTIONS:
        raise ValueError(
            f"direction must be one of {', '.join(map(repr, _DIRECTIONS))} (the direction of "
            f"the heat flow across the cavity), got {direction!r}"
        )


def view_factor(d: ArrayLike, b: ArrayLike) -> FloatOrArray:
    """F = ½ (1 + √(1 + (d/b)²) − d/b) for a rectangular cavity, d and b in m (see module)."""
    ratio = _array(d, "d", "m") / _array(b, "b", "m")
    return _out(0.5 * (1.0 + np.sqrt(1.0 + ratio**2) - ratio))


def convective_coefficient(
    d: ArrayLike, *, direction: Direction = "horizontal", delta_t: ArrayLike = DEFAULT_DELTA_T
) -> FloatOrArray:
    """h_a in W/(m²·K) for a cavity of depth ``d`` (m) along the heat flow; ΔT in K."""
    _check_direction(direction)
    d_arr = _array(d, "d", "m")
    conduction = C1 / d_arr
    if direction == "down":
        return _out(conduction)
    c2 = C2_HORIZONTAL if direction == "horizontal" else C2_UP
    return _out(np.maximum(conduction, c2 * np.cbrt(_array(delta_t, "delta_t", "K"))))


def radiative_coefficient(
    d: ArrayLike,
    b: ArrayLike,
    *,
    emissivity1: ArrayLike = 0.9,
    emissivity2: ArrayLike = 0.9,
    mean_temperature: ArrayLike = DEFAULT_MEAN_TEMPERATURE,
) -> FloatOrArray:
    """h_r in W/(m²·K); d, b in m, emissivities (-), mean temperature in K."""
    f = np.asarray(view_factor(d, b))
    e1 = _array(emissivity1, "emissivity1", "-")
    e2 = _array(emissivity2, "emissivity2", "-")
    t_m = _array(mean_temperature, "mean_temperature", "K")
    return _out(4.0 * STEFAN_BOLTZMANN * t_m**3 / (1.0 / e1 + 1.0 / e2 - 2.0 + 1.0 / f))


def equivalent_conductivity(
    d: ArrayLike,
    b: ArrayLike,
    *,
    emissivity1: ArrayLike = 0.9,
    emissivity2: ArrayLike = 0.9,
    direction: Direction = "horizontal",
    delta_t: ArrayLike = DEFAULT_DELTA_T,
    mean_temperature: ArrayLike = DEFAULT_MEAN_TEMPERATURE,
    ventilation: Ventilation = "none",
) -> CavityResult:
    """Equivalent conductivity λ_eq (W/(m·K)) of a rectangular air cavity (see module).

    ``d`` (m) is the cavity dimension along the heat flow and ``b`` (m) across it (see
    :func:`cavity_dimensions`); ``emissivity1``/``emissivity2`` (-) those of the two faces
    normal to the heat flow; ``direction`` of the heat flow: "horizontal", "up" or "down";
    ``delta_t`` (K) the temperature difference across the cavity; ``mean_temperature`` in
    kelvin; ``ventilation`` "none" or "slight" ("well" raises: model it as a surface).
    Numeric arguments broadcast as numpy arrays.
    """
    _check_direction(direction)
    if ventilation not in _VENTILATIONS:
        raise ValueError(
            f"ventilation must be 'none' (closed, or openings ≤ 2 mm), 'slight' (openings "
            f"> 2 mm and ≤ 10 mm) or 'well' (> 10 mm), got {ventilation!r}"
        )
    if ventilation == "well":
        raise ValueError(
            "a well-ventilated cavity (opening wider than 10 mm) is not replaced by a "
            "material: leave it out of the solid regions and cover its faces with the "
            "exterior or interior surface boundary of the side it opens to (that side's "
            "surface resistance)"
        )
    d_arr = _array(d, "d", "cavity dimension along the heat flow, m")
    b_arr = _array(b, "b", "cavity dimension across the heat flow, m")
    if np.any(d_arr <= 0.0) or np.any(b_arr <= 0.0):
        raise ValueError(
            f"cavity dimensions d and b must be positive lengths in metres, got d={d!r}, b={b!r}"
        )
    e1 = _array(emissivity1, "emissivity1", "-")
    e2 = _array(emissivity2, "emissivity2", "-")
    for name, e, raw in (("emissivity1", e1, emissivity1), ("emissivity2", e2, emissivity2)):
        if np.any(e <= 0.0) or np.any(e > 1.0):
            raise ValueError(
                f"{name} must be in (0, 1], got {raw!r} (use about 0.9 for painted, coated or "
                f"non-metallic surfaces and the measured value for bare metal)"
            )
    dt = _array(delta_t, "delta_t", "K")
    if np.any(dt < 0.0):
        raise ValueError(
            f"delta_t is the temperature difference across the cavity in K and must be >= 0, "
            f"got {delta_t!r} (ISO 10077-2 uses {DEFAULT_DELTA_T} K unless computed)"
        )
    t_m = _array(mean_temperature, "mean_temperature", "K")
    if np.any(t_m < _MIN_KELVIN):
        raise ValueError(
            f"mean_temperature is in kelvin, got {mean_temperature!r}: was it given in °C? "
            f"(10 °C is {DEFAULT_MEAN_TEMPERATURE} K)"
        )

    h_a = np.asarray(convective_coefficient(d_arr, direction=direction, delta_t=dt))
    f = np.asarray(view_factor(d_arr, b_arr))
    h_r = np.asarray(
        radiative_coefficient(d_arr, b_arr, emissivity1=e1, emissivity2=e2, mean_temperature=t_m)
    )
    r_s = 1.0 / (h_a + h_r)
    factor = SLIGHT_VENTILATION_FACTOR if ventilation == "slight" else 1.0
    lambda_eq = factor * d_arr / r_s
    return CavityResult(
        lambda_eq=_out(lambda_eq),
        h_a=_out(h_a),
        h_r=_out(h_r),
        view_factor=_out(f),
        r_s=_out(r_s),
        ventilation_factor=factor,
        d=_out(d_arr),
        b=_out(b_arr),
        emissivity1=_out(e1),
        emissivity2=_out(e2),
        direction=direction,
        delta_t=_out(dt),
        mean_temperature=_out(t_m),
        ventilation=ventilation,
    )


def cavity_dimensions(
    width: float,
    height: float,
    axis: Literal["x", "y"],
    sense: int = 1,
    *,
    vertical_axis: Literal["x", "y"] | None = "y",
) -> CavityDimensions:
    """Map a rectangular cavity's extents to (d, b, direction) for :func:`equivalent_conductivity`.

    ``width`` is the cavity's x extent and ``height`` its y extent (m). ``axis`` is the axis
    the heat flows along and ``sense`` +1 or −1 its sense along that axis (heat moving
    towards +axis or −axis). ``vertical_axis`` names the model axis that points up (in a
    vertical section usually "y"); None for a plan (horizontal) section, where every heat
    flow is horizontal.
    """
    if axis not in ("x", "y"):
        raise ValueError(f"axis must be 'x' or 'y' (the axis the heat flows along), got {axis!r}")
    if sense not in (1, -1):
        raise ValueError(f"sense must be +1 or -1 (heat flowing towards +{axis} or -{axis})")
    if vertical_axis not in ("x", "y", None):
        raise ValueError(f"vertical_axis must be 'x', 'y' or None, got {vertical_axis!r}")
    if not (width > 0.0 and height > 0.0):
        raise ValueError(
            f"cavity width and height must be positive lengths in metres, got {width}, {height}"
        )
    d, b = (width, height) if axis == "x" else (height, width)
    direction: Direction
    if vertical_axis is None or axis != vertical_axis:
        direction = "horizontal"
    else:
        direction = "up" if sense == 1 else "down"
    return CavityDimensions(float(d), float(b), direction)


def ventilation_class(opening_width: float) -> Ventilation:
    """'none', 'slight' or 'well' from the width (m) of the slit that links a cavity to the
    exterior or interior (≤ 2 mm, ≤ 10 mm, wider: ISO 10077-2, from memory)."""
    if not opening_width >= 0.0:
        raise ValueError(
            f"opening_width must be a width >= 0 in metres (0: closed), got {opening_width}"
        )
    if opening_width <= UNVENTILATED_SLIT_MAX:
        return "none"
    if opening_width <= SLIGHT_SLIT_MAX:
        return "slight"
    return "well"
