"""Messages from the pipeline worker and the curve worker to the app (posted from their threads)."""

from __future__ import annotations

from dataclasses import dataclass

from textual.message import Message

from tui.screen.curves import FluidCurves
from tui.screen.live import LiveView


@dataclass
class ViewChanged(Message):
    """A new `LiveView`. Views are cumulative, so a newer one replaces any still queued."""

    view: LiveView

    def can_replace(self, message: Message) -> bool:
        return isinstance(message, ViewChanged)


@dataclass
class CurvesReady(Message):
    """The boundaries of a fluid, computed off the screen's thread."""

    curves: FluidCurves


class PipelineStopped(Message):
    """The worker's loop has ended: the source ended or the app is closing."""
