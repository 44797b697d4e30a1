"""`--on-alarm CMD`: run a program on each alarm event, for a buzzer, beacon or relay on a field rig.

The command line is split once, at start, with POSIX shell-like quoting (shlex) into a program
and its arguments; it is then run without a shell, from a worker thread so the monitor never
waits for it. The event goes in environment variables only, never into the command line:
nothing a gauge sends can become a command. A program that fails, hangs past its timeout or
cannot start is logged as a "note" event; it never stops the watch.

Variables: RIGSIDE_EVENT_KIND (alarm, clear, ack, shelve, flood), RIGSIDE_EVENT_CONDITION,
RIGSIDE_EVENT_PRIORITY, RIGSIDE_EVENT_VALUE, RIGSIDE_EVENT_LIMIT (numbers; empty when
undefined), RIGSIDE_EVENT_MESSAGE, RIGSIDE_EVENT_T_S, RIGSIDE_EVENT_T_WALL,
RIGSIDE_EVENT_IN_FLOOD (0 or 1), RIGSIDE_EVENT_JSON (the whole event), and
RIGSIDE_ACTIVE_ALARMS (the conditions whose alarm is active after the event, comma-separated)
so that a relay script can simply follow whether any alarm is active.
"""

from __future__ import annotations

import math
import os
import queue
import shlex
import shutil
import subprocess
import threading
from collections.abc import Callable

from tui.errors import UsageError
from tui.jsontext import dumps
from tui.monitor.pipeline import Sink
from tui.monitor.sinks import event_json

#: event kinds the hook is run for: everything the alarm system says
HOOK_KINDS = frozenset({"alarm", "clear", "ack", "shelve", "flood"})
#: longest value put in one environment variable [characters]
VALUE_LENGTH = 4096


def split_command(command: str) -> list[str]:
    """The program and its arguments, checked once at start (a UsageError names the problem)."""
    try:
        argv = shlex.split(command)
    except ValueError as exc:
        raise UsageError(f"--on-alarm {command!r}: {exc}") from None
    if not argv:
        raise UsageError("--on-alarm needs a program to run")
    if shutil.which(argv[0]) is None:
        raise UsageError(f"--on-alarm: program {argv[0]!r} not found or not executable")
    return argv


def _text(value) -> str:
    """A value as an environment string: no NUL (the OS cannot carry it), bounded length."""
    if isinstance(value, float):
        value = "" if not math.isfinite(value) else repr(value)
    return str(value).replace("\x00", "\\x00")[:VALUE_LENGTH]


def event_environment(event, active: list[str]) -> dict[str, str]:
    return {
        "RIGSIDE_EVENT_KIND": _text(event.kind),
        "RIGSIDE_EVENT_CONDITION": _text(event.condition),
        "RIGSIDE_EVENT_PRIORITY": _text(event.priority),
        "RIGSIDE_EVENT_VALUE": _text(event.value),
        "RIGSIDE_EVENT_LIMIT": _text(event.limit),
        "RIGSIDE_EVENT_MESSAGE": _text(event.message),
        "RIGSIDE_EVENT_T_S": _text(event.t_s),
        "RIGSIDE_EVENT_T_WALL": _text(event.t_wall),
        "RIGSIDE_EVENT_IN_FLOOD": "1" if event.in_flood else "0",
        "RIGSIDE_EVENT_JSON": _text(dumps(event_json(event), ensure_ascii=False)),
        "RIGSIDE_ACTIVE_ALARMS": _text(",".join(active)),
    }


class AlarmHook(Sink):
    """Runs `argv` once per alarm-system event, in order, from its own thread."""

    def __init__(self, argv: list[str], *, timeout_s: float, report: Callable[[str], object],
                 active_alarms: Callable[[], list[str]]):
        self.argv, self.timeout_s = list(argv), timeout_s
        self._report, self._active = report, active_alarms
        self._queue: queue.SimpleQueue = queue.SimpleQueue()
        self._thread = threading.Thread(target=self._serve, name="rigside-alarm-hook", daemon=True)
        self._thread.start()

    def write(self, readings, events) -> None:
        active = list(readings[-1].active_alarms) if readings else self._active()
        for event in events:
            if event.kind in HOOK_KINDS:
                self._queue.put(event_environment(event, active))

    def close(self) -> None:
        """Let the events already queued run (each within its timeout), then stop."""
        self._queue.put(None)
        self._thread.join()

    def _serve(self) -> None:
        while (variables := self._queue.get()) is not None:
            self._run(variables)

    def _run(self, variables: dict[str, str]) -> None:
        what = f"alarm hook {self.argv[0]} for {variables['RIGSIDE_EVENT_KIND']} {variables['RIGSIDE_EVENT_CONDITION']}"
        try:
            done = subprocess.run(self.argv, env=os.environ | variables, stdin=subprocess.DEVNULL,
                                  stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, timeout=self.timeout_s,
                                  check=False, shell=False)
        except subprocess.TimeoutExpired:
            self._report(f"{what}: still running after {self.timeout_s:g} s, stopped")
        except OSError as exc:
            self._report(f"{what}: could not start ({exc.strerror or exc})")
        else:
            if done.returncode != 0:
                detail = done.stderr.decode("utf-8", "replace").strip().splitlines()
                tail = f": {detail[-1][:200]}" if detail else ""
                self._report(f"{what}: exit status {done.returncode}{tail}")
