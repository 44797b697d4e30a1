"""The newest events (alarms, clears, acknowledgements, phase changes, notes), newest last."""

from __future__ import annotations

import math
import time
from collections.abc import Sequence

from textual.content import Content

from thermo.units import format_number
from tui.monitor.model import Event
from tui.screen.widgets.text_panel import TextPanel

#: event kinds that are abnormal and keep their emphasis in the log
LOUD_KINDS = {"alarm", "flood", "quality"}
#: short names of event kinds, so the log's columns stay narrow
SHORT_KINDS = {"phase-change": "phase"}


def event_line(event: Event) -> Content:
    """'12:03:04 alarm  solid-approach high  message' — the wall time is local; the condition is
    left out when it only repeats the kind."""
    stamp = time.strftime("%H:%M:%S", time.localtime(event.t_wall)) if math.isfinite(event.t_wall) else "--:--:--"
    kind = SHORT_KINDS.get(event.kind, event.kind)
    text = event.message or (f"{format_number(event.value, 4)}" if math.isfinite(event.value) else "")
    return Content.assemble(
        (stamp, "dim"),
        " ",
        (f"{kind:<6}", "bold" if event.kind in LOUD_KINDS else ""),
        f" {event.condition}" if event.condition not in ("", event.kind, kind) else "",
        (f" {event.priority}" if event.priority else "", ""),
        (f"  {text}" if text else "", "dim"),
    )


class EventLog(TextPanel):
    """Shows as many of the latest events as fit."""

    DEFAULT_CSS = """
    EventLog { height: 1fr; }
    """

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._events: Sequence[Event] = ()

    def show(self, events: Sequence[Event]) -> None:
        if events is self._events:
            return
        self._events = events
        self._draw()

    def on_resize(self) -> None:
        self._draw()

    def _draw(self) -> None:
        rows = max(self.content_region.height, 1)
        latest = list(self._events)[-rows:]
        self.put(Content("\n").join(event_line(e) for e in latest) if latest else Content("no events yet"))
