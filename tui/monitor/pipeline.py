"""The live monitor: samples in, readings and events out, with the operator's alarm actions.

`Monitor.process` takes whatever samples are waiting (validation, classification and the
engine all work on the chunk at once); `run_live` is the loop the headless watch runs and
the screen can run in a worker thread: a reader thread drains the source, the loop hands
everything waiting to the monitor every `poll_s` and passes each result to the sinks in
order (recorder first). Every public method of Monitor is thread-safe.
"""

from __future__ import annotations

import math
import queue
import threading
import time
from collections.abc import Callable, Iterable, Sequence

import numpy as np

from tui.acquire.sample import Quality, Sample, SourceStatus
from tui.acquire.validate import Validator
from tui.monitor.alarms import AlarmStatus
from tui.monitor.classify import Classifier
from tui.monitor.config import MonitorConfig
from tui.monitor.engine import Engine
from tui.monitor.frame import QUALITY_CODE
from tui.monitor.model import MARGINS, Event, Reading

#: while the stream is stale, a failure sample stands in for the missing ones this often [s]
STALE_REPEAT_S = 1.0


class Monitor:
    """Classification, margins, trend and alarms of one run, for one operator."""

    def __init__(self, config: MonitorConfig, *, validator: Validator | None = None):
        self.config = config
        self._engine = Engine(config)
        self._classifier = Classifier(config, self._engine.phases)
        self._validator = validator
        self._lock = threading.RLock()
        self._pending: list[Event] = []
        self._names_of: dict[int, tuple[str, ...]] = {}
        self._stale_at = math.nan
        self._stale_message = ""
        self.t0: float | None = None
        """Monotonic time [s] of t_s = 0: the run's first sample (None before it)."""

    @property
    def conditions(self) -> tuple[str, ...]:
        """The configured alarm conditions, in order."""
        return self._engine.names

    # -- samples ----------------------------------------------------------------------------

    def process(self, samples: Sequence[Sample], *, now: float | None = None) -> tuple[list[Reading], list[Event]]:
        """Readings of `samples` (in arrival order) and the events they raise, after any events
        of operator actions since the last call. `now` (on the samples' clock) lets a stream
        that went quiet become stale failure samples; leave it None for replays."""
        if self._validator is not None:
            samples = [self._validator.check(sample) for sample in samples]
            if now is not None:
                samples = samples + self._stale_samples(now)
        with self._lock:
            readings, events = self._run(samples) if samples else ([], [])
            events, self._pending = self._pending + events, []
        return readings, events

    def _stale_samples(self, now: float) -> list[Sample]:
        report = self._validator.check_stale(now)
        if report is not None:
            self._stale_at = now - STALE_REPEAT_S if report.stale else math.nan
            self._stale_message = report.message
        if math.isnan(self._stale_at) or now - self._stale_at < STALE_REPEAT_S:
            return []
        self._stale_at = now
        return [Sample(now, time.time(), math.nan, math.nan, "", Quality.FAILURE, (self._stale_message,))]

    def _run(self, samples: Sequence[Sample]) -> tuple[list[Reading], list[Event]]:
        n = len(samples)
        if self.t0 is None:
            self.t0 = samples[0].t_monotonic
        t_s = np.fromiter((s.t_monotonic for s in samples), float, n) - self.t0
        t_wall = np.fromiter((s.t_wall for s in samples), float, n)
        pressure = np.fromiter((s.pressure_Pa for s in samples), float, n)
        temperature = np.fromiter((s.temperature_K for s in samples), float, n)
        quality = np.fromiter((QUALITY_CODE[s.quality] for s in samples), np.int8, n)
        reasons, raw = tuple(s.reasons for s in samples), tuple(s.raw for s in samples)
        valid, phase, margins = self._classifier(pressure, temperature, quality)
        step = self._engine.step(t_s, t_wall, pressure, temperature, quality, valid, phase, margins, reasons, raw)
        return self._readings(samples, t_s, phase, margins, step), step.events

    def _readings(self, samples, t_s, phase, margins, step) -> list[Reading]:
        labels = self._engine.phases.labels
        weights = 1 << np.arange(step.active.shape[0], dtype=np.int64)
        masks = (weights @ step.active.astype(np.int64)).tolist() if step.active.size else [0] * len(samples)
        return [
            Reading(sample, labels[code], dict(zip(MARGINS, m)), dict(zip(MARGINS, r)), dict(zip(MARGINS, b)),
                    self._names(mask), t)
            for sample, code, m, r, b, mask, t in zip(
                samples, phase.tolist(), margins.T.tolist(), step.rates.T.tolist(),
                step.time_to_boundary.T.tolist(), masks, t_s.tolist(),
            )
        ]

    def _names(self, mask: int) -> tuple[str, ...]:
        names = self._names_of.get(mask)
        if names is None:
            names = tuple(name for bit, name in enumerate(self._engine.names) if mask >> bit & 1)
            self._names_of[mask] = names
        return names

    # -- operator actions -------------------------------------------------------------------

    def acknowledge(self, condition: str | None = None) -> list[Event]:
        """Acknowledge one alarm, or all of them; the events also go out with the next batch."""
        with self._lock:
            return self._keep(self._engine.board.acknowledge(condition, self._engine.now()[0], time.time()))

    def shelve(self, condition: str, seconds: float | None = None) -> list[Event]:
        """Shelve an alarm for `seconds` of run time (default: the configured shelve duration)."""
        with self._lock:
            duration = self.config.default_shelve_s if seconds is None else seconds
            return self._keep(self._engine.board.shelve(condition, duration, self._engine.now()[0], time.time()))

    def unshelve(self, condition: str) -> list[Event]:
        with self._lock:
            board, t_s = self._engine.board, self._engine.now()[0]
            return self._keep(board.unshelve(condition, t_s, time.time(), self._engine.current_alarm))

    def note(self, message: str, condition: str = "") -> Event:
        """An event of kind "note" at the latest sample's time (e.g. a failed alarm hook)."""
        with self._lock:
            event = Event(self._engine.now()[0], time.time(), "note", condition, message=message)
            self._keep([event])
            return event

    def _keep(self, events: list[Event]) -> list[Event]:
        self._pending += events
        return events

    # -- state ------------------------------------------------------------------------------

    def alarm_states(self) -> tuple[AlarmStatus, ...]:
        with self._lock:
            return self._engine.board.statuses()

    def active_alarms(self) -> list[str]:
        """Conditions whose alarm is active (unacknowledged or acknowledged) and not shelved."""
        with self._lock:
            return self._engine.board.annunciated()

    def alarm_log(self) -> list[Event]:
        """The recent alarm events (alarm, clear, ack, shelve, flood), oldest first."""
        with self._lock:
            return list(self._engine.board.log)


class Sink:
    """Where batches go: recorder, screen, stdout, hook. Subclasses override what they need."""

    def write(self, readings: list[Reading], events: list[Event]) -> None:
        """One batch; readings in time order, events in time order."""

    def status(self, report: SourceStatus) -> None:
        """A change in the source's health."""

    def close(self) -> None:
        """Flush and let go; called once at the end of the run."""


class CallbackSink(Sink):
    """Hands every batch to `callback(readings, events)` (e.g. a screen posting a message)."""

    def __init__(self, callback: Callable[[list[Reading], list[Event]], object]):
        self._callback = callback

    def write(self, readings, events) -> None:
        self._callback(readings, events)


_END = object()


def run_live(source, monitor: Monitor, sinks: Iterable[Sink], stop: threading.Event, *,
             poll_s: float = 0.05, clock: Callable[[], float] | None = time.monotonic) -> None:
    """Run `source` through `monitor` into `sinks` until `stop` is set or the source ends.

    A reader thread drains `source.batches`; every `poll_s` everything waiting is processed
    as one chunk and written to each sink in order. `clock` is "now" on the samples' clock,
    for stale detection (None for replays, whose samples carry the log's time). An exception
    in the source is raised here after what was read before it has been written. The sinks
    are not closed: the caller owns them.
    """
    sinks = list(sinks)
    inbox: queue.SimpleQueue = queue.SimpleQueue()
    halt = threading.Event()
    reader = threading.Thread(target=_pump, args=(source, halt, inbox), name="rigside-source", daemon=True)
    reader.start()
    failure: BaseException | None = None
    try:
        ended = False
        while not ended and not stop.is_set():
            started = time.monotonic()
            items, ended, failure = _drain(inbox, poll_s)
            _deliver(monitor, sinks, items, None if clock is None else clock())
            if failure is not None:
                break
            stop.wait(max(0.0, poll_s - (time.monotonic() - started)))  # one chunk per poll_s, not per batch
    finally:
        halt.set()
        reader.join(timeout=2.0)
        items, _, late = _drain(inbox, 0.0)
        _deliver(monitor, sinks, items, None)
    if failure is not None or late is not None:
        raise failure or late


def _pump(source, halt: threading.Event, inbox: queue.SimpleQueue) -> None:
    try:
        for batch in source.batches(halt):
            inbox.put(batch)
    except BaseException as exc:  # handed to the loop, which raises it
        inbox.put(exc)
    finally:
        inbox.put(_END)


def _drain(inbox: queue.SimpleQueue, wait_s: float) -> tuple[list, bool, BaseException | None]:
    """Everything waiting (after up to `wait_s` for the first batch): items, ended, failure."""
    items: list = []
    ended, failure = False, None
    try:
        chunk = inbox.get(timeout=wait_s) if wait_s > 0 else inbox.get_nowait()
        while True:
            if chunk is _END:
                ended = True
            elif isinstance(chunk, BaseException):
                failure = chunk
            else:
                items.extend(chunk)
            chunk = inbox.get_nowait()
    except queue.Empty:
        pass
    return items, ended, failure


def _deliver(monitor: Monitor, sinks: list[Sink], items: list, now: float | None) -> None:
    """The samples between status reports as one chunk each through the monitor, and the
    reports in their place, so every sink sees them in arrival order."""
    start = 0
    for index, item in enumerate(items):
        if isinstance(item, SourceStatus):
            _write(monitor, sinks, items[start:index], None)
            for sink in sinks:
                sink.status(item)
            start = index + 1
    _write(monitor, sinks, items[start:], now)


def _write(monitor: Monitor, sinks: list[Sink], samples: list[Sample], now: float | None) -> None:
    readings, events = monitor.process(samples, now=now)
    if readings or events:
        for sink in sinks:
            sink.write(readings, events)
