"""The conditions the monitor watches, each judging a whole chunk of samples at once.

A judgement is, per sample, 1 (the condition holds: alarm), 0 (clearly normal: past the
limit plus its deadband) or -1 (no decision: inside the deadband, or a sample that may not
be judged), with the value compared and the limit it was compared with. Delays and alarm
states come later (tui.monitor.signals, tui.monitor.alarms).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from thermo.units import PressureUnit, TemperatureUnit, format_number, format_pressure_difference
from thermo.units import format_temperature_difference
from tui.monitor.config import ConditionSettings, MonitorConfig
from tui.monitor.frame import CODE_LIMIT, QUALITIES, QUALITY_CODE, Frame, PhaseCodes
from tui.monitor.model import MARGINS


@dataclass(frozen=True, slots=True)
class Judgement:
    decision: np.ndarray
    """int8 per sample: 1 alarm, 0 normal, -1 undecided (hold the last state)."""
    value: np.ndarray
    """What was compared, per sample (the unit of the limit)."""
    limit: np.ndarray
    """The limit it was compared with, per sample."""


def _decide(on: np.ndarray, off: np.ndarray) -> np.ndarray:
    """1 where on, 0 where off (and not on), -1 where neither."""
    return on.view(np.int8) - (~(on | off)).view(np.int8)


def _constant(value: float, n: int) -> np.ndarray:
    """n copies of value (np.full costs three times as much on a live chunk of a few samples)."""
    out = np.empty(n)
    out.fill(value)
    return out


def _member_table(codes) -> np.ndarray:
    """Lookup table code -> whether it is one of `codes` (faster than np.isin on small chunks)."""
    table = np.zeros(CODE_LIMIT, dtype=bool)
    table[list(codes)] = True
    return table


class Condition:
    """An alarm condition: judges chunks, words its alarm and clear messages."""

    gated = True
    """Samples that may not be classified decide nothing (False: the sensor condition itself)."""

    def __init__(self, name: str, priority: str, on_delay_s: float, off_delay_s: float):
        self.name, self.priority = name, priority
        self.on_delay_s, self.off_delay_s = on_delay_s, off_delay_s

    def judge(self, frame: Frame) -> Judgement:
        raise NotImplementedError

    def alarm_message(self, frame: Frame, index: int, value: float, limit: float) -> str:
        raise NotImplementedError

    def clear_message(self, frame: Frame, index: int, value: float, limit: float) -> str:
        raise NotImplementedError


@dataclass(frozen=True, slots=True)
class MarginKind:
    """What one margin condition watches, and how to word it."""

    margin: str
    """MARGINS name."""
    two_sided: bool
    """Distance is |margin| (either side of the curve) rather than the signed margin."""
    quantity: str
    """"temperature", "pressure" or "plain", for formatting."""
    below: str
    """Words after the value when the margin is negative ..."""
    above: str
    """... and when it is positive."""
    trend_phrase: str


MARGIN_KINDS = {
    "saturation-temperature": MarginKind(
        "dT_saturation_K", True, "temperature", "of subcooling left", "of superheat left", "the saturation margin"),
    "saturation-pressure": MarginKind(
        "dp_saturation_Pa", True, "pressure", "below the saturation pressure", "above the saturation pressure",
        "the saturation pressure margin"),
    "solid-approach": MarginKind(
        "dT_solid_K", False, "temperature", "past the solid curve: solid may form", "above solid formation",
        "the margin to solid formation"),
    "near-critical": MarginKind(
        "critical_distance", False, "plain", "", "from the critical point", "the critical distance"),
}


class _Formatter:
    def __init__(self, kind: MarginKind, settings: ConditionSettings, pressure: PressureUnit, temperature: TemperatureUnit):
        self._kind, self._relative = kind, settings.relative
        self._pressure, self._temperature = pressure, temperature

    def __call__(self, value: float) -> str:
        if self._relative:
            return f"{format_number(value * 100.0, 3)} %"
        if self._kind.quantity == "temperature":
            return format_temperature_difference(value, self._temperature)
        if self._kind.quantity == "pressure":
            return format_pressure_difference(value, self._pressure)
        return format_number(value, 3)


class _MarginBase(Condition):
    def __init__(self, name: str, priority: str, settings: ConditionSettings, config: MonitorConfig):
        super().__init__(name, priority, settings.on_delay_s, settings.off_delay_s)
        self.kind = MARGIN_KINDS[settings.name]
        self.settings = settings
        self.row = MARGINS.index(self.kind.margin)
        self.format = _Formatter(self.kind, settings, config.pressure_unit, config.temperature_unit)

    def _distance(self, frame: Frame):
        """Distance to the curve [margin unit], and the scale of the limits: the saturation
        pressure p - dp for a relative limit, else 1."""
        margin = frame.margins[self.row]
        distance = np.abs(margin) if self.kind.two_sided else margin
        return distance, np.abs(frame.pressure_Pa - margin) if self.settings.relative else 1.0


class MarginLimit(_MarginBase):
    """A margin at or within its limit; clear past limit + deadband; an undefined margin is clear."""

    def judge(self, frame: Frame) -> Judgement:
        distance, scale = self._distance(frame)
        limit, deadband = self.settings.limit * scale, self.settings.deadband * scale
        decision = _decide(distance <= limit, (distance > limit + deadband) | np.isnan(distance))
        if self.settings.relative:
            with np.errstate(invalid="ignore", divide="ignore"):
                distance = distance / scale
        return Judgement(decision, distance, _constant(self.settings.limit, distance.size))

    def alarm_message(self, frame, index, value, limit):
        below = frame.margins[self.row, index] < 0.0
        words = self.kind.below if below else self.kind.above
        return f"{self.format(abs(value))} {words} (limit {self.format(limit)})"

    def clear_message(self, frame, index, value, limit):
        return f"back to normal: {self.alarm_message(frame, index, value, limit)}"


class MarginTrend(_MarginBase):
    """The margin predicted, at its present rate, to reach the limit within the horizon."""

    def judge(self, frame: Frame) -> Judgement:
        distance, scale = self._distance(frame)
        limit = self.settings.limit * scale
        margin, rate = frame.margins[self.row], frame.rates[self.row]
        closing = -rate * np.sign(margin) if self.kind.two_sided else -rate
        reaching = (closing > 0.0) & (distance > limit)
        to_limit = np.divide(distance - limit, closing, out=_constant(np.inf, distance.size), where=reaching)
        to_limit[np.isnan(rate) & ~np.isnan(distance)] = np.nan
        horizon = self.settings.horizon_s
        decision = _decide(to_limit <= horizon, to_limit > horizon + self.settings.horizon_deadband_s)
        return Judgement(decision, to_limit, _constant(horizon, to_limit.size))

    def alarm_message(self, frame, index, value, limit):
        return (f"at the present rate {self.kind.trend_phrase} reaches its limit of "
                f"{self.format(self.settings.limit)} in about {format_number(value, 3)} s "
                f"(horizon {format_number(limit, 3)} s)")

    def clear_message(self, frame, index, value, limit):
        return (f"back to normal: {self.kind.trend_phrase} is no longer predicted to reach "
                f"{self.format(self.settings.limit)} within {format_number(limit, 3)} s")


class PhaseIn(Condition):
    """The classified phase is one of a set of labels."""

    def __init__(self, settings: ConditionSettings, codes: PhaseCodes, labels: tuple[str, ...], alarm: str, clear: str):
        super().__init__(settings.name, settings.priority, settings.on_delay_s, settings.off_delay_s)
        self._table = _member_table(codes.code(label) for label in labels)
        self._alarm, self._clear = alarm, clear

    def judge(self, frame: Frame) -> Judgement:
        on = self._table[frame.phase]
        nan = _constant(np.nan, on.size)
        return Judgement(_decide(on, ~on), nan, nan)

    def alarm_message(self, frame, index, value, limit):
        return self._alarm

    def clear_message(self, frame, index, value, limit):
        return self._clear


class QualityIn(Condition):
    """The sample's quality is one of a set of NAMUR NE 107 categories."""

    gated = False

    def __init__(self, settings: ConditionSettings):
        super().__init__(settings.name, settings.priority, settings.on_delay_s, settings.off_delay_s)
        self._table = _member_table(QUALITY_CODE[quality] for quality in settings.qualities)

    def judge(self, frame: Frame) -> Judgement:
        on = self._table[frame.quality]
        nan = _constant(np.nan, on.size)
        return Judgement(_decide(on, ~on), nan, nan)

    def alarm_message(self, frame, index, value, limit):
        return f"sensor quality {quality_text(frame, index)}"

    def clear_message(self, frame, index, value, limit):
        return f"back to normal: sensor quality {quality_text(frame, index)}"


#: characters of a bad record quoted in a message
RAW_QUOTED = 80


def quality_text(frame: Frame, index: int) -> str:
    """"failure (malformed: ...; received 'p=?? T=21')", from the sample's quality, reasons and
    record (quoted, so a person sees what the gauge sent)."""
    quality = QUALITIES[int(frame.quality[index])]
    details = list(frame.reasons[index]) if frame.reasons is not None else []
    raw = frame.raw[index] if frame.raw is not None else ""
    if raw and quality.value != "ok":
        details.append(f"received {raw[:RAW_QUOTED]!r}")
    return f"{quality.value} ({'; '.join(details)})" if details else quality.value


#: phase conditions: name -> (labels, alarm message, clear message)
PHASE_CONDITIONS = {
    "two-phase": (("liquid+vapor", "triple"),
                  "on the liquid-vapor curve within the gauge uncertainty: liquid and vapor together",
                  "back to normal: off the liquid-vapor curve"),
    "out-of-range": (("out-of-range",),
                     "state outside the range of the fluid's equation of state",
                     "back to normal: state inside the equation of state's range"),
}


def build_conditions(config: MonitorConfig, codes: PhaseCodes) -> list[Condition]:
    """The enabled alarm conditions in the configuration's order (trend warnings after their limit)."""
    built: list[Condition] = []
    for name, settings in config.conditions.items():
        if not settings.enabled:
            continue
        if name in MARGIN_KINDS:
            built.append(MarginLimit(name, settings.priority, settings, config))
            if settings.horizon_s > 0.0:
                built.append(MarginTrend(f"{name}-trend", settings.trend_priority, settings, config))
        elif name in PHASE_CONDITIONS:
            built.append(PhaseIn(settings, codes, *PHASE_CONDITIONS[name]))
        elif name == "sensor-quality":
            built.append(QualityIn(settings))
    return built
