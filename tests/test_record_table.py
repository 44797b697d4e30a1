"""The table reader: CSV columns by name and unit, ISO times, bad lines by number, run-log truncation."""

import math

import numpy as np
import pytest

from tui.errors import UsageError
from tui.record import read_table

PSI = 0.45359237 * 9.80665 / 0.0254**2  # 1 psi = 6894.757 Pa (1959 definitions)
ATM = 101_325.0


def write(tmp_path, text, name="data.csv"):
    path = tmp_path / name
    path.write_text(text)
    return path


def test_csv_columns_found_by_name_with_bracketed_units(tmp_path):
    path = write(tmp_path, "time [min],pressure [psig],T (degF)\n0,0,32\n0.5,14.7,212\n")
    table = read_table(path)
    assert table["t_s"].tolist() == [0.0, 30.0]
    assert table["pressure_Pa"] == pytest.approx([ATM, 14.7 * PSI + ATM])
    assert table["temperature_K"] == pytest.approx([273.15, 373.15])
    assert np.isnan(table["t_wall"]).all() and not table.is_run_log


def test_units_and_columns_from_options_and_semicolons(tmp_path):
    path = write(tmp_path, "elapsed;druck;temp\n1;2.5;20\n2;2.6;21\n")
    table = read_table(path, pressure_column="druck", pressure_unit="bar", temperature_unit="degC", gauge=True, atmosphere_Pa=95_000.0)
    assert table["pressure_Pa"] == pytest.approx([2.5e5 + 95_000.0, 2.6e5 + 95_000.0])
    assert table["t_s"].tolist() == [1.0, 2.0]


def test_iso_8601_time(tmp_path):
    path = write(tmp_path, "timestamp,p [bar],T [K]\n2026-03-01T10:00:00Z,1,300\n2026-03-01T10:00:02.5Z,2,301\nnot-a-time,3,302\n")
    table = read_table(path)
    assert table["t_s"].tolist() == [0.0, 2.5]
    assert table["t_wall"][0] == pytest.approx(1772359200.0)  # 2026-03-01T10:00:00Z
    assert table.bad_lines == [(4, "time 'timestamp' is not ISO 8601")]


def test_an_empty_or_garbled_iso_time_is_a_bad_line_and_the_rest_is_read(tmp_path):
    rows = [f"2026-03-01T10:00:{i:02d}Z,{i},300" for i in range(40)]
    rows[7], rows[30] = ",7,300", "2026-13-45T99:00:00Z,30,300"
    table = read_table(write(tmp_path, "timestamp,p [bar],T [K]\n" + "\n".join(rows) + "\n"))
    assert [line for line, _ in table.bad_lines] == [9, 32]
    assert table["t_s"].tolist() == [float(i) for i in range(40) if i not in (7, 30)]


def test_iso_times_with_offsets(tmp_path):
    path = write(tmp_path, "time,p [bar],T [K]\n2026-03-01T11:00:00+01:00,1,300\n2026-03-01 10:00:01,2,301\n")
    table = read_table(path)
    assert table["t_s"].tolist() == [0.0, 1.0]


def test_garbage_rows_and_a_truncated_last_line_are_reported_by_number(tmp_path):
    rows = [f"{i},{1 + i / 100},{20 + i / 10}" for i in range(200)]
    rows[10] = "@@#!!"
    rows[50] = "51,abc,20"
    rows[120] = "121,1.2"
    text = "t [s],pressure [bar],temperature [degC]\n" + "\n".join(rows) + "\n199.5,3"
    table = read_table(write(tmp_path, text))
    assert len(table) == 197
    assert table.bad_lines == [
        (12, "truncated or garbled: 1 of 3 fields"),
        (52, "pressure [bar] 'abc' is not a number"),
        (122, "truncated or garbled: 2 of 3 fields"),
        (202, "truncated or garbled: 2 of 3 fields"),
    ]
    good = [i for i in range(200) if i not in (10, 50, 120)]
    assert table["t_s"].tolist() == [float(i) for i in good]


def test_two_lines_run_together_are_a_bad_line_not_a_glued_value(tmp_path):
    """A lost line end glues '20' and '2' into 202 degC: a row with more fields than the header is refused,
    a trailing empty field is not."""
    path = write(tmp_path, "t_s;pressure [bar];temperature [degC];note\n0;50;20;\n1;50;202;51;20\n3;50;20;;\n4;51;20;ok\n")
    table = read_table(path)
    assert table.bad_lines == [(3, "5 fields where the header has 4 (two lines run together?)")]
    assert table["t_s"].tolist() == [0.0, 3.0, 4.0]
    assert table["temperature_K"] == pytest.approx([293.15] * 3)


def test_blank_lines_and_comments_are_skipped(tmp_path):
    table = read_table(write(tmp_path, "# made by hand\n\ntime,p [bar],T [K]\n0,1,300\n\n# pause\n1,1,300\n   \n"))
    assert len(table) == 2 and not table.bad_lines


def test_run_log_whose_last_line_has_no_end_is_truncated(tmp_path):
    from tui.record.recorder import COLUMNS, FORMAT_LINE

    row = "0.000000,1.0,5000000.0,300.0,ok,liquid,nan,nan,nan,nan,,,\"p\""
    text = f"{FORMAT_LINE}\n# meta {{}}\n{','.join(COLUMNS)}\n{row}\n{row.replace('0.000000', '1.000000')}\n0.5,1.0,50"
    table = read_table(write(tmp_path, text))
    assert len(table) == 2 and table.bad_lines == [(6, "truncated last line (no line end)")]
    assert math.isnan(table["dT_solid_K"][0])


def test_bad_event_json_is_a_bad_line(tmp_path):
    from tui.record.recorder import COLUMNS, FORMAT_LINE

    text = f"{FORMAT_LINE}\n# meta {{}}\n{','.join(COLUMNS)}\n# event {{not json\n"
    table = read_table(write(tmp_path, text))
    assert table.bad_lines[0][0] == 4 and "event line is not JSON" in table.bad_lines[0][1]


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("a,b,c\n1,2,3\n", "no time column in the header (a, b, c); name it with --time-column"),
        ("time,pressure,T [K]\n1,2,3\n", "the pressure column has no unit: write it as 'pressure [unit]' or give --pressure-unit"),
        ("time,pressure [furlong],T [K]\n1,2,3\n", "unknown pressure unit 'furlong'"),
        ("# only a comment\n", "no header line"),
    ],
)
def test_unusable_files_are_one_line_usage_errors(tmp_path, text, message):
    with pytest.raises(UsageError, match="^.*" + message.replace("(", r"\(").replace(")", r"\)").replace("[", r"\[").replace("]", r"\]")):
        read_table(write(tmp_path, text))


def test_a_header_of_noise_is_a_one_line_usage_error(tmp_path):
    """Random bytes, an unclosed bracket or a control character in the header name the problem on one line."""
    noise = bytes(np.random.default_rng(7).integers(0, 256, 3000, dtype=np.uint8))
    for header in (noise, b"time [s,pressure (bar,temp\x1b[K\n0,1,2\n"):
        path = tmp_path / "noise.csv"
        path.write_bytes(header)
        with pytest.raises(UsageError) as error:
            read_table(path)
        message = str(error.value)
        assert "\n" not in message and len(message) < 300 and message.isprintable()


def test_a_name_with_an_unclosed_bracket_is_a_name_without_unit(tmp_path):
    path = write(tmp_path, "time [s,pressure [bar],temperature [degC]\n0,1,20\n")
    with pytest.raises(UsageError, match=r"no column named 'time \[s'|no time column .*time \[s, pressure \[bar\]"):
        read_table(path)
    table = read_table(path, time_column="time [s")
    assert table["pressure_Pa"].tolist() == [1e5]


def test_missing_file(tmp_path):
    with pytest.raises(UsageError, match="cannot read .*absent.csv"):
        read_table(tmp_path / "absent.csv")


def test_clean_and_garbled_run_logs_read_alike(tmp_path):
    """A whole log takes numpy's single pass; one bad row sends it the careful way: same rows."""
    from tui.acquire.sample import Sample
    from tui.monitor.model import Event, Reading
    from tui.record import RunRecorder

    with RunRecorder(tmp_path / "clean.csv", {"fluid": "CO2"}) as rec:
        for t in range(100):
            rec.write(Reading(Sample(float(t), 1.7e9 + t, 1e6 + t, 300.0, "raw # with a hash, and a comma"), "gas", {}))
            if t == 50:
                rec.write_event(Event(50.0, 1.7e9, "note", "", message="half way"))
    lines = rec.path.read_text().splitlines(keepends=True)
    garbled = tmp_path / "garbled.csv"
    garbled.write_text("".join(lines[:40] + ["1,2,garbage\n"] + lines[40:]))
    texts = ("quality", "phase", "active_alarms", "reasons", "raw")
    clean, careful = read_table(rec.path, texts=texts), read_table(garbled, texts=texts)
    assert careful.bad_lines == [(41, "truncated or garbled: 3 of 13 fields")] and not clean.bad_lines
    assert clean.columns.keys() == careful.columns.keys()
    for name in clean.columns:
        np.testing.assert_array_equal(clean[name], careful[name], err_msg=name)
    assert clean.events == careful.events and clean.events[0]["message"] == "half way"
    assert clean.metadata == careful.metadata and clean["raw"][0] == "raw # with a hash, and a comma"
