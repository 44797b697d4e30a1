"""One run as the screen drives it, and the operator's commands. No Textual here.

`run()` is the body of the app's thread worker: it runs the monitor's own live loop
(`tui.monitor.pipeline.run_live`: source -> monitor -> recorder first, then the screen's sink).
The screen's sink folds each batch into a `LiveFeed` and hands the new view to `publish`.
Every other method is called from the screen's thread: the monitor is thread-safe, and the
feed is guarded by a lock held only while one batch is folded in, so a key never waits long.
"""

from __future__ import annotations

import math
import threading
import time
from collections.abc import Callable

import thermo
from tui.monitor.model import Event
from tui.monitor.pipeline import Sink, run_live
from tui.monitor.sinks import RecorderSink
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
#: the recording's size is looked up at most this often [1/s]
RECORDING_SIZE_HZ = 1.0
#: properties shown at the live state
SHOWN_PROPERTIES = ("density", "molar_volume", "Z", "alpha_p", "kappa_T", "cp", "speed_of_sound")
#: the phase label on the liquid–vapor curve, where the saturated densities are shown instead
TWO_PHASE = "liquid+vapor"


class ReplayControl:
    """The replay keys, over a source that can pause, resume, change speed, step and seek
    (a replay or the virtual gauge: they pace themselves with a `tui.acquire.pacer.Pacer`)."""

    SPEEDS = (0.25, 0.5, 1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0)

    def __init__(self, source) -> None:
        self._source = source

    @property
    def position(self) -> ReplayPosition:
        s = self._source
        return ReplayPosition(s.position, s.duration, s.pacer.speed, s.paused)

    def toggle_pause(self) -> None:
        (self._source.resume if self._source.paused else self._source.pause)()

    def scale_speed(self, factor: float) -> None:
        """The next speed up (factor > 1) or down the SPEEDS ladder."""
        current = self._source.pacer.speed
        ladder = [s for s in self.SPEEDS if (s > current if factor > 1 else s < current)]
        if ladder:
            self._source.set_speed(ladder[0] if factor > 1 else ladder[-1])

    def step(self) -> None:
        self._source.step()

    def seek_by(self, seconds: float) -> None:
        s = self._source
        s.seek(max(s.position + seconds, 0.0))


class _SwitchableMonitor:
    """Stands for the session's current monitor in the live loop, so the fluid can change while it runs."""

    def __init__(self, session: Session) -> None:
        self._session = session

    def process(self, samples, *, now=None):
        return self._session.monitor.process(samples, now=now)


class _ScreenSink(Sink):
    def __init__(self, session: Session) -> None:
        self._session = session

    def write(self, readings, events) -> None:
        self._session._fold(readings, events)

    def status(self, report) -> None:
        self._session._fold_status(report)


class Session:
    """Owns the source, the monitor and the recorder of one screen run."""

    def __init__(self, source, config, *, make_monitor: Callable, recorder=None, label: str = "",
                 clock: Callable[[], float] = time.monotonic, stale_clock: Callable[[], float] | None = None,
                 sinks=()) -> None:
        """`make_monitor(config)` builds a monitor (again on a fluid switch); `clock` tells the
        samples' age (tests freeze it); `stale_clock` is "now" on the samples' clock for the
        monitor's stale check (None for replays and the virtual gauge, which keep their own time);
        `sinks` get every batch after the screen (the caller owns and closes them)."""
        self.source = source
        self._sinks = tuple(sinks)
        self.config = config
        self.clock = clock
        self._stale_clock = stale_clock
        self._make_monitor = make_monitor
        self.monitor = make_monitor(config)
        self.recorder = recorder
        self.fluid = config.thermo_fluid
        self.replay = ReplayControl(source) if hasattr(source, "seek") else None
        self.atmosphere_Pa = getattr(source, "atmosphere_Pa", None)
        self.feed = LiveFeed(fluid=self.fluid.name, source=label or source.description, limits=margin_limits(config))
        self._lock = threading.Lock()
        self._stop = threading.Event()
        self._finished = threading.Event()
        self._finished.set()  # until run() starts
        self._publish: Callable[[LiveView], object] = lambda view: None
        self._next = {"properties": -math.inf, "isotherm": -math.inf, "size": -math.inf}
        self._recording_bytes = 0

    @property
    def fluid_name(self) -> str:
        return self.fluid.name

    @property
    def recording_path(self):
        return None if self.recorder is None else self.recorder.path

    # ------------------------------------------------------------ the worker's loop
    def run(self, publish: Callable[[LiveView], object], cancelled: Callable[[], bool]) -> None:
        """Run the live loop until the source ends or `stop()`; `publish` gets every new view."""
        self._publish = publish
        self._finished.clear()
        sinks = ([RecorderSink(self.recorder)] if self.recorder is not None else []) + [_ScreenSink(self), *self._sinks]
        try:
            run_live(self.source, _SwitchableMonitor(self), sinks, self._stop, clock=self._stale_clock)
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

    def _fold(self, readings, events) -> None:
        with self._lock:
            self.feed.add(readings, events, now=self.clock())
            self._derive()
            view = self.feed.update(**self._counters())
        self._publish(view)

    def _fold_status(self, report) -> None:
        with self._lock:
            view = self.feed.status(report)
        self._publish(view)

    def _due(self, what: str, hz: float) -> bool:
        now = time.monotonic()
        if now < self._next[what]:
            return False
        self._next[what] = now + 1.0 / hz
        return True

    def _counters(self) -> dict:
        counters = self.source.counters
        changes = dict(dropped=counters.dropped, malformed=counters.malformed, alarms=self._alarms())
        if self.recorder is not None:
            if self._due("size", RECORDING_SIZE_HZ):
                self._recording_bytes = sum(path.stat().st_size for path in self.recorder.paths)
            changes["recording"] = Recording(str(self.recorder.path), self._recording_bytes)
        if self.replay is not None:
            changes["replay"] = self.replay.position
        return changes

    def _alarms(self) -> tuple:
        return tuple(status for status in self.monitor.alarm_states() if status.state != "normal")

    def _derive(self) -> None:
        """Properties and the isotherm at the live state, at their own modest rates."""
        reading = self.feed.view.reading
        if reading is None:
            return
        T, p = reading.sample.temperature_K, reading.sample.pressure_Pa
        if not (math.isfinite(T) and math.isfinite(p)):
            return
        if self._due("properties", PROPERTY_HZ):
            self.feed.update(properties=self._properties(reading.phase, T, p))
        last = self.feed.view.isotherm
        if (last is None or abs(last.T - T) > ISOTHERM_STEP_K) and self._due("isotherm", ISOTHERM_HZ):
            critical, triple = self.fluid.critical, self.fluid.triple
            p_range = (triple.p / ISOTHERM_PRESSURE_ROOM, critical.p * ISOTHERM_PRESSURE_ROOM)
            self.feed.update(isotherm=isotherm(self.fluid, T, p_range))

    def _properties(self, phase: str, T: float, p: float) -> dict[str, float]:
        """The single-phase properties at (T, p); on the liquid–vapor curve, where either branch's
        density would be a guess, the saturated liquid and vapor densities at T instead."""
        if phase == TWO_PHASE and self.fluid.triple.T <= T < self.fluid.critical.T:
            rho_liquid, rho_vapor = self.fluid.saturated_densities(T)
            return {"rho_liquid": float(rho_liquid), "rho_vapor": float(rho_vapor)}
        values = self.fluid.properties(T, p)
        return {key: float(values[key]) for key in SHOWN_PROPERTIES}

    # ------------------------------------------------------------ operator commands (screen thread)
    def refresh_replay(self) -> None:
        """While a replay is paused no batch brings its position: publish it when a step or a
        seek has moved it, so the keys show their effect."""
        if self.replay is None:
            return
        position = self.replay.position
        if not position.paused:
            return
        with self._lock:
            if position == self.feed.view.replay:
                return
            view = self.feed.update(replay=position)
        self._publish(view)

    def acknowledge(self, condition: str) -> None:
        """The ack events reach the run log and the screen with the monitor's next batch."""
        self.monitor.acknowledge(condition)

    def shelve(self, condition: str) -> None:
        self.monitor.shelve(condition)

    def mark(self) -> tuple[float, float]:
        """The moment of a note: (run time t_s of the latest sample [s], wall time [s since the epoch])."""
        reading = self.feed.view.reading
        return (reading.t_s if reading is not None else 0.0), time.time()

    def note(self, text: str, moment: tuple[float, float]) -> None:
        """An operator note at `moment` (from `mark`): into the run log, and onto the screen."""
        t_s, t_wall = moment
        if self.recorder is not None:
            self.recorder.write_note(text, t_s)
        event = Event(t_s=t_s, t_wall=t_wall, kind="note", condition="operator", message=text)
        with self._lock:
            view = self.feed.add((), (event,))
        self._publish(view)

    def switch_fluid(self, name: str) -> None:
        """Classify as `name` from the next batch on, with the limits configured for that fluid."""
        from tui.monitor.config import load_config

        origin = None if self.config.origin == "defaults" else self.config.origin
        config = load_config(origin, fluid=name)
        fluid, monitor = thermo.fluid(name), self._make_monitor(config)
        with self._lock:
            self.config, self.fluid, self.monitor = config, fluid, monitor
            self._next.update(properties=-math.inf, isotherm=-math.inf)
            view = self.feed.update(fluid=fluid.name, limits=margin_limits(config), isotherm=None, properties={},
                                    alarms=())
        self._publish(view)


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
