"""One module per `rigside` sub-command; each exposes `add_parser(subparsers)` and `run(args) -> int`."""
