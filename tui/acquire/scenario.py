"""Invented scenarios for the virtual gauge: ramps and holds of p and T with noise, drift and
faults on request, evaluated as arrays and reproducible from a seed.

A scenario file (TOML; values in the file's own units):

    name = "..."            description = "..."      fluid = "CO2"
    rate_hz = 5             seed = 1                 loop = false
    pressure_unit = "bar"   temperature_unit = "degC"
    start = { pressure = 1.0, temperature = 20.0 }
    [noise]  pressure = 0.02, temperature = 0.03      # standard deviations
    [drift]  pressure = 0.0, temperature = 0.05       # per hour
    [faults] garbage_probability = 0.002, spike_probability = 0.001,
             spike_pressure = 15.0, spike_temperature = 8.0,
             dropouts = [[120, 5]], stuck = [[300, 60]]   # [start s, duration s]
    [[segment]]  duration = 60, pressure = 45.0, temperature = 20.0, label = "..."
                 # a ramp to the values given; a quantity left out holds

Sample k is taken at t = k / rate_hz; its noise, spikes and garbage depend only on (seed, k),
so a scenario played twice, or sought into, gives the same values.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path

import numpy as np

from thermo.units import PressureUnit, TemperatureUnit, UnitError
from tui.acquire.toml_table import TomlTable, parse_toml, read_toml_text
from tui.errors import UsageError

#: samples per block of reproducible random numbers
BLOCK = 1024
#: kinds of sample a scenario plays
NORMAL, GARBAGE, SPIKE, SILENT = 0, 1, 2, 3

_GARBAGE_BYTES = np.frombuffer(bytes(range(256)), dtype=np.uint8)


@dataclass(frozen=True)
class Frames:
    """Samples k0 .. k0 + n - 1 of a scenario (SI values)."""

    k0: int
    t: np.ndarray
    pressure_Pa: np.ndarray
    temperature_K: np.ndarray
    kind: np.ndarray
    garbage: list[bytes]
    """Noise bytes of each GARBAGE sample, in order."""


@dataclass(frozen=True)
class Scenario:
    name: str
    description: str
    fluid: str
    rate_hz: float
    seed: int
    loop: bool
    pressure_unit: PressureUnit
    temperature_unit: TemperatureUnit
    knot_t: np.ndarray
    knot_p: np.ndarray
    knot_T: np.ndarray
    labels: tuple[str, ...]
    noise_p: float = 0.0
    noise_T: float = 0.0
    drift_p: float = 0.0
    """Pa per second."""
    drift_T: float = 0.0
    garbage_probability: float = 0.0
    spike_probability: float = 0.0
    spike_p: float = 0.0
    spike_T: float = 0.0
    dropouts: tuple[tuple[float, float], ...] = ()
    stuck: tuple[tuple[float, float], ...] = ()
    origin: str = field(default="built-in", compare=False)

    @property
    def duration(self) -> float:
        return float(self.knot_t[-1])

    @property
    def samples(self) -> int:
        """Samples in one pass of the scenario."""
        return int(math.floor(self.duration * self.rate_hz)) + 1

    def frames(self, k0: int, k1: int) -> Frames:
        """Samples k0 <= k < k1 (beyond the end: wrap if looping, else nothing)."""
        if not self.loop:
            k1 = min(k1, self.samples)
        k = np.arange(k0, max(k0, k1))
        t = k / self.rate_hz
        local = (k % self.samples) / self.rate_hz if self.loop else t
        frozen = local.copy()
        for start, length in self.stuck:
            inside = (local >= start) & (local < start + length)
            frozen[inside] = start
        p = np.interp(frozen, self.knot_t, self.knot_p) + self.drift_p * frozen
        T = np.interp(frozen, self.knot_t, self.knot_T) + self.drift_T * frozen
        # random draws keyed by the (frozen) sample index: reproducible and stuck when frozen
        draw_k = np.round(frozen * self.rate_hz).astype(np.int64) + (k - k % self.samples if self.loop else 0)
        u = self._uniform(k, 0)
        p = p + self.noise_p * self._normal(draw_k, 1)
        T = T + self.noise_T * self._normal(draw_k, 2)
        kind = np.full(len(k), NORMAL, dtype=np.int8)
        spike = u < self.spike_probability
        sign = np.where(self._uniform(k, 3) < 0.5, -1.0, 1.0)
        p = np.where(spike, p + sign * self.spike_p, p)
        T = np.where(spike, T + sign * self.spike_T, T)
        kind[spike] = SPIKE
        kind[(u >= self.spike_probability) & (u < self.spike_probability + self.garbage_probability)] = GARBAGE
        for start, length in self.dropouts:
            kind[(local >= start) & (local < start + length)] = SILENT
        garbage = [self._noise_bytes(int(i)) for i in k[kind == GARBAGE]]
        return Frames(k0, t, np.maximum(p, 0.0), np.maximum(T, 1e-3), kind, garbage)

    def _uniform(self, k: np.ndarray, stream: int) -> np.ndarray:
        """One uniform draw per sample index from a (seed, stream, block) generator."""
        out = np.empty(len(k))
        blocks = k // BLOCK
        for b in np.unique(blocks):
            where = blocks == b
            draws = np.random.default_rng([self.seed, stream, int(b)]).random(BLOCK)
            out[where] = draws[k[where] % BLOCK]
        return out

    def _normal(self, k: np.ndarray, stream: int) -> np.ndarray:
        """Standard normal draws per sample index (Box-Muller on two uniform streams)."""
        u1 = np.maximum(self._uniform(k, stream), 1e-300)
        u2 = self._uniform(k, stream + 10)
        return np.sqrt(-2.0 * np.log(u1)) * np.cos(2.0 * np.pi * u2)

    def _noise_bytes(self, k: int) -> bytes:
        rng = np.random.default_rng([self.seed, 99, k])
        return bytes(rng.choice(_GARBAGE_BYTES[(_GARBAGE_BYTES != 10) & (_GARBAGE_BYTES != 13)], rng.integers(4, 40)))


def _intervals(faults: TomlTable, key: str) -> tuple[tuple[float, float], ...]:
    """faults.<key>: a list of [start_s, duration_s] pairs of non-negative numbers."""
    value = faults.table.get(key, [])

    def interval(v) -> bool:
        return isinstance(v, list) and len(v) == 2 and all(
            isinstance(x, int | float) and not isinstance(x, bool) and x >= 0 for x in v
        )

    if not isinstance(value, list) or not all(interval(v) for v in value):
        faults.fail(f"faults.{key} must be a list of [start_s, duration_s] pairs, got {value!r}")
    return tuple((float(a), float(b)) for a, b in value)


_TOP = {"name", "description", "fluid", "rate_hz", "seed", "loop", "pressure_unit", "temperature_unit",
        "start", "noise", "drift", "faults", "segment"}
_FAULTS = {"garbage_probability", "spike_probability", "spike_pressure", "spike_temperature", "dropouts", "stuck"}
_QUANTITIES = {"pressure", "temperature"}
_SEGMENT = {"duration", "pressure", "temperature", "label"}


def parse_scenario(text: str, origin: str = "<text>") -> Scenario:
    """A scenario from TOML text; any problem raises a one-line `UsageError`."""
    data = parse_toml(text, "scenario", origin)
    top = TomlTable(data, "top", origin, _TOP, kind="scenario")
    try:
        pu = PressureUnit.from_text(str(data.get("pressure_unit", "bar")))
        tu = TemperatureUnit.from_text(str(data.get("temperature_unit", "degC")))
    except UnitError as exc:
        top.fail(str(exc))
    start = top.sub("start", _QUANTITIES)
    p = start.number("pressure", required=True)
    T = start.number("temperature", required=True)
    segments = data.get("segment", [])
    if not isinstance(segments, list) or not segments or not all(isinstance(s, dict) for s in segments):
        top.fail("needs at least one [[segment]] with a duration")
    knots_t, knots_p, knots_T, labels = [0.0], [p], [T], []
    for n, table in enumerate(segments, 1):
        segment = TomlTable(table, f"segment {n}", origin, _SEGMENT, kind="scenario")
        knots_t.append(knots_t[-1] + segment.number("duration", positive=True, required=True))
        p, T = segment.number("pressure", p), segment.number("temperature", T)
        knots_p.append(p)
        knots_T.append(T)
        labels.append(str(table.get("label", "")))
    noise, drift = top.sub("noise", _QUANTITIES), top.sub("drift", _QUANTITIES)
    faults = top.sub("faults", _FAULTS)
    probabilities = [faults.number(k, 0.0) for k in ("garbage_probability", "spike_probability")]
    if any(not 0 <= q <= 1 for q in probabilities) or sum(probabilities) > 1:
        top.fail("fault probabilities must be between 0 and 1 (and add up to at most 1)")
    p_si, T_si = pu.to_si(np.array(knots_p)), tu.to_si(np.array(knots_T))
    if (p_si < 0).any() or (T_si <= 0).any():
        top.fail("pressures must be at least 0 absolute and temperatures above 0 K")

    def pressure_step(table: TomlTable, key: str) -> float:
        return float(pu.difference_to_si(table.number(key, 0.0)))

    def temperature_step(table: TomlTable, key: str) -> float:
        return float(tu.difference_to_si(table.number(key, 0.0)))

    return Scenario(
        name=str(data.get("name", Path(origin).stem)),
        description=str(data.get("description", "")),
        fluid=str(data.get("fluid", "")),
        rate_hz=top.number("rate_hz", 5.0, positive=True),
        seed=int(top.number("seed", 1)),
        loop=bool(data.get("loop", False)),
        pressure_unit=pu,
        temperature_unit=tu,
        knot_t=np.array(knots_t),
        knot_p=p_si,
        knot_T=T_si,
        labels=tuple(labels),
        noise_p=pressure_step(noise, "pressure"),
        noise_T=temperature_step(noise, "temperature"),
        drift_p=pressure_step(drift, "pressure") / 3600.0,
        drift_T=temperature_step(drift, "temperature") / 3600.0,
        garbage_probability=probabilities[0],
        spike_probability=probabilities[1],
        spike_p=pressure_step(faults, "spike_pressure"),
        spike_T=temperature_step(faults, "spike_temperature"),
        dropouts=_intervals(faults, "dropouts"),
        stuck=_intervals(faults, "stuck"),
        origin=origin,
    )


def builtin_scenarios() -> list[str]:
    """Names of the scenarios shipped inside the package."""
    folder = resources.files("tui.acquire") / "scenarios"
    return sorted(p.name.removesuffix(".toml") for p in folder.iterdir() if p.name.endswith(".toml"))


def load_scenario(name_or_path: str | Path) -> Scenario:
    """A scenario file, or a built-in scenario by name (see `builtin_scenarios`)."""
    text = str(name_or_path)
    builtin = resources.files("tui.acquire") / "scenarios" / f"{text}.toml"
    if "/" not in text and not text.endswith(".toml") and builtin.is_file():
        return parse_scenario(builtin.read_text(encoding="utf-8"), f"built-in {text}")
    path = Path(name_or_path)
    if not path.is_file():
        known = ", ".join(builtin_scenarios())
        raise UsageError(f"scenario {text!r}: no such file or built-in scenario (built-in: {known})")
    return parse_scenario(read_toml_text(path, "scenario"), str(path))
