"""The Textual screen: the only part of rigside that imports Textual.

    from tui.screen import run_watch, run_demo
    run_watch(source, config, recorder=recorder)   # `rigside watch SOURCE` without --headless
    run_demo("co2-vent", speed=1.0)                 # `rigside demo`

Both block until the person quits and return the exit status.
"""

from __future__ import annotations

__all__ = ["run_demo", "run_watch"]


def __getattr__(name: str):
    """Import the screen (and Textual) only when it is asked for, so that the pure-numpy
    modules here (`tui.screen.curves`, used by analysis figures) load without Textual."""
    if name in __all__:
        from tui.screen import run

        return getattr(run, name)
    raise AttributeError(f"module 'tui.screen' has no attribute {name!r}")
