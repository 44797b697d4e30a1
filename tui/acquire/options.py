"""What a person can say about a source on the command line, shared by `watch`, `demo` and `simulate`."""

from __future__ import annotations

import argparse
from dataclasses import dataclass, fields

from thermo.units import STANDARD_ATMOSPHERE


@dataclass(frozen=True)
class SourceOptions:
    """Settings that override or complete a gauge profile. None means: the profile's, or the default."""

    profile: str | None = None
    """Gauge profile file, or 'generic' (the default for serial sources)."""
    pressure_unit: str | None = None
    """Unit of pressure values that carry none (e.g. 'bar', 'psig', 'kPa(g)')."""
    temperature_unit: str | None = None
    """Unit of temperature values that carry none (e.g. 'degC', 'K')."""
    gauge: bool = False
    """Bare pressure units ('bar', 'psi') are gauge, read against `atmosphere_Pa`."""
    atmosphere_Pa: float = STANDARD_ATMOSPHERE
    baudrate: int | None = None
    bytesize: int | None = None
    parity: str | None = None
    stopbits: float | None = None
    temperature_port: str | None = None
    """Second device carrying the temperature (two-device setups); SPEC carries the pressure."""
    pair_tolerance_s: float | None = None
    """Largest time between a pressure and the temperature it is paired with [s]."""
    speed: float = 1.0
    """Replay and virtual gauge pace: 1 = as recorded, 10 = ten times faster, 0 = as fast as possible."""
    modbus_unit: int | None = None
    """Modbus device id, overriding the profile's."""
    time_column: str | None = None
    pressure_column: str | None = None
    temperature_column: str | None = None
    """Column names of a CSV replay, when they cannot be found by name."""

    @classmethod
    def from_args(cls, args: argparse.Namespace, **overrides) -> SourceOptions:
        """Options from parsed arguments (attributes of the same names; missing ones keep defaults)."""
        values = {f.name: getattr(args, f.name) for f in fields(cls) if getattr(args, f.name, None) is not None}
        return cls(**(values | overrides))


def add_table_arguments(group) -> None:
    """Units and column names of values that do not say them (CSV replays, bare gauge lines).

    `group` is a parser or an argument group; the destinations match `SourceOptions` and
    `tui.record.table.read_table`'s keywords.
    """
    from thermo.units import parse_atmosphere

    group.add_argument("--pressure-unit", metavar="UNIT", help="unit of pressures given without one, e.g. bar, psig, kPa(g)")
    group.add_argument("--temperature-unit", metavar="UNIT", help="unit of temperatures given without one, e.g. degC, K")
    group.add_argument("--gauge", action="store_true", default=None,
                       help="bare pressure units are gauge (read against --atmosphere)")
    group.add_argument("--atmosphere", dest="atmosphere_Pa", type=parse_atmosphere, metavar="P",
                       help="local atmosphere for gauge pressures, e.g. '1008 hPa' (default 101325 Pa)")
    group.add_argument("--time-column", metavar="NAME", help="time column of a CSV file")
    group.add_argument("--pressure-column", metavar="NAME", help="pressure column of a CSV file, e.g. 'p [bar]'")
    group.add_argument("--temperature-column", metavar="NAME", help="temperature column of a CSV file")


def add_source_arguments(parser: argparse.ArgumentParser) -> None:
    """Every source option, named the same in each command that opens a source."""
    group = parser.add_argument_group("source")
    group.add_argument("--profile", metavar="FILE", help="gauge profile (TOML); default: the generic line format")
    add_table_arguments(group)
    group.add_argument("--baud", dest="baudrate", type=int, metavar="N",
                       help="serial baud rate (default: profile, else 9600)")
    group.add_argument("--bytesize", type=int, choices=(5, 6, 7, 8), help="serial data bits")
    group.add_argument("--parity", choices=("N", "E", "O", "M", "S"), help="serial parity")
    group.add_argument("--stopbits", type=float, choices=(1, 1.5, 2), help="serial stop bits")
    group.add_argument("--temperature-port", metavar="SPEC", help="second device that carries the temperature")
    group.add_argument("--pair-tolerance", dest="pair_tolerance_s", type=float, metavar="S",
                       help="largest time between paired pressure and temperature readings [s] (default 0.5)")
    group.add_argument("--speed", type=float, metavar="X", help="replay pace: 1 as recorded, 0 as fast as possible")
    group.add_argument("--modbus-unit", type=int, metavar="ID", help="Modbus device id")
