"""Fast reader of run logs and of any CSV with a header: column arrays, metadata, events, bad lines.

Rows are parsed by numpy's C reader (`np.loadtxt` with a quote character) in blocks; a block
that fails is halved until the bad lines are isolated, so a clean file costs one pass and a
garbled one only a few more, and every good row of a truncated or garbled file is read while
each bad one is reported by its line number with a reason.

CSV columns are found by name and unit (`tui.record.csv_header`). Time is seconds (or `[ms]`,
`[min]`, `[h]`) or ISO 8601 (a time without a zone is taken as UTC). Results are SI: `t_s` [s from the first row], `t_wall` [s since the epoch, NaN
when unknown], `pressure_Pa` (absolute), `temperature_K`.
"""

from __future__ import annotations

import csv
import json
import math
import re
import warnings
from collections.abc import Sequence
from dataclasses import dataclass, field
from itertools import repeat
from pathlib import Path

import numpy as np

from thermo.units import STANDARD_ATMOSPHERE
from tui.acquire.sample import Quality
from tui.errors import UsageError
from tui.record.csv_header import CsvLayout, csv_layout
from tui.record.recorder import COLUMNS, EVENT_PREFIX, FORMAT_LINE, META_PREFIX

#: rows parsed per numpy call before bisection takes over
BLOCK = 1 << 16
RUN_LOG_NUMBERS = (
    "t_s", "t_wall", "pressure_Pa", "temperature_K",
    "dT_saturation_K", "dp_saturation_Pa", "dT_solid_K", "critical_distance",
)
RUN_LOG_TEXTS = ("quality", "phase", "active_alarms", "reasons", "raw")
DEFAULT_TEXTS = ("quality", "phase", "active_alarms")



@dataclass
class Table:
    """What a log or CSV holds, in SI."""

    columns: dict[str, np.ndarray]
    """'t_s', 't_wall', 'pressure_Pa', 'temperature_K' always; a run log adds its margins and
    text columns ('quality', 'phase', 'active_alarms'; 'reasons', 'raw' when asked)."""
    metadata: dict = field(default_factory=dict)
    events: list[dict] = field(default_factory=list)
    bad_lines: list[tuple[int, str]] = field(default_factory=list)
    """(line number from 1, reason) of every line that could not be read."""
    is_run_log: bool = False
    source: str = ""

    def __len__(self) -> int:
        return len(self.columns["t_s"])

    def __getitem__(self, name: str) -> np.ndarray:
        return self.columns[name]


def read_table(
    path: str | Path | Sequence[str | Path],
    *,
    pressure_unit: str | None = None,
    temperature_unit: str | None = None,
    time_unit: str | None = None,
    gauge: bool = False,
    atmosphere_Pa: float = STANDARD_ATMOSPHERE,
    time_column: str | None = None,
    pressure_column: str | None = None,
    temperature_column: str | None = None,
    texts: Sequence[str] = DEFAULT_TEXTS,
    delimiter: str | None = None,
) -> Table:
    """Read a run log (or the list of its parts, see `run_parts`) or a CSV file.

    Options name the units and columns a CSV does not; `texts` picks the run log's text
    columns (add 'reasons' and 'raw' when needed: they cost memory). Raises `UsageError` for
    a file that cannot be read or has no usable header.
    """
    paths = [Path(path)] if isinstance(path, str | Path) else [Path(p) for p in path]
    if not paths:
        raise UsageError("no file to read")
    options = dict(
        pressure_unit=pressure_unit, temperature_unit=temperature_unit, time_unit=time_unit, gauge=gauge,
        atmosphere_Pa=atmosphere_Pa, time_column=time_column, pressure_column=pressure_column,
        temperature_column=temperature_column, texts=tuple(texts), delimiter=delimiter,
    )
    tables = [_read_one(p, options) for p in paths]
    if len(tables) == 1:
        return tables[0]
    first = tables[0]
    names = first.columns.keys()
    for t in tables[1:]:
        if t.columns.keys() != names:
            raise UsageError(f"{t.source} does not have the columns of {first.source}")
    return Table(
        {name: np.concatenate([t.columns[name] for t in tables]) for name in names},
        first.metadata,
        [e for t in tables for e in t.events],
        [(n, f"{t.source}: {reason}") for t in tables for n, reason in t.bad_lines],
        first.is_run_log,
        ", ".join(t.source for t in tables),
    )


def _read_bytes(path: Path) -> bytes:
    try:
        return path.read_bytes()
    except OSError as exc:
        raise UsageError(f"cannot read {path}: {exc.strerror or exc}") from None


def _read_one(path: Path, options: dict) -> Table:
    data = _read_bytes(path)
    if data.startswith(FORMAT_LINE.encode() + b"\n"):
        clean = _scan_clean_run_log(data)
        if clean is not None:
            del data  # numpy reads the file itself: keep only one copy of the text around
            table = _load_clean_run_log(path, clean, options)
            if table is not None:
                return table
            data = _read_bytes(path)
    return _read_careful(path, data, options)


@dataclass
class _Clean:
    """What one scan of a run log's bytes found, for the single-pass reader."""

    header: str
    header_at: int
    rows: int
    comments: list[tuple[int, str]]


def _scan_clean_run_log(data: bytes) -> _Clean | None:
    """Header, comment lines and row count of a run log that looks whole (ends with a line end,
    no CR); None when only the careful path will do."""
    if not data.endswith(b"\n") or b"\r" in data:
        return None
    found = _comment_lines(data)
    comments = [(i, data[at : data.find(b"\n", at)].decode("utf-8", "replace")) for i, at in found]
    header_at = 0
    while header_at < len(found) and found[header_at][0] == header_at:
        header_at += 1
    start = data.find(b"\n", found[header_at - 1][1]) + 1 if header_at else 0
    header = data[start : data.find(b"\n", start)].decode("utf-8", "replace")
    return _Clean(header, header_at, data.count(b"\n") - len(comments) - 1, comments)


def _load_clean_run_log(path: Path, clean: _Clean, options: dict) -> Table | None:
    """All rows in one pass of numpy's reader; None if any row needs the careful path."""
    names = next(csv.reader([clean.header]))
    wanted, text_cols = _run_log_columns(names, options, path)
    metadata, events, bad = _comment_records(clean.comments)
    read = dict(delimiter=",", quotechar='"', comments="#", skiprows=clean.header_at + 1, encoding="utf-8", ndmin=2)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", UserWarning)
            values = np.loadtxt(path, usecols=list(wanted.values()), dtype=float, **read)
            strings = np.loadtxt(path, usecols=list(text_cols.values()), dtype=str, **read) if text_cols else None
    except ValueError:
        return None
    if len(values) != clean.rows or (strings is not None and len(strings) != clean.rows):
        return None
    if strings is None:
        strings = np.empty((len(values), 0), dtype=str)
    if "quality" in text_cols and not _known(strings[:, list(text_cols).index("quality")]).all():
        return None  # the careful path names the rows
    columns = dict(zip(wanted, np.ascontiguousarray(values.T))) | dict(zip(text_cols, strings.T))
    return Table(columns, metadata, events, bad, True, str(path))


def _comment_records(comments: list[tuple[int, str]]) -> tuple[dict, list, list]:
    """Metadata, events and bad lines of a log's comment lines (line index, text)."""
    metadata, events, bad = {}, [], []
    for i, line in comments:
        if line.startswith(META_PREFIX) and not metadata:
            metadata = _json(line[len(META_PREFIX):], i, bad, "meta")
        elif line.startswith(EVENT_PREFIX):
            event = _json(line[len(EVENT_PREFIX):], i, bad, "event")
            if event:
                events.append(event)
    return metadata, events, bad


def _read_careful(path: Path, data: bytes, options: dict) -> Table:
    """Line by line bookkeeping, so that every bad line is found and named."""
    if b"\r" in data:
        data = data.replace(b"\r\n", b"\n").replace(b"\r", b"\n")
    complete = data.endswith(b"\n")
    lines = data.decode("utf-8", "replace").split("\n")
    if complete:
        lines.pop()
    special = [i for i, _ in _comment_lines(data)]
    del data  # the lines hold the text now: free the bytes before the rows are parsed
    is_run_log = bool(lines) and lines[0] == FORMAT_LINE
    metadata, events, bad = _comment_records([(i, lines[i]) for i in special])
    data_index = np.setdiff1d(np.arange(len(lines)), special, assume_unique=True)
    while len(data_index) and not lines[data_index[0]].strip():
        data_index = data_index[1:]
    if not len(data_index):
        raise UsageError(f"{path}: no header line with column names")
    header = lines[data_index[0]]
    data_index = data_index[1:]
    if is_run_log and not complete and len(data_index) and data_index[-1] == len(lines) - 1:
        bad.append((len(lines), "truncated last line (no line end)"))
        data_index = data_index[:-1]
    rows = _pick(lines, data_index)
    line_numbers = data_index + 1
    if is_run_log:
        columns = _read_run_log(header, rows, line_numbers, bad, options, path)
    else:
        columns = _read_csv(header, rows, line_numbers, bad, options, path)
    bad.sort()
    return Table(columns, metadata, events, bad, is_run_log, str(path))


def _comment_lines(data: bytes) -> list[tuple[int, int]]:
    """(line index, byte offset) of the lines of `data` that start with '#'.

    Found with bytes.find (a fast C search), since a log has few of them among many rows.
    Empty lines need no search: the row parser skips them.
    """
    found = [(0, 0)] if data[:1] == b"#" else []
    at, line, counted = data.find(b"\n#"), 0, 0
    while at >= 0:
        line += data.count(b"\n", counted, at + 1)
        counted = at + 1
        found.append((line, at + 1))
        at = data.find(b"\n#", at + 1)
    return found


def _pick(items: list, index: np.ndarray) -> list:
    """items[index] for a sorted index array, cheaply when it drops only a few."""
    dropped = len(items) - len(index)
    if dropped == 0:
        return items
    if dropped <= 1000 and len(index) > 10 * dropped:
        keep = np.zeros(len(items), dtype=bool)
        keep[index] = True
        picked = list(items)
        for i in np.flatnonzero(~keep)[::-1].tolist():
            del picked[i]
        return picked
    return [items[i] for i in index.tolist()]


def _json(text: str, i: int, bad: list, what: str) -> dict:
    try:
        value = json.loads(text)
    except ValueError as exc:
        bad.append((i + 1, f"{what} line is not JSON: {exc}"))
        return {}
    if not isinstance(value, dict):
        bad.append((i + 1, f"{what} line is not a JSON object"))
        return {}
    return value


def _run_log_columns(names: list[str], options: dict, path: Path) -> tuple[dict, dict]:
    """Index of each number column and of each text column asked for, by name."""
    missing = [c for c in COLUMNS if c not in names]
    if missing:
        raise UsageError(f"{path}: run log header lacks column {missing[0]!r}")
    unknown = [c for c in options["texts"] if c not in RUN_LOG_TEXTS]
    if unknown:
        raise UsageError(f"unknown text column {unknown[0]!r}; choose from {', '.join(RUN_LOG_TEXTS)}")
    return {c: names.index(c) for c in RUN_LOG_NUMBERS}, {c: names.index(c) for c in options["texts"]}


def _read_run_log(header: str, rows: list[str], numbers: np.ndarray, bad: list, options: dict, path: Path) -> dict:
    names = next(csv.reader([header]))
    wanted, text_cols = _run_log_columns(names, options, path)
    values, strings, good = _parse_rows(rows, numbers, names, wanted, text_cols, ",", bad)
    if "quality" in text_cols:
        values, strings = _known_quality(values, strings, list(text_cols).index("quality"), numbers[good], bad)
    return dict(zip(wanted, np.ascontiguousarray(values.T))) | dict(zip(text_cols, strings.T))


def _known(labels: np.ndarray) -> np.ndarray:
    """Which labels are NAMUR NE 107 categories (or ok)."""
    known = np.zeros(len(labels), dtype=bool)
    for quality in Quality:
        known |= labels == quality.value
    return known


def _known_quality(values: np.ndarray, strings: np.ndarray, column: int, numbers: np.ndarray, bad: list):
    """Drop (and report) the rows whose quality is no NAMUR NE 107 category: a garbled cell
    must not stop the other rows from being used."""
    known = _known(strings[:, column])
    for number, label in zip(numbers[~known].tolist(), strings[~known, column].tolist()):
        bad.append((int(number), f"quality {label[:40]!r} is not one of {', '.join(q.value for q in Quality)}"))
    return (values, strings) if known.all() else (values[known], strings[known])


def _read_csv(header: str, rows: list[str], numbers: np.ndarray, bad: list, options: dict, path: Path) -> dict:
    layout = csv_layout(header, options, path)
    rows, numbers = _drop_overfull(rows, numbers, layout, bad)
    first = _first_field(rows, layout.time_at, layout.delimiter)
    iso = first is not None and _looks_iso(first)
    wanted = {"pressure": layout.pressure_at, "temperature": layout.temperature_at} | ({} if iso else {"time": layout.time_at})
    text_cols = {"time": layout.time_at} if iso else {}
    values, strings, good = _parse_rows(rows, numbers, layout.names, wanted, text_cols, layout.delimiter, bad)
    p = values[:, 0] * layout.pressure.scale + layout.pressure.offset
    T = values[:, 1] * layout.temperature.scale + layout.temperature.offset
    if iso:
        t_wall, ok = _iso_seconds(strings[:, 0])
        for n in numbers[good][~ok]:
            bad.append((int(n), f"time {layout.names[layout.time_at]!r} is not ISO 8601"))
        t_wall, p, T = t_wall[ok], p[ok], T[ok]
        t_s = t_wall - t_wall[0] if len(t_wall) else t_wall
    else:
        t_s = values[:, 2] * layout.seconds_per_time_unit(path)
        t_wall = np.full(len(t_s), math.nan)
    return {"t_s": t_s, "t_wall": t_wall, "pressure_Pa": p, "temperature_K": T}


def _drop_overfull(rows: list[str], numbers: np.ndarray, layout: CsvLayout, bad: list) -> tuple[list[str], np.ndarray]:
    """Leave out, and report, rows with more fields than the header: two lines run together by a
    lost line end would otherwise give a value glued from both ('20' and '2,51' -> 202)."""
    width = len(layout.names)
    delimiters = np.fromiter(map(str.count, rows, repeat(layout.delimiter)), dtype=np.int64, count=len(rows))
    overfull = []
    for i in np.flatnonzero(delimiters >= width).tolist():  # only rows with a delimiter too many
        fields = next(csv.reader([rows[i]], delimiter=layout.delimiter), [])
        if any(cell.strip() for cell in fields[width:]):  # a trailing empty field is no harm
            overfull.append(i)
            bad.append((int(numbers[i]), f"{len(fields)} fields where the header has {width} (two lines run together?)"))
    if not overfull:
        return rows, numbers
    keep = np.ones(len(rows), dtype=bool)
    keep[overfull] = False
    return _pick(rows, np.flatnonzero(keep)), numbers[keep]


def _first_field(rows: list[str], index: int, delimiter: str) -> str | None:
    for row in rows[:10]:
        fields = next(csv.reader([row], delimiter=delimiter), [])
        if len(fields) > index and fields[index].strip():
            return fields[index].strip()
    return None


def _looks_iso(text: str) -> bool:
    return bool(re.match(r"^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}", text))


def _iso_seconds(values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """ISO 8601 texts -> seconds since the epoch, and which ones could be read.

    numpy reads a whole block at once; a block holding an unreadable time is halved until the
    bad ones stand alone, so a few garbled times cost a few more block reads, not a Python loop.
    """
    stripped = np.char.rstrip(np.char.strip(values), "Z")
    seconds = np.full(len(values), math.nan)

    def convert(a: int, b: int) -> None:
        try:
            with warnings.catch_warnings():  # numpy converts +hh:mm offsets to UTC, with a warning
                warnings.simplefilter("ignore")
                stamps = stripped[a:b].astype("datetime64[us]")
            seconds[a:b] = np.where(np.isnat(stamps), math.nan, stamps.astype(np.int64) * 1e-6)  # '' reads as NaT
        except ValueError:
            if b - a > 1:
                convert(a, (a + b) // 2)
                convert((a + b) // 2, b)

    if len(values):
        convert(0, len(values))
    return seconds, ~np.isnan(seconds)


def _parse_rows(rows, numbers, names, numeric: dict, text: dict, delimiter: str, bad: list):
    """Float columns `numeric` and string columns `text` of every readable row.

    Returns (floats [n_good, k], strings [n_good, m], good mask over `rows`); bad rows are
    appended to `bad` as (line number, reason).
    """
    good = np.ones(len(rows), dtype=bool)
    floats = _columns(rows, list(numeric.values()), float, delimiter, good, numbers, names, bad)
    if text:
        kept = np.flatnonzero(good)
        subset = _pick(rows, kept)
        ok = np.ones(len(subset), dtype=bool)
        strings = _columns(subset, list(text.values()), str, delimiter, ok, numbers[kept], names, bad)
        if not ok.all():
            good[kept[~ok]] = False
            floats = floats[ok]
    else:
        strings = np.empty((len(floats), 0), dtype=str)
    return floats, strings, good


def _columns(rows, usecols, dtype, delimiter, good, numbers, names, bad) -> np.ndarray:
    """Parse `rows` block by block, halving failed blocks; clears `good` for the bad rows."""
    pieces: list[np.ndarray] = []

    def load(a: int, b: int) -> None:
        try:
            with warnings.catch_warnings():  # a block of blank lines "contains no data"
                warnings.simplefilter("ignore", UserWarning)
                block = np.loadtxt(rows[a:b], delimiter=delimiter, quotechar='"', usecols=usecols, dtype=dtype,
                                   ndmin=2, comments=None)
            if len(block) == b - a:
                pieces.append(block)
                return
        except ValueError:
            pass
        if b - a == 1:
            good[a] = False
            if rows[a].strip():  # a blank line is no row, not a bad one
                bad.append((int(numbers[a]), _explain(rows[a], usecols, names, delimiter, dtype)))
            return
        middle = (a + b) // 2
        load(a, middle)
        load(middle, b)

    for start in range(0, len(rows), BLOCK):
        load(start, min(start + BLOCK, len(rows)))
    width = len(usecols)
    if not pieces:
        return np.empty((0, width), dtype=float if dtype is float else str)
    return np.concatenate(pieces) if len(pieces) > 1 else pieces[0]


def _explain(row: str, usecols, names, delimiter, dtype) -> str:
    """Why one row could not be read, for people."""
    try:
        fields = next(csv.reader([row], delimiter=delimiter, strict=True), [])
    except csv.Error as exc:
        return f"unreadable row: {exc}"
    if len(fields) < len(names):
        return f"truncated or garbled: {len(fields)} of {len(names)} fields"
    if dtype is float:
        for i in usecols:
            try:
                float(fields[i])
            except ValueError:
                shown = fields[i] if len(fields[i]) <= 40 else fields[i][:40] + "..."
                return f"{names[i].strip()} {shown!r} is not a number"
    return f"garbled row ({len(fields)} fields)"
