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
from tui.errors import UsageError

logging.getLogger("pymodbus").setLevel(logging.CRITICAL)


class RegisterServer:
    """Serves a profile's registers on HOST:PORT (port 0 picks a free one: see `port`)."""

    def __init__(self, profile: GaugeProfile, host: str = "127.0.0.1", port: int = 0):
        from pymodbus.server import ModbusTcpServer
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
        device = SimDevice(
            id=profile.modbus.unit,
            simdata=[SimData(0, count=top + 1, values=0, datatype=DataType.REGISTERS)],
            action=self._serve,
        )
        self._ready = threading.Event()
        self._host, self._requested_port = host, port
        self._server_class, self._device = ModbusTcpServer, device
        self._thread = threading.Thread(target=lambda: asyncio.run(self._main()), name="modbus-server", daemon=True)
        self._thread.start()
        if not self._ready.wait(10) or self.port is None:
            raise UsageError(f"cannot serve Modbus on {host}:{port}: {getattr(self, '_failure', 'timeout')}")

    async def _main(self) -> None:
        self.port = None
        self._loop = asyncio.get_running_loop()
        try:
            self._server = self._server_class(self._device, address=(self._host, self._requested_port))
            serving = asyncio.ensure_future(self._server.serve_forever())
            while self._server.transport is None and not serving.done():
                await asyncio.sleep(0.01)
            self.port = self._server.transport.sockets[0].getsockname()[1] if self._server.transport else None
        except OSError as exc:
            self._failure = exc.strerror
            serving = None
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
        if self.port is not None:
            asyncio.run_coroutine_threadsafe(self._server.shutdown(), self._loop).result(5)
            self.port = None
        self._thread.join(5)
