"""A dot raster for terminal plots: every cell holds 2×4 dots, drawn as one Unicode braille character.

Pure numpy, no Textual: the diagram widget turns the cells into styled lines. Each dot
carries an *ink* (a small integer, 0 = blank); where inks meet in a cell the highest wins,
so the current point draws over the trail, the trail over the curves, the curves over the bands.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: bit of each dot inside a cell, indexed [row 0..3][column 0..1] (Unicode braille patterns, U+2800)
_DOT_BITS = np.array([[0x01, 0x08], [0x02, 0x10], [0x04, 0x20], [0x40, 0x80]], dtype=np.uint16)
#: the character of every 8-bit dot pattern; the empty pattern is a plain space
_GLYPHS = np.array([" "] + [chr(0x2800 + bits) for bits in range(1, 256)])


@dataclass(frozen=True, slots=True)
class Axes:
    """Maps data coordinates onto the dot grid; the data are already on the scale to be drawn
    (the caller passes log10(p) for a logarithmic pressure axis)."""

    x_min: float
    x_max: float
    y_min: float
    y_max: float

    def to_dots(self, x, y, columns: int, rows: int) -> tuple[np.ndarray, np.ndarray]:
        """Dot column and row [float] of data points; rows grow downwards."""
        x = np.asarray(x, dtype=float)
        y = np.asarray(y, dtype=float)
        col = (x - self.x_min) / (self.x_max - self.x_min) * (columns - 1)
        row = (self.y_max - y) / (self.y_max - self.y_min) * (rows - 1)
        return col, row

    def to_cell(self, x: float, y: float, width: int, height: int) -> tuple[int, int]:
        """The cell (column, row) holding one data point."""
        col, row = self.to_dots(x, y, width * 2, height * 4)
        return int(np.floor(col / 2)), int(np.floor(row / 4))


class BrailleCanvas:
    """A width × height grid of cells, i.e. (2·width) × (4·height) dots."""

    def __init__(self, width: int, height: int) -> None:
        self.width = max(int(width), 1)
        self.height = max(int(height), 1)
        self.ink = np.zeros((self.height * 4, self.width * 2), dtype=np.uint8)

    @property
    def dot_columns(self) -> int:
        return self.width * 2

    @property
    def dot_rows(self) -> int:
        return self.height * 4

    def points(self, col, row, ink: int) -> None:
        """Set the dots nearest to (col, row) [dots, float arrays]; points off the grid or NaN are dropped."""
        col = np.rint(np.asarray(col, dtype=float))
        row = np.rint(np.asarray(row, dtype=float))
        keep = np.isfinite(col) & np.isfinite(row)
        keep &= (col >= 0) & (col < self.dot_columns) & (row >= 0) & (row < self.dot_rows)
        r = row[keep].astype(np.intp)
        c = col[keep].astype(np.intp)
        np.maximum.at(self.ink, (r, c), np.uint8(ink))

    def polyline(self, col, row, ink: int, *, every: int = 1) -> None:
        """Join consecutive points with straight runs of dots; a NaN breaks the line.
        `every` > 1 keeps one dot in `every`, for dotted lines."""
        col = np.asarray(col, dtype=float)
        row = np.asarray(row, dtype=float)
        if col.size < 2:
            self.points(col, row, ink)
            return
        dc, dr = np.diff(col), np.diff(row)
        span = np.fmax(np.abs(dc), np.abs(dr))
        # Segments wholly off the grid or broken by NaN draw nothing; cap the rest so one
        # absurd segment cannot allocate millions of dots.
        limit = 4 * (self.dot_columns + self.dot_rows)
        steps = np.where(np.isfinite(span), np.clip(np.ceil(span), 1, limit), 0).astype(np.intp)
        starts = np.repeat(np.arange(dc.size), steps)
        offsets = np.arange(starts.size) - np.repeat(np.cumsum(steps) - steps, steps)
        fraction = offsets / np.repeat(steps, steps)
        cols = col[:-1][starts] + dc[starts] * fraction
        rows = row[:-1][starts] + dr[starts] * fraction
        if every > 1:
            self.points(cols[::every], rows[::every], ink)
        else:  # the runs stop short of each segment's end: add the vertices
            self.points(np.concatenate([cols, col]), np.concatenate([rows, row]), ink)

    def hline(self, row: float, ink: int, *, every: int = 1) -> None:
        """A horizontal line across the whole grid at dot row `row`."""
        cols = np.arange(0, self.dot_columns, every, dtype=float)
        self.points(cols, np.full(cols.size, row), ink)

    def cells(self) -> tuple[np.ndarray, np.ndarray]:
        """The characters [str, height × width] and the winning ink of each cell [uint8]."""
        blocks = self.ink.reshape(self.height, 4, self.width, 2)
        lit = blocks > 0
        bits = np.einsum("hrwc,rc->hw", lit.astype(np.uint16), _DOT_BITS)
        return _GLYPHS[bits], blocks.max(axis=(1, 3))
