"""The Textual screen: the only part of rigside that imports Textual.

    from tui.screen import run_watch, run_demo
    run_watch(source, config, recorder=recorder)   # `rigside watch SOURCE` without --headless
    run_demo("co2-vent", speed=1.0)                 # `rigside demo`

Both block until the person quits and return the exit status.
"""

from __future__ import annotations

from tui.screen.run import run_demo, run_watch

__all__ = ["run_demo", "run_watch"]
