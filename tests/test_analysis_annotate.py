"""The annotated copy and the vectorized CSV writer behind it, read back with the stdlib csv module."""

import csv
import io

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

from tui.analysis.annotate import active_alarm_labels, write_annotated
from tui.analysis.csv_text import CHUNK_ROWS, Labels, Numbers, write_csv
from tui.analysis.labels import encode_labels
from tui.analysis.run import AnalysedRun


def _written(columns, header=None):
    stream = io.BytesIO()
    write_csv(stream, header or [f"c{i}" for i in range(len(columns))], columns)
    return list(csv.reader(io.StringIO(stream.getvalue().decode())))


@settings(max_examples=60, deadline=None)
@given(
    arrays(np.float64, st.integers(1, 40), elements=st.floats(allow_nan=True, allow_infinity=True, width=64)),
    st.integers(0, 6),
)
def test_numbers_read_back_within_half_a_unit_of_the_last_decimal(values, decimals):
    rows = _written([Numbers(values, decimals), Labels(np.zeros(values.size, int), ["row"])])[1:]
    assert len(rows) == values.size
    for (text, _), value in zip(rows, values):
        if np.isnan(value):
            assert text == "nan"
        elif np.isfinite(value) and abs(value) < 9e17 / 10.0**decimals:
            assert abs(float(text) - value) <= 0.5 * 10.0**-decimals * (1 + 1e-9) + abs(value) * 1e-15
            assert text.count(".") == (1 if decimals else 0) and len(text.split(".")[-1]) == (decimals or len(text.split(".")[-1]))
        else:  # infinities and numbers beyond fixed point keep their value in exponent form
            assert float(text) == float(f"{value:.9g}")


def test_fixed_point_text_looks_like_a_person_would_write_it():
    rows = _written([Numbers(np.array([0.0, -1.5, 101325.25, 0.04, -0.00004, 7.0]), 1)])[1:]
    assert [r[0] for r in rows] == ["0.0", "-1.5", "101325.2", "0.0", "0.0", "7.0"]


def test_labels_are_looked_up_and_quoted_the_csv_way():
    labels = Labels(np.array([0, 1, 2, 1]), ["liquid", 'odd, "quoted"', ""])
    rows = _written([labels, Numbers(np.arange(4.0), 0)])
    assert rows[1:] == [["liquid", "0"], ['odd, "quoted"', "1"], ["", "2"], ['odd, "quoted"', "3"]]


def test_long_columns_are_written_chunk_by_chunk_without_losing_a_row():
    n = 2 * CHUNK_ROWS + 17
    values = np.arange(n) * 0.25
    chunks = []
    stream = io.BytesIO()
    write_csv(stream, ["x"], [Numbers(values, 2)], on_chunk=chunks.append)
    rows = stream.getvalue().decode().splitlines()
    assert chunks == [CHUNK_ROWS, 2 * CHUNK_ROWS, n]
    assert len(rows) == n + 1 and float(rows[-1]) == values[-1]


def test_encode_labels_gives_codes_into_the_distinct_labels():
    labels = np.array(["vapor", "vapor", "liquid", "vapor", "gas"])
    codes, names = encode_labels(labels)
    assert names == ["gas", "liquid", "vapor"]
    assert [names[c] for c in codes] == labels.tolist()


def test_active_alarm_combinations_join_the_conditions():
    active = {"near-saturation": np.array([0, 1, 1, 0], bool), "near-solid": np.array([0, 0, 1, 1], bool)}
    codes, names = active_alarm_labels(active, 4)
    assert [names[c] for c in codes] == ["", "near-saturation", "near-saturation;near-solid", "near-solid"]


def test_the_annotated_copy_holds_every_sample_with_its_classification(tmp_path):
    n = 5
    run = AnalysedRun(
        source="bench/run-7.csv",
        fluid="CO2",
        t_s=np.arange(n) * 0.5,
        pressure_Pa=np.array([5.0e6, 5.1e6, np.nan, 5.3e6, 5.4e6]),
        temperature_K=np.full(n, 288.15),
        quality=np.array(["ok", "ok", "failure", "ok", "ok"]),
        phase=np.array(["vapor", "vapor", "unclassified", "liquid+vapor", "liquid"]),
        margins={"dT_saturation_K": np.array([3.2, 1.1, np.nan, 0.0, -0.75]), "critical_distance": np.full(n, 0.25)},
        active_alarms={"near-saturation": np.array([0, 1, 0, 1, 1], bool)},
    )
    path = tmp_path / "run-7-annotated.csv"
    write_annotated(run, path, notes=("configuration: defaults",))
    lines = path.read_text().splitlines()
    assert lines[:3] == ["# rigside annotated copy of bench/run-7.csv", "# fluid: CO2", "# configuration: defaults"]
    rows = list(csv.DictReader(lines[3:]))
    assert list(rows[0]) == ["t_s", "pressure_Pa", "temperature_K", "quality", "phase", "dT_saturation_K", "critical_distance", "active_alarms"]
    assert [r["phase"] for r in rows] == run.phase.tolist()
    assert [r["quality"] for r in rows] == run.quality.tolist()
    assert rows[2]["pressure_Pa"] == "nan" and rows[2]["dT_saturation_K"] == "nan"
    assert float(rows[4]["dT_saturation_K"]) == -0.75
    assert [r["active_alarms"] for r in rows] == ["", "near-saturation", "", "near-saturation", "near-saturation"]
    assert float(rows[1]["t_s"]) == 0.5 and float(rows[3]["pressure_Pa"]) == 5.3e6
