"""An in-memory source of known states, and the screen app over it with a frozen clock.

The source stands in for hardware (like a pty or loop:// would): it hands the monitor real
`Sample`s in one batch, then waits for stop. Everything downstream is the real pipeline.
"""

from __future__ import annotations

import threading

from tui.acquire.sample import Sample, SourceStatus
from tui.acquire.source import Counters, Source
from tui.monitor.config import load_config
from tui.screen.app import make_app
from tui.screen.session import Session

#: the frozen clock of the snapshot apps [s on the monotonic axis]: every sample is 0.0 s old
FROZEN_NOW = 1000.0
#: wall-clock time of the first sample [s since the epoch]: 2026-12-01 10:00:00 UTC
WALL_START = 1796119200.0


class MemorySource(Source):
    """Yields `states` [(T K, p Pa), ...] as samples `interval_s` apart, in one batch."""

    def __init__(self, states, *, interval_s: float = 0.5, description: str = "memory: known states"):
        self.description = description
        self.counters = Counters()
        n = len(states)
        self.samples = [
            Sample(FROZEN_NOW - (n - 1 - i) * interval_s, WALL_START + i * interval_s, p, T, raw=f"T={T} p={p}")
            for i, (T, p) in enumerate(states)
        ]

    def batches(self, stop: threading.Event):
        first = self.samples[0].t_monotonic if self.samples else FROZEN_NOW
        yield [SourceStatus(first, WALL_START, "connected")] + self.samples
        self.counters.lines = len(self.samples)
        stop.wait()


def memory_app(states, *, fluid: str = "CO2", recorder=None, **units):
    """The real app over `states`, with the monitor's default configuration for `fluid`."""
    from tui.monitor.pipeline import Monitor

    session = Session(MemorySource(states), load_config(fluid=fluid), make_monitor=Monitor,
                      recorder=recorder, clock=lambda: FROZEN_NOW)
    return make_app(session, **units)
