"""Choose the fluid in the rig while running."""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option


class FluidPicker(ModalScreen[str | None]):
    """Returns the chosen fluid's key, or None on escape."""

    BINDINGS = [Binding("escape", "cancel", "cancel")]

    def __init__(self, fluids: list[tuple[str, str]], current: str) -> None:
        """`fluids` are (key, name) pairs; `current` is the key of the fluid in use."""
        super().__init__()
        self._fluids = fluids
        self._current = current

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog") as dialog:
            dialog.border_title = "fluid"
            yield Static("The monitor reclassifies from the next sample on. Enter picks, Esc keeps the current one.",
                         markup=False)
            options = OptionList(*(Option(f"{key:<8} {name}", id=key) for key, name in self._fluids), id="fluids")
            keys = [key for key, _ in self._fluids]
            if self._current in keys:
                options.highlighted = keys.index(self._current)
            yield options

    @on(OptionList.OptionSelected)
    def pick(self, event: OptionList.OptionSelected) -> None:
        self.dismiss(event.option.id)

    def action_cancel(self) -> None:
        self.dismiss(None)
