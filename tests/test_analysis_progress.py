"""The progress bar: drawn on a terminal once work lasts, silent otherwise."""

import io
import os

from tui.analysis.progress import DELAY_S, Progress


class Clock:
    def __init__(self):
        self.now = 0.0

    def __call__(self):
        return self.now


def test_a_terminal_gets_the_bar_after_the_delay_and_a_clean_line_at_the_end():
    master, slave = os.openpty()
    clock = Clock()
    with os.fdopen(slave, "w") as terminal:
        progress = Progress(terminal, clock=clock)
        progress.stage("reading run.csv")
        progress.update(0.2)  # too early: nothing drawn
        clock.now = DELAY_S + 0.01
        progress.update(0.5)
        progress.done()
        shown = os.read(master, 4096).decode()
    os.close(master)
    assert shown.count("[") == 1
    assert "reading run.csv" in shown and "#" * 15 + "." * 15 in shown and " 50 %" in shown
    assert shown.endswith("\r")


def test_redirected_stderr_stays_clean():
    stream = io.StringIO()
    clock = Clock()
    progress = Progress(stream, clock=clock)
    clock.now = 10.0
    progress.stage("reading")
    progress.update(0.9)
    progress.done()
    assert stream.getvalue() == ""
