"""Benchmark of the whole ingest path: bytes in, samples out, validated, classified and recorded.

    python tests/benchmarks/bench_ingest.py [LINES]

Three ways in, each ending in a run log on disk:
- pty: `rigside simulate --speed 0 --loop` (another process, the other core) writes the generic
  line format into a pseudo-terminal as fast as we take it; we read it with the serial source.
- replay: a run log of the same length, replayed as fast as possible.
- Both go through the same path: Validator.check per sample, thermo's fluid("CO2").classify on
  each chunk (what arrived within 50 ms, at most about 2 k samples, as a pipeline batches), a Reading per sample, RunRecorder.write_many per chunk. The pty stream is measured
  a second time through the monitor's pipeline (trend and alarms too) with its recorder sink.
Reference, measured in the same run: pyserial's readline() over the same pty stream, reading
lines only (DESIGN §5 measured it at 2.8 k lines/s). The wire itself carries about 440 lines/s
at 115200 baud 8N1 (26-byte lines). Target: at least 50 k lines/s on one core.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):  # one core, before numpy loads
    os.environ[_var] = "1"

import subprocess  # noqa: E402
import sys  # noqa: E402
import tempfile  # noqa: E402
import threading  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import serial  # noqa: E402

from thermo import fluid  # noqa: E402
from tui.acquire import SourceOptions, open_source  # noqa: E402
from tui.acquire.sample import Sample  # noqa: E402
from tui.acquire.validate import Validator  # noqa: E402
from tui.monitor.model import MARGINS, UNCLASSIFIED, Reading  # noqa: E402
from tui.record import RunRecorder  # noqa: E402

TARGET = 50_000
CHUNK, CHUNK_S = 2048, 0.05
WIRE_LINES_PER_S = 115_200 / 10 / 26
ROOT = Path(__file__).resolve().parents[2]


def start_simulator() -> tuple[subprocess.Popen, str]:
    child = subprocess.Popen(
        [sys.executable, "-m", "tui.cli", "simulate", "view-cell", "--pty", "--speed", "0", "--loop"],
        stdout=subprocess.PIPE, stderr=subprocess.DEVNULL, text=True, cwd=ROOT,
        env=os.environ | {"PYTHONPATH": str(ROOT)},
    )
    return child, child.stdout.readline().strip()


def chunks(source, stop: threading.Event):
    """Samples gathered into chunks of at least CHUNK (or what came in CHUNK_S), as a pipeline
    hands them to classification."""
    waiting, since = [], time.monotonic()
    for batch in source.batches(stop):
        waiting += [s for s in batch if isinstance(s, Sample)]
        if len(waiting) >= CHUNK or (waiting and time.monotonic() - since > CHUNK_S):
            yield waiting
            waiting, since = [], time.monotonic()
    if waiting:
        yield waiting


def ingest(source, lines: int, log: Path) -> tuple[int, float, float]:
    """Our path over `lines` samples; returns (samples, wall s, CPU s of this process)."""
    co2, validator = fluid("CO2"), Validator()
    stop, done = threading.Event(), 0
    recorder = RunRecorder(log, {"source": source.description})
    wall, cpu = time.perf_counter(), time.process_time()
    for chunk in chunks(source, stop):
        samples = [validator.check(s) for s in chunk]
        T = np.fromiter((s.temperature_K for s in samples), float, len(samples))
        p = np.fromiter((s.pressure_Pa for s in samples), float, len(samples))
        usable = np.fromiter((s.quality.classifiable for s in samples), bool, len(samples))
        c = co2.classify(np.where(usable, T, np.nan), np.where(usable, p, np.nan), u_T=0.05, u_p=1e3)
        phases = np.where(usable, c.phase, UNCLASSIFIED).tolist()
        margins = np.stack([c.dT_saturation, c.dp_saturation, c.dT_solid, c.critical_distance], axis=1).tolist()
        recorder.write_many([Reading(s, ph, dict(zip(MARGINS, m))) for s, ph, m in zip(samples, phases, margins)])
        done += len(samples)
        if done >= lines:
            stop.set()
    recorder.close()
    return done, time.perf_counter() - wall, time.process_time() - cpu


def ingest_monitor(source, lines: int, log: Path) -> tuple[int, float, float]:
    """The monitor's pipeline (validation, classification, trend, alarms) and its recorder sink."""
    from tui.monitor.config import load_config
    from tui.monitor.pipeline import Monitor
    from tui.monitor.sinks import RecorderSink

    monitor = Monitor(load_config(fluid="CO2"), validator=Validator())
    sink = RecorderSink(RunRecorder(log, {"source": source.description}))
    stop, done = threading.Event(), 0
    wall, cpu = time.perf_counter(), time.process_time()
    for samples in chunks(source, stop):
        sink.write(*monitor.process(samples))
        done += len(samples)
        if done >= lines:
            stop.set()
    sink.close()
    return done, time.perf_counter() - wall, time.process_time() - cpu


def readline_reference(path: str, lines: int) -> float:
    """Lines/s of pyserial's readline() over the same stream (reading only)."""
    port = serial.serial_for_url(path, timeout=1.0)
    start = time.perf_counter()
    for _ in range(lines):
        port.readline()
    rate = lines / (time.perf_counter() - start)
    port.close()
    return rate


def report(name: str, done: int, wall: float, cpu: float) -> float:
    rate = done / cpu
    verdict = "meets" if rate >= TARGET else "MISSES"
    print(f"{name:<34} {done:>8} lines  {done / wall:>9,.0f} lines/s wall  {rate:>9,.0f} lines/s CPU  "
          f"({verdict} {TARGET:,}; {rate / WIRE_LINES_PER_S:,.0f}x the 115200-baud wire)")
    return rate


def main() -> None:
    lines = int(sys.argv[1]) if len(sys.argv) > 1 else 200_000
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        child, path = start_simulator()
        try:
            reference = readline_reference(path, min(lines, 20_000))
            pty = report("pty -> validate/classify/record", *ingest(open_source(path), lines, folder / "pty.csv"))
            report("pty -> monitor pipeline -> record", *ingest_monitor(open_source(path), lines, folder / "monitor.csv"))
        finally:
            child.terminate()
            child.wait()
        replay = open_source(str(folder / "pty.csv"), SourceOptions(speed=0))
        report("replay -> validate/classify/record", *ingest(replay, lines, folder / "replay.csv"))
    print(f"{'reference: pyserial readline() only':<34} {reference:>27,.0f} lines/s wall")
    print(f"ratio pty path / readline reference: {pty / reference:.1f}")


if __name__ == "__main__":
    main()
