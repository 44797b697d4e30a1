"""A Modbus TCP transmitter of our own on pymodbus's server: the virtual gauge's Modbus voice,
and the device the Modbus tests read (no mock: real frames over a real socket).

Registers are laid out as the profile says (address, data type, byte and word order, scaling);
`update(p, T)` sets the values every later read returns.
"""

from __future__ import annotations

import asyncio
import logging
import threading

from tui.acquire.options import SourceOptions
from tui.acquire.parse import quantity_channel
from tui.acquire.profile import GaugeProfile
from tui.acquire.registers import encode
from tui.acquire.serial_source import serial_settings
from tui.errors import UsageError

logging.getLogger("pymodbus").setLevel(logging.CRITICAL)


class RegisterServer:
    """Serves a profile's registers over Modbus TCP on HOST:PORT (port 0 picks a free one: see
    `port`), or over Modbus RTU on the serial `device` (settings from the profile)."""

    def __init__(self, profile: GaugeProfile, host: str = "127.0.0.1", port: int = 0, *, device: str | None = None):
        from pymodbus.simulator import DataType, SimData, SimDevice

        if profile.modbus is None:
            raise UsageError(f"profile {profile.origin} has no [modbus] section")
        self.profile = profile
        self._maps = {}
        for kind in ("pressure", "temperature"):
            channel = quantity_channel(kind, profile.quantity(kind), SourceOptions())
            if isinstance(channel, str):
                raise UsageError(f"profile {profile.origin}: {channel}")
            self._maps[kind] = channel.to_si.inverse()
        top = max(q.register.address + q.register.count for q in (profile.pressure, profile.temperature))
        self._words: dict[int, int] = {}
        self._simulated = SimDevice(
            id=profile.modbus.unit,
            simdata=[SimData(0, count=top + 1, values=0, datatype=DataType.REGISTERS)],
            action=self._serve,
        )
        self.port: int | None = None
        self._where = device or f"{host}:{port}"
        self._ready = threading.Event()
        self._failure = "no answer within 10 s"
        main = self._main(host, port, device)
        self._thread = threading.Thread(target=asyncio.run, args=(main,), name="modbus-server", daemon=True)
        self._thread.start()
        if not self._ready.wait(10) or self._server is None:
            raise UsageError(f"cannot serve Modbus on {self._where}: {self._failure}")

    def _make_server(self, host: str, port: int, device: str | None):
        from pymodbus import FramerType
        from pymodbus.server import ModbusSerialServer, ModbusTcpServer

        if device is None:
            return ModbusTcpServer(self._simulated, address=(host, port))
        settings = serial_settings(self.profile, SourceOptions())
        return ModbusSerialServer(self._simulated, framer=FramerType.RTU, port=device, **settings)

    async def _main(self, host: str, port: int, device: str | None) -> None:
        self._server, serving = None, None
        self._loop = asyncio.get_running_loop()
        try:
            server = self._make_server(host, port, device)
            serving = asyncio.ensure_future(server.serve_forever())
            while server.transport is None and not serving.done():
                await asyncio.sleep(0.01)
            if server.transport is not None:
                self._server = server
                sockets = getattr(server.transport, "sockets", None)
                self.port = sockets[0].getsockname()[1] if sockets else None
        except OSError as exc:
            self._failure = exc.strerror or str(exc)
        finally:
            self._ready.set()
        if serving is not None:
            await serving

    async def _serve(self, function_code, start, address, count, registers, set_values):
        for at, word in self._words.items():
            registers[at - start] = word
        return None

    def update(self, pressure_Pa: float, temperature_K: float) -> None:
        """Set the values (SI) that the next reads return."""
        m = self.profile.modbus
        words = {}
        for kind, value in (("pressure", pressure_Pa), ("temperature", temperature_K)):
            register = self.profile.quantity(kind).register
            back = self._maps[kind]
            raw = value * back.scale + back.offset
            for i, word in enumerate(encode(raw, register.data_type, m.byte_order, m.word_order)):
                words[register.address + i] = word
        self._words = words

    def close(self) -> None:
        if self._server is not None:
            asyncio.run_coroutine_threadsafe(self._server.shutdown(), self._loop).result(5)
            self._server = None
        self._thread.join(5)
