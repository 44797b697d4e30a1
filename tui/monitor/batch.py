"""The monitor over a whole recorded run at once, for analysis and for re-running a log under
another configuration: the same engine as the live monitor, fed in big chunks, so it raises
exactly the events the live monitor raised (or would have raised) sample by sample."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tui.errors import UsageError
from tui.monitor.classify import Classifier
from tui.monitor.config import MonitorConfig
from tui.monitor.engine import Engine
from tui.monitor.frame import QUALITIES
from tui.monitor.model import MARGINS, Event

#: samples per engine step: big enough that per-step costs vanish, small enough for the cache
CHUNK = 1 << 16


@dataclass(frozen=True, slots=True)
class BatchResult:
    """Per-sample arrays (one element per sample, in time order) and the events of a run."""

    phase: np.ndarray
    """Phase label of each sample (str), `unclassified` where quality forbids it."""
    margins: dict[str, np.ndarray]
    """MARGINS name -> value [K, Pa or -], NaN where undefined."""
    rates: dict[str, np.ndarray]
    """MARGINS name -> rate of change [unit/s], NaN until the trend window is full."""
    time_to_boundary: dict[str, np.ndarray]
    """MARGINS name -> time until the margin reaches zero at its rate [s]; inf if not closing."""
    active_alarms: dict[str, np.ndarray]
    """Condition -> whether its alarm is active after each sample (bool)."""
    events: tuple[Event, ...]


def run_batch(t_s, pressure_Pa, temperature_K, quality, config: MonitorConfig, *,
              t_wall=None, reasons=None, raw=None) -> BatchResult:
    """Run the monitor over whole arrays.

    t_s: time since the start of the run [s], non-decreasing; pressure_Pa [Pa absolute] and
    temperature_K [K]; quality: NAMUR NE 107 labels (str, e.g. "ok", "failure") or codes
    (positions in tui.monitor.frame.QUALITIES); t_wall: wall-clock time [s since the epoch]
    for the events (default NaN); reasons (per-sample tuples of quality reasons) and raw
    (per-sample records as received) word the quality events as they were worded live.
    """
    t_s = np.asarray(t_s, dtype=float)
    n = t_s.size
    pressure, temperature = (np.asarray(a, dtype=float).reshape(n) for a in (pressure_Pa, temperature_K))
    codes = quality_codes(quality, n)
    t_wall = np.full(n, np.nan) if t_wall is None else np.asarray(t_wall, dtype=float).reshape(n)
    engine = Engine(config)
    valid, phase, margins = Classifier(config, engine.phases)(pressure, temperature, codes)
    rates, to_boundary = np.empty_like(margins), np.empty_like(margins)
    active = np.empty((len(engine.names), n), dtype=bool)
    events: list[Event] = []
    for start in range(0, n, CHUNK):
        s = slice(start, start + CHUNK)
        step = engine.step(t_s[s], t_wall[s], pressure[s], temperature[s], codes[s], valid[s], phase[s],
                           margins[:, s], None if reasons is None else tuple(reasons[s]),
                           None if raw is None else tuple(raw[s]))
        rates[:, s], to_boundary[:, s], active[:, s] = step.rates, step.time_to_boundary, step.active
        events += step.events
    return BatchResult(
        phase=engine.phases.decode(phase),
        margins=dict(zip(MARGINS, margins)),
        rates=dict(zip(MARGINS, rates)),
        time_to_boundary=dict(zip(MARGINS, to_boundary)),
        active_alarms=dict(zip(engine.names, active)),
        events=tuple(events),
    )


def quality_codes(quality, n: int) -> np.ndarray:
    """Quality labels or codes -> int8 codes; an unknown label is a UsageError naming it."""
    values = np.asarray(quality).reshape(n)
    if np.issubdtype(values.dtype, np.integer):
        if n and not (0 <= values.min() and values.max() < len(QUALITIES)):
            raise UsageError(f"quality codes must lie in 0..{len(QUALITIES) - 1}")
        return values.astype(np.int8)
    codes = np.full(n, -1, dtype=np.int8)
    for code, label in enumerate(QUALITIES):
        codes[values == label.value] = code
    if (codes < 0).any():
        bad = values[codes < 0][0]
        known = ", ".join(q.value for q in QUALITIES)
        raise UsageError(f"unknown quality {str(bad)!r}; qualities are {known}")
    return codes
