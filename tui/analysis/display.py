"""How numbers of an analysis are shown to people: the chosen units and the cell formats."""

from __future__ import annotations

from dataclasses import dataclass

from thermo.units import PressureUnit, TemperatureUnit, format_number


@dataclass(frozen=True, slots=True)
class Units:
    """Display units; pressures on the absolute scale (a log axis has no gauge zero, and a
    summary of absolute values cannot be misread)."""

    pressure: PressureUnit
    temperature: TemperatureUnit

    @classmethod
    def of(cls, pressure: PressureUnit, temperature: TemperatureUnit) -> Units:
        return cls(PressureUnit(pressure.symbol, pressure.factor), temperature)

    def margin(self, name: str):
        """(SI margin -> display values, display unit) for a `MARGINS` name."""
        if name.endswith("_K"):
            return self.temperature.difference_from_si, self.temperature.difference_label
        if name.endswith("_Pa"):
            return self.pressure.difference_from_si, self.pressure.symbol
        return (lambda values: values), ""

    def margin_label(self, name: str) -> str:
        """A margin's name for people with the display unit: 'dp_saturation [bar]', not the SI key
        'dp_saturation_Pa' (whose suffix would contradict the unit shown)."""
        unit = self.margin(name)[1]
        return f"{margin_name(name)} [{unit}]" if unit else margin_name(name)

    def margin_cell(self, name: str, value: float) -> str:
        scale, _ = self.margin(name)
        return format_number(float(scale(value)))


def margin_name(name: str) -> str:
    """A `MARGINS` key without its SI unit suffix: 'dT_saturation_K' -> 'dT_saturation'."""
    return name.removesuffix("_K").removesuffix("_Pa")


def seconds(value: float) -> str:
    """A time or duration [s] to the millisecond; 'n/a' when undefined."""
    return "n/a" if value != value else f"{value:.3f}"


def share(part: float, whole: float) -> str:
    return f"{100.0 * part / whole:.1f} %" if whole > 0 else "n/a"
