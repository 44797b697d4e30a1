"""Screen benchmark: the whole app (virtual gauge at 200 samples/s -> monitor -> run log -> screen),
headless, measuring refreshes per second, key-to-screen response and the process's CPU use.

Targets: >= 10 refreshes/s, <= 100 ms from key to screen, <= 30 % of one core. The reference,
measured in the same run, is the same app over a source that sends nothing: the ratios say
what 200 samples/s cost on top of an idle screen.

    python tests/benchmarks/bench_screen.py [--seconds 8]
"""

from __future__ import annotations

import argparse
import asyncio
import resource
import statistics
import sys
import tempfile
import threading
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from textual import events  # noqa: E402

from tui.acquire.scenario import parse_scenario  # noqa: E402
from tui.acquire.source import Counters, Source  # noqa: E402
from tui.acquire.virtual import VirtualGauge  # noqa: E402
from tui.monitor.config import load_config  # noqa: E402
from tui.monitor.pipeline import Monitor  # noqa: E402
from tui.record import RunRecorder  # noqa: E402
from tui.screen.app import make_app  # noqa: E402
from tui.screen.screens.monitor import MonitorScreen  # noqa: E402
from tui.screen.session import Session  # noqa: E402
from tui.screen.widgets.phase_diagram import PhaseDiagram  # noqa: E402

# Invented: CO2 held just above its vapor-pressure curve and swung across it, so margins,
# trends and alarms all move while the screen is measured.
SCENARIO = """
name = "bench: 200 Hz near the CO2 vapor-pressure curve"
fluid = "CO2"
rate_hz = 200
seed = 7
loop = true
start = { pressure = 50.0, temperature = 10.0 }
[noise]
pressure = 0.02
temperature = 0.02
[[segment]]
duration = 20
pressure = 46.0
temperature = 12.0
[[segment]]
duration = 20
pressure = 50.0
temperature = 10.0
"""
SIZE = (120, 40)
KEY_PRESSES = 30


class Silent(Source):
    """The reference source: connected, never a sample."""

    description = "silent reference"

    def __init__(self) -> None:
        self.counters = Counters()

    def batches(self, stop: threading.Event):
        stop.wait()
        yield []


def cpu_seconds() -> float:
    usage = resource.getrusage(resource.RUSAGE_SELF)
    return usage.ru_utime + usage.ru_stime


def watch_painting(diagram: PhaseDiagram) -> dict[str, str]:
    """The view of the diagram's latest row painted by the compositor (the widget itself untouched)."""
    painted = {"view": diagram.view}
    render_line = diagram.render_line

    def spy(y: int):
        painted["view"] = diagram.view
        return render_line(y)

    diagram.render_line = spy
    return painted


async def measure(source, seconds: float, log_dir: Path) -> dict[str, float]:
    recorder = RunRecorder(log_dir)
    session = Session(source, load_config(fluid="CO2"), make_monitor=Monitor, recorder=recorder)
    app = make_app(session)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause(1.5)  # curves computed, first views shown
        screen = app.screen
        assert isinstance(screen, MonitorScreen)
        diagram = screen.query_one(PhaseDiagram)
        painted = watch_painting(diagram)
        samples0, refreshes0 = app.latest_view.samples, screen.refreshes
        wall0, cpu0, screen0 = time.perf_counter(), cpu_seconds(), time.thread_time()
        latencies = []
        deadline = wall0 + seconds
        while time.perf_counter() < deadline:
            await asyncio.sleep(seconds / KEY_PRESSES)
            wanted = "pv" if diagram.view == "pT" else "pT"
            start = time.perf_counter()
            app._driver.send_message(events.Key("d", "d"))  # as the terminal driver does (pilot.press waits for idle)
            while painted["view"] != wanted:
                await asyncio.sleep(0.001)
            latencies.append(time.perf_counter() - start)
        wall, cpu, screen_cpu = time.perf_counter() - wall0, cpu_seconds() - cpu0, time.thread_time() - screen0
        result = {
            "samples per s": (app.latest_view.samples - samples0) / wall,
            "refreshes per s": (screen.refreshes - refreshes0) / wall,
            "key to screen median ms": 1e3 * statistics.median(latencies),
            "key to screen 90th pct ms": 1e3 * statistics.quantiles(latencies, n=10)[-1],
            "key to screen max ms": 1e3 * max(latencies),
            "CPU % of one core": 100.0 * cpu / wall,
            "  of which screen thread %": 100.0 * screen_cpu / wall,
        }
    session.close(2.0)
    return result


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seconds", type=float, default=8.0)
    seconds = parser.parse_args().seconds
    with tempfile.TemporaryDirectory() as folder:
        reference = asyncio.run(measure(Silent(), seconds, Path(folder)))
        loaded = asyncio.run(measure(VirtualGauge(parse_scenario(SCENARIO, "bench")), seconds, Path(folder)))
    print(f"{'':28s}{'200 S/s':>12s}{'silent':>12s}{'ratio':>8s}")
    for name, value in loaded.items():
        ref = reference[name]
        ratio = f"{value / ref:8.2f}" if ref else f"{'—':>8s}"
        print(f"{name:28s}{value:12.1f}{ref:12.1f}{ratio}")
    print("targets: refreshes per s >= 10, key to screen <= 100 ms, CPU <= 30 % of one core")


if __name__ == "__main__":
    main()
