"""Cost of the monitor pipeline, with all eleven alarm conditions (ten and more) configured.

Live: `Monitor.process` per sample for chunks of several sizes (classification included,
acquisition's validator excluded and then included), each with the sample rate at which
`run_live` (one chunk per poll) hands over chunks of that size and the share of a core the
monitor then takes. Reference measured in the same run:
thermo's classification called once per sample, the per-sample path the chunked design avoids.
Target: <= 20 us per sample on top of acquisition.

Batch: `run_batch` over one million samples (10 Hz, about 28 hours of a CO2 rig), against
thermo's classification of the same states alone. Target: <= about 1.5 s.

    python tests/benchmarks/bench_pipeline.py [--samples N]
"""

from __future__ import annotations

import argparse
import inspect
import time

import numpy as np

import thermo
from tui.acquire.sample import Quality, Sample
from tui.acquire.validate import Validator
from tui.monitor.batch import run_batch
from tui.monitor.config import load_config
from tui.monitor.pipeline import Monitor, run_live

ALL_ON = {"saturation-pressure"}  # off by default; on here so that every condition is evaluated
#: run_live's default poll interval [s]: at a sample rate R it hands the monitor chunks of R * POLL_S
POLL_S = inspect.signature(run_live).parameters["poll_s"].default
#: live cost [us/sample] by chunk size before the small-chunk work on thermo's classification
#: (commit 6fc8401, this machine, 2026-12-01), printed beside today's figures
BEFORE_US = {1: 673.0, 10: 54.2, 50: 16.7, 200: 6.7, 1000: 4.6}


def config_all_on(tmp):
    path = tmp / "all-on.toml"
    path.write_text("".join(f"[conditions.{name}]\nenabled = true\n" for name in ALL_ON))
    return load_config(path, fluid="CO2")


def rig_run(n: int, seed: int = 5):
    """An invented CO2 run at 10 Hz: pressure and temperature wander across the saturation curve,
    towards the melting curve and round the critical point, with noise and 0.5 % bad samples."""
    rng = np.random.default_rng(seed)
    t = np.arange(n) * 0.1
    T = 262.0 + 40.0 * np.sin(t / 900.0) + 5.0 * np.sin(t / 97.0) + rng.normal(0, 0.05, n)
    p = thermo.fluid("CO2").saturation_pressure(np.clip(T, 217.0, 304.0)) * (1.0 + 0.08 * np.sin(t / 131.0))
    p = p + rng.normal(0, 2000.0, n)
    quality = np.where(rng.random(n) < 0.005, "failure", "ok")
    return t, p, T, quality


def best_of(repeats: int, function) -> float:
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return min(times)


def bench_live(config, t, p, T, quality) -> None:
    samples = [Sample(float(a), 1.8e9 + float(a), float(b), float(c), "", Quality(q))
               for a, b, c, q in zip(t, p, T, quality)]
    n = len(samples)
    fluid = thermo.fluid(config.fluid)
    reference_n = min(n, 2000)
    reference = best_of(3, lambda: [fluid.classify(T[i], p[i], 0.1, 5000.0) for i in range(reference_n)]) / reference_n
    print(f"reference: thermo classify once per sample            {reference * 1e6:9.1f} us/sample")
    for validated in (False, True):
        for chunk in (1, 10, 50, 200, 1000):
            count = min(n, 3000 if chunk == 1 else n)

            def feed():
                monitor = Monitor(config, validator=Validator() if validated else None)
                for start in range(0, count, chunk):
                    monitor.process(samples[start:start + chunk])

            per_sample = best_of(2, feed) / count
            label = "with validator" if validated else "monitor       "
            before = "" if validated else f"; before: {BEFORE_US[chunk]:6.1f} us/sample"
            rate = chunk / POLL_S  # the sample rate at which run_live hands over chunks of this size
            print(f"live {label} chunk {chunk:5d}: {per_sample * 1e6:9.1f} us/sample "
                  f"({per_sample / reference:5.2f} x reference{before}; at {rate:6.0f} S/s "
                  f"{per_sample * rate * 100:5.1f} % of a core)")


def bench_batch(config, n: int) -> None:
    t, p, T, quality = rig_run(n)
    fluid = thermo.fluid(config.fluid)
    classify = best_of(2, lambda: fluid.classify(T, p, config.u_temperature_K, config.u_pressure_Pa))
    result = None

    def batch():
        nonlocal result
        result = run_batch(t, p, T, quality, config)

    whole = best_of(2, batch)
    print(f"batch: {n} samples, {len(result.events)} events, {len(result.active_alarms)} conditions")
    print(f"  reference: thermo classify of all states        {classify:7.3f} s")
    print(f"  run_batch (classification, trend, alarms)       {whole:7.3f} s ({whole / classify:4.2f} x reference, "
          f"{whole / n * 1e6:5.2f} us/sample; monitor alone {(whole - classify) / n * 1e6:5.2f} us/sample)")


def main() -> None:
    import tempfile
    from pathlib import Path

    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--samples", type=int, default=1_000_000, help="samples of the batch run")
    parser.add_argument("--live-samples", type=int, default=20_000, help="samples of the live runs")
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        config = config_all_on(Path(tmp))
    print(f"conditions configured: {len(Monitor(config).conditions)}")
    bench_live(config, *rig_run(args.live_samples))
    bench_batch(config, args.samples)


if __name__ == "__main__":
    main()
