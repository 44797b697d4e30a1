"""`rigside watch --headless` as a program: status lines and JSON Lines, exit status, SIGINT and
SIGTERM with the run log flushed, and the --on-alarm hook, fed by the virtual gauge or by a
gauge on a TCP socket on 127.0.0.1 (no hardware, no mock)."""

from __future__ import annotations

import json
import os
import signal
import socket
import subprocess
import sys
import threading
import time
from pathlib import Path

import pytest

from tui.cli import SAFETY_NOTE
from tui.record import read_table

ROOT = Path(__file__).parent.parent
FIXTURES = ROOT / "fixtures" / "monitor"
HOOK = """\
import json, os, sys
with open(sys.argv[1], "a") as out:
    out.write(json.dumps({k: v for k, v in os.environ.items() if k.startswith("RIGSIDE_")}) + "\\n")
"""


def environment(tmp_path: Path) -> dict:
    return os.environ | {"XDG_CONFIG_HOME": str(tmp_path / "config"), "XDG_STATE_HOME": str(tmp_path / "state"),
                         "PYTHONPATH": str(ROOT)}


def watch(tmp_path: Path, *args: str, timeout: float = 120) -> subprocess.CompletedProcess:
    command = [sys.executable, "-m", "tui.cli", "watch", *args, "--log-dir", str(tmp_path / "logs")]
    return subprocess.run(command, cwd=tmp_path, env=environment(tmp_path), capture_output=True, text=True,
                          timeout=timeout)


def start_watch(tmp_path: Path, *args: str) -> subprocess.Popen:
    command = [sys.executable, "-m", "tui.cli", "watch", *args, "--log-dir", str(tmp_path / "logs")]
    return subprocess.Popen(command, cwd=tmp_path, env=environment(tmp_path), stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True)


def run_log(tmp_path: Path):
    (path,) = (tmp_path / "logs").glob("run-*.csv")
    return read_table(path)


def test_headless_prints_the_safety_note_status_and_alarms_and_exits_3_with_an_alarm_active(tmp_path):
    done = watch(tmp_path, f"virtual:{FIXTURES / 'co2-liquid-line-cooling.toml'}", "--headless", "--speed", "0")
    assert done.returncode == 3, done.stderr
    assert done.stderr.splitlines()[0] == SAFETY_NOTE
    assert "ALARM  solid-approach [high]:" in done.stdout
    assert "ALARM  solid-approach-trend [high]:" in done.stdout
    assert "20.000 bar(a)" in done.stdout and "liquid" in done.stdout  # a status line
    log = run_log(tmp_path)
    assert log.metadata["config"]["fluid"] == "CO2" and log.metadata["command"] == "watch"
    assert [e["kind"] for e in log.events if e.get("condition") == "solid-approach"] == ["alarm"]


def test_a_watch_that_ends_with_no_alarm_exits_0(tmp_path):
    done = watch(tmp_path, f"virtual:{FIXTURES / 'water-calm.toml'}", "--headless", "--speed", "0")
    assert done.returncode == 0, done.stderr
    assert "no alarm" in done.stdout


def test_jsonl_gives_every_sample_and_event_as_one_object_per_line(tmp_path):
    done = watch(tmp_path, f"virtual:{FIXTURES / 'water-heating-to-boiling.toml'}", "--jsonl", "--speed", "0")
    objects = [json.loads(line) for line in done.stdout.splitlines()]
    samples = [o for o in objects if o["type"] == "sample"]
    events = [o for o in objects if o["type"] == "event"]
    assert len(samples) == len(run_log(tmp_path)["t_s"]) == 2501
    assert {"t_s", "pressure_Pa", "temperature_K", "phase", "quality", "dT_saturation_K", "dp_saturation_Pa",
            "dT_solid_K", "critical_distance", "rates_per_s", "time_to_boundary_s", "active_alarms"} <= set(samples[0])
    assert {"t_s", "kind", "condition", "priority", "value", "limit", "message"} <= set(events[0])
    alarm = next(e for e in events if e["kind"] == "alarm" and e["condition"] == "saturation-temperature")
    assert alarm["priority"] == "high" and alarm["limit"] == 5.0
    times = [o["t_s"] for o in objects if o.get("t_s") is not None]  # null: a source report before the first sample
    assert times == sorted(times)


@pytest.mark.parametrize("stop_signal", [signal.SIGTERM, signal.SIGINT])
def test_a_signal_stops_the_watch_with_every_sample_seen_in_the_log(tmp_path, stop_signal):
    process = start_watch(tmp_path, f"virtual:{FIXTURES / 'water-heating-to-boiling.toml'}", "--jsonl")
    seen = 0
    for line in process.stdout:  # played in real time: 10 samples a second
        seen += json.loads(line)["type"] == "sample"
        if seen == 15:
            break
    process.send_signal(stop_signal)
    rest, _ = process.communicate(timeout=20)
    seen += sum(json.loads(line)["type"] == "sample" for line in rest.splitlines())
    assert process.returncode in (0, 3)
    log = run_log(tmp_path)
    assert len(log["t_s"]) == seen  # recorded first, printed second: nothing printed is missing
    assert f"stopped by {stop_signal.name}" in log.events[-1]["message"]


class LineGauge:
    """A gauge on a TCP port of 127.0.0.1 that streams `lines` in a loop, 20 a second."""

    def __init__(self, lines: list[str]):
        self.lines = lines
        self._server = socket.create_server(("127.0.0.1", 0))
        self.port = self._server.getsockname()[1]
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._serve, daemon=True)
        self._thread.start()

    def _serve(self) -> None:
        self._server.settimeout(0.2)
        while not self._stop.is_set():
            try:
                connection, _ = self._server.accept()
            except TimeoutError:
                continue
            with connection:
                try:
                    while not self._stop.is_set():
                        for line in self.lines:
                            connection.sendall(line.encode() + b"\n")
                            time.sleep(0.05)
                except OSError:
                    continue

    def close(self) -> None:
        self._stop.set()
        self._thread.join()
        self._server.close()


def wait_for(predicate, timeout: float = 30.0) -> None:
    deadline = time.monotonic() + timeout
    while not predicate():
        assert time.monotonic() < deadline, "timed out"
        time.sleep(0.05)


def test_the_hook_gets_the_event_and_a_crafted_gauge_line_cannot_inject_a_command(tmp_path):
    crafted = "; touch semicolon $(touch dollar) `touch backtick`"  # relative to the watch's directory
    gauge = LineGauge(["p=10.0 bar T=20.0 degC"] * 5 + [crafted])
    (tmp_path / "hook.py").write_text(HOOK)
    out = tmp_path / "hook-events.jsonl"
    process = start_watch(tmp_path, f"socket://127.0.0.1:{gauge.port}", "--headless", "--fluid", "CO2",
                          "--on-alarm", f"{sys.executable} hook.py {out.name}")
    try:
        def hooked():
            return out.exists() and any(json.loads(line)["RIGSIDE_EVENT_KIND"] == "alarm"
                                        for line in out.read_text().splitlines())
        wait_for(hooked)
    finally:
        process.send_signal(signal.SIGTERM)
        process.communicate(timeout=20)
        gauge.close()
    calls = [json.loads(line) for line in out.read_text().splitlines()]
    alarm = next(call for call in calls if call["RIGSIDE_EVENT_KIND"] == "alarm")
    assert alarm["RIGSIDE_EVENT_CONDITION"] == "sensor-quality"
    assert alarm["RIGSIDE_EVENT_PRIORITY"] == "medium"
    assert crafted in alarm["RIGSIDE_EVENT_MESSAGE"]  # the line arrives as inert text ...
    assert json.loads(alarm["RIGSIDE_EVENT_JSON"])["condition"] == "sensor-quality"
    assert "sensor-quality" in alarm["RIGSIDE_ACTIVE_ALARMS"]
    for name in ("semicolon", "dollar", "backtick"):  # ... and runs nothing
        assert not (tmp_path / name).exists()


def test_a_failing_hook_is_logged_and_never_stops_the_watch(tmp_path):
    done = watch(tmp_path, f"virtual:{FIXTURES / 'co2-liquid-line-cooling.toml'}", "--headless", "--speed", "0",
                 "--on-alarm", f"{sys.executable} -c 'import sys; sys.exit(5)'")
    assert done.returncode == 3, done.stderr
    notes = [e["message"] for e in run_log(tmp_path).events if e.get("kind") == "note" and "hook" in e["message"]]
    assert notes and all("exit status 5" in note for note in notes)
    assert len(notes) == sum(1 for line in done.stdout.splitlines() if "ALARM" in line and "[" in line
                             or "CLEAR" in line)


@pytest.mark.parametrize("args, named", [
    (["--on-alarm", "no-such-program-anywhere --loud"], "no-such-program-anywhere"),
    (["--on-alarm", "beep 'unclosed"], "--on-alarm"),
    (["--interval", "0"], "--interval"),
    (["--config", "missing.toml"], "missing.toml"),
])
def test_bad_usage_is_one_line_and_exit_status_2(tmp_path, args, named):
    done = watch(tmp_path, f"virtual:{FIXTURES / 'water-calm.toml'}", "--headless", "--speed", "0", *args)
    assert done.returncode == 2
    assert named in done.stderr and len(done.stderr.strip().splitlines()) == 1


def strict_json(line: str):
    """json.loads that refuses the NaN and Infinity tokens Python writes but JSON forbids."""
    def refuse(token):
        raise AssertionError(f"invalid JSON token {token} in {line!r}")
    return json.loads(line, parse_constant=refuse)


def test_jsonl_is_strict_json_and_tells_unknown_from_not_closing(tmp_path):
    csv = tmp_path / "no-wall-clock.csv"  # an invented bench export: no wall-clock column
    csv.write_text("time [s],pressure [bar],temperature [degC]\n"
                   + "".join(f"{k * 0.5},{20.0 + 0.1 * k},{10.0 - 0.05 * k}\n" for k in range(400)))
    done = watch(tmp_path, str(csv), "--jsonl", "--fluid", "CO2", "--speed", "0")
    objects = [strict_json(line) for line in done.stdout.splitlines()]
    samples = [o for o in objects if o["type"] == "sample"]
    assert len(samples) == 400 and all(o["t_wall"] is None for o in samples)
    reports = [o for o in objects if o["type"] == "source"]
    assert all(o["t_wall"] is None for o in reports)
    assert reports[-1]["state"] == "ended" and reports[-1]["t_s"] == samples[-1]["t_s"]  # on the samples' clock
    for sample in samples:
        for margin, seconds in sample["time_to_boundary_s"].items():
            closing = sample["closing"][margin]
            assert (closing is True) == isinstance(seconds, float | int), (margin, seconds, closing)
    first, last = samples[0], samples[-1]
    assert first["closing"]["dT_saturation_K"] is None  # the trend window is not full yet: unknown
    # pressure rising and temperature falling: the liquid moves away from the saturation curve ...
    assert last["closing"]["dT_saturation_K"] is False and last["time_to_boundary_s"]["dT_saturation_K"] is None
    # ... and towards the melting curve (cooling)
    assert last["closing"]["dT_solid_K"] is True and last["time_to_boundary_s"]["dT_solid_K"] > 0
    for line in (tmp_path / "logs").glob("run-*.csv").__next__().read_text().splitlines():
        if line.startswith("# event ") or line.startswith("# meta "):
            strict_json(line.split(" ", 2)[2])


@pytest.mark.parametrize("source", ["virtual", "replay"])
def test_source_reports_are_on_the_samples_clock(tmp_path, source):
    """The run log's 'ended' report comes at the last sample's t_s, however fast the replay ran."""
    if source == "virtual":
        target = f"virtual:{FIXTURES / 'water-calm.toml'}"
    else:
        (tmp_path / "first").mkdir()
        watch(tmp_path / "first", f"virtual:{FIXTURES / 'water-calm.toml'}", "--headless", "--speed", "0")
        (target,) = map(str, (tmp_path / "first" / "logs").glob("run-*.csv"))
    done = watch(tmp_path, target, "--headless", "--speed", "0", "--fluid", "water")
    assert done.returncode == 0, done.stderr
    log = run_log(tmp_path)
    reports = {e["state"]: e for e in log.events if e.get("kind") == "source"}
    assert reports["connected"]["t_s"] == 0.0
    assert reports["ended"]["t_s"] == pytest.approx(float(log["t_s"][-1]), abs=1e-6)
    assert reports["ended"]["t_wall"] == pytest.approx(float(log["t_wall"][-1]), abs=1e-3)


def test_a_custom_fluid_is_watched_labelled_approximate_and_rebuilt_by_analyze(tmp_path):
    spec = "Tc=425.1 K, pc=37.96 bar, omega=0.2, M=58.12 g/mol, Tt=134.9 K, name=n-butane"
    done = watch(tmp_path, f"virtual:{FIXTURES / 'water-calm.toml'}", "--headless", "--speed", "0", "--custom", spec)
    assert done.returncode == 0, done.stderr
    assert "n-butane (approximate, Peng–Robinson) from virtual gauge" in done.stderr
    log = run_log(tmp_path)
    assert log.metadata["config"]["custom-fluid"] == {"name": "n-butane", "Tc": 425.1, "pc": 3.796e6, "omega": 0.2,
                                                      "M": pytest.approx(0.05812), "Tt": 134.9}
    (path,) = (tmp_path / "logs").glob("run-*.csv")
    command = [sys.executable, "-m", "tui.cli", "analyze", str(path), "--json"]
    analysed = subprocess.run(command, cwd=tmp_path, env=environment(tmp_path), capture_output=True, text=True,
                              timeout=120)
    assert analysed.returncode == 0, analysed.stderr
    assert strict_json(analysed.stdout)["fluid"] == "n-butane (approximate, Peng–Robinson)"
    # replaying the log under watch keeps the custom fluid too
    again = watch(tmp_path, str(path), "--headless", "--speed", "0")
    assert again.returncode == 0, again.stderr
    assert "n-butane (approximate, Peng–Robinson) from replay" in again.stderr


def test_two_fluid_choices_are_refused(tmp_path):
    done = watch(tmp_path, f"virtual:{FIXTURES / 'water-calm.toml'}", "--headless", "--fluid", "CO2",
                 "--fluid-file", "x.toml")
    assert done.returncode == 2 and "give exactly one of --fluid, --custom or --fluid-file" in done.stderr
