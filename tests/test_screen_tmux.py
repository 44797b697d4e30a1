"""End to end, as a person would: `rigside demo` in a real terminal (tmux), keys sent, the pane read."""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import time
import uuid
from pathlib import Path

import pytest

pytestmark = pytest.mark.skipif(shutil.which("tmux") is None, reason="tmux is not installed (apt-get install tmux)")

RIGSIDE = [sys.executable, "-m", "tui.cli"]
ROOT = Path(__file__).resolve().parents[1]


def tmux(*args: str) -> str:
    return subprocess.run(["tmux", *args], check=True, capture_output=True, text=True).stdout


def pane(name: str) -> str:
    return tmux("capture-pane", "-p", "-t", name)


def wait_for(name: str, text: str, timeout: float = 20.0) -> str:
    deadline = time.monotonic() + timeout
    shown = ""
    while time.monotonic() < deadline:
        shown = pane(name)
        if text in shown:
            return shown
        time.sleep(0.2)
    raise AssertionError(f"{text!r} never appeared; the pane shows:\n{shown}")


def wait_gone(name: str, text: str, timeout: float = 10.0) -> None:
    deadline = time.monotonic() + timeout
    while text in pane(name):
        assert time.monotonic() < deadline, f"{text!r} is still shown"
        time.sleep(0.2)


def alive(name: str) -> bool:
    return subprocess.run(["tmux", "has-session", "-t", name], capture_output=True).returncode == 0


@pytest.fixture
def demo(tmp_path):
    name = f"rigside-test-{uuid.uuid4().hex[:8]}"
    command = " ".join([*RIGSIDE, "demo", "--speed", "5", "--log-dir", str(tmp_path)])
    env = {"TERM": "xterm-256color", "PYTHONPATH": str(ROOT)}
    tmux("new-session", "-d", "-s", name, "-x", "80", "-y", "24",
         *[f"-e{key}={value}" for key, value in env.items()], "-c", str(ROOT), command)
    yield name
    if alive(name):
        tmux("kill-session", "-t", name)


def test_demo_shows_the_state_answers_keys_and_asks_before_quitting(demo, tmp_path):
    screen = wait_for(demo, "margins")
    assert "monitoring aid, not a safety system" in screen
    wait_for(demo, "S/s")
    tmux("send-keys", "-t", demo, "?")
    help_screen = wait_for(demo, "─ keys ─")
    assert "acknowledge" in help_screen.lower() or "ack" in help_screen
    tmux("send-keys", "-t", demo, "Escape")
    wait_gone(demo, "─ keys ─")
    assert "p–T · whole range" in pane(demo)
    tmux("send-keys", "-t", demo, "d")
    wait_for(demo, "p–v · whole range")
    tmux("send-keys", "-t", demo, "z")
    wait_for(demo, "p–v · near now")
    tmux("send-keys", "-t", demo, "q")
    wait_for(demo, "y quits")
    tmux("send-keys", "-t", demo, "y")
    deadline = time.monotonic() + 10
    while alive(demo) and time.monotonic() < deadline:
        time.sleep(0.2)
    assert not alive(demo), "rigside demo did not exit after q, y"
    logs = list(tmp_path.glob("run-*.csv"))
    assert logs and logs[0].stat().st_size > 0
