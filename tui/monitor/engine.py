"""The monitor's engine: classified samples in, chunk by chunk; trends, alarm states and events out.

Everything per sample is array work over the chunk (trend, judgements, deadbands, delays);
only the transition points (an alarm raised or cleared, a phase or quality change, a shelve
running out, a flood ending) are visited one by one, in time order. The state carried
between chunks makes any chunking give the same result, which is what lets the live
monitor and the batch pipeline share this code.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tui.monitor.alarms import AlarmBoard, FloodGuard
from tui.monitor.conditions import Condition, Judgement, build_conditions, quality_text
from tui.monitor.config import MonitorConfig
from tui.monitor.frame import OK_CODE, Frame, PhaseCodes
from tui.monitor.model import MARGINS, Event
from tui.monitor.signals import Hold, Settle, changes
from tui.monitor.trend import Trend, time_to_zero

# order of simultaneous events at one sample
_QUALITY, _PHASE, _EXPIRY, _ALARM = range(4)


@dataclass(frozen=True, slots=True)
class Step:
    """The engine's answer for one chunk."""

    rates: np.ndarray
    """MARGINS x samples [unit/s]."""
    time_to_boundary: np.ndarray
    """MARGINS x samples [s]; inf when not closing, NaN when unknown."""
    active: np.ndarray
    """conditions x samples: the alarm is active and not shelved after the sample (bool)."""
    events: list[Event]


class Engine:
    """Trend, conditions, alarm states and events of one run (one operator)."""

    def __init__(self, config: MonitorConfig):
        self.config = config
        self.phases = PhaseCodes()
        self.conditions: list[Condition] = build_conditions(config, self.phases)
        self.names = tuple(condition.name for condition in self.conditions)
        rows = len(self.conditions)
        self._trend = Trend(config.trend_window_s, config.trend_bins, len(MARGINS))
        self._gated = np.array([condition.gated for condition in self.conditions], dtype=bool)[:, None]
        self._limit_hold = Hold(rows, initial=0)
        delays = np.array([[c.off_delay_s, c.on_delay_s] for c in self.conditions]).reshape(rows, 2)
        self._delays = Settle(delays, initial=0)
        phase_change = config.conditions["phase-change"]
        self._phase_events = phase_change.enabled
        self._phase_hold = Hold(1, initial=-1)
        self._phase_settle = Settle(np.array([[phase_change.hold_s]]), initial=-1)
        self._quality = OK_CODE
        self.board = AlarmBoard(
            [(condition.name, condition.priority) for condition in self.conditions],
            flood=FloodGuard(config.flood_alarms, config.flood_window_s, config.flood_end_alarms),
            max_shelve_s=config.max_shelve_s,
        )
        self._last: tuple[Frame, list[Judgement]] | None = None

    def step(self, t_s, t_wall, pressure_Pa, temperature_K, quality, valid, phase, margins,
             reasons=None, raw=None) -> Step:
        """One chunk: arrays of n samples (margins MARGINS x n), phase and quality as codes;
        reasons and raw records (tuples of n) for the wording of quality events, if known."""
        rates = self._trend(t_s, margins)
        frame = Frame(t_s, t_wall, pressure_Pa, temperature_K, quality, valid, phase, margins, rates, reasons, raw)
        judgements = [condition.judge(frame) for condition in self.conditions]
        decisions = np.array([j.decision for j in judgements], dtype=np.int8).reshape(len(judgements), frame.size)
        gate = valid[None, :] | ~self._gated
        decisions[~gate] = -1
        before = self._delays.settled.copy()
        settled = self._delays(self._limit_hold(decisions), t_s, gate).astype(bool)
        active = settled & self._unshelved(t_s)
        items = self._alarm_items(settled, before, t_s) + self._quality_items(quality) + self._phase_items(frame)
        events = self._walk(sorted(items, key=lambda item: item[:3]), frame, judgements)
        self._last = (frame, judgements)
        return Step(rates, time_to_zero(margins, rates), active, events)

    # -- transition points ------------------------------------------------------------------

    def _unshelved(self, t_s: np.ndarray) -> np.ndarray:
        """conditions x samples: False while a condition is shelved (shelves change between chunks)."""
        mask = np.ones((len(self.conditions), t_s.size), dtype=bool)
        for row in range(len(self.conditions)):
            until = self.board.shelved_until(row)
            if until is not None:
                mask[row, : np.searchsorted(t_s, until, side="left")] = False
        return mask

    def _alarm_items(self, settled: np.ndarray, before: np.ndarray, t_s: np.ndarray) -> list[tuple]:
        rows, columns = changes(settled, before.astype(bool))
        items = [(int(c), _ALARM, int(r), bool(settled[r, c])) for r, c in zip(rows, columns)]
        for row in range(len(self.conditions)):
            until = self.board.shelved_until(row)
            if until is not None:
                column = int(np.searchsorted(t_s, until, side="left"))
                if column < t_s.size:
                    items.append((column, _EXPIRY, row, None))
        return items

    def _quality_items(self, quality: np.ndarray) -> list[tuple]:
        if quality.size == 0:
            return []
        (_, columns) = changes(quality[None, :], np.array([self._quality]))
        self._quality = int(quality[-1])
        return [(int(c), _QUALITY, 0, None) for c in columns]

    def _phase_items(self, frame: Frame) -> list[tuple]:
        if not self._phase_events or frame.size == 0:
            return []
        before = self._phase_settle.settled.copy()
        held = self._phase_hold(np.where(frame.valid, frame.phase, -1)[None, :])
        settled = self._phase_settle(held, frame.t_s, frame.valid[None, :])
        _, columns = changes(settled, before)
        previous = np.concatenate([before, settled[0, :-1]])
        return [(int(c), _PHASE, 0, (int(previous[c]), int(settled[0, c]))) for c in columns]

    def _walk(self, items: list[tuple], frame: Frame, judgements: list[Judgement]) -> list[Event]:
        """Visit the transition points in time order; flood ends fall between them."""
        events: list[Event] = []
        for column, order, row, payload in items:
            self._end_flood_by(column, frame, events)
            if order == _QUALITY:
                events.append(self._quality_event(frame, column))
            elif order == _PHASE:
                events.append(self._phase_event(frame, column, *payload))
            elif order == _EXPIRY:
                alarm = self._alarm_event(frame, judgements, column, row, True)
                events += self.board.shelve_expired(row, alarm)
            else:
                event = self._alarm_event(frame, judgements, column, row, payload)
                events += self.board.condition_changed(row, payload, event)
        self._end_flood_by(frame.size - 1, frame, events)
        return events

    def _end_flood_by(self, column: int, frame: Frame, events: list[Event]) -> None:
        if self.board.flood.flooding and frame.size:
            end = int(np.searchsorted(frame.t_s, self.board.flood.end_time(), side="left"))
            if end <= column:
                events.append(self.board.flood_ended(float(frame.t_s[end]), float(frame.t_wall[end])))

    # -- events -----------------------------------------------------------------------------

    def _alarm_event(self, frame: Frame, judgements: list[Judgement], column: int, row: int, raised: bool) -> Event:
        condition, judgement = self.conditions[row], judgements[row]
        value, limit = float(judgement.value[column]), float(judgement.limit[column])
        word = condition.alarm_message if raised else condition.clear_message
        return Event(float(frame.t_s[column]), float(frame.t_wall[column]), "alarm" if raised else "clear",
                     condition.name, condition.priority, value, limit, word(frame, column, value, limit))

    def _quality_event(self, frame: Frame, column: int) -> Event:
        code = int(frame.quality[column])
        return Event(float(frame.t_s[column]), float(frame.t_wall[column]), "quality", "sensor",
                     message=f"quality {quality_text(frame, column)}" if code != OK_CODE else "quality ok")

    def _phase_event(self, frame: Frame, column: int, before: int, after: int) -> Event:
        new = self.phases.labels[after]
        message = f"{self.phases.labels[before]} -> {new}" if before >= 0 else f"now {new}"
        return Event(float(frame.t_s[column]), float(frame.t_wall[column]), "phase-change", "phase", message=message)

    # -- operator actions (between chunks) ------------------------------------------------

    def now(self) -> tuple[float, float]:
        """Run time and wall time of the latest sample (0 and NaN before the first)."""
        if self._last is None or self._last[0].size == 0:
            return 0.0, math.nan
        frame = self._last[0]
        return float(frame.t_s[-1]), float(frame.t_wall[-1])

    def current_alarm(self, name: str) -> Event:
        """The alarm event condition `name` would raise at the latest sample."""
        row = self.names.index(name)
        frame, judgements = self._last
        return self._alarm_event(frame, judgements, frame.size - 1, row, True)
