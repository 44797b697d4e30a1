"""Acquisition: every source turns bytes, registers or log rows into `Sample`s. No Textual here.

    from tui.acquire import open_source, SourceOptions
    source = open_source("/dev/ttyUSB0", SourceOptions(pressure_unit="bar", temperature_unit="degC"))
    for item in source.iter(stop):          # Sample or SourceStatus, blocking, honours stop
        ...

SPEC is one of:
- a pyserial URL or device: `/dev/ttyUSB0`, `COM3`, `socket://host:port`, `rfc2217://host:port`, `loop://`
- `modbus-tcp://host[:port]` or `modbus-rtu://DEVICE` (registers from the profile's [modbus] section)
- a run log or CSV file to replay (pace from `options.speed`)
- `virtual:SCENARIO` (a scenario file or built-in name): the in-process virtual gauge
A two-device profile (or `options.temperature_port`) pairs a pressure and a temperature device.
"""

from __future__ import annotations

import os
import re
import stat
from pathlib import Path

from tui.acquire.options import SourceOptions, add_source_arguments
from tui.acquire.profile import GaugeProfile, load_profile
from tui.acquire.sample import Quality, Sample, SourceStatus
from tui.acquire.source import Counters, Source
from tui.errors import UsageError

__all__ = [
    "Counters", "GaugeProfile", "Quality", "Sample", "Source", "SourceOptions", "SourceStatus",
    "add_source_arguments", "load_profile", "open_source",
]

_URL = re.compile(r"^[a-z][a-z0-9+.-]*://", re.IGNORECASE)


def open_source(spec: str, options: SourceOptions = SourceOptions()) -> Source:
    """Open the source SPEC names (see the module docstring); a bad spec, port, profile or
    file raises a one-line `UsageError`."""
    spec = (spec or "").strip()
    if spec.startswith("virtual:"):
        from tui.acquire.virtual import VirtualGauge

        return VirtualGauge.open(spec.removeprefix("virtual:"), options)
    if spec.lower().startswith(("modbus-tcp://", "modbus-rtu://")):
        from tui.acquire.modbus_source import ModbusSource

        return ModbusSource(spec, load_profile(options.profile), options)
    profile = load_profile(options.profile)
    if profile.devices or options.temperature_port:
        from tui.acquire.pair import open_pair

        return open_pair(spec, profile, options)
    if not spec and profile.port:
        spec = profile.port
    if not spec:
        raise UsageError("no source given: name a serial port, URL, replay file or virtual:SCENARIO")
    if not _URL.match(spec) and _is_file(spec):
        from tui.acquire.replay import ReplaySource

        if spec.lower().endswith(".toml"):
            raise UsageError(f"{spec} is TOML, not a log to replay: play a scenario with virtual:{spec}")

        return ReplaySource(Path(spec), options)
    from tui.acquire.serial_source import SerialSource

    return SerialSource(spec, profile, options)


def _is_file(spec: str) -> bool:
    try:
        return stat.S_ISREG(os.stat(spec).st_mode)
    except OSError:
        return False
