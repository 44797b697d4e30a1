"""thermo.units against hand calculations from the unit definitions.

Source of every factor: BIPM, The International System of Units (SI brochure, 9th ed., 2019),
Table 8 (bar, mmHg) and the exact definitions of the standard atmosphere (101 325 Pa, 10th CGPM
1954), the torr (1/760 atm), standard gravity (9.806 65 m/s²) and the international pound and
inch (1959 agreement). The checks below redo the arithmetic by hand rather than calling the module.
"""

import math

import numpy as np
import pytest

from thermo.units import (
    STANDARD_ATMOSPHERE,
    PressureUnit,
    TemperatureUnit,
    UnitError,
    format_number,
    format_pressure,
    format_pressure_difference,
    format_temperature,
    format_temperature_difference,
    parse_atmosphere,
    parse_molar_mass,
    parse_pressure,
    parse_pressure_difference,
    parse_temperature,
    parse_temperature_difference,
    split_quantity,
)

# hand calculation: 1 lbf/in² = 0.45359237 kg × 9.80665 m/s² / (0.0254 m)²
PSI = 0.45359237 * 9.80665 / 0.0254**2


@pytest.mark.parametrize(
    ("text", "expected_Pa"),
    [
        ("1 Pa", 1.0),
        ("2.5 kPa", 2500.0),
        ("5.9 MPa", 5.9e6),
        ("0.3 GPa", 3e8),
        ("1013.25 hPa", 101325.0),  # SI brochure: 1 hPa = 100 Pa
        ("1013.25 mbar", 101325.0),
        ("58 bar", 5.8e6),  # SI brochure Table 8: 1 bar = 10^5 Pa
        ("58 bara", 5.8e6),
        ("58 bar(a)", 5.8e6),
        ("58 bar abs", 5.8e6),
        ("1 atm", 101325.0),  # 10th CGPM (1954): 1 atm = 101 325 Pa
        ("760 torr", 101325.0),  # 1 torr = 101 325/760 Pa
        ("1 mmHg", 13.5951e3 * 9.80665e-3),  # conventional mmHg, SI brochure Table 8: ≈ 133.322 Pa
        ("1 kgf/cm2", 98066.5),  # 1 kgf/cm² = 9.80665 N / 1e-4 m²
        ("14.7 psia", 14.7 * PSI),
        ("1 psi", 6894.757293168),
        ("101 325 Pa", 101325.0),  # digits grouped in threes, SI brochure 5.4.4
    ],
)
def test_absolute_pressures_match_the_unit_definitions(text, expected_Pa):
    assert parse_pressure(text) == pytest.approx(expected_Pa, rel=1e-12)


def test_psi_factor_matches_the_quoted_value():
    # 1 psi = 6894.757 Pa (NIST SP 811, Appendix B, from memory)
    assert PressureUnit.from_text("psi").factor == pytest.approx(6894.757, abs=5e-4)


@pytest.mark.parametrize(
    ("text", "expected_Pa"),
    [
        ("58 bar(g)", 58e5 + 101325.0),
        ("58 barg", 58e5 + 101325.0),
        ("58 bar g", 58e5 + 101325.0),
        ("58 BAR (G)", 58e5 + 101325.0),
        ("100 psig", 100 * PSI + 101325.0),
        ("250 kPa(g)", 250e3 + 101325.0),
        ("5.8 MPa(g)", 5.8e6 + 101325.0),
        ("-0.5 barg", 101325.0 - 0.5e5),  # vacuum on a compound gauge
        ("0 barg", 101325.0),
    ],
)
def test_gauge_pressures_add_the_standard_atmosphere(text, expected_Pa):
    assert parse_pressure(text) == pytest.approx(expected_Pa, rel=1e-12)


def test_gauge_pressures_use_the_given_atmosphere():
    assert parse_pressure("58 bar(g)", atmosphere=95_000.0) == pytest.approx(58e5 + 95_000.0)
    assert parse_pressure("58 bar(a)", atmosphere=95_000.0) == pytest.approx(58e5)


def test_gauge_and_absolute_units_round_trip_arrays():
    values = np.array([-0.9, 0.0, 1.5, 58.0, 300.0])
    for text in ("barg", "psig", "kPa(g)", "MPa(g)", "bar", "psia", "torr", "atm"):
        unit = PressureUnit.from_text(text, atmosphere=98_700.0)
        assert unit.from_si(unit.to_si(values)) == pytest.approx(values, rel=1e-13, abs=1e-13)
    gauge, absolute = PressureUnit.from_text("bar(g)"), PressureUnit.from_text("bar(a)")
    assert gauge.is_gauge and not absolute.is_gauge
    assert gauge.from_si(absolute.to_si(59.01325)) == pytest.approx(58.0)


def test_labels_say_absolute_or_gauge():
    assert PressureUnit.from_text("barg").label == "bar(g)"
    assert PressureUnit.from_text("psig").label == "psi(g)"
    assert PressureUnit.from_text("MPa").label == "MPa(a)"
    assert PressureUnit.from_text("psia").label == "psi(a)"


def test_case_insensitive_units_read_mpa_as_megapascal():
    assert parse_pressure("1 mpa") == 1e6
    assert parse_pressure("1 KPA") == 1e3


@pytest.mark.parametrize(
    ("text", "expected_K"),
    [
        ("19 degC", 292.15),  # T/K = t/°C + 273.15 (SI brochure 2.3.1)
        ("19 °C", 292.15),
        ("19 C", 292.15),
        ("19\u2103", 292.15),
        ("\u221240 °C", 233.15),
        ("-40 degF", 233.15),  # -40 °F = -40 °C
        ("32 °F", 273.15),
        ("212 F", 373.15),
        ("491.67 R", 273.15),
        ("300 K", 300.0),
        ("0 K", 0.0),
    ],
)
def test_temperatures_match_the_scale_definitions(text, expected_K):
    assert parse_temperature(text) == pytest.approx(expected_K, rel=1e-13)


def test_temperature_units_round_trip_arrays():
    temperatures_K = np.array([0.0, 216.592, 273.15, 304.1282, 1100.0])
    for text in ("K", "degC", "degF", "degR"):
        unit = TemperatureUnit.from_text(text)
        assert unit.to_si(unit.from_si(temperatures_K)) == pytest.approx(temperatures_K, rel=1e-13, abs=1e-12)


def test_differences_carry_no_offset():
    assert parse_temperature_difference("0.1 K") == pytest.approx(0.1)
    assert parse_temperature_difference("0.1 degC") == pytest.approx(0.1)  # 1 °C of difference is 1 K
    assert parse_temperature_difference("0.18 degF") == pytest.approx(0.1)  # 1 °F of difference is 5/9 K
    assert parse_pressure_difference("0.05 bar") == pytest.approx(5000.0)
    assert parse_pressure_difference("0.05 barg") == pytest.approx(5000.0)  # the gauge offset cancels
    assert parse_pressure_difference("1 psi") == pytest.approx(PSI)
    fahrenheit = TemperatureUnit.from_text("degF")
    assert fahrenheit.difference_from_si(2.5) == pytest.approx(2.5 * 9 / 5)
    assert fahrenheit.difference_label == "°F"
    assert TemperatureUnit.from_text("degC").difference_label == "K"


def test_atmosphere_must_be_a_positive_absolute_pressure():
    assert parse_atmosphere("1013 hPa") == pytest.approx(101300.0)
    with pytest.raises(UnitError, match="absolute"):
        parse_atmosphere("1 barg")
    with pytest.raises(UnitError, match="positive"):
        parse_atmosphere("0 Pa")


def test_molar_mass():
    assert parse_molar_mass("58.12 g/mol") == pytest.approx(0.05812)
    assert parse_molar_mass("0.04401 kg/mol") == pytest.approx(0.04401)
    with pytest.raises(UnitError, match="g/mol"):
        parse_molar_mass("58 lb")


@pytest.mark.parametrize(
    ("parse", "text", "problem"),
    [
        (parse_pressure, "58", "no unit"),
        (parse_pressure, "58 bra", "unknown pressure unit 'bra'"),
        (parse_pressure, "1,5 bar", "decimal point"),
        (parse_pressure, "bar", "cannot read a pressure"),
        (parse_pressure, "nan bar", "cannot read a pressure"),
        (parse_pressure, "", "cannot read a pressure"),
        (parse_pressure, "-1 bar", "below zero absolute"),
        (parse_pressure, "-2 barg", "below zero absolute"),
        (parse_temperature, "19", "no unit"),
        (parse_temperature, "19 degK", "unknown temperature unit"),
        (parse_temperature, "-300 degC", "below absolute zero"),
        (parse_temperature, "-1 K", "below absolute zero"),
        (parse_temperature, "19 bar", "unknown temperature unit"),
    ],
)
def test_bad_input_names_the_problem_on_one_line(parse, text, problem):
    with pytest.raises(UnitError, match=problem) as caught:
        parse(text)
    assert "\n" not in str(caught.value)
    assert isinstance(caught.value, ValueError)


def test_unknown_units_list_the_accepted_ones():
    with pytest.raises(UnitError) as caught:
        PressureUnit.from_text("furlongs")
    for accepted in ("Pa", "kPa", "MPa", "bar", "psi", "(g)"):
        assert accepted in str(caught.value)
    with pytest.raises(UnitError) as caught:
        TemperatureUnit.from_text("kelvins")
    for accepted in ("K", "degC", "degF"):
        assert accepted in str(caught.value)


@pytest.mark.parametrize(
    ("value", "digits", "text"),
    [
        (5901325.0, 4, "5901000"),
        (59.01325, 5, "59.013"),
        (2.5126, 4, "2.513"),
        (0.00012, 2, "0.00012"),
        (-3.14159, 3, "-3.14"),
        (1.23456e-7, 3, "1.23e-07"),
        (1.5e9, 3, "1.50e+09"),
        (0.0, 4, "0"),
        (math.nan, 4, "n/a"),
    ],
)
def test_format_number_keeps_significant_digits(value, digits, text):
    assert format_number(value, digits) == text


def test_format_helpers_name_the_unit_and_scale():
    barg = PressureUnit.from_text("barg")
    degc = TemperatureUnit.from_text("degC")
    assert format_pressure(58e5 + STANDARD_ATMOSPHERE, barg) == "58.000 bar(g)"
    assert format_pressure_difference(2.5e5, barg) == "2.500 bar"
    assert format_temperature(292.15, degc) == "19.00 °C"
    assert format_temperature_difference(-2.27, degc) == "-2.27 K"
    assert format_temperature_difference(2.5, TemperatureUnit.from_text("F")) == "4.50 °F"


def test_split_quantity_tells_temperatures_from_pressures_by_unit():
    value, unit = split_quantity("-20 degC")
    assert value == -20.0 and isinstance(unit, TemperatureUnit)
    value, unit = split_quantity("10 bar(g)", atmosphere=95_000.0)
    assert isinstance(unit, PressureUnit) and unit.to_si(value) == pytest.approx(10e5 + 95_000.0)
    with pytest.raises(UnitError, match="unknown unit 'degrees'.*temperature.*pressure"):
        split_quantity("20 degrees")
    with pytest.raises(UnitError, match="below absolute zero"):
        split_quantity("-300 degC")
