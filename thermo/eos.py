"""A fundamental equation of state in the reduced Helmholtz energy, and the properties it gives.

a(rho, T)/(RT) = alpha0(delta, tau) + alphar(delta, tau), delta = rho/rho_r, tau = T_r/T. Every
thermodynamic property at given (rho, T) is a combination of the scaled derivatives of alpha0
and alphar: Span, R. Multiparameter Equations of State, Springer (2000),
doi:10.1007/978-3-662-04092-8; Wagner & Pruss, J. Phys. Chem. Ref. Data 31 (2002) 387, Table 6.3,
doi:10.1063/1.1461829. Molar units inside ([mol/m3], [J/mol]); ``thermo.fluid`` converts to mass.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from thermo.helmholtz import Derivatives, IdealHelmholtz, ResidualHelmholtz


class MolarState(NamedTuple):
    """Properties at given (rho, T), molar basis; arrays of the input shape."""

    rho: np.ndarray  #: density [mol/m3]
    T: np.ndarray  #: temperature [K]
    p: np.ndarray  #: pressure [Pa]
    Z: np.ndarray  #: compressibility factor p/(rho R T) [-]
    u: np.ndarray  #: internal energy [J/mol]
    h: np.ndarray  #: enthalpy [J/mol]
    s: np.ndarray  #: entropy [J/(mol K)]
    g: np.ndarray  #: Gibbs energy [J/mol]
    cv: np.ndarray  #: isochoric heat capacity [J/(mol K)]
    cp: np.ndarray  #: isobaric heat capacity [J/(mol K)]
    w: np.ndarray  #: speed of sound [m/s]
    dp_drho: np.ndarray  #: (dp/drho)_T [Pa m3/mol]
    dp_dT: np.ndarray  #: (dp/dT)_rho [Pa/K]
    kappa_T: np.ndarray  #: isothermal compressibility [1/Pa]
    alpha_p: np.ndarray  #: isobaric expansivity [1/K]
    molar_volume: np.ndarray  #: 1/rho [m3/mol]


class HelmholtzEOS:
    """The reference equation of state of one fluid, built from its data file (``thermo/data``)."""

    def __init__(self, data: dict):
        eos = data["eos"]
        self.data = data  #: the fluid's data file, parsed
        self.key = data["key"]
        self.source = eos["source"]
        self.R = float(eos["gas_constant"])  #: molar gas constant of the equation [J/(mol K)]
        self.M = float(data["molar_mass"])  #: molar mass [kg/mol]
        self.T_r = float(eos["reducing"]["T"])  #: reducing temperature [K]
        self.rho_r = float(eos["reducing"]["rho_molar"])  #: reducing density [mol/m3]
        self.residual = ResidualHelmholtz(eos["residual"])
        self.ideal = IdealHelmholtz(eos["ideal"])

    def reduce(self, rho, T) -> tuple[np.ndarray, np.ndarray]:
        """(delta, tau) [-] from rho [mol/m3] and T [K]."""
        return np.asarray(rho, dtype=float) / self.rho_r, self.T_r / np.asarray(T, dtype=float)

    def alphar(self, delta, tau) -> Derivatives:
        """alphar and its plain first and second derivatives at delta, tau [-] (any shapes)."""
        return self.residual.derivatives(delta, tau)

    def pressure(self, rho, T) -> np.ndarray:
        """p = rho R T (1 + delta alphar_delta) [Pa] at rho [mol/m3], T [K] (Span 2000).

        >>> from thermo.fluid import load_data
        >>> water = HelmholtzEOS(load_data("H2O"))
        >>> round(float(water.pressure(996.556 / water.M, 300.0)) / 1e6, 9)  # IAPWS-95 release, Table 7 (from memory)
        0.099241835
        """
        rho, T = np.broadcast_arrays(np.asarray(rho, dtype=float), np.asarray(T, dtype=float))
        delta, tau = self.reduce(rho.ravel(), T.ravel())
        ad, _ = self.residual.delta_part(delta, self.residual.prepare(tau))
        return (rho.ravel() * self.R * T.ravel() * (1 + ad)).reshape(rho.shape)

    def state(self, rho, T, prepared=None) -> MolarState:
        """All properties at rho [mol/m3] and T [K]; any broadcastable shapes, NaN in -> NaN out.
        ``prepared``: ``residual.prepare(T_r/T)`` for 1-D T, where the caller already has it.

        Formulas (Span 2000; Wagner & Pruss 2002, Table 6.3), with the scaled
        derivatives of ``thermo.helmholtz``:
        Z = 1 + d ar_d;  u/RT = t (a0_t + ar_t);  h/RT = u/RT + Z;  s/R = u/RT - a0 - ar;
        cv/R = -t^2 (a0_tt + ar_tt);  cp/R = cv/R + (1 + d ar_d - dt ar_dt)^2 / (1 + 2 d ar_d + d^2 ar_dd);
        w^2 M/RT = (cp/cv)(1 + 2 d ar_d + d^2 ar_dd);  (dp/drho)_T = RT (1 + 2 d ar_d + d^2 ar_dd);
        (dp/dT)_rho = rho R (1 + d ar_d - dt ar_dt);  kappa_T = 1/(rho dp/drho);  alpha_p = kappa_T dp/dT.
        """
        rho, T = np.broadcast_arrays(np.asarray(rho, dtype=float), np.asarray(T, dtype=float))
        shape = rho.shape
        rho, T = rho.ravel(), T.ravel()
        delta, tau = self.reduce(rho, T)
        r = self.residual.scaled(delta, tau, prepared)
        with np.errstate(divide="ignore", invalid="ignore"):
            a0, a0_t, a0_tt = self.ideal.scaled(delta, tau)
            RT = self.R * T
            Z = 1 + r.d
            stiffness = 1 + 2 * r.d + r.dd  # (dp/drho)_T / RT
            thermal = 1 + r.d - r.dt  # (dp/dT)_rho / (rho R)
            u = RT * (a0_t + r.t)
            cv = -self.R * (a0_tt + r.tt)
            cp = cv + self.R * thermal**2 / stiffness
            dp_drho = RT * stiffness
            dp_dT = rho * self.R * thermal
            kappa_T = 1 / (rho * dp_drho)
            w = np.sqrt(cp / cv * stiffness * RT / self.M)
            s = u / T - self.R * (a0 + r.a)
            values = dict(rho=rho, T=T, p=rho * RT * Z, Z=Z, u=u, h=u + RT * Z, s=s, g=RT * (1 + a0 + r.a + r.d),
                          cv=cv, cp=cp, w=w, dp_drho=dp_drho, dp_dT=dp_dT, kappa_T=kappa_T,
                          alpha_p=kappa_T * dp_dT, molar_volume=1 / rho)
        return MolarState(**{k: v.reshape(shape) for k, v in values.items()})
