"""The monitor pipeline: validated samples -> classification, margins, trends, alarms, events. No Textual here.

Live (screen worker thread or headless watch)::

    from tui.monitor.config import load_config
    from tui.monitor.pipeline import Monitor, CallbackSink, run_live
    config = load_config("rig.toml", fluid="CO2")        # MonitorConfig; UsageError names a bad key
    monitor = Monitor(config, validator=validator)       # validator: tui.acquire.validate.Validator, optional
    readings, events = monitor.process(samples)          # any number of Samples, in arrival order
    monitor.acknowledge("saturation-temperature")        # or acknowledge() for all; returns the ack events
    monitor.shelve("two-phase", 600.0)                   # seconds default to the configured duration
    monitor.unshelve("two-phase")
    monitor.alarm_states()                               # tuple of AlarmStatus (condition, priority, state, ...)
    monitor.active_alarms(); monitor.alarm_log()
    run_live(source, monitor, [RecorderSink(recorder), CallbackSink(show)], stop,
             clock=None)                                # blocks until stop or the source ends;
                                                        # clock=time.monotonic (default) adds stale
                                                        # detection for live gauges

Events of operator actions are returned at once and also go out with the next batch, so
the recorder gets them in order. All Monitor methods are thread-safe.

Batch (analysis; the same engine, so the same events as sample-by-sample)::

    from tui.monitor.batch import run_batch
    result = run_batch(t_s, pressure_Pa, temperature_K, quality, config)
    result.phase, result.margins, result.rates, result.time_to_boundary, result.active_alarms, result.events

Sinks (tui.monitor.sinks, tui.monitor.hook): RecorderSink, StatusPrinter, JsonLinesSink,
AlarmHook; each has write(readings, events), status(report) and close().

Modules: config (TOML, defaults in default.toml), classify (thermo stage), trend (Theil-Sen
rates), conditions (judgements per chunk), signals (deadband and delays), alarms (ISA-18.2
states, shelving, flood guard), engine (ties them), pipeline (live), batch, sinks (recorder,
headless output, alarm hook), model (Reading, Event).
"""
