"""Modbus TCP and RTU transmitters through pymodbus (the maintained Modbus stack for Python).

SPEC: `modbus-tcp://HOST[:PORT]` (default port 502) or `modbus-rtu://DEVICE` (serial settings
from the profile or options); `?unit=N` sets the device id. The profile's [modbus] section
and the `register` keys of [pressure] and [temperature] say where the values are, their data
type, byte and word order, and their scaling. A lost connection is reported, retried with
backoff and resumed, as for serial gauges.
"""

from __future__ import annotations

import logging
import math
import threading
import time
from collections.abc import Iterator
from urllib.parse import parse_qs, urlsplit

from tui.acquire.options import SourceOptions
from tui.acquire.parse import quantity_channel
from tui.acquire.profile import GaugeProfile
from tui.acquire.registers import decode
from tui.acquire.sample import Quality, Sample
from tui.acquire.serial_source import serial_settings
from tui.acquire.source import WAKE_S, Backoff, Counters, Item, Source, one_line, status
from tui.errors import UsageError

# pymodbus logs every failed request itself; this source reports them in its status instead
logging.getLogger("pymodbus").setLevel(logging.CRITICAL)


class ModbusSource(Source):
    def __init__(self, spec: str, profile: GaugeProfile, options: SourceOptions = SourceOptions()):
        try:
            from pymodbus.client import ModbusSerialClient, ModbusTcpClient
        except ModuleNotFoundError:
            raise UsageError("Modbus needs pymodbus: pip install 'rigside[modbus]'") from None
        if profile.modbus is None:
            raise UsageError(
                f"a Modbus source needs a profile with a [modbus] section and register addresses (profile: {profile.origin})"
            )
        self.profile, self.config = profile, profile.modbus
        url = urlsplit(spec)
        query = parse_qs(url.query)
        try:
            default = options.modbus_unit if options.modbus_unit is not None else self.config.unit
            self.unit = int(query["unit"][0]) if "unit" in query else default
        except ValueError:
            raise UsageError(f"{spec}: unit must be a whole number") from None
        self.channels = {}
        for kind in ("pressure", "temperature"):
            channel = quantity_channel(kind, profile.quantity(kind), options)
            if isinstance(channel, str):
                raise UsageError(f"profile {profile.origin}: {channel}")
            self.channels[kind] = channel
        timeout = self.config.timeout_s
        if url.scheme.lower() == "modbus-tcp":
            if not url.hostname:
                raise UsageError(f"{spec}: expected modbus-tcp://HOST[:PORT]")
            try:
                port = url.port or 502
            except ValueError:
                raise UsageError(f"{spec}: the port must be a number") from None
            self.client = ModbusTcpClient(url.hostname, port=port, timeout=timeout, retries=0)
            where = f"{url.hostname}:{port}"
        else:
            device = (url.netloc + url.path) or ""
            if not device:
                raise UsageError(f"{spec}: expected modbus-rtu://DEVICE, e.g. modbus-rtu:///dev/ttyUSB0")
            s = serial_settings(profile, options)
            self.client = ModbusSerialClient(device, baudrate=s["baudrate"], bytesize=s["bytesize"], parity=s["parity"],
                                             stopbits=s["stopbits"], timeout=timeout, retries=0)
            where = device
        self.counters = Counters()
        self.where = f"modbus {where}"
        self.description = (
            f"Modbus {url.scheme[7:].upper()} {where} unit {self.unit}, every {self.config.interval_s:g} s, "
            f"profile {profile.name}"
        )
        if not self.client.connect():
            raise UsageError(f"cannot connect to {spec}")

    def batches(self, stop: threading.Event) -> Iterator[list[Item]]:
        from pymodbus.exceptions import ModbusException

        yield [status("connected", self.description)]
        backoff, connected, due = Backoff(), True, time.monotonic()
        while not stop.is_set():
            if not connected:
                if not backoff.wait(stop):
                    break
                if not self.client.connect():
                    yield [status("reconnecting", f"{self.where}: no answer")]
                    continue
                connected = True
                backoff.reset()
                self.counters.reconnects += 1
                yield [status("connected", self.description)]
                due = time.monotonic()
            left = due - time.monotonic()
            if left > 0:
                stop.wait(min(left, WAKE_S))
                continue
            due = max(due + self.config.interval_s, time.monotonic())
            try:
                sample = self._read()
            except (ModbusException, OSError) as exc:
                self.client.close()
                connected = False
                yield [status("disconnected", f"{self.where}: {one_line(exc)}")]
                continue
            yield [sample]
        self.close()

    def close(self) -> None:
        self.client.close()

    def _read(self) -> Sample:
        values, currents, dump, problems = {}, {}, [], []
        for kind in ("pressure", "temperature"):
            register = self.profile.quantity(kind).register
            read = self.client.read_holding_registers if register.kind == "holding" else self.client.read_input_registers
            reply = read(register.address, count=register.count, device_id=self.unit)
            prefix = "hr" if register.kind == "holding" else "ir"
            if reply.isError():
                code = getattr(reply, "exception_code", "?")
                problems.append(f"{kind} register {prefix}{register.address}: Modbus exception {code}")
                values[kind] = currents[kind] = math.nan
                continue
            words = list(reply.registers)
            dump.append(f"{kind} {prefix}{register.address}=" + " ".join(f"{w:04x}" for w in words))
            raw = decode(words, register.data_type, self.config.byte_order, self.config.word_order)
            channel = self.channels[kind]
            values[kind] = raw * channel.to_si.scale + channel.to_si.offset
            currents[kind] = raw if channel.current_loop else math.nan
        c = self.counters
        c.lines += 1
        c.bytes += 2 * sum(self.profile.quantity(k).register.count for k in ("pressure", "temperature"))
        now, wall = time.monotonic(), time.time()
        if problems:
            c.malformed += 1
            return Sample(now, wall, values["pressure"], values["temperature"], "; ".join(dump + problems),
                          Quality.FAILURE, tuple(f"malformed: {p}" for p in problems))
        return Sample(now, wall, values["pressure"], values["temperature"], "; ".join(dump),
                      pressure_mA=currents["pressure"], temperature_mA=currents["temperature"])
