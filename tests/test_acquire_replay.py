"""Replay of run logs and CSV files: pace, speed, pause, step, seek; garbled files keep their good rows."""

import threading
import time

import pytest

from tui.acquire import SourceOptions, open_source
from tui.acquire.sample import Quality, Sample, SourceStatus
from tui.monitor.model import Reading
from tui.record import RunRecorder

CSV = "time [s],pressure [bar],temperature [degC]\n" + "".join(f"{i / 10},{1 + i / 100},{20 + i / 10}\n" for i in range(50))


def play(source, stop=None):
    stop = stop or threading.Event()
    return list(source.iter(stop))


def samples(items):
    return [i for i in items if isinstance(i, Sample)]


def test_csv_with_garbage_rows_and_a_truncated_last_line(tmp_path):
    path = tmp_path / "rig.csv"
    lines = CSV.splitlines()
    lines[5] = "\x00\x01garbage"
    path.write_text("\n".join(lines) + "\n4.9,1.4")
    source = open_source(str(path), SourceOptions(speed=0))
    assert [n for n, _ in source.table.bad_lines] == [6, 52]  # the header is line 1
    items = play(source)
    assert isinstance(items[0], SourceStatus) and items[0].state == "connected"
    assert items[-1].state == "ended"
    got = samples(items)
    assert len(got) == 49 and got[0].pressure_Pa == pytest.approx(1e5) and got[-1].temperature_K == pytest.approx(298.05)
    assert source.counters.malformed == 2 and "2 bad lines skipped" in source.description


def test_recorded_pace_and_speed_factor(tmp_path):
    path = tmp_path / "rig.csv"
    path.write_text(CSV)  # 4.9 s of log
    start = time.monotonic()
    play(open_source(str(path), SourceOptions(speed=10)))
    assert 0.4 < time.monotonic() - start < 2.0
    start = time.monotonic()
    play(open_source(str(path), SourceOptions(speed=0)))
    assert time.monotonic() - start < 0.4


def test_pause_step_seek_from_another_thread(tmp_path):
    path = tmp_path / "rig.csv"
    path.write_text(CSV)
    source = open_source(str(path), SourceOptions(speed=1))
    stop, items = threading.Event(), []
    worker = threading.Thread(target=lambda: items.extend(source.iter(stop)), daemon=True)
    source.pause()
    worker.start()
    time.sleep(0.3)
    assert [i.state for i in items] == ["connected", "paused"] and source.paused
    source.step()
    source.step()
    time.sleep(0.3)
    assert [s.t_monotonic for s in samples(items)] == [0.0, 0.1]
    source.seek(4.0)
    source.set_speed(0)
    source.resume()
    worker.join(3)
    assert not worker.is_alive()
    assert [round(s.t_monotonic, 1) for s in samples(items)][2:] == [4.0, 4.1, 4.2, 4.3, 4.4, 4.5, 4.6, 4.7, 4.8, 4.9]
    assert source.position == pytest.approx(4.9)


def test_run_log_replay_keeps_recorded_quality_and_raw(tmp_path):
    with RunRecorder(tmp_path / "run.csv") as rec:
        for t in range(5):
            q, why = (Quality.FAILURE, ("malformed: noise",)) if t == 2 else (Quality.OK, ())
            rec.write(Reading(Sample(10.0 + t, 1.7e9 + t, 1e6, 300.0, f"line {t}", q, why), "gas", {}))
    got = samples(play(open_source(str(rec.path), SourceOptions(speed=0))))
    assert [s.t_monotonic for s in got] == [0.0, 1.0, 2.0, 3.0, 4.0]
    assert [s.raw for s in got] == [f"line {t}" for t in range(5)]
    assert got[2].quality is Quality.FAILURE and got[2].reasons == ("malformed: noise",)
    assert got[0].t_wall == 1.7e9


def test_linger_waits_at_the_end_for_a_seek_back(tmp_path):
    path = tmp_path / "rig.csv"
    path.write_text(CSV)
    source = open_source(str(path), SourceOptions(speed=0))
    source.linger = True
    stop, items = threading.Event(), []
    worker = threading.Thread(target=lambda: items.extend(source.iter(stop)), daemon=True)
    worker.start()
    time.sleep(0.3)
    assert items[-1].state == "ended" and worker.is_alive()
    source.seek(4.5)
    time.sleep(0.5)
    stop.set()
    worker.join(3)
    assert [round(s.t_monotonic, 1) for s in samples(items)][-5:] == [4.5, 4.6, 4.7, 4.8, 4.9]


def test_replay_of_a_data_logger_export_fixture():
    source = open_source("fixtures/logs/bench-logger-export.csv", SourceOptions(speed=0))
    got = samples(play(source))
    assert [n for n, _ in source.table.bad_lines] == [62, 122]  # the garbled row and the cut last line
    assert len(got) == 119 and got[0].t_monotonic == 0.0 and got[-1].t_monotonic == 119.0
    assert got[0].pressure_Pa == pytest.approx(56.2e5 + 101_325.0)  # bar(g) against 1 atm
    assert got[0].t_wall == pytest.approx(1773478800.0)  # 2026-03-14T09:00:00Z
