"""SVG snapshots of the main screen and the diagram at known states (pytest-textual-snapshot).

Regenerate with `pytest tests/test_screen_snapshots.py --snapshot-update`, then look at them.
States are invented; the samples are 0.0 s old on a frozen clock and event times print in UTC.
"""

from __future__ import annotations

import os
import time

import numpy as np
import pytest

from screen_apps.diagram_app import DiagramApp
from screen_apps.memory import memory_app

LIMITS = {"dT_saturation_K": 2.0, "dT_solid_K": 10.0, "critical_distance": 0.05}


@pytest.fixture(autouse=True)
def utc(monkeypatch):
    monkeypatch.setenv("TZ", "UTC")
    time.tzset()
    yield
    monkeypatch.undo()
    time.tzset()


def ramp(T0, T1, p0, p1, n=40):
    return list(zip(np.linspace(T0, T1, n), np.linspace(p0, p1, n)))


async def settled(pilot, samples: int):
    """Wait until the pipeline has shown every sample and the curves are drawn."""
    app = pilot.app
    for _ in range(200):
        if app.curves is not None and app.latest_view.samples >= samples and app.latest_view.properties:
            break
        await pilot.pause(0.05)
    await pilot.pause(0.3)


def test_main_screen_compressed_liquid(snap_compare):
    states = ramp(278.15, 283.15, 55e5, 60e5)
    assert snap_compare(memory_app(states), terminal_size=(80, 24), run_before=lambda p: settled(p, len(states)))


def test_main_screen_venting_towards_dry_ice_wide(snap_compare):
    states = ramp(240.0, 222.0, 12e5, 6.5e5)
    assert snap_compare(memory_app(states), terminal_size=(160, 48), run_before=lambda p: settled(p, len(states)))


def test_diagram_whole_range_with_bands(snap_compare):
    assert snap_compare(DiagramApp("CO2", 283.15, 60e5, limits=LIMITS), terminal_size=(70, 22))


def test_diagram_near_the_live_state(snap_compare):
    assert snap_compare(DiagramApp("CO2", 300.0, 68e5, zoom="near", limits=LIMITS, alarm=True), terminal_size=(70, 22))


def test_diagram_pressure_volume_with_tie_line(snap_compare):
    assert snap_compare(DiagramApp("CO2", 290.0, 52e5, view="pv"), terminal_size=(70, 22))
