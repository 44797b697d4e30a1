"""Line splitting and parsing: the generic format, profiles, units and gauge pressures, fuzzing."""

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from tui.acquire.lines import LineSplitter
from tui.acquire.options import SourceOptions
from tui.acquire.parse import GenericParser, ProfileParser, make_parser
from tui.acquire.profile import GENERIC, load_profile
from tui.acquire.sample import Quality
from tui.errors import UsageError

# Unit definitions (BIPM SI brochure, 9th ed.; international yard and pound, 1959):
PSI = 0.45359237 * 9.80665 / 0.0254**2  # = 6894.757 Pa
ATM = 101_325.0
BAR = 1e5

FIXTURES = "fixtures/profiles"


def parse(lines, **options):
    return GenericParser(SourceOptions(**options)).parse(lines, 1.0, 2.0)


@pytest.mark.parametrize(
    ("line", "pressure_Pa", "temperature_K"),
    [
        ("p=12.345 bar T=21.3 degC", 12.345 * BAR, 21.3 + 273.15),
        ("P:1.2345MPa;T:294.4K", 1.2345e6, 294.4),
        ("T=20 degC p=1 barg", 1 * BAR + ATM, 293.15),
        ("pressure: 14.7 psia, temperature: 68 degF", 14.7 * PSI, (68 + 459.67) * 5 / 9),
        ("21.3 degC 12 bar", 12 * BAR, 294.45),
        ("1 atm 0 K", ATM, 0.0),
    ],
)
def test_generic_formats_against_hand_calculation(line, pressure_Pa, temperature_K):
    [sample] = parse([line])
    assert sample.quality is Quality.OK and sample.raw == line
    assert sample.pressure_Pa == pytest.approx(pressure_Pa, rel=1e-12)
    assert sample.temperature_K == pytest.approx(temperature_K, abs=1e-9)


def test_one_psi_is_6894_757_pascal():
    # 1 psi = 6894.757 Pa (common practice; exact value from the 1959 definitions above)
    [sample] = parse(["p=1 psi T=0 degC"])
    assert sample.pressure_Pa == pytest.approx(6894.757, abs=5e-4)


def test_bare_numbers_take_units_from_options_and_gauge_adds_the_atmosphere():
    [absolute] = parse(["12.345,21.3"], pressure_unit="bar", temperature_unit="degC")
    assert absolute.pressure_Pa == pytest.approx(12.345 * BAR)
    [gauge] = parse(["12.345,21.3"], pressure_unit="bar", temperature_unit="degC", gauge=True, atmosphere_Pa=98_000.0)
    assert gauge.pressure_Pa == pytest.approx(12.345 * BAR + 98_000.0)
    [explicit] = parse(["p=2 bar(a) T=1 degC"], gauge=True)
    assert explicit.pressure_Pa == pytest.approx(2 * BAR), "an absolute mark wins over --gauge"


def test_bare_numbers_without_units_are_malformed_with_the_option_to_give():
    [sample] = parse(["12.345,21.3"])
    assert sample.quality is Quality.FAILURE
    assert "--pressure-unit" in sample.reasons[0]


@pytest.mark.parametrize(
    ("line", "reason"),
    [
        ("hello world", "not a pressure/temperature record"),
        ("x=1 y=2", "unknown label 'x'"),
        ("p=1 K T=2 degC", "pressure label 'p' with temperature unit 'K'"),
        ("p=1 bar p=2 bar", "two pressure values"),
        ("p=1 furlong T=2 K", "unknown unit 'furlong'"),
    ],
)
def test_malformed_lines_are_failure_samples_with_a_reason(line, reason):
    parser = GenericParser()
    [sample] = parser.parse([line], 1.0, 2.0)
    assert sample.quality is Quality.FAILURE and math.isnan(sample.pressure_Pa)
    assert sample.reasons == (f"malformed: {reason}",)
    assert parser.malformed == 1


def test_a_single_value_leaves_the_other_quantity_missing():
    [sample] = parse(["p=3 bar"])
    assert sample.pressure_Pa == pytest.approx(3 * BAR) and math.isnan(sample.temperature_K)


def test_line_splitter_keeps_the_tail_and_accepts_any_line_end():
    splitter = LineSplitter()
    assert splitter.feed(b"a\r\nb\rc\n") == ["a", "b", "c"]
    assert splitter.feed(b"par") == []
    assert splitter.feed(b"tial\r") == ["partial"]
    assert splitter.feed(b"\nnext\n") == ["next"], "CR and LF split over two chunks make no empty line"
    assert splitter.reset() == 0


def test_line_splitter_with_a_profile_terminator_and_overlong_noise():
    splitter = LineSplitter(b"\x03", max_line=16)
    assert splitter.feed(b"one\x03two") == ["one"]
    assert splitter.feed(b"x" * 20) == [] and splitter.overlong == 1
    assert splitter.discarded_bytes == 23


def test_regex_profile_reads_its_lines():
    profile = load_profile(f"{FIXTURES}/streaming-regex.toml")
    parser = make_parser(profile, SourceOptions())
    good, bad = parser.parse(["#P 0012.345 bar A T+021.30C", "#P ----.--- bar A"], 1.0, 2.0)
    assert good.pressure_Pa == pytest.approx(12.345 * BAR) and good.temperature_K == pytest.approx(294.45)
    assert bad.reasons == ("malformed: does not match the profile's regex",)


def test_delimited_profile_in_psig_and_degF():
    profile = load_profile(f"{FIXTURES}/polled-delimited.toml")
    [sample] = make_parser(profile, SourceOptions()).parse(["+0021.800;+0194.00"], 1.0, 2.0)
    assert sample.pressure_Pa == pytest.approx(21.8 * PSI + ATM)
    assert sample.temperature_K == pytest.approx((194 + 459.67) * 5 / 9)


def test_delimited_profile_counts_short_lines():
    profile = load_profile(f"{FIXTURES}/polled-delimited.toml")
    parser = make_parser(profile, SourceOptions())
    [sample] = parser.parse(["+0021.800"], 1.0, 2.0)
    assert sample.reasons == ("malformed: expected at least 2 fields, found 1",) and parser.malformed == 1


def test_current_loop_scaling_against_hand_calculation():
    # 4-20 mA spans the range linearly (common practice): 12 mA is mid-range
    profile = load_profile(f"{FIXTURES}/current-loop.toml")
    [mid] = make_parser(profile, SourceOptions()).parse(["CH1=12.000mA CH2=08.000mA"], 1.0, 2.0)
    assert mid.pressure_Pa == pytest.approx(50 * BAR + ATM)  # 0-100 bar(g)
    assert mid.temperature_K == pytest.approx(-50 + 200 * 4 / 16 + 273.15)  # -50..150 degC
    assert (mid.pressure_mA, mid.temperature_mA) == (12.0, 8.0)


def test_a_profile_quantity_without_a_unit_is_a_usage_error():
    profile = load_profile(f"{FIXTURES}/polled-delimited.toml")
    from dataclasses import replace

    with pytest.raises(UsageError, match="no pressure unit"):
        make_parser(replace(profile, pressure=replace(profile.pressure, unit=None)), SourceOptions())


@settings(max_examples=300, deadline=None)
@given(chunks=st.lists(st.binary(max_size=80), max_size=12))
def test_fuzz_generic_path_counts_every_bad_record(chunks):
    splitter, parser = LineSplitter(), GenericParser(SourceOptions(pressure_unit="bar", temperature_unit="K"))
    lines = [line for chunk in chunks for line in splitter.feed(chunk)]
    samples = parser.parse(lines, 1.0, 2.0)
    assert len(samples) == len(lines)
    malformed = [s for s in samples if s.reasons and s.reasons[0].startswith("malformed:")]
    assert parser.malformed == len(malformed)
    assert all(s.quality is Quality.FAILURE for s in malformed)


@settings(max_examples=200, deadline=None)
@given(text=st.text(alphabet=st.sampled_from(list("pPtT=:;, .-+eE0123456789barKdegCpsiMPa°()g\t")), max_size=40))
def test_fuzz_generic_parser_on_near_miss_text(text):
    parser = GenericParser(SourceOptions(pressure_unit="bar", temperature_unit="degC"))
    lines = [line for line in text.replace("\r", "\n").split("\n") if line]
    samples = parser.parse(lines, 1.0, 2.0)
    assert len(samples) == len(lines)
    assert parser.malformed == sum(1 for s in samples if s.quality is Quality.FAILURE)


@settings(max_examples=200, deadline=None)
@given(lines=st.lists(st.text(max_size=40), max_size=8))
def test_fuzz_profile_parser(lines):
    lines = [line for line in lines if line]
    for name in ("streaming-regex", "polled-delimited", "current-loop"):
        parser = make_parser(load_profile(f"{FIXTURES}/{name}.toml"), SourceOptions())
        samples = parser.parse(lines, 1.0, 2.0)
        assert len(samples) == len(lines)
        assert parser.malformed == sum(1 for s in samples if s.reasons[:1] and s.reasons[0].startswith("malformed:"))


def test_generic_profile_is_the_default():
    assert isinstance(make_parser(GENERIC, SourceOptions()), GenericParser)
    assert isinstance(make_parser(load_profile(f"{FIXTURES}/streaming-regex.toml"), SourceOptions()), ProfileParser)
