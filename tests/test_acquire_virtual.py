"""Scenarios, the in-process virtual gauge, and `rigside simulate` on a pty and on TCP."""

import os
import subprocess
import sys
import threading
from pathlib import Path

import numpy as np
import pytest

from tui.acquire import SourceOptions, open_source
from tui.acquire.sample import Quality, Sample
from tui.acquire.scenario import GARBAGE, SILENT, SPIKE, builtin_scenarios, load_scenario, parse_scenario
from tui.errors import UsageError

SCENARIOS = sorted(Path("fixtures/scenarios").glob("*.toml"))
ENV = os.environ | {"PYTHONPATH": os.getcwd()}


@pytest.mark.parametrize("path", SCENARIOS, ids=lambda p: p.stem)
def test_fixture_scenarios_load_and_play(path):
    scenario = load_scenario(path)
    frames = scenario.frames(0, scenario.samples)
    assert len(frames.t) == scenario.samples and (frames.pressure_Pa >= 0).all()


def test_builtin_scenario_is_packaged():
    assert "view-cell" in builtin_scenarios()
    assert load_scenario("view-cell").fluid == "CO2"


def test_ramps_holds_and_units_against_hand_values():
    s = parse_scenario(
        'rate_hz = 1\npressure_unit = "barg"\ntemperature_unit = "degC"\nstart = { pressure = 0, temperature = 0 }\n'
        "[[segment]]\nduration = 10\npressure = 10\n[[segment]]\nduration = 5\ntemperature = 50\n"
    )
    f = s.frames(0, 16)
    assert f.pressure_Pa[[0, 5, 10, 15]] == pytest.approx([101_325.0, 5e5 + 101_325.0, 1e6 + 101_325.0, 1e6 + 101_325.0])
    assert f.temperature_K[[0, 10, 15]] == pytest.approx([273.15, 273.15, 323.15])
    assert s.frames(16, 20).t.size == 0, "a scenario that does not loop ends"


def test_faults_are_reproducible_and_where_asked():
    s = load_scenario("fixtures/scenarios/co2-view-cell-faulty.toml")
    a, b = s.frames(0, s.samples), s.frames(0, s.samples)
    assert np.array_equal(a.pressure_Pa, b.pressure_Pa) and a.garbage == b.garbage
    part = s.frames(300, 400)
    assert np.array_equal(part.pressure_Pa, a.pressure_Pa[300:400]), "seeking gives the same values"
    assert (a.kind[200:230] == SILENT).all()  # dropout 20-23 s at 10 Hz
    held = a.pressure_Pa[(a.t >= 40) & (a.t < 60) & (a.kind == 0)]
    assert np.ptp(held) == 0.0, "stuck 40-60 s: the reading does not move"
    assert (a.kind == GARBAGE).sum() > 0 and (a.kind == SPIKE).sum() > 0


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("start = {pressure = 1, temperature = 1}", "needs at least one [[segment]]"),
        ("start = {pressure = 1}\n[[segment]]\nduration = 1", "start.temperature is missing: give a number"),
        ("start = {pressure = 1, temperature = 1}\n[[segment]]\nduration = -1", "segment 1.duration must be positive"),
        ("pressure_unit = 'cubit'", "unknown pressure unit 'cubit'"),
        ("start = {pressure = 1, temperature = 1}\n[faults]\ndropouts = 5\n[[segment]]\nduration = 1", "faults.dropouts must be a list"),
        ("start = {pressure = 1, temperature = 1}\n[[segment]]\nduration = 1\ncolour = 2", "unknown key 'colour' in [segment 1]"),
        ("start = {pressure = 1, temperature = 1}\n[noise]\npressure = 'high'\n[[segment]]\nduration = 1", "noise.pressure must be a finite number"),
    ],
)
def test_bad_scenarios_are_one_line_errors(text, message):
    with pytest.raises(UsageError, match=r"^scenario s.toml: ") as caught:
        parse_scenario(text, "s.toml")
    assert message in str(caught.value)


def test_unreadable_scenario_files_are_one_line_errors(tmp_path):
    with pytest.raises(UsageError, match=r"^scenario 'no-such': no such file or built-in scenario \(built-in: .*view-cell"):
        load_scenario("no-such")
    binary = tmp_path / "binary.toml"
    binary.write_bytes(b"name = '\xff'\n")
    with pytest.raises(UsageError, match=r"binary.toml: not UTF-8 text"):
        load_scenario(binary)


def test_virtual_gauge_source_plays_through_the_parser():
    source = open_source("virtual:fixtures/scenarios/co2-view-cell-faulty.toml", SourceOptions(speed=0))
    items = list(source.iter(threading.Event()))
    samples = [i for i in items if isinstance(i, Sample)]
    scenario = source.scenario
    kinds = scenario.frames(0, scenario.samples).kind
    assert len(samples) == (kinds != SILENT).sum()
    assert source.counters.malformed == sum(1 for s in samples if s.quality is Quality.FAILURE) == (kinds == GARBAGE).sum()
    assert items[-1].state == "ended"
    assert samples[1].t_monotonic == pytest.approx(0.1), "samples carry the scenario's time"


def simulate(*args):
    return subprocess.Popen([sys.executable, "-m", "tui.cli", "simulate", *args], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True, env=ENV)


def read_some(spec, count, options=SourceOptions()):
    source = open_source(spec, options)
    stop, got = threading.Event(), []
    for item in source.iter(stop):
        if isinstance(item, Sample):
            got.append(item)
            if len(got) == count:
                stop.set()
    return got


def test_simulate_on_a_pty_prints_its_path_first():
    child = simulate("view-cell", "--pty", "--speed", "50")
    try:
        path = child.stdout.readline().strip()
        assert path.startswith("/dev/pts/")
        got = read_some(path, 20)
    finally:
        child.terminate()
        child.wait(5)
    good = [s for s in got[1:] if s.quality is Quality.OK]  # the first line may be cut short
    assert len(good) >= 15 and all(1e5 < s.pressure_Pa < 1e7 for s in good)


def test_simulate_on_tcp_in_a_profiles_voice():
    child = simulate("fixtures/scenarios/water-line-boiling.toml", "--tcp", "0", "--speed", "100",
                     "--profile", "fixtures/profiles/streaming-regex.toml")
    try:
        address = child.stdout.readline().strip()
        assert address.startswith("socket://127.0.0.1:")
        got = read_some(address, 10, SourceOptions(profile="fixtures/profiles/streaming-regex.toml"))
    finally:
        child.terminate()
        child.wait(5)
    good = [s for s in got if s.quality is Quality.OK]
    assert len(good) >= 9
    # 21.8 psig over 1 atm: about 2.52 bar absolute; 194-257 degF is 363-398 K
    assert all(2.4e5 < s.pressure_Pa < 2.6e5 and 360 < s.temperature_K < 400 for s in good)


def test_simulate_rejects_a_profile_it_cannot_speak():
    child = simulate("view-cell", "--profile", "fixtures/profiles/two-device.toml")
    _, err = child.communicate(timeout=20)
    assert child.returncode == 2 and err.strip().endswith("choose one with --device pressure|temperature")


@pytest.mark.parametrize(
    ("args", "message"),
    [(("--tcp", "99999"), "--tcp must be a port number from 0"), (("--speed", "nan"), "--speed must be 0")],
)
def test_simulate_refuses_a_bad_port_or_speed_before_it_speaks(args, message, capsys):
    from tui.cli import main

    assert main(["simulate", "view-cell", *args]) == 2
    out, err = capsys.readouterr()
    assert out == "" and message in err and err.count("\n") == 1
