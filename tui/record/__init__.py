"""Run logs: the crash-safe recorder and the fast table reader. No Textual here.

The rigside run log, format version 1
-------------------------------------
A run log is UTF-8 CSV text with `#` comment lines, readable by any CSV tool that skips
comments. A run is one file, or several parts when it outgrew the size cap:
`run-20261201T101500Z.csv`, `run-20261201T101500Z.part2.csv`, ... (UTC start time; a log is
never overwritten). Every part starts with the same header:

    # rigside-run-log 1
    # meta {"started": "2026-12-01T10:15:00.123456Z", "part": 1, "source": "...", "config": {...}}
    t_s,t_wall,pressure_Pa,temperature_K,quality,phase,dT_saturation_K,dp_saturation_Pa,dT_solid_K,critical_distance,active_alarms,reasons,raw

then one row per sample, and events in time order among the rows:

    12.500000,1796163654.783560,5012300,301.25,ok,liquid,-2.1,-310000,84.3,0.052,,,"p=50.123 bar T=28.10 degC"
    # event {"t_s": 12.5, "t_wall": 1796163654.78356, "kind": "alarm", "condition": "near-saturation", ...}

- `t_s` is seconds since the run's first sample; `t_wall` seconds since the Unix epoch (UTC).
- Values are SI (Pa absolute, K) to 10 significant digits (times to the microsecond, margins
  to 7 digits: finer than any gauge resolves); margins as in `tui.monitor.model.MARGINS`;
  `nan` where undefined or unclassified.
- `quality` is a NAMUR NE 107 category (`ok`, `failure`, `function-check`,
  `out-of-specification`, `maintenance-required`); `phase` a thermo label or `unclassified`.
- `active_alarms` are condition names joined by `;`; `reasons` the quality reasons joined by
  `; ` (quoted); `raw` the record as received, always last and quoted (`"` doubled,
  control characters escaped as `\\xNN`).
- Event lines are `# event ` + one JSON object (keys of `tui.monitor.model.Event`, NaN as null).
  Notes are events of kind `note`; source health changes are kind `source` (with `state`), and
  a reconnection after a loss adds kind `gap` with `from_t_s` and `duration_s`.
- Rows are flushed to the operating system at least every 0.5 s and fsynced every few
  seconds: after `kill -9` at most the last second is lost, and only the last line can be
  cut short (readers report it and keep every complete row).
"""

from tui.record.recorder import FORMAT_LINE, RunRecorder, run_parts
from tui.record.table import Table, read_table

__all__ = ["FORMAT_LINE", "RunRecorder", "Table", "read_table", "run_parts"]
