"""`rigside watch SOURCE` on the screen (a real terminal, tmux): the gauge's checks run as they do
headless, the --on-alarm hook fires under the screen too (a field rig with a beacon and a
screen), and a custom fluid is shown as approximate. The virtual gauge plays an invented scenario with a bad cable; no mock."""

from __future__ import annotations

import json
import shutil
import sys
import time
import uuid
from pathlib import Path

import pytest

from test_screen_tmux import alive, tmux, wait_for
from test_watch_headless import HOOK
from tui.record import read_table

pytestmark = pytest.mark.skipif(shutil.which("tmux") is None, reason="tmux is not installed (apt-get install tmux)")

ROOT = Path(__file__).resolve().parents[1]


def test_the_screen_runs_the_gauge_checks_and_the_alarm_hook_for_a_custom_fluid(tmp_path):
    (tmp_path / "hook.py").write_text(HOOK)
    hooked = tmp_path / "hook-events.jsonl"
    scenario = ROOT / "fixtures" / "scenarios" / "co2-view-cell-faulty.toml"
    profile = ROOT / "fixtures" / "profiles" / "streaming-regex.toml"  # rate limits 20 bar/s, 5 K/s
    command = " ".join([sys.executable, "-m", "tui.cli", "watch", f"virtual:{scenario}", "--speed", "0",
                        "--profile", str(profile), "--log-dir", str(tmp_path / "logs"),
                        "--custom", "'Tc=304.13 K, pc=73.773 bar, omega=0.2239, M=44.01 g/mol, Tt=216.59 K, name=my CO2'",
                        "--on-alarm", f"'{sys.executable} {tmp_path / 'hook.py'} {hooked}'"])
    name = f"rigside-test-{uuid.uuid4().hex[:8]}"
    env = {"TERM": "xterm-256color", "PYTHONPATH": str(ROOT), "XDG_CONFIG_HOME": str(tmp_path / "config")}
    tmux("new-session", "-d", "-s", name, "-x", "100", "-y", "30",
         *[f"-e{key}={value}" for key, value in env.items()], "-c", str(tmp_path), command)
    try:
        assert "my CO2 (approximate, Peng–Robinson)" in wait_for(name, "margins", timeout=30)
        deadline = time.monotonic() + 30
        while not (hooked.exists() and "sensor-quality" in hooked.read_text()):
            assert time.monotonic() < deadline, "the hook never ran for a sensor-quality alarm"
            time.sleep(0.2)
        tmux("send-keys", "-t", name, "q")
        wait_for(name, "y quits")
        tmux("send-keys", "-t", name, "y")
        deadline = time.monotonic() + 15
        while alive(name):
            assert time.monotonic() < deadline, "the screen did not quit"
            time.sleep(0.2)
    finally:
        if alive(name):
            tmux("kill-session", "-t", name)
    (path,) = (tmp_path / "logs").glob("run-*.csv")
    log = read_table(path, texts=("quality", "reasons"))
    reasons = " ".join(log["reasons"].tolist())
    assert "pressure spike" in reasons  # the validator ran on the screen's path
    assert (log["quality"] != "ok").any()
    calls = [json.loads(line) for line in hooked.read_text().splitlines()]
    alarm = next(call for call in calls if call["RIGSIDE_EVENT_CONDITION"] == "sensor-quality")
    assert alarm["RIGSIDE_EVENT_KIND"] == "alarm" and "sensor quality failure" in alarm["RIGSIDE_EVENT_MESSAGE"]
