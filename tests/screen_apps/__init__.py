"""Small apps and sources for the screen's tests and snapshots."""
