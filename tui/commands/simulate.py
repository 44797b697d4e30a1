"""`rigside simulate SCENARIO`: a virtual gauge on a pseudo-terminal or a TCP port.

The first line on stdout is where to connect (a pty path, `socket://127.0.0.1:PORT`, or for a
Modbus profile `modbus-rtu:///dev/pts/N` or `modbus-tcp://127.0.0.1:PORT`), so scripts can
start it and read one line.
"""

from __future__ import annotations

import sys
import threading
from dataclasses import replace

from tui.acquire.profile import load_profile
from tui.acquire.scenario import builtin_scenarios, load_scenario
from tui.acquire.simulator import NullModem, PtyOutlet, Simulator, TcpOutlet
from tui.cli import SAFETY_NOTE
from tui.errors import UsageError


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser(
        "simulate",
        help="play an invented scenario as a virtual gauge on a pty or a TCP port",
        description="Play a scenario (ramps and holds of pressure and temperature, with noise and faults) "
        "as a gauge would send it. Prints where to connect as the first line on stdout. "
        f"Built-in scenarios: {', '.join(builtin_scenarios())}.",
        epilog=SAFETY_NOTE,
    )
    parser.add_argument("scenario", metavar="SCENARIO", help="scenario file (TOML) or built-in name")
    where = parser.add_mutually_exclusive_group()
    where.add_argument("--pty", action="store_true", help="speak on a new pseudo-terminal (the default)")
    where.add_argument("--tcp", type=int, metavar="PORT", help="listen on 127.0.0.1:PORT (0: any free port)")
    parser.add_argument("--profile", metavar="FILE",
                        help="speak this gauge profile's protocol (its emit template, poll or Modbus registers)")
    parser.add_argument("--device", choices=("pressure", "temperature"),
                        help="with a two-device profile: which of its devices to play")
    parser.add_argument("--speed", type=float, default=1.0, metavar="X",
                        help="playback speed (default 1; 0: as fast as the reader takes it)")
    parser.add_argument("--loop", action="store_true", help="start again at the end, for ever")


def run(args) -> int:
    if not args.speed >= 0:  # also refuses NaN
        raise UsageError(f"--speed must be 0 (as fast as possible) or positive, got {args.speed:g}")
    if args.tcp is not None and not 0 <= args.tcp <= 65535:
        raise UsageError(f"--tcp must be a port number from 0 (any free port) to 65535, got {args.tcp}")
    scenario = load_scenario(args.scenario)
    if args.loop:
        scenario = replace(scenario, loop=True)
    profile = load_profile(args.profile) if args.profile else None
    if profile is not None and profile.devices:
        if args.device is None:
            raise UsageError(f"profile {profile.origin} has two devices: choose one with --device pressure|temperature")
        profile = profile.devices[args.device]
    stop = threading.Event()
    if profile is not None and profile.modbus is not None:
        return _serve_modbus(scenario, profile, args, stop)
    outlet = TcpOutlet(args.tcp) if args.tcp is not None else PtyOutlet()
    print(outlet.address, flush=True)
    print(f"playing {scenario.name} ({scenario.duration:g} s at {scenario.rate_hz:g} Hz); ctrl+c stops", file=sys.stderr)
    try:
        Simulator(scenario, outlet, profile, args.speed).run(stop)
    except KeyboardInterrupt:
        pass
    finally:
        stop.set()
        outlet.close()
    return 0


def _serve_modbus(scenario, profile, args, stop: threading.Event) -> int:
    """Modbus TCP with --tcp, else Modbus RTU on a pseudo-terminal (wired back to back)."""
    from tui.acquire.modbus_server import RegisterServer

    modem = None
    if args.tcp is not None:
        server = RegisterServer(profile, port=args.tcp)
        address = f"modbus-tcp://127.0.0.1:{server.port}"
    else:
        modem = NullModem()
        server = RegisterServer(profile, device=modem.device_end)
        address = f"modbus-rtu://{modem.address}"
    simulator = Simulator(scenario, None, profile, args.speed)
    simulator.set_registers(server, 0)
    print(address, flush=True)
    try:
        simulator.serve_registers(server, stop)
    except KeyboardInterrupt:
        pass
    finally:
        server.close()
        if modem is not None:
            modem.close()
    return 0
