"""Several runs side by side: one row per run, the same columns for all."""

from __future__ import annotations

from pathlib import Path

from tui.analysis.display import Units, seconds, share
from tui.analysis.summary import RunSummary
from tui.analysis.tables import Table
from tui.monitor.model import MARGINS

#: phases named in the "phases" cell, longest first
PHASES_SHOWN = 3


def comparison_table(summaries: list[RunSummary], units: Units) -> Table:
    """Run, fluid, duration, samples, gaps, phase changes, main phases, the closest approach of
    each margin, alarms, and the alarms under each other configuration."""
    others = list(dict.fromkeys(name for s in summaries for name in s.alarms_under))
    margin_headers = [f"nearest {units.margin_label(name)}" for name in MARGINS]
    headers = ["run", "fluid", "duration [s]", "samples", "gaps", "phase changes", "main phases", *margin_headers, "alarms"]
    headers += [f"alarms under {name}" for name in others]
    return Table(headers, [_row(s, units, others) for s in summaries])


def _row(summary: RunSummary, units: Units, others: list[str]) -> list[str]:
    closest = {m.margin: m.closest for m in summary.margins}
    phases = sorted(summary.time_in_phase_s.items(), key=lambda item: -item[1])[:PHASES_SHOWN]
    return [
        Path(summary.source).name,
        summary.fluid,
        seconds(summary.duration_s),
        str(summary.samples),
        f"{len(summary.gaps)} ({seconds(summary.gap_s)} s)",
        str(len(summary.phase_changes)),
        ", ".join(f"{p} {share(t, summary.duration_s)}" for p, t in phases),
        *[units.margin_cell(name, closest.get(name, float("nan"))) for name in MARGINS],
        _alarm_cell(summary.alarms),
        *[_alarm_cell(summary.alarms_under.get(name, ())) for name in others],
    ]


def _alarm_cell(tallies) -> str:
    total = sum(a.count for a in tallies)
    return f"{total}: " + ", ".join(f"{a.condition} x{a.count}" for a in tallies) if total else "0"
