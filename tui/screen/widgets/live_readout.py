"""Pressure and temperature in the chosen units, the sample's age and the source's health."""

from __future__ import annotations

import math

from textual.content import Content

from thermo.units import format_pressure, format_temperature
from tui.acquire.sample import Quality
from tui.screen.display import duration
from tui.screen.live import LiveView
from tui.screen.widgets.text_panel import TextPanel

#: a sample older than this [s] is called stale on the screen
STALE_AFTER_S = 5.0
#: source states that are not a healthy stream
UNHEALTHY_STATES = {"disconnected", "reconnecting", "ended"}
ABNORMAL = "bold reverse"


class LiveReadout(TextPanel):
    """Three lines: p, T, then age and health; abnormal parts are words in reverse video."""

    DEFAULT_CSS = """
    LiveReadout { height: 3; }
    """

    def show(self, view: LiveView, T_unit, p_unit, now: float) -> None:
        reading = view.reading
        if reading is None:
            self.put(Content.assemble(("p  —\nT  —\n", "bold"), _health(view)))
            return
        sample = reading.sample
        age = now - view.received_at
        parts: list = [
            ("p  ", "dim"),
            (format_pressure(sample.pressure_Pa, p_unit), "bold"),
            ("\nT  ", "dim"),
            (format_temperature(sample.temperature_K, T_unit), "bold"),
            ("\nage ", "dim"),
        ]
        if math.isfinite(age) and age > STALE_AFTER_S:
            parts.append((f"STALE {duration(age)}", ABNORMAL))
        else:
            parts.append(f"{age:.1f} s" if math.isfinite(age) else "—")
        parts.append(("  ", ""))
        if sample.quality is not Quality.OK:
            parts.append((f"{sample.quality.value.upper()}", ABNORMAL))
            parts.append(("  ", ""))
        parts.append(_health(view))
        self.put(Content.assemble(*parts))


def _health(view: LiveView) -> tuple[str, str]:
    """The source's state; its message too when something is wrong (the status line names the source)."""
    state = view.source_state
    if state not in UNHEALTHY_STATES:
        return f"source {state}", ""
    return f"SOURCE {state.upper()}" + (f": {view.source_message}" if view.source_message else ""), ABNORMAL
