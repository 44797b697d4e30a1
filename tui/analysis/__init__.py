"""Analysis of recorded runs: summaries, comparison of runs, annotated copies, figures and reports.

Everything here works on whole arrays produced by the monitor's batch pipeline, so a log
of a million samples is summarised without a per-sample Python loop.
"""
