"""The phase diagram: p–T or p–v projection in braille, whole range or the live neighbourhood."""

from __future__ import annotations

from dataclasses import replace
from typing import ClassVar

from rich.segment import Segment
from textual.geometry import Region
from textual.reactive import reactive
from textual.strip import Strip
from textual.widget import Widget

from tui.screen.curves import FluidCurves
from tui.screen.plot import LEGENDS, ROLES, DiagramState, draw

VIEW_TITLES = {"pT": "p–T", "pv": "p–v"}
ZOOM_TITLES = {"whole": "whole range", "near": "near now"}


class PhaseDiagram(Widget):
    """Draws `FluidCurves` with the live state, trail and alarm bands; look in app.tcss."""

    COMPONENT_CLASSES: ClassVar[set[str]] = {f"diagram--{role}" for role in ROLES}

    DEFAULT_CSS = """
    PhaseDiagram { height: 1fr; min-height: 8; }
    """

    view = reactive("pT")
    """"pT" or "pv"."""
    zoom = reactive("whole")
    """"whole" or "near"."""

    def __init__(self, *, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self._curves: FluidCurves | None = None
        self._state = DiagramState()
        self._units = None
        self._lines: list[Strip] | None = None
        self._update_titles()

    def show(self, curves: FluidCurves | None, state: DiagramState, T_unit, p_unit) -> None:
        """Redraw with new data (the view and zoom come from this widget's reactives); only the
        rows that changed are repainted, since most of the diagram stands still between samples."""
        self._curves = curves
        self._state = state
        self._units = (T_unit, p_unit)
        before = self._lines
        self._lines = None
        after = self._render_strips()
        if before is None or len(before) != len(after):
            self.refresh()
            return
        width = self.size.width
        changed = [Region(0, y, width, 1) for y, (old, new) in enumerate(zip(before, after)) if old != new]
        if changed:
            self.refresh(*changed)

    def watch_view(self) -> None:
        self._update_titles()
        self._invalidate()

    def watch_zoom(self) -> None:
        self._update_titles()
        self._invalidate()

    def on_resize(self) -> None:
        self._invalidate()

    def notify_style_update(self) -> None:
        """The styles of the rows were baked into them: draw again with the new ones."""
        super().notify_style_update()
        self._invalidate()

    def _invalidate(self) -> None:
        self._lines = None
        self.refresh()

    def _update_titles(self) -> None:
        self.border_title = f"{VIEW_TITLES[self.view]} · {ZOOM_TITLES[self.zoom]}"
        self.border_subtitle = LEGENDS[self.view]

    @property
    def text(self) -> str:
        """What the diagram shows, as plain text (for tests and screen readers)."""
        return "\n".join(strip.text for strip in self._render_strips())

    def _render_strips(self) -> list[Strip]:
        if self._lines is not None:
            return self._lines
        width, height = self.size
        self._update_titles()
        if self._curves is None or self._units is None or width < 12 or height < 3:
            message = "computing the curves…" if self._curves is None else "too small for a diagram"
            self._lines = [Strip([Segment(message[:width], self.rich_style)])] if width else []
            return self._lines
        state = replace(self._state, view=self.view, zoom=self.zoom)
        rows = draw(self._curves, state, width, height, *self._units)
        styles = {role: self.get_component_rich_style(f"diagram--{role}") for role in ROLES}
        self._lines = [Strip([Segment(text, styles[role]) for text, role in row]) for row in rows]
        return self._lines

    def render_line(self, y: int) -> Strip:
        lines = self._render_strips()
        width = self.size.width
        line = lines[y] if y < len(lines) else Strip.blank(width, self.rich_style)
        return line.adjust_cell_length(width, self.rich_style)
