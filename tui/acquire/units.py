"""Unit text -> the linear map to SI that the parsing hot path applies to every value.

Every unit a gauge speaks is linear: SI = value * scale + offset (the offset carries the
atmosphere of a gauge pressure, or the zero of a Celsius or Fahrenheit scale). Reading
that pair once per unit and applying it per value keeps per-line work to one multiply-add.
The definitions themselves live in `thermo.units` (BIPM SI brochure; 1 psi = 6894.757 Pa).
"""

from __future__ import annotations

import re
from typing import NamedTuple

from thermo.units import STANDARD_ATMOSPHERE, PressureUnit, TemperatureUnit


class LinearMap(NamedTuple):
    """SI value = value * scale + offset."""

    scale: float
    offset: float

    def then(self, outer: LinearMap) -> LinearMap:
        """This map followed by `outer` (e.g. 4-20 mA -> bar, then bar -> Pa)."""
        return LinearMap(self.scale * outer.scale, self.offset * outer.scale + outer.offset)

    def inverse(self) -> LinearMap:
        return LinearMap(1.0 / self.scale, -self.offset / self.scale)


def pressure_map(text: str, *, gauge: bool = False, atmosphere_Pa: float = STANDARD_ATMOSPHERE) -> LinearMap:
    """Map of a pressure unit such as 'bar', 'psig', 'kPa(g)' to absolute Pa.

    `gauge` makes a bare unit ('bar', 'psi') gauge; a unit that says absolute ('bara',
    'bar(a)') stays absolute. Raises `thermo.units.UnitError` for an unknown unit.
    """
    unit = PressureUnit.from_text(text, atmosphere_Pa)
    bare = re.sub(r"\s+", "", text).lower() == unit.symbol.lower()
    is_gauge = unit.is_gauge or (gauge and bare)
    return LinearMap(unit.factor, atmosphere_Pa if is_gauge else 0.0)


def temperature_map(text: str) -> LinearMap:
    """Map of a temperature unit such as 'K', 'degC', '°F' to kelvin."""
    unit = TemperatureUnit.from_text(text)
    return LinearMap(unit.scale, unit.offset * unit.scale)

