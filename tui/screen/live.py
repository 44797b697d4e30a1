"""What the screen shows, as one immutable `LiveView`, and the `LiveFeed` that builds it on the worker thread.

The worker hands every view to the screen whole (newer views replace older ones in the
message queue), so nothing is lost when views are skipped: the trail, the event log and
the counters are all cumulative. No Textual here.
"""

from __future__ import annotations

import math
import time
from collections import deque
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field, replace

import numpy as np

from tui.acquire.sample import SourceStatus
from tui.monitor.alarms import AlarmStatus
from tui.monitor.model import Event, Reading
from tui.screen.curves import Isotherm

#: recent classified samples kept for the diagram's trail
TRAIL_LENGTH = 240
#: events kept for the log panel (the run log keeps them all)
EVENT_LENGTH = 200
#: the sample rate is measured over this many recent samples (on the source's own time axis)
RATE_WINDOW = 64


@dataclass(frozen=True, slots=True)
class ReplayPosition:
    """Where a replay stands."""

    position_s: float
    duration_s: float
    speed: float
    paused: bool


@dataclass(frozen=True, slots=True)
class Recording:
    path: str
    bytes: int


@dataclass(frozen=True, slots=True)
class LiveView:
    """Everything on the screen at one moment, in SI units."""

    fluid: str = ""
    source: str = ""
    """What the samples come from, as the person named it."""
    reading: Reading | None = None
    received_at: float = math.nan
    """time.monotonic() when `reading` arrived (for the sample's age)."""
    source_state: str = "connecting"
    source_message: str = ""
    trail_T: np.ndarray = field(default_factory=lambda: np.empty(0))
    trail_p: np.ndarray = field(default_factory=lambda: np.empty(0))
    events: tuple[Event, ...] = ()
    alarms: tuple[AlarmStatus, ...] = ()
    """Alarm points that are not normal (unacknowledged, acknowledged, returned-unacknowledged, shelved)."""
    samples: int = 0
    rate_hz: float = math.nan
    dropped: int = 0
    malformed: int = 0
    properties: Mapping[str, float] = field(default_factory=dict)
    """thermo properties at the live state (density, molar_volume, Z, alpha_p, kappa_T, cp, speed_of_sound),
    or on the liquid–vapor curve the saturated densities (rho_liquid, rho_vapor)."""
    isotherm: Isotherm | None = None
    recording: Recording | None = None
    replay: ReplayPosition | None = None
    limits: Mapping[str, float] = field(default_factory=dict)
    """Alarm limit of each margin (MARGINS names), for the bars and the diagram's bands."""


class LiveFeed:
    """Accumulates readings, events and status into successive `LiveView`s (one thread only)."""

    def __init__(self, *, fluid: str, source: str, limits: Mapping[str, float] | None = None) -> None:
        self._view = LiveView(fluid=fluid, source=source, limits=dict(limits or {}))
        self._trail_T: deque[float] = deque(maxlen=TRAIL_LENGTH)
        self._trail_p: deque[float] = deque(maxlen=TRAIL_LENGTH)
        self._events: deque[Event] = deque(maxlen=EVENT_LENGTH)
        self._sample_times: deque[float] = deque(maxlen=RATE_WINDOW)

    @property
    def view(self) -> LiveView:
        return self._view

    def add(self, readings: Iterable[Reading], events: Iterable[Event], *, now: float | None = None) -> LiveView:
        """Take a batch from the monitor; returns the new view."""
        now = time.monotonic() if now is None else now
        latest = None
        count = 0
        for reading in readings:
            latest = reading
            count += 1
            sample = reading.sample
            self._sample_times.append(sample.t_monotonic)
            if math.isfinite(sample.temperature_K) and math.isfinite(sample.pressure_Pa):
                self._trail_T.append(sample.temperature_K)
                self._trail_p.append(sample.pressure_Pa)
        new_events = tuple(events)
        self._events.extend(new_events)
        changes: dict = {}
        if latest is not None:
            changes.update(
                reading=latest,
                received_at=now,
                samples=self._view.samples + count,
                rate_hz=self._rate(),
                trail_T=np.fromiter(self._trail_T, float, len(self._trail_T)),
                trail_p=np.fromiter(self._trail_p, float, len(self._trail_p)),
            )
        if new_events:
            changes["events"] = tuple(self._events)
        return self.update(**changes)

    def status(self, status: SourceStatus) -> LiveView:
        """Take a change in the source's health."""
        return self.update(source_state=status.state, source_message=status.message)

    def update(self, **changes) -> LiveView:
        """Replace some fields of the view (alarms, counters, recording, replay, properties...)."""
        if changes:
            self._view = replace(self._view, **changes)
        return self._view

    def _rate(self) -> float:
        times = self._sample_times
        span = times[-1] - times[0] if len(times) > 1 else 0.0
        return (len(times) - 1) / span if span > 0 else math.nan
