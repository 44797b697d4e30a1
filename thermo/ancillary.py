"""Ancillary saturation equations: vapor pressure and saturated densities as explicit functions of T.

They are fits to each reference equation of state (the ``ancillaries`` block of a fluid file,
with its maximum error), good for starting values and a first phase guess, never for results.
Forms, with theta = 1 - T/T_r [-] (after the auxiliary equations of Wagner & Pruss 2002,
doi:10.1063/1.1461829):

- exponential:      y = y_r exp(sum n_i theta^t_i), times T_r/T inside exp when ``using_tau_r``
- not exponential:  y = y_r (1 + sum n_i theta^t_i)
"""

from __future__ import annotations

import numpy as np

_EXPONENTIAL = {"pL", "pV", "rhoL", "rhoV"}
_LINEAR = {"rhoLnoexp"}


class Ancillary:
    """One saturation ancillary y(T); y in the block's units (Pa or mol/m3), T in [K]."""

    def __init__(self, block: dict):
        kind = block["type"]
        if kind not in _EXPONENTIAL | _LINEAR:
            raise ValueError(f"unknown ancillary type {kind!r}; allowed: {', '.join(sorted(_EXPONENTIAL | _LINEAR))}")
        self.exponential = kind in _EXPONENTIAL
        self.n = np.asarray(block["n"], dtype=float)
        self.t = np.asarray(block["t"], dtype=float)
        if self.n.shape != self.t.shape:
            raise ValueError(f"ancillary {kind}: n and t differ in length")
        self.T_r, self.y_r = float(block["T_r"]), float(block["reducing_value"])
        self.using_tau_r = bool(block["using_tau_r"])
        self.T_min, self.T_max = float(block["T_min"]), float(block["T_max"])
        self.max_error = float(block["max_error_percent"]) / 100

    def _series(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """sum n theta^t and its derivative with respect to theta, for 1-D T."""
        theta = np.clip(1 - T / self.T_r, 1e-300, None)
        powers = np.exp(np.log(theta)[:, None] * self.t)
        return powers @ self.n, (powers / theta[:, None]) @ (self.n * self.t)

    def _log_and_slope(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """ln y (exponential forms) and d ln y/dT [1/K]."""
        s, ds = self._series(T)
        if self.using_tau_r:
            return np.log(self.y_r) + s * self.T_r / T, -s * self.T_r / T**2 - ds / T
        return np.log(self.y_r) + s, -ds / self.T_r

    def __call__(self, T) -> np.ndarray:
        """y(T) for T <= T_r; NaN above T_r (no saturation there)."""
        T = np.asarray(T, dtype=float)
        flat = T.ravel()
        if self.exponential:
            y = np.exp(self._log_and_slope(flat)[0])
        else:
            y = self.y_r * (1 + self._series(flat)[0])
        return np.where(flat <= self.T_r, y, np.nan).reshape(T.shape)

    def inverse(self, y) -> np.ndarray:
        """T [K] where this exponential (vapor-pressure) ancillary equals y, for y between its
        values at T_min and T_r; NaN elsewhere. Newton on ln y from a Clausius-Clapeyron start."""
        y = np.asarray(y, dtype=float)
        flat = y.ravel()
        (l_low, l_high), _ = self._log_and_slope(np.array([self.T_min, self.T_r]))
        with np.errstate(divide="ignore", invalid="ignore"):
            target = np.log(flat)
            inside = (target >= l_low) & (target <= l_high)
            target = np.where(inside, target, 0.5 * (l_low + l_high))
            share = (target - l_low) / (l_high - l_low)
            T = 1 / (1 / self.T_min + share * (1 / self.T_r - 1 / self.T_min))
            for _ in range(20):
                value, slope = self._log_and_slope(T)
                step = (value - target) / slope
                T = np.clip(T - step, 0.5 * self.T_min, self.T_r)
                if np.all(np.abs(step) <= 1e-12 * T):
                    break
        return np.where(inside, T, np.nan).reshape(y.shape)


def ancillaries(data: dict) -> dict[str, Ancillary]:
    """The ``vapor_pressure``, ``liquid_density`` and ``vapor_density`` ancillaries of a fluid file."""
    block = data["ancillaries"]
    return {k: Ancillary(block[k]) for k in ("vapor_pressure", "liquid_density", "vapor_density")}

