"""Melting and sublimation curves: p(T), T(p) and their slopes, vectorized.

Each fluid file holds a ``melting`` and a ``sublimation`` block: the published equation with its
source, range [K] and units [Pa], in one or more parts (water has one melting part per ice).
One small evaluator per equation family, with theta = T/T_0:

==============================  =============================================  ====================
type                            equation                                       used for
==============================  =============================================  ====================
reduced_power_sum               p = p_0 [1 + sum a_i (theta^t_i - 1)]          melting
theta_power_sum                 p = p_0 [1 + sum a_i (theta - 1)^t_i]          melting (CO2)
simon_glatzel                   p = p_0 + a (theta^c - 1)                      melting
log_reduced_power_sum           ln(p/p_0) = theta^-1 sum a_i theta^t_i         sublimation (H2O)
log_reduced_difference_sum      ln(p/p_0) = theta^-1 sum a_i (1 - theta)^t_i   sublimation
log_inverse_power_sum           ln(p/p_0) = sum_i A_i (T/K)^-i, i = 0, 1, ...  sublimation (NH3)
==============================  =============================================  ====================

Where no equation is published the block says ``"published": false`` with a note, and a
documented fallback stands in (every answer that depends on it is flagged approximate):

- ``triple_temperature`` (melting): the melting temperature is T_t at every pressure, a vertical
  line; ``pressure(T)`` is NaN on it, ``temperature(p)`` is T_t.
- ``clausius_clapeyron`` (sublimation): ln(p/p_t) = -(dH/R)(1/T - 1/T_t), dH the vaporization
  enthalpy at the triple point from the equation of state. The true sublimation enthalpy is
  larger by the enthalpy of fusion, so the true curve is steeper and lies below this one.

Both curves are joined to the equation of state's triple point (T_t, p_t): the melting part
that starts at T_t is shifted by p_t - p(T_t), the sublimation curve is scaled by p_t / p(T_t).
The published curves quote their own triple pressure, so the join moves them by the difference
(e.g. 14 Pa for the CO2 melting curve, 0.003 % for its sublimation curve).

The inverses T(p) are piecewise Chebyshev series (``thermo.chebyshev``) fitted to the exact
inverse, per part, in p for melting and in ln p for sublimation; their relative error in T is
below 1e-11 (checked at fit time).
"""

from __future__ import annotations

import functools
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from thermo.chebyshev import ChebyshevPieces, fit_pieces

#: bisection steps for the exact inverse at the fit nodes (2^-64 of a part's span: below rounding)
BISECTIONS = 64
#: relative error in T accepted for the Chebyshev inverses
INVERSE_RTOL = 1e-11
#: a part "starts at the triple point" when one of its ends is this close to T_t [K]
TRIPLE_JOIN_TOLERANCE = 0.01
#: largest relative gap or overlap in p accepted between consecutive parts of one curve
PART_MISMATCH = 1e-5


# ------------------------------------------------------------------ equation families
def _theta(T, T_0):
    return np.asarray(T, dtype=float)[..., None] / T_0


def _reduced_power_sum(T, T_0, p_0, a, t):
    return p_0 * (1.0 + (a * (_theta(T, T_0) ** t - 1.0)).sum(-1))


def _reduced_power_sum_slope(T, T_0, p_0, a, t):
    return p_0 / T_0 * (a * t * _theta(T, T_0) ** (t - 1.0)).sum(-1)


def _theta_power_sum(T, T_0, p_0, a, t):
    return p_0 * (1.0 + (a * (_theta(T, T_0) - 1.0) ** t).sum(-1))


def _theta_power_sum_slope(T, T_0, p_0, a, t):
    return p_0 / T_0 * (a * t * (_theta(T, T_0) - 1.0) ** (t - 1.0)).sum(-1)


def _simon_glatzel(T, T_0, p_0, a, c):
    return p_0 + a * ((np.asarray(T, dtype=float) / T_0) ** c - 1.0)


def _simon_glatzel_slope(T, T_0, p_0, a, c):
    return a * c / T_0 * (np.asarray(T, dtype=float) / T_0) ** (c - 1.0)


def _log_reduced_power_sum(T, T_0, p_0, a, t):
    return np.log(p_0) + (a * _theta(T, T_0) ** (t - 1.0)).sum(-1)


def _log_reduced_power_sum_slope(T, T_0, p_0, a, t):
    return (a * (t - 1.0) * _theta(T, T_0) ** (t - 2.0)).sum(-1) / T_0


def _log_reduced_difference_sum(T, T_0, p_0, a, t):
    theta = _theta(T, T_0)
    return np.log(p_0) + (a * (1.0 - theta) ** t).sum(-1) / theta[..., 0]


def _log_reduced_difference_sum_slope(T, T_0, p_0, a, t):
    theta = _theta(T, T_0)
    y = 1.0 - theta
    series = (a * y**t).sum(-1)
    series_d = (a * t * y ** (t - 1.0)).sum(-1)
    theta = theta[..., 0]
    return -(series / theta**2 + series_d / theta) / T_0


def _log_inverse_power_sum(T, p_0, A):
    inverse = 1.0 / np.asarray(T, dtype=float)[..., None]
    return np.log(p_0) + (A * inverse ** np.arange(len(A))).sum(-1)


def _log_inverse_power_sum_slope(T, p_0, A):
    inverse = 1.0 / np.asarray(T, dtype=float)[..., None]
    i = np.arange(len(A))
    return -(i * A * inverse ** (i + 1)).sum(-1)


def _clausius_clapeyron(T, T_0, p_0, enthalpy, gas_constant):
    return np.log(p_0) - enthalpy / gas_constant * (1.0 / np.asarray(T, dtype=float) - 1.0 / T_0)


def _clausius_clapeyron_slope(T, T_0, p_0, enthalpy, gas_constant):
    return enthalpy / (gas_constant * np.asarray(T, dtype=float) ** 2)


@dataclass(frozen=True)
class Family:
    """One equation form: its parameters, and p (or ln p) and its T-derivative as functions."""

    fields: tuple[str, ...]
    value: Callable
    slope: Callable
    logarithmic: bool  #: value and slope are ln p and d ln p/dT


FAMILIES = {
    "reduced_power_sum": Family(("T_0", "p_0", "a", "t"), _reduced_power_sum, _reduced_power_sum_slope, False),
    "theta_power_sum": Family(("T_0", "p_0", "a", "t"), _theta_power_sum, _theta_power_sum_slope, False),
    "simon_glatzel": Family(("T_0", "p_0", "a", "c"), _simon_glatzel, _simon_glatzel_slope, False),
    "log_reduced_power_sum": Family(("T_0", "p_0", "a", "t"), _log_reduced_power_sum,
                                    _log_reduced_power_sum_slope, True),
    "log_reduced_difference_sum": Family(("T_0", "p_0", "a", "t"), _log_reduced_difference_sum,
                                         _log_reduced_difference_sum_slope, True),
    "log_inverse_power_sum": Family(("p_0", "A"), _log_inverse_power_sum, _log_inverse_power_sum_slope, True),
    "clausius_clapeyron": Family(("T_0", "p_0", "enthalpy", "gas_constant"), _clausius_clapeyron,
                                 _clausius_clapeyron_slope, True),
}
#: fallback types: no published equation behind them
FALLBACKS = ("triple_temperature", "clausius_clapeyron")


# ------------------------------------------------------------------ one part of a curve
@dataclass(frozen=True, eq=False)
class Part:
    """One equation on [T_min, T_max] [K], monotonic there; p = scale * p_equation(T) + shift [Pa]."""

    family: Family
    params: dict
    T_min: float
    T_max: float
    scale: float = 1.0
    shift: float = 0.0

    def pressure(self, T):
        value = self.family.value(T, **self.params)
        if self.family.logarithmic:
            value = np.exp(value)
        return self.scale * value + self.shift

    def dpdT(self, T):
        slope = self.family.slope(T, **self.params)
        if self.family.logarithmic:
            slope = slope * np.exp(self.family.value(T, **self.params))
        return self.scale * slope


def _part(kind: str, block: dict, extra: dict) -> Part:
    """A Part from one entry of a block's ``parts`` list, its fields checked."""
    family = FAMILIES.get(kind)
    if family is None:
        raise ValueError(f"unknown solid-curve type {kind!r}; allowed: {', '.join(FAMILIES)}")
    values = {**block, **extra}
    missing = [f for f in (*family.fields, "T_min", "T_max") if f not in values]
    if missing:
        raise ValueError(f"{kind} part lacks {', '.join(missing)}")
    params = {f: np.asarray(values[f], dtype=float) if isinstance(values[f], list) else float(values[f])
              for f in family.fields}
    lists = [f for f in family.fields if isinstance(values[f], list)]
    if len({len(values[f]) for f in lists}) > 1:
        raise ValueError(f"{kind} part: the lists {', '.join(lists)} differ in length")
    T_min, T_max = float(values["T_min"]), float(values["T_max"])
    if not 0 < T_min < T_max:
        raise ValueError(f"{kind} part: need 0 < T_min < T_max, got {T_min}, {T_max}")
    return Part(family, params, T_min, T_max)


# ------------------------------------------------------------------ inverse of a monotonic p(T)
def fit_inverse(pressure: Callable, T_min: float, T_max: float, p_low: float, p_high: float, *,
                logarithmic: bool) -> ChebyshevPieces:
    """T(x) with x = p [Pa] (or ln p) for a p(T) monotonic on [T_min, T_max] [K] spanning [p_low, p_high].

    Chebyshev pieces fitted to the inverse found by bisection; relative error in T below
    INVERSE_RTOL (``thermo.chebyshev.fit_pieces`` checks it between the nodes).
    """
    rising = bool(pressure(T_max) > pressure(T_min))

    def exact(x: np.ndarray) -> np.ndarray:
        lo, hi = np.full(x.shape, float(T_min)), np.full(x.shape, float(T_max))
        for _ in range(BISECTIONS):
            mid = 0.5 * (lo + hi)
            value = np.log(pressure(mid)) if logarithmic else pressure(mid)
            below = value < x if rising else value > x
            lo, hi = np.where(below, mid, lo), np.where(below, hi, mid)
        return 0.5 * (lo + hi)

    a, b = (np.log(p_low), np.log(p_high)) if logarithmic else (p_low, p_high)
    return fit_pieces(exact, float(a), float(b), rtol=INVERSE_RTOL)[0]


# ------------------------------------------------------------------ curves
class SolidCurve:
    """One solid-fluid boundary of one fluid: melting or sublimation, from its data block.

    pressure(T) [Pa] and dpdT(T) [Pa/K] for T [K] in the curve's range (where several parts
    cover T, as for the ices of water, the first part listed: for water the lowest-pressure
    one, ice Ih); temperature(p) [K] and dTdp(p) [K/Pa] for p [Pa] in its range, single-valued
    (each pressure belongs to one part). NaN outside the ranges and for NaN input.
    """

    def __init__(self, kind: str, parts: tuple[Part, ...], *, published: bool, source: str,
                 triple: tuple[float, float]):
        self.kind = kind  #: "melting" or "sublimation"
        self.parts = parts
        self.published = published  #: False: a documented fallback, answers are approximate
        self.source = source  #: citation, or the note describing the fallback
        self.triple = triple
        self.logarithmic = kind == "sublimation"  #: inverse fitted in ln p

    def __repr__(self) -> str:
        return f"SolidCurve({self.kind!r}, published={self.published})"

    @property
    def T_min(self) -> float:
        return min(part.T_min for part in self.parts)

    @property
    def T_max(self) -> float:
        return max(part.T_max for part in self.parts)

    @functools.cached_property
    def _pressure_ranges(self) -> list[tuple[float, float]]:
        """[p_low, p_high] [Pa] of each part; the end at the triple point is exactly p_t."""
        T_t, p_t = self.triple
        ranges = []
        for part in self.parts:
            ends = [float(part.pressure(part.T_min)), float(part.pressure(part.T_max))]
            for i, T_end in enumerate((part.T_min, part.T_max)):
                if abs(T_end - T_t) <= TRIPLE_JOIN_TOLERANCE:
                    ends[i] = p_t
            ranges.append((min(ends), max(ends)))
        return ranges

    @functools.cached_property
    def _pressure_edges(self) -> np.ndarray:
        """Pressures [Pa] between the parts, in the order of the parts (which must follow each
        other in p). Published neighbours miss each other by a little at the ice triple points
        of water (566, 16 and -653 Pa); the edge is the middle, each part clipped to its own end."""
        ranges = self._pressure_ranges
        edges = [ranges[0][0]]
        for (_, high), (low, _) in zip(ranges, ranges[1:], strict=False):
            if abs(high - low) > PART_MISMATCH * high:
                raise ValueError(f"{self.kind} parts do not meet: one ends at {high} Pa, the next starts at {low} Pa")
            edges.append(0.5 * (high + low))
        return np.array([*edges, ranges[-1][1]])

    @property
    def p_min(self) -> float:
        return float(self._pressure_edges[0])

    @property
    def p_max(self) -> float:
        return float(self._pressure_edges[-1])

    def _by_temperature(self, T, method: str):
        T = np.asarray(T, dtype=float)
        out = np.full(T.shape, np.nan)
        todo = np.isfinite(T)
        for part in self.parts:
            here = todo & (T >= part.T_min) & (T <= part.T_max)
            if here.any():
                out[here] = getattr(part, method)(T[here])
                todo &= ~here
        return out[()] if out.ndim == 0 else out

    def pressure(self, T):
        """Pressure on the curve [Pa] at T [K]."""
        return self._by_temperature(T, "pressure")

    def dpdT(self, T):
        """Slope of the curve dp/dT [Pa/K] at T [K]."""
        return self._by_temperature(T, "dpdT")

    def _x(self, p) -> np.ndarray:
        p = np.asarray(p, dtype=float)
        if not self.logarithmic:
            return p
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.log(p)

    @functools.cached_property
    def _inverses(self) -> list[ChebyshevPieces]:
        """T(x) of each part, x = p or ln p."""
        return [fit_inverse(part.pressure, part.T_min, part.T_max, low, high, logarithmic=self.logarithmic)
                for part, (low, high) in zip(self.parts, self._pressure_ranges, strict=True)]

    def _by_pressure(self, p, derivative: bool):
        fits = self._derivatives if derivative else self._inverses
        x = self._x(p)
        if len(fits) == 1:
            out = np.asarray(fits[0](x), dtype=float)
        else:
            edges = self._x(self._pressure_edges)
            out = np.full(x.shape, np.nan)
            for i, fit in enumerate(fits):
                here = (x >= edges[i]) & ((x < edges[i + 1]) | ((x == edges[i + 1]) & (i == len(fits) - 1)))
                out[here] = fit(np.clip(x[here], fit.edges[0], fit.edges[-1]))
        if derivative and self.logarithmic:
            out = out / np.asarray(p, dtype=float)
        return out[()] if out.ndim == 0 else out

    @functools.cached_property
    def _derivatives(self) -> list[ChebyshevPieces]:
        return [fit.derivative() for fit in self._inverses]

    def temperature(self, p):
        """Temperature on the curve [K] at p [Pa]."""
        return self._by_pressure(p, derivative=False)

    def dTdp(self, p):
        """Slope of the inverse dT/dp [K/Pa] at p [Pa]."""
        return self._by_pressure(p, derivative=True)


class VerticalCurve(SolidCurve):
    """Fallback melting curve T = T_t at every pressure from p_t to p_top [Pa]."""

    def __init__(self, *, source: str, triple: tuple[float, float], p_top: float):
        super().__init__("melting", (), published=False, source=source, triple=triple)
        self.p_top = p_top

    T_min = T_max = property(lambda self: self.triple[0])
    p_min = property(lambda self: self.triple[1])
    p_max = property(lambda self: self.p_top)

    def pressure(self, T):
        """NaN: a vertical line is no function of T."""
        T = np.asarray(T, dtype=float)
        return np.full(T.shape, np.nan)[()]

    dpdT = pressure

    def _on(self, p, value: float):
        p = np.asarray(p, dtype=float)
        return np.where((p >= self.p_min) & (p <= self.p_max), value, np.nan)[()]

    def temperature(self, p):
        """T_t [K] for p_t <= p [Pa] <= p_top."""
        return self._on(p, self.triple[0])

    def dTdp(self, p):
        """0 [K/Pa] on the line."""
        return self._on(p, 0.0)


class MissingCurve(SolidCurve):
    """No solid boundary known (a custom fluid without a triple point): NaN everywhere."""

    def __init__(self, kind: str, *, source: str, T_min: float):
        super().__init__(kind, (), published=False, source=source, triple=(np.nan, np.nan))
        self._T_min = T_min

    T_min = property(lambda self: self._T_min)
    T_max = property(lambda self: np.inf)
    p_min = property(lambda self: 0.0)
    p_max = property(lambda self: np.inf)

    def pressure(self, T):
        return np.full(np.shape(T), np.nan)[()]

    dpdT = temperature = dTdp = pressure


def _joined(parts: list[Part], kind: str, triple: tuple[float, float]) -> tuple[Part, ...]:
    """The parts with the one that ends at T_t moved onto p_t (shifted for melting, scaled for
    sublimation); ValueError if none ends there."""
    T_t, p_t = triple
    out, joined = [], False
    for part in parts:
        if not joined and min(abs(part.T_min - T_t), abs(part.T_max - T_t)) <= TRIPLE_JOIN_TOLERANCE:
            at_triple = float(part.pressure(T_t))
            if kind == "melting":
                part = Part(part.family, part.params, part.T_min, part.T_max, shift=p_t - at_triple)
            else:
                part = Part(part.family, part.params, part.T_min, part.T_max, scale=p_t / at_triple)
            joined = True
        out.append(part)
    if not joined:
        raise ValueError(f"no {kind} part ends at the triple-point temperature {T_t} K")
    return tuple(out)


def curve_from_block(kind: str, block: dict, triple: tuple[float, float], *, p_top: float,
                     gas_constant: float, vaporization_enthalpy: Callable[[], float] | None) -> SolidCurve:
    """The SolidCurve of one ``melting`` or ``sublimation`` data block.

    ``p_top`` [Pa] is where a vertical fallback ends (the equation of state's p_max);
    ``vaporization_enthalpy()`` [J/mol] at the triple point is called only for the
    Clausius-Clapeyron fallback.
    """
    published = bool(block["published"])
    kind_of_equation = block.get("type")
    if kind_of_equation in FALLBACKS and published:
        raise ValueError(f"{kind}: a {kind_of_equation} curve cannot be published")
    source = block["source"] if published else block["note"]
    if kind_of_equation == "triple_temperature":
        return VerticalCurve(source=source, triple=triple, p_top=p_top)
    extra = {}
    if kind_of_equation == "clausius_clapeyron":
        if vaporization_enthalpy is None:
            raise ValueError(f"{kind}: the Clausius-Clapeyron fallback needs the vaporization enthalpy")
        extra = {"T_0": triple[0], "p_0": triple[1], "enthalpy": float(vaporization_enthalpy()),
                 "gas_constant": gas_constant}
    parts = [_part(kind_of_equation, part, extra) for part in block["parts"]]
    return SolidCurve(kind, _joined(parts, kind, triple), published=published, source=source, triple=triple)


# ------------------------------------------------------------------ both curves of a fluid
class SolidCurves:
    """Melting and sublimation curves of one fluid, joined at its triple point.

    ``solid_temperature(p)`` is the temperature below which the fluid freezes at p: on the
    melting curve from p_t up, on the sublimation curve below p_t.
    """

    def __init__(self, melting: SolidCurve, sublimation: SolidCurve, triple: tuple[float, float]):
        self.melting = melting
        self.sublimation = sublimation
        self.triple = triple

    @classmethod
    def from_data(cls, data: dict, *, triple: tuple[float, float] | None = None,
                  vaporization_enthalpy: Callable[[], float] | None = None) -> SolidCurves:
        """The curves of a fluid data file, joined at ``triple`` (T_t [K], p_t [Pa]; default the
        file's): give the equation of state's own vapor pressure at T_t, where the saturation
        curve starts. See ``curve_from_block`` for ``vaporization_enthalpy``."""
        if triple is None:
            triple = (float(data["triple"]["T"]), float(data["triple"]["p"]))
        common = {"p_top": float(data["range"]["p_max"]), "gas_constant": float(data["eos"]["gas_constant"]),
                  "vaporization_enthalpy": vaporization_enthalpy}
        return cls(curve_from_block("melting", data["melting"], triple, **common),
                   curve_from_block("sublimation", data["sublimation"], triple, **common), triple)

    @classmethod
    def unknown(cls, T_min: float, note: str) -> SolidCurves:
        """No solid phase known: nothing is ever solid; T_min [K] is the lowest temperature covered."""
        return cls(MissingCurve("melting", source=note, T_min=T_min),
                   MissingCurve("sublimation", source=note, T_min=T_min), (np.nan, np.nan))

    @property
    def melting_published(self) -> bool:
        """False where the melting curve is a documented fallback (answers are approximate)."""
        return self.melting.published

    @property
    def sublimation_published(self) -> bool:
        """False where the sublimation curve is a documented fallback (answers are approximate)."""
        return self.sublimation.published

    @property
    def T_min(self) -> float:
        """Lowest temperature any curve covers [K]: below it a state cannot be classified."""
        return min(self.melting.T_min, self.sublimation.T_min)

    @property
    def p_top(self) -> float:
        """Highest pressure of the melting curve [Pa]: above it the solid boundary is unknown."""
        return self.melting.p_max

    def _split(self, p, method: str):
        p = np.asarray(p, dtype=float)
        flat = p.reshape(-1)
        out = np.full(flat.shape, np.nan)
        for curve, where in ((self.melting, flat >= self.triple[1]), (self.sublimation, flat < self.triple[1])):
            index = np.flatnonzero(where)  # NaN in neither; indices gather faster than masks
            if index.size:  # a live chunk mostly lies on one side: skip the other curve's fixed cost
                out.put(index, getattr(curve, method)(flat.take(index)))
        return out.reshape(p.shape)

    def solid_temperature(self, p) -> np.ndarray:
        """Freezing temperature T_solid(p) [K]: melting curve for p >= p_t, sublimation below.

        >>> from thermo import fluid
        >>> round(float(fluid("CO2").solid.solid_temperature(101325.0)), 2)  # Span & Wagner (1996): 194.686 K
        194.69
        """
        return self._split(p, "temperature")

    def solid_slope(self, p) -> np.ndarray:
        """dT_solid/dp [K/Pa] of the same curves."""
        return self._split(p, "dTdp")

    def fallback_at(self, p) -> np.ndarray:
        """True where T_solid(p) comes from a fallback curve (answers there are approximate)."""
        p = np.asarray(p, dtype=float)
        return np.where(p >= self.triple[1], not self.melting.published, not self.sublimation.published)
