"""`rigside config`: the monitor's configuration.

    rigside config --default          the documented default file (a starting point to copy)
    rigside config FILE               check FILE and print the effective configuration
    rigside config [--fluid F]        the effective configuration without a file (or with your
                                      own file from the usual place, if there is one)

The effective configuration is in SI units (K, Pa, s), each number with its unit; it is what
`rigside watch` uses and writes into each run log. A bad key or value is one line naming it
(exit status 2).
"""

from __future__ import annotations

import argparse
import sys

from tui.cli import SAFETY_NOTE


def add_parser(subparsers) -> None:
    from tui.commands.fluids import add_custom_fluid_arguments

    parser = subparsers.add_parser(
        "config",
        help="print the default monitor configuration, or check a file and print the effective one",
        description="The monitor's configuration: limits, deadbands, delays, priorities, horizons, gauge uncertainties.",
        epilog=SAFETY_NOTE,
    )
    parser.add_argument("file", nargs="?", metavar="FILE", help="a configuration file (TOML) to check")
    parser.add_argument("--default", action="store_true", help="print the documented default configuration")
    parser.add_argument("--fluid", help="the fluid (overrides the file's; brings that fluid's suited values)")
    add_custom_fluid_arguments(parser)


def run(args: argparse.Namespace) -> int:
    from tui.commands.fluids import resolve_fluid
    from tui.errors import UsageError
    from tui.monitor.config import default_text, load_config, user_config_path

    if args.default:
        if args.file or args.fluid or args.custom or args.fluid_file:
            raise UsageError("--default prints the default file as it is; give no FILE or fluid with it")
        sys.stdout.write(default_text())
        return 0
    path = args.file
    if path is None and user_config_path().is_file():
        path = user_config_path()
    config = load_config(path, fluid=resolve_fluid(args, name_option="--fluid", required=False))
    sys.stdout.write(f"# effective monitor configuration ({config.origin}), SI units\n")
    sys.stdout.write(f"# fluid: {config.thermo_fluid.name}\n")
    sys.stdout.write(config.to_toml())
    return 0
