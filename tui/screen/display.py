"""How times, sizes and trends read on the screen (numbers and units: `thermo.units`).

Every formatter returns plain text (no markup), so units in brackets are safe in any widget.
"""

from __future__ import annotations

import math

MISSING = "—"


def duration(seconds: float) -> str:
    """A time span, short: '45s', '3m10s', '2.5h', '3d'; 'never' when not closing, MISSING when unknown."""
    if seconds is None or math.isnan(seconds):
        return MISSING
    if math.isinf(seconds):
        return "never"
    seconds = max(seconds, 0.0)
    if seconds < 60:
        return f"{seconds:.0f}s"
    if seconds < 3600:
        minutes, rest = divmod(int(round(seconds)), 60)
        return f"{minutes}m{rest:02d}s"
    if seconds < 86400 * 2:
        return f"{seconds / 3600:.1f}h"
    return f"{seconds / 86400:.0f}d"


def clock(seconds: float) -> str:
    """A position in a run as h:mm:ss.s (or m:ss.s under an hour)."""
    if seconds is None or not math.isfinite(seconds):
        return MISSING
    minutes, secs = divmod(max(seconds, 0.0), 60)
    hours, minutes = divmod(int(minutes), 60)
    if hours:
        return f"{hours}:{minutes:02d}:{secs:04.1f}"
    return f"{minutes}:{secs:04.1f}"


def size(n_bytes: int) -> str:
    """A file size in B, kB, MB or GB (powers of 1000)."""
    for unit, scale in (("GB", 1e9), ("MB", 1e6), ("kB", 1e3)):
        if n_bytes >= scale:
            return f"{n_bytes / scale:.1f} {unit}"
    return f"{n_bytes} B"


def trend(rate: float, value: float) -> str:
    """Which way a margin moves, as a symbol and a word: closing means moving towards zero."""
    if rate is None or not math.isfinite(rate) or value is None or not math.isfinite(value):
        return "· no rate"
    if rate == 0 or abs(rate) < 1e-12 * max(abs(value), 1.0):
        return "→ steady"
    closing = (rate < 0) == (value > 0)
    arrow = "↓" if rate < 0 else "↑"
    return f"{arrow} {'closing' if closing else 'opening'}"
