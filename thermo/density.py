"""Density of a single-phase state rho(T, p) from a Helmholtz equation of state.

Newton on delta for the reduced pressure delta (1 + delta alphar_delta) = p/(rho_r R T), with
the tau-only factors computed once per state. Starting values put every state on the side of
its root from which Newton converges monotonically (Span 2000, Sec. 3.4; Lemmon et al. 2018,
REFPROP documentation, from memory):

- vapor below T_c: the ideal gas, left of the root on the concave vapor branch;
- liquid below T_c: the saturated liquid density, after which the convex liquid branch keeps
  the iterates right of the root;
- T >= T_c: the Peng-Robinson root (Peng & Robinson, Ind. Eng. Chem. Fundam. 15 (1976) 59,
  doi:10.1021/i160057a011), with a bracket that falls back to bisection where Newton strays.

A root counts only if it converged, is mechanically stable (dp/drho > 0) and lies on the
requested side of the critical density; elsewhere the result is NaN.
"""

from __future__ import annotations

import numpy as np

from thermo.eos import HelmholtzEOS

#: Newton stops when the step is below this share of delta
STEP_TOLERANCE = 1e-10
MAX_ITERATIONS = 60


def peng_robinson_density(T, p, T_c: float, p_c: float, omega: float, R: float, liquid: bool) -> np.ndarray:
    """Molar density [mol/m3] of the Peng-Robinson cubic at T [K], p [Pa] (Peng & Robinson 1976).

    The smallest real root in Z where ``liquid``, the largest otherwise.
    """
    T, p = np.asarray(T, dtype=float), np.asarray(p, dtype=float)
    kappa = 0.37464 + 1.54226 * omega - 0.26992 * omega**2
    alpha = (1 + kappa * (1 - np.sqrt(T / T_c))) ** 2
    A = 0.45724 * alpha * (T_c / T) ** 2 * p / p_c
    B = 0.07780 * (T_c / T) * p / p_c
    c2, c1, c0 = -(1 - B), A - 3 * B**2 - 2 * B, -(A * B - B**2 - B**3)
    q = (3 * c1 - c2**2) / 9
    r = (9 * c2 * c1 - 27 * c0 - 2 * c2**3) / 54
    disc = q**3 + r**2
    with np.errstate(invalid="ignore", divide="ignore"):
        root = np.sqrt(np.maximum(disc, 0))
        single = np.cbrt(r + root) + np.cbrt(r - root) - c2 / 3
        angle = np.arccos(np.clip(r / np.sqrt(np.maximum(-q, 1e-300) ** 3), -1, 1))
        radius = 2 * np.sqrt(np.maximum(-q, 0))
        three = np.stack([radius * np.cos((angle + 2 * np.pi * k) / 3) for k in range(3)]) - c2 / 3
    pick = three.min(axis=0) if liquid else three.max(axis=0)
    Z = np.where(disc > 0, single, np.maximum(pick, B))
    return p / (Z * R * T)


def _take(tree, keep: np.ndarray):
    """The states ``keep`` (last axis) of every array in a nested list/tuple of per-state arrays."""
    if isinstance(tree, np.ndarray):
        return tree[..., keep]
    return type(tree)(_take(x, keep) for x in tree)


class DensitySolver:
    """rho(T, p) [mol/m3] on the branch chosen by the saturation pressure, for one equation."""

    def __init__(self, eos: HelmholtzEOS, T_c: float, p_c: float, rho_c: float, omega: float, rho_max: float):
        """T_c [K], p_c [Pa], rho_c [mol/m3], omega: acentric factor [-]; rho_max [mol/m3] bounds the search."""
        self.eos = eos
        self.T_c, self.p_c, self.omega = T_c, p_c, omega
        self.delta_c = rho_c / eos.rho_r
        self.delta_max = rho_max / eos.rho_r

    def solve(self, T: np.ndarray, p: np.ndarray, p_sat: np.ndarray, rho_liquid: np.ndarray,
              rho_vapor: np.ndarray) -> np.ndarray:
        """Density [mol/m3] at 1-D arrays T [K], p [Pa].

        p_sat [Pa], rho_liquid and rho_vapor [mol/m3] describe the saturation curve at T (NaN at
        T >= T_c; p_sat = inf marks vapor below the triple point): the liquid root is sought where
        p > p_sat, the vapor root where p <= p_sat, the single fluid root at and above T_c.
        """
        eos = self.eos
        below = T < self.T_c
        liquid = below & (p > p_sat)
        vapor = below & ~liquid
        pi = p / (eos.rho_r * eos.R * T)
        # the cubic's density, corrected by the ratio of the reference equation's saturated
        # density to the cubic's on the same side of the curve, then kept on that side of it
        start = self._peng_robinson(T, p, liquid) / eos.rho_r
        known = np.isfinite(p_sat)
        rho_sat = np.where(liquid, rho_liquid, rho_vapor)
        start[known] *= rho_sat[known] / self._peng_robinson(T[known], p_sat[known], liquid[known])
        start = np.where(liquid, np.fmax(start, rho_liquid / eos.rho_r), start)
        start = np.where(vapor & known, np.fmin(start, rho_vapor / eos.rho_r), start)
        lo = np.where(liquid, self.delta_c, 0.0)
        hi = np.where(vapor, self.delta_c, self.delta_max)
        delta, slope = self._newton(eos.T_r / T, pi, np.clip(start, lo, hi), lo, hi)
        good = (slope > 0) & np.where(liquid, delta > self.delta_c, True) & np.where(vapor, delta < self.delta_c, True)
        return np.where(good, delta * eos.rho_r, np.nan)

    def _peng_robinson(self, T, p, liquid) -> np.ndarray:
        """Peng-Robinson density [mol/m3], liquid root where ``liquid``."""
        rho = np.empty_like(T)
        for branch in (True, False):
            m = liquid == branch
            rho[m] = peng_robinson_density(T[m], p[m], self.T_c, self.p_c, self.omega, self.eos.R, liquid=branch)
        return rho

    def _newton(self, tau, pi, delta, lo, hi):
        """Safeguarded Newton on delta(1 + delta ar_d) = pi; returns delta and the reduced slope."""
        residual = self.eos.residual
        result = np.full(delta.size, np.nan)
        slope_out = np.full(delta.size, np.nan)
        index = np.arange(delta.size)
        prepared = residual.prepare(tau)
        for _ in range(MAX_ITERATIONS):
            ad, add = residual.delta_part(delta, prepared)
            f = delta * (1 + ad) - pi
            slope = 1 + 2 * ad + add
            stable = slope > 0
            lo = np.where(stable & (f < 0), np.maximum(lo, delta), lo)
            hi = np.where(f > 0, np.minimum(hi, delta), hi)
            with np.errstate(divide="ignore", invalid="ignore"):
                new = delta - f / slope
            accepted = stable & (new >= lo) & (new <= hi)
            new = np.where(accepted, new, 0.5 * (lo + hi))
            done = np.abs(new - delta) <= STEP_TOLERANCE * new
            failed = ~np.isfinite(f)
            if done.any() or failed.any():
                result[index[done]] = new[done]
                slope_out[index[done]] = slope[done]
                keep = ~(done | failed)
                if not keep.any():
                    break
                index, new, lo, hi, pi = index[keep], new[keep], lo[keep], hi[keep], pi[keep]
                prepared = _take(prepared, keep)
            delta = new
        return result, slope_out
