"""Composes the phase diagram as rows of (text, role) runs: braille curves, markers, region names, axes.

No Textual here: the widget maps each role to a style from the stylesheet. Pressure is on a
log axis in both views; the p–T view puts temperature across, the p–v view specific volume
(also log). Markers are distinct glyphs and region names are words, so nothing depends on colour.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from tui.screen.braille import Axes, BrailleCanvas
from tui.screen.curves import FluidCurves, Isotherm

# Inks in drawing priority (higher wins a shared cell) and the role each is styled by.
BAND, ISOTHERM, SOLID, SATURATION, TRAIL_OLD, TRAIL_MID, TRAIL_NEW = range(1, 8)
INK_ROLES = {
    0: "blank",
    BAND: "band",
    ISOTHERM: "isotherm",
    SOLID: "solid",
    SATURATION: "saturation",
    TRAIL_OLD: "trail-old",
    TRAIL_MID: "trail-mid",
    TRAIL_NEW: "trail-new",
}

#: every role a run can take: the inks' (by ink number), then the overlays' and the axes'
ROLES = (*INK_ROLES.values(), "region", "point", "now", "now-alarm", "axis")
_ROLE_INDEX = {role: index for index, role in enumerate(ROLES)}

NOW_GLYPH = "●"
CRITICAL_GLYPH = "◆"
TRIPLE_GLYPH = "▲"
#: view -> what its symbols mean (only the symbols that view draws)
LEGENDS = {
    "pT": f"{NOW_GLYPH} now  {CRITICAL_GLYPH} critical  {TRIPLE_GLYPH} triple  ⠒ curve  ⠁ band",
    "pv": f"{NOW_GLYPH} now  {CRITICAL_GLYPH} critical  ⠒ dome and isotherm",
}

#: columns kept left of the plot for pressure labels
GUTTER = 7
#: the neighbourhood view spans this many kelvin either side of the live temperature ...
NEAR_HALF_SPAN_K = 12.0
#: ... and this factor either side of the live pressure (and of the live specific volume)
NEAR_FACTOR = 2.0

Row = list[tuple[str, str]]


@dataclass(frozen=True, slots=True)
class DiagramState:
    """What the diagram shows besides the fluid's curves."""

    view: str = "pT"
    """"pT" or "pv"."""
    zoom: str = "whole"
    """"whole" or "near"."""
    T: float = math.nan
    p: float = math.nan
    v: float = math.nan
    """Live specific volume [m³/kg] (p–v view)."""
    trail_T: np.ndarray = field(default_factory=lambda: np.empty(0))
    trail_p: np.ndarray = field(default_factory=lambda: np.empty(0))
    isotherm: Isotherm | None = None
    limits: Mapping[str, float] = field(default_factory=dict)
    """Alarm limits by margin name (dT_saturation_K, dT_solid_K, critical_distance) for the bands."""
    alarm: bool = False
    """An alarm is active: the live marker takes the alarm role."""


def _has_now(state: DiagramState) -> bool:
    return math.isfinite(state.T) and math.isfinite(state.p) and state.p > 0


def pt_axes(curves: FluidCurves, state: DiagramState) -> Axes:
    """Data span of the p–T view: x = T [K], y = log10 p [Pa]."""
    if state.zoom == "near" and _has_now(state):
        half = math.log10(NEAR_FACTOR)
        y = math.log10(state.p)
        return Axes(state.T - NEAR_HALF_SPAN_K, state.T + NEAR_HALF_SPAN_K, y - half, y + half)
    T_low, T_high = curves.T_range
    p_low, p_high = curves.p_range
    if _has_now(state):
        T_low, T_high = min(T_low, state.T - 5), max(T_high, state.T + 5)
        p_low, p_high = min(p_low, state.p / 2), max(p_high, state.p * 2)
    return Axes(T_low, T_high, math.log10(p_low), math.log10(p_high))


def pv_axes(curves: FluidCurves, state: DiagramState) -> Axes:
    """Data span of the p–v view: x = log10 v [m³/kg], y = log10 p [Pa]."""
    half = math.log10(NEAR_FACTOR)
    if state.zoom == "near" and _has_now(state) and math.isfinite(state.v) and state.v > 0:
        x, y = math.log10(state.v), math.log10(state.p)
        return Axes(x - 2 * half, x + 2 * half, y - half, y + half)
    v_low = np.nanmin(curves.dome_v_liquid) / 1.5
    v_high = np.nanmax(curves.dome_v_vapor[np.isfinite(curves.dome_v_vapor)]) * 1.5
    p_low, p_high = curves.p_triple / 3, curves.p_critical * 3
    if _has_now(state) and math.isfinite(state.v) and state.v > 0:
        v_low, v_high = min(v_low, state.v / 2), max(v_high, state.v * 2)
        p_low, p_high = min(p_low, state.p / 2), max(p_high, state.p * 2)
    return Axes(math.log10(v_low), math.log10(v_high), math.log10(p_low), math.log10(p_high))


def _log10(values) -> np.ndarray:
    with np.errstate(all="ignore"):
        return np.log10(np.asarray(values, dtype=float))


class _Picture:
    """The plot area's cells plus text overlays, then axes around it."""

    def __init__(self, axes: Axes, width: int, height: int) -> None:
        self.axes = axes
        self.canvas = BrailleCanvas(width, height)
        self.overlay: dict[tuple[int, int], tuple[str, str]] = {}

    def line(self, x, y, ink: int, every: int = 1) -> None:
        col, row = self.axes.to_dots(x, y, self.canvas.dot_columns, self.canvas.dot_rows)
        self.canvas.polyline(col, row, ink, every=every)

    def dots(self, x, y, ink: int) -> None:
        col, row = self.axes.to_dots(x, y, self.canvas.dot_columns, self.canvas.dot_rows)
        self.canvas.points(col, row, ink)

    def cell(self, x: float, y: float) -> tuple[int, int] | None:
        if not (math.isfinite(x) and math.isfinite(y)):
            return None
        col, row = self.axes.to_cell(x, y, self.canvas.width, self.canvas.height)
        if 0 <= col < self.canvas.width and 0 <= row < self.canvas.height:
            return col, row
        return None

    def mark(self, x: float, y: float, glyph: str, role: str) -> None:
        where = self.cell(x, y)
        if where is not None:
            self.overlay[where] = (glyph, role)

    def word(self, x: float, y: float, text: str, ink_free: np.ndarray) -> None:
        """A region name centred on (x, y), only where it hides nothing."""
        where = self.cell(x, y)
        if where is None:
            return
        col, row = where[0] - len(text) // 2, where[1]
        if col < 0 or col + len(text) > self.canvas.width:
            return
        span = range(col, col + len(text))
        if all(ink_free[row, c] and (c, row) not in self.overlay for c in span):
            for offset, char in enumerate(text):
                self.overlay[(col + offset, row)] = (char, "region")

    def rows(self) -> list[Row]:
        """Each row as runs of one role: the cells are joined and cut by numpy, not one by one."""
        chars, inks = self.canvas.cells()
        roles = inks.astype(np.intp)
        for (c, r), (glyph, role) in self.overlay.items():
            chars[r, c], roles[r, c] = glyph, _ROLE_INDEX[role]
        rows: list[Row] = []
        for row_chars, row_roles in zip(chars, roles):
            text = "".join(row_chars.tolist())
            cuts = [0, *(np.flatnonzero(row_roles[1:] != row_roles[:-1]) + 1).tolist(), len(text)]
            rows.append([(text[a:b], ROLES[row_roles[a]]) for a, b in zip(cuts, cuts[1:])])
        return rows


def _trail(picture: _Picture, x: np.ndarray, y: np.ndarray) -> None:
    """Recent samples, oldest faintest: three inks over the thirds of the trail."""
    if x.size == 0:
        return
    thirds = np.array_split(np.arange(x.size), 3)
    for ink, index in zip((TRAIL_OLD, TRAIL_MID, TRAIL_NEW), thirds):
        picture.dots(x[index], y[index], ink)


def _pt_content(picture: _Picture, curves: FluidCurves, state: DiagramState) -> None:
    Tc, pc = curves.T_critical, curves.p_critical
    sat, sub, melt = curves.saturation, curves.sublimation, curves.melting
    band = state.limits.get("dT_saturation_K", math.nan)
    if math.isfinite(band) and band > 0:
        for shift in (-band, band):
            picture.line(sat.T + shift, _log10(sat.p), BAND, every=3)
    solid_band = state.limits.get("dT_solid_K", math.nan)
    if math.isfinite(solid_band) and solid_band > 0:
        for curve in (sub, melt):
            picture.line(curve.T + solid_band, _log10(curve.p), BAND, every=3)
    radius = state.limits.get("critical_distance", math.nan)
    if math.isfinite(radius) and radius > 0:
        angle = np.linspace(0, 2 * np.pi, 200)
        ring_p = pc * (1 + radius * np.sin(angle))
        picture.line(Tc * (1 + radius * np.cos(angle)), _log10(np.where(ring_p > 0, ring_p, np.nan)), BAND, every=3)
    picture.line(sub.T, _log10(sub.p), SOLID)
    picture.line(melt.T, _log10(melt.p), SOLID)
    picture.line(sat.T, _log10(sat.p), SATURATION)
    _trail(picture, np.asarray(state.trail_T, float), _log10(state.trail_p))
    log_pc, log_pt = math.log10(pc), math.log10(curves.p_triple)
    picture.mark(Tc, log_pc, CRITICAL_GLYPH, "point")
    picture.mark(curves.T_triple, log_pt, TRIPLE_GLYPH, "point")
    free = picture.canvas.cells()[1] == 0
    picture.word((curves.T_triple + Tc) / 2, (log_pt + 2 * log_pc) / 3 + 0.35, "liquid", free)
    picture.word((curves.T_triple + Tc) / 2, (log_pt + log_pc) / 2 - 0.6, "vapor", free)
    picture.word(Tc * 1.12, log_pc + 0.6, "supercritical", free)
    picture.word(curves.T_triple * 0.86, log_pt + 0.5, "solid", free)
    if _has_now(state):
        picture.mark(state.T, math.log10(state.p), NOW_GLYPH, "now-alarm" if state.alarm else "now")


def _pv_content(picture: _Picture, curves: FluidCurves, state: DiagramState) -> None:
    log_p = _log10(curves.saturation.p)
    picture.line(_log10(curves.dome_v_liquid), log_p, SATURATION)
    picture.line(_log10(curves.dome_v_vapor), log_p, SATURATION)
    iso = state.isotherm
    if iso is not None:
        picture.line(_log10(iso.v), _log10(iso.p), ISOTHERM)
        if math.isfinite(iso.p_saturation):
            y = math.log10(iso.p_saturation)
            picture.line([math.log10(iso.v_liquid), math.log10(iso.v_vapor)], [y, y], ISOTHERM)
    log_pc = math.log10(curves.p_critical)
    v_c = math.log10(float(np.nanmax(curves.dome_v_liquid)))
    picture.mark(v_c, log_pc, CRITICAL_GLYPH, "point")
    picture.word(v_c, log_pc - 0.5, "two-phase", picture.canvas.cells()[1] == 0)
    if _has_now(state) and math.isfinite(state.v) and state.v > 0:
        picture.mark(math.log10(state.v), math.log10(state.p), NOW_GLYPH, "now-alarm" if state.alarm else "now")


def log_ticks(low: float, high: float, most: int) -> list[float]:
    """Tick values [display unit] for a log axis spanning low..high: decades if at least two
    fall inside, else 1-2-5 steps, else 1..9 steps; thinned to at most `most`."""
    if not (low > 0 and high > low):
        return []
    first, last = math.floor(math.log10(low)), math.ceil(math.log10(high))
    for mantissas in ((1,), (1, 2, 5), tuple(range(1, 10))):
        ticks = [m * 10.0**e for e in range(first, last + 1) for m in mantissas if low <= m * 10.0**e <= high]
        if len(ticks) >= 2:
            break
    step = max(1, math.ceil(len(ticks) / max(most, 1)))
    return ticks[::step]


def linear_ticks(low: float, high: float, most: int) -> list[float]:
    """Round tick values (1, 2 or 5 × 10^k apart) inside low..high, at most `most` of them."""
    if not high > low or most < 1:
        return []
    raw = (high - low) / most
    magnitude = 10.0 ** math.floor(math.log10(raw))
    step = next(m * magnitude for m in (1, 2, 5, 10) if m * magnitude >= raw)
    start = math.ceil(low / step) * step
    return [round(start + i * step, 10) for i in range(int((high - start) // step) + 1)]


def tick_label(value: float) -> str:
    return f"{value:g}"


def _place(text: str, centre: int, row: list[str]) -> None:
    start = max(0, min(centre - len(text) // 2, len(row) - len(text)))
    if all(ch == " " for ch in row[max(start - 1, 0) : start + len(text) + 1]):
        row[start : start + len(text)] = text


def draw(curves: FluidCurves, state: DiagramState, width: int, height: int, T_unit, p_unit) -> list[Row]:
    """The whole diagram, `height` rows of `width` cells: plot, pressure labels left, x labels below.

    `T_unit` and `p_unit` are `thermo.units` units; the pressure axis is always absolute."""
    plot_width, plot_height = max(width - GUTTER, 4), max(height - 1, 2)
    axes = pt_axes(curves, state) if state.view == "pT" else pv_axes(curves, state)
    picture = _Picture(axes, plot_width, plot_height)
    (_pt_content if state.view == "pT" else _pv_content)(picture, curves, state)
    rows = picture.rows()

    gutter = [[" "] * GUTTER for _ in range(plot_height)]
    p_scale = p_unit.factor
    for tick in log_ticks(10**axes.y_min / p_scale, 10**axes.y_max / p_scale, plot_height // 3):
        _, row = axes.to_cell(axes.x_min, math.log10(tick * p_scale), plot_width, plot_height)
        if 0 <= row < plot_height:
            label = tick_label(tick)[: GUTTER - 2].rjust(GUTTER - 2)
            gutter[row] = list(label + " ┤")
    lines = [[("".join(g), "axis")] + r for g, r in zip(gutter, rows)]

    below = [" "] * plot_width
    x_name = f"T {T_unit.label}" if state.view == "pT" else "v m³/kg"
    _place(x_name, plot_width, below)
    if state.view == "pT":
        span = (float(T_unit.from_si(axes.x_min)), float(T_unit.from_si(axes.x_max)))
        for tick in linear_ticks(*span, most=max(plot_width // 9, 1)):
            col, _ = axes.to_cell(float(T_unit.to_si(tick)), axes.y_min, plot_width, plot_height)
            _place(tick_label(tick), col, below)
    else:
        for tick in log_ticks(10**axes.x_min, 10**axes.x_max, max(plot_width // 9, 1)):
            col, _ = axes.to_cell(math.log10(tick), axes.y_min, plot_width, plot_height)
            _place(tick_label(tick), col, below)
    lines.append([(f"{p_unit.symbol}(a)".ljust(GUTTER)[:GUTTER], "axis"), ("".join(below), "axis")])
    return lines[:height]
