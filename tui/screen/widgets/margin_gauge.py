"""One margin as a line: what it is, how much is left, a bar against its alarm limit, the trend,
and the predicted time to the boundary."""

from __future__ import annotations

import math

from textual.content import Content

from thermo.units import format_number
from tui.screen.display import duration, trend
from tui.screen.widgets.text_panel import TextPanel

#: the bar's full scale is this many alarm limits, so the limit mark sits at a quarter of it
FULL_SCALE_LIMITS = 4.0
#: full scale when no limit is configured, in the margin's SI unit
DEFAULT_FULL_SCALE = {"dT_saturation_K": 20.0, "dp_saturation_Pa": 10e5, "dT_solid_K": 20.0, "critical_distance": 0.5}
LABEL_WIDTH = 11
VALUE_WIDTH = 10
#: cells kept for the trend and the time to the boundary, so the bars do not jump
TAIL_WIDTH = 9
_EIGHTHS = " ▏▎▍▌▋▊▉"
ABNORMAL = "bold reverse"


def margin_label(name: str, value: float) -> str:
    """The margin's name as an operator says it; the sign picks the word."""
    if name == "dT_saturation_K":
        return "sat. margin" if math.isnan(value) else ("superheat" if value >= 0 else "subcooling")
    if name == "dp_saturation_Pa":
        return "p to curve" if math.isnan(value) else ("p over sat." if value >= 0 else "p under sat")
    if name == "dT_solid_K":
        return "to solid" if math.isnan(value) or value >= 0 else "in solid"
    return "to critical"


def margin_value(name: str, value: float, T_unit, p_unit) -> str:
    """The margin's size (its sign is in the label) in the chosen units."""
    if math.isnan(value):
        return "n/a"
    if name == "dp_saturation_Pa":
        return f"{format_number(float(p_unit.difference_from_si(abs(value))), 3)} {p_unit.symbol}"
    if name == "critical_distance":
        return format_number(value, 3)
    return f"{format_number(float(T_unit.difference_from_si(abs(value))), 3)} {T_unit.difference_label}"


def rate_text(name: str, rate: float, T_unit, p_unit) -> str:
    """A margin's rate of change per minute in the chosen units, signed."""
    if not math.isfinite(rate):
        return "rate unknown until the trend window fills"
    per_minute = rate * 60.0
    if name == "dp_saturation_Pa":
        return f"{format_number(float(p_unit.difference_from_si(per_minute)), 3)} {p_unit.symbol}/min"
    if name == "critical_distance":
        return f"{format_number(per_minute, 3)} /min"
    return f"{format_number(float(T_unit.difference_from_si(per_minute)), 3)} {T_unit.difference_label}/min"


def bar(fraction: float, limit_fraction: float, width: int) -> str:
    """A bar `width` cells long filled to `fraction` (eighths of a cell), a '┊' at the limit."""
    if width <= 0:
        return ""
    filled = max(0.0, min(fraction, 1.0)) * width
    whole = int(filled)
    cells = ["█"] * whole
    eighths = int((filled - whole) * 8)
    if whole < width and eighths:
        cells.append(_EIGHTHS[eighths])
    cells += ["·"] * (width - len(cells))
    mark = int(limit_fraction * width)
    if 0 <= mark < width and cells[mark] in " ·":
        cells[mark] = "┊"
    return "".join(cells)


class MarginGauge(TextPanel):
    """Shows one entry of `Reading.margins`; within its limit the line is marked in words and reverse video."""

    DEFAULT_CSS = """
    MarginGauge { height: 1; }
    """

    def __init__(self, margin: str, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self.margin = margin

    def show(self, value: float, rate: float, time_left: float, limit: float, T_unit, p_unit) -> None:
        name = self.margin
        distance = abs(value)
        full_scale = FULL_SCALE_LIMITS * limit if limit > 0 else DEFAULT_FULL_SCALE[name]
        beyond = limit > 0 and distance <= limit
        self.set_class(beyond, "-beyond")
        label = margin_label(name, value).ljust(LABEL_WIDTH) + " "
        number = margin_value(name, value, T_unit, p_unit).rjust(VALUE_WIDTH)
        direction = trend(rate, value)
        closing = "closing" in direction
        tail = (f" {direction[0]} {duration(time_left)}" if closing else f" {direction}").ljust(TAIL_WIDTH)
        width = self.content_region.width or 40
        bar_width = max(width - len(label) - len(number) - len(tail) - 3, 3)
        fraction = distance / full_scale if math.isfinite(distance) else 0.0
        limit_fraction = limit / full_scale if limit > 0 else -1.0
        line = Content.assemble(
            ("! " if beyond else "  ", ABNORMAL if beyond else ""),
            (label, ""),
            (number, "bold"),
            " ",
            (bar(fraction, limit_fraction, bar_width), "bold" if beyond else "dim"),
            (tail, ABNORMAL if beyond and closing else ""),
        )
        if self.content_region.height >= 2:
            detail = f"{' ' * (3 + LABEL_WIDTH)}{rate_text(name, rate, T_unit, p_unit)}"
            if closing:
                detail += f", at the boundary in {duration(time_left)}"
            line = Content.assemble(line, "\n", (detail, "dim"))
        self.put(line)
