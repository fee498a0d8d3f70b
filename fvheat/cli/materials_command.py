"""``fvheat materials``: the built-in material library."""

from __future__ import annotations

import shutil
import textwrap

#: narrowest layout width, characters
MIN_WIDTH = 40


def library_text(width: int) -> str:
    """Every library material as a block: its name and design values on one line (names
    and numbers are never cut: a name is what the user types), then its source wrapped to
    ``width`` characters, indented."""
    from fvheat.properties.library import library

    width = max(width, MIN_WIDTH)
    materials = library()
    longest = max(len(name) for name in materials)
    out = [
        "Built-in materials: use by name in a region, or [materials.X] library = NAME.",
        "λ W/(m·K), ρ kg/m³, c J/(kg·K), ε surface emissivity; sources below each row.",
        "",
    ]
    for m in materials.values():
        values = f"λ {m.conductivity:<6g} ρ {m.density:<6g} c {m.specific_heat:<6g}"
        if m.emissivity is not None:
            values += f" ε {m.emissivity:g}"
        line = f"{m.name:<{longest}}  {values}"
        if len(line) <= width:
            out.append(line.rstrip())
        else:
            out += [m.name, "    " + values.rstrip()]
        out += textwrap.wrap(
            m.source, width, initial_indent="    ", subsequent_indent="    ", break_on_hyphens=False
        )
    return "\n".join(out)


def print_library() -> None:
    """Print every library material with its design values and source, fitted to the
    terminal's width."""
    print(library_text(shutil.get_terminal_size((100, 24)).columns))
