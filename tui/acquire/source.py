"""What every source shares: counters, status reports, the blocking iteration contract, backoff."""

from __future__ import annotations

import threading
import time
from collections.abc import Iterator
from dataclasses import dataclass

from tui.acquire.sample import Sample, SourceStatus

#: a blocking source wakes at least this often to notice `stop` [s]
WAKE_S = 0.2

Item = Sample | SourceStatus


@dataclass
class Counters:
    """Running totals a source keeps; read them at any time from any thread."""

    lines: int = 0
    """Records received (lines, register reads or log rows), good and malformed."""
    malformed: int = 0
    """Records that could not be read (each is recorded as a failure sample with its reason)."""
    dropped: int = 0
    """Bytes thrown away: unfinished lines at a disconnect, overlong noise without a line end."""
    reconnects: int = 0
    bytes: int = 0
    timeouts: int = 0
    """Polls left unanswered within the reply timeout."""


def status(state: str, message: str = "") -> SourceStatus:
    return SourceStatus(time.monotonic(), time.time(), state, message)


def one_line(exc: BaseException) -> str:
    """An exception as one line for people."""
    text = str(exc).strip().splitlines()
    return text[0] if text else type(exc).__name__


class Source:
    """A producer of Samples and SourceStatus reports.

    `batches(stop)` yields lists in arrival order (a chunk of lines, a register read, a block
    of log rows) and returns when `stop` is set or the source ends; `iter(stop)` yields the
    same items one by one. Both block, waking at least every 0.2 s to honour `stop`.
    """

    description: str = ""
    counters: Counters

    def batches(self, stop: threading.Event) -> Iterator[list[Item]]:
        raise NotImplementedError

    def iter(self, stop: threading.Event) -> Iterator[Item]:
        for batch in self.batches(stop):
            yield from batch

    def close(self) -> None:
        """Release the port, socket or file (iteration also releases it when it ends)."""


class Backoff:
    """Growing waits between reconnection attempts: 0.5 s, 1 s, 2 s ... up to `longest`."""

    def __init__(self, first: float = 0.5, longest: float = 8.0):
        self.first, self.longest = first, longest
        self.delay = first

    def wait(self, stop: threading.Event) -> bool:
        """Sleep the current delay (waking at once on stop); False if stopped."""
        stopped = stop.wait(self.delay)
        self.delay = min(self.delay * 2.0, self.longest)
        return not stopped

    def reset(self) -> None:
        self.delay = self.first
