"""Two-device setups: pressure from one port, temperature from another, paired by time.

Each device is read in its own thread. Every pressure sample is paired with the temperature
sample nearest to it in time, waiting at most the tolerance for a later one; with none
within the tolerance it goes on with the temperature missing (a failure sample, recorded and
not classified). Lines either device cannot read pass through as failure samples.
"""

from __future__ import annotations

import math
import queue
import threading
import time
from collections import deque
from collections.abc import Iterator
from dataclasses import fields

from tui.acquire.options import SourceOptions
from tui.acquire.profile import GaugeProfile
from tui.acquire.sample import QUALITY_SEVERITY, Sample, SourceStatus
from tui.acquire.serial_source import SerialSource
from tui.acquire.source import WAKE_S, Counters, Item, Source
from tui.errors import UsageError

_RANK = {q: i for i, q in enumerate(QUALITY_SEVERITY)}


def open_pair(spec: str, profile: GaugeProfile, options: SourceOptions) -> PairedSource:
    """Both devices of a two-device profile (ports from SPEC / --temperature-port or the profile),
    or two devices speaking the same profile when only --temperature-port is given."""
    if profile.devices:
        p_profile, t_profile = profile.devices["pressure"], profile.devices["temperature"]
    else:
        p_profile = t_profile = profile
    p_spec = spec or p_profile.port
    t_spec = options.temperature_port or t_profile.port
    for role, where in (("pressure", p_spec), ("temperature", t_spec)):
        if not where:
            option = "SOURCE" if role == "pressure" else "--temperature-port"
            raise UsageError(f"no port for the {role} device: give {option} or `port` in [devices.{role}]")
    tolerance = options.pair_tolerance_s or profile.pair_tolerance_s
    pressure = SerialSource(p_spec, p_profile, options, role="pressure")
    try:
        temperature = SerialSource(t_spec, t_profile, options, role="temperature")
    except UsageError:
        pressure.close()
        raise
    return PairedSource(pressure, temperature, tolerance)


class PairedSource(Source):
    """Pairs a pressure-only and a temperature-only source within `tolerance_s`."""

    def __init__(self, pressure: Source, temperature: Source, tolerance_s: float = 0.5):
        self.devices = {"pressure": pressure, "temperature": temperature}
        self.tolerance_s = tolerance_s
        self.unpaired = 0
        """Pressure samples that found no temperature within the tolerance."""
        self.description = (
            f"pressure from {pressure.description}; temperature from {temperature.description}; "
            f"paired within {tolerance_s:g} s"
        )

    @property
    def counters(self) -> Counters:
        """Both devices' counters added up."""
        a, b = self.devices["pressure"].counters, self.devices["temperature"].counters
        return Counters(**{f.name: getattr(a, f.name) + getattr(b, f.name) for f in fields(Counters)})

    def batches(self, stop: threading.Event) -> Iterator[list[Item]]:
        inbox: queue.Queue = queue.Queue()
        halt = threading.Event()  # also set when the consumer leaves early
        threads = [
            threading.Thread(target=self._pump, args=(role, source, inbox, halt), name=f"{role}-device", daemon=True)
            for role, source in self.devices.items()
        ]
        for thread in threads:
            thread.start()
        try:
            yield from self._merge(inbox, len(threads), stop, halt)
        finally:
            halt.set()

    def _merge(self, inbox: queue.Queue, running: int, stop: threading.Event, halt: threading.Event) -> Iterator[list[Item]]:
        pending: deque[Sample] = deque()
        temperatures: deque[Sample] = deque(maxlen=64)
        while running:
            if stop.is_set():
                halt.set()
            try:
                role, batch = inbox.get(timeout=WAKE_S)
            except queue.Empty:
                role, batch = None, []
            out: list[Item] = []
            if batch is None:
                running -= 1
            elif isinstance(batch, BaseException):
                raise batch
            for item in batch or ():
                if isinstance(item, SourceStatus):
                    out.append(SourceStatus(item.t_monotonic, item.t_wall, item.state, f"{role} device: {item.message}"))
                elif item.reasons and item.reasons[0].startswith("malformed:"):
                    out.append(item)
                elif role == "pressure":
                    pending.append(item)
                else:
                    temperatures.append(item)
            out += self._pair(pending, temperatures, time.monotonic(), final=not running)
            if out:
                yield out

    def _pump(self, role: str, source: Source, inbox: queue.Queue, stop: threading.Event) -> None:
        try:
            for batch in source.batches(stop):
                inbox.put((role, batch))
        except BaseException as exc:  # handed to the consumer thread, which raises it
            inbox.put((role, exc))
        finally:
            inbox.put((role, None))

    def _pair(self, pending: deque, temperatures: deque, now: float, final: bool) -> list[Sample]:
        out = []
        tol = self.tolerance_s
        while pending:
            p = pending[0]
            later = temperatures and temperatures[-1].t_monotonic >= p.t_monotonic
            if not (later or final or now - p.t_monotonic > tol):
                break
            pending.popleft()
            best = min(temperatures, key=lambda s: abs(s.t_monotonic - p.t_monotonic), default=None)
            if best is None or abs(best.t_monotonic - p.t_monotonic) > tol:
                self.unpaired += 1
                out.append(Sample(p.t_monotonic, p.t_wall, p.pressure_Pa, math.nan, p.raw, p.quality,
                                  p.reasons + (f"no temperature within {tol:g} s",), p.pressure_mA))
                continue
            worst = QUALITY_SEVERITY[min(_RANK[p.quality], _RANK[best.quality])]
            out.append(Sample(p.t_monotonic, p.t_wall, p.pressure_Pa, best.temperature_K, f"{p.raw} | {best.raw}",
                              worst, p.reasons + best.reasons, p.pressure_mA, best.temperature_mA))
        return out

    def close(self) -> None:
        for source in self.devices.values():
            source.close()
