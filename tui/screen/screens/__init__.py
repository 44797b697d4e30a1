"""The screen's screens: the monitor, and the dialogs it opens (help, note, fluid, quit)."""
