"""The main screen: live state, margins, properties, alarms and events on the left; the phase
diagram on the right; status on top; keys in the footer. It renders the app's latest `LiveView`
at a steady rate and hands every operator action to the session."""

from __future__ import annotations

import math
import time

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import Screen
from textual.widgets import Footer, Static

from tui.cli import SAFETY_NOTE
from tui.monitor.model import MARGINS
from tui.screen.live import LiveView
from tui.screen.plot import DiagramState
from tui.screen.widgets.alarm_list import AlarmList
from tui.screen.widgets.event_log import EventLog
from tui.screen.widgets.live_readout import LiveReadout
from tui.screen.widgets.margin_gauge import MarginGauge
from tui.screen.widgets.phase_banner import PhaseBanner
from tui.screen.widgets.phase_diagram import PhaseDiagram
from tui.screen.widgets.property_table import PropertyTable
from tui.screen.widgets.status_line import StatusLine

#: refreshes per second of the screen (the pipeline may deliver far more views) ...
REFRESH_HZ = 12
#: ... of which this many redraw the numbers and the diagram: digits that change faster than
#: this cannot be read, and the diagram is the costliest part (keys still redraw it at once)
NUMBERS_HZ = 5
#: the safety line stays at the bottom this long after start, unless a key dismisses it [s]
SAFETY_NOTE_SECONDS = 20.0
#: actions that only a replay can do
REPLAY_ACTIONS = {"pause", "speed", "step", "seek"}


class MonitorScreen(Screen):
    """Everything at once; every key in BINDINGS is also listed on the help screen."""

    HORIZONTAL_BREAKPOINTS = [(0, "-narrow"), (120, "-wide")]
    VERTICAL_BREAKPOINTS = [(0, "-short"), (36, "-tall")]

    BINDINGS = [
        Binding("question_mark,f1", "app.help", "help", tooltip="this list of keys"),
        Binding("q", "app.quit", "quit", tooltip="quit (asks first while recording)"),
        Binding("a", "acknowledge", "ack", tooltip="acknowledge the selected alarm"),
        Binding("A", "acknowledge_all", "ack all", show=False, tooltip="acknowledge every alarm shown"),
        Binding("s", "shelve", "shelve", tooltip="shelve the selected alarm for the configured time"),
        Binding("up,k", "select(-1)", "previous alarm", show=False, tooltip="select the alarm above"),
        Binding("down,j", "select(1)", "next alarm", show=False, tooltip="select the alarm below"),
        Binding("m", "app.note", "note", tooltip="mark this moment and type a note for the run log"),
        Binding("d", "toggle_view", "p–T/p–v", tooltip="diagram: pressure–temperature or pressure–volume"),
        Binding("z", "toggle_zoom", "zoom", tooltip="zoom: whole range or near the live state"),
        Binding("u", "app.next_pressure_unit", "p unit", tooltip="next pressure unit (absolute and gauge)"),
        Binding("t", "app.next_temperature_unit", "T unit", tooltip="next temperature unit"),
        Binding("f", "app.pick_fluid", "fluid", tooltip="choose the fluid in the rig"),
        Binding("space", "pause", "pause", tooltip="replay: pause or resume"),
        Binding("plus,equals_sign", "speed(2)", "faster", show=False, tooltip="replay: faster"),
        Binding("minus", "speed(0.5)", "slower", show=False, tooltip="replay: slower"),
        Binding("full_stop", "step", "step", show=False, tooltip="replay: one sample on (while paused)"),
        Binding("left", "seek(-10)", "back 10 s", show=False, tooltip="replay: back 10 s"),
        Binding("right", "seek(10)", "ahead 10 s", show=False, tooltip="replay: ahead 10 s"),
        Binding("shift+left", "seek(-60)", "back 1 min", show=False, tooltip="replay: back 1 min"),
        Binding("shift+right", "seek(60)", "ahead 1 min", show=False, tooltip="replay: ahead 1 min"),
    ]

    refreshes = 0
    """How many times the screen has been refreshed from the latest view (for the benchmark)."""

    def compose(self) -> ComposeResult:
        yield StatusLine(id="status")
        with Horizontal(id="body"):
            with Vertical(id="left"):
                with Vertical(id="state-box", classes="box") as box:
                    box.border_title = "state"
                    yield PhaseBanner(id="phase")
                    yield LiveReadout(id="readout")
                with Vertical(id="margins-box", classes="box") as box:
                    box.border_title = "margins · bar to 4× limit, ┊ limit"
                    for name in MARGINS:
                        yield MarginGauge(name, id=f"margin-{name}")
                with Vertical(id="properties-box", classes="box") as box:
                    box.border_title = "properties at the live state"
                    yield PropertyTable(id="properties")
            with Vertical(id="right"):
                yield PhaseDiagram(id="diagram")
                with Vertical(id="alarms-box", classes="box") as box:
                    box.border_title = "alarms · a ack · s shelve · ↑↓ select"
                    yield AlarmList(id="alarms")
                    yield EventLog(id="events")
        yield Static(SAFETY_NOTE, id="safety", markup=False)
        yield Footer()

    def on_mount(self) -> None:
        self.set_interval(1 / REFRESH_HZ, self.refresh_view)
        self.set_timer(SAFETY_NOTE_SECONDS, self.dismiss_safety_note)
        self._words_drawn: int | None = None
        self._numbers_drawn: tuple | None = None
        self._numbers_due = 0.0
        self.refresh_view()

    def dismiss_safety_note(self) -> None:
        self.query_one("#safety").add_class("-dismissed")

    def on_key(self) -> None:
        self.dismiss_safety_note()

    # ------------------------------------------------------------ rendering
    def refresh_view(self) -> None:
        """Draw the app's latest view; called REFRESH_HZ times a second. Words (phase, alarms,
        events, status) follow every new view; numbers and the diagram change NUMBERS_HZ times
        a second, and at once when the units or the fluid change."""
        app = self.app
        app.session.refresh_replay()
        view: LiveView = app.latest_view
        self.refreshes += 1
        if id(view) != self._words_drawn:
            self._words_drawn = id(view)
            self._show_words(view)
        units = (app.temperature_unit, app.pressure_unit)
        now = time.monotonic()
        if (units, id(app.curves)) == self._numbers_drawn and now < self._numbers_due:
            return
        self._numbers_drawn, self._numbers_due = (units, id(app.curves)), now + 1.0 / NUMBERS_HZ
        self._show_numbers(view, units)

    def _show_words(self, view: LiveView) -> None:
        reading = view.reading
        self.query_one(StatusLine).show(view)
        self.query_one(PhaseBanner).phase = reading.phase if reading else "waiting for data"
        self.query_one(AlarmList).show(view.alarms)
        self.query_one("#alarms-box").set_class(any(a.state == "unacknowledged" for a in view.alarms), "-unacknowledged")
        self.query_one(EventLog).show(view.events)

    def _show_numbers(self, view: LiveView, units: tuple) -> None:
        reading = view.reading
        self.query_one(LiveReadout).show(view, *units, now=self.app.session.clock())
        for name in MARGINS:
            self.query_one(f"#margin-{name}", MarginGauge).show(
                reading.margins.get(name, math.nan) if reading else math.nan,
                reading.rates.get(name, math.nan) if reading else math.nan,
                reading.time_to_boundary.get(name, math.nan) if reading else math.nan,
                view.limits.get(name, math.nan),
                *units,
            )
        self.query_one(PropertyTable).show(view.properties)
        self.query_one(PhaseDiagram).show(self.app.curves, diagram_state(view), *units)

    # ------------------------------------------------------------ actions
    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action in REPLAY_ACTIONS:
            return self.app.session.replay is not None
        return True

    def action_acknowledge(self) -> None:
        selected = self.query_one(AlarmList).selected
        if selected is not None:
            self.app.session.acknowledge(selected.condition)

    def action_acknowledge_all(self) -> None:
        for row in self.query_one(AlarmList).rows:
            if row.state in ("unacknowledged", "returned-unacknowledged"):
                self.app.session.acknowledge(row.condition)

    def action_shelve(self) -> None:
        selected = self.query_one(AlarmList).selected
        if selected is not None:
            self.app.session.shelve(selected.condition)

    def action_select(self, step: int) -> None:
        self.query_one(AlarmList).move(step)

    def action_toggle_view(self) -> None:
        diagram = self.query_one(PhaseDiagram)
        diagram.view = "pv" if diagram.view == "pT" else "pT"

    def action_toggle_zoom(self) -> None:
        diagram = self.query_one(PhaseDiagram)
        diagram.zoom = "near" if diagram.zoom == "whole" else "whole"

    def action_pause(self) -> None:
        self.app.session.replay.toggle_pause()

    def action_speed(self, factor: float) -> None:
        self.app.session.replay.scale_speed(float(factor))

    def action_step(self) -> None:
        self.app.session.replay.step()

    def action_seek(self, seconds: float) -> None:
        self.app.session.replay.seek_by(float(seconds))


def diagram_state(view: LiveView) -> DiagramState:
    """The diagram's share of a view."""
    reading = view.reading
    if reading is None:
        return DiagramState(limits=view.limits)
    density = view.properties.get("density", math.nan)
    return DiagramState(
        T=reading.sample.temperature_K,
        p=reading.sample.pressure_Pa,
        v=1.0 / density if density and math.isfinite(density) else math.nan,
        trail_T=view.trail_T,
        trail_p=view.trail_p,
        isotherm=view.isotherm,
        limits=view.limits,
        alarm=bool(reading.active_alarms),
    )

