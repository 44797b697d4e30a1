"""A Static that redraws only when its text or styles change, and re-lays out only when its
line count does: the screen refreshes ten times a second and most of it stands still."""

from __future__ import annotations

from textual.content import Content
from textual.widgets import Static


class TextPanel(Static):
    """Base of the screen's text widgets; subclasses build `Content` and call `put`."""

    def __init__(self, *, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes, markup=False)
        self._shown: tuple[str, tuple] | None = None

    def put(self, content: Content) -> None:
        key = (content.plain, tuple(content.spans))
        if key == self._shown:
            return
        lines_before = self._shown[0].count("\n") if self._shown else -1
        self._shown = key
        self.update(content, layout=content.plain.count("\n") != lines_before)

    @property
    def text(self) -> str:
        """What the panel shows, as plain text."""
        return self._shown[0] if self._shown else ""
