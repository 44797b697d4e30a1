"""The comparison of runs, the summary tables and their renderings."""

import csv
import io

import numpy as np

from thermo.units import PressureUnit, TemperatureUnit
from tui.analysis.comparison import comparison_table
from tui.analysis.display import Units
from tui.analysis.run import AnalysedRun
from tui.analysis.summary import summarise
from tui.analysis.summary_view import MAX_LISTED, summary_sections
from tui.analysis.tables import Table, render_csv, render_html, render_markdown, render_text
from tui.monitor.model import Event

UNITS = Units.of(PressureUnit.from_text("bar(g)"), TemperatureUnit.from_text("degC"))


def _run(name, phase, dT, events=()):
    n = len(phase)
    return AnalysedRun(
        source=f"campaign/{name}",
        fluid="CO2",
        t_s=np.arange(n, dtype=float),
        pressure_Pa=np.full(n, 5e6),
        temperature_K=np.full(n, 280.0),
        quality=np.array(["ok"] * n),
        phase=np.array(phase),
        margins={"dT_saturation_K": np.array(dT, dtype=float), "dp_saturation_Pa": np.array(dT) * 1e5},
        events=tuple(events),
    )


def test_one_row_per_run_with_the_same_columns():
    alarm = Event(1.0, 0.0, "alarm", "near-saturation", "high")
    first = summarise(_run("a.csv", ["liquid", "liquid", "liquid+vapor", "vapor", "vapor"], [-3, -1, 0.2, 2, 4], [alarm]))
    second = summarise(_run("b.csv", ["gas"] * 3, [np.nan] * 3), alarms_under={"tight": (alarm, alarm)})
    table = comparison_table([first, second], UNITS)
    assert len(table.rows) == 2 and all(len(row) == len(table.headers) for row in table.rows)
    rows = [dict(zip(table.headers, row)) for row in table.rows]
    assert [r["run"] for r in rows] == ["a.csv", "b.csv"]
    assert rows[0]["phase changes"] == "2" and rows[1]["phase changes"] == "0"
    assert rows[0]["main phases"] == "liquid 50.0 %, liquid+vapor 25.0 %, vapor 25.0 %"  # ties alphabetical
    assert rows[0]["nearest dT_saturation [K]"] == "0.2000"
    assert rows[0]["nearest dp_saturation [bar]"] == "0.2000"  # a difference: no gauge offset
    assert rows[1]["nearest dT_saturation [K]"] == "n/a"
    assert rows[0]["alarms"] == "1: near-saturation x1"
    assert rows[0]["alarms under tight"] == "0" and rows[1]["alarms under tight"] == "2: near-saturation x2"


def test_summary_sections_list_at_most_a_screenful_of_changes():
    phase = ["liquid", "vapor"] * (MAX_LISTED + 5)
    summary = summarise(_run("chatter.csv", phase, np.zeros(len(phase))))
    changes = {s.title: s.table for s in summary_sections(summary, UNITS)}["Phase changes"]
    assert len(changes.rows) == MAX_LISTED
    assert changes.note.startswith(f"... and {len(phase) - 1 - MAX_LISTED} more")


def test_summary_sections_name_each_part_of_the_summary():
    summary = summarise(_run("a.csv", ["liquid"] * 3, [-3, -2, -1]), near_limits={"dT_saturation_K": 2.0})
    sections = {s.title: s.table for s in summary_sections(summary, UNITS)}
    assert list(sections) == ["Overview", "Time in each phase", "Phase changes", "Margins", "Boundaries", "Alarms"]
    assert sections["Alarms"].note == "no alarm"
    boundaries = {row[0]: row for row in sections["Boundaries"].rows}
    assert boundaries["saturation"][2] == "1.000"  # the sample at -2 K holds 1 s; the last one holds none
    assert boundaries["saturation"][3] == "|dT_saturation| <= 2.000 K"
    assert dict(sections["Overview"].rows)["log"] == "campaign/a.csv"
    assert sections["Margins"].rows[0][0] == "dT_saturation [K]"


TABLE = Table(["name", "value [K]"], [["a|b", "1.5"], ["<c>", "-20.25"]], "note")


def test_text_rendering_aligns_columns():
    lines = render_text(TABLE).splitlines()
    assert lines[0] == "name  value [K]" and lines[1] == "----  ---------"
    assert lines[3] == "<c>   -20.25" and lines[-1] == "note"


def test_markdown_html_and_csv_keep_every_cell():
    markdown = render_markdown(TABLE)
    assert "| a\\|b | 1.5 |" in markdown
    assert "<td>&lt;c&gt;</td>" in render_html(TABLE)
    assert list(csv.reader(io.StringIO(render_csv(TABLE)))) == [TABLE.headers, *TABLE.rows]
