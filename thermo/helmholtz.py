"""Reduced Helmholtz energy of a pure fluid, a/(RT) = alpha0(delta, tau) + alphar(delta, tau).

delta = rho/rho_r and tau = T_r/T are the reduced density and inverse temperature [-]. Each
term family of the reference equations has one small evaluator; ``RESIDUAL_FAMILIES`` and
``IDEAL_FAMILIES`` map the block types of ``thermo/data/<key>.json`` to them and check the
blocks before anything is built.

Evaluators return *scaled* derivatives (``Scaled``): a, delta a_d, delta^2 a_dd, tau a_t,
tau^2 a_tt, delta tau a_dt. They are what the property formulas use (Span 2000)
and they stay finite at delta -> 0. Every input is a 1-D float array of states; the tau-only
factors of a block are computed once by ``prepare(tau)`` and reused by ``delta_part`` inside
the density solver's Newton loop. Per-term arrays are term-major, shape (K terms, N states), so
that sums over terms run along contiguous rows.

Term families (n, d, t, l, eta, epsilon, beta, gamma, a, b, A, B, C, D: block arrays):
- power: n delta^d tau^t [exp(-delta^l) when l > 0]; Span (2000).
- gaussian: n delta^d tau^t exp(-eta (delta-epsilon)^2 - beta (tau-gamma)^2); Setzmann & Wagner
  (1991), doi:10.1063/1.555898.
- nonanalytic: n Delta^b delta psi, Delta = theta^2 + B ((delta-1)^2)^a,
  theta = (1-tau) + A ((delta-1)^2)^(1/(2 beta)), psi = exp(-C (delta-1)^2 - D (tau-1)^2);
  Wagner & Pruss (2002), Eq. 6.5 and Table 6.5, doi:10.1063/1.1461829.
- gao_b: n delta^d tau^t exp(eta (delta-epsilon)^2 + 1/(beta (tau-gamma)^2 + b)), with eta < 0
  as stored; Gao et al. (2023), doi:10.1063/5.0128269.

References: Span, R. Multiparameter Equations of State. Springer, Berlin (2000).
doi:10.1007/978-3-662-04092-8
"""

from __future__ import annotations

from typing import Any, NamedTuple

import numpy as np


class Scaled(NamedTuple):
    """Scaled derivatives of a reduced Helmholtz energy [-], one array per field."""

    a: np.ndarray  #: alpha
    d: np.ndarray  #: delta * dalpha/ddelta
    dd: np.ndarray  #: delta^2 * d2alpha/ddelta2
    t: np.ndarray  #: tau * dalpha/dtau
    tt: np.ndarray  #: tau^2 * d2alpha/dtau2
    dt: np.ndarray  #: delta * tau * d2alpha/ddelta dtau

    def __add__(self, other: Scaled) -> Scaled:  # type: ignore[override]
        return Scaled(*(x + y for x, y in zip(self, other, strict=True)))


class Derivatives(NamedTuple):
    """Plain derivatives of the residual Helmholtz energy alphar(delta, tau) [-]."""

    alphar: np.ndarray
    dalphar_ddelta: np.ndarray
    d2alphar_ddelta2: np.ndarray
    dalphar_dtau: np.ndarray
    d2alphar_dtau2: np.ndarray
    d2alphar_ddelta_dtau: np.ndarray


def _arrays(block: dict, fields: tuple[str, ...], kind: str) -> dict[str, np.ndarray]:
    """The block's coefficient arrays as floats, checked for presence and equal length."""
    missing = [f for f in fields if f not in block]
    if missing:
        raise ValueError(f"{kind} block lacks {', '.join(missing)}")
    out = {f: np.atleast_1d(np.asarray(block[f], dtype=float)) for f in fields}
    lengths = {f: v.size for f, v in out.items()}
    if len(set(lengths.values())) != 1:
        raise ValueError(f"{kind} block arrays differ in length: {lengths}")
    return out


def _integer(values: np.ndarray, name: str, kind: str) -> np.ndarray:
    if np.any(values != np.round(values)) or np.any(values < 0):
        raise ValueError(f"{kind} block: exponents {name} must be non-negative integers")
    return values.astype(int)


def _delta_powers(delta: np.ndarray, highest: int) -> np.ndarray:
    """delta^0 .. delta^highest by repeated multiplication, shape (highest + 1, N)."""
    powers = np.empty((highest + 1, delta.size))
    powers[0] = 1.0
    for j in range(1, highest + 1):
        np.multiply(powers[j - 1], delta, out=powers[j])
    return powers


def _column(values: np.ndarray) -> np.ndarray:
    return values[:, None]


def _tau_powers(tau: np.ndarray, t: np.ndarray) -> np.ndarray:
    """tau^t for every term and state, shape (K, N)."""
    return np.exp(_column(t) * np.log(tau))


class PowerTerms:
    """n delta^d tau^t exp(-delta^l) (no exponential where l = 0); Span (2000)."""

    fields = ("n", "d", "t", "l")

    def __init__(self, block: dict):
        c = _arrays(block, self.fields, "power")
        d, l = _integer(c["d"], "d", "power"), _integer(c["l"], "l", "power")
        order = np.lexsort((d, l))
        self.n, self.t, self.d, self.l = c["n"][order], c["t"][order], d[order], l[order]
        self.highest = int(max(self.d.max(), self.l.max()))
        self.t_values, self.t_index = np.unique(self.t, return_inverse=True)  # tau^t once per distinct t
        # one slice of terms per exponent l; the delta sums are matrix products with columns
        # 1, d, d(d-1), 2d-1 (delta part) and t, t(t-1), d t (tau part)
        self.groups = []
        for value in np.unique(self.l):
            sl = np.flatnonzero(self.l == value)
            sl = slice(sl[0], sl[-1] + 1)
            d_, t_ = self.d[sl].astype(float), self.t[sl]
            weights = np.stack([np.ones_like(d_), d_, d_ * (d_ - 1), 2 * d_ - 1, t_, t_ * (t_ - 1), d_ * t_])
            self.groups.append((int(value), sl, weights))

    def prepare(self, tau: np.ndarray) -> np.ndarray:
        return _column(self.n) * _tau_powers(tau, self.t_values)[self.t_index]

    def _sums(self, delta: np.ndarray, prepared: np.ndarray, rows: slice):
        powers = _delta_powers(delta, self.highest)
        terms = prepared * powers[self.d]
        for l, sl, weights in self.groups:
            sums = weights[rows] @ terms[sl]
            if l == 0:
                yield l, None, sums
            else:
                x = powers[l]
                yield l, x, sums * np.exp(-x)

    def delta_part(self, delta: np.ndarray, prepared: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(delta a_d, delta^2 a_dd) with the tau factors of ``prepare``."""
        ad = np.zeros_like(delta)
        add = np.zeros_like(delta)
        for l, x, s in self._sums(delta, prepared, slice(0, 4)):
            one, dd, ddm1, two_dm1 = s
            if x is None:
                ad += dd
                add += ddm1
            else:
                lx = l * x
                ad += dd - lx * one
                add += ddm1 - lx * two_dm1 + lx * lx * one - l * lx * one
        return ad, add

    def scaled(self, delta: np.ndarray, prepared: np.ndarray) -> Scaled:
        a, ad, add, at, att, adt = (np.zeros_like(delta) for _ in range(6))
        for l, x, s in self._sums(delta, prepared, slice(0, 7)):
            one, dd, ddm1, two_dm1, t, ttm1, dt = s
            lx = 0.0 if x is None else l * x
            a += one
            ad += dd - lx * one
            add += ddm1 - lx * two_dm1 + lx * lx * one - l * lx * one
            at += t
            att += ttm1
            adt += dt - lx * t
        return Scaled(a, ad, add, at, att, adt)


def _bell_delta(delta: np.ndarray, d: np.ndarray, eta: np.ndarray, epsilon: np.ndarray):
    """delta^d exp(-eta (delta-epsilon)^2) and its scaled logarithmic derivatives g, g2.

    With f that factor, delta f' = f g and delta^2 f'' = f g2, g = d - 2 eta delta (delta-epsilon),
    g2 = g^2 - d - 2 eta delta^2.
    """
    d, eta, x = _column(d), _column(eta), delta
    dx = x - _column(epsilon)
    f = np.exp(d * np.log(x) - eta * dx * dx)
    g = d - 2 * eta * x * dx
    return f, g, g * g - d - 2 * eta * x * x


class _BellTerms:
    """Shared algebra of the bell-shaped families: n delta^d exp(-eta (delta-eps)^2) times a tau
    factor F(tau) with tau F' = F h and tau^2 F'' = F h2, supplied by ``_tau_factor``."""

    fields: tuple[str, ...] = ()
    kind = ""
    eta_sign = 1.0  #: the delta factor is exp(-eta_sign eta (delta-eps)^2)

    def __init__(self, block: dict):
        c = _arrays(block, self.fields, self.kind)
        self.d = _integer(c["d"], "d", self.kind).astype(float)
        self.eta, self.epsilon = self.eta_sign * c["eta"], c["epsilon"]
        self.coefficients = {k: _column(v) for k, v in c.items()}

    def prepare(self, tau: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        factor, h, h2 = self._tau_factor(tau)
        return self.coefficients["n"] * factor, h, h2

    def delta_part(self, delta: np.ndarray, prepared) -> tuple[np.ndarray, np.ndarray]:
        f, g, g2 = _bell_delta(delta, self.d, self.eta, self.epsilon)
        a = prepared[0] * f
        return (a * g).sum(axis=0), (a * g2).sum(axis=0)

    def scaled(self, delta: np.ndarray, prepared) -> Scaled:
        nf, h, h2 = prepared
        f, g, g2 = _bell_delta(delta, self.d, self.eta, self.epsilon)
        a = nf * f
        ag = a * g
        return Scaled(a.sum(0), ag.sum(0), (a * g2).sum(0), (a * h).sum(0), (a * h2).sum(0), (ag * h).sum(0))


class GaussianTerms(_BellTerms):
    """n delta^d tau^t exp(-eta (delta-epsilon)^2 - beta (tau-gamma)^2); Setzmann & Wagner (1991)."""

    fields = ("n", "d", "t", "eta", "epsilon", "beta", "gamma")
    kind = "gaussian"

    def _tau_factor(self, tau: np.ndarray):
        c = self.coefficients
        t, beta, dx = c["t"], c["beta"], tau - c["gamma"]
        factor = np.exp(t * np.log(tau) - beta * dx * dx)
        h = t - 2 * beta * tau * dx
        return factor, h, h * h - t - 2 * beta * tau * tau


class GaoBTerms(_BellTerms):
    """n delta^d tau^t exp(eta (delta-epsilon)^2 + 1/(beta (tau-gamma)^2 + b)); Gao et al. (2023).

    The delta factor is the Gaussian one with eta -> -eta (the stored eta is negative).
    """

    fields = ("n", "d", "t", "eta", "epsilon", "beta", "gamma", "b")
    kind = "gao_b"
    eta_sign = -1.0

    def _tau_factor(self, tau: np.ndarray):
        c = self.coefficients
        t, beta, dx = c["t"], c["beta"], tau - c["gamma"]
        u = beta * dx * dx + c["b"]
        q1 = -2 * beta * dx / (u * u)  # d(1/u)/dtau
        q2 = -2 * beta / (u * u) + 8 * beta**2 * dx * dx / (u * u * u)
        factor = np.exp(t * np.log(tau) + 1 / u)
        h = t + tau * q1
        return factor, h, h * h - t + tau * tau * q2


class NonAnalyticTerms:
    """n Delta^b delta psi, the critical terms of IAPWS-95 and Span & Wagner (1996).

    Wagner & Pruss (2002), Eq. 6.5 with the derivatives of Table 6.5, written with
    s = (delta-1)^2 so that delta = 1 needs no special case (dDelta/ddelta = (delta-1) X).
    The terms are evaluated only for states where the exponent of psi exceeds
    ``NEGLIGIBLE_EXPONENT``; elsewhere every scaled derivative of them is below 1e-15 for
    delta < 4 (checked in the tests) and counts as zero.
    """

    fields = ("n", "a", "b", "beta", "A", "B", "C", "D")
    NEGLIGIBLE_EXPONENT = -50.0

    def __init__(self, block: dict):
        self.c = {k: _column(v) for k, v in _arrays(block, self.fields, "nonanalytic").items()}

    def prepare(self, tau: np.ndarray) -> np.ndarray:
        return tau

    def delta_part(self, delta: np.ndarray, tau: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        return tuple(self._near(delta, tau, tau_derivatives=False))

    def scaled(self, delta: np.ndarray, tau: np.ndarray) -> Scaled:
        return Scaled(*self._near(delta, tau, tau_derivatives=True))

    def _near(self, delta: np.ndarray, tau: np.ndarray, tau_derivatives: bool) -> list[np.ndarray]:
        """The sums of ``_terms`` where the terms are not negligible, zero elsewhere."""
        C, D = self.c["C"], self.c["D"]
        exponent = -C * (delta - 1) ** 2 - D * (tau - 1) ** 2
        near = np.flatnonzero((exponent > self.NEGLIGIBLE_EXPONENT).any(axis=0))
        out = [np.zeros_like(delta) for _ in range(6 if tau_derivatives else 2)]
        if near.size:
            for total, part in zip(out, self._terms(delta[near], tau[near], tau_derivatives), strict=True):
                total[near] = part
        return out

    def _terms(self, x: np.ndarray, y: np.ndarray, tau_derivatives: bool = True) -> list[np.ndarray]:
        """Scaled derivatives summed over the terms: (a, d, dd, t, tt, dt), or (d, dd) alone."""
        n, a, b, beta, A, B, C, D = (self.c[k] for k in self.fields)
        dm1, tm1 = x - 1, y - 1
        s = np.maximum(dm1 * dm1, 1e-300)  # powers below are of s^e/s with e > 1: 0 at delta = 1
        half = 1 / (2 * beta)
        s_half, s_a = s**half, s**a
        theta = -tm1 + A * s_half
        Dl = theta * theta + B * s_a
        X = (A * theta * (2 / beta) * s_half + 2 * B * a * s_a) / s
        Dl_d = dm1 * X
        Dl_dd = (X + (4 * B * a * (a - 1) * s_a + 2 * A**2 / beta**2 * s_half * s_half
                      + A * theta * (4 / beta) * (half - 1) * s_half) / s)
        Db = Dl**b
        Db1 = b * Db / Dl  # dDelta^b/dDelta
        Db2 = (b - 1) * Db1 / Dl
        Db_d = Db1 * Dl_d
        Db_dd = Db1 * Dl_dd + Db2 * Dl_d * Dl_d
        psi = np.exp(-C * s - D * tm1 * tm1)
        psi_d = -2 * C * dm1 * psi
        psi_dd = (2 * C * s - 1) * 2 * C * psi
        phi_d = n * (Db * (psi + x * psi_d) + Db_d * x * psi)
        phi_dd = n * (Db * (2 * psi_d + x * psi_dd) + 2 * Db_d * (psi + x * psi_d) + Db_dd * x * psi)
        if not tau_derivatives:
            return [(x * phi_d).sum(0), (x * x * phi_dd).sum(0)]
        Db_t = -2 * theta * Db1
        Db_tt = 2 * Db1 + 4 * theta * theta * Db2
        Db_dt = -A * (2 / beta) * Db1 * dm1 * s_half / s - 2 * theta * Db2 * Dl_d
        psi_t = -2 * D * tm1 * psi
        psi_tt = (2 * D * tm1 * tm1 - 1) * 2 * D * psi
        psi_dt = 4 * C * D * dm1 * tm1 * psi
        phi = n * Db * x * psi
        phi_t = n * x * (Db_t * psi + Db * psi_t)
        phi_tt = n * x * (Db_tt * psi + 2 * Db_t * psi_t + Db * psi_tt)
        phi_dt = n * (Db * (psi_t + x * psi_dt) + x * Db_d * psi_t + Db_t * (psi + x * psi_d) + Db_dt * x * psi)
        return [phi.sum(0), (x * phi_d).sum(0), (x * x * phi_dd).sum(0), (y * phi_t).sum(0),
                (y * y * phi_tt).sum(0), (x * y * phi_dt).sum(0)]


RESIDUAL_FAMILIES = {"power": PowerTerms, "gaussian": GaussianTerms, "nonanalytic": NonAnalyticTerms,
                     "gao_b": GaoBTerms}


def _family(block: dict, registry: dict, part: str):
    kind = block.get("type")
    if kind not in registry:
        raise ValueError(f"unknown {part} Helmholtz block type {kind!r}; allowed: {', '.join(registry)}")
    return registry[kind](block)


class ResidualHelmholtz:
    """Sum of the residual term blocks alphar(delta, tau) of one equation of state."""

    def __init__(self, blocks: list[dict]):
        self.families = [_family(b, RESIDUAL_FAMILIES, "residual") for b in blocks]

    def prepare(self, tau: np.ndarray) -> list[Any]:
        """tau-only factors of every block, for repeated ``delta_part`` calls at fixed tau."""
        return [f.prepare(tau) for f in self.families]

    def delta_part(self, delta: np.ndarray, prepared: list[Any]) -> tuple[np.ndarray, np.ndarray]:
        """(delta alphar_d, delta^2 alphar_dd) [-] at the tau of ``prepared``."""
        ad = np.zeros_like(delta)
        add = np.zeros_like(delta)
        for family, p in zip(self.families, prepared, strict=True):
            x, y = family.delta_part(delta, p)
            ad += x
            add += y
        return ad, add

    def scaled(self, delta: np.ndarray, tau: np.ndarray, prepared: list[Any] | None = None) -> Scaled:
        """All scaled derivatives at 1-D arrays delta, tau [-] (``prepared``: ``prepare(tau)``, if at hand)."""
        if prepared is None:
            prepared = self.prepare(tau)
        total = None
        for family, p in zip(self.families, prepared, strict=True):
            part = family.scaled(delta, p)
            total = part if total is None else total + part
        return total

    def derivatives(self, delta, tau) -> Derivatives:
        """alphar and its plain first and second derivatives at any-shape delta, tau [-].

        >>> import json, importlib.resources as ir
        >>> blocks = json.loads(ir.files("thermo").joinpath("data/H2O.json").read_text())["eos"]["residual"]
        >>> r = ResidualHelmholtz(blocks).derivatives(838.025 / 322, 647.096 / 500)  # T = 500 K, rho = 838.025 kg/m3
        >>> round(float(r.alphar), 8)  # IAPWS-95 release, Table 6 (from memory)
        -3.42693206
        """
        delta, tau = np.broadcast_arrays(np.asarray(delta, dtype=float), np.asarray(tau, dtype=float))
        shape = delta.shape
        dl, tl = delta.ravel(), tau.ravel()
        s = self.scaled(dl, tl)
        plain = (s.a, s.d / dl, s.dd / dl**2, s.t / tl, s.tt / tl**2, s.dt / (dl * tl))
        return Derivatives(*(v.reshape(shape) for v in plain))


# ---------------------------------------------------------------- ideal-gas part
class _IdealLead:
    """ln delta + a1 + a2 tau (lead); the delta term is added once by ``IdealHelmholtz``."""

    def __init__(self, block: dict):
        self.a1, self.a2 = float(block["a1"]), float(block["a2"])

    def scaled(self, tau):
        return self.a1 + self.a2 * tau, self.a2 * tau, 0.0 * tau


class _IdealLogTau:
    """a ln tau."""

    def __init__(self, block: dict):
        self.c = float(block["a"])

    def scaled(self, tau):
        return self.c * np.log(tau), self.c + 0.0 * tau, -self.c + 0.0 * tau


class _IdealPower:
    """sum n tau^t."""

    def __init__(self, block: dict):
        c = _arrays(block, ("n", "t"), "ideal power")
        self.n, self.t = c["n"], c["t"]

    def scaled(self, tau):
        terms = _column(self.n) * _tau_powers(tau, self.t)
        return terms.sum(0), self.t @ terms, (self.t * (self.t - 1)) @ terms


class _IdealPlanckEinstein:
    """sum n ln(1 - exp(-t tau)); Span (2000)."""

    def __init__(self, block: dict):
        c = _arrays(block, ("n", "t"), "planck_einstein")
        self.n, self.t = c["n"], c["t"]

    def scaled(self, tau):
        x = _column(self.t) * tau
        e = np.exp(-x)
        r = e / (1 - e)
        return self.n @ np.log1p(-e), self.n @ (x * r), self.n @ (-(x * x) * r / (1 - e))


IDEAL_FAMILIES = {"lead": _IdealLead, "offset": _IdealLead, "log_tau": _IdealLogTau, "power": _IdealPower,
                  "planck_einstein": _IdealPlanckEinstein}


class IdealHelmholtz:
    """alpha0(delta, tau) = ln delta + the tau-only ideal-gas blocks (Span 2000)."""

    def __init__(self, blocks: list[dict]):
        self.families = [_family(b, IDEAL_FAMILIES, "ideal-gas") for b in blocks]
        if not any(b.get("type") == "lead" for b in blocks):
            raise ValueError("ideal-gas part needs a 'lead' block (ln delta + a1 + a2 tau)")

    def scaled(self, delta: np.ndarray, tau: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(alpha0, tau alpha0_t, tau^2 alpha0_tt) [-] at 1-D arrays delta, tau."""
        a, at, att = np.log(delta), np.zeros_like(tau), np.zeros_like(tau)
        for family in self.families:
            x, y, z = family.scaled(tau)
            a = a + x
            at = at + y
            att = att + z
        return a, at, att
