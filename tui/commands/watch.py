"""`rigside watch SOURCE`: phase, margins and alarms over a live gauge, a replayed log or the
virtual gauge; on the screen, or headless for rigs with only a terminal (or nothing at all).

Headless, a status line goes to stdout every --interval seconds and every event as it
happens (--jsonl: every sample and event as JSON Lines instead); the run is recorded to a new
run log; SIGINT or SIGTERM stop it with the log flushed and closed.

Exit status: 0 the watch ended with no alarm active; 3 it ended with an alarm active
(unacknowledged or acknowledged); 1 a runtime failure (device gone for good, disk full);
2 bad usage (option, configuration, source).
"""

from __future__ import annotations

import argparse
import os
import signal
import sys
import threading
import time
from pathlib import Path

from tui.cli import SAFETY_NOTE
from tui.errors import UsageError

#: exit status when an alarm is active at the end of the watch
EXIT_ALARM_ACTIVE = 3

_EPILOG = f"""exit status: 0 no alarm active at the end, {EXIT_ALARM_ACTIVE} an alarm active at the end,
1 runtime failure, 2 bad usage.

--on-alarm CMD runs CMD (split like a shell command line, but run without a shell) on every
alarm, clear, ack, shelve and flood event, with the event in RIGSIDE_EVENT_* environment
variables and the active alarms in RIGSIDE_ACTIVE_ALARMS; its failures are logged, never fatal.

{SAFETY_NOTE}"""


def add_parser(subparsers) -> None:
    from tui.acquire import add_source_arguments
    from tui.commands.fluids import add_custom_fluid_arguments

    parser = subparsers.add_parser(
        "watch",
        help="watch a gauge, a replay or the virtual gauge: phase, margins, alarms",
        description="Phase, margins to every phase boundary, trends and alarms of a pure fluid, live.",
        epilog=_EPILOG,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument("source", metavar="SOURCE",
                        help="serial device or pyserial URL (socket://, rfc2217://, loop://), modbus-tcp://, "
                             "a run log or CSV to replay, or virtual:SCENARIO")
    parser.add_argument("--fluid", help="the fluid (default: the configuration's, or the scenario's or log's)")
    add_custom_fluid_arguments(parser)
    parser.add_argument("--config", metavar="FILE", help="monitor configuration (TOML; see `rigside config --default`)")
    parser.add_argument("--headless", action="store_true", help="no screen: status lines and events on stdout")
    parser.add_argument("--jsonl", action="store_true", help="headless, with every sample and event as JSON Lines")
    parser.add_argument("--interval", type=float, default=1.0, metavar="S", help="seconds between status lines (default 1)")
    parser.add_argument("--on-alarm", metavar="CMD", help="program to run on each alarm event (no shell)")
    parser.add_argument("--hook-timeout", type=float, default=10.0, metavar="S",
                        help="longest an --on-alarm program may run (default 10 s)")
    parser.add_argument("--log-dir", metavar="DIR", help=f"where run logs go (default {default_log_dir()})")
    add_source_arguments(parser)


def default_log_dir() -> Path:
    """The platform's usual place for a program's logs."""
    if sys.platform == "win32":
        return Path(os.environ.get("LOCALAPPDATA", Path.home() / "AppData" / "Local")) / "rigside" / "runs"
    if sys.platform == "darwin":
        return Path.home() / "Library" / "Logs" / "rigside"
    return Path(os.environ.get("XDG_STATE_HOME") or Path.home() / ".local" / "state") / "rigside" / "runs"


def run(args: argparse.Namespace) -> int:
    from tui.acquire import SourceOptions, open_source
    from tui.monitor.hook import split_command

    if args.interval <= 0 or args.hook_timeout <= 0:
        raise UsageError("--interval and --hook-timeout must be positive numbers of seconds")
    headless = args.headless or args.jsonl
    hook_argv = split_command(args.on_alarm) if args.on_alarm else None
    options = SourceOptions.from_args(args)
    monitors = MonitorFactory(options)  # checks the profile before any device is opened
    source = open_source(args.source, options)
    try:
        config = _config(args, source)
        recorder = _recorder(args, source, config)
    except BaseException:
        source.close()
        raise
    hook = monitors.hook(hook_argv, args.hook_timeout) if hook_argv is not None else None
    if not headless:
        return _screen(source, config, recorder, monitors, hook)
    print(SAFETY_NOTE, file=sys.stderr)
    print(f"rigside watch: {config.thermo_fluid.name} from {source.description}; configuration: {config.origin}; "
          f"recording to {recorder.path}", file=sys.stderr)
    return _headless(args, source, config, recorder, monitors, hook)


class MonitorFactory:
    """Builds the monitor of a watch, the same way headless and on the screen: with the
    acquisition checks (span, spike, stuck, stale, NE 43) of the gauge's profile. The screen
    builds a new monitor when the operator switches fluid; the gauge's checks and their history
    go on (one validator per watch), and the alarm hook follows the newest monitor."""

    def __init__(self, options):
        from tui.acquire import load_profile
        from tui.acquire.validate import Validator, ValidatorConfig

        profile = load_profile(options.profile)
        self.validator = Validator(ValidatorConfig.from_profile(profile, atmosphere_Pa=options.atmosphere_Pa))
        self.latest = None

    def __call__(self, config):
        from tui.monitor.pipeline import Monitor

        self.latest = Monitor(config, validator=self.validator)
        return self.latest

    def hook(self, argv: list[str], timeout_s: float):
        """The --on-alarm hook, reporting its failures as notes of the newest monitor."""
        from tui.monitor.hook import AlarmHook

        return AlarmHook(argv, timeout_s=timeout_s, report=lambda text: self.latest.note(text, "hook"),
                         active_alarms=lambda: self.latest.active_alarms())


def _config(args, source):
    from tui.commands.fluids import resolve_fluid
    from tui.monitor.config import load_config, user_config_path

    path = args.config
    if path is None and user_config_path().is_file():
        path = user_config_path()
    fluid = resolve_fluid(args, name_option="--fluid", required=False)
    return load_config(path, fluid=fluid, fallback_fluid=_source_fluid(source))


def _source_fluid(source):
    """The fluid a virtual scenario or a replayed run log names (a name or a custom fluid), if any."""
    from tui.monitor.config import named_fluid

    scenario = getattr(source, "scenario", None)
    if scenario is not None:
        return scenario.fluid
    table = getattr(source, "table", None)
    recorded = (getattr(table, "metadata", None) or {}).get("config")
    return named_fluid(recorded) if isinstance(recorded, dict) else None


def _recorder(args, source, config):
    from tui.record import RunRecorder

    metadata = {"command": "watch", "source": source.description, "fluid": config.thermo_fluid.name,
                "config": config.to_json()}
    return RunRecorder(Path(args.log_dir) if args.log_dir else default_log_dir(), metadata)


def _screen(source, config, recorder, monitors, hook) -> int:
    try:
        from tui.screen import run_watch
    except ImportError as exc:
        source.close()
        recorder.close()
        from tui.errors import RuntimeFailure

        raise RuntimeFailure(f"the screen is not available ({exc}); use --headless") from None
    try:
        return run_watch(source, config, recorder=recorder, label=source.description, make_monitor=monitors,
                         sinks=[hook] if hook is not None else [])
    finally:
        if hook is not None:
            hook.close()


def _headless(args, source, config, recorder, monitors, hook) -> int:
    from tui.monitor.pipeline import run_live
    from tui.monitor.sinks import JsonLinesSink, RecorderSink, StatusPrinter

    monitor = monitors(config)
    sinks = [RecorderSink(recorder),
             JsonLinesSink(sys.stdout) if args.jsonl else StatusPrinter(sys.stdout, config, args.interval)]
    if hook is not None:
        sinks.append(hook)
    stop, why = threading.Event(), ["the source ended"]

    def on_signal(number, frame) -> None:
        why[0] = f"stopped by {signal.Signals(number).name}"
        stop.set()

    previous = {number: signal.signal(number, on_signal) for number in (signal.SIGINT, signal.SIGTERM)}
    # replays and the virtual gauge carry their own time axis: no stale check against the wall clock
    clock = None if hasattr(source, "seek") else time.monotonic
    try:
        run_live(source, monitor, sinks, stop, clock=clock)
    except BaseException as exc:
        why[0] = f"failed: {exc}"
        raise
    finally:
        _finish(monitor, sinks, hook, recorder, why[0])
        source.close()
        for number, handler in previous.items():
            signal.signal(number, handler)
    active = monitor.active_alarms()
    at_end = f"alarms active: {', '.join(active)}" if active else "no alarm active"
    print(f"rigside watch: {why[0]}, {at_end}; run log {recorder.path}", file=sys.stderr)
    return EXIT_ALARM_ACTIVE if active else 0


def _finish(monitor, sinks, hook, recorder, why: str) -> None:
    """Let the hook finish, hand its last notes to the sinks, note why the watch ended, close."""
    if hook is not None:
        hook.close()
    readings, events = monitor.process([])
    for sink in sinks:
        if sink is not hook:
            sink.write(readings, events)
    recorder.write_note(f"watch ended: {why}; active alarms at the end: {', '.join(monitor.active_alarms()) or 'none'}")
    for sink in sinks:
        if sink is not hook:
            sink.close()
