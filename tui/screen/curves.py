"""The phase boundaries of one fluid as arrays ready to draw, computed once per fluid off the screen's thread.

Pure numpy on top of `thermo`; no Textual. The p–T view needs the saturation, sublimation and
melting curves and the two special points; the p–v view needs the two-phase dome (saturated
densities) and, for the live state, the isotherm through it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: points per curve; enough for a 200-cell-wide diagram, cheap to recompute on a fluid switch
_CURVE_POINTS = 400
#: the whole-range view spans from this fraction of the triple temperature ...
_T_LOW_FACTOR = 0.7
#: ... to this multiple of the critical temperature
_T_HIGH_FACTOR = 1.3
#: and from the triple pressure divided by this ...
_P_LOW_DIVISOR = 100.0
#: ... to the critical pressure times this
_P_HIGH_FACTOR = 20.0


@dataclass(frozen=True, slots=True)
class Curve:
    """A boundary as temperatures [K] and pressures [Pa] (NaN where the curve is undefined)."""

    T: np.ndarray
    p: np.ndarray


@dataclass(frozen=True, slots=True)
class FluidCurves:
    """Everything static a phase diagram of one fluid needs."""

    name: str
    molar_mass: float
    """[kg/mol]"""
    T_critical: float
    p_critical: float
    T_triple: float
    p_triple: float
    saturation: Curve
    sublimation: Curve
    melting: Curve
    dome_v_liquid: np.ndarray
    """Specific volume of the saturated liquid [m³/kg] along `saturation.T`."""
    dome_v_vapor: np.ndarray
    """Specific volume of the saturated vapor [m³/kg] along `saturation.T`."""
    T_range: tuple[float, float]
    """Temperature span of the whole-range view [K]."""
    p_range: tuple[float, float]
    """Pressure span of the whole-range view [Pa]."""


def _finite_within(curve: Curve, p_low: float, p_high: float) -> Curve:
    keep = np.isfinite(curve.p) & (curve.p >= p_low) & (curve.p <= p_high)
    return Curve(curve.T[keep], curve.p[keep])


def melting_curve(fluid, p_low: float, p_high: float, points: int = _CURVE_POINTS) -> Curve:
    """The melting curve between `p_low` and `p_high` [Pa], sampled log-evenly in pressure.

    It rises almost vertically from the triple point (and turns back to colder for ice Ih),
    so a grid in temperature would miss its foot; the temperature is single-valued in p."""
    p = np.geomspace(p_low, p_high, points)
    with np.errstate(all="ignore"):
        T = np.asarray(fluid.melting_temperature(p), dtype=float)
    defined = np.isfinite(T)
    return Curve(T[defined], p[defined])


def fluid_curves(fluid) -> FluidCurves:
    """Sample the boundaries of a `thermo` fluid over the whole-range view."""
    Tc, pc = fluid.critical.T, fluid.critical.p
    Tt, pt = fluid.triple.T, fluid.triple.p
    T_range = (_T_LOW_FACTOR * Tt, _T_HIGH_FACTOR * Tc)
    p_range = (pt / _P_LOW_DIVISOR, _P_HIGH_FACTOR * pc)
    with np.errstate(all="ignore"):
        T_sat = np.linspace(Tt, Tc, _CURVE_POINTS)
        saturation = Curve(T_sat, np.asarray(fluid.saturation_pressure(T_sat), dtype=float))
        T_sub = np.linspace(T_range[0], Tt, _CURVE_POINTS)
        sublimation = Curve(T_sub, np.asarray(fluid.sublimation_pressure(T_sub), dtype=float))
        rho_liquid, rho_vapor = fluid.saturated_densities(T_sat)
    return FluidCurves(
        name=fluid.name,
        molar_mass=fluid.molar_mass,
        T_critical=Tc,
        p_critical=pc,
        T_triple=Tt,
        p_triple=pt,
        saturation=saturation,
        sublimation=_finite_within(sublimation, p_range[0], pt),
        melting=melting_curve(fluid, pt, p_range[1]),
        dome_v_liquid=1.0 / np.asarray(rho_liquid, dtype=float),
        dome_v_vapor=1.0 / np.asarray(rho_vapor, dtype=float),
        T_range=T_range,
        p_range=p_range,
    )


@dataclass(frozen=True, slots=True)
class Isotherm:
    """The live temperature's line on the p–v view: the stable phase's specific volume along a
    pressure grid, and the tie line across the dome when the temperature is below critical."""

    T: float
    """[K]"""
    v: np.ndarray
    """Specific volume [m³/kg] along `p`."""
    p: np.ndarray
    """[Pa], log-spaced."""
    p_saturation: float
    """Saturation pressure at T [Pa]; NaN outside the triple-to-critical range."""
    v_liquid: float
    v_vapor: float
    """Ends of the tie line [m³/kg]; NaN without one."""


def isotherm(fluid, T: float, p_range: tuple[float, float], points: int = 160) -> Isotherm:
    """The isotherm through `T` [K] over `p_range` [Pa] (thermo's density of the stable phase)."""
    p = np.geomspace(p_range[0], p_range[1], points)
    with np.errstate(all="ignore"):
        v = 1.0 / np.asarray(fluid.density(np.full(points, float(T)), p), dtype=float)
        if fluid.triple.T <= T < fluid.critical.T:
            p_sat = float(fluid.saturation_pressure(T))
            rho_liquid, rho_vapor = fluid.saturated_densities(T)
            v_liquid, v_vapor = 1.0 / float(rho_liquid), 1.0 / float(rho_vapor)
        else:
            p_sat = v_liquid = v_vapor = float("nan")
    return Isotherm(float(T), v, p, p_sat, v_liquid, v_vapor)
