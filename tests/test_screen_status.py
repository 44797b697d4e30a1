"""The status header: whole items on at most two lines, least important first to go."""

import pytest
from rich.cells import cell_len

from tui.screen.live import LiveView, Recording, ReplayPosition
from tui.screen.widgets.status_line import status_content

VIEW = LiveView(
    fluid="CO2", source="replay fixtures/logs/co2-vent-long-name-for-a-run.csv at the speed of the run",
    samples=123456, rate_hz=200.0, dropped=3, malformed=0,
    recording=Recording("/var/log/rigside/run-20261201-224950-view-cell.csv", 23_500),
    replay=ReplayPosition(612.3, 3600.0, 2.0, False),
)


@pytest.mark.parametrize("width", [80, 98, 100, 158, 160])
def test_status_keeps_every_value_whole_within_two_lines(width):
    lines = status_content(VIEW, width).plain.split("\n")
    assert len(lines) <= 2 and all(cell_len(line) <= width for line in lines)
    for essential in ("CO2", "200 S/s", "dropped 3", "run-20261201-224950-view-cell.csv 23.5 kB", "10:12.3/1:00:00.0 ×2 playing ▶"):
        assert sum(essential in line for line in lines) == 1, essential


def test_least_important_parts_go_first():
    wide = status_content(VIEW, 300).plain
    assert "123456 samples" in wide and "malformed 0" in wide and VIEW.source in wide
    narrow = status_content(VIEW, 60).plain
    assert "123456 samples" not in narrow and "malformed 0" not in narrow
    assert "dropped 3" in narrow  # a loss is never left out


def test_the_source_is_cut_short_before_it_goes():
    text = status_content(VIEW, 160).plain
    assert VIEW.source not in text and "replay fixtures/" in text and text.endswith("…")


def test_a_replay_that_has_ended_says_so():
    from dataclasses import replace

    ended = replace(VIEW, source_state="ended")
    assert "ended ■" in status_content(ended, 160).plain and "playing" not in status_content(ended, 160).plain
