"""Gauge profiles: the fixtures load, every mistake is one line naming the key, fuzzing never escapes."""

import tempfile
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from tui.acquire.profile import GENERIC, load_profile, parse_profile
from tui.errors import UsageError

FIXTURES = sorted(Path("fixtures/profiles").glob("*.toml"))


@pytest.mark.parametrize("path", FIXTURES, ids=lambda p: p.stem)
def test_fixture_profiles_load(path):
    profile = load_profile(path)
    assert profile.name and profile.origin == str(path)


def test_profile_details():
    polled = load_profile("fixtures/profiles/polled-delimited.toml")
    assert polled.poll.command == b"RD?\r" and polled.serial == {"baudrate": 9600, "bytesize": 7, "parity": "E", "stopbits": 1}
    assert polled.terminator == b"\r\n"
    loop = load_profile("fixtures/profiles/current-loop.toml")
    assert loop.pressure.current_loop and loop.pressure.raw == (4.0, 20.0)
    pair = load_profile("fixtures/profiles/two-device.toml")
    assert set(pair.devices) == {"pressure", "temperature"} and pair.pair_tolerance_s == 0.5
    assert pair.devices["temperature"].serial == {"baudrate": 4800}
    modbus = load_profile("fixtures/profiles/modbus-transmitter.toml")
    assert modbus.modbus.unit == 7 and modbus.temperature.register.data_type == "int16"


def test_generic_is_built_in():
    assert load_profile(None) is GENERIC and load_profile("generic") is GENERIC


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("nme = 'x'", "unknown key 'nme'"),
        ("[pressure]\nunit = 'furlong'", "pressure.unit: unknown pressure unit 'furlong'"),
        ("[pressure]\nspan = [1]", "pressure.span must be two different numbers"),
        ("[serial]\nparity = 'X'", "serial.parity must be one of N, E, O, M, S"),
        ("[serial]\nbaudrate = true", "serial.baudrate must be a whole number"),
        ("[extract]\nregex = '('", "extract.regex does not compile"),
        ("[extract]\nregex = '(?P<pressure>.*)'", "needs a named group (?P<temperature>...)"),
        ("[extract]\ndelimiter = ','\npressure_field = 0", "needs temperature_field"),
        ("[poll]\ninterval_s = 1", "[poll] needs a command"),
        ("[poll]\ncommand = 'Ω'", "must hold byte values only"),
        ("emit = '{pressure.real}'", "emit may only use {pressure} and {temperature}"),
        ("emit = '{pressure:q}'", "emit template"),
        ("[modbus]\nunit = 1", "needs pressure.register"),
        ("[devices.pressure]\nname = 'a'", "needs [devices.temperature]"),
        ("[pressure]\nraw = [4, 20]", "scaling needs both raw"),
        ("encoding = 'klingon'", "unknown encoding 'klingon'"),
        ("x = [", "not valid TOML"),
    ],
)
def test_bad_profiles_give_one_line_naming_the_problem(text, message):
    with pytest.raises(UsageError) as caught:
        parse_profile(text, "bad.toml")
    assert str(caught.value).startswith("profile bad.toml: ")
    assert message in str(caught.value)
    assert "\n" not in str(caught.value)


def test_missing_and_binary_profile_files(tmp_path):
    with pytest.raises(UsageError, match="cannot read profile .*nowhere.toml"):
        load_profile(tmp_path / "nowhere.toml")
    binary = tmp_path / "binary.toml"
    binary.write_bytes(b"\xff\xfe\x00")
    with pytest.raises(UsageError, match="not UTF-8"):
        load_profile(binary)


TOKENS = st.sampled_from([
    "[pressure]", "[temperature]", "[serial]", "[poll]", "[extract]", "[modbus]", "[validate]", "[devices.pressure]",
    "[devices.temperature]", "[pairing]", "unit = 'bar'", "unit = 'degC'", "unit = 3", "span = [0, 10]", "span = 'x'",
    "regex = '(?P<pressure>\\\\d+) (?P<temperature>\\\\d+)'", "regex = '['", "delimiter = ','", "pressure_field = 0",
    "temperature_field = 1", "command = 'Q'", "interval_s = -1", "baudrate = 9600", "parity = 'E'", "register = 3",
    "data_type = 'float32'", "data_type = 'int8'", "signal = 'mA'", "raw = [4, 20]", "value = [0, 1]", "tolerance_s = 0",
    "emit = '{pressure}'", "emit = '{x}'", "name = 'g'", "terminator = ''", "gauge = true", "resolution = -1", "=", "[",
])


@settings(max_examples=400, deadline=None)
@given(lines=st.lists(TOKENS, max_size=12))
def test_fuzz_profile_loader_with_plausible_pieces(lines):
    try:
        parse_profile("\n".join(lines), "fuzz.toml")
    except UsageError as exc:
        assert "\n" not in str(exc)


@settings(max_examples=300, deadline=None)
@given(text=st.text(max_size=200))
def test_fuzz_profile_loader_with_random_text(text):
    try:
        parse_profile(text, "fuzz.toml")
    except UsageError as exc:
        assert str(exc).startswith("profile fuzz.toml: ")


@settings(max_examples=200, deadline=None)
@given(data=st.binary(max_size=200))
def test_fuzz_profile_files_with_random_bytes(data):
    with tempfile.NamedTemporaryFile(suffix=".toml") as handle:
        handle.write(data)
        handle.flush()
        try:
            load_profile(handle.name)
        except UsageError as exc:
            assert "\n" not in str(exc)
