"""Liquid-vapor saturation of a Helmholtz-energy equation of state: precise solver and fast curve.

- `solve(eos, T) -> (p, rho_liquid, rho_vapor)`: the phase equilibrium at T, Newton on both
  densities for equal pressure and Gibbs energy (Akasaka 2008), from the fluid's ancillaries.
- `SaturationCurve.for_fluid(key, eos)`: the live path, piecewise Chebyshev series fitted to
  `solve` (after Bell & Deiters 2021) and shipped in thermo/data/saturation/<key>.json (written
  by tests/tools/build_saturation_fits.py); about 0.015 us per state for p_sat(T) or T_sat(p).

Units: T [K], p [Pa], densities [mol/m3].
"""

from __future__ import annotations

import hashlib
import json
from importlib import resources

import numpy as np

from thermo.ancillary import ancillaries
from thermo.chebyshev import ChebyshevPieces, fit_pieces

#: relative step of both densities at which Newton has converged
TOLERANCE = 1e-12
MAX_ITERATIONS = 60
#: below this 1 - T/Tc the ancillaries are too rough a start: a ladder of solved states takes over
LADDER_THETA = 1e-2
#: ratio of successive rungs of the ladder toward Tc
LADDER_RATIO = 0.25
#: a rung is trusted while Newton resolves its densities to this relative step (rounding floor)
LADDER_RESOLUTION = 1e-7
#: no rung closer to Tc than this (about the resolution of T in double precision)
LADDER_END = 1e-14

def _ancillary_start(eos, T):
    """Reduced liquid and vapor densities of the fluid's ancillary equations at T [K]."""
    equations = ancillaries(eos.data)
    return (equations["liquid_density"](T) / eos.rho_r, equations["vapor_density"](T) / eos.rho_r)


def _phase_functions(eos, delta, tau):
    """Akasaka's J = delta (1 + delta ar_d) and K = delta ar_d + ar + ln delta, and dJ/d delta.

    (ar = alphar and its delta derivatives, from the scaled derivatives of ``thermo.helmholtz``.)

    J is p/(rho_r R T) and K is g/(RT) less the part that does not depend on delta, so equal
    J and K in both phases mean equal pressure and equal Gibbs energy; dK/d delta = J_d / delta.
    """
    r = eos.residual.scaled(delta, tau)
    return delta * (1.0 + r.d), r.d + r.a + np.log(delta), 1.0 + 2.0 * r.d + r.dd


def _newton(eos, tau, dL, dV, tol, max_iter):
    """Akasaka's Newton iteration on the reduced densities.

    Returns the new (dL, dV) and the size of each point's last relative step: below tol where
    converged, or the rounding floor where the steps stopped shrinking (next to Tc, where the
    equations lose their condition); NaN densities where the iteration failed.
    """
    dL, dV = dL.copy(), dV.copy()
    size = np.full(dL.size, np.inf)
    todo = np.flatnonzero(np.isfinite(dL) & np.isfinite(dV))
    for _ in range(max_iter):
        if todo.size == 0:
            break
        t, l, v = tau[todo], dL[todo], dV[todo]
        JL, KL, JdL = _phase_functions(eos, l, t)
        JV, KV, JdV = _phase_functions(eos, v, t)
        det = JdV * JdL * (1.0 / l - 1.0 / v)
        step_l = ((KV - KL) * JdV - (JV - JL) * JdV / v) / det
        step_v = ((KV - KL) * JdL - (JV - JL) * JdL / l) / det
        gamma = np.ones_like(l)
        for _halving in range(30):
            bad = ~((v + gamma * step_v > 0) & (l + gamma * step_l > v + gamma * step_v))
            if not bad.any():
                break
            gamma[bad] *= 0.5
        dL[todo], dV[todo] = l + gamma * step_l, v + gamma * step_v
        new = np.maximum(np.abs(step_l / l), np.abs(step_v / v))
        stalled = (new > 0.5 * size[todo]) & (new < 1e-5)
        size[todo] = new
        todo = todo[~((new < tol) | stalled | ~np.isfinite(new))]
    dL[todo] = np.nan
    dV[todo] = np.nan
    return dL, dV, size


def _ladder(eos, smallest, tol, max_iter):
    """Rungs theta_k = LADDER_THETA r^k toward Tc with their solved mean and half-gap of delta.

    Each rung starts from the previous two (power law for the half-gap, straight line for the
    mean). The ladder stops at the first rung below `smallest` or at the first one that Newton
    cannot resolve to LADDER_RESOLUTION in double precision.
    """
    Tc = eos.data["critical"]["T"]
    rungs = np.array([LADDER_THETA / LADDER_RATIO, LADDER_THETA])
    T = Tc * (1.0 - rungs)
    dL, dV, _ = _newton(eos, eos.T_r / T, *_ancillary_start(eos, T), tol, max_iter)
    ladder = [list(rungs), list(0.5 * (dL + dV)), list(0.5 * (dL - dV))]
    while ladder[0][-1] > max(smallest, LADDER_END):
        theta = np.array([ladder[0][-1] * LADDER_RATIO])
        mid, gap = _extrapolate(ladder, theta)
        l, v, size = _newton(eos, eos.T_r / (Tc * (1.0 - theta)), mid + gap, mid - gap, tol, max_iter)
        if not (size[0] <= LADDER_RESOLUTION and l[0] > v[0]):
            break
        for column, value in zip(ladder, (theta[0], 0.5 * (l[0] + v[0]), 0.5 * (l[0] - v[0])), strict=True):
            column.append(value)
    return ladder


def _extrapolate(ladder, theta):
    """Mean and half-gap of the reduced densities at theta from the rung just above each point."""
    rungs, mids, gaps = (np.array(column) for column in ladder)
    k = np.clip(np.searchsorted(-rungs, -theta, side="right") - 1, 1, len(rungs) - 1)
    exponent = np.log(gaps[k] / gaps[k - 1]) / np.log(rungs[k] / rungs[k - 1])
    slope = (mids[k] - mids[k - 1]) / (rungs[k] - rungs[k - 1])
    return mids[k] + slope * (theta - rungs[k]), gaps[k] * (theta / rungs[k]) ** exponent


def near_critical_exponent(eos) -> float:
    """Exponent b of the half-gap power law (rhoL - rhoV) ~ (1 - T/Tc)^b that `solve` follows
    next to Tc (from its last two resolved rungs); 0 where the gap stays open at the stated Tc."""
    rungs, _, gaps = _ladder(eos, 0.0, TOLERANCE, MAX_ITERATIONS)
    return float(np.log(gaps[-1] / gaps[-2]) / np.log(rungs[-1] / rungs[-2]))


def solve(eos, T, *, tol: float = TOLERANCE, max_iter: int = MAX_ITERATIONS):
    """Saturation pressure [Pa] and liquid and vapor densities [mol/m3] at T [K].

    Newton-Raphson on both reduced densities for J(dL) = J(dV) and K(dL) = K(dV), steps halved
    when they would cross the densities or make one negative:

        Akasaka, R. A Reliable and Useful Method to Determine the Saturation State from
        Helmholtz Energy Equations of State. J. Therm. Sci. Technol. 3 (2008) 442-451.
        doi:10.1299/jtst.3.442

    Starts from the fluid's density ancillaries; within 1 % of Tc from a ladder of solved states
    approaching Tc. Iterates until both relative steps are below tol. Next to Tc the equations
    lose their condition in double precision (the density error floor grows about as
    1e-16 / (rhoL - rhoV)^3): closer than the last rung resolved to 1e-7, the densities follow
    the ladder's power law to the critical point. The pressure is that of the vapor phase.
    Returns NaN where T is NaN, outside [T_triple, T_c], or where Newton failed. Scalars in
    give floats out.

    >>> from thermo.fluid import load_data
    >>> from thermo.eos import HelmholtzEOS
    >>> water = HelmholtzEOS(load_data("H2O"))
    >>> p, rho_liquid, rho_vapor = solve(water, 450.0)
    >>> round(p / 1e6, 9), round(rho_liquid * water.M, 6)  # IAPWS-95 two-phase table (from memory)
    (0.932203564, 890.34125)
    """
    T = np.asarray(T, dtype=float)
    flat = T.reshape(-1)
    T_min, Tc = eos.data["triple"]["T"], eos.data["critical"]["T"]
    inside = (flat >= T_min) & (flat <= Tc)
    Ti = flat[inside]
    tau = eos.T_r / Ti
    dL, dV = _ancillary_start(eos, Ti)
    theta = 1.0 - Ti / Tc
    near = theta < LADDER_THETA
    if near.any():
        ladder = _ladder(eos, theta[near].min(), tol, max_iter)
        mid, gap = _extrapolate(ladder, theta[near])
        dL[near], dV[near] = mid + gap, mid - gap
        beyond = theta < ladder[0][-1]  # closer to Tc than the last resolved rung
    else:
        beyond = np.zeros(Ti.shape, bool)
    dL[~beyond], dV[~beyond], _ = _newton(eos, tau[~beyond], dL[~beyond], dV[~beyond], tol, max_iter)
    p = dV * eos.rho_r * eos.R * Ti * (1.0 + eos.residual.scaled(dV, tau).d)
    collapsed = ~((dL > dV) | (beyond & (dL == dV)))  # the trivial solution dL = dV is no answer
    out = np.full((3, flat.size), np.nan)
    for row, values in enumerate((p, dL * eos.rho_r, dV * eos.rho_r)):
        out[row, inside] = np.where(collapsed, np.nan, values)
    if T.ndim == 0:
        return tuple(float(row[0]) for row in out)
    return tuple(row.reshape(T.shape) for row in out)


# ---------------------------------------------------------------- the fast curve
#: (degree, relative tolerance, most halvings) of each fitted curve
FIT_SETTINGS = {"pressure": (8, 1e-12, 12), "temperature": (8, 1e-12, 12), "density": (10, 1e-9, 12)}
#: exponent of the density variable where the stated Tc is not the equation's own critical point
OPEN_GAP_EXPONENT = 0.5

_CURVES: dict[str, SaturationCurve] = {}


def equation_fingerprint(data: dict) -> str:
    """SHA-256 of the blocks a saturation fit depends on (equation, critical and triple point)."""
    blocks = {k: data[k] for k in ("eos", "critical", "triple")}
    return hashlib.sha256(json.dumps(blocks, sort_keys=True).encode()).hexdigest()


class SaturationCurve:
    """The saturation curve of one fluid as piecewise Chebyshev series fitted to `solve`.

    The live path: p_sat(T) and its slope in T, T_sat(p) in ln p, and the saturated densities
    in u = (1 - T/Tc)^b, where b is the near-critical exponent of `solve` (so that the
    densities are smooth in u up to Tc). The "superancillary" idea of

        Bell, I. H.; Deiters, U. K. Superancillary Equations for Cubic Equations of State.
        Ind. Eng. Chem. Res. 60 (2021) 9983-9994. doi:10.1021/acs.iecr.1c00847

    applied to the multiparameter equations of this package. Every call takes scalars (float
    out) or arrays (same shape out); NaN outside [T_min, T_max] = [T_triple, T_c], or
    [p_min, p_max] = [p_sat(T_triple), p_sat(T_c)] for `temperature`, and for NaN input;
    T_sat(p_sat(T)) returns T.
    p_max is the equation's own pressure at the stated T_c: it can differ from the stated p_c
    by that equation's tolerance (CO2 -2e-7 relative; O2 and R-134a, whose equations put
    their critical point a little above the stated one, -3e-5 and -4e-5).

    >>> from thermo import fluid
    >>> round(fluid("water").saturation.temperature(101325.0), 3)  # IAPWS-95 normal boiling point (from memory)
    373.124
    """

    def __init__(self, fit: dict):
        self.header: dict = fit["header"]
        self.T_min: float = fit["T_min"]  #: [K] triple point
        self.T_max: float = fit["T_max"]  #: [K] critical point
        self.p_min: float = fit["p_min"]  #: [Pa] vapor pressure at T_min
        self.p_max: float = fit["p_max"]  #: [Pa] vapor pressure at T_max
        self.exponent: float = fit["exponent"]  #: b of the density variable (1 - T/Tc)^b
        self._pressure = ChebyshevPieces.from_dict(fit["pressure"])
        self._slope = self._pressure.derivative()
        self._temperature = ChebyshevPieces.from_dict(fit["temperature"])
        self._liquid = ChebyshevPieces.from_dict(fit["liquid_density"])
        self._vapor = ChebyshevPieces.from_dict(fit["vapor_density"])

    @classmethod
    def for_fluid(cls, key: str, eos) -> SaturationCurve:
        """The curve of fluid `key` (cached): the shipped fit thermo/data/saturation/<key>.json,
        or, where that file is missing or was fitted to other coefficients, a fit made now."""
        if key not in _CURVES:
            source = resources.files("thermo").joinpath(f"data/saturation/{key}.json")
            fit = json.loads(source.read_text(encoding="utf-8")) if source.is_file() else None
            if fit is None or fit["header"]["equation_sha256"] != equation_fingerprint(eos.data):
                fit = fit_curve(eos)
            _CURVES[key] = cls(fit)
        return _CURVES[key]

    def pressure(self, T):
        """Vapor pressure p_sat [Pa] at T [K]."""
        return self._pressure(T)

    def dpdT(self, T):
        """Slope dp_sat/dT [Pa/K] at T [K] (derivative of the fitted series)."""
        return self._slope(T)

    def temperature(self, p):
        """Saturation temperature T_sat [K] at p [Pa], kept inside [T_min, T_max]."""
        with np.errstate(divide="ignore", invalid="ignore"):
            T = np.clip(self._temperature(np.log(p)), self.T_min, self.T_max)
        return float(T) if T.ndim == 0 else T

    def densities(self, T):
        """(rho_liquid, rho_vapor) [mol/m3] on the saturation curve at T [K]."""
        u = density_variable(T, self.T_max, self.exponent)
        return self._liquid(u), self._vapor(u)


def density_variable(T, Tc: float, exponent: float):
    """u = (1 - T/Tc)^b [-], negative above Tc (so outside every fit)."""
    theta = 1.0 - np.asarray(T, dtype=float) / Tc
    return np.copysign(np.abs(theta) ** exponent, theta)


def _inverse_pressure(pressure: ChebyshevPieces, slope: ChebyshevPieces, ln_p: np.ndarray,
                      T_min: float, T_max: float) -> np.ndarray:
    """T [K] where the fitted p_sat(T) equals exp(ln_p): Newton from the Clausius-Clapeyron line
    through the ends of the curve (ln p linear in 1/T)."""
    ln_low, ln_high = np.log(pressure(np.array([T_min, T_max])))
    share = (ln_p - ln_low) / (ln_high - ln_low)
    T = 1.0 / (1.0 / T_min + share * (1.0 / T_max - 1.0 / T_min))
    target = np.exp(ln_p)
    for _ in range(50):
        step = (pressure(T) - target) / slope(T)
        T = np.clip(T - step, T_min, T_max)
        if np.all(np.abs(step) <= 1e-13 * T):
            break
    return T


def fit_curve(eos) -> dict:
    """Fit the saturation curve of `eos` to `solve`; the dict `SaturationCurve` is built from."""
    T_min, T_max = eos.data["triple"]["T"], eos.data["critical"]["T"]
    exponent = near_critical_exponent(eos)
    if exponent < 0.25:  # the gap stays open at the stated Tc: the densities are smooth in theta
        exponent = OPEN_GAP_EXPONENT
    degree, rtol, depth = FIT_SETTINGS["pressure"]
    pressure, e_p = fit_pieces(lambda T: solve(eos, T)[0], T_min, T_max,
                               degree=degree, rtol=rtol, max_depth=depth, strict=False)
    pressure = ChebyshevPieces.from_dict(pressure.to_dict())  # as shipped, digits trimmed
    slope = pressure.derivative()
    p_min, p_max = pressure(np.array([T_min, T_max]))  # the ends of T_sat(p) are those of the fit
    degree, rtol, depth = FIT_SETTINGS["temperature"]
    temperature, e_T = fit_pieces(lambda x: _inverse_pressure(pressure, slope, x, T_min, T_max),
                                  float(np.log(p_min)), float(np.log(p_max)),
                                  degree=degree, rtol=rtol, max_depth=depth, strict=False)
    degree, rtol, depth = FIT_SETTINGS["density"]
    u_end = float(density_variable(T_min, T_max, exponent))

    def solved(u, phase):
        return solve(eos, T_max * (1.0 - u ** (1.0 / exponent)))[phase]

    liquid, e_L = fit_pieces(lambda u: solved(u, 1), 0.0, u_end, degree=degree, rtol=rtol, max_depth=depth,
                             strict=False)
    vapor, e_V = fit_pieces(lambda u: solved(u, 2), 0.0, u_end, degree=degree, rtol=rtol, max_depth=depth,
                            strict=False)
    header = {
        "fluid": eos.data["key"],
        "equation": eos.source,
        "equation_sha256": equation_fingerprint(eos.data),
        "solver": "thermo.saturation.solve: Akasaka, R. J. Therm. Sci. Technol. 3 (2008) 442-451, "
                  "doi:10.1299/jtst.3.442",
        "fit": "piecewise Chebyshev series, interval halving (Bell, I. H.; Deiters, U. K. Ind. Eng. Chem. Res. "
               "60 (2021) 9983-9994, doi:10.1021/acs.iecr.1c00847)",
        "variables": {"pressure": "T [K] -> p [Pa]", "temperature": "ln(p/Pa) -> T [K]",
                      "liquid_density": "(1 - T/T_max)^exponent -> rho [mol/m3]",
                      "vapor_density": "(1 - T/T_max)^exponent -> rho [mol/m3]"},
        "fit_error": {"pressure": float(e_p.max()), "temperature": float(e_T.max()),
                      "liquid_density": float(e_L.max()), "vapor_density": float(e_V.max())},
        "settings": {k: {"degree": d, "rtol": r, "max_halvings": m} for k, (d, r, m) in FIT_SETTINGS.items()},
    }
    return {"header": header, "T_min": T_min, "T_max": T_max, "p_min": float(p_min), "p_max": float(p_max),
            "exponent": exponent, "pressure": pressure.to_dict(), "temperature": temperature.to_dict(),
            "liquid_density": liquid.to_dict(), "vapor_density": vapor.to_dict()}
