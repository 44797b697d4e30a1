"""From a log file to an analysed run: read the table, choose fluid and configuration, and run
the monitor's batch pipeline (the live pipeline over whole arrays) under each configuration.

The fluid is the one given on the command line, else the one the log records (a configuration
file for another fluid is refused), else the configuration file's; a plain CSV with none of
them is refused rather than guessed.
"""

from __future__ import annotations

import argparse
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

import thermo
from tui.acquire.sample import Quality
from tui.analysis.display import Units
from tui.analysis.run import AnalysedRun, BadLine
from tui.analysis.summary import alarm_periods
from tui.errors import UsageError
from tui.monitor.batch import run_batch
from tui.monitor.conditions import MARGIN_KINDS
from tui.monitor.config import MonitorConfig, config_from_tree, load_config, named_fluid
from tui.monitor.model import MARGINS, Event
from tui.record.recorder import run_parts
from tui.record.table import Table, read_table

#: conditions that are not margin limits -> the margins whose panels show their alarms
#: (None: every panel)
CONDITION_PANELS = {"two-phase": ("dT_saturation_K", "dp_saturation_Pa"), "out-of-range": None, "sensor-quality": None}


@dataclass(frozen=True, slots=True)
class LoadedRun:
    """A run analysed under its configuration, with what the outputs need besides the arrays."""

    run: AnalysedRun
    fluid: object
    """The thermo fluid."""
    config: MonitorConfig
    alarms_under: dict[str, tuple[Event, ...]] = field(default_factory=dict)
    """Other configuration's path, as given -> the events of the run under it."""

    @property
    def units(self) -> Units:
        return Units.of(self.config.pressure_unit, self.config.temperature_unit)

    @property
    def notes(self) -> tuple[str, ...]:
        """Lines saying which fluid and configurations the analysis used."""
        lines = [f"fluid {self.fluid.name}; alarms replayed under configuration {self.config.origin}"]
        lines += [f"also replayed under {name}" for name in self.alarms_under]
        return tuple(lines)

    @property
    def near_limits(self) -> dict[str, float]:
        """Margin -> the enabled limit of its condition (absolute limits only: a limit relative
        to the saturation pressure is no fixed distance)."""
        limits = {}
        for name, kind in MARGIN_KINDS.items():
            settings = self.config.conditions.get(name)
            if settings is not None and settings.enabled and not settings.relative and np.isfinite(settings.limit):
                limits[kind.margin] = settings.limit
        return limits

    @property
    def margin_limits(self) -> dict[str, list[float]]:
        """Margin -> limit lines to draw: both sides of the curve for |margin| conditions."""
        return {
            margin: [limit, -limit] if _kind_of(margin).two_sided else [limit]
            for margin, limit in self.near_limits.items()
        }

    def alarms_by_margin(self) -> dict[str, dict[str, list[tuple[float, float]]]]:
        """Margin -> condition -> alarm periods, for shading the margin panels."""
        periods = alarm_periods(self.run.events, float(self.run.t_s[-1]) if self.run.samples else 0.0)
        shaded: dict[str, dict[str, list[tuple[float, float]]]] = {m: {} for m in MARGINS}
        for condition, spans in periods.items():
            base = condition.removesuffix("-trend")
            if base in MARGIN_KINDS:
                panels = (MARGIN_KINDS[base].margin,)
            else:
                panels = CONDITION_PANELS.get(base) or MARGINS
            for margin in panels:
                shaded[margin][condition] = spans
        return shaded


def _kind_of(margin: str):
    return next(kind for kind in MARGIN_KINDS.values() if kind.margin == margin)


def load_run(log: Path, args: argparse.Namespace, progress) -> LoadedRun:
    """Read one log and replay it through the monitor under --config and each --compare-config."""
    progress.stage(f"reading {log.name}")
    # of a run log's text columns only the quality is needed: phase and alarms are recomputed
    table = read_table(run_parts(log) if table_is_run_log(log) else log, texts=("quality",), **reader_options(args))
    if len(table) == 0:
        raise UsageError(f"{log}: no readable sample (of {len(table.bad_lines)} data lines)")
    config = choose_config(args, table, log)
    quality = table.columns.get("quality")
    if quality is None:
        quality = plain_csv_quality(table["pressure_Pa"], table["temperature_K"])
    columns = {"t_s": table["t_s"], "t_wall": table["t_wall"], "pressure_Pa": table["pressure_Pa"],
               "temperature_K": table["temperature_K"], "quality": quality}
    in_order = in_time_order(columns["t_s"])
    if not in_order.all():
        columns = {name: values[in_order] for name, values in columns.items()}
    t, p, T, quality = columns["t_s"], columns["pressure_Pa"], columns["temperature_K"], columns["quality"]
    progress.stage(f"replaying {log.name}")
    result = run_batch(t, p, T, quality, config, t_wall=columns["t_wall"])
    others = {}
    for path in args.compare_config:
        other = load_config(path, fluid=config.thermo_fluid)  # the same fluid: only the limits differ
        progress.stage(f"replaying {log.name} under {Path(path).name}")
        others[path] = run_batch(t, p, T, quality, other).events
    run = AnalysedRun(
        source=str(log),
        fluid=config.thermo_fluid.name,
        t_s=t,
        pressure_Pa=p,
        temperature_K=T,
        quality=quality,
        phase=result.phase,
        margins=result.margins,
        active_alarms=result.active_alarms,
        events=result.events,
        bad_lines=tuple(BadLine(line, reason) for line, reason in table.bad_lines),
        out_of_order=int(in_order.size - in_order.sum()),
    )
    return LoadedRun(run, config.thermo_fluid, config, others)


def plain_csv_quality(pressure_Pa: np.ndarray, temperature_K: np.ndarray) -> np.ndarray:
    """Quality of the rows of a CSV that records none: a NaN or infinite value (a 'nan' cell) is a
    failure, as the live validator would judge it (NAMUR NE 107), the rest ok."""
    finite = np.isfinite(pressure_Pa) & np.isfinite(temperature_K)
    return np.where(finite, Quality.OK.value, Quality.FAILURE.value)


def in_time_order(t_s: np.ndarray) -> np.ndarray:
    """Which samples keep time moving forward: one earlier than any sample before it (a clock
    stepped back, rows pasted out of order) is left out rather than read as negative time."""
    return t_s >= np.maximum.accumulate(t_s)


def table_is_run_log(path: Path) -> bool:
    """Whether the file starts like a rigside run log (whose parts are read together)."""
    from tui.record.recorder import FORMAT_LINE

    with open(path, "rb") as handle:
        return handle.read(len(FORMAT_LINE)).decode("utf-8", "replace") == FORMAT_LINE


def reader_options(args: argparse.Namespace) -> dict:
    """The table reader's options from the command line (names shared with `watch`)."""
    names = ("pressure_unit", "temperature_unit", "gauge", "atmosphere_Pa", "time_column", "pressure_column", "temperature_column")
    return {name: getattr(args, name) for name in names if getattr(args, name, None) is not None}


def recorded_fluid(table: Table):
    """The fluid a run log's metadata names (its configuration's: a name or a custom fluid;
    or a top-level key)."""
    config = table.metadata.get("config")
    named = named_fluid(config) if isinstance(config, dict) else None
    if named is not None:
        return named
    fluid = table.metadata.get("fluid")
    return fluid if isinstance(fluid, str) else None


def choose_config(args: argparse.Namespace, table: Table, log: Path) -> MonitorConfig:
    """--config, else the configuration the log recorded, else the defaults; for the fluid of
    --fluid, else of the log, else of the configuration file. A plain CSV must say its fluid
    somehow, and a configuration for another fluid than the log's is refused."""
    recorded = recorded_fluid(table)
    if args.config:
        config = load_config(args.config, fluid=args.fluid, fallback_fluid=recorded)
        named = bool(args.fluid or recorded or _sets_fluid(args.config))
    elif isinstance(table.metadata.get("config"), dict):
        config = config_from_tree(table.metadata["config"], f"recorded in {log.name}", fluid=args.fluid)
        named = True
    else:
        config = load_config(None, fluid=args.fluid or recorded)
        named = bool(args.fluid or recorded)
    if not named:
        raise UsageError(f"{log}: the log does not say which fluid it holds; give --fluid (see `rigside fluids`)")
    if args.fluid is None and recorded and config.thermo_fluid.name != _fluid_name(recorded):
        raise UsageError(f"configuration {args.config} is for {config.fluid} but {log} holds {_fluid_name(recorded)}; give --fluid to choose")
    return config


def _fluid_name(fluid) -> str:
    """The display name of a fluid given by name or as a thermo fluid."""
    return fluid.name if hasattr(fluid, "name") else thermo.fluid(fluid).name


def _sets_fluid(path: str) -> bool:
    """Whether a configuration file (already read without error) names its fluid."""
    with open(path, "rb") as handle:
        return "fluid" in tomllib.load(handle)
