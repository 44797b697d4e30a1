"""A run summary as titled tables, shared by the terminal output and the reports."""

from __future__ import annotations

from tui.analysis.display import Units, margin_name, seconds, share
from tui.analysis.summary import AlarmTally, RunSummary
from tui.analysis.tables import Section, Table

#: rows listed for long lists (phase changes, gaps, bad lines); the JSON has them all
MAX_LISTED = 50


def summary_sections(summary: RunSummary, units: Units) -> list[Section]:
    """Overview, phases, phase changes, margins, boundaries and alarms; gaps and unreadable lines when there are any."""
    sections = [
        Section("Overview", _overview(summary)),
        Section("Time in each phase", _phases(summary)),
        Section("Phase changes", _listed(["t [s]", "from", "to"], [[seconds(c.t_s), c.before, c.after] for c in summary.phase_changes])),
        Section("Margins", _margins(summary, units)),
        Section("Boundaries", _boundaries(summary, units)),
        Section("Alarms", _alarms(summary.alarms)),
    ]
    sections += [Section(f"Alarms under {name}", _alarms(tallies)) for name, tallies in summary.alarms_under.items()]
    if summary.gaps:
        rows = [[seconds(g.start_s), seconds(g.end_s), seconds(g.duration_s)] for g in summary.gaps]
        sections.append(Section("Gaps", _listed(["from [s]", "to [s]", "length [s]"], rows)))
    if summary.bad_lines:
        sections.append(Section("Unreadable lines", _listed(["line", "reason"], [[str(b.line), b.reason] for b in summary.bad_lines])))
    return sections


def _overview(summary: RunSummary) -> Table:
    qualities = ", ".join(f"{q} {n}" for q, n in summary.samples_by_quality.items())
    rows = [
        ["log", summary.source],
        ["fluid", summary.fluid],
        ["duration [s]", seconds(summary.duration_s)],
        ["samples", f"{summary.samples} ({qualities})" if qualities else "0"],
        ["unreadable lines", str(len(summary.bad_lines))],
        ["samples out of time order", f"{summary.out_of_order} (left out)" if summary.out_of_order else "0"],
        ["gaps", f"{len(summary.gaps)}, {seconds(summary.gap_s)} s in all (longer than {seconds(summary.gap_threshold_s)} s)"],
    ]
    return Table(["", ""], rows)


def _phases(summary: RunSummary) -> Table:
    ordered = sorted(summary.time_in_phase_s.items(), key=lambda item: -item[1])
    return Table(["phase", "time [s]", "share"], [[p, seconds(t), share(t, summary.duration_s)] for p, t in ordered])


def _margins(summary: RunSummary, units: Units) -> Table:
    rows = [
        [units.margin_label(m.margin), units.margin_cell(m.margin, m.minimum), seconds(m.minimum_t_s),
         units.margin_cell(m.margin, m.closest), seconds(m.closest_t_s)]
        for m in summary.margins
    ]
    return Table(["margin", "lowest", "at [s]", "nearest zero", "at [s]"], rows)


def _boundaries(summary: RunSummary, units: Units) -> Table:
    rows = []
    for b in summary.boundaries:
        near = " or ".join(f"|{margin_name(m)}| <= {units.margin_cell(m, v)} {units.margin(m)[1]}".rstrip() for m, v in b.near_limits.items())
        rows.append([b.boundary, seconds(b.on_s), seconds(b.near_s), near or "on it only"])
    return Table(["boundary", "on [s]", "on or near [s]", "near means"], rows)


def _alarms(tallies: tuple[AlarmTally, ...]) -> Table:
    rows = [[a.condition, a.priority, str(a.count), seconds(a.first_t_s), seconds(a.active_s)] for a in tallies]
    return Table(["condition", "priority", "alarms", "first at [s]", "active [s]"], rows, "" if rows else "no alarm")


def _listed(headers: list[str], rows: list[list[str]]) -> Table:
    if not rows:
        return Table(headers, [], "none")
    more = len(rows) - MAX_LISTED
    return Table(headers, rows[:MAX_LISTED], f"... and {more} more (all of them in --json)" if more > 0 else "")
