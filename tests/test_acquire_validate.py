"""Sensor validation: each check sets its NAMUR NE 107 category; bad samples are never classifiable."""

import math

import pytest

from tui.acquire.profile import load_profile
from tui.acquire.sample import Quality, Sample
from tui.acquire.validate import Limits, Validator, ValidatorConfig

BAR = 1e5


def sample(t, p=10 * BAR, T=300.0, **extra):
    return Sample(t, 1e9 + t, p, T, f"p={p} T={T}", **extra)


def test_good_samples_pass_unchanged():
    v = Validator()
    s = sample(0.0)
    assert v.check(s) is s


def test_missing_values_are_failures():
    v = Validator()
    checked = v.check(sample(0.0, T=math.nan))
    assert checked.quality is Quality.FAILURE and not checked.quality.classifiable
    assert checked.reasons == ("temperature missing or not a number",)


def test_span_sets_out_of_specification_and_stays_classifiable():
    v = Validator(ValidatorConfig(pressure=Limits(span=(0.0, 100 * BAR), unit="Pa")))
    checked = v.check(sample(0.0, p=120 * BAR))
    assert checked.quality is Quality.OUT_OF_SPECIFICATION and checked.quality.classifiable
    assert "pressure 1.2e+07 Pa outside span 0..1e+07 Pa" in checked.reasons[0]


def test_negative_absolute_pressure_is_always_out_of_span():
    assert Validator().check(sample(0.0, p=-5.0)).quality is Quality.OUT_OF_SPECIFICATION


@pytest.mark.parametrize(
    ("current", "quality"),
    [
        (12.0, Quality.OK),
        (3.9, Quality.OK),  # NE 43: 3.8-20.5 mA still carries the measurement
        (3.7, Quality.OUT_OF_SPECIFICATION),
        (20.8, Quality.OUT_OF_SPECIFICATION),
        (3.5, Quality.FAILURE),  # NE 43: <= 3.6 mA signals a failure
        (21.5, Quality.FAILURE),  # NE 43: >= 21 mA signals a failure
    ],
)
def test_ne43_current_limits(current, quality):
    # NAMUR NE 43 (from memory): measurement 3.8-20.5 mA, failure below 3.6 or above 21 mA
    checked = Validator().check(sample(0.0, pressure_mA=current))
    assert checked.quality is quality


def test_spike_is_a_failure_and_a_confirmed_step_is_accepted():
    v = Validator(ValidatorConfig(pressure=Limits(rate_limit=1 * BAR, unit="Pa")))
    assert v.check(sample(0.0)).quality is Quality.OK
    spike = v.check(sample(1.0, p=60 * BAR))
    assert spike.quality is Quality.FAILURE and "spike" in spike.reasons[0]
    assert v.check(sample(2.0)).quality is Quality.OK, "back at the old level: the spike was the odd one"
    v.check(sample(3.0, p=40 * BAR))
    assert v.check(sample(4.0, p=40.1 * BAR)).quality is Quality.OK, "two samples agree: a real step"


def test_lines_of_one_read_are_not_taken_for_spikes():
    v = Validator(ValidatorConfig(pressure=Limits(rate_limit=10 * BAR, unit="Pa"), min_interval_s=0.1))
    v.check(sample(5.0))
    assert v.check(sample(5.0, p=10.5 * BAR)).quality is Quality.OK  # same timestamp: rate over 0.1 s


def test_stuck_value_needs_maintenance():
    v = Validator(ValidatorConfig(pressure=Limits(resolution=0.01 * BAR, unit="Pa"), stuck_after_s=60.0))
    for t in range(0, 61, 10):  # pressure moves less than its resolution, temperature moves
        assert v.check(sample(float(t), p=10 * BAR + t, T=300.0 + t)).quality is Quality.OK
    stuck = v.check(sample(70.0, p=10 * BAR + 70, T=370.0))
    assert stuck.quality is Quality.MAINTENANCE_REQUIRED and stuck.reasons == (
        "pressure stuck: no change beyond 1e+03 Pa for 70 s",
    )
    assert v.check(sample(71.0, p=11 * BAR, T=371.0)).quality is Quality.OK


def test_stale_reports_transitions_only():
    v = Validator(ValidatorConfig(stale_after_s=5.0))
    v.check(sample(0.0))
    assert v.check_stale(3.0) is None
    went = v.check_stale(6.0)
    assert went.stale and went.quality is Quality.FAILURE and went.age_s == 6.0
    assert v.check_stale(7.0) is None
    v.check(sample(8.0))
    back = v.check_stale(8.1)
    assert back is not None and not back.stale


def test_malformed_samples_keep_their_own_reason():
    bad = Sample(0.0, 0.0, math.nan, math.nan, "@@", Quality.FAILURE, ("malformed: noise",))
    assert Validator().check(bad) is bad


def test_worst_verdict_wins_and_reasons_add_up():
    v = Validator(ValidatorConfig(pressure=Limits(span=(0.0, 5 * BAR), unit="Pa")))
    checked = v.check(sample(0.0, p=6 * BAR, T=math.nan))
    assert checked.quality is Quality.FAILURE and len(checked.reasons) == 2


def test_limits_from_a_profile_in_si():
    config = ValidatorConfig.from_profile(load_profile("fixtures/profiles/streaming-regex.toml"))
    assert config.pressure.span == (0.0, 250 * BAR)
    assert config.pressure.resolution == pytest.approx(0.001 * BAR)
    assert config.temperature.span == pytest.approx((233.15, 423.15))
    assert config.temperature.rate_limit == 5.0
    assert (config.stale_after_s, config.stuck_after_s) == (2.0, 120.0)
    gauge = ValidatorConfig.from_profile(load_profile("fixtures/profiles/current-loop.toml"))
    assert gauge.pressure.span == (101_325.0, 100 * BAR + 101_325.0)  # bar(g) span read against 1 atm


def test_limits_of_a_two_device_profile_come_from_its_devices(tmp_path):
    path = tmp_path / "pair.toml"
    path.write_text(
        "[devices.pressure.pressure]\nunit = 'bar'\nspan = [0, 10]\n"
        "[devices.temperature.temperature]\nunit = 'K'\nspan = [50, 300]\n"
    )
    config = ValidatorConfig.from_profile(load_profile(path))
    assert config.pressure.span == (0.0, 10 * BAR) and config.temperature.span == (50.0, 300.0)
