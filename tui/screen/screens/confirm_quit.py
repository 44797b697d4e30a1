"""Quitting while a run is recorded asks first."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Static


class ConfirmQuit(ModalScreen[bool]):
    """y quits (the log is closed cleanly), n or escape stays."""

    BINDINGS = [
        Binding("y", "answer(True)", "quit"),
        Binding("n,escape", "answer(False)", "stay"),
    ]

    def __init__(self, recording: str) -> None:
        super().__init__()
        self._recording = recording

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog") as dialog:
            dialog.border_title = "quit?"
            yield Static(f"Recording to {self._recording}.\nQuit and close the log? y quits, n stays.", markup=False)

    def action_answer(self, quit_now: bool) -> None:
        self.dismiss(quit_now)
