"""Every key of the monitor screen, built from its bindings, and the safety line."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static

from tui.cli import SAFETY_NOTE

#: how keys are written on the help screen
KEY_NAMES = {
    "question_mark": "?",
    "plus": "+",
    "equals_sign": "=",
    "minus": "-",
    "full_stop": ".",
    "space": "space",
    "left": "←",
    "right": "→",
    "up": "↑",
    "down": "↓",
    "shift+left": "shift+←",
    "shift+right": "shift+→",
}


def key_lines(bindings: list[Binding]) -> list[str]:
    """'keys   what they do' for each binding (its tooltip, else its footer word), keys joined by ' or '."""
    rows = []
    for binding in bindings:
        keys = " or ".join(KEY_NAMES.get(k.strip(), k.strip()) for k in binding.key.split(","))
        rows.append((keys, binding.tooltip or binding.description))
    width = max(len(keys) for keys, _ in rows)
    return [f"{keys.ljust(width)}  {what}" for keys, what in rows]


class HelpScreen(ModalScreen[None]):
    """Opened with ? or F1; any of escape, ? or q closes it."""

    BINDINGS = [Binding("escape,question_mark,q,f1", "dismiss", "close")]
    VERTICAL_BREAKPOINTS = [(0, "-short"), (36, "-tall")]

    def __init__(self, bindings: list[Binding]) -> None:
        super().__init__()
        self._key_bindings = bindings

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog") as dialog:
            dialog.border_title = "keys"
            with VerticalScroll(id="help-keys"):
                yield Static("\n".join(key_lines(self._key_bindings)), markup=False)
            yield Static(
                "Replay keys work when the source is a replay or the demo. "
                "Quit asks first while a run is being recorded. Esc closes this.",
                markup=False,
            )
            yield Static(SAFETY_NOTE, classes="safety", markup=False)
