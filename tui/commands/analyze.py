"""`rigside analyze`: what happened in recorded runs, and what other alarm limits would have done.

For each log: the pipeline of the live monitor replays every sample (classification, margins,
trend, alarms); then a summary, optionally an annotated copy, figures and a report. Several
logs give one comparison table. Unreadable lines are reported by number; the rest is analysed.
"""

from __future__ import annotations

import argparse
import json
import sys
from dataclasses import dataclass
from pathlib import Path

from tui.acquire.options import add_table_arguments
from tui.analysis.annotate import write_annotated
from tui.analysis.comparison import comparison_table
from tui.analysis.display import Units
from tui.analysis.figures import MISSING_EXTRA, figures_available, margins_figure, save, trajectory_figure
from tui.analysis.load import LoadedRun, load_run
from tui.analysis.progress import Progress
from tui.analysis.report import RunPart, report_format, write_report
from tui.analysis.summary import RunSummary, summarise, summary_json
from tui.analysis.summary_view import summary_sections
from tui.analysis.tables import render_csv, render_sections_text, render_text
from tui.cli import SAFETY_NOTE
from tui.errors import RuntimeFailure, UsageError

#: unreadable lines named on stderr per log; the summary (and --json) lists them all
BAD_LINES_SHOWN = 10


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser(
        "analyze",
        help="summarise recorded runs: phases, margins, alarms (also under other limits), figures, reports",
        description="What happened in recorded runs: phases and their changes, the closest approach to "
        "each boundary, the alarms, and the alarms other limits would have raised. " + SAFETY_NOTE,
        epilog="With one log the summary is printed; with several, one comparison row per run.",
    )
    parser.add_argument("logs", nargs="+", metavar="LOG", help="run log, or any CSV with time, pressure and temperature columns")
    parser.add_argument("--fluid", metavar="NAME", help="the fluid (default: the one recorded in the log, else the configuration's)")
    parser.add_argument("--config", metavar="FILE", help="monitor configuration to replay the alarms under "
                        "(default: the one recorded in the log, else the documented defaults)")
    parser.add_argument("--compare-config", metavar="FILE", action="append", default=[],
                        help="also count the alarms this configuration would have raised (repeatable)")
    parser.add_argument("--gap", dest="gap_s", type=float, metavar="SECONDS",
                        help="longest interval between samples that is not a gap (default: 5 times the median interval)")
    parser.add_argument("--annotate", metavar="OUT", help="write every sample with phase, margins, quality and active "
                        "alarms as CSV: a .csv file for one log, else a directory")
    parser.add_argument("--json", action="store_true", help="print the summaries as JSON instead of tables")
    parser.add_argument("--table", metavar="FILE.csv", help="write the comparison table (one row per run) as CSV")
    parser.add_argument("--figures", metavar="DIR", help="write the p-T trajectory and the margins over time as PNG "
                        "and SVG (needs the optional extra 'figures')")
    parser.add_argument("--report", metavar="FILE", help="write a single-file report, FILE.html or FILE.md")
    add_table_arguments(parser.add_argument_group("reading CSV files (run logs say all this themselves)"))


@dataclass(frozen=True, slots=True)
class Outputs:
    """Where the optional results go, checked before any work starts."""

    annotate: Path | None
    annotate_is_dir: bool
    figures: Path | None
    report: Path | None
    table: Path | None

    @classmethod
    def from_args(cls, args: argparse.Namespace) -> Outputs:
        annotate = Path(args.annotate) if args.annotate else None
        as_file = annotate is not None and annotate.suffix.lower() == ".csv" and len(args.logs) == 1
        if annotate is not None and annotate.suffix.lower() == ".csv" and len(args.logs) > 1:
            raise UsageError(f"--annotate {annotate}: give a directory when analysing several logs")
        report = Path(args.report) if args.report else None
        if report is not None:
            report_format(report)
        if args.figures and not figures_available():
            raise RuntimeFailure(MISSING_EXTRA)  # before any work, not after the first log
        outputs = cls(annotate, annotate is not None and not as_file, Path(args.figures) if args.figures else None,
                      report, Path(args.table) if args.table else None)
        outputs._refuse_overwriting(args.logs)
        return outputs

    def annotated_path(self, log: Path) -> Path:
        return self.annotate / f"{log.stem}-annotated.csv" if self.annotate_is_dir else self.annotate

    def _refuse_overwriting(self, logs: list[str]) -> None:
        """No output over a log, and no two logs' outputs over each other (they are named by stem)."""
        inputs = {Path(log).resolve() for log in logs}
        written = [self.report, self.table] + [self.annotated_path(Path(log)) for log in logs if self.annotate]
        for path in written:
            if path is not None and path.resolve() in inputs:
                raise UsageError(f"{path}: is one of the logs being analysed; choose another output name")
        stems: dict[str, str] = {}
        for log in logs:
            other = stems.setdefault(Path(log).stem, log)
            if other != log and (self.annotate_is_dir or self.figures):
                raise UsageError(f"{other} and {log} share the name {Path(log).stem!r}, so their annotated copies "
                                 "and figures would overwrite each other; analyse them separately")


@dataclass(frozen=True, slots=True)
class Analysed:
    """What is kept of one run once its outputs are written: the arrays are let go."""

    summary: RunSummary
    units: Units
    notes: tuple[str, ...]
    figures: list[tuple[str, object]]
    """(caption, Figure) for the report; empty without --report."""


def run(args: argparse.Namespace) -> int:
    outputs = Outputs.from_args(args)
    for log in args.logs:
        if not Path(log).is_file():
            raise UsageError(f"log {log!r}: no such file")
    progress = Progress()
    done = [_analyse_one(Path(log), args, outputs, progress) for log in args.logs]
    progress.done()
    summaries = [d.summary for d in done]
    units = done[0].units
    if args.json:
        data = [summary_json(s) for s in summaries]
        print(json.dumps(data[0] if len(data) == 1 else {"runs": data}, indent=2, allow_nan=False))
    elif len(summaries) == 1:
        print(render_sections_text(summary_sections(summaries[0], units)))
    else:
        print(render_text(comparison_table(summaries, units)))
    if outputs.table:
        outputs.table.write_text(render_csv(comparison_table(summaries, units)), encoding="utf-8")
    if outputs.report:
        _write_report(outputs.report, done)
    return 0


def _analyse_one(log: Path, args: argparse.Namespace, outputs: Outputs, progress: Progress) -> Analysed:
    loaded = load_run(log, args, progress)
    _report_skipped(log, loaded)
    summary = summarise(loaded.run, near_limits=loaded.near_limits, gap_threshold_s=args.gap_s,
                        alarms_under=loaded.alarms_under)
    if outputs.annotate:
        _write_annotated(loaded, outputs, progress)
    figures = []
    if outputs.figures or (outputs.report and figures_available()):
        progress.stage(f"drawing {log.name}")
        figures = _figures_of(loaded)
    if outputs.figures:
        outputs.figures.mkdir(parents=True, exist_ok=True)
        for suffix, _, figure in figures:
            save(figure, outputs.figures / f"{log.stem}-{suffix}")
    kept = [(caption, figure) for _, caption, figure in figures] if outputs.report else []
    return Analysed(summary, loaded.units, loaded.notes, kept)


def _report_skipped(log: Path, loaded: LoadedRun) -> None:
    """One line per unreadable line (the first few) and for samples out of time order."""
    bad = loaded.run.bad_lines
    for line in bad[:BAD_LINES_SHOWN]:
        print(f"rigside analyze: {log} line {line.line}: {line.reason}; skipped, the other lines are analysed", file=sys.stderr)
    if len(bad) > BAD_LINES_SHOWN:
        print(f"rigside analyze: {log}: {len(bad) - BAD_LINES_SHOWN} more unreadable lines (see --json)", file=sys.stderr)
    if loaded.run.out_of_order:
        print(f"rigside analyze: {log}: {loaded.run.out_of_order} samples earlier than one before them; left out",
              file=sys.stderr)


def _write_annotated(loaded: LoadedRun, outputs: Outputs, progress: Progress) -> None:
    path = outputs.annotated_path(Path(loaded.run.source))
    path.parent.mkdir(parents=True, exist_ok=True)
    progress.stage(f"annotating {path.name}")
    total = max(1, loaded.run.samples)
    write_annotated(loaded.run, path, notes=loaded.notes, on_rows=lambda rows: progress.update(rows / total))


def _figures_of(loaded: LoadedRun) -> list[tuple[str, str, object]]:
    """(file suffix, caption, Figure) of each figure of one run."""
    return [
        ("pT", "trajectory on the p–T diagram, coloured by time", trajectory_figure(loaded.run, loaded.fluid, loaded.units)),
        ("margins", "margins over time with their limits and alarm periods",
         margins_figure(loaded.run, loaded.units, limits=loaded.margin_limits, alarms=loaded.alarms_by_margin())),
    ]


def _write_report(path: Path, done: list[Analysed]) -> None:
    units = done[0].units
    parts = [RunPart(f"Run {d.summary.source}", summary_sections(d.summary, units), d.figures) for d in done]
    comparison = comparison_table([d.summary for d in done], units) if len(done) > 1 else None
    notes = tuple(dict.fromkeys(note for d in done for note in d.notes))
    if not figures_available():
        notes += (MISSING_EXTRA + "; this report has no figures",)
        print(f"rigside analyze: {MISSING_EXTRA}; the report is written without figures", file=sys.stderr)
    write_report(path, parts, comparison=comparison, notes=notes)
