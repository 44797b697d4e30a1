"""The monitor engine on synthetic margins: deadband and delays against chattering, trend and
predicted crossing, ISA-18.2 states, shelving, the flood guard, and chunking independence."""

from __future__ import annotations

import numpy as np
import pytest

from tui.errors import UsageError
from tui.monitor.config import load_config
from tui.monitor.engine import Engine
from tui.monitor.frame import OK_CODE, QUALITY_CODE
from tui.monitor.model import MARGINS

ROW = {name: row for row, name in enumerate(MARGINS)}


def config_with(tmp_path, text: str = ""):
    path = tmp_path / "monitor.toml"
    path.write_text(text)
    return load_config(path)


def margins_for(n: int, **given) -> np.ndarray:
    """MARGINS x n, far from every limit unless given."""
    values = np.empty((len(MARGINS), n))
    values[ROW["dT_saturation_K"]] = 30.0
    values[ROW["dp_saturation_Pa"]] = 3e6
    values[ROW["dT_solid_K"]] = 80.0
    values[ROW["critical_distance"]] = 0.5
    for name, series in given.items():
        values[ROW[name]] = series
    return values


def drive(engine: Engine, t, margins, *, quality=None, phase="liquid", pressure=5e6, chunks=(None,)):
    """Feed the engine in chunks (split points); returns (events, rates, time_to_boundary, active)."""
    n = t.size
    quality = np.full(n, OK_CODE, np.int8) if quality is None else quality
    phase_codes = np.full(n, engine.phases.code(phase), np.int16) if isinstance(phase, str) else phase
    valid = np.isin(quality, [QUALITY_CODE["ok"], QUALITY_CODE["out-of-specification"]])
    events, rates, boundary, active = [], [], [], []
    bounds = [0, *[c for c in chunks if c is not None], n]
    for start, stop in zip(bounds[:-1], bounds[1:]):
        s = slice(start, stop)
        step = engine.step(t[s], 1.8e9 + t[s], np.full(stop - start, pressure), np.full(stop - start, 300.0),
                           quality[s], valid[s], phase_codes[s], margins[:, s])
        events += step.events
        rates.append(step.rates)
        boundary.append(step.time_to_boundary)
        active.append(step.active)
    return events, np.concatenate(rates, 1), np.concatenate(boundary, 1), np.concatenate(active, 1)


def comparable(events):
    """Events as tuples with NaN replaced, so that equal events compare equal."""
    return [tuple("nan" if v != v else v for v in e.to_json().values()) for e in events]


def of(events, kind, condition=None):
    return [e for e in events if e.kind == kind and (condition is None or e.condition == condition)]


def test_limit_alarm_waits_for_its_on_delay_and_clears_past_the_deadband_after_the_off_delay(tmp_path):
    config = config_with(tmp_path)  # saturation-temperature: limit 2 K, deadband 0.2 K, on 2 s, off 5 s
    t = np.arange(0.0, 200.0, 0.5)
    margin = np.interp(t, [0, 50, 100, 150], [-6.0, -1.0, -1.0, -6.0])  # subcooling: in and out again
    events, *_ = drive(Engine(config), t, margins_for(t.size, dT_saturation_K=margin))
    alarms, clears = of(events, "alarm", "saturation-temperature"), of(events, "clear", "saturation-temperature")
    first_inside = t[np.argmax(np.abs(margin) <= 2.0)]
    first_clear = t[np.argmax((t > 100) & (np.abs(margin) > 2.2))]
    assert [e.t_s for e in alarms] == [pytest.approx(first_inside + 2.0)]
    assert [e.t_s for e in clears] == [pytest.approx(first_clear + 5.0)]
    assert alarms[0].priority == "high" and alarms[0].limit == 2.0
    assert "subcooling" in alarms[0].message


def test_noise_around_a_limit_gives_one_alarm_not_dozens(tmp_path):
    rng = np.random.default_rng(7)
    t = np.arange(0.0, 600.0, 0.5)
    margin = -(2.0 + rng.normal(0.0, 0.05, t.size))  # subcooling jittering across the 2 K limit
    damped = of(drive(Engine(config_with(tmp_path)), t, margins_for(t.size, dT_saturation_K=margin))[0],
                "alarm", "saturation-temperature")
    bare = config_with(tmp_path, """
[conditions.saturation-temperature]
deadband = 0
on_delay = 0
off_delay = 0
""")
    raw = of(drive(Engine(bare), t, margins_for(t.size, dT_saturation_K=margin))[0], "alarm", "saturation-temperature")
    assert len(damped) == 1
    assert len(raw) > 50  # the same signal without deadband and delays chatters


def test_prediction_on_a_linear_ramp_is_within_two_percent_once_the_window_is_full(tmp_path):
    config = config_with(tmp_path)  # trend window 60 s in 12 slots
    rng = np.random.default_rng(3)
    t = np.arange(0.0, 500.0, 0.1)
    speed = 0.05  # K/s towards the solid curve
    t_cross = 450.0
    clean = speed * (t_cross - t)
    noisy = clean + rng.normal(0.0, 0.01, t.size)
    # noise of the current value moves the prediction by about 0.01 K / 0.05 K/s = 0.2 s
    for margin, closest in ((clean, 1.0), (noisy, 30.0)):
        _, rates, boundary, _ = drive(Engine(config), t, margins_for(t.size, dT_solid_K=margin))
        row = ROW["dT_solid_K"]
        full = (t >= 60.0 + 5.0) & (t_cross - t > closest)  # the window and its slot are complete
        predicted = t[full] + boundary[row, full]
        assert np.all(np.abs(predicted - t_cross) <= 0.02 * (t_cross - t[full]))
        assert np.all(np.isnan(rates[row, t < 60.0]))
        assert rates[row, full] == pytest.approx(-speed, rel=0.01)


def test_trend_warning_comes_before_the_limit_alarm(tmp_path):
    config = config_with(tmp_path)  # CO2 solid-approach: limit 10 K, horizon 10 min
    t = np.arange(0.0, 1500.0, 0.5)
    margin = 60.0 - 0.05 * t  # the limit (10 K) is reached at 1000 s
    events, *_ = drive(Engine(config), t, margins_for(t.size, dT_solid_K=margin))
    warning = of(events, "alarm", "solid-approach-trend")
    limit = of(events, "alarm", "solid-approach")
    # predicted to reach 10 K within 600 s from t = 400 s on; plus the 2 s on-delay
    assert warning[0].t_s == pytest.approx(402.0, abs=0.6)
    assert limit[0].t_s == pytest.approx(1002.0, abs=0.6)
    assert "reaches its limit of 10.00 K" in warning[0].message


def test_a_spike_in_the_window_does_not_move_the_rate(tmp_path):
    config = config_with(tmp_path)
    t = np.arange(0.0, 200.0, 0.5)
    margin = 40.0 - 0.02 * t
    spiked = margin.copy()
    spiked[(t >= 100.0) & (t < 105.0)] += 30.0  # a burst of garbage filling one slot
    _, clean_rates, _, _ = drive(Engine(config), t, margins_for(t.size, dT_solid_K=margin))
    _, spiked_rates, _, _ = drive(Engine(config), t, margins_for(t.size, dT_solid_K=spiked))
    row, late = ROW["dT_solid_K"], t >= 70.0
    assert spiked_rates[row, late] == pytest.approx(clean_rates[row, late], rel=0.05)


def test_any_chunking_gives_the_same_events_and_arrays_to_the_bit(tmp_path):
    config = config_with(tmp_path, "[conditions.saturation-pressure]\nenabled = true\n")
    rng = np.random.default_rng(11)
    t = np.cumsum(rng.uniform(0.05, 0.6, 3000))
    margin = 3.0 * np.sin(t / 40.0) + rng.normal(0, 0.2, t.size)
    margins = margins_for(t.size, dT_saturation_K=margin, dp_saturation_Pa=2e5 * margin,
                          dT_solid_K=20 + 15 * np.cos(t / 60.0))
    quality = np.where(rng.random(t.size) < 0.02, QUALITY_CODE["failure"], OK_CODE).astype(np.int8)
    whole = drive(Engine(config), t, margins, quality=quality)
    for chunks in ([1, 2, 3, 1500], sorted(rng.choice(t.size, 200, replace=False)), list(range(1, t.size))):
        pieces = drive(Engine(config), t, margins, quality=quality, chunks=chunks)
        assert comparable(pieces[0]) == comparable(whole[0])
        for a, b in zip(pieces[1:], whole[1:]):
            assert np.array_equal(a, b, equal_nan=True)
    assert len(of(whole[0], "alarm")) > 5


def test_isa_states_acknowledge_and_return_to_normal(tmp_path):
    engine = Engine(config_with(tmp_path))
    t = np.arange(0.0, 100.0, 0.5)
    inside = margins_for(t.size, dT_saturation_K=np.full(t.size, 1.0))
    drive(engine, t, inside)
    status = {s.condition: s for s in engine.board.statuses()}["saturation-temperature"]
    assert status.state == "unacknowledged" and status.active
    acks = engine.board.acknowledge("saturation-temperature", 100.0, 0.0)
    assert [e.kind for e in acks] == ["ack"]
    assert {s.condition: s.state for s in engine.board.statuses()}["saturation-temperature"] == "acknowledged"
    events, *_ = drive(engine, t + 100.0, margins_for(t.size))
    assert [e.kind for e in of(events, "clear", "saturation-temperature")] == ["clear"]
    assert {s.condition: s.state for s in engine.board.statuses()}["saturation-temperature"] == "normal"
    # returned to normal before anyone acknowledged: stays until acknowledged
    drive(engine, t + 200.0, inside)
    drive(engine, t + 300.0, margins_for(t.size))
    assert {s.condition: s.state for s in engine.board.statuses()}["saturation-temperature"] == "returned-unacknowledged"
    engine.board.acknowledge(None, 400.0, 0.0)
    assert {s.condition: s.state for s in engine.board.statuses()}["saturation-temperature"] == "normal"


def test_a_shelved_alarm_is_silent_until_its_shelve_expires(tmp_path):
    engine = Engine(config_with(tmp_path))
    t = np.arange(0.0, 100.0, 0.5)
    engine.board.shelve("saturation-temperature", 60.0, 0.0, 0.0)
    events, _, _, active = drive(engine, t, margins_for(t.size, dT_saturation_K=np.full(t.size, 1.0)))
    row = engine.names.index("saturation-temperature")
    kinds = [(e.kind, e.t_s) for e in events if e.condition == "saturation-temperature"]
    assert kinds == [("shelve", 60.0), ("alarm", 60.0)]
    assert not active[row, t < 60.0].any() and active[row, t >= 60.0].all()
    with pytest.raises(UsageError, match="at most 8 h"):
        engine.board.shelve("saturation-temperature", 1e9, 100.0, 0.0)


def test_a_flood_is_summarised_and_every_alarm_is_still_logged(tmp_path):
    config = config_with(tmp_path, """
[conditions.sensor-quality]
off_delay = 0
[conditions.two-phase]
on_delay = 0
off_delay = 0
""")
    engine = Engine(config)
    t = np.arange(0.0, 1800.0, 1.0)
    burst = (t >= 100) & (t < 300)
    flapping = burst & (t.astype(int) % 20 < 5)  # a failure every 20 s during the burst
    quality = np.where(flapping, QUALITY_CODE["failure"], OK_CODE).astype(np.int8)
    phase = np.where(burst & (t.astype(int) % 20 >= 10) & (t.astype(int) % 20 < 15), engine.phases.code("liquid+vapor"),
                     engine.phases.code("liquid")).astype(np.int16)
    events, *_ = drive(engine, t, margins_for(t.size), quality=quality, phase=phase)
    alarms = of(events, "alarm")
    floods = of(events, "flood")
    rising_sensor = np.flatnonzero(np.diff(flapping.astype(int)) == 1).size
    assert len(of(events, "alarm", "sensor-quality")) == rising_sensor  # nothing dropped
    assert len(floods) == 2 and floods[0].t_s < floods[1].t_s
    assert floods[0].t_s == alarms[10].t_s and "every alarm is still logged" in floods[0].message
    assert all(a.in_flood for a in alarms[10:] if a.t_s < floods[1].t_s)
    assert not any(a.in_flood for a in alarms[:10])
    assert "alarm flood over" in floods[1].message
    # the flood ends at the first sample with fewer than 5 alarms in the last 600 s
    times = np.array([a.t_s for a in alarms])
    end = floods[1].t_s
    assert np.count_nonzero(times > end - 600.0) < 5 <= np.count_nonzero(times > end - 1.0 - 600.0)
