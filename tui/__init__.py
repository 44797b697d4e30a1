"""rigside's instrument side: acquisition, monitor, recording, analysis, screens and the CLI.

Engine packages (`acquire`, `monitor`, `record`, `analysis`) never import Textual;
only `tui.screen` does.
"""
