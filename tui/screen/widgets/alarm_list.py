"""The alarms that want attention, one per line with its ISA-18.2 state in words; one is selected
for acknowledge and shelve."""

from __future__ import annotations

from collections.abc import Sequence

from textual.content import Content
from textual.reactive import reactive

from tui.monitor.alarms import AlarmStatus
from tui.screen.widgets.text_panel import TextPanel

#: state -> (word, style); unacknowledged alarms stand out, the rest are quieter
STATE_WORDS = {
    "unacknowledged": ("UNACK", "bold reverse"),
    "acknowledged": ("ack", "bold"),
    "returned-unacknowledged": ("RTN-UNACK", "reverse"),
    "shelved": ("shelved", "dim"),
}
SELECTED = "▶"


class AlarmList(TextPanel):
    """Active, unacknowledged and shelved alarms; `cursor` picks the one the keys act on."""

    DEFAULT_CSS = """
    AlarmList { height: auto; min-height: 1; }
    """

    cursor = reactive(0)
    """Index of the selected alarm."""

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._rows: tuple[AlarmStatus, ...] = ()

    @property
    def selected(self) -> AlarmStatus | None:
        return self._rows[self.cursor] if self._rows else None

    @property
    def rows(self) -> tuple[AlarmStatus, ...]:
        return self._rows

    def show(self, rows: Sequence[AlarmStatus]) -> None:
        self._rows = tuple(rows)
        self.set_class(any(r.state == "unacknowledged" for r in self._rows), "-unacknowledged")
        self.cursor = min(self.cursor, max(len(self._rows) - 1, 0))
        self._draw()

    def move(self, step: int) -> None:
        if self._rows:
            self.cursor = (self.cursor + step) % len(self._rows)

    def watch_cursor(self) -> None:
        self._draw()

    def _draw(self) -> None:
        if not self._rows:
            self.put(Content("no alarms"))
            return
        lines = []
        for index, row in enumerate(self._rows):
            word, style = STATE_WORDS.get(row.state, (row.state, "bold"))
            mark = SELECTED if index == self.cursor else " "
            lines.append(
                Content.assemble(
                    f"{mark} ",
                    (word, style),
                    " " * (10 - len(word)),
                    f"{row.priority:<6} {row.condition}",
                    (f"  {row.message}" if row.message else "", "dim"),
                )
            )
        self.put(Content("\n").join(lines))
