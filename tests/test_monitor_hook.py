"""The --on-alarm hook on its own: the event in environment variables, no shell, failures reported."""

from __future__ import annotations

import json
import sys

import pytest

from tui.errors import UsageError
from tui.monitor.hook import AlarmHook, split_command
from tui.monitor.model import Event

DUMP = "import json, os, sys; open(sys.argv[1], 'a').write(json.dumps(dict(os.environ)) + '\\n')"


def run_hook(argv, events, timeout_s=5.0):
    reports = []
    hook = AlarmHook(argv, timeout_s=timeout_s, report=reports.append, active_alarms=lambda: ["two-phase"])
    hook.write([], events)
    hook.close()
    return reports


def test_each_alarm_system_event_runs_the_program_once_with_the_event_in_its_environment(tmp_path):
    out = tmp_path / "calls.jsonl"
    message = "gauge said 'p=\x00; rm -rf ~' $(reboot)"
    events = [
        Event(12.5, 1.8e9, "alarm", "two-phase", "medium", float("nan"), float("nan"), message),
        Event(13.0, 1.8e9, "phase-change", "phase", message="liquid -> liquid+vapor"),  # not an alarm event
        Event(20.0, 1.8e9, "clear", "saturation-temperature", "high", 2.31, 2.0, "back to normal"),
    ]
    assert run_hook([sys.executable, "-c", DUMP, str(out)], events) == []
    calls = [json.loads(line) for line in out.read_text().splitlines()]
    assert [c["RIGSIDE_EVENT_KIND"] for c in calls] == ["alarm", "clear"]
    first, second = calls
    assert first["RIGSIDE_EVENT_MESSAGE"] == message.replace("\x00", "\\x00")  # NUL cannot travel in the environment
    assert first["RIGSIDE_EVENT_VALUE"] == "" and first["RIGSIDE_EVENT_T_S"] == "12.5"
    assert first["RIGSIDE_ACTIVE_ALARMS"] == "two-phase" and first["RIGSIDE_EVENT_IN_FLOOD"] == "0"
    assert second["RIGSIDE_EVENT_VALUE"] == "2.31" and second["RIGSIDE_EVENT_LIMIT"] == "2.0"
    assert json.loads(second["RIGSIDE_EVENT_JSON"])["condition"] == "saturation-temperature"


def test_failures_and_hangs_are_reported_not_raised():
    alarm = [Event(1.0, 1.8e9, "alarm", "two-phase", "medium")]
    failed = run_hook([sys.executable, "-c", "import sys; print('relay busy', file=sys.stderr); sys.exit(4)"], alarm)
    assert failed == ["alarm hook %s for alarm two-phase: exit status 4: relay busy" % sys.executable]
    hung = run_hook([sys.executable, "-c", "import time; time.sleep(30)"], alarm, timeout_s=0.3)
    assert len(hung) == 1 and "still running after 0.3 s, stopped" in hung[0]


def test_the_command_is_split_once_and_checked_at_start():
    assert split_command(f"{sys.executable} -c 'print(1)' \"two words\"") == [sys.executable, "-c", "print(1)", "two words"]
    for bad, named in (("", "needs a program"), ("beep 'open", "--on-alarm"), ("/no/such/beeper", "not found")):
        with pytest.raises(UsageError, match=named):
            split_command(bad)
