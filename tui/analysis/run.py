"""One recorded run after the monitor's batch pipeline: per-sample arrays plus the events."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from tui.monitor.model import Event


@dataclass(frozen=True, slots=True)
class BadLine:
    """A line of the log that could not be read (it is reported, the rest is analysed)."""

    line: int
    """Line number in the file, counting from 1."""
    reason: str


@dataclass(frozen=True, slots=True)
class AnalysedRun:
    """Everything the summary, the annotated copy and the figures need about one run.

    All arrays have one element per sample, in time order.
    """

    source: str
    """The log's path as given on the command line."""
    fluid: str
    t_s: np.ndarray
    """Time since the start of the run [s]."""
    pressure_Pa: np.ndarray
    """Absolute pressure [Pa]."""
    temperature_K: np.ndarray
    """Temperature [K]."""
    quality: np.ndarray
    """NAMUR NE 107 quality label of each sample (str)."""
    phase: np.ndarray
    """Phase label of each sample (str), or `unclassified` when quality forbids it."""
    margins: dict[str, np.ndarray]
    """`tui.monitor.model.MARGINS` name -> value per sample (NaN where undefined)."""
    active_alarms: dict[str, np.ndarray] = field(default_factory=dict)
    """Condition -> whether its alarm is active after each sample (bool)."""
    events: tuple[Event, ...] = ()
    """The events the pipeline raised, in time order."""
    bad_lines: tuple[BadLine, ...] = ()
    out_of_order: int = 0
    """Samples left out because their time was earlier than that of a sample before them."""

    @property
    def samples(self) -> int:
        return int(self.t_s.size)
