"""`rigside analyze` end to end on invented logs whose answers follow from the phase boundaries.

Expected values are computed here from thermo's curves and cross-checked against the
reference library (CoolProp 8, HEOS backend for CO2, after Span & Wagner 1996).
"""

import csv
import json
from pathlib import Path

import CoolProp.CoolProp as CoolProp
import numpy as np
import pytest

import thermo
from tui.cli import main
from tui.record.table import read_table

LOGS = Path(__file__).parent.parent / "fixtures" / "logs"
CO2 = thermo.fluid("CO2")
U_P, U_T = 5000.0, 0.1  # the documented default gauge uncertainties [Pa, K]


def analyze(capsys, *args):
    status = main(["analyze", *map(str, args)])
    out, err = capsys.readouterr()
    return status, out, err


def analyze_json(capsys, *args):
    status, out, err = analyze(capsys, *args, "--json")
    assert status == 0, err
    return json.loads(out), err


def _table(name):
    table = read_table(LOGS / name)
    return table["t_s"], table["pressure_Pa"], table["temperature_K"]


def test_boiling_at_constant_pressure_changes_phase_where_the_saturation_curve_says(capsys):
    summary, _ = analyze_json(capsys, LOGS / "co2-heating-50bar.csv", "--fluid", "CO2")
    t, p, T = _table("co2-heating-50bar.csv")
    # on the curve within k = 2 combined uncertainties (DESIGN §3): |p - p_sat(T)| <= 2 sqrt(u_p^2 + (u_T dp/dT)^2)
    p_sat = CO2.saturation_pressure(T)
    slope = (CO2.saturation_pressure(T + 1e-3) - CO2.saturation_pressure(T - 1e-3)) / 2e-3
    on = np.abs(p - p_sat) <= 2 * np.hypot(U_P, U_T * slope)
    expected = [(t[on][0], "liquid", "liquid+vapor"), (t[~on & (t > t[on][0])][0], "liquid+vapor", "vapor")]
    changes = [(c["t_s"], c["from"], c["to"]) for c in summary["phase_changes"]]
    assert [c[1:] for c in changes] == [e[1:] for e in expected]
    for (t_seen, *_), (t_expected, *_) in zip(changes, expected):
        assert t_seen == pytest.approx(t_expected, abs=1.0)  # one sample
    # the reference library puts the boiling point at the same place (CoolProp: T_sat(50 bar))
    T_sat_ref = CoolProp.PropsSI("T", "P", 50e5, "Q", 0, "CO2")
    t_boil_ref = (T_sat_ref - T[0]) / 0.05
    assert changes[0][0] < t_boil_ref < changes[1][0]
    # nearest approach: the sample closest to T_sat(p)
    closest = summary["margins"]["dT_saturation_K"]
    i = np.argmin(np.abs(T - CO2.saturation_temperature(p)))
    assert closest["closest_t_s"] == t[i]
    assert closest["closest"] == pytest.approx(T[i] - T_sat_ref, abs=5e-3)
    assert summary["time_in_phase_s"]["liquid+vapor"] == pytest.approx(changes[1][0] - changes[0][0])


def test_other_limits_replayed_after_the_fact_count_their_own_alarms(capsys):
    summary, _ = analyze_json(
        capsys, LOGS / "co2-two-approaches.csv", "--fluid", "CO2",
        "--config", LOGS / "saturation-limit-2K.toml", "--compare-config", LOGS / "saturation-limit-4K.toml",
    )
    t, p, T = _table("co2-two-approaches.csv")
    subcooling = CO2.saturation_temperature(p) - T
    # cross-check of the curve the expectation rests on (CoolProp T_sat at 50 bar, 5 mK)
    assert subcooling[0] + T[0] == pytest.approx(CoolProp.PropsSI("T", "P", 50e5, "Q", 0, "CO2"), abs=5e-3)

    def expected_alarm_times(limit, on_delay=2.0):
        inside = subcooling <= limit
        starts = np.flatnonzero(inside & ~np.concatenate(([False], inside[:-1])))
        return [t[i] + on_delay for i in starts]

    def seen(tallies):
        return {a["condition"]: a for a in tallies}["saturation-temperature"]

    tight, wide = seen(summary["alarms"]), seen(summary["alarms_under"][str(LOGS / "saturation-limit-4K.toml")])
    assert (tight["count"], wide["count"]) == (1, 2)  # the approaches came within 3 K and 1 K
    assert tight["first_t_s"] == pytest.approx(expected_alarm_times(2.0)[0], abs=0.5)
    assert wide["first_t_s"] == pytest.approx(expected_alarm_times(4.0)[0], abs=0.5)
    assert len(expected_alarm_times(2.0)) == 1 and len(expected_alarm_times(4.0)) == 2


def test_cooling_toward_the_melting_curve_reports_the_margin_left(capsys):
    summary, _ = analyze_json(capsys, LOGS / "co2-cooling-10bar.csv", "--fluid", "CO2")
    lowest = summary["margins"]["dT_solid_K"]
    # CO2 melts at 216.695 K under 10 bar (CoolProp's melting line, after Span & Wagner 1996)
    melting = CoolProp.AbstractState("HEOS", "CO2").melting_line(CoolProp.iT, CoolProp.iP, 1e6)
    assert lowest["minimum"] == pytest.approx(218.0 - melting, abs=0.02)
    assert lowest["minimum_t_s"] == 120.0  # the first sample at the coldest temperature
    # the CO2-suited solid-approach limit (10 K, on-delay 2 s) is reached at T = T_melt + 10 K
    t, p, T = _table("co2-cooling-10bar.csv")
    reach = t[np.flatnonzero(T - CO2.melting_temperature(p) <= 10.0)[0]] + 2.0
    solid = {a["condition"]: a for a in summary["alarms"]}["solid-approach"]
    assert solid["count"] == 1 and solid["first_t_s"] == pytest.approx(reach, abs=1.0)


def test_a_run_log_is_replayed_under_its_recorded_configuration_with_the_live_events(capsys):
    summary, _ = analyze_json(capsys, LOGS / "co2-boiling-run.csv")
    table = read_table(LOGS / "co2-boiling-run.csv")
    live = {}
    for event in (e for e in table.events if e["kind"] == "alarm"):
        first, count = live.get(event["condition"], (event["t_s"], 0))
        live[event["condition"]] = (first, count + 1)
    assert len(live) >= 2  # the recorded run raised alarms of several conditions
    assert {a["condition"]: (a["first_t_s"], a["count"]) for a in summary["alarms"]} == live
    assert summary["fluid"] == "carbon dioxide"


@pytest.mark.parametrize(
    "name, bad, samples",
    [
        ("co2-boiling-garbled.csv", {20: "garbled", 35: "'fifty bar' is not a number", 70: "garbled", 80: "quality 'o?k'"}, 86),
        ("co2-boiling-truncated.csv", {99: "truncated last line"}, 89),
    ],
)
def test_broken_logs_name_each_bad_line_and_the_rest_is_analysed(capsys, name, bad, samples):
    summary, err = analyze_json(capsys, LOGS / name)
    clean, _ = analyze_json(capsys, LOGS / "co2-boiling-run.csv")
    lines = err.strip().splitlines()
    assert len(lines) == len(bad)
    for line, (number, words) in zip(lines, bad.items()):
        assert line.startswith(f"rigside analyze: {LOGS / name} line {number}: ") and words in line
    assert [b["line"] for b in summary["bad_lines"]] == list(bad)
    assert summary["samples"] == samples
    assert summary["phase_changes"] == clean["phase_changes"]


def test_a_sample_earlier_than_the_one_before_it_is_left_out(capsys, tmp_path):
    lines = (LOGS / "co2-heating-50bar.csv").read_text().splitlines()
    stepped_back = tmp_path / "clock-stepped-back.csv"
    stepped_back.write_text("\n".join([*lines[:51], "10.0,50.000,10.500", *lines[51:]]) + "\n")
    summary, err = analyze_json(capsys, stepped_back, "--fluid", "CO2")
    clean, _ = analyze_json(capsys, LOGS / "co2-heating-50bar.csv", "--fluid", "CO2")
    assert err == f"rigside analyze: {stepped_back}: 1 samples earlier than one before them; left out\n"
    assert summary["out_of_order_samples"] == 1
    assert (summary["samples"], summary["time_in_phase_s"], summary["gaps"]) == (clean["samples"], clean["time_in_phase_s"], [])


def test_the_annotated_copy_replays_as_a_log(capsys, tmp_path):
    out = tmp_path / "annotated.csv"
    status, _, err = analyze(capsys, LOGS / "co2-heating-50bar.csv", "--fluid", "CO2", "--annotate", out)
    assert status == 0, err
    again = read_table(out)
    t, p, T = _table("co2-heating-50bar.csv")
    np.testing.assert_allclose(again["pressure_Pa"], p)
    np.testing.assert_allclose(again["temperature_K"], T, atol=1e-4)
    rows = list(csv.DictReader(line for line in out.read_text().splitlines() if not line.startswith("#")))
    assert rows[0]["phase"] == "liquid" and rows[-1]["phase"] == "vapor" and len(rows) == t.size


def test_several_logs_give_one_comparison_row_each(capsys, tmp_path):
    logs = [LOGS / "co2-heating-50bar.csv", LOGS / "co2-two-approaches.csv", LOGS / "co2-cooling-10bar.csv"]
    table = tmp_path / "campaign.csv"
    status, out, err = analyze(capsys, *logs, "--fluid", "CO2", "--table", table, "--annotate", tmp_path / "annotated")
    assert status == 0, err
    printed = out.strip().splitlines()
    assert printed[0].startswith("run ") and len(printed) == 2 + len(logs)
    rows = list(csv.DictReader(table.open()))
    assert [r["run"] for r in rows] == [log.name for log in logs]
    assert [r["phase changes"] for r in rows] == ["2", "0", "0"]
    assert sorted(p.name for p in (tmp_path / "annotated").iterdir()) == sorted(f"{log.stem}-annotated.csv" for log in logs)


@pytest.mark.parametrize("suffix", [".html", ".md"])
def test_the_report_is_one_file_with_the_summary_and_the_figures(capsys, tmp_path, suffix):
    pytest.importorskip("matplotlib")
    report = tmp_path / f"report{suffix}"
    status, _, err = analyze(capsys, LOGS / "co2-heating-50bar.csv", LOGS / "co2-cooling-10bar.csv", "--fluid", "CO2", "--report", report)
    assert status == 0, err
    text = report.read_text()
    assert "Comparison of runs" in text and "Phase changes" in text and "monitoring aid, not a safety system" in text
    figures = text.count("<svg") if suffix == ".html" else text.count("](data:image/png;base64,")
    assert figures == 4  # the p-T trajectory and the margins of each run


def test_figures_are_written_as_png_and_svg(capsys, tmp_path):
    pytest.importorskip("matplotlib")
    status, _, err = analyze(capsys, LOGS / "co2-cooling-10bar.csv", "--fluid", "CO2", "--figures", tmp_path)
    assert status == 0, err
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "co2-cooling-10bar-margins.png", "co2-cooling-10bar-margins.svg", "co2-cooling-10bar-pT.png", "co2-cooling-10bar-pT.svg",
    ]


@pytest.mark.parametrize(
    "args, message",
    [
        ([LOGS / "co2-heating-50bar.csv"], "does not say which fluid it holds; give --fluid"),
        (["missing.csv", "--fluid", "CO2"], "log 'missing.csv': no such file"),
        ([LOGS / "co2-heating-50bar.csv", "--fluid", "CO2", "--report", "out.pdf"], "name it .html or .md"),
        ([LOGS / "co2-boiling-run.csv", "--config", LOGS / "water.toml"], "water.toml is for water but"),
        ([LOGS / "co2-heating-50bar.csv", "--fluid", "CO2", "--annotate", LOGS / "co2-heating-50bar.csv"], "is one of the logs"),
        ([LOGS / "co2-heating-50bar.csv", f"{LOGS}/./co2-heating-50bar.csv", "--fluid", "CO2", "--figures", "out"], "share the name"),
    ],
)
def test_bad_usage_is_one_line_and_exit_status_2(capsys, tmp_path, args, message):
    status, out, err = analyze(capsys, *args)
    assert status == 2 and out == ""
    assert len(err.strip().splitlines()) == 1 and message in err


def test_nan_cells_of_a_plain_csv_are_failed_samples_not_good_ones(capsys, tmp_path):
    """A CSV without a quality column: a 'nan' or 'inf' value is a failure (NAMUR NE 107), counted and alarmed."""
    log = tmp_path / "cells.csv"
    log.write_text("t_s,pressure [bar],temperature [degC]\n0,50,20\n1,nan,20\n2,50,inf\n3,51,20\n")
    summary, _ = analyze_json(capsys, log, "--fluid", "CO2")
    assert summary["samples_by_quality"] == {"failure": 2, "ok": 2}
    assert "sensor-quality" in {a["condition"] for a in summary["alarms"]}
