"""Modbus: register encodings by hand, a real pymodbus server on 127.0.0.1, losing it and getting it back."""

import threading
import time

import pytest

from tui.acquire import SourceOptions, open_source
from tui.acquire.modbus_server import RegisterServer
from tui.acquire.profile import load_profile
from tui.acquire.registers import decode, encode
from tui.acquire.sample import Sample, SourceStatus
from tui.acquire.simulator import NullModem
from tui.errors import UsageError

PROFILE = "fixtures/profiles/modbus-transmitter.toml"


@pytest.mark.parametrize(
    ("value", "data_type", "byte_order", "word_order", "words"),
    [
        # IEEE 754 binary32 of 57.2 is 0x4264CCCD (common practice, worked by hand)
        (57.2, "float32", "big", "big", [0x4264, 0xCCCD]),
        (57.2, "float32", "big", "little", [0xCCCD, 0x4264]),
        (57.2, "float32", "little", "big", [0x6442, 0xCDCC]),
        (-2, "int16", "big", "big", [0xFFFE]),
        (70000, "uint32", "big", "big", [0x0001, 0x1170]),
        (70000, "int16", "big", "big", [0x7FFF]),  # clipped to the type
        (1.0, "float64", "big", "big", [0x3FF0, 0, 0, 0]),
    ],
)
def test_register_words_by_hand(value, data_type, byte_order, word_order, words):
    assert encode(value, data_type, byte_order, word_order) == words
    if data_type != "int16" or value == -2:
        assert decode(words, data_type, byte_order, word_order) == pytest.approx(value, rel=1e-7)


def test_reads_a_real_server_and_rides_out_its_restart():
    server = RegisterServer(load_profile(PROFILE))
    port = server.port
    server.update(57.2e5, 293.15)
    source = open_source(f"modbus-tcp://127.0.0.1:{port}", SourceOptions(profile=PROFILE))
    stop, items = threading.Event(), []
    worker = threading.Thread(target=lambda: items.extend(source.iter(stop)), daemon=True)
    worker.start()

    def wait_for(predicate, timeout=10.0):
        end = time.monotonic() + timeout
        while not predicate():
            assert time.monotonic() < end, "timed out"
            time.sleep(0.02)

    try:
        wait_for(lambda: any(isinstance(i, Sample) for i in items))
        server.close()
        wait_for(lambda: any(isinstance(i, SourceStatus) and i.state == "disconnected" for i in items))
        server = RegisterServer(load_profile(PROFILE), port=port)
        server.update(60e5, 303.15)
        wait_for(lambda: any(isinstance(i, Sample) and i.pressure_Pa == pytest.approx(60e5, rel=1e-6) for i in items))
    finally:
        stop.set()
        worker.join(5)
        server.close()
    first = next(i for i in items if isinstance(i, Sample))
    assert first.pressure_Pa == pytest.approx(57.2e5, rel=1e-6)  # float32 carries about 7 digits
    assert first.temperature_K == pytest.approx(293.15)  # 2000 hundredths of a degree C
    assert first.raw == "pressure hr0=4264 cccd; temperature hr4=07d0"
    assert source.counters.reconnects == 1


def test_modbus_needs_a_profile_with_registers_and_a_reachable_device():
    with pytest.raises(UsageError, match=r"needs a profile with a \[modbus\] section"):
        open_source("modbus-tcp://127.0.0.1:1")
    with pytest.raises(UsageError, match="cannot connect to modbus-tcp://127.0.0.1:1"):
        open_source("modbus-tcp://127.0.0.1:1", SourceOptions(profile=PROFILE))


def test_modbus_rtu_over_a_null_modem():
    modem = NullModem()
    server = RegisterServer(load_profile(PROFILE), device=modem.device_end)
    try:
        server.update(12.5e5, 253.15)
        source = open_source(f"modbus-rtu://{modem.address}", SourceOptions(profile=PROFILE))
        assert source.description.startswith(f"Modbus RTU {modem.address} unit 7")
        stop = threading.Event()
        for item in source.iter(stop):
            if isinstance(item, Sample):
                stop.set()
    finally:
        server.close()
        modem.close()
    assert item.pressure_Pa == pytest.approx(12.5e5) and item.temperature_K == pytest.approx(253.15)


def test_simulate_serves_modbus_rtu_on_a_pty():
    import os
    import subprocess
    import sys

    child = subprocess.Popen([sys.executable, "-m", "tui.cli", "simulate", "view-cell", "--speed", "20", "--profile", PROFILE],
                             stdout=subprocess.PIPE, text=True, env=os.environ | {"PYTHONPATH": os.getcwd()})
    try:
        address = child.stdout.readline().strip()
        assert address.startswith("modbus-rtu:///dev/pts/")
        stop, got = threading.Event(), []
        for item in open_source(address, SourceOptions(profile=PROFILE)).iter(stop):
            if isinstance(item, Sample):
                got.append(item)
                if len(got) == 3:
                    stop.set()
    finally:
        child.terminate()
        child.wait(5)
    assert all(0.9e5 < s.pressure_Pa < 1e7 and 290 < s.temperature_K < 300 for s in got)
