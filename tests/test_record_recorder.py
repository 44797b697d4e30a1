"""The run recorder: format, never overwrite, rollover, events and gaps, and kill -9."""

import json
import math
import os
import signal
import subprocess
import sys
import textwrap
import time

import pytest

from tui.acquire.sample import Quality, Sample, SourceStatus
from tui.errors import UsageError
from tui.monitor.model import Event, Reading
from tui.record import FORMAT_LINE, RunRecorder, read_table, run_parts
from tui.record.recorder import COLUMNS

MARGINS = {"dT_saturation_K": -1.5, "dp_saturation_Pa": -2e5, "dT_solid_K": 80.0, "critical_distance": 0.1}


def reading(t, raw="p=50 bar T=27 degC", quality=Quality.OK, reasons=(), alarms=()):
    return Reading(Sample(100.0 + t, 1.7e9 + t, 5e6 + t, 300.0, raw, quality, reasons), "liquid", dict(MARGINS), active_alarms=alarms)


def test_round_trip_of_rows_events_and_notes(tmp_path):
    with RunRecorder(tmp_path, {"source": "loop://", "config": {"fluid": "CO2"}}) as rec:
        rec.write(reading(0.0))
        rec.write_event(Event(0.5, 1.7e9, "alarm", "near-saturation", "high", value=-1.5, limit=math.nan))
        rec.write_many([reading(1.0, raw='say "hi",\x00', quality=Quality.FAILURE, reasons=("a; b", "c")),
                        reading(2.0, alarms=("near-saturation", "near-solid"))])
        rec.write_note("valve V3 opened")
    path = rec.path
    assert path.parent == tmp_path and path.name.startswith("run-") and path.suffix == ".csv"
    lines = path.read_text().splitlines()
    assert lines[0] == FORMAT_LINE and lines[1].startswith("# meta {") and lines[2] == ",".join(COLUMNS)
    table = read_table(path, texts=("quality", "phase", "active_alarms", "reasons", "raw"))
    assert len(table) == 3 and not table.bad_lines
    assert table["t_s"].tolist() == [0.0, 1.0, 2.0]
    assert table["pressure_Pa"][1] == 5e6 + 1.0
    assert table["raw"][1] == 'say "hi",\\x00' and table["reasons"][1] == "a; b; c"
    assert table["quality"].tolist() == ["ok", "failure", "ok"]
    assert table["active_alarms"][2] == "near-saturation;near-solid"
    assert table.metadata["config"] == {"fluid": "CO2"} and table.metadata["part"] == 1
    assert [e["kind"] for e in table.events] == ["alarm", "note"]
    assert table.events[0]["limit"] is None and table.events[1]["t_s"] == 2.0


def test_never_overwrites(tmp_path):
    target = tmp_path / "mine.csv"
    RunRecorder(target).close()
    with pytest.raises(UsageError, match="exists; rigside never overwrites a log"):
        RunRecorder(target)
    first, second = RunRecorder(tmp_path / "logs"), RunRecorder(tmp_path / "logs")
    first.close()
    second.close()
    assert first.path != second.path and first.path.parent == second.path.parent


def test_rollover_repeats_the_header_and_parts_read_as_one_run(tmp_path):
    rec = RunRecorder(tmp_path / "run.csv", {"source": "x"}, max_bytes=2000)
    for t in range(60):
        rec.write(reading(float(t)))
    rec.close()
    parts = run_parts(rec.path)
    assert parts == rec.paths and len(parts) > 2
    assert parts[1].name == "run.part2.csv"
    for n, part in enumerate(parts, 1):
        head = part.read_text().splitlines()[:3]
        assert head[0] == FORMAT_LINE and json.loads(head[1][7:])["part"] == n and head[2] == ",".join(COLUMNS)
    table = read_table(parts)
    assert table["t_s"].tolist() == [float(t) for t in range(60)]


def test_gap_recorded_when_the_source_comes_back(tmp_path):
    rec = RunRecorder(tmp_path / "run.csv", t0=0.0)
    rec.write_status(SourceStatus(1.0, 0.0, "connected", "up"))
    rec.write_status(SourceStatus(2.0, 0.0, "disconnected", "cable"))
    rec.write_status(SourceStatus(3.0, 0.0, "reconnecting", "no"))
    rec.write_status(SourceStatus(4.5, 0.0, "connected", "up"))
    rec.close()
    events = read_table(rec.path).events
    assert [e.get("state") for e in events if e["kind"] == "source"] == ["connected", "disconnected", "reconnecting", "connected"]
    [gap] = [e for e in events if e["kind"] == "gap"]
    assert (gap["from_t_s"], gap["duration_s"], gap["t_s"]) == (2.0, 2.5, 4.5)


def test_flushed_without_further_writes(tmp_path):
    rec = RunRecorder(tmp_path / "run.csv", flush_interval_s=0.1)
    rec.write(reading(0.0))
    time.sleep(0.5)
    assert len(read_table(rec.path)) == 1, "the timer flushed the row though nothing else was written"
    rec.close()


def test_closed_recorder_refuses_writes(tmp_path):
    rec = RunRecorder(tmp_path / "run.csv")
    rec.close()
    rec.close()
    with pytest.raises(ValueError, match="closed"):
        rec.write(reading(0.0))


WRITER = textwrap.dedent(
    """
    import sys, time
    from tui.acquire.sample import Sample
    from tui.monitor.model import Reading
    from tui.record import RunRecorder
    rec = RunRecorder(sys.argv[1], {"source": "kill test"})
    n = 0
    while True:
        batch = [Reading(Sample(n + i, 1.7e9, 5e6, 300.0, "p=50 bar T=27 degC"), "liquid", {}) for i in range(50)]
        rec.write_many(batch)
        n += 50
        print(n, time.monotonic(), flush=True)
        time.sleep(0.01)
    """
)


def test_kill_9_loses_at_most_the_last_second(tmp_path):
    target = tmp_path / "killed.csv"
    child = subprocess.Popen([sys.executable, "-c", WRITER, str(target)], stdout=subprocess.PIPE, text=True,
                             cwd=os.getcwd(), env=os.environ | {"PYTHONPATH": os.getcwd()})
    progress = []
    try:
        while len(progress) < 5 or progress[-1][1] - progress[4][1] < 2.0:
            line = child.stdout.readline()
            assert line, "the writer died"
            count, at = line.split()
            progress.append((int(count), float(at)))
        killed_at = time.monotonic()
        child.send_signal(signal.SIGKILL)
    finally:
        child.kill()
        child.wait()
    safe = max(count for count, at in progress if at <= killed_at - 1.0)
    table = read_table(target)
    assert len(table) >= safe
    assert table["t_s"].tolist() == [float(i) for i in range(len(table))], "every row before the cut is whole"
    assert all(reason.startswith("truncated") for _, reason in table.bad_lines) and len(table.bad_lines) <= 1
