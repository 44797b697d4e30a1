"""Serial sources over real transports: a pty pair, loop://, TCP on 127.0.0.1; unplug and come back."""

import os
import socket
import threading
import time
import tty

import pytest

from tui.acquire import SourceOptions, open_source
from tui.acquire.profile import load_profile
from tui.acquire.sample import Quality, Sample, SourceStatus
from tui.acquire.scenario import parse_scenario
from tui.acquire.simulator import PtyOutlet, Simulator, TcpOutlet
from tui.errors import UsageError
from tui.record import RunRecorder, read_table

BAR = 1e5
UNITS = SourceOptions(pressure_unit="bar", temperature_unit="degC")


def wait_for(predicate, timeout=5.0):
    end = time.monotonic() + timeout
    while not predicate():
        if time.monotonic() > end:
            raise AssertionError("timed out")
        time.sleep(0.01)


class Reader:
    """Runs a source's iteration in a thread, collecting what it yields."""

    def __init__(self, source):
        self.source, self.items, self.stop = source, [], threading.Event()
        self.thread = threading.Thread(target=self._run, daemon=True)
        self.thread.start()

    def _run(self):
        for item in self.source.iter(self.stop):
            self.items.append(item)

    def samples(self):
        return [i for i in self.items if isinstance(i, Sample)]

    def states(self):
        return [i.state for i in self.items if isinstance(i, SourceStatus)]

    def close(self):
        self.stop.set()
        self.thread.join(5)
        assert not self.thread.is_alive(), "the source did not honour stop"


def test_pty_stream_in_chunks():
    master, slave = os.openpty()
    tty.setraw(slave)
    reader = Reader(open_source(os.ttyname(slave)))
    try:
        lines = b"".join(b"p=%d.5 bar T=2%d degC\r\n" % (i, i % 10) for i in range(2000))
        os.write(master, lines[:1001])  # cut inside a line: the tail waits for the next chunk
        time.sleep(0.05)
        os.write(master, lines[1001:])
        wait_for(lambda: len(reader.samples()) == 2000)
    finally:
        reader.close()
        os.close(master)
        os.close(slave)
    samples = reader.samples()
    assert samples[0].pressure_Pa == pytest.approx(0.5 * BAR) and samples[-1].pressure_Pa == pytest.approx(1999.5 * BAR)
    assert all(s.quality is Quality.OK for s in samples)
    counters = reader.source.counters
    assert (counters.lines, counters.malformed, counters.bytes) == (2000, 0, len(lines))


def test_loop_url_with_units_from_options_and_garbage_counted():
    source = open_source("loop://", UNITS)
    reader = Reader(source)
    try:
        source.port.write(b"1.5,20\n\x00\xff\xfe garbage\n2.5,21\n")
        wait_for(lambda: len(reader.samples()) == 3)
    finally:
        reader.close()
    first, bad, second = reader.samples()
    assert first.pressure_Pa == pytest.approx(1.5 * BAR) and second.temperature_K == pytest.approx(294.15)
    assert bad.quality is Quality.FAILURE and bad.reasons[0].startswith("malformed:")
    assert source.counters.malformed == 1 and source.counters.lines == 3
    assert source.description == "serial loop://, profile generic", "no baud rate for a link that has none"


def test_bad_ports_are_one_line_usage_errors():
    with pytest.raises(UsageError, match=r"^cannot open /dev/no-such-gauge: "):
        open_source("/dev/no-such-gauge")
    with pytest.raises(UsageError, match="cannot open bogus://x"):
        open_source("bogus://x")
    with pytest.raises(UsageError, match="no source given"):
        open_source("")
    with socket.create_server(("127.0.0.1", 0)) as closed:
        port = closed.getsockname()[1]
    with pytest.raises(UsageError) as refused:
        open_source(f"socket://127.0.0.1:{port}")
    assert str(refused.value).count(f"127.0.0.1:{port}") == 1, "the URL is named once"
    with pytest.raises(UsageError, match="play a scenario with virtual:fixtures/scenarios/nitrogen-transfer.toml"):
        open_source("fixtures/scenarios/nitrogen-transfer.toml")


def test_tcp_peer_goes_away_and_comes_back(tmp_path):
    outlet = TcpOutlet(0)
    port, quiet = outlet.port, threading.Event()
    source = open_source(f"socket://127.0.0.1:{port}")
    reader = Reader(source)
    recorder = RunRecorder(tmp_path / "run.csv", {"source": source.description})
    try:
        outlet.send(b"p=1 bar T=20 degC\n" * 3, True, quiet)
        wait_for(lambda: len(reader.samples()) == 3)
        outlet.close()  # the converter is unplugged
        wait_for(lambda: "disconnected" in reader.states())
        time.sleep(0.3)
        outlet = TcpOutlet(port)  # ... and plugged back in
        wait_for(lambda: reader.states().count("connected") == 2, timeout=10)
        outlet.send(b"p=2 bar T=21 degC\n" * 2, True, quiet)
        wait_for(lambda: len(reader.samples()) == 5)
    finally:
        reader.close()
        outlet.close()
    states = reader.states()
    assert states[0] == "connected" and states[-1] == "connected" and "disconnected" in states
    assert source.counters.reconnects == 1
    assert reader.samples()[-1].pressure_Pa == pytest.approx(2 * BAR)
    for item in reader.items:  # what a recorder sink does with the stream
        if isinstance(item, SourceStatus):
            recorder.write_status(item)
    recorder.close()
    gaps = [e for e in read_table(recorder.path).events if e["kind"] == "gap"]
    assert len(gaps) == 1 and gaps[0]["duration_s"] > 0.3


def test_unplugged_pty_reports_disconnected_and_keeps_trying():
    master, slave = os.openpty()
    tty.setraw(slave)
    reader = Reader(open_source(os.ttyname(slave)))
    try:
        os.write(master, b"p=1 bar T=1 degC\n")
        wait_for(lambda: len(reader.samples()) == 1)
        os.close(master)
        os.close(slave)
        wait_for(lambda: "disconnected" in reader.states())
        wait_for(lambda: "reconnecting" in reader.states(), timeout=3)
    finally:
        reader.close()


POLL_SCENARIO = """
rate_hz = 20
pressure_unit = "psig"
temperature_unit = "degF"
start = { pressure = 21.8, temperature = 194.0 }
[[segment]]
duration = 60
"""


def test_polled_gauge_answers_each_query_over_a_pty():
    profile = load_profile("fixtures/profiles/polled-delimited.toml")
    outlet, stop = PtyOutlet(), threading.Event()
    gauge = threading.Thread(target=Simulator(parse_scenario(POLL_SCENARIO), outlet, profile).run, args=(stop,), daemon=True)
    gauge.start()
    reader = Reader(open_source(outlet.address, SourceOptions(profile="fixtures/profiles/polled-delimited.toml")))
    try:
        wait_for(lambda: len(reader.samples()) >= 5)
    finally:
        reader.close()
        stop.set()
        gauge.join(5)
        outlet.close()
    samples = reader.samples()
    psi = 0.45359237 * 9.80665 / 0.0254**2  # 1959 definition: 6894.757 Pa
    assert samples[0].pressure_Pa == pytest.approx(21.8 * psi + 101_325.0, rel=1e-5)
    assert samples[0].temperature_K == pytest.approx(363.15, abs=1e-3)  # 194 degF = 90 degC
    assert reader.source.description.endswith("polled every 0.1 s")
    assert "7E1" in reader.source.description
