"""Strict JSON text for every machine-readable output of rigside (JSON Lines, run-log events,
hook variables, --json answers).

JSON has no NaN or infinity; Python's json module writes them as the invalid tokens `NaN` and
`Infinity` unless told not to. Here every non-finite float becomes null (at any depth) and
the encoder refuses anything that slipped through, so a strict reader never chokes. Where
null could mean two things, the writer adds a field that tells them apart (see
`tui.monitor.sinks.reading_json`: `closing`).
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping


def plain(value):
    """`value` with every non-finite float (NaN, ±inf) replaced by None, in nested mappings,
    lists and tuples too (tuples become lists)."""
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, Mapping):
        return {key: plain(item) for key, item in value.items()}
    if isinstance(value, list | tuple):
        return [plain(item) for item in value]
    return value


def dumps(value, **options) -> str:
    """`json.dumps` of `plain(value)` with `allow_nan=False` (other options passed through)."""
    return json.dumps(plain(value), allow_nan=False, **options)
