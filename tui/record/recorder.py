"""The run recorder: every reading, event and note of a run, append-only and crash-safe.

The format is described in `tui.record` (the package docstring). A background thread
flushes the buffer to the operating system every `flush_interval_s` and fsyncs every
`fsync_interval_s`, so a run that stops writing is on disk all the same; a killed process
loses at most the last flush interval.
"""

from __future__ import annotations

import math
import os
import threading
import time
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from tui.errors import UsageError
from tui.jsontext import dumps

FORMAT_LINE = "# rigside-run-log 1"
META_PREFIX = "# meta "
EVENT_PREFIX = "# event "
COLUMNS = (
    "t_s", "t_wall", "pressure_Pa", "temperature_K", "quality", "phase",
    "dT_saturation_K", "dp_saturation_Pa", "dT_solid_K", "critical_distance",
    "active_alarms", "reasons", "raw",
)
HEADER_ROW = ",".join(COLUMNS)
DEFAULT_MAX_BYTES = 256 * 1024 * 1024
NAN = math.nan


def _escape(raw: str) -> str:
    """Control and other unprintable characters as \\xNN / \\uNNNN (keeps rows one line each)."""
    return "".join(c if c.isprintable() else c.encode("unicode_escape").decode("ascii") for c in raw)


def _row(reading, t0: float) -> str:
    s = reading.sample
    m = reading.margins
    raw = s.raw
    if not raw.isprintable():
        raw = _escape(raw)
    if '"' in raw:
        raw = raw.replace('"', '""')
    reasons = ""
    if s.reasons:
        reasons = '"' + _escape("; ".join(s.reasons)).replace('"', '""') + '"'
    alarms = ";".join(reading.active_alarms)
    if "," in alarms or '"' in alarms:
        alarms = '"' + alarms.replace('"', '""') + '"'
    return (
        f"{s.t_monotonic - t0:.6f},{s.t_wall:.6f},{s.pressure_Pa:.10g},{s.temperature_K:.10g},"
        f"{s.quality.value},{reading.phase},"
        f"{m.get('dT_saturation_K', NAN):.7g},{m.get('dp_saturation_Pa', NAN):.7g},{m.get('dT_solid_K', NAN):.7g},"
        f"{m.get('critical_distance', NAN):.7g},{alarms},{reasons},\"{raw}\"\n"
    )


def _json_line(obj: dict) -> str:
    return dumps(obj, default=str, ensure_ascii=False)


def part_path(first: Path, part: int) -> Path:
    """Path of part `part` (1-based) of the run whose first file is `first`."""
    return first if part == 1 else first.with_name(f"{first.stem}.part{part}{first.suffix}")


def run_parts(first: str | Path) -> list[Path]:
    """The files of one run, in order: the first file and its numbered parts that exist."""
    first = Path(first)
    parts, n = [first], 2
    while part_path(first, n).exists():
        parts.append(part_path(first, n))
        n += 1
    return parts


class RunRecorder:
    """Append readings, events, source status and notes to a run log.

    `target` is a directory (a new file named by the start time is created in it) or the path
    of a new file; an existing file is never overwritten. `metadata` (JSON-able: the run's
    configuration and the source description) goes in every part's header. `t0` is the
    monotonic time of t_s = 0 (default: the first thing written).
    """

    def __init__(
        self,
        target: str | Path,
        metadata: dict[str, Any] | None = None,
        *,
        max_bytes: int = DEFAULT_MAX_BYTES,
        flush_interval_s: float = 0.5,
        fsync_interval_s: float = 5.0,
        t0: float | None = None,
    ):
        self.metadata = dict(metadata or {})
        self.max_bytes = max_bytes
        self.flush_interval_s, self.fsync_interval_s = flush_interval_s, fsync_interval_s
        self.t0 = t0
        self.started_wall = time.time()
        self.started = datetime.fromtimestamp(self.started_wall, UTC)
        self.rows = 0
        self.paths: list[Path] = []
        self._lock = threading.Lock()
        self._last_t_s = 0.0
        self._lost_at: float | None = None
        self._error: BaseException | None = None
        self._closed = threading.Event()
        self._file = self._create(Path(target))
        self._synced = time.monotonic()
        self._flusher = threading.Thread(target=self._flush_loop, name="run-log-flush", daemon=True)
        self._flusher.start()

    @property
    def path(self) -> Path:
        """The first file of the run (the name to give `read_table` or `run_parts`)."""
        return self.paths[0]

    # -- writing ---------------------------------------------------------------------------------

    def write(self, reading) -> None:
        """One `tui.monitor.model.Reading` as a row."""
        if self.t0 is None:
            self.t0 = reading.sample.t_monotonic
        self._put(_row(reading, self.t0), 1)
        self._last_t_s = reading.sample.t_monotonic - self.t0

    def write_many(self, readings) -> None:
        """Several readings in one write (the fast path for batches)."""
        if not readings:
            return
        if self.t0 is None:
            self.t0 = readings[0].sample.t_monotonic
        t0 = self.t0
        self._put("".join([_row(r, t0) for r in readings]), len(readings))
        self._last_t_s = readings[-1].sample.t_monotonic - t0

    def write_event(self, event) -> None:
        """A `tui.monitor.model.Event` (or a dict with at least t_s and kind)."""
        record = event.to_json() if hasattr(event, "to_json") else dict(event)
        self._put(EVENT_PREFIX + _json_line(record) + "\n", 0)

    def write_status(self, report) -> None:
        """A `SourceStatus`; a reconnection after a loss also records the gap."""
        if self.t0 is None:
            self.t0 = report.t_monotonic
        t_s = report.t_monotonic - self.t0
        lines = [EVENT_PREFIX + _json_line(
            {"t_s": t_s, "t_wall": report.t_wall, "kind": "source", "state": report.state, "message": report.message}
        )]
        if report.state == "disconnected" and self._lost_at is None:
            self._lost_at = t_s
        elif report.state == "connected" and self._lost_at is not None:
            gap = {"t_s": t_s, "t_wall": report.t_wall, "kind": "gap", "from_t_s": self._lost_at,
                   "duration_s": t_s - self._lost_at}
            lines.append(EVENT_PREFIX + _json_line(gap))
            self._lost_at = None
        self._put("\n".join(lines) + "\n", 0)

    def write_note(self, text: str, t_s: float | None = None) -> None:
        """A person's note, at `t_s` or at the last sample written."""
        t = self._last_t_s if t_s is None else t_s
        note = {"t_s": t, "t_wall": time.time(), "kind": "note", "message": str(text)}
        self._put(EVENT_PREFIX + _json_line(note) + "\n", 0)

    def close(self) -> None:
        """Flush, fsync and close (idempotent)."""
        if self._closed.is_set():
            return
        self._closed.set()
        self._flusher.join()
        with self._lock:
            self._sync()
            self._file.close()

    def __enter__(self) -> RunRecorder:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    # -- files -----------------------------------------------------------------------------------

    def _create(self, target: Path):
        """Open the first part with exclusive create; a directory gets a file named by the start time."""
        if target.is_dir() or (not target.exists() and not target.suffix):
            try:
                target.mkdir(parents=True, exist_ok=True)
            except OSError as exc:
                raise UsageError(f"cannot create log directory {target}: {exc.strerror}") from None
            stamp = self.started.strftime("run-%Y%m%dT%H%M%SZ")
            for n in range(1, 1000):
                path = target / (f"{stamp}.csv" if n == 1 else f"{stamp}-{n}.csv")
                try:
                    return self._open_part(path, 1)
                except FileExistsError:
                    continue
            raise UsageError(f"cannot find a free run log name in {target}")
        try:
            target.parent.mkdir(parents=True, exist_ok=True)
            return self._open_part(target, 1)
        except FileExistsError:
            raise UsageError(
                f"run log {target} exists; rigside never overwrites a log: give a new name or a directory"
            ) from None
        except OSError as exc:
            raise UsageError(f"cannot create run log {target}: {exc.strerror}") from None

    def _open_part(self, path: Path, part: int):
        handle = open(path, "x", encoding="utf-8", newline="\n", buffering=1 << 16)
        meta = {"started": self.started.isoformat().replace("+00:00", "Z"), "started_wall": self.started_wall, "part": part}
        header = f"{FORMAT_LINE}\n{META_PREFIX}{_json_line(meta | self.metadata)}\n{HEADER_ROW}\n"
        handle.write(header)
        handle.flush()
        self.paths.append(path)
        self._part_bytes = len(header)
        return handle

    def _put(self, text: str, rows: int) -> None:
        if self._error is not None:
            raise self._error
        if self._closed.is_set():
            raise ValueError("the run log is closed")
        with self._lock:
            self._file.write(text)
            self.rows += rows
            self._part_bytes += len(text)
            if self._part_bytes > self.max_bytes:
                self._sync()
                self._file.close()
                self._file = self._open_part(part_path(self.paths[0], len(self.paths) + 1), len(self.paths) + 1)

    def _sync(self) -> None:
        self._file.flush()
        os.fsync(self._file.fileno())
        self._synced = time.monotonic()

    def _flush_loop(self) -> None:
        while not self._closed.wait(self.flush_interval_s):
            try:
                with self._lock:
                    if time.monotonic() - self._synced >= self.fsync_interval_s:
                        self._sync()
                    else:
                        self._file.flush()
            except OSError as exc:
                self._error = exc
                return
