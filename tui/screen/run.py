"""Entry points of the screen: build the session and the app, run it, then close everything in order."""

from __future__ import annotations

import tempfile
import time
from pathlib import Path

from tui.screen.app import make_app
from tui.screen.session import Session

#: the built-in scenario `rigside demo` plays unless told otherwise (tui/acquire/scenarios/)
DEMO_SCENARIO = "view-cell"
#: where `rigside demo` records unless told otherwise (the demo's logs are throwaway)
DEMO_LOG_DIR = Path(tempfile.gettempdir()) / "rigside-demo"
#: how long closing waits for the pipeline thread to let go of the source [s]
CLOSE_WAIT_S = 2.0


def run_watch(source, config, *, recorder=None, label: str = "", make_monitor=None, sinks=()) -> int:
    """Show the screen over `source` (a tui.acquire Source) with the monitor built from
    `config` (a MonitorConfig) by `make_monitor(config)` (default: `Monitor(config)`; `rigside
    watch` passes one that adds the gauge's validator); `recorder` (a RunRecorder) gets every
    batch first, the screen next, then each of `sinks` (e.g. the --on-alarm hook; the caller
    closes them). Closes the source and the recorder before returning; the exit status is the
    app's (0, or 1 when the screen failed)."""
    from tui.monitor.pipeline import Monitor

    paced = hasattr(source, "pacer")  # replays and the virtual gauge keep their own time
    session = Session(source, config, make_monitor=make_monitor or Monitor, recorder=recorder, label=label,
                      stale_clock=None if paced else time.monotonic, sinks=sinks)
    app = make_app(session, pressure_unit=config.pressure_unit.label, temperature_unit=config.temperature_unit.label)
    try:
        app.run()
    finally:
        session.close(CLOSE_WAIT_S)
    return app.return_code or 0


def run_demo(scenario: str | None = None, *, speed: float = 1.0, log_dir: str | Path | None = None,
             config_path: str | Path | None = None) -> int:
    """`rigside demo`: the built-in invented scenario (or `scenario`) played by the virtual gauge
    in-process, recorded to `log_dir` (default: a folder in the system's temporary directory)."""
    from tui.acquire import SourceOptions, open_source
    from tui.monitor.config import load_config
    from tui.record import RunRecorder

    source = open_source(f"virtual:{scenario or DEMO_SCENARIO}", SourceOptions(speed=speed))
    config = load_config(config_path, fluid=source.scenario.fluid)
    recorder = RunRecorder(Path(log_dir) if log_dir else DEMO_LOG_DIR,
                           {"source": source.description, "config": config.to_json()})
    return run_watch(source, config, recorder=recorder, label=f"demo {scenario or DEMO_SCENARIO}: {source.description}")
