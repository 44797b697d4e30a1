"""Summaries of synthetic runs whose answers are counted by hand."""

import json

import numpy as np
import pytest

from tui.analysis.run import AnalysedRun, BadLine
from tui.analysis.summary import GAP_FACTOR, alarm_periods, summarise, summary_json
from tui.monitor.model import Event


def _run(t, phase, margins=None, quality=None, events=(), bad_lines=()):
    t = np.asarray(t, dtype=float)
    return AnalysedRun(
        source="synthetic.csv",
        fluid="CO2",
        t_s=t,
        pressure_Pa=np.full(t.size, 5e6),
        temperature_K=np.full(t.size, 280.0),
        quality=np.asarray(quality if quality is not None else ["ok"] * t.size),
        phase=np.asarray(phase),
        margins=margins or {},
        events=tuple(events),
        bad_lines=tuple(bad_lines),
    )


def test_time_in_each_phase_follows_the_samples_and_skips_gaps():
    # 1 s samples at t = 0..9 and 20..24: the 10 s hole between 9 and 20 is a gap
    t = [*range(10), *range(20, 25)]
    phase = ["liquid"] * 4 + ["liquid+vapor"] * 3 + ["vapor"] * 3 + ["vapor"] * 2 + ["gas"] * 3
    summary = summarise(_run(t, phase))
    assert summary.duration_s == 24.0
    assert summary.samples == 15
    assert summary.gap_threshold_s == GAP_FACTOR * 1.0
    assert [(g.start_s, g.end_s) for g in summary.gaps] == [(9.0, 20.0)]
    # each sample holds until the next one; the last sample and the gap count for nothing
    assert summary.time_in_phase_s == {"liquid": 4.0, "liquid+vapor": 3.0, "vapor": 4.0, "gas": 2.0}
    assert sum(summary.time_in_phase_s.values()) + summary.gap_s == summary.duration_s


def test_an_explicit_gap_threshold_wins_over_the_median_rule():
    summary = summarise(_run([0, 1, 2, 5, 6], ["vapor"] * 5), gap_threshold_s=2.5)
    assert [(g.start_s, g.end_s) for g in summary.gaps] == [(2.0, 5.0)]
    assert summary.time_in_phase_s == {"vapor": 3.0}


def test_phase_changes_ignore_a_stretch_of_unclassified_samples():
    phase = ["liquid", "liquid", "unclassified", "liquid", "liquid+vapor", "unclassified", "vapor"]
    quality = ["ok", "ok", "failure", "ok", "ok", "function-check", "ok"]
    summary = summarise(_run(range(7), phase, quality=quality))
    assert [(c.t_s, c.before, c.after) for c in summary.phase_changes] == [
        (4.0, "liquid", "liquid+vapor"),
        (6.0, "liquid+vapor", "vapor"),
    ]
    assert summary.samples_by_quality == {"failure": 1, "function-check": 1, "ok": 5}
    assert summary.time_in_phase_s["unclassified"] == 2.0


def test_margin_extremes_give_the_lowest_value_and_the_nearest_approach():
    t = np.arange(6.0)
    dT = np.array([-8.0, -3.0, -0.5, np.nan, 2.0, 6.0])
    summary = summarise(_run(t, ["liquid"] * 6, margins={"dT_saturation_K": dT, "dT_solid_K": np.full(6, np.nan)}))
    by_name = {m.margin: m for m in summary.margins}
    sat = by_name["dT_saturation_K"]
    assert (sat.minimum, sat.minimum_t_s, sat.closest, sat.closest_t_s) == (-8.0, 0.0, -0.5, 2.0)
    assert np.isnan(by_name["dT_solid_K"].minimum)


def test_time_on_and_near_each_boundary():
    t = np.arange(8.0)
    phase = ["liquid", "liquid", "liquid+vapor", "liquid+vapor", "vapor", "vapor", "vapor", "vapor"]
    dT = np.array([-5.0, -1.5, 0.0, 0.1, 0.9, 3.0, 4.0, 5.0])
    summary = summarise(_run(t, phase, margins={"dT_saturation_K": dT}), near_limits={"dT_saturation_K": 1.0, "dT_solid_K": 3.0})
    by_name = {b.boundary: b for b in summary.boundaries}
    assert by_name["saturation"].on_s == 2.0
    assert by_name["saturation"].near_s == 3.0  # samples at 2, 3 (on) and 4 (0.9 K); the last sample holds 0 s
    assert by_name["saturation"].near_limits == {"dT_saturation_K": 1.0}
    assert by_name["solid"].near_s == 0.0  # no dT_solid margin in this run: only "on" counts


def test_alarm_tallies_pair_alarms_with_their_clears():
    events = [
        Event(2.0, 0.0, "alarm", "near-saturation", "high"),
        Event(2.5, 0.0, "ack", "near-saturation"),
        Event(5.0, 0.0, "clear", "near-saturation"),
        Event(6.0, 0.0, "alarm", "near-solid", "urgent"),
        Event(7.0, 0.0, "alarm", "near-saturation", "high"),
    ]
    summary = summarise(_run(range(11), ["vapor"] * 11, events=events))
    tallies = {a.condition: a for a in summary.alarms}
    assert list(tallies) == ["near-saturation", "near-solid"]
    assert (tallies["near-saturation"].count, tallies["near-saturation"].first_t_s, tallies["near-saturation"].active_s) == (2, 2.0, 6.0)
    assert (tallies["near-solid"].count, tallies["near-solid"].priority, tallies["near-solid"].active_s) == (1, "urgent", 4.0)
    assert alarm_periods(tuple(events), 10.0)["near-saturation"] == [(2.0, 5.0), (7.0, 10.0)]


def test_alarms_under_another_configuration_are_tallied_beside():
    other = (Event(1.0, 0.0, "alarm", "near-critical", "low"), Event(3.0, 0.0, "clear", "near-critical"))
    summary = summarise(_run(range(5), ["gas"] * 5), alarms_under={"tight.toml": other})
    assert summary.alarms == ()
    assert [(a.condition, a.count, a.active_s) for a in summary.alarms_under["tight.toml"]] == [("near-critical", 1, 2.0)]


def test_json_is_strict_snake_case_with_unit_suffixes():
    summary = summarise(
        _run([0, 1, 2], ["liquid", "vapor", "vapor"], margins={"critical_distance": np.full(3, np.nan)}, bad_lines=[BadLine(4, "no number")])
    )
    text = json.dumps(summary_json(summary), allow_nan=False)  # NaN must have become null
    data = json.loads(text)
    assert data["duration_s"] == 2.0
    assert data["phase_changes"] == [{"t_s": 1.0, "from": "liquid", "to": "vapor"}]
    assert data["margins"]["critical_distance"]["minimum"] is None
    assert data["bad_lines"] == [{"line": 4, "reason": "no number"}]
    assert set(data) >= {"samples", "time_in_phase_s", "gaps", "boundaries", "alarms", "alarms_under"}


@pytest.mark.parametrize("t", [[], [3.0]])
def test_empty_and_single_sample_runs_summarise_to_zero_time(t):
    summary = summarise(_run(t, ["liquid"] * len(t)))
    assert summary.duration_s == 0.0
    assert summary.gaps == ()
    assert sum(summary.time_in_phase_s.values()) == 0.0
