"""The run's status: fluid, sample rate, dropped and malformed counts, recording, replay, then the source."""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

from rich.cells import cell_len
from textual.content import Content

from tui.screen.display import clock, size
from tui.screen.live import LiveView
from tui.screen.widgets.text_panel import TextPanel

SEPARATOR = " · "
#: lines the status may take
STATUS_LINES = 2
#: a truncated source description keeps at least this many cells, or is left out
SOURCE_MIN_CELLS = 8


@dataclass(frozen=True, slots=True)
class Part:
    """One item of the status, kept whole on one line."""

    text: str
    style: str = ""
    rank: int = 0
    """Higher is less important: dropped first when the status does not fit."""


def status_parts(view: LiveView) -> list[Part]:
    """The status in reading order; losses are emphasised, never only coloured. The last
    part is the source's description, which is truncated rather than dropped."""
    rate = f"{view.rate_hz:.0f} S/s" if math.isfinite(view.rate_hz) else "— S/s"
    parts = [Part(view.fluid, "bold"), Part(rate), Part(f"{view.samples} samples", rank=2)]
    for count, word in ((view.dropped, "dropped"), (view.malformed, "malformed")):
        parts.append(Part(f"{word} {count}", "bold reverse") if count else Part(f"{word} 0", rank=1))
    if view.recording is not None:
        parts.append(Part(f"rec {Path(view.recording.path).name} {size(view.recording.bytes)}"))
    else:
        parts.append(Part("NOT RECORDING", "bold"))
    if view.replay is not None:
        replay = view.replay
        state = "ended ■" if view.source_state == "ended" else "paused ⏸" if replay.paused else "playing ▶"
        parts.append(Part(f"{clock(replay.position_s)}/{clock(replay.duration_s)} ×{replay.speed:g} {state}"))
    parts.append(Part(view.source, "dim", rank=3))
    return parts


def _pack(parts: list[Part], width: int) -> list[list[Part]]:
    """Whole parts onto lines of `width` cells, in order (a part wider than a line gets its own)."""
    lines: list[list[Part]] = [[]]
    for part in parts:
        if lines[-1] and _width(lines[-1] + [part]) > width:
            lines.append([])
        lines[-1].append(part)
    return lines


def _fits(lines: list[list[Part]], width: int) -> bool:
    return len(lines) <= STATUS_LINES and all(_width(line) <= width for line in lines)


def _width(line: list[Part]) -> int:
    return sum(cell_len(part.text) for part in line) + cell_len(SEPARATOR) * max(len(line) - 1, 0)


def _truncated(text: str, cells: int) -> str:
    if cell_len(text) <= cells:
        return text
    while text and cell_len(text) > cells - 1:
        text = text[:-1]
    return text + "…"


def layout(parts: list[Part], width: int) -> list[list[Part]]:
    """At most STATUS_LINES lines of whole parts: the least important parts go first, and the
    source (the last part) takes the room left on the last line, cut short if need be."""
    *body, source = parts
    while not _fits(lines := _pack(body, width), width) and any(part.rank for part in body):
        least = max(part.rank for part in body)
        body = [part for part in body if part.rank < least]
    if not _fits(lines, width):  # narrower than the essentials: cut the lines that overflow
        return [[Part(_truncated(line[0].text, width), line[0].style)] if _width(line) > width else line
                for line in lines[:STATUS_LINES]]
    room = width - _width(lines[-1]) - cell_len(SEPARATOR)
    if room < SOURCE_MIN_CELLS and len(lines) < STATUS_LINES:
        lines.append([])
        room = width
    if room >= SOURCE_MIN_CELLS:
        lines[-1].append(Part(_truncated(source.text, room), source.style))
    return lines


def status_content(view: LiveView, width: int) -> Content:
    lines = layout(status_parts(view), width)
    pieces: list[tuple[str, str]] = []
    for number, line in enumerate(lines):
        if number:
            pieces.append(("\n", ""))
        for index, part in enumerate(line):
            if index:
                pieces.append((SEPARATOR, ""))
            pieces.append((part.text, part.style))
    return Content.assemble(*pieces)


class StatusLine(TextPanel):
    """The run's status on one line, or two when one is too narrow; never breaks an item."""

    DEFAULT_CSS = """
    StatusLine { height: auto; max-height: 2; text-wrap: nowrap; text-overflow: ellipsis; }
    """

    _view: LiveView | None = None

    def show(self, view: LiveView) -> None:
        self._view = view
        self.put(status_content(view, self.content_region.width or 80))

    def on_resize(self) -> None:
        if self._view is not None:
            self.show(self._view)
