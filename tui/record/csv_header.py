"""Which columns of a CSV hold time, pressure and temperature, and in which units, from its header.

Columns are found by name: time (`time`, `t`, `t_s`, `timestamp`, `datetime`, `date`,
`elapsed`), pressure (`pressure...`, `p`, `pres`, `press`), temperature (`temperature...`,
`temp`, `T`), with units from a bracketed suffix (`pressure [bar]`, `T (degC)`), an SI key
suffix (`pressure_Pa`, `temperature_K`) or options. Every problem is a one-line `UsageError`
naming the file.
"""

from __future__ import annotations

import csv
import re
from dataclasses import dataclass
from pathlib import Path

from thermo.units import UnitError
from tui.acquire.units import LinearMap, pressure_map, temperature_map
from tui.errors import UsageError

TIME_NAMES = {"time", "t_s", "timestamp", "datetime", "date_time", "date", "elapsed", "seconds"}
PRESSURE_NAMES = {"p", "pres", "press", "pressure", "pressure_pa"}
TEMPERATURE_NAMES = {"temp", "temperature", "temperature_k"}
#: time unit -> seconds
TIME_UNITS = {"s": 1.0, "sec": 1.0, "ms": 1e-3, "min": 60.0, "h": 3600.0}
#: 'pressure [bar(g)]' -> name, unit; matches any text (a name without a closed bracket has no unit)
_NAME_UNIT = re.compile(r"^\s*(?P<name>.*?)\s*(?:[\[(](?P<unit>.*)[\])])?\s*$", re.DOTALL)


@dataclass(frozen=True, slots=True)
class CsvLayout:
    """Where the three quantities stand in a CSV's rows and how to bring them to SI."""

    delimiter: str
    names: list[str]
    time_at: int
    time_unit: str | None
    pressure_at: int
    pressure: LinearMap
    """Cell value -> absolute Pa."""
    temperature_at: int
    temperature: LinearMap
    """Cell value -> K."""

    def seconds_per_time_unit(self, path: Path) -> float:
        """For a numeric time column (an ISO time column has no unit)."""
        if self.time_unit is not None and self.time_unit not in TIME_UNITS:
            raise UsageError(f"{path}: unknown time unit {self.time_unit!r}; use s, ms, min or h")
        return TIME_UNITS[self.time_unit or "s"]


def csv_layout(header: str, options: dict, path: Path) -> CsvLayout:
    """The layout of a CSV from its header line and the reader's options (units and column names)."""
    delimiter = options["delimiter"] or max((",", ";", "\t"), key=header.count)
    names = next(csv.reader([header], delimiter=delimiter))
    time_at, time_unit = find_column(names, options["time_column"], TIME_NAMES, "time", path)
    p_at, p_unit = find_column(names, options["pressure_column"], PRESSURE_NAMES, "pressure", path)
    T_at, T_unit = find_column(names, options["temperature_column"], TEMPERATURE_NAMES, "temperature", path)
    p_unit = options["pressure_unit"] or p_unit or ("Pa" if names[p_at].strip().endswith("_Pa") else None)
    T_unit = options["temperature_unit"] or T_unit or ("K" if names[T_at].strip().endswith("_K") else None)
    for kind, unit, option in (("pressure", p_unit, "--pressure-unit"), ("temperature", T_unit, "--temperature-unit")):
        if unit is None:
            raise UsageError(f"{path}: the {kind} column has no unit: write it as '{kind} [unit]' or give {option}")
    try:
        p_map = pressure_map(p_unit, gauge=options["gauge"], atmosphere_Pa=options["atmosphere_Pa"])
        T_map = temperature_map(T_unit)
    except UnitError as exc:
        raise UsageError(f"{path}: {exc}") from None
    return CsvLayout(delimiter, names, time_at, options["time_unit"] or time_unit, p_at, p_map, T_at, T_map)


def find_column(names: list[str], given: str | None, known: set[str], what: str, path: Path) -> tuple[int, str | None]:
    """Index and bracketed unit of the column called `given`, or of the first with a known name."""
    for i, full in enumerate(names):
        name, unit = _NAME_UNIT.match(full).group("name", "unit")
        if given is not None and given.strip() in (full.strip(), name):
            return i, unit
        if given is None and _is_named(name, known, what):
            return i, unit
    if given is not None:
        raise UsageError(f"{path}: no column named {given!r}; the header has {_header_text(names)}")
    raise UsageError(f"{path}: no {what} column in the header ({_header_text(names)}); name it with --{what}-column")


def _header_text(names: list[str], most: int = 120) -> str:
    """The header's column names for a one-line message: printable, and cut short if long."""
    text = ", ".join(names).encode("unicode_escape").decode("ascii")
    return text if len(text) <= most else text[:most] + "..."


def _is_named(name: str, known: set[str], what: str) -> bool:
    """'t' is time and 'T' temperature; other names are matched without case."""
    if name in ("t", "T"):
        return (name == "t") == (what == "time")
    low = name.lower()
    return low in known or (what != "time" and low.startswith(what))
