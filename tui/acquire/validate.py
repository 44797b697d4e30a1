"""Sensor validation of every sample, with verdicts in the NAMUR NE 107 status categories.

Checks and the category each sets (the worst one wins, reasons are all kept):

- value missing or not a number                      -> failure
- loop current below 3.6 mA or above 21 mA          -> failure (NAMUR NE 43 failure signal)
- loop current 3.6-3.8 mA or 20.5-21 mA             -> out of specification (NE 43: beyond
  the measuring range 3.8-20.5 mA, not yet a failure)
- value outside the gauge's span                     -> out of specification
- spike: rate of change beyond a plausible limit     -> failure (the value is not believed);
  a step to a new level is accepted once two samples in a row agree with each other
- stuck: no change beyond the resolution for a set time -> maintenance required
- stale: no sample for a set time (`check_stale`)    -> a `Staleness` report for an event

A sample's own quality (a malformed line, a recorded quality on replay) is kept and combined.
Rates over intervals shorter than `min_interval_s` are taken over `min_interval_s`, so lines
that arrive in one read (one timestamp) are not taken for spikes.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from tui.acquire.profile import GaugeProfile, Quantity
from tui.acquire.sample import QUALITY_SEVERITY, Quality, Sample

#: signal levels [mA] of NAMUR NE 43, "Standardization of the signal level for the failure
#: information of digital transmitters" (NAMUR recommendation NE 43, 2003)
NE43_FAILURE_LOW, NE43_RANGE_LOW, NE43_RANGE_HIGH, NE43_FAILURE_HIGH = 3.6, 3.8, 20.5, 21.0

_RANK = {q: i for i, q in enumerate(QUALITY_SEVERITY)}


@dataclass(frozen=True)
class Limits:
    """What is plausible for one quantity, in SI (Pa or K, and per second)."""

    span: tuple[float, float] = (0.0, math.inf)
    resolution: float = 0.0
    rate_limit: float = math.inf
    unit: str = ""
    """Name of the SI unit, for reasons."""


@dataclass(frozen=True)
class ValidatorConfig:
    pressure: Limits = Limits(unit="Pa")
    temperature: Limits = Limits(unit="K")
    stuck_after_s: float = math.inf
    """A value that has not moved beyond its resolution for this long is stuck [s]."""
    stale_after_s: float = 5.0
    """No sample for this long is stale [s]."""
    min_interval_s: float = 0.1

    @classmethod
    def from_profile(cls, profile: GaugeProfile, *, atmosphere_Pa: float = 101_325.0, **overrides) -> ValidatorConfig:
        """Span, resolution and rate limits from a profile's quantities (or its devices'), in SI."""
        from thermo.units import PressureUnit, TemperatureUnit

        def limits(quantity: Quantity, kind: str) -> Limits:
            if quantity.unit is None:
                return Limits(unit="Pa" if kind == "pressure" else "K")
            if kind == "pressure":
                unit = PressureUnit.from_text(quantity.unit, atmosphere_Pa)
                if quantity.gauge and not unit.is_gauge:
                    unit = PressureUnit(unit.symbol, unit.factor, True, atmosphere_Pa)
                width, si = unit.factor, "Pa"
            else:
                unit = TemperatureUnit.from_text(quantity.unit)
                width, si = unit.scale, "K"
            span = (0.0, math.inf)
            if quantity.span:
                low, high = (float(v) for v in unit.to_si(quantity.span))
                span = (low, high)
            rate = quantity.rate_limit * width if quantity.rate_limit else math.inf
            return Limits(span, quantity.resolution * width, rate, si)

        carriers = profile.devices or {"pressure": profile, "temperature": profile}
        values = dict(
            pressure=limits(carriers["pressure"].pressure, "pressure"),
            temperature=limits(carriers["temperature"].temperature, "temperature"),
        )
        if profile.stuck_after_s:
            values["stuck_after_s"] = profile.stuck_after_s
        if profile.stale_after_s:
            values["stale_after_s"] = profile.stale_after_s
        return cls(**(values | overrides))


@dataclass(frozen=True)
class Staleness:
    """The stream went quiet (stale=True) or came back (stale=False)."""

    t_monotonic: float
    stale: bool
    age_s: float
    """Time since the last sample [s]."""
    message: str
    quality: Quality = Quality.FAILURE


@dataclass
class _Track:
    """Memory of one quantity between samples."""

    limits: Limits
    name: str
    last_t: float = math.nan
    last_v: float = math.nan
    rejected_t: float = math.nan
    rejected_v: float = math.nan
    moved_t: float = math.nan
    moved_v: float = math.nan

    def check(self, v: float, t: float, current_mA: float, stuck_after: float, min_dt: float) -> list:
        """(quality, reason) pairs for one value; empty when all is well."""
        found = self._current(current_mA) if current_mA == current_mA else []  # only 4-20 mA loops
        if v != v or v in (math.inf, -math.inf):
            return found + [(Quality.FAILURE, f"{self.name} missing or not a number")]
        lim = self.limits
        if not lim.span[0] <= v <= lim.span[1]:
            low, high = lim.span
            reason = f"{self.name} {v:.6g} {lim.unit} outside span {low:.6g}..{high:.6g} {lim.unit}"
            found.append((Quality.OUT_OF_SPECIFICATION, reason))
        if lim.rate_limit != math.inf and self.last_t == self.last_t:
            spike = self._spike(v, t, min_dt)
            if spike:
                return found + [spike]
        self.last_t, self.last_v, self.rejected_t = t, v, math.nan
        if abs(v - self.moved_v) > lim.resolution or self.moved_t != self.moved_t:
            self.moved_t, self.moved_v = t, v
        elif t - self.moved_t > stuck_after:
            since = t - self.moved_t
            found.append((Quality.MAINTENANCE_REQUIRED,
                          f"{self.name} stuck: no change beyond {lim.resolution:.3g} {lim.unit} for {since:.0f} s"))
        return found

    def _current(self, mA: float) -> list:
        if mA < NE43_FAILURE_LOW or mA > NE43_FAILURE_HIGH:
            return [(Quality.FAILURE, f"{self.name} loop current {mA:.2f} mA outside 3.6..21 mA (NE 43 failure)")]
        if mA < NE43_RANGE_LOW or mA > NE43_RANGE_HIGH:
            return [(Quality.OUT_OF_SPECIFICATION, f"{self.name} loop current {mA:.2f} mA outside 3.8..20.5 mA (NE 43)")]
        return []

    def _spike(self, v: float, t: float, min_dt: float) -> tuple | None:
        """A failure verdict when v jumps from the last believed value faster than the limit,
        unless it agrees with the sample rejected just before (a real step, seen twice)."""
        limit = self.limits.rate_limit
        rate = abs(v - self.last_v) / max(t - self.last_t, min_dt)
        if rate <= limit:
            return None
        if self.rejected_t == self.rejected_t and abs(v - self.rejected_v) / max(t - self.rejected_t, min_dt) <= limit:
            return None
        self.rejected_t, self.rejected_v = t, v
        unit = self.limits.unit
        return (Quality.FAILURE, f"{self.name} spike: {rate:.3g} {unit}/s beyond {limit:.3g} {unit}/s")


class Validator:
    """Checks samples in arrival order; keeps what it needs of the past (one per source)."""

    def __init__(self, config: ValidatorConfig = ValidatorConfig()):
        self.config = config
        self._pressure = _Track(config.pressure, "pressure")
        self._temperature = _Track(config.temperature, "temperature")
        self._last_seen = math.nan
        self._stale = False

    def check(self, sample: Sample) -> Sample:
        """The sample with its quality and reasons set (the same object when all is well)."""
        t = sample.t_monotonic
        self._last_seen = t
        c = self.config
        found = self._pressure.check(sample.pressure_Pa, t, sample.pressure_mA, c.stuck_after_s, c.min_interval_s)
        found += self._temperature.check(sample.temperature_K, t, sample.temperature_mA, c.stuck_after_s, c.min_interval_s)
        if not found:
            return sample
        if sample.reasons and sample.reasons[0].startswith("malformed:"):
            return sample
        worst = min([_RANK[sample.quality]] + [_RANK[q] for q, _ in found])
        return Sample(
            sample.t_monotonic, sample.t_wall, sample.pressure_Pa, sample.temperature_K, sample.raw,
            QUALITY_SEVERITY[worst], sample.reasons + tuple(reason for _, reason in found),
            sample.pressure_mA, sample.temperature_mA,
        )

    def check_stale(self, now: float) -> Staleness | None:
        """A report when the stream turns stale or fresh again; None when nothing changed.

        `now` is on the samples' clock (time.monotonic() live, the log's time on replay).
        """
        if self._last_seen != self._last_seen:
            self._last_seen = now
        age = now - self._last_seen
        stale = age > self.config.stale_after_s
        if stale == self._stale:
            return None
        self._stale = stale
        if stale:
            return Staleness(now, True, age, f"no sample for {age:.1f} s (stale after {self.config.stale_after_s:g} s)")
        return Staleness(now, False, age, "samples arriving again", Quality.OK)
