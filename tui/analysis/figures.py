"""Figures of one run: the trajectory on the p–T diagram and the margins over time.

matplotlib comes with the optional extra `figures` and is imported only when a figure is
asked for. Figures are built on `matplotlib.figure.Figure` (no pyplot, no global state), so
tests can read back what was drawn. Long runs are thinned before drawing, keeping each
bucket's lowest and highest values so no excursion toward a boundary disappears.
"""

from __future__ import annotations

import importlib
import io
from pathlib import Path

import numpy as np

from tui.analysis.display import Units, margin_name
from tui.analysis.run import AnalysedRun
from tui.errors import RuntimeFailure
from tui.monitor.model import MARGINS
from tui.screen.curves import fluid_curves

#: points drawn per series at most (about twice the pixels across a figure)
MAX_POINTS = 4000
#: figure formats written by `save`
FORMATS = ("png", "svg")
#: shading of alarm periods, one colour per condition (the same in every panel)
ALARM_COLOURS = ("tab:red", "tab:orange", "tab:purple", "tab:brown", "tab:pink")

#: margin -> axis title
MARGIN_TITLES = {
    "dT_saturation_K": "distance to saturation, T − T_sat(p)",
    "dp_saturation_Pa": "distance to saturation, p − p_sat(T)",
    "dT_solid_K": "cooling left before solid, T − T_solid(p)",
    "critical_distance": "distance to the critical point",
}


MISSING_EXTRA = "figures need matplotlib: install the optional extra 'figures' (pip install 'rigside[figures]')"


def figures_available() -> bool:
    """Whether matplotlib can be imported."""
    try:
        importlib.import_module("matplotlib")
    except ModuleNotFoundError:
        return False
    return True


def matplotlib_figure_class():
    """`matplotlib.figure.Figure`, or a one-line error naming the extra to install."""
    try:
        return importlib.import_module("matplotlib.figure").Figure
    except ModuleNotFoundError as exc:
        raise RuntimeFailure(MISSING_EXTRA) from exc


def thin(series: list[np.ndarray], max_points: int = MAX_POINTS) -> np.ndarray:
    """Indices of at most about max_points samples that keep, per bucket, the lowest and
    highest value of every series (NaN ignored), plus the first and last sample."""
    n = series[0].size
    if n <= max_points:
        return np.arange(n)
    buckets = max(1, max_points // (2 * len(series)))
    size = -(-n // buckets)
    padded = buckets * size
    keep = [np.array([0, n - 1])]
    offsets = np.arange(buckets) * size
    for values in series:
        low = np.full(padded, np.inf)
        high = np.full(padded, -np.inf)
        finite = np.isfinite(values)
        low[:n] = np.where(finite, values, np.inf)
        high[:n] = np.where(finite, values, -np.inf)
        keep += [offsets + low.reshape(buckets, size).argmin(axis=1), offsets + high.reshape(buckets, size).argmax(axis=1)]
    return np.unique(np.clip(np.concatenate(keep), 0, n - 1))


def trajectory_figure(run: AnalysedRun, fluid, units: Units):
    """The run on the p–T diagram (log p) with the phase boundaries and the special points,
    each sample coloured by its time."""
    Figure = matplotlib_figure_class()
    curves = fluid_curves(fluid)
    figure = Figure(figsize=(7.5, 5.5), layout="constrained")
    axes = figure.add_subplot()
    p, T = units.pressure.from_si, units.temperature.from_si
    for name, curve in (("saturation", curves.saturation), ("melting", curves.melting), ("sublimation", curves.sublimation)):
        axes.plot(T(curve.T), p(curve.p), label=f"{name} curve", linewidth=1.2)
    axes.plot(T(curves.T_critical), p(curves.p_critical), "o", label="critical point")
    axes.plot(T(curves.T_triple), p(curves.p_triple), "^", label="triple point")
    shown = thin([run.pressure_Pa, run.temperature_K])
    points = axes.scatter(T(run.temperature_K[shown]), p(run.pressure_Pa[shown]), c=run.t_s[shown], s=6, label="run")
    figure.colorbar(points, ax=axes, label="time [s]")
    axes.set_yscale("log")
    axes.set_xlabel(f"temperature [{units.temperature.label}]")
    axes.set_ylabel(f"pressure [{units.pressure.label}]")
    axes.set_title(f"{Path(run.source).name}: {fluid.name} on the p–T diagram")
    _frame_run(axes, run, units, curves)
    axes.legend(loc="best", fontsize="small")
    return figure


def _frame_run(axes, run: AnalysedRun, units: Units, curves) -> None:
    """Limits that show the whole run and the triple and critical points."""
    T = np.concatenate([run.temperature_K[np.isfinite(run.temperature_K)], [curves.T_triple, curves.T_critical]])
    p = np.concatenate([run.pressure_Pa[np.isfinite(run.pressure_Pa) & (run.pressure_Pa > 0)], [curves.p_triple, curves.p_critical]])
    span = T.max() - T.min()
    axes.set_xlim(units.temperature.from_si(T.min() - 0.05 * span), units.temperature.from_si(T.max() + 0.05 * span))
    axes.set_ylim(units.pressure.from_si(p.min() / 2.0), units.pressure.from_si(p.max() * 2.0))


def margins_figure(
    run: AnalysedRun,
    units: Units,
    *,
    limits: dict[str, list[float]] | None = None,
    alarms: dict[str, dict[str, list[tuple[float, float]]]] | None = None,
):
    """One panel per margin over time, with its limit lines and its alarm periods shaded.

    limits: margin -> limit values [SI] to draw; alarms: margin -> condition -> (start, end)
    times [s] its alarm was active.
    """
    Figure = matplotlib_figure_class()
    shown_margins = [name for name in MARGINS if name in run.margins]
    conditions = sorted({condition for periods in (alarms or {}).values() for condition in periods})
    colours = {c: ALARM_COLOURS[i % len(ALARM_COLOURS)] for i, c in enumerate(conditions)}
    figure = Figure(figsize=(8.0, 2.0 + 1.8 * len(shown_margins)), layout="constrained")
    panels = figure.subplots(len(shown_margins), 1, sharex=True, squeeze=False)[:, 0]
    for axes, name in zip(panels, shown_margins):
        scale, unit = units.margin(name)
        shown = thin([run.margins[name]])
        axes.plot(run.t_s[shown], scale(run.margins[name][shown]), linewidth=1.0, label=margin_name(name))
        axes.axhline(0.0, linewidth=0.8, color="black", label="boundary")
        drawn = [float(scale(limit)) for limit in (limits or {}).get(name, ())]
        for i, limit in enumerate(drawn):
            label = f"limit {', '.join(f'{v:g}' for v in drawn)} {unit}".strip() if i == 0 else None
            axes.axhline(limit, linestyle="--", linewidth=0.9, color="0.35", label=label)
        for condition, periods in (alarms or {}).get(name, {}).items():
            for i, (start, end) in enumerate(periods):
                axes.axvspan(start, end, alpha=0.25, color=colours[condition], label=f"alarm: {condition}" if i == 0 else None)
        axes.set_title(MARGIN_TITLES[name], fontsize="medium", loc="left")
        axes.set_ylabel(units.margin_label(name))
        axes.legend(loc="best", fontsize="x-small")
    panels[-1].set_xlabel("time [s]")
    figure.suptitle(f"{Path(run.source).name}: margins over time")
    return figure


def save(figure, stem: Path) -> list[Path]:
    """Write the figure as stem.png and stem.svg; returns the paths."""
    paths = [stem.with_name(f"{stem.name}.{fmt}") for fmt in FORMATS]
    for path in paths:
        figure.savefig(path, dpi=150)
    return paths


def svg_text(figure) -> str:
    """The figure as an SVG document, for embedding in an HTML page."""
    buffer = io.StringIO()
    figure.savefig(buffer, format="svg")
    return buffer.getvalue()


def png_bytes(figure) -> bytes:
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=120)
    return buffer.getvalue()
