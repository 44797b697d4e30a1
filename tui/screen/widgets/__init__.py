"""The screen's widgets, one per module; their look lives in ../app.tcss."""
