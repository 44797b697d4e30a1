"""Mark the moment and type an operator note for the run log."""

from __future__ import annotations

import time

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Static


class NoteScreen(ModalScreen[str | None]):
    """Returns the typed note, or None on escape; the moment is the one when the key was pressed."""

    BINDINGS = [Binding("escape", "cancel", "cancel")]

    def __init__(self, marked_at: float) -> None:
        super().__init__()
        self.marked_at = marked_at
        """Wall-clock time of the mark [s since the epoch]."""

    def compose(self) -> ComposeResult:
        stamp = time.strftime("%H:%M:%S", time.localtime(self.marked_at))
        with Vertical(classes="dialog") as dialog:
            dialog.border_title = "note"
            yield Static(f"Marked at {stamp}. Type a note for the run log; Enter saves, Esc drops it.", markup=False)
            yield Input(placeholder="what happened", id="note-text")

    @on(Input.Submitted)
    def save(self, event: Input.Submitted) -> None:
        self.dismiss(event.value)

    def action_cancel(self) -> None:
        self.dismiss(None)
