"""The virtual gauge on a wire: a scenario spoken out of a pseudo-terminal or a TCP port on
127.0.0.1 (or served as Modbus registers), for `rigside simulate`.

Paced playback drops what a silent or slow reader does not take, as a real wire would; as
fast as possible (speed 0) waits for the reader instead, so nothing is lost in benchmarks.
A profile with a [poll] section makes the gauge answer its query instead of streaming.
"""

from __future__ import annotations

import math
import os
import select
import socket
import threading
import tty

from tui.acquire.pacer import Pacer
from tui.acquire.profile import GaugeProfile
from tui.acquire.scenario import SILENT, Scenario
from tui.acquire.source import WAKE_S
from tui.acquire.voice import Voice
from tui.errors import UsageError

#: samples rendered per write when playing as fast as possible
BATCH = 512


class PtyOutlet:
    """A pseudo-terminal pair: we write the master side; readers open `address` (the slave)."""

    def __init__(self):
        self.master, self.slave = os.openpty()
        tty.setraw(self.slave)  # no echo, no newline translation: the bytes as a gauge sends them
        os.set_blocking(self.master, False)
        self.address = os.ttyname(self.slave)
        self.dropped = 0

    def send(self, data: bytes, wait: bool, stop: threading.Event) -> None:
        view = memoryview(data)
        while view and not stop.is_set():
            try:
                view = view[os.write(self.master, view):]
            except BlockingIOError:
                if not wait:
                    break
                select.select([], [self.master], [], WAKE_S)
        self.dropped += len(view)

    def receive(self, timeout: float) -> list[tuple[object, bytes]]:
        ready, _, _ = select.select([self.master], [], [], timeout)
        if not ready:
            return []
        try:
            return [(None, os.read(self.master, 4096))]
        except OSError:
            return []

    def reply(self, client: object, data: bytes, stop: threading.Event) -> None:
        self.send(data, False, stop)

    def close(self) -> None:
        os.close(self.master)
        os.close(self.slave)


class NullModem:
    """Two pseudo-terminals wired back to back: what one end's program writes, the other's reads.

    For a device program that opens a serial port itself (the Modbus RTU server): it opens
    `device_end`, readers open `address`.
    """

    def __init__(self):
        pairs = [os.openpty(), os.openpty()]
        for _, slave in pairs:
            tty.setraw(slave)
        (self._a, self._a_slave), (self._b, self._b_slave) = pairs
        self.device_end, self.address = os.ttyname(self._a_slave), os.ttyname(self._b_slave)
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._relay, name="null-modem", daemon=True)
        self._thread.start()

    def _relay(self) -> None:
        other = {self._a: self._b, self._b: self._a}
        while not self._stop.is_set():
            ready, _, _ = select.select(list(other), [], [], WAKE_S)
            for fd in ready:
                try:
                    os.write(other[fd], os.read(fd, 4096))
                except OSError:
                    return

    def close(self) -> None:
        self._stop.set()
        self._thread.join(1)
        for fd in (self._a, self._a_slave, self._b, self._b_slave):
            os.close(fd)


class TcpOutlet:
    """A TCP server on `host:port` (port 0: any free one); every connected client gets the stream."""

    def __init__(self, port: int, host: str = "127.0.0.1"):
        try:
            self.listener = socket.create_server((host, port))
        except OSError as exc:
            raise UsageError(f"cannot listen on {host}:{port}: {exc.strerror}") from None
        self.listener.setblocking(False)
        self.clients: list[socket.socket] = []
        self.port = self.listener.getsockname()[1]
        self.address = f"socket://{host}:{self.port}"
        self.dropped = 0

    def _accept(self) -> None:
        while True:
            try:
                client, _ = self.listener.accept()
            except BlockingIOError:
                return
            client.setblocking(False)
            self.clients.append(client)

    def _drop(self, client: socket.socket) -> None:
        self.clients.remove(client)
        client.close()

    def send(self, data: bytes, wait: bool, stop: threading.Event) -> None:
        self._accept()
        while wait and not self.clients and not stop.is_set():
            select.select([self.listener], [], [], WAKE_S)
            self._accept()
        for client in list(self.clients):
            self.reply(client, data, stop, wait)

    def reply(self, client: socket.socket, data: bytes, stop: threading.Event, wait: bool = False) -> None:
        view = memoryview(data)
        while view and not stop.is_set():
            try:
                view = view[client.send(view):]
            except BlockingIOError:
                if not wait:
                    break
                select.select([], [client], [], WAKE_S)
            except OSError:
                self._drop(client)
                return
        self.dropped += len(view)

    def receive(self, timeout: float) -> list[tuple[object, bytes]]:
        self._accept()
        ready, _, _ = select.select([self.listener, *self.clients], [], [], timeout)
        out = []
        for sock in ready:
            if sock is self.listener:
                self._accept()
                continue
            try:
                data = sock.recv(4096)
            except OSError:
                data = b""
            if data:
                out.append((sock, data))
            else:
                self._drop(sock)
        return out

    def close(self) -> None:
        for client in list(self.clients):
            self._drop(client)
        self.listener.close()


class Simulator:
    """Plays `scenario` in `profile`'s voice (generic when None) out of `outlet`."""

    def __init__(self, scenario: Scenario, outlet, profile: GaugeProfile | None = None, speed: float = 1.0):
        self.scenario, self.outlet, self.profile = scenario, outlet, profile
        self.pacer = Pacer(speed)
        self.voice = Voice(scenario, profile) if outlet is not None else None
        """None when serving Modbus registers (no lines to speak)."""

    def run(self, stop: threading.Event) -> None:
        """Play until the scenario ends (never, if it loops) or `stop` is set."""
        if self.profile is not None and self.profile.poll is not None:
            self._answer(stop, self.profile.poll.command)
        else:
            self._stream(stop)

    def _stream(self, stop: threading.Event) -> None:
        s, fast = self.scenario, self.pacer.speed == math.inf
        k = 0
        while not stop.is_set() and (s.loop or k < s.samples):
            if not self.pacer.wait_until(k / s.rate_hz, stop):
                continue
            j = k + BATCH if fast else max(k + 1, min(int(self.pacer.due_now() * s.rate_hz) + 1, k + BATCH))
            data = b"".join(self.voice.lines(s.frames(k, j)))
            if data:
                self.outlet.send(data, fast, stop)
            k = j

    def _answer(self, stop: threading.Event, command: bytes) -> None:
        """A polled gauge: one line per query received, with the values due at that moment."""
        s, pending = self.scenario, {}
        while not stop.is_set() and (s.loop or self.pacer.due_now() <= s.duration):
            for client, data in self.outlet.receive(WAKE_S / 2):
                buffer = pending.get(client, b"") + data
                asked = buffer.count(command)
                if asked:
                    buffer = buffer[buffer.rfind(command) + len(command):]
                pending[client] = buffer[-len(command):]
                for _ in range(asked):
                    k = int(self.pacer.due_now() * s.rate_hz)
                    for line in self.voice.lines(s.frames(k, k + 1)):
                        self.outlet.reply(client, line, stop)

    def serve_registers(self, server, stop: threading.Event) -> None:
        """Modbus: keep `server`'s registers at the scenario's values (silent samples hold the last)."""
        s = self.scenario
        k = 0
        while not stop.is_set() and (s.loop or k < s.samples):
            if self.pacer.wait_until(k / s.rate_hz, stop):
                self.set_registers(server, k)
                k += 1

    def set_registers(self, server, k: int) -> None:
        """Put sample k's values in the registers (before serving starts, too)."""
        frames = self.scenario.frames(k, k + 1)
        if len(frames.t) and frames.kind[0] != SILENT:
            server.update(float(frames.pressure_Pa[0]), float(frames.temperature_K[0]))
