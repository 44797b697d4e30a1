"""The annotated copy of a run: every sample with its phase, margins, quality and active alarms.

A CSV with a commented header (like the run logs), so it opens in a spreadsheet and replays
as a log. Written in chunks: memory stays flat however long the run.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from tui.analysis.csv_text import Labels, Numbers, write_csv
from tui.analysis.labels import encode_labels
from tui.analysis.run import AnalysedRun
from tui.monitor.model import MARGINS

#: decimals written per numeric column: finer than any gauge resolves
DECIMALS = {
    "t_s": 6,
    "pressure_Pa": 3,
    "temperature_K": 4,
    "dT_saturation_K": 4,
    "dp_saturation_Pa": 3,
    "dT_solid_K": 4,
    "critical_distance": 6,
}

#: separator between the conditions of the active_alarms column
ALARM_SEPARATOR = ";"


def write_annotated(run: AnalysedRun, path: Path, *, notes: tuple[str, ...] = (), on_rows=None) -> None:
    """Write the annotated copy of run to path; notes become `# ` lines of the header.

    on_rows(rows_written) is called as the work goes on (for a progress bar).
    """
    header, columns = annotated_columns(run)
    with open(path, "wb") as stream:
        lines = [f"rigside annotated copy of {run.source}", f"fluid: {run.fluid}", *notes]
        stream.write("".join(f"# {line}\n" for line in lines).encode())
        write_csv(stream, header, columns, on_chunk=on_rows)


def annotated_columns(run: AnalysedRun) -> tuple[list[str], list[Numbers | Labels]]:
    """Column names and columns of the annotated copy, in file order."""
    margins = [name for name in MARGINS if name in run.margins]
    numbers = {"t_s": run.t_s, "pressure_Pa": run.pressure_Pa, "temperature_K": run.temperature_K}
    header = ["t_s", "pressure_Pa", "temperature_K", "quality", "phase", *margins, "active_alarms"]
    columns = [Numbers(numbers[name], DECIMALS[name]) for name in ("t_s", "pressure_Pa", "temperature_K")]
    columns += [Labels(*encode_labels(run.quality)), Labels(*encode_labels(run.phase))]
    columns += [Numbers(run.margins[name], DECIMALS[name]) for name in margins]
    columns.append(Labels(*active_alarm_labels(run.active_alarms, run.samples)))
    return header, columns


def active_alarm_labels(active: dict[str, np.ndarray], samples: int) -> tuple[np.ndarray, list[str]]:
    """Codes per sample and the label of each combination of active conditions
    ("" when none, otherwise the conditions joined by ALARM_SEPARATOR)."""
    conditions = list(active)
    combination = np.zeros(samples, dtype=np.int64)
    for bit, condition in enumerate(conditions):
        combination |= active[condition].astype(np.int64) << bit
    codes, present = encode_labels(combination)
    names = [
        ALARM_SEPARATOR.join(c for bit, c in enumerate(conditions) if int(value) >> bit & 1) for value in present
    ]
    return codes, names
