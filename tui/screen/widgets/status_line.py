"""The run's status: fluid, sample rate, dropped and malformed counts, recording, replay, then the source."""

from __future__ import annotations

import math
from pathlib import Path

from textual.content import Content

from tui.screen.display import clock, size
from tui.screen.live import LiveView
from tui.screen.widgets.text_panel import TextPanel


def status_parts(view: LiveView) -> list[tuple[str, str]]:
    """The status as (text, style) pieces; losses are emphasised, never only coloured."""
    rate = f"{view.rate_hz:.0f} S/s" if math.isfinite(view.rate_hz) else "— S/s"
    parts = [(view.fluid, "bold"), (f" · {rate} · {view.samples} samples", "")]
    for count, word in ((view.dropped, "dropped"), (view.malformed, "malformed")):
        parts.append((f" · {word} {count}", "bold reverse" if count else ""))
    if view.recording is not None:
        parts.append((f" · rec {Path(view.recording.path).name} {size(view.recording.bytes)}", ""))
    else:
        parts.append((" · NOT RECORDING", "bold"))
    if view.replay is not None:
        replay = view.replay
        state = "paused ⏸" if replay.paused else "playing ▶"
        parts.append((f" · {clock(replay.position_s)}/{clock(replay.duration_s)} ×{replay.speed:g} {state}", ""))
    parts.append((f" · {view.source}", "dim"))
    return parts


class StatusLine(TextPanel):
    """The run's status; a second line is used when one is too narrow (see app.tcss)."""

    DEFAULT_CSS = """
    StatusLine { height: auto; max-height: 2; }
    """

    def show(self, view: LiveView) -> None:
        self.put(Content.assemble(*status_parts(view)))
