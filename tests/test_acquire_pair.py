"""Two-device setups over two real pty pairs: pairing by time within the tolerance."""

import math
import os
import threading
import time
import tty

import pytest

from tui.acquire import SourceOptions, open_source
from tui.acquire.sample import Quality, Sample
from tui.errors import UsageError


@pytest.fixture
def two_ptys():
    pairs = [os.openpty() for _ in range(2)]
    for _, slave in pairs:
        tty.setraw(slave)
    yield [(master, os.ttyname(slave)) for master, slave in pairs]
    for master, slave in pairs:
        os.close(master)
        os.close(slave)


def collect(source, feed):
    stop, items = threading.Event(), []
    worker = threading.Thread(target=lambda: items.extend(source.iter(stop)), daemon=True)
    worker.start()
    feed()
    time.sleep(0.8)
    stop.set()
    worker.join(5)
    assert not worker.is_alive()
    return [i for i in items if isinstance(i, Sample)]


def test_two_device_profile_pairs_by_time(two_ptys):
    (p_master, p_path), (t_master, t_path) = two_ptys
    source = open_source(p_path, SourceOptions(profile="fixtures/profiles/two-device.toml", temperature_port=t_path))

    def feed():
        for i in range(4):
            os.write(t_master, b"T=2%d.00\n" % i)
            time.sleep(0.02)
            os.write(p_master, b"P=%d.5000\n" % i)
            time.sleep(0.15)

    got = collect(source, feed)
    assert [s.pressure_Pa for s in got] == pytest.approx([0.5e5, 1.5e5, 2.5e5, 3.5e5])
    assert [s.temperature_K for s in got] == pytest.approx([293.15, 294.15, 295.15, 296.15])
    assert got[0].raw == "P=0.5000 | T=20.00"
    assert "paired within 0.5 s" in source.description and source.counters.lines == 8


def test_a_pressure_without_a_temperature_in_time_goes_on_without_one(two_ptys):
    (p_master, p_path), (_, t_path) = two_ptys
    options = SourceOptions(temperature_port=t_path, pressure_unit="bar", temperature_unit="degC", pair_tolerance_s=0.2)
    source = open_source(p_path, options)
    got = collect(source, lambda: os.write(p_master, b"7.5\n"))
    [alone] = got
    assert alone.pressure_Pa == pytest.approx(7.5e5) and math.isnan(alone.temperature_K)
    assert alone.reasons == ("no temperature within 0.2 s",) and source.unpaired == 1


def test_lines_the_devices_cannot_read_pass_through_as_failures(two_ptys):
    (p_master, p_path), (t_master, t_path) = two_ptys
    source = open_source(p_path, SourceOptions(profile="fixtures/profiles/two-device.toml", temperature_port=t_path))
    got = collect(source, lambda: os.write(t_master, b"\xff\xfe??\n"))
    assert [s.quality for s in got] == [Quality.FAILURE] and got[0].reasons[0].startswith("malformed:")


def test_a_two_device_profile_needs_both_ports():
    with pytest.raises(UsageError, match="no port for the temperature device"):
        open_source("/dev/null", SourceOptions(profile="fixtures/profiles/two-device.toml"))
