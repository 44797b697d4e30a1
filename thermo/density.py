"""Density of a single-phase state rho(T, p) from a Helmholtz equation of state.

Newton on delta for the reduced pressure delta (1 + delta alphar_delta) = p/(rho_r R T), with
the tau-only factors computed once per state. The start is the Peng-Robinson root (Peng &
Robinson, Ind. Eng. Chem. Fundam. 15 (1976) 59, doi:10.1021/i160057a011), and below T_c it is
scaled by the ratio of the reference equation's saturated density to the cubic's on the same
side of the curve, then kept on that side of it:

- vapor: not denser than the saturated vapor; the vapor branch is concave, so Newton from the
  left of the root climbs to it without crossing into the metastable region;
- liquid: not lighter than the saturated liquid; the liquid branch is convex, so after at most
  one step past the root the iterates come down to it from the right;
- T >= T_c: the single root, with a bracket that falls back to bisection where Newton strays.

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
    T, p = np.atleast_1d(np.asarray(T, dtype=float)), np.atleast_1d(np.asarray(p, dtype=float))
    kappa = 0.37464 + 1.54226 * omega - 0.26992 * omega**2
    alpha = (1 + kappa * (1 - np.sqrt(T / T_c))) ** 2
    A = 0.45724 * alpha * (T_c / T) ** 2 * p / p_c
    B = 0.07780 * (T_c / T) * p / p_c
    c2, c1, c0 = -(1 - B), A - 3 * B**2 - 2 * B, -(A * B - B**2 - B**3)
    q = (3 * c1 - c2**2) / 9
    r = (9 * c2 * c1 - 27 * c0 - 2 * c2**3) / 54
    disc = q**3 + r**2
    one = disc > 0  # one real root (Cardano); else three, by the trigonometric form
    Z = np.empty_like(disc)
    root = np.sqrt(disc[one])
    Z[one] = np.cbrt(r[one] + root) + np.cbrt(r[one] - root) - c2[one] / 3
    three = ~one
    minus_q = np.maximum(-q[three], 1e-100)
    angle = np.arccos(np.clip(r[three] / np.sqrt(minus_q**3), -1, 1))
    k = 1 if liquid else 0  # k = 1: the smallest root, k = 0: the largest
    Z[three] = np.maximum(2 * np.sqrt(minus_q) * np.cos((angle + 2 * np.pi * k) / 3) - c2[three] / 3, B[three])
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
              rho_vapor: np.ndarray, prepared=None) -> np.ndarray:
        """Density [mol/m3] at 1-D arrays T [K], p [Pa].

        p_sat [Pa], rho_liquid and rho_vapor [mol/m3] describe the saturation curve at T (NaN at
        T >= T_c): the liquid root is sought where p > p_sat, the vapor root where p <= p_sat,
        the single fluid root at and above T_c.
        ``prepared``: the residual's ``prepare(T_r/T)``, where the caller keeps it for the properties.
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
        if prepared is None:
            prepared = eos.residual.prepare(eos.T_r / T)
        delta, slope = self._newton(prepared, pi, np.clip(start, lo, hi), lo, hi)
        good = (slope > 0) & np.where(liquid, delta > self.delta_c, True) & np.where(vapor, delta < self.delta_c, True)
        return np.where(good, delta * eos.rho_r, np.nan)

    def _peng_robinson(self, T, p, liquid) -> np.ndarray:
        """Peng-Robinson density [mol/m3], liquid root where ``liquid``."""
        rho = np.empty_like(T)
        for branch in (True, False):
            m = liquid == branch
            rho[m] = peng_robinson_density(T[m], p[m], self.T_c, self.p_c, self.omega, self.eos.R, liquid=branch)
        return rho

    def _newton(self, prepared, pi, delta, lo, hi):
        """Safeguarded Newton on delta(1 + delta ar_d) = pi; returns delta and the reduced slope.

        Finished states stay frozen in the working arrays until more than half are finished; only
        then are the arrays compacted (gathering the tau factors costs about one iteration).
        """
        residual = self.eos.residual
        result = np.full(delta.size, np.nan)
        slope_out = np.full(delta.size, np.nan)
        index = np.arange(delta.size)
        finished = np.zeros(delta.size, bool)
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
            done = (np.abs(new - delta) <= STEP_TOLERANCE * new) & ~finished
            result[index[done]] = new[done]
            slope_out[index[done]] = slope[done]
            finished |= done | ~np.isfinite(f)
            if finished.all():
                break
            delta = np.where(finished, delta, new)
            if 2 * finished.sum() > finished.size:
                keep = ~finished
                index, delta, lo, hi, pi = index[keep], delta[keep], lo[keep], hi[keep], pi[keep]
                prepared = _take(prepared, keep)
                finished = finished[keep]
        return result, slope_out
