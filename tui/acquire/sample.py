"""The sample model every source produces and every later stage consumes.

Values are SI and absolute (gauge pressures are converted at the source). Quality follows
the NAMUR NE 107 status categories plus `ok`; a sample whose quality is `failure` or
`function-check` is recorded but never classified as if it were good.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from enum import StrEnum


class Quality(StrEnum):
    """Status signal of one sample in the categories of NAMUR NE 107, "Self-monitoring and
    diagnosis of field devices" (NAMUR recommendation NE 107, 2017), plus `ok`."""

    OK = "ok"
    FAILURE = "failure"
    FUNCTION_CHECK = "function-check"
    OUT_OF_SPECIFICATION = "out-of-specification"
    MAINTENANCE_REQUIRED = "maintenance-required"

    @property
    def classifiable(self) -> bool:
        """Whether the values may be classified: out of specification or due for maintenance
        still carries a measurement; a failure or a function check does not."""
        return self in (Quality.OK, Quality.OUT_OF_SPECIFICATION, Quality.MAINTENANCE_REQUIRED)


#: worst first, for combining the verdicts of several checks
QUALITY_SEVERITY = (
    Quality.FAILURE,
    Quality.FUNCTION_CHECK,
    Quality.OUT_OF_SPECIFICATION,
    Quality.MAINTENANCE_REQUIRED,
    Quality.OK,
)


@dataclass(frozen=True, slots=True)
class Sample:
    """One paired reading of pressure and temperature."""

    t_monotonic: float
    """Arrival time on the monotonic clock [s] (replays use the log's own time axis)."""
    t_wall: float
    """Wall-clock time [s since the Unix epoch, UTC]."""
    pressure_Pa: float
    """Absolute pressure [Pa]; NaN when missing or unparseable."""
    temperature_K: float
    """Temperature [K]; NaN when missing or unparseable."""
    raw: str = ""
    """The record as received (decoded text, or a register dump), for the run log."""
    quality: Quality = Quality.OK
    reasons: tuple[str, ...] = field(default=())
    """Why the quality is not ok, e.g. ("pressure outside span 0..100 bar",)."""
    pressure_mA: float = float("nan")
    """Loop current of a 4-20 mA pressure transmitter [mA], for the NAMUR NE 43 check; NaN otherwise."""
    temperature_mA: float = float("nan")
    """Loop current of a 4-20 mA temperature transmitter [mA]; NaN otherwise."""


@dataclass(frozen=True, slots=True)
class SourceStatus:
    """A change in a source's health, reported in the sample stream."""

    t_monotonic: float
    t_wall: float
    state: str
    """One of "connected", "disconnected", "reconnecting", "paused", "ended"."""
    message: str = ""
