"""`rigside curve`: a table of one phase boundary (saturation, melting or sublimation) in the user's units.

The range is given in temperatures or in pressures (--from/--to, same kind); by default the whole
curve. Temperature steps are even; pressure steps are even on a log scale when the range spans
a decade or more (sublimation pressures do), even otherwise.
"""

from __future__ import annotations

import csv
import math
import sys
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from thermo.units import (
    STANDARD_ATMOSPHERE,
    PressureUnit,
    TemperatureUnit,
    format_number,
    format_pressure,
    format_temperature,
    parse_atmosphere,
    split_quantity,
)
from tui.cli import SAFETY_NOTE
from tui.commands.fluids import add_fluid_arguments, display_name, resolve_fluid
from tui.errors import UsageError

CURVES = ("saturation", "melting", "sublimation")
DEFAULT_POINTS = 15
MAX_POINTS = 100_000


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser(
        "curve",
        help="table of the saturation, melting or sublimation curve",
        description="Tabulate one phase boundary of the fluid: saturation (T, p, liquid and vapor "
        "densities), melting or sublimation (T, p).",
        epilog=SAFETY_NOTE,
    )
    add_fluid_arguments(parser)
    parser.add_argument("curve", choices=CURVES, help="which boundary")
    parser.add_argument("--from", dest="start", metavar="T_OR_P", help="first point: '-20 degC' or '10 bar' (default: the curve's start)")
    parser.add_argument("--to", dest="stop", metavar="T_OR_P", help="last point, same kind as --from (default: the curve's end)")
    parser.add_argument("--points", type=int, default=DEFAULT_POINTS, help=f"number of rows (default {DEFAULT_POINTS})")
    parser.add_argument("--csv", action="store_true", help="comma-separated values with a header row, for spreadsheets")
    parser.add_argument("--pressure-unit", metavar="UNIT", help="unit of pressures (default: the unit of --from/--to, else bar(a))")
    parser.add_argument("--temperature-unit", metavar="UNIT", help="unit of temperatures (default: the unit of --from/--to, else K)")
    parser.add_argument("--atmosphere", metavar="P", help="local atmosphere for gauge pressures (default 101325 Pa)")


@dataclass(frozen=True)
class Boundary:
    """One phase boundary of a fluid: its span and both directions of the curve."""

    kind: str
    T_min: float  #: [K]
    T_max: float  #: [K]
    p_min: float  #: [Pa]
    p_max: float  #: [Pa]
    pressure: Callable  #: T [K] -> p [Pa]
    temperature: Callable  #: p [Pa] -> T [K]
    published: bool
    source: str
    by_temperature: bool
    """Whether p(T) is single-valued along the whole curve (else the default rows go by pressure)."""


def boundary(fluid, kind: str) -> Boundary:
    """The saturation curve (from the equation of state) or a solid curve (``fluid.solid``)."""
    if kind == "saturation":
        return Boundary(kind, fluid.triple.T, fluid.critical.T, fluid.triple.p, fluid.critical.p,
                        fluid.saturation_pressure, fluid.saturation_temperature, not fluid.approximate,
                        fluid.source, True)
    curve = getattr(fluid.solid, kind)
    return Boundary(kind, curve.T_min, curve.T_max, curve.p_min, curve.p_max, curve.pressure,
                    curve.temperature, curve.published, curve.source, len(curve.parts) == 1)


def run(args) -> int:
    fluid = resolve_fluid(args)
    if not 2 <= args.points <= MAX_POINTS:
        raise UsageError(f"--points must be between 2 and {MAX_POINTS}, not {args.points}")
    atmosphere = STANDARD_ATMOSPHERE if args.atmosphere is None else parse_atmosphere(args.atmosphere)
    curve = boundary(fluid, args.curve)
    if not all(map(math.isfinite, (curve.T_min, curve.T_max, curve.p_min, curve.p_max))):
        raise UsageError(f"no {curve.kind} curve is known for {fluid.name}")
    by, (start, stop), p_unit, T_unit = _span(args, curve, atmosphere)
    if by == "temperature":
        T = np.linspace(start, stop, args.points)
        p = np.asarray(curve.pressure(T), dtype=float)
    else:
        spacing = np.geomspace if max(start, stop) >= 10 * min(start, stop) else np.linspace
        p = spacing(start, stop, args.points)
        T = np.asarray(curve.temperature(p), dtype=float)
    columns = [(f"T [{T_unit.label}]", T_unit.from_si(T), 2), (f"p [{p_unit.label}]", p_unit.from_si(p), 6)]
    if curve.kind == "saturation":
        liquid, vapor = fluid.saturated_densities(T)
        columns += [("liquid density [kg/m3]", liquid, 6), ("vapor density [kg/m3]", vapor, 6)]
    if args.csv:
        _write_csv(columns)
    else:
        print(f"{display_name(fluid)}, {curve.kind} curve{'' if curve.published else ' (approximate)'}: {curve.source}")
        print("\n".join(_table(columns)))
    return 0


def _span(args, curve: Boundary, atmosphere: float):
    """("temperature" | "pressure", (start, stop) in SI, pressure unit, temperature unit) of the rows."""
    p_unit = PressureUnit.from_text("bar", atmosphere)
    T_unit = TemperatureUnit.from_text("K")
    if args.start is None and args.stop is None:
        by = "temperature" if curve.by_temperature else "pressure"  # ices of water, vertical fallbacks
        ends = (curve.p_min, curve.p_max) if by == "pressure" else (curve.T_min, curve.T_max)
    else:
        (by_start, start, unit_start), (by_stop, stop, unit_stop) = (
            _point(text, atmosphere) if text is not None else (None, None, None) for text in (args.start, args.stop))
        by, unit = by_start or by_stop, unit_start or unit_stop
        if by_start and by_stop and by_start != by_stop:
            raise UsageError("--from and --to must both be temperatures or both be pressures")
        low, high = (curve.T_min, curve.T_max) if by == "temperature" else (curve.p_min, curve.p_max)
        ends = (low if start is None else start, high if stop is None else stop)
        T_unit, p_unit = (unit, p_unit) if by == "temperature" else (T_unit, unit)
        _check_inside(ends, low, high, by, curve, p_unit, T_unit)
    if args.pressure_unit:
        p_unit = PressureUnit.from_text(args.pressure_unit, atmosphere)
    if args.temperature_unit:
        T_unit = TemperatureUnit.from_text(args.temperature_unit)
    return by, ends, p_unit, T_unit


def _point(text: str, atmosphere: float):
    """("temperature" | "pressure", value in SI, its unit) of a --from/--to value."""
    value, unit = split_quantity(text, atmosphere)
    return ("temperature" if isinstance(unit, TemperatureUnit) else "pressure"), float(unit.to_si(value)), unit


def _check_inside(ends, low: float, high: float, by: str, curve: Boundary, p_unit, T_unit) -> None:
    slack = 1e-9 * high
    if all(low - slack <= end <= high + slack for end in ends):
        return
    show = (lambda v: format_temperature(v, T_unit, 3)) if by == "temperature" else (lambda v: format_pressure(v, p_unit))
    raise UsageError(f"the {curve.kind} curve runs from {show(low)} to {show(high)}; "
                     f"the range {show(ends[0])} to {show(ends[1])} leaves it")


def _table(columns) -> list[str]:
    """Right-aligned text columns; n/a where a value is undefined."""
    cells = [[header] + [format_number(v, digits) if digits != 2 else ("n/a" if math.isnan(v) else f"{v:.2f}")
                         for v in values] for header, values, digits in columns]
    widths = [max(map(len, column)) for column in cells]
    return ["  ".join(cell.rjust(width) for cell, width in zip(row, widths)) for row in zip(*cells)]


def _write_csv(columns) -> None:
    """Header row, then full-precision values; empty where a value is undefined."""
    writer = csv.writer(sys.stdout, lineterminator="\n")
    writer.writerow(header for header, _, _ in columns)
    for row in zip(*(values for _, values, _ in columns)):
        writer.writerow("" if math.isnan(v) else f"{v:.10g}" for v in row)
