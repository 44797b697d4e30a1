"""One run as the screen drives it: source -> monitor -> recorder -> LiveFeed, and the operator's
commands (acknowledge, shelve, note, fluid, replay) applied between batches. No Textual here.

`run()` is the body of the app's thread worker; every other method is called from the screen's
thread and takes the same lock, held only while one batch is processed, so a key never waits
for more than one batch.
"""

from __future__ import annotations

import math
import threading
import time
from collections.abc import Callable

import thermo
from tui.acquire.sample import Sample, SourceStatus
from tui.monitor.model import Event
from tui.screen.curves import isotherm
from tui.screen.live import LiveFeed, LiveView, Recording, ReplayPosition

#: properties at the live state are recomputed at most this often [1/s]
PROPERTY_HZ = 4.0
#: the p–v isotherm is recomputed at most this often [1/s] ...
ISOTHERM_HZ = 1.0
#: ... and only when the temperature has moved by more than this [K]
ISOTHERM_STEP_K = 0.05
#: the isotherm spans the dome's pressures with this much room either side
ISOTHERM_PRESSURE_ROOM = 3.0
#: properties shown at the live state
SHOWN_PROPERTIES = ("density", "molar_volume", "Z", "alpha_p", "kappa_T", "cp", "speed_of_sound")


class ReplayControl:
    """The replay keys, over a source that can pause, resume, change speed, step and seek."""

    SPEEDS = (0.25, 0.5, 1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0)

    def __init__(self, source) -> None:
        self._source = source

    @property
    def position(self) -> ReplayPosition:
        s = self._source
        return ReplayPosition(s.position_s, s.duration_s, s.speed, s.paused)

    def toggle_pause(self) -> None:
        (self._source.resume if self._source.paused else self._source.pause)()

    def scale_speed(self, factor: float) -> None:
        """Next speed up (factor > 1) or down the SPEEDS ladder."""
        current = self._source.speed
        ladder = [s for s in self.SPEEDS if (s > current if factor > 1 else s < current)]
        if ladder:
            self._source.set_speed(ladder[0] if factor > 1 else ladder[-1])

    def step(self) -> None:
        self._source.step()

    def seek_by(self, seconds: float) -> None:
        s = self._source
        s.seek(min(max(s.position_s + seconds, 0.0), s.duration_s))


class Session:
    """Owns the source, the monitor and the recorder of one screen run."""

    def __init__(self, source, config, *, make_monitor: Callable, recorder=None, label: str = "") -> None:
        self.source = source
        self.config = config
        self._make_monitor = make_monitor
        self.monitor = make_monitor(config)
        self.recorder = recorder
        self.fluid = thermo.fluid(config.fluid)
        self.replay = ReplayControl(source) if hasattr(source, "seek") else None
        self.atmosphere_Pa = getattr(source, "atmosphere_Pa", None)
        self.feed = LiveFeed(fluid=self.fluid.name, source=label or source.description, limits=margin_limits(config))
        self._lock = threading.Lock()
        self._stop = threading.Event()
        self._finished = threading.Event()
        self._finished.set()  # until run() starts
        self._publish: Callable[[LiveView], object] = lambda view: None
        self._started_wall = time.time()
        self._properties_at = -math.inf
        self._isotherm_at = -math.inf

    @property
    def fluid_name(self) -> str:
        return self.fluid.name

    @property
    def recording_path(self):
        return getattr(self.recorder, "path", None)

    # ------------------------------------------------------------ the worker's loop
    def run(self, publish: Callable[[LiveView], object], cancelled: Callable[[], bool]) -> None:
        """Process the source until it ends or `stop()`; `publish` gets every new view."""
        self._publish = publish
        self._finished.clear()
        try:
            for batch in self.source.batches(self._stop):
                if cancelled():
                    break
                with self._lock:
                    view = self._process(batch)
                publish(view)
        finally:
            self._stop.set()
            self._finished.set()

    def stop(self) -> None:
        """Ask the loop to end (the source wakes within 0.2 s)."""
        self._stop.set()

    def close(self, wait_s: float) -> None:
        """Stop, wait up to `wait_s` for the loop to let go, then close the source and the run log."""
        self.stop()
        self._finished.wait(wait_s)
        self.source.close()
        if self.recorder is not None:
            self.recorder.close()

    def _process(self, batch) -> LiveView:
        samples = [item for item in batch if isinstance(item, Sample)]
        for item in batch:
            if isinstance(item, SourceStatus):
                self.feed.status(item)
        readings, events = self.monitor.process(samples) if samples else ((), ())
        if self.recorder is not None:
            self.recorder.write(readings, events)
        self.feed.add(readings, events)
        self._derive()
        return self.feed.update(**self._counters())

    def _counters(self) -> dict:
        counters = self.source.counters
        changes = dict(dropped=counters.dropped, malformed=counters.malformed, alarms=alarm_rows(self.monitor))
        if self.recorder is not None:
            changes["recording"] = Recording(str(self.recorder.path), self.recorder.bytes_written)
        if self.replay is not None:
            changes["replay"] = self.replay.position
        return changes

    def _derive(self) -> None:
        """Properties and the isotherm at the live state, at their own modest rates."""
        reading = self.feed.view.reading
        if reading is None:
            return
        T, p = reading.sample.temperature_K, reading.sample.pressure_Pa
        if not (math.isfinite(T) and math.isfinite(p)):
            return
        now = time.monotonic()
        if now - self._properties_at >= 1.0 / PROPERTY_HZ:
            self._properties_at = now
            values = self.fluid.properties(T, p)
            self.feed.update(properties={key: float(values[key]) for key in SHOWN_PROPERTIES})
        last = self.feed.view.isotherm
        if now - self._isotherm_at >= 1.0 / ISOTHERM_HZ and (last is None or abs(last.T - T) > ISOTHERM_STEP_K):
            self._isotherm_at = now
            critical, triple = self.fluid.critical, self.fluid.triple
            p_range = (triple.p / ISOTHERM_PRESSURE_ROOM, critical.p * ISOTHERM_PRESSURE_ROOM)
            self.feed.update(isotherm=isotherm(self.fluid, T, p_range))

    # ------------------------------------------------------------ operator commands (screen thread)
    def _command(self, events) -> None:
        """Record the events a command produced and show them at once."""
        if self.recorder is not None:
            self.recorder.write((), events)
        view = self.feed.add((), events)
        self._publish(self.feed.update(alarms=alarm_rows(self.monitor)) if view else view)

    def acknowledge(self, condition: str) -> None:
        with self._lock:
            self._command(self.monitor.acknowledge(condition))

    def shelve(self, condition: str) -> None:
        with self._lock:
            self._command(self.monitor.shelve(condition))

    def note(self, text: str, marked_at: float) -> None:
        """An operator note at the moment the mark key was pressed; it goes into the run log."""
        event = Event(t_s=marked_at - self._started_wall, t_wall=marked_at, kind="note", condition="operator",
                      message=text)
        with self._lock:
            if self.recorder is not None:
                self.recorder.write_note(text, marked_at)
            self._publish(self.feed.add((), (event,)))

    def switch_fluid(self, name: str) -> None:
        """Classify from the next batch on as `name`, with that fluid's configured limits."""
        config = self.config.for_fluid(name)
        fluid = thermo.fluid(name)
        with self._lock:
            self.config, self.fluid = config, fluid
            self.monitor = self._make_monitor(config)
            self._isotherm_at = self._properties_at = -math.inf
            self._publish(self.feed.update(fluid=fluid.name, limits=margin_limits(config), isotherm=None,
                                           properties={}))


def margin_limits(config) -> dict[str, float]:
    """The alarm limit of each margin from the monitor's conditions (NaN when off or relative)."""
    names = {"dT_saturation_K": "saturation-temperature", "dp_saturation_Pa": "saturation-pressure",
             "dT_solid_K": "solid-approach", "critical_distance": "near-critical"}
    limits = {}
    for margin, condition in names.items():
        settings = config.conditions.get(condition)
        usable = settings is not None and settings.enabled and not settings.relative
        limits[margin] = settings.limit if usable else math.nan
    return limits


def alarm_rows(monitor) -> tuple:
    raise NotImplementedError
