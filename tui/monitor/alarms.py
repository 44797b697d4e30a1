"""Alarm states, acknowledgement, shelving and the flood guard, after ISA-18.2 / IEC 62682.

Each alarm point follows the standard's state model (ANSI/ISA-18.2-2016, section 11, from
memory): normal -> unacknowledged (the condition becomes active) -> acknowledged (an
operator saw it) -> normal (the condition clears); or unacknowledged -> returned to normal
unacknowledged (it cleared before anyone acknowledged) -> normal (acknowledged). A shelved
alarm is kept out of annunciation until its shelve expires or is lifted; then it is judged
afresh, and annunciated if its condition still holds.

Flood guard: ISA-18.2 and EEMUA 191 count an alarm flood from about 10 alarms in 10 minutes
per operator (from memory); here more than `alarms` alarms within `window` starts a flood,
fewer than `end_alarms` in the window ends it. The flood is summarised in one event at its
start and one at its end; every alarm in between is still logged, marked `in_flood`.
"""

from __future__ import annotations

import math
from collections import Counter, deque
from dataclasses import dataclass, replace
from enum import StrEnum

from thermo.units import format_number
from tui.errors import UsageError
from tui.monitor.model import Event

#: recent alarm events kept in memory for screens (the run log keeps all of them)
ALARM_LOG_LENGTH = 1000


def format_duration(seconds: float) -> str:
    """'45 s', '10 min', '2.5 h' (shelve and flood messages)."""
    for unit, size in (("h", 3600.0), ("min", 60.0)):
        if seconds >= 2 * size:
            return f"{format_number(seconds / size, 3).rstrip('0').rstrip('.')} {unit}"
    return f"{format_number(seconds, 3).rstrip('0').rstrip('.') if seconds % 1 else int(seconds)} s"


class AlarmState(StrEnum):
    NORMAL = "normal"
    UNACKNOWLEDGED = "unacknowledged"
    ACKNOWLEDGED = "acknowledged"
    RETURNED_UNACKNOWLEDGED = "returned-unacknowledged"


@dataclass(frozen=True, slots=True)
class AlarmStatus:
    """One alarm point as a screen shows it."""

    condition: str
    priority: str
    state: str
    """An AlarmState value, or "shelved"."""
    active: bool
    """The condition holds now (after its delays), whether or not it is annunciated."""
    since_t_s: float
    """When the state last changed [s of run time]; NaN if never."""
    shelved_until_t_s: float = math.nan
    message: str = ""
    """The latest alarm or clear message."""


@dataclass(slots=True)
class _Point:
    condition: str
    priority: str
    state: AlarmState = AlarmState.NORMAL
    active: bool = False
    shelved_until: float | None = None
    since: float = math.nan
    last: Event | None = None

    @property
    def annunciated(self) -> bool:
        return self.active and self.shelved_until is None


class FloodGuard:
    """Counts annunciated alarms in a sliding window and tells when a flood starts and ends."""

    def __init__(self, alarms: int, window_s: float, end_alarms: int):
        self.alarms, self.window_s, self.end_alarms = alarms, window_s, end_alarms
        self._recent: deque[tuple[float, str]] = deque()
        self.flooding = False
        self._started = math.nan
        self._during: Counter[str] = Counter()

    def add(self, t_s: float, condition: str) -> bool:
        """Count an alarm; True when it starts a flood."""
        self._recent.append((t_s, condition))
        while self._recent[0][0] <= t_s - self.window_s:
            self._recent.popleft()
        if self.flooding:
            self._during[condition] += 1
            return False
        if len(self._recent) > self.alarms:
            self.flooding, self._started = True, t_s
            self._during = Counter(name for _, name in self._recent)
            return True
        return False

    def end_time(self) -> float:
        """The earliest time at which fewer than `end_alarms` alarms remain in the window."""
        return self._recent[-self.end_alarms][0] + self.window_s

    def start_message(self) -> str:
        return (f"alarm flood: {len(self._recent)} alarms within {format_duration(self.window_s)} "
                f"(more than {self.alarms}); every alarm is still logged")

    def end(self, t_s: float) -> str:
        """Close the flood; its summary."""
        total = sum(self._during.values())
        detail = ", ".join(f"{name} x{count}" for name, count in self._during.most_common())
        self.flooding = False
        return f"alarm flood over after {format_duration(t_s - self._started)}: {total} alarms ({detail})"

    @property
    def count(self) -> int:
        return len(self._recent)


class AlarmBoard:
    """The alarm points of one monitor (one operator), with their log."""

    def __init__(self, points: list[tuple[str, str]], *, flood: FloodGuard, max_shelve_s: float):
        self._points = {name: _Point(name, priority) for name, priority in points}
        self._order = list(self._points)
        self.flood = flood
        self.max_shelve_s = max_shelve_s
        self.log: deque[Event] = deque(maxlen=ALARM_LOG_LENGTH)

    # -- what the chunk walk calls, in time order -------------------------------------------

    def _point(self, index: int) -> _Point:
        return self._points[self._order[index]]

    def condition_changed(self, index: int, active: bool, event: Event) -> list[Event]:
        """The delayed condition of point `index` became active or clear; `event` is the
        alarm or clear event to annunciate (its kind is set here)."""
        point = self._point(index)
        point.active = active
        if point.shelved_until is not None:
            return []
        if active:
            return self._annunciate(point, event)
        if point.state is AlarmState.UNACKNOWLEDGED:
            point.state = AlarmState.RETURNED_UNACKNOWLEDGED
        elif point.state is AlarmState.ACKNOWLEDGED:
            point.state = AlarmState.NORMAL
        else:
            return []
        return [self._record(point, replace(event, kind="clear"))]

    def shelve_expired(self, index: int, alarm: Event) -> list[Event]:
        """The shelve of point `index` ran out at `alarm`'s time; `alarm` is annunciated if
        the condition still holds."""
        point = self._point(index)
        point.shelved_until = None
        events = [self._action(point, "shelve", "shelve expired", alarm.t_s, alarm.t_wall)]
        if point.active:
            events += self._annunciate(point, alarm)
        return events

    def flood_ended(self, t_s: float, t_wall: float) -> Event:
        message = self.flood.end(t_s)
        return self._log(Event(t_s, t_wall, "flood", "flood", value=float(self.flood.count),
                               limit=float(self.flood.alarms), message=message))

    def _annunciate(self, point: _Point, event: Event) -> list[Event]:
        if point.state not in (AlarmState.NORMAL, AlarmState.RETURNED_UNACKNOWLEDGED):
            return []
        point.state = AlarmState.UNACKNOWLEDGED
        starts = self.flood.add(event.t_s, point.condition)
        events = [self._record(point, replace(event, kind="alarm", in_flood=self.flood.flooding))]
        if starts:
            events.append(self._log(Event(event.t_s, event.t_wall, "flood", "flood", priority=point.priority,
                                          value=float(self.flood.count), limit=float(self.flood.alarms),
                                          message=self.flood.start_message())))
        return events

    def _record(self, point: _Point, event: Event, keep_last: bool = False) -> Event:
        point.since = event.t_s
        if not keep_last:
            point.last = event
        return self._log(event)

    def _log(self, event: Event) -> Event:
        self.log.append(event)
        return event

    # -- operator actions, between chunks ---------------------------------------------------

    def names(self, condition: str | None) -> list[str]:
        if condition is None:
            return list(self._order)
        if condition not in self._points:
            raise UsageError(f"no alarm named {condition!r}; alarms are {', '.join(self._order)}")
        return [condition]

    def acknowledge(self, condition: str | None, t_s: float, t_wall: float) -> list[Event]:
        """Acknowledge one alarm (or all with None): unacknowledged -> acknowledged,
        returned-unacknowledged -> normal. Returns the ack events."""
        events = []
        for name in self.names(condition):
            point = self._points[name]
            if point.shelved_until is not None:
                continue
            if point.state is AlarmState.UNACKNOWLEDGED:
                point.state, message = AlarmState.ACKNOWLEDGED, "acknowledged"
            elif point.state is AlarmState.RETURNED_UNACKNOWLEDGED:
                point.state, message = AlarmState.NORMAL, "acknowledged after it returned to normal"
            else:
                continue
            events.append(self._action(point, "ack", message, t_s, t_wall))
        return events

    def shelve(self, condition: str, seconds: float, t_s: float, t_wall: float) -> list[Event]:
        """Keep an alarm out of annunciation for `seconds` (at most the configured maximum)."""
        if not 0.0 < seconds <= self.max_shelve_s:
            raise UsageError(f"shelve for more than 0 s and at most {format_duration(self.max_shelve_s)}, "
                             f"not {format_duration(seconds)}")
        events = []
        for name in self.names(condition):
            point = self._points[name]
            point.shelved_until = t_s + seconds
            point.state = AlarmState.NORMAL
            events.append(self._action(point, "shelve", f"shelved for {format_duration(seconds)}", t_s, t_wall))
        return events

    def unshelve(self, condition: str, t_s: float, t_wall: float, alarm_for) -> list[Event]:
        """Lift a shelve now; `alarm_for(name)` gives the alarm event to annunciate if the
        condition still holds."""
        events = []
        for name in self.names(condition):
            point = self._points[name]
            if point.shelved_until is None:
                continue
            point.shelved_until = None
            events.append(self._action(point, "shelve", "shelve lifted", t_s, t_wall))
            if point.active:
                events += self._annunciate(point, alarm_for(name))
        return events

    def _action(self, point: _Point, kind: str, message: str, t_s: float, t_wall: float) -> Event:
        last = point.last
        event = Event(t_s, t_wall, kind, point.condition, point.priority,
                      value=last.value if last else math.nan, limit=last.limit if last else math.nan,
                      message=message)
        return self._record(point, event, keep_last=True)

    # -- what screens read ------------------------------------------------------------------

    def statuses(self) -> tuple[AlarmStatus, ...]:
        return tuple(
            AlarmStatus(
                condition=point.condition,
                priority=point.priority,
                state="shelved" if point.shelved_until is not None else point.state.value,
                active=point.active,
                since_t_s=point.since,
                shelved_until_t_s=math.nan if point.shelved_until is None else point.shelved_until,
                message=point.last.message if point.last else "",
            )
            for point in self._points.values()
        )

    def annunciated(self) -> list[str]:
        """Conditions whose alarm is active and not shelved (unacknowledged or acknowledged)."""
        return [point.condition for point in self._points.values() if point.annunciated]

    def shelved_until(self, index: int) -> float | None:
        return self._point(index).shelved_until
