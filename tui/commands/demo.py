"""`rigside demo`: the whole screen on an invented scenario, with no hardware."""

from __future__ import annotations

import argparse

from tui.cli import SAFETY_NOTE
from tui.errors import UsageError


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser(
        "demo",
        help="open the screen on a built-in invented scenario (no hardware needed)",
        description="Play an invented scenario through the virtual gauge and watch it on the screen, "
        "recorded like a real run. Press ? on the screen for the keys.",
        epilog=SAFETY_NOTE,
    )
    parser.add_argument("--scenario", metavar="NAME", help="built-in scenario name or scenario TOML file "
                        "(default: view-cell, CO2 filled and heated through its critical point)")
    parser.add_argument("--speed", type=float, default=1.0, metavar="X",
                        help="pace: 1 as written, 10 ten times faster, 0 as fast as possible (default 1)")
    parser.add_argument("--log-dir", metavar="DIR", help="where to record the run (default: a temporary folder)")
    parser.add_argument("--config", metavar="FILE", help="monitor configuration (TOML), as for `rigside watch`")


def run(args: argparse.Namespace) -> int:
    if not args.speed >= 0:
        raise UsageError(f"--speed must be 0 (as fast as possible) or more, not {args.speed:g}")
    from tui.screen import run_demo

    return run_demo(args.scenario, speed=args.speed, log_dir=args.log_dir, config_path=args.config)
