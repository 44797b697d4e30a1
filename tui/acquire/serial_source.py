"""Serial gauges through pyserial's `serial_for_url`: device paths, COM ports, socket://,
rfc2217:// and loop://, streaming or polled.

Reads what is waiting and splits lines itself (DESIGN §5: pyserial's `readline` manages
2.8 k lines/s over a pty, chunked reads 2.1 M lines/s). An unplugged adapter raises
`SerialException` and leaves the port "open": the source closes it, reports
"disconnected", reopens with backoff and reports "connected" again; the recorder notes the gap.
"""

from __future__ import annotations

import threading
import time
from collections.abc import Iterator

import serial
from serial.urlhandler import protocol_socket

from tui.acquire.lines import LineSplitter
from tui.acquire.options import SourceOptions
from tui.acquire.parse import make_parser
from tui.acquire.profile import GaugeProfile
from tui.acquire.source import WAKE_S, Backoff, Counters, Item, Source, one_line, status
from tui.errors import UsageError

DEFAULT_SERIAL = {"baudrate": 9600, "bytesize": 8, "parity": "N", "stopbits": 1}
_CHUNK = 1 << 16


def serial_settings(profile: GaugeProfile, options: SourceOptions) -> dict:
    """Baud, data bits, parity and stop bits: options over profile over 9600 8N1."""
    settings = DEFAULT_SERIAL | profile.serial
    for key in DEFAULT_SERIAL:
        if getattr(options, key) is not None:
            settings[key] = getattr(options, key)
    return settings


class SerialSource(Source):
    """One serial gauge; `role` ("pressure" or "temperature") when it carries one quantity only."""

    def __init__(self, url: str, profile: GaugeProfile, options: SourceOptions = SourceOptions(), role: str | None = None):
        self.url = url
        self.settings = serial_settings(profile, options)
        self.parser = make_parser(profile, options, role)
        self.splitter = LineSplitter(profile.terminator, profile.encoding)
        self.poll = profile.poll
        self.counters = Counters()
        s = self.settings
        # a raw TCP socket or loop:// has no line settings: naming them would mislead
        framing = f" {s['baudrate']} {s['bytesize']}{s['parity']}{s['stopbits']:g}"
        if url.startswith(("socket://", "loop://")):
            framing = ""
        asked = f", polled every {self.poll.interval_s:g} s" if self.poll else ""
        self.description = f"serial {url}{framing}, profile {profile.name}{asked}"
        self._timeout = min(WAKE_S, self.poll.reply_timeout_s / 2) if self.poll else WAKE_S
        self._next_poll = 0.0
        self._asked_at: float | None = None
        try:
            self.port = self._open()
        except (serial.SerialException, OSError, ValueError) as exc:
            raise UsageError(f"cannot open {url}: {self._reason(exc)}") from None

    def _reason(self, exc: BaseException) -> str:
        """pyserial's message without its 'could not open port URL: ' (the caller names the URL)."""
        return one_line(exc).split(f"{self.url}: ", 1)[-1]

    def _open(self) -> serial.SerialBase:
        return serial.serial_for_url(self.url, timeout=self._timeout, write_timeout=1.0, **self.settings)

    def batches(self, stop: threading.Event) -> Iterator[list[Item]]:
        yield [status("connected", self.description)]
        backoff = Backoff()
        while not stop.is_set():
            if self.port is None:
                if not backoff.wait(stop):
                    break
                try:
                    self.port = self._open()
                except (serial.SerialException, OSError, ValueError) as exc:
                    yield [status("reconnecting", f"{self.url}: {self._reason(exc)}")]
                    continue
                self.counters.reconnects += 1
                backoff.reset()
                yield [status("connected", self.description)]
                continue
            try:
                batch = self._read_batch()
            except (serial.SerialException, OSError) as exc:
                self._drop_port()
                yield [status("disconnected", f"{self.url}: {self._reason(exc)}")]
                continue
            if batch:
                yield batch
        self.close()

    def close(self) -> None:
        if self.port is not None:
            self.port.close()
            self.port = None

    def _drop_port(self) -> None:
        self.counters.dropped += self.splitter.reset()
        self._asked_at = None
        try:
            self.close()
        except (serial.SerialException, OSError):
            self.port = None

    def _read_batch(self) -> list[Item]:
        if self.poll:
            self._ask()
        data = self._read_chunk()
        if not data:
            return []
        c = self.counters
        c.bytes += len(data)
        lines = self.splitter.feed(data)
        c.dropped = self.splitter.discarded_bytes
        if not lines:
            return []
        self._asked_at = None
        samples = self.parser.parse(lines, time.monotonic(), time.time())
        c.lines += len(lines)
        c.malformed = self.parser.malformed
        return samples

    def _read_chunk(self) -> bytes:
        """What is waiting, or what arrives within the timeout (b'' if nothing)."""
        port = self.port
        if isinstance(port, protocol_socket.Serial):
            # socket:// reports only readable or not: read what is there without waiting
            data = port.read(1)
            if data:
                port.timeout = 0
                try:
                    data += port.read(_CHUNK)
                finally:
                    port.timeout = self._timeout
            return data
        waiting = port.in_waiting
        if waiting:
            return port.read(waiting)
        data = port.read(1)
        if data and port.in_waiting:
            data += port.read(port.in_waiting)
        return data

    def _ask(self) -> None:
        """Send the poll command when due; count a reply that did not come in time."""
        now = time.monotonic()
        if self._asked_at is not None and now - self._asked_at > self.poll.reply_timeout_s:
            self.counters.timeouts += 1
            self._asked_at = None
        if now >= self._next_poll:
            if self._asked_at is not None:
                self.counters.timeouts += 1
            self.port.write(self.poll.command)
            self._asked_at = now
            self._next_poll = now + self.poll.interval_s
