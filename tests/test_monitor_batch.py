"""run_batch over a whole run gives exactly what the live monitor gives sample by sample."""

from __future__ import annotations

import threading
from pathlib import Path

import numpy as np
import pytest

from tui.acquire import Sample, SourceOptions, open_source
from tui.errors import UsageError
from tui.monitor.batch import run_batch
from tui.monitor.config import load_config
from tui.monitor.model import MARGINS
from tui.monitor.pipeline import Monitor

SCENARIO = Path(__file__).parent.parent / "fixtures" / "scenarios" / "co2-vent-blowdown.toml"


@pytest.fixture(scope="module")
def vent_samples() -> list[Sample]:
    """A noisy CO2 blowdown with spikes and garbage lines, as the virtual gauge sends it."""
    source = open_source(f"virtual:{SCENARIO}", SourceOptions(speed=0))
    return [item for batch in source.batches(threading.Event()) for item in batch if isinstance(item, Sample)]


def comparable(events):
    return [tuple("nan" if v != v else v for v in e.to_json().values()) for e in events]


def columns(samples):
    t0 = samples[0].t_monotonic
    return dict(
        t_s=np.array([s.t_monotonic - t0 for s in samples]),
        pressure_Pa=np.array([s.pressure_Pa for s in samples]),
        temperature_K=np.array([s.temperature_K for s in samples]),
        quality=np.array([s.quality.value for s in samples]),
        t_wall=np.array([s.t_wall for s in samples]),
        reasons=[s.reasons for s in samples],
        raw=[s.raw for s in samples],
    )


def test_batch_and_sample_by_sample_agree_exactly(vent_samples, tmp_path):
    path = tmp_path / "all-on.toml"
    path.write_text("[conditions.saturation-pressure]\nenabled = true\n")
    config = load_config(path)
    monitor = Monitor(config)
    readings, events = [], []
    for sample in vent_samples:
        got = monitor.process([sample])
        readings += got[0]
        events += got[1]
    c = columns(vent_samples)
    result = run_batch(c["t_s"], c["pressure_Pa"], c["temperature_K"], c["quality"], config,
                       t_wall=c["t_wall"], reasons=c["reasons"], raw=c["raw"])
    assert len(events) > 10 and {"alarm", "clear", "quality", "phase-change"} <= {e.kind for e in events}
    assert comparable(result.events) == comparable(events)
    assert list(result.phase) == [r.phase for r in readings]
    for name in MARGINS:
        for batch_values, key in ((result.margins, "margins"), (result.rates, "rates"),
                                  (result.time_to_boundary, "time_to_boundary")):
            live = np.array([getattr(r, key)[name] for r in readings])
            assert np.array_equal(batch_values[name], live, equal_nan=True), (name, key)
    for condition, active in result.active_alarms.items():
        assert list(active) == [condition in r.active_alarms for r in readings], condition
    assert np.array_equal(c["t_s"], [r.t_s for r in readings])


def test_batch_takes_quality_codes_and_rejects_unknown_labels(vent_samples):
    config = load_config()
    c = columns(vent_samples[:500])
    by_label = run_batch(c["t_s"], c["pressure_Pa"], c["temperature_K"], c["quality"], config)
    codes = np.array([{"ok": 4, "failure": 0}[q] for q in c["quality"]])  # positions in QUALITIES
    by_code = run_batch(c["t_s"], c["pressure_Pa"], c["temperature_K"], codes, config)
    assert comparable(by_code.events) == comparable(by_label.events)
    bad = c["quality"].astype(object)
    bad[7] = "grand"
    with pytest.raises(UsageError, match="unknown quality 'grand'"):
        run_batch(c["t_s"], c["pressure_Pa"], c["temperature_K"], bad, config)
