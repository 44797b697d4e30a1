"""The virtual gauge as an in-process source (for `rigside demo` and tests): a scenario
spoken as lines and read back by the same parser a real gauge's lines go through.

Samples carry the scenario's time axis (`t_monotonic` = scenario time), so rates and the
stale check follow the scenario at any playback speed.
"""

from __future__ import annotations

import math
import threading
import time
from collections.abc import Iterator

from tui.acquire.lines import LineSplitter
from tui.acquire.options import SourceOptions
from tui.acquire.pacer import Pacer, Playback
from tui.acquire.parse import make_parser
from tui.acquire.profile import GENERIC, load_profile
from tui.acquire.sample import SourceStatus
from tui.acquire.scenario import SILENT, Scenario, load_scenario
from tui.acquire.source import Counters, Item, Source
from tui.acquire.voice import Voice

#: samples per batch when playing as fast as possible
BATCH = 1024
#: at high rates, wake for a group of samples at least this long [s], not for every sample:
#: rendering one sample's frame costs more than the sample (the monitor polls every 50 ms anyway)
MIN_GROUP_S = 0.02


class VirtualGauge(Playback, Source):
    """Plays a scenario; controls as for replays: pause, resume, set_speed, step, seek."""

    def __init__(self, scenario: Scenario, options: SourceOptions = SourceOptions()):
        self.scenario = scenario
        profile = load_profile(options.profile) if options.profile else GENERIC
        self.voice = Voice(scenario, profile)
        self.parser = make_parser(profile, options)
        self.splitter = LineSplitter(profile.terminator, profile.encoding)
        self.pacer = Pacer(options.speed)
        self.counters = Counters()
        self.started_wall = time.time()
        self.description = f"virtual gauge: {scenario.name} ({scenario.origin}, {scenario.rate_hz:g} Hz)"

    @classmethod
    def open(cls, name_or_path: str, options: SourceOptions = SourceOptions()) -> VirtualGauge:
        return cls(load_scenario(name_or_path), options)

    @property
    def duration(self) -> float:
        return math.inf if self.scenario.loop else self.scenario.duration

    def batches(self, stop: threading.Event) -> Iterator[list[Item]]:
        rate, total = self.scenario.rate_hz, self.scenario.samples
        group = max(1, int(rate * MIN_GROUP_S))
        k = 0
        yield [self._status("connected", self.description)]
        while not stop.is_set():
            target = self.pacer.take_seek()
            if target is not None:
                k = max(0, round(target * rate))
            if k >= total and not self.scenario.loop:
                yield [self._status("ended", f"end of scenario {self.scenario.name}")]
                return
            last = k + group - 1 if self.scenario.loop else min(k + group, total) - 1
            if not self.pacer.wait_until(last / rate, stop):
                if self.pacer.paused:
                    yield [self._status("paused", f"paused at {self.position:.1f} s")]
                continue
            j = self.pacer.batch_end(k, BATCH, lambda now: int(now * rate) + 1)
            j = j if self.scenario.loop else min(j, total)  # the clock stops at the last sample
            batch = self._play(k, j)
            k = j
            self.pacer.position = (k - 1) / rate
            if batch:
                yield batch

    def _play(self, k0: int, k1: int) -> list[Item]:
        frames = self.scenario.frames(k0, k1)
        out, c = [], self.counters
        for t, line in zip(frames.t[frames.kind != SILENT].tolist(), self.voice.lines(frames)):
            c.bytes += len(line)
            lines = self.splitter.feed(line)
            c.lines += len(lines)
            out += self.parser.parse(lines, t, self.started_wall + t)
        c.malformed = self.parser.malformed
        return out

    def _status(self, state: str, message: str) -> SourceStatus:
        return SourceStatus(self.pacer.position, self.started_wall + self.pacer.position, state, message)
