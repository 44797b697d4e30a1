"""The `rigside` command: parses arguments and hands them to one sub-command module.

It never swallows exceptions: a `UsageError` (bad input from a person) becomes one line
on stderr and exit status 2, a `RuntimeFailure` one line and exit status 1; anything
else is a bug and keeps its traceback.
"""

from __future__ import annotations

import argparse
import importlib
import sys

from tui.errors import RuntimeFailure, UsageError

SAFETY_NOTE = (
    "rigside is a monitoring aid, not a safety system: it replaces no relief device, "
    "interlock or safety instrumented function; local codes and licensed practice govern."
)

#: sub-command name -> module in tui.commands (imported only when needed)
COMMANDS = {
    "fluids": "fluids",
    "state": "state",
    "curve": "curve",
    "watch": "watch",
    "simulate": "simulate",
    "demo": "demo",
    "analyze": "analyze",
    "config": "config",
}


def build_parser(available: dict[str, object]) -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="rigside",
        description="Phase of a pure fluid from pressure and temperature, with margins to every phase boundary.",
        epilog=SAFETY_NOTE,
    )
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)
    for module in available.values():
        module.add_parser(sub)
    return parser


def _load_commands() -> dict[str, object]:
    return {name: importlib.import_module(f"tui.commands.{module}") for name, module in COMMANDS.items()}


def main(argv: list[str] | None = None) -> int:
    from thermo.units import UnitError

    modules = _load_commands()
    args = build_parser(modules).parse_args(argv)
    try:
        return int(modules[args.command].run(args) or 0)
    except (UsageError, UnitError, ValueError) as exc:
        print(f"rigside {args.command}: {exc}", file=sys.stderr)
        return 2
    except BrokenPipeError:  # the reader went away (`rigside fluids | head`): nothing left to say
        sys.stderr.close()
        return 0
    except (RuntimeFailure, OSError) as exc:
        print(f"rigside {args.command}: {exc}", file=sys.stderr)
        return 1


if __name__ == "__main__":
    sys.exit(main())
