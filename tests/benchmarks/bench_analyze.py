"""`rigside analyze` on run logs of 10 k, 100 k and 1 M samples: wall time and peak memory.

    python tests/benchmarks/bench_analyze.py [SAMPLES ...]

The logs are written at run time in the run-log format (an invented CO2 view cell heated and
pressurised through the critical region at 10 Hz, with gauge noise, so every branch of the
classification and several alarms are exercised). Each analysis runs in a fresh process, as a
person would start it: the time is that of `main([...])` inside the process, the memory the
process's peak resident set (resource.getrusage), which includes the interpreter and libraries.
Both wall and CPU seconds are printed (the least CPU time of two runs): the machine may be
shared, and CPU time is the steadier.
Reference measured in the same run: reading the log's bytes and splitting its lines, the floor
of any reader. Targets (issue 6): 1 M samples in at most 3 s and 500 MB.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):  # one core, before numpy loads
    os.environ[_var] = "1"

import json  # noqa: E402
import math  # noqa: E402
import subprocess  # noqa: E402
import sys  # noqa: E402
import tempfile  # noqa: E402
import time  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402

from tui.analysis.csv_text import Labels, Numbers, write_csv  # noqa: E402
from tui.monitor.config import load_config  # noqa: E402
from tui.record.recorder import COLUMNS, FORMAT_LINE, META_PREFIX  # noqa: E402

SIZES = (10_000, 100_000, 1_000_000)
RATE_HZ = 10.0

_CHILD = """
import json, resource, sys, time
from tui.cli import main
argv = json.loads(sys.argv[1])
start, cpu = time.perf_counter(), time.process_time()
status = main(argv)
elapsed, cpu = time.perf_counter() - start, time.process_time() - cpu
peak_MB = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
print(json.dumps({"status": status, "seconds": elapsed, "cpu_s": cpu, "peak_MB": peak_MB}), file=sys.stderr)
"""


def write_log(path: Path, samples: int) -> None:
    """A run log of an invented view-cell run: 40 -> 90 bar and 280 -> 320 K with noise."""
    rng = np.random.default_rng(11)
    t = np.arange(samples) / RATE_HZ
    ramp = np.linspace(0.0, 1.0, samples)
    p = 40e5 + 50e5 * ramp + rng.normal(0.0, 2e3, samples)
    T = 280.0 + 40.0 * ramp**0.8 + rng.normal(0.0, 0.02, samples)
    raw_texts = [f"p={50 + i / 100:.3f} bar T={20 + i / 50:.2f} degC" for i in range(1000)]
    nan = np.full(samples, np.nan)
    empty = Labels(np.zeros(samples, dtype=np.intp), [""])
    columns = [
        Numbers(t, 6), Numbers(1.8e9 + t, 6), Numbers(p, 1), Numbers(T, 4),
        Labels(np.zeros(samples, dtype=np.intp), ["ok"]), Labels(np.zeros(samples, dtype=np.intp), ["unclassified"]),
        Numbers(nan, 4), Numbers(nan, 1), Numbers(nan, 4), Numbers(nan, 6), empty, empty,
        Labels(rng.integers(0, len(raw_texts), samples), raw_texts),
    ]
    meta = {"started": "2026-12-01T08:00:00Z", "part": 1, "source": "benchmark", "fluid": "CO2",
            "config": load_config(None, fluid="CO2").to_json()}
    with open(path, "wb") as stream:
        stream.write(f"{FORMAT_LINE}\n{META_PREFIX}{json.dumps(meta)}\n".encode())
        write_csv(stream, list(COLUMNS), columns)


def analyze_in_child(argv: list[str], repeats: int = 2) -> dict:
    """The run with the least CPU time of a few (the machine may be shared)."""
    runs = []
    for _ in range(repeats):
        done = subprocess.run([sys.executable, "-c", _CHILD, json.dumps(argv)], capture_output=True, text=True,
                              cwd=Path(__file__).resolve().parents[2])
        if done.returncode != 0:
            raise SystemExit(done.stderr)
        runs.append(json.loads(done.stderr.strip().splitlines()[-1]))
    return min(runs, key=lambda run: run["cpu_s"])


def floor_seconds(path: Path) -> float:
    start = time.perf_counter()
    path.read_bytes().split(b"\n")
    return time.perf_counter() - start


def main(sizes) -> None:
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for samples in sizes:
            log = Path(tmp) / f"run-{samples}.csv"
            write_log(log, samples)
            summary = analyze_in_child(["analyze", str(log), "--json"])
            annotated = analyze_in_child(["analyze", str(log), "--json", "--annotate", str(Path(tmp) / "annotated.csv")])
            rows.append((samples, log.stat().st_size / 1e6, summary, annotated, floor_seconds(log)))
    print(f"{'samples':>9} {'log MB':>7} {'wall s':>7} {'cpu s':>6} {'peak MB':>8} {'us/sample':>10} {'x floor':>8}"
          f"   with --annotate: {'wall s':>7} {'cpu s':>6} {'peak MB':>8}")
    for samples, size, summary, annotated, floor in rows:
        print(f"{samples:>9} {size:>7.1f} {summary['seconds']:>7.2f} {summary['cpu_s']:>6.2f} {summary['peak_MB']:>8.0f} "
              f"{1e6 * summary['cpu_s'] / samples:>10.2f} {summary['seconds'] / floor:>8.1f}"
              f"   {'':>17}{annotated['seconds']:>7.2f} {annotated['cpu_s']:>6.2f} {annotated['peak_MB']:>8.0f}")
    if len(rows) > 1:
        (n0, _, first, *_), (n1, _, last, *_) = rows[0], rows[-1]
        exponent = math.log(last["cpu_s"] / first["cpu_s"]) / math.log(n1 / n0)
        print(f"CPU time grows as samples^{exponent:.2f} from {n0} to {n1} samples (fixed start-up costs weigh on small logs)")
        (m0, _, below, *_), (m1, _, above, *_) = rows[-2], rows[-1]
        print(f"marginal cost from {m0} to {m1} samples: {1e6 * (above['cpu_s'] - below['cpu_s']) / (m1 - m0):.2f} us "
              f"and {1e3 * (above['peak_MB'] - below['peak_MB']) / (m1 - m0):.2f} kB per sample")
    print("targets: 1 M samples in at most 3 s and 500 MB (summary; the annotated copy is extra work)")


if __name__ == "__main__":
    main([int(a) for a in sys.argv[1:]] or SIZES)
