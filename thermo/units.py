"""Pressures and temperatures as people type them: parse at the edge, SI (Pa absolute, K) inside.

Gauge pressures (``barg``, ``bar(g)``, ``psig``, ``kPa(g)``) are read against an atmosphere
that defaults to the standard atmosphere, 101 325 Pa; absolute forms (``bara``, ``psia``,
``bar(a)``) and bare units (``bar``, ``MPa``) are absolute. Unit names are case-insensitive
(``mpa`` is the megapascal: nobody reads a gauge in millipascal).

Conversion factors are exact definitions, after the BIPM SI brochure (9th edition, 2019,
Table 8 and section 4) and the international yard and pound agreement (1959):

- 1 bar = 10^5 Pa; 1 atm = 101 325 Pa; 1 torr = 101 325/760 Pa; 1 at = 1 kgf/cm² = 98 066.5 Pa
- 1 psi = 1 lbf/in² = 0.453 592 37 kg × 9.806 65 m/s² / (0.0254 m)² = 6894.757 293 168... Pa
- 1 mmHg (conventional) = 13.5951 g/cm³ × 9.806 65 m/s² × 1 mm = 133.322 387 415 Pa
- T/K = t/°C + 273.15; T/K = (t/°F + 459.67) × 5/9; T/K = T/°R × 5/9
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

#: standard atmosphere [Pa], the default reference of gauge pressures
STANDARD_ATMOSPHERE = 101_325.0

_STANDARD_GRAVITY = 9.806_65  # m/s², exact (3rd CGPM, 1901)
_POUND = 0.453_592_37  # kg, exact (1959)
_INCH = 0.0254  # m, exact (1959)

#: pressure unit symbol -> Pa per unit (absolute scale)
_PRESSURE_FACTORS = {
    "Pa": 1.0,
    "hPa": 1e2,
    "kPa": 1e3,
    "MPa": 1e6,
    "GPa": 1e9,
    "mbar": 1e2,
    "bar": 1e5,
    "atm": STANDARD_ATMOSPHERE,
    "psi": _POUND * _STANDARD_GRAVITY / _INCH**2,
    "torr": STANDARD_ATMOSPHERE / 760.0,
    "mmHg": 13.5951e3 * _STANDARD_GRAVITY * 1e-3,
    "kgf/cm2": 1e4 * _STANDARD_GRAVITY,
}
_PRESSURE_ALIASES = {"kg/cm2": "kgf/cm2", "at": "kgf/cm2", "pascal": "Pa"}
_PRESSURE_LOOKUP = {s.lower(): s for s in _PRESSURE_FACTORS} | _PRESSURE_ALIASES

#: ways to mark a pressure unit as gauge or absolute (after spaces are removed, lower case)
_GAUGE_SUFFIXES = ("(gauge)", "gauge", "(g)", "g")
_ABSOLUTE_SUFFIXES = ("(absolute)", "absolute", "(abs)", "abs", "(a)", "a")

#: temperature unit symbol -> (offset of the unit's zero in the unit, kelvin per degree):
#: T/K = (value + offset) * scale
_TEMPERATURE_SCALES = {
    "K": (0.0, 1.0),
    "°C": (273.15, 1.0),
    "°F": (459.67, 5.0 / 9.0),
    "°R": (0.0, 5.0 / 9.0),
}
_TEMPERATURE_LOOKUP = {
    "k": "K", "kelvin": "K",
    "°c": "°C", "degc": "°C", "c": "°C", "celsius": "°C", "degcelsius": "°C",
    "°f": "°F", "degf": "°F", "f": "°F", "fahrenheit": "°F",
    "°r": "°R", "degr": "°R", "r": "°R", "rankine": "°R",
}

_PRESSURE_HELP = (
    "use Pa, hPa, kPa, MPa, GPa, mbar, bar, atm, psi, torr, mmHg or kgf/cm2, "
    "with g or (g) for gauge and a or (a) for absolute (e.g. '58 bar(g)', '14.7 psia')"
)
_TEMPERATURE_HELP = "use K, degC (°C, C), degF (°F, F) or degR (°R, R), e.g. '19 degC'"

# a decimal number, optionally with digits grouped in threes by a space (SI brochure 5.4.4)
_NUMBER = re.compile(
    r"\s*(?P<number>[+-]?(?:(?:\d{1,3}(?:[ \u2009\u202f]\d{3})+|\d+)(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)"
    r"\s*(?P<unit>.*?)\s*$"
)


class UnitError(ValueError):
    """A pressure or temperature that cannot be read; the message is one line for people."""


def _split(text: str, what: str, accepted: str) -> tuple[float, str]:
    """Split '58 bar(g)' into (58.0, 'bar(g)'); the unit is required."""
    cleaned = str(text).replace("\u2212", "-").replace("\u00ba", "°")
    match = _NUMBER.match(cleaned)
    unit = match.group("unit") if match else ""
    if not match or re.match(r"[,.\d]", unit):
        raise UnitError(f"cannot read a {what} in {text!r}: expected a number (decimal point) and a unit; {accepted}")
    if not unit:
        raise UnitError(f"{what} {text!r} has no unit; {accepted}")
    number = re.sub(r"[ \u2009\u202f]", "", match.group("number"))
    return float(number), unit


def _pressure_symbol(text: str) -> tuple[str, bool] | None:
    """('bar', True) for 'bar(g)', ('psi', False) for 'psia'; None for no pressure unit."""
    key = re.sub(r"\s+", "", str(text)).lower()
    if key in _PRESSURE_LOOKUP:
        return _PRESSURE_LOOKUP[key], False
    for suffixes, gauge in ((_GAUGE_SUFFIXES, True), (_ABSOLUTE_SUFFIXES, False)):
        for suffix in suffixes:
            base = key.removesuffix(suffix)
            if base != key and base in _PRESSURE_LOOKUP:
                return _PRESSURE_LOOKUP[base], gauge
    return None


def _temperature_symbol(text: str) -> str | None:
    """'°C' for 'degC', 'C', '°C' or '℃'; None for no temperature unit."""
    key = re.sub(r"\s+", "", str(text)).lower().replace("\u2103", "°c").replace("\u2109", "°f")
    return _TEMPERATURE_LOOKUP.get(key)


@dataclass(frozen=True, slots=True)
class PressureUnit:
    """A pressure unit on the absolute or the gauge scale, converting arrays both ways."""

    symbol: str
    """Base unit, e.g. 'bar', 'psi', 'MPa'."""
    factor: float
    """Pascal per unit."""
    is_gauge: bool = False
    atmosphere: float = STANDARD_ATMOSPHERE
    """Absolute pressure of the atmosphere that gauge values are read against [Pa]."""

    @classmethod
    def from_text(cls, text: str, atmosphere: float = STANDARD_ATMOSPHERE) -> PressureUnit:
        """Read a unit such as 'bar', 'barg', 'bar(g)', 'psia', 'kPa (g)', 'MPa abs'."""
        found = _pressure_symbol(text)
        if found is None:
            raise UnitError(f"unknown pressure unit {str(text)!r}; {_PRESSURE_HELP}")
        symbol, gauge = found
        return cls(symbol, _PRESSURE_FACTORS[symbol], gauge, atmosphere)

    @property
    def label(self) -> str:
        """The unit with its scale, e.g. 'bar(g)' or 'bar(a)'."""
        return f"{self.symbol}({'g' if self.is_gauge else 'a'})"

    def to_si(self, values):
        """Values in this unit -> absolute pressure [Pa] (no range check: see `parse_pressure`)."""
        absolute = np.asarray(values, dtype=float) * self.factor
        return absolute + self.atmosphere if self.is_gauge else absolute

    def from_si(self, pressure_Pa):
        """Absolute pressure [Pa] -> values in this unit (negative below the atmosphere if gauge)."""
        pressure = np.asarray(pressure_Pa, dtype=float)
        return ((pressure - self.atmosphere) if self.is_gauge else pressure) / self.factor

    def difference_to_si(self, values):
        """A pressure difference in this unit -> Pa (the gauge offset cancels)."""
        return np.asarray(values, dtype=float) * self.factor

    def difference_from_si(self, difference_Pa):
        """A pressure difference [Pa] -> this unit."""
        return np.asarray(difference_Pa, dtype=float) / self.factor


@dataclass(frozen=True, slots=True)
class TemperatureUnit:
    """A temperature scale, converting temperatures and temperature differences both ways."""

    symbol: str
    """'K', '°C', '°F' or '°R'."""
    offset: float
    """The scale's value at 0 K, negated: T/K = (value + offset) * scale."""
    scale: float
    """Kelvin per degree."""

    @classmethod
    def from_text(cls, text: str) -> TemperatureUnit:
        """Read a unit such as 'K', 'degC', '°C', 'C', 'degF', '°F', 'R'."""
        symbol = _temperature_symbol(text)
        if symbol is None:
            raise UnitError(f"unknown temperature unit {str(text)!r}; {_TEMPERATURE_HELP}")
        return cls(symbol, *_TEMPERATURE_SCALES[symbol])

    @property
    def label(self) -> str:
        return self.symbol

    @property
    def difference_label(self) -> str:
        """Unit of a temperature difference: K for kelvin and Celsius, °F or °R otherwise."""
        return "K" if self.scale == 1.0 else self.symbol

    def to_si(self, values):
        """Temperatures in this unit -> K (no range check: see `parse_temperature`)."""
        return (np.asarray(values, dtype=float) + self.offset) * self.scale

    def from_si(self, temperature_K):
        """Temperatures [K] -> this unit."""
        return np.asarray(temperature_K, dtype=float) / self.scale - self.offset

    def difference_to_si(self, values):
        """A temperature difference in this unit -> K (1 °C of difference is 1 K; 1 °F is 5/9 K)."""
        return np.asarray(values, dtype=float) * self.scale

    def difference_from_si(self, difference_K):
        """A temperature difference [K] -> this unit."""
        return np.asarray(difference_K, dtype=float) / self.scale


def split_pressure(text: str, atmosphere: float = STANDARD_ATMOSPHERE) -> tuple[float, PressureUnit]:
    """'58 bar(g)' -> (58.0, PressureUnit bar gauge), checking the absolute value is not negative."""
    value, unit_text = _split(text, "pressure", _PRESSURE_HELP)
    unit = PressureUnit.from_text(unit_text, atmosphere)
    absolute = float(unit.to_si(value))
    if absolute < 0.0:
        scale = f" with an atmosphere of {format_number(atmosphere, 6)} Pa" if unit.is_gauge else ""
        raise UnitError(f"pressure {str(text).strip()!r} is below zero absolute{scale}")
    return value, unit


def parse_pressure(text: str, atmosphere: float = STANDARD_ATMOSPHERE) -> float:
    """'58 bar(g)' -> absolute pressure [Pa]; gauge values are read against `atmosphere` [Pa].

    >>> parse_pressure("58 bar(g)")
    5901325.0
    >>> round(parse_pressure("14.7 psia"), 1)
    101352.9
    """
    value, unit = split_pressure(text, atmosphere)
    return float(unit.to_si(value))


def parse_atmosphere(text: str) -> float:
    """The local atmosphere that gauge pressures are read against, as typed -> [Pa]."""
    value, unit = split_pressure(text)
    if unit.is_gauge or value <= 0.0:
        raise UnitError(f"atmosphere {str(text).strip()!r} must be a positive absolute pressure, e.g. '1013 hPa'")
    return float(unit.to_si(value))


def parse_pressure_difference(text: str) -> float:
    """'0.05 bar' -> pressure difference [Pa]; gauge and absolute forms are the same here."""
    value, unit_text = _split(text, "pressure difference", _PRESSURE_HELP)
    return float(PressureUnit.from_text(unit_text).difference_to_si(value))


def split_temperature(text: str) -> tuple[float, TemperatureUnit]:
    """'19 degC' -> (19.0, TemperatureUnit °C), checking the temperature is not below 0 K."""
    value, unit_text = _split(text, "temperature", _TEMPERATURE_HELP)
    unit = TemperatureUnit.from_text(unit_text)
    if float(unit.to_si(value)) < 0.0:
        raise UnitError(f"temperature {str(text).strip()!r} is below absolute zero")
    return value, unit


def parse_temperature(text: str) -> float:
    """'19 degC' -> temperature [K].

    >>> round(parse_temperature("19 degC"), 2)
    292.15
    """
    value, unit = split_temperature(text)
    return float(unit.to_si(value))


def parse_temperature_difference(text: str) -> float:
    """'0.1 K' -> temperature difference [K]; '0.18 degF' -> 0.1 K; '0.1 degC' -> 0.1 K."""
    value, unit_text = _split(text, "temperature difference", _TEMPERATURE_HELP)
    return float(TemperatureUnit.from_text(unit_text).difference_to_si(value))


def split_quantity(text: str, atmosphere: float = STANDARD_ATMOSPHERE) -> tuple[float, PressureUnit | TemperatureUnit]:
    """A temperature or a pressure, told apart by its unit: '-20 degC' or '10 bar(g)' ->
    (value, unit), with the checks of `split_temperature` and `split_pressure`."""
    accepted = f"give a temperature ({_TEMPERATURE_HELP}) or a pressure ({_PRESSURE_HELP})"
    _, unit_text = _split(text, "temperature or pressure", accepted)
    if _temperature_symbol(unit_text) is not None:
        return split_temperature(text)
    if _pressure_symbol(unit_text) is not None:
        return split_pressure(text, atmosphere)
    raise UnitError(f"unknown unit {unit_text!r} in {str(text).strip()!r}; {accepted}")


def parse_molar_mass(text: str) -> float:
    """'58.12 g/mol' -> molar mass [kg/mol] (g/mol, kg/mol or kg/kmol)."""
    value, unit = _split(text, "molar mass", "use g/mol or kg/mol, e.g. '58.12 g/mol'")
    factors = {"g/mol": 1e-3, "kg/kmol": 1e-3, "kg/mol": 1.0}
    key = re.sub(r"\s+", "", unit).lower()
    if key not in factors:
        raise UnitError(f"unknown molar mass unit {unit!r}; use g/mol or kg/mol, e.g. '58.12 g/mol'")
    if value <= 0.0:
        raise UnitError(f"molar mass {str(text).strip()!r} must be positive")
    return value * factors[key]


def format_number(value: float, digits: int = 4) -> str:
    """`digits` significant digits in plain notation for everyday magnitudes, else scientific;
    'n/a' for NaN (an undefined margin)."""
    value = float(value)
    if math.isnan(value):
        return "n/a"
    if math.isinf(value) or value == 0.0:
        return f"{value:g}"
    exponent = math.floor(math.log10(abs(value)))
    if not -4 <= exponent < 7:
        return f"{value:.{digits - 1}e}"
    decimals = max(0, digits - 1 - exponent)
    return f"{round(value, digits - 1 - exponent):.{decimals}f}"


def format_pressure(pressure_Pa: float, unit: PressureUnit, digits: int = 5) -> str:
    """Absolute pressure [Pa] in `unit` with its scale, e.g. '59.013 bar(a)'."""
    return f"{format_number(unit.from_si(pressure_Pa), digits)} {unit.label}"


def format_pressure_difference(difference_Pa: float, unit: PressureUnit, digits: int = 4) -> str:
    """A pressure difference [Pa] in the base unit, e.g. '2.512 bar'."""
    return f"{format_number(unit.difference_from_si(difference_Pa), digits)} {unit.symbol}"


def format_temperature(temperature_K: float, unit: TemperatureUnit, decimals: int = 2) -> str:
    """Temperature [K] to a fixed resolution (0.01 degree by default), e.g. '19.00 °C'."""
    value = float(unit.from_si(temperature_K))
    return "n/a" if math.isnan(value) else f"{value:.{decimals}f} {unit.label}"


def format_temperature_difference(difference_K: float, unit: TemperatureUnit, decimals: int = 2) -> str:
    """A temperature difference [K] in `unit`'s degree, e.g. '2.53 K' or '4.55 °F'."""
    value = float(unit.difference_from_si(difference_K))
    return "n/a" if math.isnan(value) else f"{value:.{decimals}f} {unit.difference_label}"
