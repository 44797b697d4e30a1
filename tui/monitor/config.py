"""The monitor's configuration: one TOML file, checked key by key against the documented defaults.

`default.toml` beside this module is the single source of every default value and its
documentation; this module only knows what kind of value each key takes. Layers, later ones
winning: the defaults, the fluid-suited values (`[fluid-defaults.<fluid>]`) for the chosen
fluid, the person's file, the command line. Every quantity is normalised to SI (K, Pa, s);
the normalised tree (`MonitorConfig.effective`) is what `rigside config FILE` prints and what
each run log records.
"""

from __future__ import annotations

import json
import math
import os
import re
import sys
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass, field
from importlib.resources import files
from pathlib import Path

from thermo.units import (
    STANDARD_ATMOSPHERE,
    PressureUnit,
    TemperatureUnit,
    UnitError,
    parse_atmosphere,
    parse_molar_mass,
    parse_pressure,
    parse_pressure_difference,
    parse_temperature,
    parse_temperature_difference,
)
from thermo.solid import MissingCurve
from tui.acquire.sample import Quality
from tui.errors import UsageError
from tui.jsontext import dumps

PRIORITIES = ("high", "medium", "low")


def default_text() -> str:
    """The documented default configuration, as `rigside config --default` prints it."""
    return files("tui.monitor").joinpath("default.toml").read_text(encoding="utf-8")


def user_config_path() -> Path:
    """Where a person's own configuration lives when no --config is given (may not exist)."""
    if sys.platform == "win32":
        base = Path(os.environ.get("APPDATA", Path.home() / "AppData" / "Roaming"))
    elif sys.platform == "darwin":
        base = Path.home() / "Library" / "Application Support"
    else:
        base = Path(os.environ.get("XDG_CONFIG_HOME") or Path.home() / ".config")
    return base / "rigside" / "monitor.toml"


# ---------------------------------------------------------------------------------------------
# kinds of value: each reads what a person wrote and returns the normalised (SI) value


class _Kind:
    unit = ""
    """Unit of the normalised value, printed as a comment beside it."""

    def read(self, value, key: str):
        raise NotImplementedError


def _number(value, key: str, what: str) -> float:
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise UsageError(f"{key} = {value!r}: expected {what}")
    if not math.isfinite(value):
        raise UsageError(f"{key} = {value!r}: expected a finite number")
    return float(value)


def _not_negative(number: float, key: str, shown) -> float:
    if number < 0.0:
        raise UsageError(f"{key} = {shown!r}: must not be negative")
    return number


class _Quantity(_Kind):
    """A number in SI, or a string with a unit read by `parse`."""

    def __init__(self, unit: str, parse, example: str):
        self.unit, self._parse, self._example = unit, parse, example

    def read(self, value, key):
        if isinstance(value, str):
            try:
                number = float(self._parse(value))
            except UnitError as exc:
                raise UsageError(f"{key} = {value!r}: {exc}") from None
        else:
            number = _number(value, key, f"a number in {self.unit} or a string like {self._example!r}")
        return _not_negative(number, key, value)


_DURATION_UNITS = {"ms": 1e-3, "s": 1.0, "sec": 1.0, "min": 60.0, "h": 3600.0}
_DURATION = re.compile(r"\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*([a-z]*)\s*$")


def _parse_duration(text: str) -> float:
    match = _DURATION.match(text.lower())
    if not match or match.group(2) not in _DURATION_UNITS:
        raise UnitError("expected a duration such as '90 s', '10 min' or '8 h' (units ms, s, min, h)")
    return float(match.group(1)) * _DURATION_UNITS[match.group(2)]


def _parse_percent(text: str) -> float:
    number, percent, rest = text.strip().partition("%")
    if not percent or rest.strip():
        raise UnitError("expected a percentage such as '5 %'")
    try:
        return float(number) / 100.0
    except ValueError:
        raise UnitError("expected a percentage such as '5 %'") from None


class _Fraction(_Kind):
    """A plain fraction (0.05) or a percentage ('5 %'), below 1."""

    def read(self, value, key):
        number = _Quantity("", _parse_percent, "5 %").read(value, key)
        if number >= 1.0:
            raise UsageError(f"{key} = {value!r}: must be below 100 %")
        return number


class _PressureOrPercent(_Kind):
    """A pressure difference (number in Pa, or '0.5 bar') or a percentage of the saturation
    pressure ('5 %'); the percentage stays a string in the normalised tree."""

    unit = "Pa"

    def read(self, value, key):
        if isinstance(value, str) and value.strip().endswith("%"):
            return f"{_Fraction().read(value, key) * 100:g} %"
        return _Quantity("Pa", parse_pressure_difference, "0.5 bar").read(value, key)


class _Count(_Kind):
    def __init__(self, minimum: int):
        self._minimum = minimum

    def read(self, value, key):
        if isinstance(value, bool) or not isinstance(value, int) or value < self._minimum:
            raise UsageError(f"{key} = {value!r}: expected a whole number of at least {self._minimum}")
        return value


class _Choice(_Kind):
    def __init__(self, choices: tuple[str, ...]):
        self._choices = choices

    def read(self, value, key):
        if value not in self._choices:
            raise UsageError(f"{key} = {value!r}: expected one of {', '.join(self._choices)}")
        return value


class _Flag(_Kind):
    def read(self, value, key):
        if not isinstance(value, bool):
            raise UsageError(f"{key} = {value!r}: expected true or false")
        return value


class _Text(_Kind):
    def __init__(self, check=None):
        self._check = check

    def read(self, value, key):
        if not isinstance(value, str) or not value.strip():
            raise UsageError(f"{key} = {value!r}: expected a non-empty string")
        if self._check is not None:
            try:
                self._check(value)
            except UnitError as exc:
                raise UsageError(f"{key} = {value!r}: {exc}") from None
        return value


class _Qualities(_Kind):
    def read(self, value, key):
        known = tuple(q.value for q in Quality if q is not Quality.OK)
        if not isinstance(value, list) or not value or any(item not in known for item in value):
            raise UsageError(f"{key} = {value!r}: expected a non-empty list drawn from {', '.join(known)}")
        return list(dict.fromkeys(value))


class _Signed(_Kind):
    """A plain number, negative too (an acentric factor may be)."""

    def read(self, value, key):
        return _number(value, key, "a plain number")


_DURATION_KIND = _Quantity("s", _parse_duration, "90 s")
_KELVIN = _Quantity("K", parse_temperature_difference, "2 K")
_PLAIN = _Quantity("", float, "0.05")
_COMMON = {"enabled": _Flag(), "priority": _Choice(PRIORITIES), "on_delay": _DURATION_KIND, "off_delay": _DURATION_KIND}


def _margin_keys(limit: _Kind) -> dict[str, _Kind]:
    return _COMMON | {
        "limit": limit,
        "deadband": limit,
        "horizon": _DURATION_KIND,
        "horizon_deadband": _DURATION_KIND,
        "trend_priority": _Choice(PRIORITIES),
    }


#: condition name -> its keys (the conditions themselves are in tui.monitor.conditions)
CONDITION_KEYS: dict[str, dict[str, _Kind]] = {
    "saturation-temperature": _margin_keys(_KELVIN),
    "saturation-pressure": _margin_keys(_PressureOrPercent()),
    "two-phase": dict(_COMMON),
    "solid-approach": _margin_keys(_KELVIN),
    "near-critical": _margin_keys(_PLAIN),
    "out-of-range": dict(_COMMON),
    "sensor-quality": _COMMON | {"qualities": _Qualities()},
    "phase-change": {"enabled": _Flag(), "hold": _DURATION_KIND},
}

#: section -> key -> kind, for everything but the conditions
SECTION_KEYS: dict[str, dict[str, _Kind]] = {
    "units": {
        "pressure": _Text(PressureUnit.from_text),
        "temperature": _Text(TemperatureUnit.from_text),
        "atmosphere": _Text(parse_atmosphere),
    },
    "gauge": {
        "pressure_uncertainty": _Quantity("Pa", parse_pressure_difference, "0.05 bar"),
        "pressure_uncertainty_fraction": _Fraction(),
        "temperature_uncertainty": _KELVIN,
    },
    "trend": {"window": _DURATION_KIND, "bins": _Count(3)},
    "flood": {"alarms": _Count(1), "window": _DURATION_KIND, "end_alarms": _Count(1)},
    "shelve": {"default_duration": _DURATION_KIND, "max_duration": _DURATION_KIND},
    # a fluid not built in (Peng-Robinson with Lee-Kesler vapor pressure, approximate): the keys
    # of `rigside fluids`' --custom and --fluid-file; a run log records them in SI
    "custom-fluid": {
        "name": _Text(),
        "Tc": _Quantity("K", parse_temperature, "425.1 K"),
        "pc": _Quantity("Pa", parse_pressure, "37.96 bar"),
        "omega": _Signed(),
        "M": _Quantity("kg/mol", parse_molar_mass, "58.12 g/mol"),
        "Tt": _Quantity("K", parse_temperature, "134.9 K"),
    },
}
#: the keys a custom fluid must have
CUSTOM_REQUIRED = ("Tc", "pc", "omega", "M")


# ---------------------------------------------------------------------------------------------
# the typed configuration the monitor uses


@dataclass(frozen=True, slots=True)
class ConditionSettings:
    """One condition's settings, in SI (limits in the condition's unit, times in s)."""

    name: str
    enabled: bool
    priority: str = ""
    on_delay_s: float = 0.0
    off_delay_s: float = 0.0
    limit: float = math.nan
    deadband: float = 0.0
    relative: bool = False
    """Limit and deadband are fractions of the saturation pressure (saturation-pressure only)."""
    horizon_s: float = 0.0
    horizon_deadband_s: float = 0.0
    trend_priority: str = ""
    qualities: tuple[str, ...] = ()
    hold_s: float = 0.0


@dataclass(frozen=True, slots=True)
class MonitorConfig:
    """The effective configuration of one monitor."""

    fluid: str
    pressure_unit: PressureUnit
    temperature_unit: TemperatureUnit
    u_pressure_Pa: float
    """Standard uncertainty of a pressure reading, absolute part [Pa]."""
    u_pressure_fraction: float
    """... plus this fraction of the reading [-]."""
    u_temperature_K: float
    trend_window_s: float
    trend_bins: int
    flood_alarms: int
    flood_window_s: float
    flood_end_alarms: int
    default_shelve_s: float
    max_shelve_s: float
    conditions: Mapping[str, ConditionSettings]
    effective: Mapping
    """The normalised tree (SI numbers), for printing and for run-log metadata."""
    origin: str = "defaults"
    """Where the person's layer came from: a path, or "defaults"."""
    layer: Mapping = field(default_factory=dict)
    """The person's layer as read (file or recorded tree), for rebuilding with another fluid."""
    thermo_fluid: object = None
    """The thermo fluid: the built-in one `fluid` names, or the custom (approximate) one."""

    def for_fluid(self, name: str) -> MonitorConfig:
        """The same configuration for another fluid (with that fluid's suited values)."""
        return config_from_tree(dict(self.layer), self.origin, fluid=name)

    def to_toml(self) -> str:
        """The effective configuration as TOML, each normalised number with its unit."""
        return to_toml(self.effective, _units_of)

    def to_json(self) -> dict:
        """A JSON-safe copy of the effective tree (for run-log metadata)."""
        return json.loads(dumps(self.effective))


def load_config(path: str | os.PathLike | None = None, *, fluid=None, fallback_fluid=None) -> MonitorConfig:
    """The effective configuration: defaults, fluid-suited values, the file at `path`, then `fluid`.

    `fluid` and `fallback_fluid` are a fluid's name or a thermo fluid (a custom one is
    recorded in the configuration's `custom-fluid` table). `fallback_fluid` (e.g. the fluid a
    scenario or a replayed log names) applies when neither `fluid` nor the file names one.
    Raises UsageError with a one-line message naming the file and key for any bad input.
    """
    own = _read_file(path) if path is not None else {}
    return config_from_tree(own, str(path) if path is not None else "defaults", fluid=fluid, fallback_fluid=fallback_fluid)


def config_from_tree(own: dict, where: str, *, fluid: str | None = None, fallback_fluid: str | None = None) -> MonitorConfig:
    """`load_config` for a tree already read, e.g. the effective configuration a run log recorded
    (its numbers are SI, which every key accepts); `where` names it in messages."""
    defaults = tomllib.loads(default_text())
    try:
        _check_tree(own, "")
        names_fluid = "fluid" in own or "custom-fluid" in own
        own = _with_fluid(own, fluid if fluid is not None else None if names_fluid else fallback_fluid)
        custom = "custom-fluid" in own
        chosen = _custom_name(own) if custom else own.get("fluid") or defaults["fluid"]
        layers = [
            _without_fluid_defaults(defaults),
            {} if custom else _fluid_layer(defaults, chosen),
            {} if custom else _fluid_layer(own, chosen),
            _without_fluid_defaults(own),
            {"fluid": chosen},
        ]
        effective = _normalise(_merge(layers))
        return _build(effective, where, own)
    except UsageError as exc:
        raise UsageError(f"configuration {where}: {exc}") from None


def _with_fluid(own: dict, fluid) -> dict:
    """The person's layer with `fluid` (a name or a thermo fluid; None: as it is) chosen:
    a name replaces any custom fluid, a custom fluid goes in as its `custom-fluid` table."""
    if fluid is None:
        return own
    rest = {key: value for key, value in own.items() if key not in ("fluid", "custom-fluid")}
    if getattr(fluid, "approximate", False):
        return rest | {"custom-fluid": custom_fluid_table(fluid)}
    return rest | {"fluid": getattr(fluid, "key", fluid)}


def custom_fluid_table(fluid) -> dict:
    """A custom (approximate) thermo fluid's constants, in SI, as a `custom-fluid` table."""
    table = {"name": fluid.key, "Tc": fluid.critical.T, "pc": fluid.critical.p, "omega": fluid.eos.omega,
             "M": fluid.molar_mass}
    known_solid = not isinstance(fluid.solid.melting, MissingCurve)  # a triple point was given
    return table | ({"Tt": fluid.triple.T} if known_solid else {})


def _custom_name(own: dict) -> str:
    """The custom fluid's name; a `fluid` key beside `custom-fluid` must agree with it."""
    table = own["custom-fluid"]
    missing = [key for key in CUSTOM_REQUIRED if key not in table]
    if missing:
        raise UsageError(f"custom-fluid: missing {', '.join(missing)} (keys: {', '.join(SECTION_KEYS['custom-fluid'])})")
    name = table.get("name", "custom fluid")
    if own.get("fluid", name) != name:
        raise UsageError(f"fluid = {own['fluid']!r} and custom-fluid.name = {name!r}: name one fluid")
    return name


def named_fluid(tree: Mapping):
    """The fluid a configuration tree names (e.g. the one a run log recorded): the thermo
    custom fluid of its `custom-fluid` table, else its `fluid` name, else None."""
    table = tree.get("custom-fluid")
    if table is None:
        return tree.get("fluid") if isinstance(tree.get("fluid"), str) else None
    try:
        _check_section(table, "custom-fluid", SECTION_KEYS, "custom-fluid")
        _custom_name({"custom-fluid": table})
    except UsageError as exc:
        raise UsageError(f"recorded configuration: {exc}") from None
    kinds = SECTION_KEYS["custom-fluid"]
    return _custom_fluid({key: kinds[key].read(value, key) for key, value in table.items()})


def _custom_fluid(table: Mapping):
    """The thermo fluid of a normalised `custom-fluid` table."""
    import thermo

    try:
        return thermo.custom_fluid(table.get("name", "custom fluid"), table["Tc"], table["pc"], table["omega"],
                                   table["M"], table.get("Tt"))
    except ValueError as exc:
        raise UsageError(f"custom-fluid: {exc}") from None


def _read_file(path) -> dict:
    try:
        with open(path, "rb") as handle:
            return tomllib.load(handle)
    except tomllib.TOMLDecodeError as exc:
        raise UsageError(f"configuration {path}: not valid TOML ({exc})") from None
    except FileNotFoundError:
        raise UsageError(f"configuration {path}: no such file") from None


def _check_tree(tree: dict, prefix: str) -> None:
    """Every key known and every value of its kind (also inside fluid-defaults)."""
    for key, value in tree.items():
        if key == "fluid" and not prefix:
            _Text().read(value, "fluid")
        elif key == "fluid-defaults" and not prefix:
            for name, fragment in _table(value, key).items():
                inner = _table(fragment, f"{key}.{name}")
                if {"fluid", "fluid-defaults", "custom-fluid"} & set(inner):
                    raise UsageError(f"{key}.{name}: may not set fluid, fluid-defaults or custom-fluid")
                _check_tree(inner, f"{key}.{name}.")
        elif key == "conditions":
            for name, settings in _table(value, f"{prefix}{key}").items():
                _check_section(settings, f"{prefix}{key}.{name}", CONDITION_KEYS, name)
        elif key in SECTION_KEYS:
            _check_section(value, f"{prefix}{key}", SECTION_KEYS, key)
        else:
            known = ", ".join(["fluid", *SECTION_KEYS, "conditions", "fluid-defaults"])
            raise UsageError(f"unknown key {prefix}{key!s}; top-level keys are {known}")


def _check_section(value, where: str, schema: dict, name: str) -> None:
    if name not in schema:
        raise UsageError(f"unknown key {where}; known names are {', '.join(schema)}")
    kinds = schema[name]
    for key, item in _table(value, where).items():
        if key not in kinds:
            raise UsageError(f"unknown key {where}.{key}; known keys are {', '.join(kinds)}")
        kinds[key].read(item, f"{where}.{key}")


def _table(value, where: str) -> dict:
    if not isinstance(value, dict):
        raise UsageError(f"{where} must be a table, not {value!r}")
    return value


def _without_fluid_defaults(tree: dict) -> dict:
    return {key: value for key, value in tree.items() if key != "fluid-defaults"}


def _fluid_layer(tree: dict, chosen: str) -> dict:
    """The fluid-defaults fragment of `tree` that belongs to the chosen fluid (or {})."""
    target = _canonical_fluid(chosen)
    for name, fragment in tree.get("fluid-defaults", {}).items():
        if _canonical_fluid(name) == target:
            return fragment
    return {}


def _canonical_fluid(name: str) -> str:
    import thermo

    try:
        return thermo.fluid(name).name
    except ValueError as exc:
        raise UsageError(f"fluid {name!r}: {exc}") from None


def _merge(layers: list[dict]) -> dict:
    merged: dict = {}
    for layer in layers:
        _merge_into(merged, layer)
    return merged


def _merge_into(target: dict, layer: dict) -> None:
    for key, value in layer.items():
        if isinstance(value, dict):
            _merge_into(target.setdefault(key, {}), value)
        else:
            target[key] = value


def _normalise(tree: dict) -> dict:
    out = {"fluid": tree["fluid"]}
    for section, kinds in SECTION_KEYS.items():
        given = tree.get(section, {})
        out[section] = {key: kinds[key].read(given[key], f"{section}.{key}") for key in kinds if key in given}
    if not out["custom-fluid"]:
        del out["custom-fluid"]
    out["conditions"] = {}
    for name, kinds in CONDITION_KEYS.items():
        given = tree["conditions"][name]
        where = f"conditions.{name}"
        out["conditions"][name] = {key: kinds[key].read(given[key], f"{where}.{key}") for key in kinds if key in given}
    return out


def _units_of(path: tuple[str, ...]) -> str:
    """Unit comment for the normalised value at `path` in the effective tree."""
    if path[0] == "conditions":
        kind = CONDITION_KEYS[path[1]].get(path[2])
    else:
        kind = SECTION_KEYS.get(path[0], {}).get(path[1]) if len(path) > 1 else None
    return kind.unit if kind is not None else ""


def _build(tree: dict, origin: str, layer: dict) -> MonitorConfig:
    units, gauge, trend, flood = tree["units"], tree["gauge"], tree["trend"], tree["flood"]
    atmosphere = parse_atmosphere(units["atmosphere"]) if "atmosphere" in units else STANDARD_ATMOSPHERE
    if flood["end_alarms"] > flood["alarms"]:
        raise UsageError(f"flood.end_alarms = {flood['end_alarms']} must not exceed flood.alarms = {flood['alarms']}")
    if tree["trend"]["window"] <= 0.0:
        raise UsageError("trend.window must be longer than 0 s")
    if not 0.0 < tree["shelve"]["default_duration"] <= tree["shelve"]["max_duration"]:
        raise UsageError("shelve.default_duration must be longer than 0 s and at most shelve.max_duration")
    return MonitorConfig(
        fluid=tree["fluid"],
        pressure_unit=PressureUnit.from_text(units["pressure"], atmosphere),
        temperature_unit=TemperatureUnit.from_text(units["temperature"]),
        u_pressure_Pa=gauge["pressure_uncertainty"],
        u_pressure_fraction=gauge["pressure_uncertainty_fraction"],
        u_temperature_K=gauge["temperature_uncertainty"],
        trend_window_s=trend["window"],
        trend_bins=trend["bins"],
        flood_alarms=flood["alarms"],
        flood_window_s=flood["window"],
        flood_end_alarms=flood["end_alarms"],
        default_shelve_s=tree["shelve"]["default_duration"],
        max_shelve_s=tree["shelve"]["max_duration"],
        conditions={name: _condition(name, settings) for name, settings in tree["conditions"].items()},
        effective=tree,
        origin=origin,
        layer=layer,
        thermo_fluid=_custom_fluid(tree["custom-fluid"]) if "custom-fluid" in tree else _builtin(tree["fluid"]),
    )


def _builtin(name: str):
    import thermo

    return thermo.fluid(name)


def _condition(name: str, given: dict) -> ConditionSettings:
    limit, deadband = given.get("limit", math.nan), given.get("deadband", 0.0)
    relative = isinstance(limit, str)
    if relative != isinstance(deadband, str):
        raise UsageError(f"conditions.{name}.deadband = {deadband!r}: give it in the same form as the limit ({limit!r})")
    if relative:
        limit, deadband = _parse_percent(limit), _parse_percent(deadband)
    return ConditionSettings(
        name=name,
        enabled=given["enabled"],
        priority=given.get("priority", ""),
        on_delay_s=given.get("on_delay", 0.0),
        off_delay_s=given.get("off_delay", 0.0),
        limit=limit,
        deadband=deadband,
        relative=relative,
        horizon_s=given.get("horizon", 0.0),
        horizon_deadband_s=given.get("horizon_deadband", 0.0),
        trend_priority=given.get("trend_priority", ""),
        qualities=tuple(given.get("qualities", ())),
        hold_s=given.get("hold", 0.0),
    )


# ---------------------------------------------------------------------------------------------
# writing TOML (tomllib reads only): enough for the effective tree of strings, numbers, lists


def to_toml(tree: Mapping, unit_of=lambda path: "") -> str:
    """`tree` as TOML: top-level values first, then one [table] per nested mapping of values."""
    lines: list[str] = []
    _write_table(tree, (), lines, unit_of)
    return "\n".join(lines).strip() + "\n"


def _write_table(table: Mapping, path: tuple[str, ...], lines: list[str], unit_of) -> None:
    values = {key: value for key, value in table.items() if not isinstance(value, Mapping)}
    if path and values:
        lines += ["", f"[{'.'.join(path)}]"]
    for key, value in values.items():
        unit = unit_of((*path, key))
        comment = f"  # {unit}" if unit and isinstance(value, float) else ""
        lines.append(f"{key} = {_toml_value(value)}{comment}")
    for key, value in table.items():
        if isinstance(value, Mapping):
            _write_table(value, (*path, key), lines, unit_of)


def _toml_value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        return "inf" if value == math.inf else repr(value)
    if isinstance(value, int):
        return str(value)
    if isinstance(value, list | tuple):
        return "[" + ", ".join(_toml_value(item) for item in value) + "]"
    return json.dumps(str(value), ensure_ascii=False)
