"""Replay of a run log or CSV file as a live source: recorded pace, a speed factor, or as fast
as possible, with pause, step and seek for a screen's controls.

Samples carry the log's own time axis (`t_monotonic` = the row's t_s) and, for run logs, the
recorded raw text, quality and reasons, so a replay shows what was seen.
"""

from __future__ import annotations

import math
import threading
from collections.abc import Iterator
from pathlib import Path

import numpy as np

from tui.acquire.options import SourceOptions
from tui.acquire.pacer import Pacer, Playback
from tui.acquire.sample import Quality, Sample, SourceStatus
from tui.acquire.source import Counters, Item, Source
from tui.record.table import read_table

#: rows handed out per batch when playing as fast as possible
BATCH = 4096


class ReplaySource(Playback, Source):
    """Plays the rows of a table; `linger` keeps it open at the end for a seek back."""

    def __init__(self, path: Path, options: SourceOptions = SourceOptions(), *, linger: bool = False):
        self.path = Path(path)
        self.table = read_table(
            self.path,
            pressure_unit=options.pressure_unit,
            temperature_unit=options.temperature_unit,
            gauge=options.gauge,
            atmosphere_Pa=options.atmosphere_Pa,
            time_column=options.time_column,
            pressure_column=options.pressure_column,
            temperature_column=options.temperature_column,
            texts=("quality", "reasons", "raw"),
        )
        self.linger = linger
        t = self.table["t_s"]
        self.pacer = Pacer(options.speed, float(t[0]) if len(t) else 0.0)
        self.counters = Counters(lines=len(t), malformed=len(self.table.bad_lines))
        kind = "run log" if self.table.is_run_log else "CSV"
        bad = f", {len(self.table.bad_lines)} bad lines skipped" if self.table.bad_lines else ""
        self.description = f"replay of {kind} {self.path} ({len(t)} rows, {self.duration:.1f} s{bad})"
        self._wall = self._wall_clock()
        self._qualities, self._reasons, self._raw = self._recorded()

    @property
    def duration(self) -> float:
        t = self.table["t_s"]
        return float(t[-1] - t[0]) if len(t) else 0.0

    # -- playing -----------------------------------------------------------------------------------

    def batches(self, stop: threading.Event) -> Iterator[list[Item]]:
        t = self.table["t_s"]
        n, i = len(t), 0
        yield [self._status("connected", self.description)]
        while not stop.is_set():
            target = self.pacer.take_seek()
            if target is not None:
                i = int(np.searchsorted(t, target))
            if i >= n:
                yield [self._status("ended", f"end of {self.path.name}")]
                if not self.linger or not self._await_seek(stop):
                    return
                continue
            if not self.pacer.wait_until(float(t[i]), stop):
                if self.pacer.paused:
                    yield [self._status("paused", f"paused at {self.position:.1f} s")]
                continue
            j = min(self.pacer.batch_end(i, BATCH, lambda now: int(np.searchsorted(t, now, "right"))), n)
            yield self._samples(i, j)
            self.pacer.position = float(t[j - 1])
            i = j

    def _await_seek(self, stop: threading.Event) -> bool:
        """After the end: wait for a seek back (True) or stop (False)."""
        while not stop.wait(0.2):
            if self.pacer.seek_pending:
                return True
        return False

    def _samples(self, i: int, j: int) -> list[Sample]:
        t = self.table["t_s"][i:j].tolist()
        wall = self._wall[i:j].tolist()
        p = self.table["pressure_Pa"][i:j].tolist()
        T = self.table["temperature_K"][i:j].tolist()
        q, why, raw = self._qualities[i:j], self._reasons[i:j], self._raw[i:j]
        return [Sample(t[k], wall[k], p[k], T[k], raw[k], q[k], why[k]) for k in range(j - i)]

    def _status(self, state: str, message: str) -> SourceStatus:
        position = self.pacer.position
        return SourceStatus(position, self._wall_at(position), state, message)

    def _wall_clock(self) -> np.ndarray:
        """Wall-clock times of the rows: recorded, else the run's start plus t_s, else NaN."""
        wall = self.table["t_wall"]
        if np.isfinite(wall).all():
            return wall
        started = self.table.metadata.get("started_wall")
        if isinstance(started, int | float):
            return np.where(np.isfinite(wall), wall, started + self.table["t_s"])
        return wall

    def _wall_at(self, t_s: float) -> float:
        t = self.table["t_s"]
        if not len(t):
            return math.nan
        return float(np.interp(t_s, t, self._wall)) if np.isfinite(self._wall).all() else math.nan

    def _recorded(self) -> tuple[list, list, list]:
        """Per row: the recorded quality, reasons and raw text (run logs), or ok, (), ''."""
        n = len(self.table)
        columns = self.table.columns
        if "quality" not in columns:
            return [Quality.OK] * n, [()] * n, [""] * n
        names, inverse = np.unique(columns["quality"], return_inverse=True)
        known = {q.value: q for q in Quality}
        qualities = [known.get(str(name), Quality.FAILURE) for name in names]
        per_row = [qualities[k] for k in inverse.tolist()]
        reasons = [tuple(r.split("; ")) if r else () for r in columns["reasons"].tolist()]
        return per_row, reasons, columns["raw"].tolist()
