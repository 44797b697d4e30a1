"""Where the monitor's batches go in a headless run: the run log first, then stdout (status lines
for people, or JSON Lines for programs). The alarm hook is in tui.monitor.hook."""

from __future__ import annotations

import math
import time
from collections.abc import Iterator
from typing import TextIO

from thermo.units import format_number, format_pressure, format_temperature, format_temperature_difference
from tui.acquire.sample import SourceStatus
from tui.jsontext import dumps, plain
from tui.monitor.config import MonitorConfig
from tui.monitor.model import Event, Reading
from tui.monitor.pipeline import Sink

#: event kind -> the word a status line shows
KIND_WORDS = {
    "alarm": "ALARM", "clear": "CLEAR", "ack": "ACK", "shelve": "SHELVE", "flood": "FLOOD",
    "phase-change": "PHASE", "quality": "QUALITY", "note": "NOTE",
}


def in_time_order(readings: list[Reading], events: list[Event]) -> Iterator[Reading | Event]:
    """Readings and events merged by run time; an event follows the reading it was raised at."""
    pending = iter(events)
    event = next(pending, None)
    for reading in readings:
        while event is not None and event.t_s < reading.t_s:
            yield event
            event = next(pending, None)
        yield reading
    if event is not None:
        yield event
        yield from pending


class RecorderSink(Sink):
    """Readings, events and source status into a `tui.record.RunRecorder`, in time order.

    Status reports that come before the first sample wait for it, so that the run log's
    t_s = 0 is the first sample's time, as it is for the monitor."""

    def __init__(self, recorder):
        self.recorder = recorder
        self._early: list[SourceStatus] = []

    def write(self, readings, events) -> None:
        if readings and self.recorder.t0 is None:
            self.recorder.t0 = readings[0].sample.t_monotonic - readings[0].t_s
            for report in self._early:
                self.recorder.write_status(report)
            self._early = []
        run: list[Reading] = []
        for item in in_time_order(readings, events):
            if isinstance(item, Reading):
                run.append(item)
                continue
            self.recorder.write_many(run)
            run = []
            self.recorder.write_event(item)
        self.recorder.write_many(run)

    def status(self, report) -> None:
        if self.recorder.t0 is None:
            self._early.append(report)
        else:
            self.recorder.write_status(report)

    def close(self) -> None:
        for report in self._early:
            self.recorder.write_status(report)
        self.recorder.close()


def closing(seconds: float) -> bool | None:
    """Whether a margin is closing on its boundary, from its predicted time to it: True (a
    finite time), False (not closing: moving away or steady, time inf), None (unknown, NaN)."""
    return None if math.isnan(seconds) else math.isfinite(seconds)


def reading_json(reading: Reading) -> dict:
    """One sample as a JSON Lines object (keys snake_case with the unit as suffix).

    JSON has no NaN or infinity, so every undefined number is null. `time_to_boundary_s` is
    null both when unknown and when the margin is not closing; `closing` tells them apart for
    each margin: true (the time is a number), false (not closing at the present rate), null
    (unknown: the trend window is not full, or the margin is undefined). `t_wall` is null for
    replays of files without wall-clock time."""
    sample = reading.sample
    return plain({
        "type": "sample",
        "t_s": reading.t_s,
        "t_wall": sample.t_wall,
        "pressure_Pa": sample.pressure_Pa,
        "temperature_K": sample.temperature_K,
        "phase": reading.phase,
        "quality": sample.quality.value,
        **reading.margins,
        "rates_per_s": reading.rates,
        "time_to_boundary_s": reading.time_to_boundary,
        "closing": {name: closing(seconds) for name, seconds in reading.time_to_boundary.items()},
        "active_alarms": list(reading.active_alarms),
        "reasons": list(sample.reasons),
    })


def event_json(event: Event) -> dict:
    return plain({"type": "event", **event.to_json()})


def status_json(report: SourceStatus, t0: float | None) -> dict:
    """A source report; `t_s` on the run's clock once the first sample has set it (`t0`, the
    samples' clock at t_s = 0), null before."""
    t_s = None if t0 is None else report.t_monotonic - t0
    return plain({"type": "source", "t_s": t_s, "t_wall": report.t_wall, "state": report.state,
                  "message": report.message})


class JsonLinesSink(Sink):
    """Every sample and event as one JSON object per line (programs read this)."""

    def __init__(self, stream: TextIO):
        self._stream = stream
        self._t0: float | None = None

    def write(self, readings, events) -> None:
        if readings and self._t0 is None:
            self._t0 = readings[0].sample.t_monotonic - readings[0].t_s
        lines = [dumps(reading_json(item) if isinstance(item, Reading) else event_json(item))
                 for item in in_time_order(readings, events)]
        if lines:
            self._stream.write("\n".join(lines) + "\n")
            self._stream.flush()

    def status(self, report) -> None:
        self._stream.write(dumps(status_json(report, self._t0)) + "\n")
        self._stream.flush()


class StatusPrinter(Sink):
    """A status line for people every `interval_s`, and every alarm and phase event as it happens.

    Alarms raised during a flood are left to the flood's summary lines, and quality changes
    to the status line and the sensor-quality alarm (all of them are in the log)."""

    def __init__(self, stream: TextIO, config: MonitorConfig, interval_s: float, clock=time.monotonic):
        self._stream, self._config, self._interval = stream, config, interval_s
        self._clock = clock
        self._shown_at = -math.inf

    def write(self, readings, events) -> None:
        lines = [event_line(event) for event in events if not event.in_flood and event.kind != "quality"]
        now = self._clock()
        if readings and now - self._shown_at >= self._interval:
            self._shown_at = now
            lines.append(status_line(readings[-1], self._config))
        if lines:
            self._stream.write("\n".join(lines) + "\n")
            self._stream.flush()

    def status(self, report) -> None:
        self._stream.write(f"{_clock_time(report.t_wall)}  source {report.state}: {report.message}\n")
        self._stream.flush()


def _clock_time(t_wall: float) -> str:
    return time.strftime("%H:%M:%S", time.localtime(t_wall)) if math.isfinite(t_wall) else "--:--:--"


def _signed(text: str) -> str:
    return text if text.startswith(("-", "n/a")) else f"+{text}"


def status_line(reading: Reading, config: MonitorConfig) -> str:
    """'10:15:02  125.0 s  57.312 bar(a)  21.30 °C  liquid  sat -1.83 K (0 in 95 s)  solid +77.90 K  crit 0.094  ALARM ...'"""
    sample, margins, to_zero = reading.sample, reading.margins, reading.time_to_boundary
    unit_T = config.temperature_unit

    def margin(name: str, label: str) -> str:
        text = f"{label} {_signed(format_temperature_difference(margins[name], unit_T))}"
        seconds = to_zero.get(name, math.nan)
        return f"{text} (0 in {format_number(seconds, 3)} s)" if math.isfinite(seconds) else text

    parts = [
        _clock_time(sample.t_wall),
        f"{reading.t_s:8.1f} s",
        format_pressure(sample.pressure_Pa, config.pressure_unit),
        format_temperature(sample.temperature_K, unit_T),
        reading.phase,
        margin("dT_saturation_K", "sat"),
        margin("dT_solid_K", "solid"),
        f"crit {format_number(margins['critical_distance'], 3)}",
    ]
    if sample.quality.value != "ok":
        parts.append(f"quality {sample.quality.value}" + (f" ({sample.reasons[0]})" if sample.reasons else ""))
    parts.append(f"ALARM {', '.join(reading.active_alarms)}" if reading.active_alarms else "no alarm")
    return "  ".join(parts)


def event_line(event: Event) -> str:
    """'10:15:04  127.0 s  ALARM  saturation-temperature [high]: 1.98 K of subcooling left (limit 2.00 K)'"""
    who = event.condition + (f" [{event.priority}]" if event.priority else "")
    return f"{_clock_time(event.t_wall)}  {event.t_s:8.1f} s  {KIND_WORDS.get(event.kind, event.kind.upper())}  {who}: {event.message}"
