"""The phase in words, large: the first thing an operator reads from a step away."""

from __future__ import annotations

from textual.content import Content
from textual.reactive import reactive
from textual.widget import Widget

#: the kind of each phase label, for the stylesheet (colour is kept for alarms, not phases)
PHASE_KINDS = {
    "liquid+vapor": "boundary",
    "solid+vapor": "boundary",
    "solid+liquid": "boundary",
    "triple": "boundary",
    "critical": "boundary",
    "out-of-range": "unknown",
    "unclassified": "unknown",
}


def spaced(phase: str) -> str:
    """'liquid+vapor' -> 'L I Q U I D + V A P O R': capitals, letter-spaced, readable at a distance."""
    return " ".join(phase.upper())


class PhaseBanner(Widget):
    """Shows `phase` as letter-spaced capitals, or plainly when the panel is narrow."""

    DEFAULT_CSS = """
    PhaseBanner { height: 3; content-align: center middle; text-style: bold; }
    """

    phase = reactive("waiting for data")
    """A thermo phase label (or a short status while there is none)."""

    def watch_phase(self, phase: str) -> None:
        kind = PHASE_KINDS.get(phase, "phase")
        for name in ("boundary", "unknown", "phase"):
            self.set_class(name == kind, f"-{name}")

    def render(self) -> Content:
        wide = spaced(self.phase)
        return Content(wide if len(wide) <= self.content_region.width else self.phase.upper())
