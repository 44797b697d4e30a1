"""Thermodynamic properties at the live state, from thermo, in two columns."""

from __future__ import annotations

import math
from collections.abc import Mapping

from textual.content import Content

from thermo.units import format_number
from tui.screen.widgets.text_panel import TextPanel

#: property key -> (symbol, factor from SI, unit shown)
PROPERTIES = {
    "density": ("ρ", 1.0, "kg/m³"),
    "molar_volume": ("Vm", 1e6, "cm³/mol"),
    "Z": ("Z", 1.0, ""),
    "alpha_p": ("αp", 1e3, "1/kK"),
    "kappa_T": ("κT", 1e6, "1/MPa"),
    "cp": ("cp", 1e-3, "kJ/(kg·K)"),
    "speed_of_sound": ("w", 1.0, "m/s"),
}


def property_lines(properties: Mapping[str, float], columns: int) -> list[str]:
    """One 'symbol value unit' entry per property, in `columns` columns filled downwards."""
    entries = []
    for key, (symbol, factor, unit) in PROPERTIES.items():
        value = properties.get(key, math.nan)
        text = format_number(value * factor, 4) if math.isfinite(value) else "—"
        entries.append(f"{symbol:<2} {text:>6} {unit}".rstrip())
    rows = math.ceil(len(entries) / columns)
    table = [entries[c * rows : (c + 1) * rows] for c in range(columns)]
    widths = [max(len(e) for e in column) + 1 for column in table]
    return ["".join(column[r].ljust(w) for column, w in zip(table, widths) if r < len(column)).rstrip()
            for r in range(rows)]


def two_phase_lines(properties: Mapping[str, float], columns: int) -> list[str]:
    """The saturated liquid (ρ') and vapor (ρ'') densities, under a line that says why."""
    entries = [f"{symbol:<3} {format_number(properties[key], 4):>6} kg/m³"
               for symbol, key in (("ρ'", "rho_liquid"), ("ρ''", "rho_vapor"))]
    rows = ["  ".join(entries)] if columns > 1 else entries
    return ["two-phase: saturated liquid and vapor", *rows]


class PropertyTable(TextPanel):
    """Density, molar volume, Z, αp, κT, cp and the speed of sound, wrapped to fit the width;
    on the liquid–vapor curve the two saturated densities instead."""

    DEFAULT_CSS = """
    PropertyTable { height: auto; }
    """

    def show(self, properties: Mapping[str, float]) -> None:
        width = self.content_region.width or 40
        columns = 3 if width >= 60 else 2 if width >= 34 else 1
        lines = (two_phase_lines if "rho_liquid" in properties else property_lines)(properties, columns)
        self.put(Content("\n".join(lines)))
