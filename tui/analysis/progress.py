"""A plain-text progress bar on stderr for long analyses (no Textual: it runs in any terminal).

It shows only on a terminal and only once the work has lasted a moment, so short runs and
redirected output stay clean.
"""

from __future__ import annotations

import sys
import time
from typing import TextIO

#: seconds of work before the bar first appears, and between redraws
DELAY_S = 0.5
REDRAW_S = 0.1
WIDTH = 30


class Progress:
    """Draws `label [#####.....] 50 %` in place; call `update(fraction)` then `done()`."""

    def __init__(self, stream: TextIO | None = None, *, enabled: bool | None = None, clock=time.monotonic):
        self._stream = stream if stream is not None else sys.stderr
        self._enabled = self._stream.isatty() if enabled is None else enabled
        self._clock = clock
        self._started = clock()
        self._drawn_at = -float("inf")
        self._label = ""
        self._visible = False

    def stage(self, label: str) -> None:
        """Start a new step of the work (e.g. "reading run.csv")."""
        self._label = label
        self.update(0.0)

    def update(self, fraction: float) -> None:
        now = self._clock()
        if not self._enabled or now - self._started < DELAY_S or now - self._drawn_at < REDRAW_S:
            return
        filled = round(WIDTH * min(max(fraction, 0.0), 1.0))
        bar = "#" * filled + "." * (WIDTH - filled)
        self._stream.write(f"\r{self._label[:40]:<40} [{bar}] {100 * fraction:3.0f} %")
        self._stream.flush()
        self._drawn_at = now
        self._visible = True

    def done(self) -> None:
        """Erase the bar so the next output starts on a clean line."""
        if self._visible:
            self._stream.write("\r" + " " * (40 + WIDTH + 9) + "\r")
            self._stream.flush()
            self._visible = False
