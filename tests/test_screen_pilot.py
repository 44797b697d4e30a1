"""The screen driven by keys through Textual's headless pilot, over known states computed with thermo.

The source is in memory (it replaces the gauge); the monitor, the feed and the widgets are the
real ones. Expected values come from thermo itself: the screen must show what thermo says.
"""

from __future__ import annotations

import contextlib

import numpy as np
import pytest

import thermo
from thermo.units import format_number
from tui.cli import SAFETY_NOTE
from screen_apps.memory import memory_app
from tui.screen.screens.confirm_quit import ConfirmQuit
from tui.screen.screens.help import HelpScreen
from tui.screen.widgets.alarm_list import AlarmList
from tui.screen.widgets.event_log import EventLog
from tui.screen.widgets.live_readout import LiveReadout
from tui.screen.widgets.margin_gauge import MarginGauge
from tui.screen.widgets.phase_banner import PhaseBanner
from tui.screen.widgets.phase_diagram import PhaseDiagram
from tui.screen.widgets.property_table import PropertyTable

CO2 = thermo.fluid("CO2")
SIZE = (100, 30)


def steady(T, p, n=30):
    """n samples 0.5 s apart at one state: long enough for the 2 s on-delays."""
    return [(T, p)] * n


async def settle(pilot, samples):
    app = pilot.app
    for _ in range(200):
        if app.latest_view.samples >= samples and app.curves is not None:
            break
        await pilot.pause(0.05)
    await pilot.pause(0.3)


@contextlib.asynccontextmanager
async def shown(states, *, size=SIZE, **options):
    """The app over `states`, once every sample and the curves are on the screen."""
    app = memory_app(states, **options)
    async with app.run_test(size=size) as pilot:
        await settle(pilot, len(states))
        yield app, pilot


def subcooled_state(subcooling_K):
    """CO2 at 10 °C compressed until it is `subcooling_K` below its saturation temperature."""
    T = 283.15
    p = float(CO2.saturation_pressure(T + subcooling_K))
    return T, p


async def test_liquid_shows_its_phase_and_subcooling_from_thermo():
    T, p = subcooled_state(8.0)
    states = steady(T, p)
    async with shown(states) as (app, pilot):
        screen = app.screen
        assert screen.query_one(PhaseBanner).phase == "liquid"
        margin = screen.query_one("#margin-dT_saturation_K", MarginGauge).text
        dT = T - float(CO2.saturation_temperature(p))
        assert "subcooling" in margin
        assert format_number(abs(dT), 3) + " K" in margin
        assert abs(abs(dT) - 8.0) < 0.05  # thermo's saturation curve and its inverse agree
        readout = screen.query_one(LiveReadout).text
        assert "10.00 °C" in readout and "bar(a)" in readout
        assert "no alarms" in screen.query_one(AlarmList).text
        density = format_number(float(CO2.density(T, p)), 4)
        assert f"ρ {density} kg/m³" in " ".join(screen.query_one(PropertyTable).text.split())


async def test_on_the_vapor_pressure_curve_both_saturated_densities_are_shown():
    T = 283.15
    states = steady(T, float(CO2.saturation_pressure(T)))
    async with shown(states) as (app, pilot):
        assert app.screen.query_one(PhaseBanner).phase == "liquid+vapor"
        table = " ".join(app.screen.query_one(PropertyTable).text.split())
        rho_liquid, rho_vapor = CO2.saturated_densities(T)
        assert "two-phase" in table
        assert f"ρ' {format_number(float(rho_liquid), 4)} kg/m³" in table
        assert f"ρ'' {format_number(float(rho_vapor), 4)} kg/m³" in table
        assert "Z " not in table  # no single-phase value that belongs to one branch only


async def test_near_saturation_alarms_and_the_keys_acknowledge_and_shelve_it():
    T, p = subcooled_state(0.5)  # inside the default 2 K saturation limit
    states = steady(T, p)
    async with shown(states) as (app, pilot):
        alarms = app.screen.query_one(AlarmList)
        assert "UNACK" in alarms.text and "saturation-temperature" in alarms.text
        margin = app.screen.query_one("#margin-dT_saturation_K", MarginGauge)
        assert margin.text.startswith("!") and margin.has_class("-beyond")
        await pilot.press("a")
        await pilot.pause(0.2)
        assert "UNACK" not in alarms.text and "ack" in alarms.text
        assert "ack" in app.screen.query_one(EventLog).text
        await pilot.press("s")
        await pilot.pause(0.2)
        assert "shelved" in alarms.text


async def test_units_switch_while_running():
    T, p = subcooled_state(5.0)
    async with shown(steady(T, p, 4)) as (app, pilot):
        readout = app.screen.query_one(LiveReadout)
        await pilot.press("u")
        await pilot.pause(0.2)
        gauge = (p - 101325.0) / 1e5
        assert f"{format_number(gauge, 5)} bar(g)" in readout.text
        await pilot.press("t")
        await pilot.pause(0.2)
        assert "283.15 K" in readout.text


async def test_diagram_keys_switch_view_and_zoom():
    T, p = subcooled_state(5.0)
    async with shown(steady(T, p, 4)) as (app, pilot):
        diagram = app.screen.query_one(PhaseDiagram)
        assert diagram.border_title.startswith("p–T") and "●" in diagram.text
        assert "▲ triple" in diagram.border_subtitle and "▲" in diagram.text
        await pilot.press("d")
        assert diagram.border_title.startswith("p–v")
        assert "triple" not in diagram.border_subtitle and "▲" not in diagram.text  # the legend lists what is drawn
        await pilot.press("z")
        assert "near now" in diagram.border_title
        assert "●" in diagram.text


async def test_help_lists_the_keys_and_the_safety_line():
    app = memory_app(steady(*subcooled_state(5.0), 2))
    async with app.run_test(size=(100, 40)) as pilot:
        assert SAFETY_NOTE in str(app.screen.query_one("#safety").render())
        await pilot.press("question_mark")
        assert isinstance(app.screen, HelpScreen)
        text = "\n".join(str(w.render()) for w in app.screen.query("Static"))
        assert SAFETY_NOTE in text
        for words in ("acknowledge", "shelve", "note", "pause", "zoom"):
            assert words in text
        await pilot.press("escape")
        assert not isinstance(app.screen, HelpScreen)


async def test_replay_keys_show_their_effect_while_paused():
    from tui.acquire import SourceOptions, open_source
    from tui.monitor.config import load_config
    from tui.monitor.pipeline import Monitor
    from tui.screen.app import make_app
    from tui.screen.session import Session
    from tui.screen.widgets.status_line import StatusLine

    source = open_source("virtual:view-cell", SourceOptions(speed=10.0))
    app = make_app(Session(source, load_config(fluid="CO2"), make_monitor=Monitor))

    async def shows(words):
        for _ in range(40):
            if words in app.screen.query_one(StatusLine).text:
                return True
            await pilot.pause(0.05)
        return False

    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, 20)
        await pilot.press("space")
        assert await shows("paused")
        await pilot.pause(0.3)
        paused_at = source.position
        await pilot.press("right")
        assert await shows(f"{int(paused_at + 10) // 60}:{(paused_at + 10) % 60:04.1f}/")
        samples = app.latest_view.samples
        await pilot.press("full_stop")
        for _ in range(40):
            if app.latest_view.samples == samples + 1:
                break
            await pilot.pause(0.05)
        assert app.latest_view.samples == samples + 1
    app.session.close(1.0)


async def test_help_keeps_the_safety_line_in_view_on_a_small_terminal():
    app = memory_app(steady(*subcooled_state(5.0), 2))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("question_mark")
        await pilot.pause(0.1)
        safety, keys = app.screen.query_one(".safety"), app.screen.query_one("#help-keys")
        assert safety.region.bottom <= 24 and keys.region.bottom <= safety.region.y
        assert keys.max_scroll_y > 0  # the rest of the keys scroll into view


async def test_note_goes_into_the_run_log_and_quitting_asks_first(tmp_path):
    from tui.record import RunRecorder

    recorder = RunRecorder(tmp_path)
    async with shown(steady(*subcooled_state(5.0), 4), recorder=recorder) as (app, pilot):
        await pilot.press("m")
        await pilot.press(*"valve V2 opened")
        await pilot.press("enter")
        await pilot.pause(0.2)
        assert "valve V2 opened" in app.screen.query_one(EventLog).text
        await pilot.press("q")
        assert isinstance(app.screen, ConfirmQuit)
        await pilot.press("n")
        assert not isinstance(app.screen, ConfirmQuit)
        await pilot.press("q", "y")
    app.session.close(2.0)
    log = recorder.path.read_text(encoding="utf-8")
    assert "valve V2 opened" in log


async def test_fluid_switch_reclassifies_with_the_new_fluid():
    async with shown(steady(300.0, 1e5, 4)) as (app, pilot):
        await pilot.press("f")
        keys = thermo.fluids()
        here = keys.index(app.session.fluid.key)
        step, target = ("down", keys[here + 1]) if here + 1 < len(keys) else ("up", keys[here - 1])
        await pilot.press(step, "enter")
        await pilot.pause(0.2)
        assert app.session.fluid.key == target
        assert app.latest_view.fluid == thermo.fluid(target).name
        for _ in range(100):
            if app.curves is not None:
                break
            await pilot.pause(0.05)
        assert app.curves.name == thermo.fluid(target).name


async def test_no_color_still_says_everything_in_words(monkeypatch):
    monkeypatch.setenv("NO_COLOR", "1")
    T, p = subcooled_state(0.5)
    async with shown(steady(T, p)) as (app, pilot):
        assert app.no_color
        assert "UNACK" in app.screen.query_one(AlarmList).text
        assert app.screen.query_one("#margin-dT_saturation_K", MarginGauge).text.startswith("!")
        assert "●" in app.screen.query_one(PhaseDiagram).text
