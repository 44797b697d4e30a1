"""What the monitor hands to its sinks (recorder, screen, headless output, alarm hook).

Every sink gets the same objects, so the screen, headless mode and analysis agree.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, field

from tui.acquire.sample import Sample

#: phase label used when a sample's quality forbids classification
UNCLASSIFIED = "unclassified"

#: margin names, in the order they are shown; values in SI (K, Pa, dimensionless)
MARGINS = ("dT_saturation_K", "dp_saturation_Pa", "dT_solid_K", "critical_distance")


@dataclass(frozen=True, slots=True)
class Reading:
    """One sample after classification, margins and trend."""

    sample: Sample
    phase: str
    """A thermo phase label, or UNCLASSIFIED."""
    margins: dict[str, float]
    """MARGINS name -> value (NaN where undefined)."""
    rates: dict[str, float] = field(default_factory=dict)
    """MARGINS name -> robust rate of change [unit/s] over the trend window (NaN until full)."""
    time_to_boundary: dict[str, float] = field(default_factory=dict)
    """MARGINS name -> predicted time until the margin reaches zero at the current rate [s];
    inf when it is not closing, NaN when unknown."""
    active_alarms: tuple[str, ...] = ()
    """Conditions whose alarm is active (unacknowledged or acknowledged) after this sample."""
    t_s: float = float("nan")
    """Time since the start of the run [s] (the monitor's run clock, as in Event.t_s)."""


@dataclass(frozen=True, slots=True)
class Event:
    """Something a person or a relay should know about, as one JSON object."""

    t_s: float
    """Time since the start of the run [s]."""
    t_wall: float
    kind: str
    """One of "alarm", "clear", "ack", "shelve", "phase-change", "quality", "flood", "note"."""
    condition: str
    priority: str = ""
    value: float = float("nan")
    limit: float = float("nan")
    message: str = ""
    in_flood: bool = False
    """Raised during an alarm flood: logged like any other, summarised for people by the "flood" events."""

    def to_json(self) -> dict:
        return asdict(self)
