"""Custom fluids from four constants: Peng-Robinson volumetrics and Lee-Kesler vapor pressure (approximate).

For a fluid without a reference equation, ``custom_fluid(name, Tc, pc, acentric_factor,
molar_mass)`` gives an object with the calls of ``thermo.Fluid`` (so ``classify`` works), its
name marked "(approximate, Peng–Robinson)" and ``approximate = True`` on every answer.

- Densities: the Peng-Robinson equation,
  p = RT/(v - b) - a(T)/(v^2 + 2bv - b^2), a = 0.45724 R^2 Tc^2/pc alpha(T), b = 0.07780 R Tc/pc
  (the two constants exact, see ``_criticality``),
  alpha = [1 + kappa (1 - sqrt(T/Tc))]^2, kappa = 0.37464 + 1.54226 w - 0.26992 w^2.
  Peng, D.-Y.; Robinson, D. B. A New Two-Constant Equation of State.
  Ind. Eng. Chem. Fundam. 15 (1976) 59-64. doi:10.1021/i160057a011
- Vapor pressure: the Lee-Kesler correlation, ln(p_sat/pc) = f0(Tr) + w f1(Tr),
  f0 = 5.92714 - 6.09648/Tr - 1.28862 ln Tr + 0.169347 Tr^6,
  f1 = 15.2518 - 15.6875/Tr - 13.4721 ln Tr + 0.43577 Tr^6.
  Lee, B. I.; Kesler, M. G. A Generalized Thermodynamic Correlation Based on Three-Parameter
  Corresponding States. AIChE J. 21 (1975) 510-527. doi:10.1002/aic.690210313
- Solid phases: with ``triple_T`` the fallbacks of ``thermo.solid`` (melting at T_t, sublimation
  by Clausius-Clapeyron with the Clapeyron vaporization enthalpy at T_t); without it no solid
  phase is known and the vapor-pressure curve starts at LOWEST_REDUCED_T Tc, which then stands in
  for the triple point.

Caloric properties (cp, cv, speed of sound, enthalpy, entropy) need an ideal-gas heat capacity,
which four constants do not give: they are NaN.
"""

from __future__ import annotations

import functools

import numpy as np

from thermo.fluid import PROPERTY_NAMES, Critical, Fluid, Range, Triple
from thermo.solid import SolidCurves, fit_inverse

#: molar gas constant [J/(mol K)] (CODATA 2018, exact)
R = 8.314462618


def _criticality() -> tuple[float, float, float]:
    """(Z_c, Omega_a, Omega_b): the cubic in Z has a triple root Z_c at Tc, pc when B = 1 - 3 Z_c,
    A = 3 Z_c^2 + 3 B^2 + 2 B and 64 Z_c^3 - 66 Z_c^2 + 24 Z_c - 3 = 0. Peng & Robinson (1976,
    eqs. 9-10) print Omega_a = 0.45724 and Omega_b = 0.07780, these values rounded."""
    roots = np.roots([64.0, -66.0, 24.0, -3.0])
    Z = float(next(r.real for r in roots if abs(r.imag) < 1e-12 and 0 < r.real < 1))
    B = 1 - 3 * Z
    return Z, 3 * Z * Z + 3 * B * B + 2 * B, B


#: critical compressibility factor (0.30740) and the constants of a and b
Z_CRITICAL, OMEGA_A, OMEGA_B = _criticality()
#: kappa(w) of Peng & Robinson (1976), eq. 18
KAPPA = (0.37464, 1.54226, -0.26992)
#: lowest reduced temperature of the vapor-pressure curve when no triple point is given (our choice)
LOWEST_REDUCED_T = 0.3
#: range trusted for a two-constant cubic (our choice): T <= 3 Tc, p <= 10 pc
T_MAX_REDUCED, P_MAX_REDUCED = 3.0, 10.0
#: the fallback sublimation curve runs down to this share of T_t (as for the reference fluids)
SUBLIMATION_T_RATIO = 0.7


class LeeKeslerSaturation:
    """Vapor-pressure curve of the Lee-Kesler correlation, with Peng-Robinson saturated densities.

    pressure(T) [Pa], dpdT(T) [Pa/K] and densities(T) [mol/m3] for T_min <= T [K] <= Tc;
    temperature(p) [K] for p_min <= p [Pa] <= p(Tc); NaN elsewhere.
    """

    def __init__(self, eos: PengRobinson, T_min: float):
        self.eos = eos
        self.T_min, self.T_max = T_min, eos.Tc  #: [K]
        self.p_min, self.p_max = (float(eos.pc * np.exp(self._log_reduced(T))) for T in (T_min, eos.Tc))  #: [Pa]

    def _log_reduced(self, T):
        Tr = np.asarray(T, dtype=float) / self.eos.Tc
        f0 = 5.92714 - 6.09648 / Tr - 1.28862 * np.log(Tr) + 0.169347 * Tr**6
        f1 = 15.2518 - 15.6875 / Tr - 13.4721 * np.log(Tr) + 0.43577 * Tr**6
        return f0 + self.eos.omega * f1

    def _inside(self, T, values):
        T = np.asarray(T, dtype=float)
        return np.where((T >= self.T_min) & (T <= self.T_max), values, np.nan)[()]

    def _pressure(self, T):
        """p_sat [Pa] of the correlation at T [K], wherever it can be evaluated."""
        return self.eos.pc * np.exp(self._log_reduced(T))

    def pressure(self, T):
        """Vapor pressure p_sat [Pa] at T [K]."""
        return self._inside(T, self._pressure(T))

    def dpdT(self, T):
        """Slope dp_sat/dT [Pa/K] at T [K], the derivative of the correlation."""
        Tr = np.asarray(T, dtype=float) / self.eos.Tc
        f0 = 6.09648 / Tr**2 - 1.28862 / Tr + 6 * 0.169347 * Tr**5
        f1 = 15.6875 / Tr**2 - 13.4721 / Tr + 6 * 0.43577 * Tr**5
        return self.pressure(T) * (f0 + self.eos.omega * f1) / self.eos.Tc

    @functools.cached_property
    def _inverse(self):
        return fit_inverse(self._pressure, self.T_min, self.T_max, self.p_min, self.p_max, logarithmic=True)

    def temperature(self, p):
        """Saturation temperature T_sat [K] at p [Pa] (Chebyshev inverse of the correlation)."""
        with np.errstate(divide="ignore", invalid="ignore"):
            return self._inverse(np.log(np.asarray(p, dtype=float)))

    def densities(self, T):
        """(liquid, vapor) Peng-Robinson roots [mol/m3] at (T, p_sat(T))."""
        T = np.asarray(T, dtype=float)
        Z_liquid, Z_vapor = self.eos.compressibility_roots(T, self.pressure(T))
        p = self.pressure(T)
        return (p / (Z_liquid * R * T))[()], (p / (Z_vapor * R * T))[()]


class PengRobinson:
    """The Peng-Robinson equation of one fluid: Tc [K], pc [Pa], acentric factor w [-]."""

    def __init__(self, Tc: float, pc: float, omega: float):
        self.Tc, self.pc, self.omega = Tc, pc, omega
        self.b = OMEGA_B * R * Tc / pc  #: co-volume [m3/mol]
        self.a_c = OMEGA_A * (R * Tc) ** 2 / pc  #: attraction at Tc [Pa m6/mol2]
        self.kappa = KAPPA[0] + KAPPA[1] * omega + KAPPA[2] * omega**2

    def attraction(self, T):
        """(a(T) [Pa m6/mol2], da/dT)."""
        root = np.sqrt(np.asarray(T, dtype=float) / self.Tc)
        m = 1.0 + self.kappa * (1.0 - root)
        return self.a_c * m * m, -self.a_c * self.kappa * m / (root * self.Tc)

    def pressure(self, v, T):
        """p [Pa] at molar volume v [m3/mol] and T [K]."""
        a, _ = self.attraction(T)
        return R * T / (v - self.b) - a / (v * v + 2 * self.b * v - self.b**2)

    def compressibility_roots(self, T, p) -> tuple[np.ndarray, np.ndarray]:
        """(smallest, largest) real root Z > B of the cubic in Z (equal where only one exists).

        Z^3 - (1 - B) Z^2 + (A - 3B^2 - 2B) Z - (AB - B^2 - B^3) = 0, A = a p/(RT)^2, B = b p/(RT),
        solved in closed form (Cardano, trigonometric form for three real roots), then one Newton step.
        """
        T, p = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(p, dtype=float))
        a, _ = self.attraction(T)
        A, B = a * p / (R * T) ** 2, self.b * p / (R * T)
        c2, c1, c0 = -(1 - B), A - 3 * B * B - 2 * B, -(A * B - B * B - B**3)
        P = c1 - c2 * c2 / 3
        Q = 2 * c2**3 / 27 - c2 * c1 / 3 + c0
        D = (Q / 2) ** 2 + (P / 3) ** 3
        with np.errstate(invalid="ignore", divide="ignore"):
            three = D <= 0
            sq = np.sqrt(np.where(three, 0.0, D))
            one = np.cbrt(-Q / 2 + sq) + np.cbrt(-Q / 2 - sq)
            r = 2 * np.sqrt(np.where(three, -P / 3, 0.0))
            phi = np.arccos(np.clip(np.where(r > 0, 3 * Q / (P * r), 0.0), -1.0, 1.0)) / 3
            largest = np.where(three, r * np.cos(phi), one) - c2 / 3
            smallest = np.where(three, r * np.cos(phi + 2 * np.pi / 3), one) - c2 / 3
            smallest = np.where(smallest > B, smallest, largest)
            roots = []
            for Z in (smallest, largest):
                f = ((Z + c2) * Z + c1) * Z + c0
                df = (3 * Z + 2 * c2) * Z + c1
                roots.append(np.where(df != 0, Z - f / df, Z))
        return roots[0], roots[1]


class CubicFluid(Fluid):
    """A fluid known only by Tc, pc, w and M: Fluid's curve and classification calls on a
    Peng-Robinson equation with Lee-Kesler vapor pressure. Everything it answers is approximate."""

    approximate = True

    def __init__(self, name: str, Tc: float, pc: float, acentric_factor: float, molar_mass: float,
                 triple_T: float | None = None):
        for label, value in (("Tc", Tc), ("pc", pc), ("molar_mass", molar_mass)):
            if not (np.isfinite(value) and value > 0):
                raise ValueError(f"custom fluid {name!r}: {label} must be a positive number, got {value!r}")
        if not np.isfinite(acentric_factor):
            raise ValueError(f"custom fluid {name!r}: acentric_factor must be a number, got {acentric_factor!r}")
        if triple_T is not None and not 0 < triple_T < Tc:
            raise ValueError(f"custom fluid {name!r}: triple_T must lie between 0 and Tc = {Tc} K, got {triple_T!r}")
        self.key = name
        self.name = f"{name} (approximate, Peng–Robinson)"
        self.aliases = (name,)
        self.molar_mass = float(molar_mass)
        self.eos = PengRobinson(float(Tc), float(pc), float(acentric_factor))
        self.source = "Peng & Robinson 1976 (doi:10.1021/i160057a011); Lee & Kesler 1975 (doi:10.1002/aic.690210313)"
        T_low = float(triple_T) if triple_T is not None else LOWEST_REDUCED_T * Tc
        self.saturation = LeeKeslerSaturation(self.eos, T_low)
        self.critical = Critical(float(Tc), float(pc), float(pc / (Z_CRITICAL * R * Tc) * molar_mass))
        self.triple = Triple(T_low, float(self.saturation.pressure(T_low)))
        self.range = Range(T_low, T_MAX_REDUCED * Tc, P_MAX_REDUCED * pc)
        self._known_triple = triple_T is not None

    def __repr__(self) -> str:
        return f"custom_fluid({self.key!r})"

    @functools.cached_property
    def solid(self) -> SolidCurves:
        if not self._known_triple:
            return SolidCurves.unknown(self.triple.T, "no triple point given: solid phases are not modelled")
        T_t, p_t = self.triple
        data = {
            "triple": {"T": T_t, "p": p_t}, "range": {"p_max": self.range.p_max}, "eos": {"gas_constant": R},
            "melting": {"published": False, "type": "triple_temperature",
                        "note": "custom fluid: melting temperature taken as the triple-point temperature"},
            "sublimation": {"published": False, "type": "clausius_clapeyron",
                            "note": "custom fluid: Clausius-Clapeyron from the triple point with the "
                                    "vaporization enthalpy there (approximate)",
                            "parts": [{"T_min": SUBLIMATION_T_RATIO * T_t, "T_max": T_t}]},
        }
        return SolidCurves.from_data(data, vaporization_enthalpy=self._triple_vaporization_enthalpy)

    def _triple_vaporization_enthalpy(self) -> float:
        """Clapeyron: T (v_vapor - v_liquid) dp_sat/dT [J/mol] at the triple point."""
        T = self.triple.T
        liquid, vapor = self.saturation.densities(T)
        return float(T * (1 / vapor - 1 / liquid) * self.saturation.dpdT(T))

    def density(self, T, p):
        """Density [kg/m3] at T [K], p [Pa]: the Peng-Robinson liquid root where p > p_sat(T)
        below Tc, the vapor root otherwise; NaN outside the range and for NaN input."""
        T, p = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(p, dtype=float))
        with np.errstate(invalid="ignore", divide="ignore"):
            inside = (p > 0) & (p <= self.range.p_max) & (T >= self.range.T_min) & (T <= self.range.T_max)
            Z_liquid, Z_vapor = self.eos.compressibility_roots(T, p)
            p_sat = self.saturation.pressure(np.clip(T, self.triple.T, self.critical.T))
            liquid = (T < self.critical.T) & (p > p_sat)
            rho = p / (np.where(liquid, Z_liquid, Z_vapor) * R * T) * self.molar_mass
        return np.where(inside, rho, np.nan)[()]

    def properties(self, T, p) -> dict[str, np.ndarray]:
        """density [kg/m3], molar_volume [m3/mol], Z, alpha_p [1/K], kappa_T [1/Pa] from Peng-Robinson;
        cp, cv, speed_of_sound, enthalpy, entropy NaN (no ideal-gas heat capacity)."""
        T, p = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(p, dtype=float))
        shape = T.shape
        rho = np.asarray(self.density(T, p), dtype=float).reshape(-1) / self.molar_mass
        T, p = T.ravel(), p.ravel()
        v = 1 / rho
        a, da_dT = self.eos.attraction(T)
        b = self.eos.b
        denominator = v * v + 2 * b * v - b * b
        dp_dv = -R * T / (v - b) ** 2 + 2 * a * (v + b) / denominator**2
        dp_dT = R / (v - b) - da_dT / denominator
        values = {"density": rho * self.molar_mass, "molar_volume": v, "Z": p * v / (R * T),
                  "kappa_T": -1 / (v * dp_dv), "alpha_p": -dp_dT / (v * dp_dv)}
        out = {key: values.get(key, np.full(T.size, np.nan)).reshape(shape) for key in PROPERTY_NAMES}
        out["extrapolated"] = np.zeros(shape, bool)
        return {key: value[()] if value.ndim == 0 else value for key, value in out.items()}


def custom_fluid(name: str, Tc: float, pc: float, acentric_factor: float, molar_mass: float,
                 triple_T: float | None = None) -> CubicFluid:
    """An approximate fluid from Tc [K], pc [Pa], acentric factor [-], molar mass [kg/mol] and,
    optionally, its triple-point temperature [K] (needed for any solid phase).

    >>> f = custom_fluid("my gas", 304.13, 7.3773e6, 0.2239, 0.04401, triple_T=216.59)
    >>> f.name
    'my gas (approximate, Peng–Robinson)'
    >>> round(float(f.saturation_pressure(304.13)) / 7.3773e6, 4)  # Lee & Kesler 1975: p_sat(Tc) = pc
    1.0
    """
    return CubicFluid(name, Tc, pc, acentric_factor, molar_mass, triple_T)
