"""The words of the model preview (and of other figures' notes): legend labels of materials
and boundaries, boundary conditions, numbers and durations."""

from __future__ import annotations

from pathlib import Path

from fvheat.case.model import Boundary, Case, Material
from fvheat.case.signals import Constant, Cosine, Series, Signal


def material_label(material: Material, cells: int, *, used: bool = True) -> str:
    """Legend text of a material: name, λ (W/(m·K)) or the cavity's λ_eq; "0 cells" when
    the mesher painted none (``used``: some region names it)."""
    k = num(material.conductivity)
    if material.cavity:
        text = f"{material.name}: cavity, λ_eq {k} W/(m·K)"
    else:
        text = f"{material.name}: λ {k} W/(m·K)"
        frozen = material.frozen.conductivity if material.frozen is not None else None
        if frozen is not None:
            text += f" (frozen {num(frozen)})"
    if cells == 0:
        text += " — 0 cells" if used else " — used by no region"
    return text


def signal_text(signal: Signal, unit: str) -> str:
    """A short description of a boundary value: "20 °C", "4 ± 7 °C, period 24 h",
    "t_out from weather.csv (°C)"."""
    if isinstance(signal, Constant):
        return f"{num(signal.value)} {unit}"
    if isinstance(signal, Cosine):
        if signal.amplitude == 0.0:
            return f"{num(signal.mean)} {unit}"
        text = (
            f"{num(signal.mean)} ± {num(abs(signal.amplitude))} {unit}, "
            f"period {duration(signal.period)}"
        )
        peak = signal.phase if signal.amplitude > 0 else signal.phase + 0.5 * signal.period
        peak %= signal.period
        return text + (f", peak at {duration(peak)}" if peak else "")
    if isinstance(signal, Series):
        return f"{signal.column} from {Path(signal.source).name} ({unit})"
    raise TypeError(f"unknown signal {signal!r}")


def boundary_condition(b: Boundary) -> str:
    """The boundary's condition in words, e.g. "20 °C, R = 0.13 m²K/W", "fixed 10 °C",
    "q = 15 W/m²", "−5 °C, h_c = 8 W/(m²K), ε 0.9 → −10 °C"."""
    if b.kind == "temperature":
        assert b.temperature is not None
        return f"fixed {signal_text(b.temperature, '°C')}"
    if b.kind == "flux":
        assert b.heat_flux is not None
        return f"q = {signal_text(b.heat_flux, 'W/m²')}"
    assert b.air_temperature is not None
    parts = [signal_text(b.air_temperature, "°C")]
    if b.resistance is not None:
        parts.append(f"R = {num(b.resistance)} m²K/W")
    elif b.convection > 0.0:
        parts.append(f"h_c = {num(b.convection)} W/(m²K)")
    if b.emissivity > 0.0 and b.radiant_temperature is not None:
        parts.append(f"ε {num(b.emissivity)} → {signal_text(b.radiant_temperature, '°C')}")
    if b.heat_flux is not None:
        parts.append(f"q = {signal_text(b.heat_flux, 'W/m²')}")
    return ", ".join(parts)


def junction_side(case: Case, name: str) -> str:
    """ "warm side" / "cold side" for a junction boundary, else ""."""
    j = case.junction
    if j is None:
        return ""
    if name in j.inside:
        return "warm side"
    if name in j.outside:
        return "cold side"
    return ""


def boundary_label(case: Case, b: Boundary, faces: int) -> str:
    """Legend text of a boundary: name, condition, the junction side, "no faces"."""
    text = f"{b.name}: {boundary_condition(b)}"
    side = junction_side(case, b.name)
    if side:
        text += f" ({side})"
    if faces == 0:
        text += " — no faces on the mesh"
    return text


def num(v: float) -> str:
    """A number for a label: up to four significant digits, a proper minus sign."""
    return f"{v:.4g}".replace("-", "−")


def duration(seconds: float) -> str:
    """A duration (s) in words: "2 d", "24 h", "90 s"."""
    if seconds % 86400 == 0 and seconds >= 86400 * 2:
        return f"{seconds / 86400:g} d"
    if seconds >= 3600:
        return f"{seconds / 3600:.4g} h"
    return f"{seconds:.4g} s"


def ordinal(k: int) -> str:
    """ "1st", "2nd", "3rd", "4th", ..."""
    suffix = "th" if 10 <= k % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(k % 10, "th")
    return f"{k}{suffix}"
