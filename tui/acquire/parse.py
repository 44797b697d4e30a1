"""Text lines -> Samples: the built-in generic parser and the profile-driven ones.

Per line the work is one compiled regular expression (or one split), two float conversions
and one multiply-add each; everything that depends only on a line's shape (its labels and
units) is worked out once and cached. A line that cannot be read becomes a `failure` sample
whose reason starts with "malformed:", so it is counted, recorded with its raw text and
never classified.
"""

from __future__ import annotations

import math
import re
from typing import NamedTuple

from thermo.units import UnitError
from tui.acquire.options import SourceOptions
from tui.acquire.profile import GaugeProfile, Quantity
from tui.acquire.sample import Quality, Sample
from tui.acquire.units import LinearMap, pressure_map, temperature_map
from tui.errors import UsageError

NAN = math.nan
#: raw text kept of a malformed line
RAW_KEEP = 200

_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
_LABEL = r"[A-Za-z][A-Za-z_]*"
_UNIT = r"[A-Za-z°µ\u2103\u2109][A-Za-z°()/2]*"


def _field(i: int) -> str:
    return rf"(?:(?P<l{i}>{_LABEL})\s*[:=]\s*)?(?P<v{i}>{_NUMBER})(?:\s*(?P<u{i}>{_UNIT}))?"


#: one or two values, each optionally labelled (p=, T:) and followed by a unit
GENERIC_LINE = re.compile(rf"^\s*{_field(1)}(?:(?:\s*[,;]\s*|\s+){_field(2)})?\s*[,;]?\s*$")

PRESSURE_LABELS = frozenset({"p", "pres", "press", "pressure"})
TEMPERATURE_LABELS = frozenset({"t", "temp", "temperature"})


class Channel(NamedTuple):
    """How the text of one value becomes SI: float(text) * scale + offset."""

    to_si: LinearMap
    current_loop: bool = False


def quantity_channel(kind: str, quantity: Quantity, options: SourceOptions) -> Channel | str:
    """The channel of a profile quantity, or the reason there is none (no unit known)."""
    override = options.pressure_unit if kind == "pressure" else options.temperature_unit
    unit = override or quantity.unit
    if unit is None:
        return f"no {kind} unit: give it in the profile or with --{kind}-unit"
    engineering = _unit_map(kind, unit, quantity.gauge or options.gauge, options.atmosphere_Pa)
    if quantity.scaled:
        (r0, r1), (v0, v1) = quantity.raw, quantity.value
        slope = (v1 - v0) / (r1 - r0)
        engineering = LinearMap(slope, v0 - r0 * slope).then(engineering)
    return Channel(engineering, quantity.current_loop)


def _unit_map(kind: str, unit: str, gauge: bool, atmosphere_Pa: float) -> LinearMap:
    if kind == "pressure":
        return pressure_map(unit, gauge=gauge, atmosphere_Pa=atmosphere_Pa)
    return temperature_map(unit)


def _number(text: str | None) -> float:
    try:
        return float(text)
    except (TypeError, ValueError):
        return NAN


class _Parser:
    """Shared by the parsers: the malformed counter and the sample for a line it cannot read."""

    def __init__(self) -> None:
        self.malformed = 0

    def malformed_sample(self, line: str, reason: str, t: float, t_wall: float) -> Sample:
        self.malformed += 1
        return Sample(t, t_wall, NAN, NAN, line[:RAW_KEEP], Quality.FAILURE, (f"malformed: {reason}",))


class GenericParser(_Parser):
    """Lines such as `p=12.345 bar T=21.3 degC`, `P:1.2345MPa;T:294.4K` or `12.345,21.3`.

    Labels (p, pres, pressure / T, temp, temperature) or units decide which value is which;
    unlabelled values without units are pressure then temperature, in the units of the
    options. `role` ("pressure" or "temperature") reads one quantity per line (two-device setups).
    """

    def __init__(self, options: SourceOptions = SourceOptions(), role: str | None = None):
        super().__init__()
        self.options = options
        self.role = role
        self._shapes: dict[tuple, tuple | str] = {}

    def parse(self, lines: list[str], t: float, t_wall: float) -> list[Sample]:
        match, shapes, out = GENERIC_LINE.match, self._shapes, []
        append = out.append
        for line in lines:
            m = match(line)
            if m is None:
                append(self.malformed_sample(line, "not a pressure/temperature record", t, t_wall))
                continue
            l1, v1, u1, l2, v2, u2 = m.groups()
            key = (l1, u1, l2, u2, v2 is None)
            shape = shapes.get(key)
            if shape is None:
                shape = shapes[key] = self._shape(key)
            if shape.__class__ is str:
                append(self.malformed_sample(line, shape, t, t_wall))
                continue
            pi, ps, po, ti, ts, to = shape
            values = (v1, v2)
            p = float(values[pi]) * ps + po if pi is not None else NAN
            temp = float(values[ti]) * ts + to if ti is not None else NAN
            append(Sample(t, t_wall, p, temp, line))
        return out

    def _shape(self, key: tuple) -> tuple | str:
        """(p index, p scale, p offset, T index, T scale, T offset), or why the line is malformed."""
        l1, u1, l2, u2, single = key
        fields = [(l1, u1)] if single else [(l1, u1), (l2, u2)]
        roles: list[str | None] = []
        for label, unit in fields:
            role = None
            if label is not None:
                low = label.lower()
                role = "pressure" if low in PRESSURE_LABELS else "temperature" if low in TEMPERATURE_LABELS else None
                if role is None:
                    return f"unknown label {label!r}"
            if unit is not None:
                kind = _unit_kind(unit)
                if kind is None:
                    return f"unknown unit {unit!r}"
                if role is not None and kind != role:
                    return f"{role} label {label!r} with {kind} unit {unit!r}"
                role = kind
            roles.append(role)
        free = [q for q in ((self.role,) if self.role else ("pressure", "temperature")) if q not in roles]
        for i, role in enumerate(roles):
            if role is None:
                if not free:
                    return "cannot tell which value is pressure and which temperature"
                roles[i] = free.pop(0)
        if len(set(roles)) < len(roles):
            return f"two {roles[0]} values"
        if self.role and roles != [self.role]:
            return f"expected one {self.role} value on this device"
        shape: list = [None, 1.0, 0.0, None, 1.0, 0.0]
        for i, (role, (_, unit)) in enumerate(zip(roles, fields)):
            unit = unit or (self.options.pressure_unit if role == "pressure" else self.options.temperature_unit)
            if unit is None:
                return f"no {role} unit: give it in the line or with --{role}-unit"
            scale, offset = _unit_map(role, unit, self.options.gauge, self.options.atmosphere_Pa)
            at = 0 if role == "pressure" else 3
            shape[at : at + 3] = [i, scale, offset]
        return tuple(shape)


def _unit_kind(unit: str) -> str | None:
    for kind, reader in (("pressure", pressure_map), ("temperature", temperature_map)):
        try:
            reader(unit)
            return kind
        except UnitError:
            pass
    return None


class ProfileParser(_Parser):
    """Lines read by a profile's regular expression (named groups) or delimited fields."""

    def __init__(self, profile: GaugeProfile, options: SourceOptions = SourceOptions(), role: str | None = None):
        super().__init__()
        self.profile, self.options = profile, options
        self.kinds = (role,) if role else ("pressure", "temperature")
        self.channels = {kind: quantity_channel(kind, profile.quantity(kind), options) for kind in self.kinds}
        self._unit_channels: dict[tuple[str, str], Channel | str] = {}

    def parse(self, lines: list[str], t: float, t_wall: float) -> list[Sample]:
        read = self._read_regex if self.profile.regex is not None else self._read_fields
        out = []
        for line in lines:
            texts = read(line)
            if texts.__class__ is str:
                out.append(self.malformed_sample(line, texts, t, t_wall))
                continue
            values, currents, problem = [NAN, NAN], [NAN, NAN], None
            for i, kind in enumerate(("pressure", "temperature")):
                text, unit = texts[i]
                if kind not in self.kinds:
                    continue
                channel = self._unit_channel(kind, unit) if unit else self.channels[kind]
                if channel.__class__ is str:
                    problem = channel
                    break
                raw = _number(text)
                values[i] = raw * channel.to_si.scale + channel.to_si.offset
                if channel.current_loop:
                    currents[i] = raw
            if problem:
                out.append(self.malformed_sample(line, problem, t, t_wall))
            else:
                out.append(Sample(t, t_wall, values[0], values[1], line,
                                  pressure_mA=currents[0], temperature_mA=currents[1]))
        return out

    def _read_regex(self, line: str) -> list | str:
        m = self.profile.regex.search(line)
        if m is None:
            return "does not match the profile's regex"
        groups = m.groupdict()
        return [(groups.get(kind), groups.get(f"{kind}_unit")) for kind in ("pressure", "temperature")]

    def _read_fields(self, line: str) -> list | str:
        parts = line.split(self.profile.delimiter)
        texts = []
        for kind in ("pressure", "temperature"):
            index = self.profile.quantity(kind).field
            if kind in self.kinds and index >= len(parts):
                return f"expected at least {index + 1} fields, found {len(parts)}"
            texts.append((parts[index] if kind in self.kinds else None, None))
        return texts

    def _unit_channel(self, kind: str, unit: str) -> Channel | str:
        """Channel for a unit written in the line (overrides the profile's unit, no scaling)."""
        channel = self._unit_channels.get((kind, unit))
        if channel is None:
            try:
                channel = Channel(_unit_map(kind, unit, self.options.gauge, self.options.atmosphere_Pa))
            except UnitError:
                channel = f"unknown {kind} unit {unit!r}"
            self._unit_channels[(kind, unit)] = channel
        return channel


def make_parser(profile: GaugeProfile, options: SourceOptions, role: str | None = None) -> GenericParser | ProfileParser:
    """The parser a profile asks for; a profile quantity without a unit is a `UsageError`."""
    if profile.is_generic:
        return GenericParser(options, role)
    parser = ProfileParser(profile, options, role)
    for channel in parser.channels.values():
        if isinstance(channel, str):
            raise UsageError(f"profile {profile.origin}: {channel}")
    return parser
