"""Pure fluids by name: critical and triple points, saturation, density and properties at (T, p).

Each fluid is one file ``thermo/data/<key>.json`` holding its reference equation of state with
the source; files are read lazily with importlib.resources and cached. SI units at this level:
T [K], p [Pa], densities [kg/m3], specific properties per kilogram.
"""

from __future__ import annotations

import functools
import json
from importlib import resources
from typing import NamedTuple

import numpy as np

from thermo.classify import Classification, classify
from thermo.density import DensitySolver
from thermo.eos import HelmholtzEOS
from thermo.saturation import SaturationCurve
from thermo.solid import SolidCurves

#: states per block of vectorized work: large enough to amortize numpy's per-call cost,
#: small enough for the (states x terms) temporaries to stay in cache (DESIGN.md, section 5)
CHUNK = 8192
#: densities are sought up to this multiple of the triple-point liquid density
DENSITY_SEARCH_LIMIT = 3.0

PROPERTY_NAMES = ("density", "molar_volume", "Z", "alpha_p", "kappa_T", "cp", "cv", "speed_of_sound",
                  "enthalpy", "entropy")


class Critical(NamedTuple):
    """The critical point as the source of the fluid's equation of state states it."""

    T: float  #: critical temperature [K]
    p: float  #: critical pressure [Pa]
    rho: float  #: critical density [kg/m3]


class Triple(NamedTuple):
    """The triple point as the equations of a fluid see it: T from the data file, p the equation
    of state's own vapor pressure there, where the saturation curve starts and the solid curves
    are joined (one source of truth for classify and every caller). The published triple
    pressure in the data file differs by the equation's tolerance (propane 0.12 %, ammonia 0.04 %)."""

    T: float  #: triple-point temperature [K]
    p: float  #: triple-point pressure [Pa]: p_sat(T) of the saturation curve


class Range(NamedTuple):
    """The fluid region an equation of state is stated to cover (its source's own words)."""

    T_min: float  #: lowest temperature of the equation's stated range [K]
    T_max: float  #: highest temperature [K]
    p_max: float  #: highest pressure [Pa]
    #: the range starts at the melting curve rather than at T_min for every fluid state above
    #: the triple-point pressure (IAPWS-95: liquid water beside the ices below 273.16 K)
    from_melting_curve: bool = False

    def extrapolated(self, T, p, p_triple: float):
        """Where a fluid state at T [K], p [Pa] lies outside the stated range by temperature:
        colder than T_min, unless the range runs from the melting curve and p >= p_triple [Pa]."""
        cold = T < self.T_min
        return cold & (p < p_triple) if self.from_melting_curve else cold


def _data_dir():
    return resources.files("thermo").joinpath("data")


@functools.cache
def load_data(key: str) -> dict:
    """The parsed data file of the fluid ``key`` (exact key, e.g. "CO2")."""
    return json.loads(_data_dir().joinpath(f"{key}.json").read_text(encoding="utf-8"))


@functools.cache
def _names() -> dict[str, str]:
    """Lower-case key, name and every alias -> key."""
    table = {}
    for entry in sorted(_data_dir().iterdir(), key=lambda e: e.name):
        if entry.name.endswith(".json"):
            data = load_data(entry.name[: -len(".json")])
            for label in (data["key"], data["name"], *data["aliases"]):
                table[label.lower()] = data["key"]
    return table


def fluids() -> list[str]:
    """Keys of the fluids with a reference equation (each accepted by ``fluid``).

    >>> fluids()[:3]
    ['Ar', 'C2H6', 'C3H8']
    """
    return sorted(set(_names().values()))


def fluid(name: str) -> Fluid:
    """The fluid called ``name``: its key, name or an alias, any letter case ("co2", "R-744", "water").

    >>> fluid("R744").critical.T  # Span & Wagner (1996), Table 3
    304.1282
    """
    key = _names().get(str(name).strip().lower())
    if key is None:
        raise ValueError(f"unknown fluid {name!r}; known: {', '.join(fluids())}")
    return _fluid(key)


@functools.cache
def _fluid(key: str) -> Fluid:
    return Fluid(load_data(key))


def _as_arrays(T, p) -> tuple[np.ndarray, np.ndarray, tuple]:
    T, p = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(p, dtype=float))
    return T.ravel(), p.ravel(), T.shape


def _shaped(values: np.ndarray, shape: tuple):
    values = values.reshape(shape)
    return values[()] if values.ndim == 0 else values


class Fluid:
    """One pure fluid and its reference equation of state (``source``)."""

    approximate = False  #: reference-quality equations (custom cubic fluids say True)

    def __init__(self, data: dict):
        self.key: str = data["key"]
        self.name: str = data["name"]
        self.aliases: tuple[str, ...] = tuple(data["aliases"])
        self.molar_mass: float = float(data["molar_mass"])  #: [kg/mol]
        c, t, r = data["critical"], data["triple"], data["range"]
        self.critical = Critical(float(c["T"]), float(c["p"]), float(c["rho"]))
        self.range = Range(float(r["T_min"]), float(r["T_max"]), float(r["p_max"]), bool(r.get("from_melting_curve")))
        self.eos = HelmholtzEOS(data)
        self.source: str = self.eos.source
        self._data = data
        self._solver = DensitySolver(
            self.eos, self.critical.T, self.critical.p, self.critical.rho / self.molar_mass,
            float(data["acentric_factor"]), DENSITY_SEARCH_LIMIT * float(t["rho_liquid"]) / self.molar_mass)

    def __repr__(self) -> str:
        return f"fluid({self.key!r})"

    @functools.cached_property
    def triple(self) -> Triple:
        """Triple point (T [K], p [Pa]); p is where the saturation curve starts (see ``Triple``).

        >>> round(fluid("CO2").triple.p / 1e6, 5)  # Span & Wagner (1996), Table 3, print 0.51795 MPa
        0.51796
        """
        return Triple(float(self._data["triple"]["T"]), float(self.saturation.p_min))

    @functools.cached_property
    def saturation(self) -> SaturationCurve:
        """The vapor-liquid saturation curve solved from the equation of state (``thermo.saturation``):
        pressure(T) [Pa], dpdT(T) [Pa/K], temperature(p) [K], densities(T) [mol/m3]."""
        return SaturationCurve.for_fluid(self.key, self.eos)

    # ------------------------------------------------------------ saturation
    def saturation_pressure(self, T):
        """Vapor pressure p_sat(T) [Pa] for T_triple <= T [K] <= T_c; NaN elsewhere.

        >>> round(float(fluid("H2O").saturation_pressure(450.0)), 1)  # IAPWS-95 Table 8 (from memory)
        932203.6
        """
        T = np.asarray(T, dtype=float)
        return _shaped(np.asarray(self.saturation.pressure(T.ravel())), T.shape)

    def saturation_temperature(self, p):
        """Saturation temperature T_sat(p) [K] for p_triple <= p [Pa] <= p_c; NaN elsewhere.

        >>> round(float(fluid("H2O").saturation_temperature(0.932203564e6)), 6)  # IAPWS-95 Table 8 (from memory)
        450.0
        """
        p = np.asarray(p, dtype=float)
        return _shaped(np.asarray(self.saturation.temperature(p.ravel())), p.shape)

    def saturated_densities(self, T):
        """(rho_liquid, rho_vapor) [kg/m3] on the saturation curve at T [K]; NaN outside it.

        >>> [round(float(rho), 5) for rho in fluid("H2O").saturated_densities(450.0)]
        [890.34125, 4.812]

        (IAPWS-95 release, Table 8, from memory.)
        """
        T = np.asarray(T, dtype=float)
        liquid, vapor = self.saturation.densities(T.ravel())
        return (_shaped(np.asarray(liquid) * self.molar_mass, T.shape),
                _shaped(np.asarray(vapor) * self.molar_mass, T.shape))

    # ------------------------------------------------------------ solid phases (thermo.solid)
    @functools.cached_property
    def solid(self) -> SolidCurves:
        """Melting and sublimation curves with sources and fallback flags, joined at the triple point."""
        return SolidCurves.from_data(self._data, triple=tuple(self.triple),
                                     vaporization_enthalpy=self._triple_vaporization_enthalpy)

    def _triple_vaporization_enthalpy(self) -> float:
        """h_vapor - h_liquid [J/mol] from the equation of state at the triple-point densities of the data file."""
        triple = self._data["triple"]
        rho = np.array([triple["rho_vapor"], triple["rho_liquid"]]) / self.molar_mass
        h_vapor, h_liquid = self.eos.state(rho, self.triple.T).h
        return float(h_vapor - h_liquid)

    def melting_pressure(self, T):
        """Melting pressure [Pa] at T [K]; NaN off the curve and on a vertical fallback. Where
        several ices melt at one T (water), the lowest-pressure one. ``solid.melting`` holds the
        source and ``published`` flag.

        >>> round(float(fluid("water").melting_pressure(260.0)) / 1e6, 3)  # IAPWS R14-08 check value
        138.268
        """
        return self.solid.melting.pressure(T)

    def sublimation_pressure(self, T):
        """Sublimation pressure [Pa] at T [K]; NaN off the curve (``solid.sublimation``: source, flag).

        >>> round(float(fluid("water").sublimation_pressure(230.0)), 4)  # IAPWS R14-08: 8.94735 Pa
        8.9473
        """
        return self.solid.sublimation.pressure(T)

    def melting_temperature(self, p):
        """Melting temperature [K] at p [Pa], single-valued across the ices of water; NaN off the curve.

        >>> round(float(fluid("water").melting_temperature(268.685e6)), 3)  # IAPWS R14-08: ice III
        254.0
        """
        return self.solid.melting.temperature(p)

    def sublimation_temperature(self, p):
        """Sublimation temperature [K] at p [Pa]; NaN off the curve.

        >>> round(float(fluid("CO2").sublimation_temperature(101325.0)), 2)  # Span & Wagner (1996): 194.686 K
        194.69
        """
        return self.solid.sublimation.temperature(p)

    def classify(self, T, p, u_T=0.0, u_p=0.0) -> Classification:
        """Phase labels and margins at T [K], p [Pa] with standard uncertainties u_T [K], u_p [Pa]
        (``thermo.classify``).

        >>> str(fluid("CO2").classify(194.0, 101325.0).phase)  # common practice: dry ice at 1 atm
        'solid'
        """
        return classify(self, T, p, u_T, u_p)

    # ------------------------------------------------------------ single phase
    def _domain(self, T: np.ndarray, p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(fluid, extrapolated): states in the equation's pressure and temperature range that are
        not solid (warmer than T_solid(p), down to the lowest temperature of the solid curves), and
        those of them outside the equation's stated range (``Range.extrapolated``: vapor under the
        sublimation curve; for water not the liquid beside the ices, IAPWS-95 covers it)."""
        inside = (p > 0) & (p <= self.range.p_max) & (T <= self.range.T_max) & (T >= self.solid.T_min)
        with np.errstate(invalid="ignore"):
            inside &= ~(T < self.solid.solid_temperature(p)) & ~(p > self.solid.p_top)
        return inside, inside & self.range.extrapolated(T, p, self.solid.triple[1])

    def _solve_chunk(self, T: np.ndarray, p: np.ndarray, prepared=None) -> np.ndarray:
        """Density [mol/m3] of one chunk of 1-D fluid states (``prepared``: tau factors, if kept).

        Below T_triple the curve's end stands in: liquid above the triple-point pressure, vapor under it."""
        on_curve = np.clip(T, self.triple.T, self.critical.T)
        p_sat = np.where(T < self.critical.T, self.saturation.pressure(on_curve), np.nan)
        rho_liquid, rho_vapor = self.saturation.densities(on_curve)
        return self._solver.solve(T, p, p_sat, rho_liquid, rho_vapor, prepared)

    def density(self, T, p):
        """Density [kg/m3] of the single-phase state at T [K], p [Pa].

        The liquid root where p > p_sat(T) below T_c, the vapor root otherwise; NaN for solid
        states, outside the equation's range, where no stable root was found, and for NaN input.

        >>> round(float(fluid("H2O").density(300.0, 0.992418352e5)), 3)  # IAPWS-95 Table 7 (from memory)
        996.556
        """
        T, p, shape = _as_arrays(T, p)
        use = np.flatnonzero(self._domain(T, p)[0])
        rho = np.full(T.size, np.nan)
        for start in range(0, use.size, CHUNK):
            idx = use[start:start + CHUNK]
            rho[idx] = self._solve_chunk(T[idx], p[idx])
        return _shaped(rho * self.molar_mass, shape)

    def properties(self, T, p) -> dict[str, np.ndarray]:
        """Single-phase properties at T [K], p [Pa], any broadcastable shapes.

        Keys: density [kg/m3], molar_volume [m3/mol], Z [-], alpha_p [1/K], kappa_T [1/Pa],
        cp, cv [J/(kg K)], speed_of_sound [m/s], enthalpy [J/kg], entropy [J/(kg K)] and
        extrapolated [bool] (fluid outside the stated range, ``Range.extrapolated``). NaN where ``density``
        is NaN. Formulas: ``thermo.eos.HelmholtzEOS.state``.

        >>> water = fluid("water").properties(300.0, 0.992418352e5)  # IAPWS-95 Table 7 (from memory)
        >>> round(float(water["cv"]), 2), round(float(water["speed_of_sound"]), 4)
        (4130.18, 1501.5191)
        """
        T, p, shape = _as_arrays(T, p)
        inside, extrapolated = self._domain(T, p)
        use = np.flatnonzero(inside)
        out = {k: np.full(T.size, np.nan) for k in PROPERTY_NAMES}
        for start in range(0, use.size, CHUNK):
            idx = use[start:start + CHUNK]
            t = T[idx]
            prepared = self.eos.residual.prepare(self.eos.T_r / t)
            rho = self._solve_chunk(t, p[idx], prepared)
            s = self.eos.state(rho, t, prepared)
            M = self.molar_mass
            Z = p[idx] / (rho * self.eos.R * t)  # from the given p: 1 + delta ar_d cancels in liquids
            for key, value in (("density", rho * M), ("molar_volume", s.molar_volume), ("Z", Z),
                               ("alpha_p", s.alpha_p), ("kappa_T", s.kappa_T), ("cp", s.cp / M), ("cv", s.cv / M),
                               ("speed_of_sound", s.w), ("enthalpy", s.h / M), ("entropy", s.s / M)):
                out[key][idx] = value
        result = {k: _shaped(v, shape) for k, v in out.items()}
        result["extrapolated"] = _shaped(extrapolated & np.isfinite(out["density"]), shape)
        return result
