"""Ancillary saturation equations: vapor pressure and saturated densities as explicit functions of T.

They are fits to each reference equation of state (the ``ancillaries`` block of a fluid file,
with its maximum error): starting values of the saturation solver, never results.
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
            allowed = ", ".join(sorted(_EXPONENTIAL | _LINEAR))
            raise ValueError(f"unknown ancillary type {kind!r}; allowed: {allowed}")
        self.exponential = kind in _EXPONENTIAL
        self.n = np.asarray(block["n"], dtype=float)
        self.t = np.asarray(block["t"], dtype=float)
        if self.n.shape != self.t.shape:
            raise ValueError(f"ancillary {kind}: n and t differ in length")
        self.T_r, self.y_r = float(block["T_r"]), float(block["reducing_value"])
        self.using_tau_r = bool(block["using_tau_r"])

    def __call__(self, T) -> np.ndarray:
        """y(T) for T <= T_r; NaN above T_r (no saturation there).

        >>> import json, importlib.resources as ir
        >>> data = json.loads(ir.files("thermo").joinpath("data/H2O.json").read_text())
        >>> round(float(ancillaries(data)["vapor_pressure"](450.0)) / 1e6, 3)  # IAPWS-95: 0.932 MPa (from memory)
        0.932
        """
        T = np.asarray(T, dtype=float)
        flat = T.ravel()
        theta = np.clip(1 - flat / self.T_r, 1e-300, None)
        series = np.exp(np.log(theta)[:, None] * self.t) @ self.n
        if not self.exponential:
            y = self.y_r * (1 + series)
        else:
            y = np.exp(np.log(self.y_r) + (series * self.T_r / flat if self.using_tau_r else series))
        return np.where(flat <= self.T_r, y, np.nan).reshape(T.shape)


def ancillaries(data: dict) -> dict[str, Ancillary]:
    """The ``vapor_pressure``, ``liquid_density`` and ``vapor_density`` ancillaries of a fluid file."""
    block = data["ancillaries"]
    return {k: Ancillary(block[k]) for k in ("vapor_pressure", "liquid_density", "vapor_density")}

