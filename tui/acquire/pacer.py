"""Playback clock of replays and the virtual gauge: pace, speed, pause, step and seek.

The player thread asks `wait_until(t)` before it hands out the item at playback time `t`;
the controls (`pause`, `resume`, `set_speed`, `step`, `seek`) may be called from any thread
(a screen's key handler) and take effect at once.
"""

from __future__ import annotations

import math
import threading
import time
from collections.abc import Callable

from tui.acquire.source import WAKE_S


class Pacer:
    """Maps playback time [s] to the wall clock at `speed` (0 or inf: as fast as possible)."""

    def __init__(self, speed: float = 1.0, start: float = 0.0):
        self._lock = threading.Condition()
        self._speed = self._check(speed)
        self._origin_play = start
        self._origin_real = time.monotonic()
        self._paused = False
        self._pause_noticed = False
        self._steps = 0
        self._seek_to: float | None = None
        self.position = start
        """Playback time of the last item handed out [s]."""

    @staticmethod
    def _check(speed: float) -> float:
        speed = float(speed)
        if math.isnan(speed) or speed < 0:
            raise ValueError(f"speed must be zero (as fast as possible) or positive, got {speed}")
        return math.inf if speed == 0 else speed

    @property
    def speed(self) -> float:
        return self._speed

    @property
    def paused(self) -> bool:
        return self._paused

    def set_speed(self, speed: float) -> None:
        with self._lock:
            self._rebase(self.position)
            self._speed = self._check(speed)
            self._lock.notify_all()

    def pause(self) -> None:
        with self._lock:
            self._paused = True
            self._lock.notify_all()

    def resume(self) -> None:
        with self._lock:
            self._paused = self._pause_noticed = False
            self._rebase(self.position)
            self._lock.notify_all()

    def step(self) -> None:
        """While paused: let exactly one more item through."""
        with self._lock:
            self._steps += 1
            self._lock.notify_all()

    def seek(self, t_s: float) -> None:
        """Jump to playback time `t_s`; the player picks it up with `take_seek`."""
        with self._lock:
            self._seek_to = float(t_s)
            self._lock.notify_all()

    @property
    def seek_pending(self) -> bool:
        return self._seek_to is not None

    def take_seek(self) -> float | None:
        """A pending seek target (once), for the player to reposition itself."""
        with self._lock:
            target, self._seek_to = self._seek_to, None
            if target is not None:
                self.position = target
                self._rebase(target)
            return target

    def _rebase(self, play_t: float) -> None:
        self._origin_play, self._origin_real = play_t, time.monotonic()

    def wait_until(self, t: float, stop: threading.Event) -> bool:
        """Block until playback time `t` is due (honouring pause, step, seek and stop).

        Returns False if stopped, a seek is pending (the caller then repositions) or a pause
        has just begun (the caller may report it, then waits again).
        """
        with self._lock:
            while not stop.is_set() and self._seek_to is None:
                if self._paused:
                    if not self._pause_noticed:
                        self._pause_noticed = True
                        return False
                    if self._steps:
                        self._steps -= 1
                        self._rebase(t)
                        break
                    self._lock.wait(WAKE_S)
                    continue
                if self._speed == math.inf:
                    break
                due = self._origin_real + (t - self._origin_play) / self._speed
                left = due - time.monotonic()
                if left <= 0:
                    break
                self._lock.wait(min(left, WAKE_S))
            else:
                return False
            self.position = t
            return True

    def due_now(self) -> float:
        """The playback time that is due now (for sources that play a function of time)."""
        with self._lock:
            if self._paused or self._speed == math.inf:
                return self.position
            return self._origin_play + (time.monotonic() - self._origin_real) * self._speed

    def batch_end(self, i: int, most: int, index_due: Callable[[float], int]) -> int:
        """End (exclusive) of the batch to hand out from item i, once `wait_until` let item i through.

        One item while paused (a step), `most` as fast as possible, else the items due by now
        (at least one, at most `most`); `index_due(t)` is the index after the last item due at t.
        """
        if self.paused:
            return i + 1
        if self.speed == math.inf:
            return i + most
        return max(i + 1, min(index_due(self.due_now()), i + most))


class Playback:
    """The controls of a source that plays at its own pace (replay, virtual gauge), for any thread."""

    pacer: Pacer

    @property
    def position(self) -> float:
        """Playback time of the last sample handed out [s]."""
        return self.pacer.position

    @property
    def paused(self) -> bool:
        return self.pacer.paused

    def pause(self) -> None:
        self.pacer.pause()

    def resume(self) -> None:
        self.pacer.resume()

    def set_speed(self, speed: float) -> None:
        """1 = recorded pace, 10 = ten times faster, 0 = as fast as possible."""
        self.pacer.set_speed(speed)

    def step(self) -> None:
        """While paused: hand out one more sample."""
        self.pacer.step()

    def seek(self, t_s: float) -> None:
        self.pacer.seek(t_s)
