"""What happened in one run, in numbers a test engineer can put in a report.

Time is attributed to a sample from its own time stamp to the next one's (a zero-order hold),
except across a gap: an interval longer than the gap threshold belongs to no phase, since
nobody saw what the fluid did then. All work is array-at-a-time; only the few phase runs
and events are visited one by one.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field

import numpy as np

from tui.analysis.labels import is_any, label_runs, label_totals
from tui.analysis.run import AnalysedRun, BadLine
from tui.monitor.model import MARGINS, UNCLASSIFIED, Event

#: an interval this many times the median sampling interval counts as a gap
GAP_FACTOR = 5.0

#: boundary -> (phase labels that lie on it, margins that measure the distance to it)
BOUNDARIES = {
    "saturation": (("liquid+vapor", "triple", "critical"), ("dT_saturation_K", "dp_saturation_Pa")),
    "solid": (("solid+vapor", "solid+liquid", "triple"), ("dT_solid_K",)),
    "critical": (("critical",), ("critical_distance",)),
}


@dataclass(frozen=True, slots=True)
class Gap:
    """An interval between two samples longer than the gap threshold [s]."""

    start_s: float
    end_s: float

    @property
    def duration_s(self) -> float:
        return self.end_s - self.start_s


@dataclass(frozen=True, slots=True)
class PhaseChange:
    """The phase label changed at t_s [s] from `before` to `after`."""

    t_s: float
    before: str
    after: str


@dataclass(frozen=True, slots=True)
class MarginExtremes:
    """The lowest value of a margin and its closest approach to zero (the boundary)."""

    margin: str
    minimum: float
    minimum_t_s: float
    closest: float
    """The signed value whose magnitude is smallest."""
    closest_t_s: float


@dataclass(frozen=True, slots=True)
class BoundaryTime:
    """Time spent on a boundary (within the gauge's uncertainty) and near it (within the limits)."""

    boundary: str
    on_s: float
    near_s: float
    near_limits: dict[str, float]
    """Margin -> the distance [margin's unit] counted as near."""


@dataclass(frozen=True, slots=True)
class AlarmTally:
    """How often one condition alarmed, and for how long."""

    condition: str
    priority: str
    count: int
    first_t_s: float
    active_s: float


@dataclass(frozen=True, slots=True)
class RunSummary:
    """What `rigside analyze` says of one run: the tables and the JSON are made from this."""

    source: str
    fluid: str
    duration_s: float
    samples: int
    samples_by_quality: dict[str, int]
    bad_lines: tuple[BadLine, ...]
    out_of_order: int
    """Samples left out because their time went back."""
    gap_threshold_s: float
    gaps: tuple[Gap, ...]
    time_in_phase_s: dict[str, float]
    phase_changes: tuple[PhaseChange, ...]
    margins: tuple[MarginExtremes, ...]
    boundaries: tuple[BoundaryTime, ...]
    alarms: tuple[AlarmTally, ...]
    alarms_under: dict[str, tuple[AlarmTally, ...]] = field(default_factory=dict)
    """Another configuration's name -> the alarms the same run would have raised under it."""

    @property
    def gap_s(self) -> float:
        return float(sum(gap.duration_s for gap in self.gaps))


def summarise(
    run: AnalysedRun,
    *,
    near_limits: dict[str, float] | None = None,
    gap_threshold_s: float | None = None,
    alarms_under: dict[str, tuple[Event, ...]] | None = None,
) -> RunSummary:
    """Summarise one run.

    near_limits: margin name -> distance counted as "near" its boundary [margin's unit]
    (usually the alarm limits of the configuration). gap_threshold_s: the longest interval
    that is not a gap [s]; by default GAP_FACTOR times the median interval. alarms_under:
    configuration name -> the events the pipeline raised for this run under it.
    """
    t = run.t_s
    threshold = default_gap_threshold(t) if gap_threshold_s is None else float(gap_threshold_s)
    dwell, gaps = _dwell(t, threshold)
    end_s = float(t[-1]) if t.size else 0.0
    return RunSummary(
        source=run.source,
        fluid=run.fluid,
        duration_s=float(t[-1] - t[0]) if t.size else 0.0,
        samples=run.samples,
        samples_by_quality={q: int(n) for q, n in label_totals(run.quality, np.ones(t.size)).items()},
        bad_lines=run.bad_lines,
        out_of_order=run.out_of_order,
        gap_threshold_s=threshold,
        gaps=gaps,
        time_in_phase_s=label_totals(run.phase, dwell),
        phase_changes=_phase_changes(t, run.phase),
        margins=tuple(_extremes(name, t, run.margins[name]) for name in MARGINS if name in run.margins),
        boundaries=_boundary_times(run, dwell, near_limits or {}),
        alarms=tally_alarms(run.events, end_s),
        alarms_under={name: tally_alarms(events, end_s) for name, events in (alarms_under or {}).items()},
    )


def default_gap_threshold(t_s: np.ndarray) -> float:
    """GAP_FACTOR times the median sampling interval [s] (inf for fewer than two samples)."""
    if t_s.size < 2:
        return float("inf")
    return GAP_FACTOR * float(np.median(np.diff(t_s)))


def _dwell(t: np.ndarray, threshold: float) -> tuple[np.ndarray, tuple[Gap, ...]]:
    """Time each sample stands for [s], and the gaps that belong to no sample."""
    dwell = np.zeros(t.size)
    if t.size < 2:
        return dwell, ()
    step = np.diff(t)
    is_gap = step > threshold
    dwell[:-1] = np.where(is_gap, 0.0, step)
    starts = np.flatnonzero(is_gap)
    return dwell, tuple(Gap(float(t[i]), float(t[i + 1])) for i in starts)


def _phase_changes(t: np.ndarray, phase: np.ndarray) -> tuple[PhaseChange, ...]:
    """Every change between classified phases: a stretch of unclassified samples in between
    hides the state, so liquid, unclassified, liquid is no change."""
    starts, values = label_runs(phase)
    classified = values != UNCLASSIFIED
    starts, values = starts[classified], values[classified]
    new = np.ones(values.size, dtype=bool)
    new[1:] = values[1:] != values[:-1]  # runs merged across the hidden stretches
    starts, values = starts[new], values[new]
    return tuple(PhaseChange(float(t[i]), str(b), str(a)) for i, b, a in zip(starts[1:], values[:-1], values[1:]))


def _extremes(name: str, t: np.ndarray, values: np.ndarray) -> MarginExtremes:
    nan = float("nan")
    if not np.any(np.isfinite(values)):
        return MarginExtremes(name, nan, nan, nan, nan)
    lowest = int(np.nanargmin(values))
    closest = int(np.nanargmin(np.abs(values)))
    return MarginExtremes(name, float(values[lowest]), float(t[lowest]), float(values[closest]), float(t[closest]))


def _boundary_times(run: AnalysedRun, dwell: np.ndarray, near_limits: dict[str, float]) -> tuple[BoundaryTime, ...]:
    result = []
    for boundary, (labels, margins) in BOUNDARIES.items():
        on = is_any(run.phase, labels)
        near = on.copy()
        limits = {m: float(near_limits[m]) for m in margins if m in near_limits and m in run.margins}
        for margin, limit in limits.items():
            with np.errstate(invalid="ignore"):
                near |= np.abs(run.margins[margin]) <= limit
        result.append(BoundaryTime(boundary, float(dwell[on].sum()), float(dwell[near].sum()), limits))
    return tuple(result)


def alarm_periods(events: tuple[Event, ...], end_s: float) -> dict[str, list[tuple[float, float]]]:
    """Condition -> the (start, end) times [s] of each stretch its alarm was active; an alarm
    still active at the end of the run lasts until end_s."""
    periods: dict[str, list[tuple[float, float]]] = {}
    raised: dict[str, float] = {}
    for event in events:
        if event.kind == "alarm" and event.condition not in raised:
            raised[event.condition] = event.t_s
        elif event.kind == "clear" and event.condition in raised:
            periods.setdefault(event.condition, []).append((raised.pop(event.condition), event.t_s))
    for condition, start in raised.items():
        periods.setdefault(condition, []).append((start, end_s))
    return periods


def tally_alarms(events: tuple[Event, ...], end_s: float) -> tuple[AlarmTally, ...]:
    """One tally per condition that alarmed, in the order they first fired."""
    first: dict[str, Event] = {}
    count: Counter[str] = Counter()
    for event in events:
        if event.kind == "alarm":
            first.setdefault(event.condition, event)
            count[event.condition] += 1
    periods = alarm_periods(events, end_s)
    return tuple(
        AlarmTally(condition, event.priority, count[condition], event.t_s, sum(b - a for a, b in periods.get(condition, ())))
        for condition, event in first.items()
    )


def summary_json(summary: RunSummary) -> dict:
    """The summary for machines: snake_case keys with unit suffixes, null for undefined numbers."""
    return {
        "source": summary.source,
        "fluid": summary.fluid,
        "duration_s": summary.duration_s,
        "samples": summary.samples,
        "samples_by_quality": summary.samples_by_quality,
        "bad_lines": [{"line": bad.line, "reason": bad.reason} for bad in summary.bad_lines],
        "out_of_order_samples": summary.out_of_order,
        "gap_threshold_s": _number(summary.gap_threshold_s),
        "gap_total_s": summary.gap_s,
        "gaps": [{"start_s": g.start_s, "end_s": g.end_s, "duration_s": g.duration_s} for g in summary.gaps],
        "time_in_phase_s": summary.time_in_phase_s,
        "phase_changes": [{"t_s": c.t_s, "from": c.before, "to": c.after} for c in summary.phase_changes],
        "margins": {
            m.margin: {
                "minimum": _number(m.minimum),
                "minimum_t_s": _number(m.minimum_t_s),
                "closest": _number(m.closest),
                "closest_t_s": _number(m.closest_t_s),
            }
            for m in summary.margins
        },
        "boundaries": {
            b.boundary: {"on_s": b.on_s, "near_s": b.near_s, "near_limits": b.near_limits} for b in summary.boundaries
        },
        "alarms": _alarms_json(summary.alarms),
        "alarms_under": {name: _alarms_json(tallies) for name, tallies in summary.alarms_under.items()},
    }


def _alarms_json(tallies: tuple[AlarmTally, ...]) -> list[dict]:
    return [
        {"condition": a.condition, "priority": a.priority, "count": a.count, "first_t_s": a.first_t_s, "active_s": a.active_s}
        for a in tallies
    ]


def _number(value: float) -> float | None:
    return float(value) if np.isfinite(value) else None
