"""CSV text from whole columns without a per-row Python loop.

Formatting a million rows with `%` costs seconds; here each chunk of rows becomes one byte
matrix: numbers are written in fixed point by integer digit arithmetic, labels are looked up
from a small table, and the NUL padding between them is squeezed out at the end. Undefined
numbers are written `nan` (as in the run logs); infinities and numbers too large for fixed
point are written in exponent form.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass
from typing import BinaryIO

import numpy as np

#: rows formatted at a time: keeps the digit matrices a few megabytes
CHUNK_ROWS = 65_536

_PAD = 0  # NUL: never part of a field, removed before writing
_DIGIT = ord("0")
_MAX_FIXED = 9.0e17  # below 2**63 with room for rounding
_NAN = b"nan"


@dataclass(frozen=True, slots=True)
class Numbers:
    """A float column written with a fixed number of decimals."""

    values: np.ndarray
    decimals: int


@dataclass(frozen=True, slots=True)
class Labels:
    """A text column given as integer codes into a small list of distinct labels."""

    codes: np.ndarray
    names: list[str]


Column = Numbers | Labels


def write_csv(stream: BinaryIO, header: list[str], columns: list[Column], *, on_chunk=None) -> None:
    """Write the header line and the rows; on_chunk(rows_done) is called after each chunk."""
    stream.write((",".join(header) + "\n").encode())
    rows = columns[0].values.size if isinstance(columns[0], Numbers) else columns[0].codes.size
    tables = [_label_table(c.names) if isinstance(c, Labels) else None for c in columns]
    for start in range(0, rows, CHUNK_ROWS):
        stop = min(start + CHUNK_ROWS, rows)
        fields = [
            _label_field(c.codes[start:stop], table) if table is not None else _number_field(c.values[start:stop], c.decimals)
            for c, table in zip(columns, tables)
        ]
        stream.write(_join_rows(fields))
        if on_chunk is not None:
            on_chunk(stop)


def _join_rows(fields: list[np.ndarray]) -> bytes:
    rows = fields[0].shape[0]
    separators = np.full((rows, 1), ord(","), dtype=np.uint8)
    newline = np.full((rows, 1), ord("\n"), dtype=np.uint8)
    parts = []
    for field in fields:
        parts += [field, separators]
    parts[-1] = newline
    matrix = np.hstack(parts)
    return matrix[matrix != _PAD].tobytes()


def _label_table(names: list[str]) -> np.ndarray:
    """One zero-padded byte row per label, quoted the CSV way where needed."""
    quoted = [_csv_quote(name).encode() for name in names] or [b""]
    table = np.zeros((len(quoted), max(1, max(map(len, quoted)))), dtype=np.uint8)
    for row, text in zip(table, quoted):
        row[: len(text)] = np.frombuffer(text, dtype=np.uint8)
    return table


def _csv_quote(text: str) -> str:
    if not text:
        return ""
    buffer = io.StringIO()
    csv.writer(buffer, lineterminator="").writerow([text])
    return buffer.getvalue()


def _label_field(codes: np.ndarray, table: np.ndarray) -> np.ndarray:
    return table[codes]


def _number_field(values: np.ndarray, decimals: int) -> np.ndarray:
    """Fixed-point digits of each value: [sign][integer digits][.][decimals], NUL-padded."""
    with np.errstate(over="ignore", invalid="ignore"):
        scaled = np.abs(values) * 10.0**decimals
    fixed = np.isfinite(scaled) & (scaled < _MAX_FIXED)
    units = np.where(fixed, np.rint(np.where(fixed, scaled, 0.0)), 0.0).astype(np.int64)
    width = max(decimals + 1, len(str(int(units.max()))) if units.size else 1)
    powers = 10 ** np.arange(width - 1, -1, -1, dtype=np.int64)
    digits = _digits(units, width)
    leading = (units[:, None] < powers) & (np.arange(width) < width - decimals - 1)
    digits[leading | ~fixed[:, None]] = _PAD
    sign = np.where(fixed & (values < 0) & (units > 0), ord("-"), _PAD).astype(np.uint8)[:, None]
    parts = [sign, digits[:, : width - decimals]]
    if decimals:
        point = np.where(fixed, ord("."), _PAD).astype(np.uint8)[:, None]
        parts += [point, digits[:, width - decimals :]]
    field = _with_nan(np.hstack(parts), np.isnan(values))
    return _with_exponent_form(field, values, fixed)


def _digits(units: np.ndarray, width: int) -> np.ndarray:
    """ASCII decimal digits of non-negative integers, `width` columns, most significant first.
    One division by the scalar 10 per column (numpy divides by a scalar far faster than by
    an array of powers of ten)."""
    digits = np.empty((units.size, width), dtype=np.uint8)
    rest = units
    for column in range(width - 1, -1, -1):
        quotient = rest // 10
        digits[:, column] = rest - quotient * 10 + _DIGIT
        rest = quotient
    return digits


def _with_nan(field: np.ndarray, undefined: np.ndarray) -> np.ndarray:
    """Write `nan` where the value is undefined, as the run logs do."""
    if not undefined.any():
        return field
    if field.shape[1] < len(_NAN):
        field = np.hstack([field, np.zeros((field.shape[0], len(_NAN) - field.shape[1]), dtype=np.uint8)])
    field[undefined] = _PAD
    field[undefined, : len(_NAN)] = np.frombuffer(_NAN, dtype=np.uint8)
    return field


def _with_exponent_form(field: np.ndarray, values: np.ndarray, fixed: np.ndarray) -> np.ndarray:
    """Write the few non-fixed, non-NaN values (infinities, huge numbers) as `%.9g`."""
    rare = np.flatnonzero(~fixed & ~np.isnan(values))
    if rare.size == 0:
        return field
    texts = [_exponent_text(values[i]) for i in rare]
    width = max(field.shape[1], max(map(len, texts)))
    wide = np.zeros((field.shape[0], width), dtype=np.uint8)
    wide[:, : field.shape[1]] = field
    for i, text in zip(rare, texts):
        wide[i] = _PAD
        wide[i, : len(text)] = np.frombuffer(text, dtype=np.uint8)
    return wide


def _exponent_text(value: float) -> bytes:
    return (f"{value:.9g}" if np.isfinite(value) else ("inf" if value > 0 else "-inf")).encode()
