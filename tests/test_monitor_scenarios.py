"""Invented scenarios (fixtures/monitor/*.toml) played by the virtual gauge through the live monitor:
the alarms come when the phase-boundary curves say they should, and the curves agree with the
reference library (CoolProp)."""

from __future__ import annotations

import threading
from pathlib import Path

import numpy as np
import pytest

import thermo
from tui.acquire import Sample, SourceOptions, open_source
from tui.monitor.config import load_config
from tui.monitor.pipeline import Monitor

CoolProp = pytest.importorskip("CoolProp.CoolProp")

FIXTURES = Path(__file__).parent.parent / "fixtures" / "monitor"


def play(name: str):
    """(samples, events) of a scenario played as fast as possible, batch by batch as a live run."""
    source = open_source(f"virtual:{FIXTURES / name}", SourceOptions(speed=0))
    config = load_config(fluid=source.scenario.fluid)
    monitor = Monitor(config)
    samples, events = [], []
    for batch in source.batches(threading.Event()):
        chunk = [item for item in batch if isinstance(item, Sample)]
        samples += chunk
        events += monitor.process(chunk)[1]
    return config, samples, events


def expected_alarm_time(t: np.ndarray, holds: np.ndarray, on_delay: float) -> float:
    """The first sample time at which the condition has held for the on-delay (monotonic ramps)."""
    first = t[np.argmax(holds)]
    return float(t[np.argmax(t >= first + on_delay)])


def alarm_times(events, condition: str) -> list[float]:
    return [e.t_s for e in events if e.kind == "alarm" and e.condition == condition]


def arrays(samples):
    t = np.array([s.t_monotonic for s in samples]) - samples[0].t_monotonic
    return t, np.array([s.pressure_Pa for s in samples]), np.array([s.temperature_K for s in samples])


def test_water_heated_at_constant_pressure_alarms_when_its_subcooling_falls_below_the_limit():
    config, samples, events = play("water-heating-to-boiling.toml")
    settings = config.conditions["saturation-temperature"]
    assert settings.limit == 5.0  # water's suited value from default.toml
    t, p, T = arrays(samples)
    T_sat = thermo.fluid("water").saturation_temperature(p)
    # reference library: CoolProp's IAPWS-95 saturation temperature at the same pressures
    T_sat_reference = CoolProp.PropsSI("T", "P", p, "Q", 0, "Water")
    assert np.max(np.abs(T_sat - T_sat_reference)) < 0.01
    expected = expected_alarm_time(t, np.abs(T - T_sat) <= settings.limit, settings.on_delay_s)
    from_reference = expected_alarm_time(t, np.abs(T - T_sat_reference) <= settings.limit, settings.on_delay_s)
    assert abs(expected - from_reference) <= 0.2  # two samples at 10 Hz
    assert alarm_times(events, "saturation-temperature") == [pytest.approx(expected, abs=1e-6)]
    warning = alarm_times(events, "saturation-temperature-trend")
    assert warning and warning[0] < expected  # the trend warns before the limit
    changes = [e.message for e in events if e.kind == "phase-change"]
    assert changes == ["now liquid", "liquid -> liquid+vapor", "liquid+vapor -> vapor"]


def test_liquid_co2_chilled_towards_its_melting_curve_warns_of_solid_formation():
    config, samples, events = play("co2-liquid-line-cooling.toml")
    settings = config.conditions["solid-approach"]
    assert settings.limit == 10.0  # CO2's suited value (dry ice)
    t, p, T = arrays(samples)
    T_melt = thermo.fluid("CO2").melting_temperature(p)
    # reference library: CoolProp's CO2 melting line at 20 bar
    state = CoolProp.AbstractState("HEOS", "CO2")
    assert T_melt[0] == pytest.approx(state.melting_line(CoolProp.iT, CoolProp.iP, float(p[0])), abs=0.05)
    expected = expected_alarm_time(t, T - T_melt <= settings.limit, settings.on_delay_s)
    assert alarm_times(events, "solid-approach") == [pytest.approx(expected, abs=1e-6)]
    assert alarm_times(events, "solid-approach-trend")[0] < expected
    assert not alarm_times(events, "saturation-temperature")  # a subcooled liquid throughout


def test_co2_vapor_cooled_at_one_bar_warns_before_dry_ice_forms():
    config, samples, events = play("co2-vent-to-atmosphere.toml")
    settings = config.conditions["solid-approach"]
    t, p, T = arrays(samples)
    fluid = thermo.fluid("CO2")
    # common practice (from memory): dry ice sublimes at -78.5 degC (194.7 K) under 1 atm
    assert float(fluid.sublimation_temperature(101325.0)) == pytest.approx(194.7, abs=0.2)
    expected = expected_alarm_time(t, T - fluid.sublimation_temperature(p) <= settings.limit, settings.on_delay_s)
    assert alarm_times(events, "solid-approach") == [pytest.approx(expected, abs=1e-6)]
    assert alarm_times(events, "solid-approach-trend")[0] < expected
    assert [e.message for e in events if e.kind == "phase-change"][-1] == "vapor -> solid+vapor"
