"""Gauge profiles: a TOML file describes a gauge's wire protocol, so no gauge needs code.

A profile says how lines end, whether the gauge must be polled, how to pull pressure and
temperature out of a line (a regular expression with named groups, or delimited fields),
each value's unit, gauge or absolute pressure, linear scaling of raw counts or 4-20 mA
(with the NAMUR NE 43 failure limits), the span and resolution the validator checks,
Modbus registers, and which device carries which quantity when there are two. Keys:

    name = "..."                      description = "..."
    terminator = "\\r\\n"               # default: any of CR, LF, CRLF
    encoding = "ascii"                # default utf-8 (bad bytes are replaced, never fatal)
    emit = "P{pressure:.3f} T{temperature:.2f}"   # how the virtual gauge speaks this profile
    [serial]   baudrate, bytesize, parity ("N" "E" "O" "M" "S"), stopbits (1, 1.5, 2)
    [poll]     command, interval_s, reply_timeout_s
    [extract]  regex = '...(?P<pressure>...)...(?P<temperature>...)'   (optional groups
               pressure_unit, temperature_unit) | delimiter = ",", pressure_field = 0,
               temperature_field = 1 (0-based)
    [pressure] / [temperature]  unit, gauge (pressure only), span = [lo, hi], resolution,
               rate_limit (unit/s), signal = "mA" | "counts", raw = [lo, hi], value = [lo, hi],
               register, register_type ("holding" | "input"), data_type
    [modbus]   unit (device id), interval_s, timeout_s, byte_order, word_order ("big" | "little")
    [validate] stale_after_s, stuck_after_s
    [devices.pressure] / [devices.temperature]  a profile of its own (plus `port`) per device
    [pairing]  tolerance_s

Every problem is reported as one `UsageError` line naming the file and the key.
"""

from __future__ import annotations

import re
import string
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

from tui.acquire.toml_table import TomlTable, parse_toml, read_toml_text

PARITIES = ("N", "E", "O", "M", "S")
DATA_TYPES = ("int16", "uint16", "int32", "uint32", "float32", "float64")
REGISTER_TYPES = ("holding", "input")
ORDERS = ("big", "little")
QUANTITIES = ("pressure", "temperature")


@dataclass(frozen=True)
class Register:
    """Where a Modbus transmitter keeps one value."""

    address: int
    kind: str = "holding"
    data_type: str = "float32"

    @property
    def count(self) -> int:
        """Number of 16-bit registers the value spans."""
        return {"int16": 1, "uint16": 1, "int32": 2, "uint32": 2, "float32": 2, "float64": 4}[self.data_type]


@dataclass(frozen=True)
class Quantity:
    """How one quantity (pressure or temperature) is carried, scaled and checked.

    Span, resolution and rate limit are in `unit` (engineering units after scaling).
    """

    unit: str | None = None
    gauge: bool = False
    span: tuple[float, float] | None = None
    resolution: float = 0.0
    rate_limit: float | None = None
    raw: tuple[float, float] | None = None
    value: tuple[float, float] | None = None
    current_loop: bool = False
    field: int | None = None
    register: Register | None = None

    @property
    def scaled(self) -> bool:
        return self.raw is not None


@dataclass(frozen=True)
class Poll:
    """A gauge that answers only when asked."""

    command: bytes
    interval_s: float = 1.0
    reply_timeout_s: float = 0.5


@dataclass(frozen=True)
class Modbus:
    unit: int = 1
    interval_s: float = 0.5
    timeout_s: float = 1.0
    byte_order: str = "big"
    word_order: str = "big"


@dataclass(frozen=True)
class GaugeProfile:
    """A parsed, checked gauge profile (see the module docstring for the TOML keys)."""

    name: str = "generic"
    description: str = "labelled or bare pressure and temperature numbers, with or without units"
    origin: str = "built-in"
    terminator: bytes | None = None
    encoding: str = "utf-8"
    emit: str | None = None
    serial: dict[str, Any] = field(default_factory=dict)
    poll: Poll | None = None
    regex: re.Pattern | None = None
    delimiter: str | None = None
    pressure: Quantity = Quantity()
    temperature: Quantity = Quantity()
    modbus: Modbus | None = None
    stale_after_s: float | None = None
    stuck_after_s: float | None = None
    port: str | None = None
    devices: dict[str, GaugeProfile] = field(default_factory=dict)
    pair_tolerance_s: float = 0.5

    @property
    def is_generic(self) -> bool:
        """Lines are read by the built-in generic parser (no regex, no fields)."""
        return self.regex is None and self.delimiter is None

    def quantity(self, name: str) -> Quantity:
        return self.pressure if name == "pressure" else self.temperature


GENERIC = GaugeProfile()

_TOP_KEYS = {
    "name", "description", "terminator", "encoding", "emit", "serial", "poll", "extract",
    "pressure", "temperature", "modbus", "validate", "devices", "pairing", "port",
}
_DEVICE_KEYS = _TOP_KEYS - {"devices", "pairing", "modbus"}


def _quantity(reader: TomlTable, key: str) -> Quantity:
    allowed = {"unit", "span", "resolution", "rate_limit", "signal", "raw", "value", "field",
               "register", "register_type", "data_type"}
    if key == "pressure":
        allowed.add("gauge")
    q = reader.sub(key, allowed)
    unit = q.text("unit")
    if unit is not None:
        _check_unit(q, key, unit)
    signal = q.choice("signal", ("mA", "counts", None), None)
    raw, value = q.pair("raw"), q.pair("value")
    if signal == "mA" and raw is None:
        raw = (4.0, 20.0)
    if (raw is None) != (value is None):
        q.fail(f"[{q.where}] scaling needs both raw = [lo, hi] and value = [lo, hi]")
    register = None
    if "register" in q.table:
        register = Register(
            q.integer("register"),
            q.choice("register_type", REGISTER_TYPES, "holding"),
            q.choice("data_type", DATA_TYPES, "float32"),
        )
    resolution = q.number("resolution", 0.0)
    if resolution < 0:
        q.fail(f"{q.name('resolution')} must not be negative, got {resolution!r}")
    span = q.pair("span")
    return Quantity(
        unit=unit,
        gauge=q.flag("gauge") if key == "pressure" else False,
        span=(min(span), max(span)) if span else None,
        resolution=resolution,
        rate_limit=q.number("rate_limit", positive=True),
        raw=raw,
        value=value,
        current_loop=signal == "mA",
        field=q.integer("field", low=0, high=255),
        register=register,
    )


def _check_unit(reader: TomlTable, key: str, unit: str) -> None:
    from thermo.units import PressureUnit, TemperatureUnit, UnitError

    try:
        (PressureUnit if key == "pressure" else TemperatureUnit).from_text(unit)
    except UnitError as exc:
        reader.fail(f"{key}.unit: {exc}")


def _escape_bytes(reader: TomlTable, key: str, text: str | None) -> bytes | None:
    if text is None:
        return None
    if text == "":
        reader.fail(f"{reader.name(key)} must not be empty")
    try:
        return text.encode("latin-1")
    except UnicodeEncodeError:
        reader.fail(f"{reader.name(key)} must hold byte values only (\\u0000 to \\u00ff), got {text!r}")


def _check_emit(reader: TomlTable, template: str | None) -> None:
    """An emit template may only name {pressure} and {temperature}, with a float format."""
    if template is None:
        return
    try:
        parts = list(string.Formatter().parse(template))
        for _, name, spec, conversion in parts:
            if name is None:
                continue
            if name not in QUANTITIES or conversion:
                reader.fail(f"emit may only use {{pressure}} and {{temperature}}, got {{{name}}}")
            format(1.0, spec or "")
    except ValueError as exc:
        reader.fail(f"emit template {template!r}: {exc}")


def _profile(top: TomlTable, role: str | None) -> GaugeProfile:
    """One device's profile from its table; `role` names the one quantity it carries, if so."""
    serial = top.sub("serial", {"baudrate", "bytesize", "parity", "stopbits"})
    settings = {}
    if "baudrate" in serial.table:
        settings["baudrate"] = serial.integer("baudrate", low=50, high=10_000_000)
    if "bytesize" in serial.table:
        settings["bytesize"] = serial.choice("bytesize", (5, 6, 7, 8), 8)
    if "parity" in serial.table:
        settings["parity"] = serial.choice("parity", PARITIES, "N")
    if "stopbits" in serial.table:
        settings["stopbits"] = serial.choice("stopbits", (1, 1.5, 2), 1)

    poll = None
    if "poll" in top.table:
        p = top.sub("poll", {"command", "interval_s", "reply_timeout_s"})
        command = _escape_bytes(p, "command", p.text("command"))
        if command is None:
            p.fail("[poll] needs a command")
        poll = Poll(command, p.number("interval_s", 1.0, positive=True), p.number("reply_timeout_s", 0.5, positive=True))

    extract = top.sub("extract", {"regex", "delimiter", "pressure_field", "temperature_field"})
    pattern, delimiter = extract.text("regex"), extract.text("delimiter")
    if pattern is not None and delimiter is not None:
        extract.fail("[extract] takes either regex or delimiter, not both")
    wanted = (role,) if role else QUANTITIES
    regex = None
    if pattern is not None:
        try:
            regex = re.compile(pattern)
        except re.error as exc:
            extract.fail(f"extract.regex does not compile: {exc}")
        missing = [q for q in wanted if q not in regex.groupindex]
        if missing:
            extract.fail(f"extract.regex needs a named group (?P<{missing[0]}>...)")
    pressure, temperature = _quantity(top, "pressure"), _quantity(top, "temperature")
    if delimiter is not None:
        if delimiter == "":
            extract.fail("extract.delimiter must not be empty")
        fields = {q: extract.integer(f"{q}_field", low=0, high=255) for q in QUANTITIES}
        for q in wanted:
            if fields[q] is None:
                extract.fail(f"[extract] with a delimiter needs {q}_field (0-based)")
        pressure = replace(pressure, field=fields["pressure"])
        temperature = replace(temperature, field=fields["temperature"])

    modbus = None
    if "modbus" in top.table:
        m = top.sub("modbus", {"unit", "interval_s", "timeout_s", "byte_order", "word_order"})
        modbus = Modbus(
            m.integer("unit", 1, low=0, high=255),
            m.number("interval_s", 0.5, positive=True),
            m.number("timeout_s", 1.0, positive=True),
            m.choice("byte_order", ORDERS, "big"),
            m.choice("word_order", ORDERS, "big"),
        )
        for q, quantity in (("pressure", pressure), ("temperature", temperature)):
            if quantity.register is None:
                m.fail(f"[modbus] needs {q}.register (the register address)")

    checks = top.sub("validate", {"stale_after_s", "stuck_after_s"})
    emit = top.text("emit")
    _check_emit(top, emit)
    encoding = top.text("encoding", "utf-8")
    try:
        "".encode(encoding)
    except LookupError:
        top.fail(f"unknown encoding {encoding!r}")
    return GaugeProfile(
        name=top.text("name", "unnamed"),
        description=top.text("description", ""),
        origin=top.origin,
        terminator=_escape_bytes(top, "terminator", top.text("terminator")),
        encoding=encoding,
        emit=emit,
        serial=settings,
        poll=poll,
        regex=regex,
        delimiter=delimiter,
        pressure=pressure,
        temperature=temperature,
        modbus=modbus,
        stale_after_s=checks.number("stale_after_s", positive=True),
        stuck_after_s=checks.number("stuck_after_s", positive=True),
        port=top.text("port"),
    )


def parse_profile(text: str, origin: str = "<text>") -> GaugeProfile:
    """A profile from TOML text; any problem raises a one-line `UsageError`."""
    data = parse_toml(text, "profile", origin)
    top = TomlTable(data, "top", origin, _TOP_KEYS)
    if "devices" not in data:
        if "pairing" in data:
            top.fail("[pairing] needs [devices.pressure] and [devices.temperature]")
        return _profile(top, None)
    devices_table = top.sub("devices", set(QUANTITIES))
    devices = {}
    for role in QUANTITIES:
        if role not in devices_table.table:
            devices_table.fail(f"a two-device profile needs [devices.{role}]")
        devices[role] = _profile(devices_table.sub(role, _DEVICE_KEYS), role)
    pairing = top.sub("pairing", {"tolerance_s"})
    shared = {k: v for k, v in data.items() if k not in ("devices", "pairing")}
    profile = _profile(TomlTable(shared, "top", origin, _TOP_KEYS), None)
    return replace(profile, devices=devices, pair_tolerance_s=pairing.number("tolerance_s", 0.5, positive=True))


def load_profile(name_or_path: str | Path | None) -> GaugeProfile:
    """The built-in generic profile (None or 'generic'), or a profile file."""
    if name_or_path is None or str(name_or_path) == "generic":
        return GENERIC
    path = Path(name_or_path)
    return parse_profile(read_toml_text(path, "profile"), str(path))
