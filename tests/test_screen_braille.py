"""The braille raster and the diagram composer, without Textual."""

import math

import numpy as np

from tui.screen.braille import Axes, BrailleCanvas
from tui.screen.plot import linear_ticks, log_ticks


def test_each_dot_lights_its_own_braille_bit():
    # Unicode braille patterns: dots 1-2-3-7 down the left column, 4-5-6-8 down the right (U+2800 block)
    expected = {(0, 0): 0x01, (1, 0): 0x02, (2, 0): 0x04, (3, 0): 0x40,
                (0, 1): 0x08, (1, 1): 0x10, (2, 1): 0x20, (3, 1): 0x80}
    for (row, col), bit in expected.items():
        canvas = BrailleCanvas(1, 1)
        canvas.points([col], [row], ink=1)
        chars, inks = canvas.cells()
        assert chars[0, 0] == chr(0x2800 + bit)
        assert inks[0, 0] == 1


def test_blank_cells_are_spaces_and_off_grid_points_are_dropped():
    canvas = BrailleCanvas(3, 2)
    canvas.points([-1, 6, np.nan, 2], [0, 0, 1, 9], ink=1)
    chars, inks = canvas.cells()
    assert (chars == " ").all()
    assert (inks == 0).all()


def test_higher_ink_wins_a_shared_cell():
    canvas = BrailleCanvas(1, 1)
    canvas.points([0], [0], ink=2)
    canvas.points([1], [3], ink=5)
    canvas.points([0], [1], ink=3)
    chars, inks = canvas.cells()
    assert inks[0, 0] == 5
    assert chars[0, 0] == chr(0x2800 + 0x01 + 0x80 + 0x02)


def test_polyline_joins_points_without_gaps():
    canvas = BrailleCanvas(10, 1)
    canvas.polyline([0, 19], [0, 0], ink=1)
    assert canvas.ink[0].all()
    assert not canvas.ink[1:].any()


def test_polyline_breaks_at_nan_and_dots_every_third():
    canvas = BrailleCanvas(10, 2)
    canvas.polyline([0, 19, np.nan, 0, 19], [0, 0, np.nan, 7, 7], ink=1, every=3)
    lit = np.flatnonzero(canvas.ink[0])
    assert list(lit) == [0, 3, 6, 9, 12, 15, 18]
    assert not canvas.ink[1:7].any()


def test_axes_map_corners_to_corner_dots():
    axes = Axes(0.0, 10.0, 1.0, 3.0)
    col, row = axes.to_dots([0.0, 10.0], [3.0, 1.0], columns=20, rows=8)
    assert list(col) == [0.0, 19.0] and list(row) == [0.0, 7.0]
    assert axes.to_cell(10.0, 1.0, width=10, height=2) == (9, 1)


def test_log_ticks_prefer_decades_then_finer_steps():
    assert log_ticks(0.05, 2000.0, most=10) == [0.1, 1.0, 10.0, 100.0, 1000.0]
    assert log_ticks(25.0, 100.0, most=10) == [50.0, 100.0]
    assert log_ticks(31.0, 45.0, most=10) == [40.0]
    assert len(log_ticks(1e-3, 1e6, most=3)) <= 3


def test_linear_ticks_are_round_and_inside():
    ticks = linear_ticks(-123.0, 87.0, most=5)
    assert ticks == [-100.0, -50.0, 0.0, 50.0]
    assert all(-123 <= t <= 87 for t in ticks)
    assert linear_ticks(5.0, 5.0, most=3) == []
    assert math.isclose(linear_ticks(0.0, 1.0, most=4)[1], 0.5)
