"""The live monitor: run_live over the virtual gauge, stop, stale streams, and operator actions
whose events reach the sinks in order."""

from __future__ import annotations

import threading
import time
from pathlib import Path

import pytest

from tui.acquire import Sample, SourceOptions, open_source
from tui.acquire.sample import Quality
from tui.acquire.validate import Validator, ValidatorConfig
from tui.errors import UsageError
from tui.monitor.config import load_config
from tui.monitor.pipeline import Monitor, Sink, run_live
from tui.monitor.sinks import status_line

FIXTURES = Path(__file__).parent.parent / "fixtures" / "monitor"


class Collect(Sink):
    def __init__(self):
        self.items = []

    def write(self, readings, events):
        self.items += readings + events

    def status(self, report):
        self.items.append(report)


def virtual(name: str, speed: float):
    return open_source(f"virtual:{FIXTURES / name}", SourceOptions(speed=speed))


def test_run_live_hands_every_sample_to_every_sink_in_order_until_the_source_ends():
    source = virtual("water-calm.toml", speed=0)
    monitor = Monitor(load_config(fluid="water"))
    first, second = Collect(), Collect()
    run_live(source, monitor, [first, second], threading.Event(), clock=None)
    readings = [item for item in first.items if hasattr(item, "sample")]
    assert len(readings) == 301
    assert [r.t_s for r in readings] == sorted(r.t_s for r in readings)
    states = [item.state for item in first.items if hasattr(item, "state")]
    assert states[0] == "connected" and states[-1] == "ended"
    assert first.items == second.items


def test_run_live_returns_soon_after_stop_with_what_was_read():
    source = virtual("water-heating-to-boiling.toml", speed=1)  # real time: 10 samples a second
    sink, stop = Collect(), threading.Event()
    threading.Timer(0.6, stop.set).start()
    started = time.monotonic()
    run_live(source, Monitor(load_config(fluid="water")), [sink], stop, clock=None)
    assert time.monotonic() - started < 2.0
    assert 2 <= sum(hasattr(item, "sample") for item in sink.items) <= 20


def samples(times, quality=Quality.OK):
    return [Sample(t, 1.8e9 + t, 30e5, 290.0, "p=30 bar T=16.85 degC", quality) for t in times]


def test_a_stream_gone_quiet_becomes_failure_samples_and_a_sensor_alarm():
    validator = Validator(ValidatorConfig(stale_after_s=2.0))
    monitor = Monitor(load_config(), validator=validator)
    monitor.process(samples([0.0, 0.5, 1.0]), now=1.0)
    assert monitor.process([], now=2.5) == ([], [])  # quiet for 1.5 s: not yet stale
    readings, events = monitor.process([], now=3.5)
    assert [r.sample.quality for r in readings] == [Quality.FAILURE]
    assert "no sample for 2.5 s" in readings[0].sample.reasons[0]
    assert readings[0].phase == "unclassified"
    # the technician's status line says why the reading is bad
    assert "quality failure (no sample for 2.5 s" in status_line(readings[0], monitor.config)
    assert [e.condition for e in events if e.kind == "alarm"] == ["sensor-quality"]
    assert monitor.process([], now=4.0) == ([], [])  # one stand-in sample a second
    assert len(monitor.process([], now=4.6)[0]) == 1
    readings, _ = monitor.process(samples([5.0]), now=5.0)
    assert readings[0].sample.quality is Quality.OK
    _, events = monitor.process(samples([10.5]), now=10.5)
    assert [e.kind for e in events if e.condition == "sensor-quality"] == ["clear"]


def test_operator_actions_return_their_events_and_send_them_with_the_next_batch():
    monitor = Monitor(load_config())
    near = [Sample(t, 1.8e9 + t, 50e5, 286.0, "", Quality.OK) for t in (0.0, 1.0, 2.0, 3.0)]  # 1.6 K subcooled
    _, events = monitor.process(near)
    assert "saturation-temperature" in [e.condition for e in events if e.kind == "alarm"]
    assert "saturation-temperature" in monitor.active_alarms()
    acks = monitor.acknowledge("saturation-temperature")
    assert [(e.kind, e.t_s) for e in acks] == [("ack", 3.0)]
    shelved = monitor.shelve("two-phase", 60.0)
    assert shelved[0].kind == "shelve" and "60 s" in shelved[0].message
    readings, events = monitor.process([Sample(4.0, 1.8e9 + 4.0, 50e5, 286.0)])
    assert events[:2] == acks + shelved
    states = {s.condition: s.state for s in monitor.alarm_states()}
    assert states["saturation-temperature"] == "acknowledged" and states["two-phase"] == "shelved"
    assert readings[0].active_alarms == ("saturation-temperature",)
    assert [e.kind for e in monitor.alarm_log()][-2:] == ["ack", "shelve"]
    assert monitor.unshelve("two-phase")[0].message == "shelve lifted"
    with pytest.raises(UsageError, match="no alarm named 'boiling'"):
        monitor.acknowledge("boiling")
    assert monitor.note("beacon test", "hook").kind == "note"
    assert monitor.process([])[1][-1].message == "beacon test"
