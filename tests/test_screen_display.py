"""How the screen words and draws numbers: durations, trends, margin labels, bars, properties."""

import math

from thermo.units import PressureUnit, TemperatureUnit
from tui.screen.display import clock, duration, size, trend
from tui.screen.widgets.margin_gauge import bar, margin_label, margin_value
from tui.screen.widgets.phase_banner import spaced
from tui.screen.widgets.property_table import property_lines

BAR = PressureUnit.from_text("bar")
DEG_C = TemperatureUnit.from_text("degC")
DEG_F = TemperatureUnit.from_text("degF")


def test_durations_read_short():
    assert duration(42.4) == "42s"
    assert duration(190) == "3m10s"
    assert duration(2.5 * 3600) == "2.5h"
    assert duration(math.inf) == "never"
    assert duration(math.nan) == "—"


def test_clock_and_size():
    assert clock(62.25) == "1:02.2" or clock(62.25) == "1:02.3"
    assert clock(3725.0) == "1:02:05.0"
    assert size(999) == "999 B"
    assert size(1_234_567) == "1.2 MB"


def test_trend_says_closing_when_the_margin_shrinks_towards_zero():
    assert trend(-0.1, 5.0) == "↓ closing"  # superheat falling
    assert trend(0.1, -5.0) == "↑ closing"  # subcooling shrinking
    assert trend(0.1, 5.0) == "↑ opening"
    assert trend(0.0, 5.0) == "→ steady"
    assert trend(math.nan, 5.0) == "· no rate"


def test_margin_labels_follow_the_sign():
    assert margin_label("dT_saturation_K", -3.0) == "subcooling"
    assert margin_label("dT_saturation_K", 3.0) == "superheat"
    assert margin_label("dT_saturation_K", math.nan) == "sat. margin"
    assert margin_label("dp_saturation_Pa", 2e5) == "p over sat."
    assert margin_label("dp_saturation_Pa", -2e5) == "p under sat"
    assert margin_label("dT_solid_K", -1.0) == "in solid"


def test_margin_values_use_the_chosen_units_as_differences():
    assert margin_value("dT_saturation_K", -3.0, DEG_C, BAR) == "3.00 K"
    assert margin_value("dT_saturation_K", -3.0, DEG_F, BAR) == "5.40 °F"  # 1 K = 1.8 °F of difference
    assert margin_value("dp_saturation_Pa", 2.5e5, DEG_C, BAR) == "2.50 bar"
    gauge = PressureUnit.from_text("bar(g)")
    assert margin_value("dp_saturation_Pa", 2.5e5, DEG_C, gauge) == "2.50 bar"  # no atmosphere in a difference
    assert margin_value("critical_distance", 0.0123, DEG_C, BAR) == "0.0123"
    assert margin_value("dT_solid_K", math.nan, DEG_C, BAR) == "n/a"


def test_bar_fills_in_eighths_and_marks_the_limit():
    assert bar(0.0, 0.25, 8) == "··┊·····"
    assert bar(1.0, 0.25, 8) == "████████"
    assert bar(0.5, 0.25, 8) == "████····"
    assert bar(0.5 + 1 / 16, -1, 8) == "████▌···"
    assert len(bar(3.0, 0.25, 11)) == 11


def test_phase_banner_spaces_capitals():
    assert spaced("liquid+vapor") == "L I Q U I D + V A P O R"


def test_property_lines_fill_columns_downwards():
    values = {"density": 893.9, "molar_volume": 4.923e-5, "Z": 0.1057, "alpha_p": 8.44e-3,
              "kappa_T": 1.288e-8, "cp": 2679.7, "speed_of_sound": 495.5}
    lines = property_lines(values, columns=2)
    assert len(lines) == 4
    assert lines[0].startswith("ρ   893.9 kg/m³")
    assert "κT 0.01288 1/MPa" in lines[0]
    assert "Vm  49.23 cm³/mol" in lines[1]
    assert "cp  2.680 kJ/(kg·K)" in lines[1]
    assert property_lines({}, columns=1)[0].startswith("ρ       —")
