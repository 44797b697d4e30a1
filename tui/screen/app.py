"""The rigside Textual app: a thin shell that runs the session in a thread worker, keeps the
latest view, owns the display units and the dialogs, and pushes the monitor screen.

`make_app(session, ...)` builds it; tests inject a session over an in-memory source.
"""

from __future__ import annotations

import sys

from textual import work
from textual.app import App
from textual.worker import get_current_worker

import thermo
from thermo.units import PressureUnit, TemperatureUnit
from tui.screen.curves import fluid_curves
from tui.screen.live import LiveView
from tui.screen.messages import CurvesReady, PipelineStopped, ViewChanged
from tui.screen.screens.confirm_quit import ConfirmQuit
from tui.screen.screens.fluid_picker import FluidPicker
from tui.screen.screens.help import HelpScreen
from tui.screen.screens.monitor import MonitorScreen
from tui.screen.screens.note import NoteScreen

#: the pressure units `u` cycles through (gauge ones are marked (g) wherever they are shown)
PRESSURE_CYCLE = ("bar", "bar(g)", "MPa", "kPa", "psi", "psig")
#: the temperature units `t` cycles through
TEMPERATURE_CYCLE = ("degC", "K", "degF")
#: the interpreter's thread switch interval while the screen runs [s] (Python's default: 0.005)
THREAD_SWITCH_S = 0.001


class RigsideApp(App):
    """The screen over one `Session` (tui.screen.session)."""

    CSS_PATH = "app.tcss"
    TITLE = "rigside"
    ENABLE_COMMAND_PALETTE = False

    def __init__(self, session, *, pressure_unit: PressureUnit, temperature_unit: TemperatureUnit) -> None:
        super().__init__()
        self.session = session
        self.pressure_unit = pressure_unit
        self.temperature_unit = temperature_unit
        self.latest_view: LiveView = session.feed.view
        self.curves = None

    def on_mount(self) -> None:
        # Hand the interpreter between threads more often than the default 5 ms, so that the
        # screen's thread gets a key through promptly while the pipeline thread is busy.
        self._switch_interval = sys.getswitchinterval()
        sys.setswitchinterval(THREAD_SWITCH_S)
        self.push_screen(MonitorScreen())
        self.compute_curves(self.session.fluid)
        self.run_pipeline()

    # ------------------------------------------------------------ workers
    @work(thread=True, exclusive=True, group="pipeline")
    def run_pipeline(self) -> None:
        """Acquisition, monitor and recorder, off the screen's thread; views come back as messages."""
        worker = get_current_worker()
        self.session.run(lambda view: self.post_message(ViewChanged(view)), lambda: worker.is_cancelled)
        self.post_message(PipelineStopped())

    @work(thread=True, exclusive=True, group="curves")
    def compute_curves(self, fluid) -> None:
        self.post_message(CurvesReady(fluid_curves(fluid)))

    def on_unmount(self) -> None:
        self.session.stop()
        sys.setswitchinterval(self._switch_interval)

    def on_view_changed(self, message: ViewChanged) -> None:
        self.latest_view = message.view

    def on_curves_ready(self, message: CurvesReady) -> None:
        self.curves = message.curves

    def on_pipeline_stopped(self, message: PipelineStopped) -> None:
        self.notify("The source has ended; the screen keeps the last state. q quits.", title="acquisition stopped")

    # ------------------------------------------------------------ app-wide actions
    def action_help(self) -> None:
        self.push_screen(HelpScreen(MonitorScreen.BINDINGS))

    async def action_quit(self) -> None:
        recording = self.session.recording_path
        if recording is None:
            self.exit()
            return

        def answered(quit_now: bool | None) -> None:
            if quit_now:
                self.exit()

        self.push_screen(ConfirmQuit(str(recording)), answered)

    def action_note(self) -> None:
        moment = self.session.mark()

        def typed(text: str | None) -> None:
            if text is not None:
                self.save_note(text, moment)

        self.push_screen(NoteScreen(moment[1]), typed)

    @work(thread=True, group="notes")
    def save_note(self, text: str, moment: tuple[float, float]) -> None:
        """Into the run log off the screen's thread: the recorder may be in the middle of an fsync."""
        self.session.note(text, moment)

    def action_next_pressure_unit(self) -> None:
        self.pressure_unit = _next_unit(PRESSURE_CYCLE, self.pressure_unit, self.pressure_unit.atmosphere)

    def action_next_temperature_unit(self) -> None:
        self.temperature_unit = _next_unit(TEMPERATURE_CYCLE, self.temperature_unit)

    def action_pick_fluid(self) -> None:
        def picked(key: str | None) -> None:
            if key and key != self.session.fluid.key:
                self.session.switch_fluid(key)
                self.curves = None
                self.compute_curves(self.session.fluid)

        choices = [(key, thermo.fluid(key).name) for key in thermo.fluids()]
        self.push_screen(FluidPicker(choices, self.session.fluid.key), picked)


def _next_unit(cycle: tuple[str, ...], current, *atmosphere):
    """The unit after `current` in `cycle` (the first if `current` is not in it)."""
    kind = type(current)
    units = [kind.from_text(text, *atmosphere) for text in cycle]
    labels = [unit.label for unit in units]
    position = labels.index(current.label) if current.label in labels else -1
    return units[(position + 1) % len(units)]


def make_app(session, *, pressure_unit: str = "bar", temperature_unit: str = "degC") -> RigsideApp:
    """The app over `session`, showing the given units first (thermo.units names)."""
    atmosphere = getattr(session, "atmosphere_Pa", None)
    p_unit = PressureUnit.from_text(pressure_unit, *([atmosphere] if atmosphere else []))
    return RigsideApp(session, pressure_unit=p_unit, temperature_unit=TemperatureUnit.from_text(temperature_unit))
