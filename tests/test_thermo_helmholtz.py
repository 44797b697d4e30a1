"""Helmholtz-energy term evaluators: naive re-implementations, finite differences, published and
reference-library values."""

from __future__ import annotations

import math

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from thermo import fluids
from thermo.fluid import load_data
from thermo.helmholtz import (IDEAL_FAMILIES, RESIDUAL_FAMILIES, IdealHelmholtz, NonAnalyticTerms,
                              ResidualHelmholtz)

RNG = np.random.default_rng(20261201)
DELTA = RNG.uniform(0.05, 3.0, 12)
TAU = RNG.uniform(0.4, 2.5, 12)


# ------------------------------------------------ naive re-implementations of the published forms
def naive_power(b, delta, tau):
    """Span (2000): n delta^d tau^t exp(-delta^l)."""
    total = 0.0
    for n, d, t, l in zip(b["n"], b["d"], b["t"], b["l"]):
        term = n * delta**d * tau**t
        if l > 0:
            term *= math.exp(-(delta**l))
        total += term
    return total


def naive_gaussian(b, delta, tau):
    """Setzmann & Wagner (1991): n delta^d tau^t exp(-eta (delta-eps)^2 - beta (tau-gamma)^2)."""
    return sum(n * delta**d * tau**t * math.exp(-eta * (delta - eps) ** 2 - beta * (tau - gamma) ** 2)
               for n, d, t, eta, eps, beta, gamma in
               zip(b["n"], b["d"], b["t"], b["eta"], b["epsilon"], b["beta"], b["gamma"]))


def naive_nonanalytic(b, delta, tau):
    """Wagner & Pruss (2002), Eq. 6.5: n Delta^b delta psi."""
    total = 0.0
    for n, a, bb, beta, A, B, C, D in zip(*(b[k] for k in ("n", "a", "b", "beta", "A", "B", "C", "D"))):
        theta = (1 - tau) + A * ((delta - 1) ** 2) ** (1 / (2 * beta))
        Delta = theta**2 + B * ((delta - 1) ** 2) ** a
        psi = math.exp(-C * (delta - 1) ** 2 - D * (tau - 1) ** 2)
        total += n * Delta**bb * delta * psi
    return total


def naive_gao_b(b, delta, tau):
    """Gao et al. (2023): n delta^d tau^t exp(eta (delta-eps)^2 + 1/(beta (tau-gamma)^2 + b))."""
    return sum(n * delta**d * tau**t * math.exp(eta * (delta - eps) ** 2 + 1 / (beta * (tau - gamma) ** 2 + bb))
               for n, d, t, eta, eps, beta, gamma, bb in
               zip(b["n"], b["d"], b["t"], b["eta"], b["epsilon"], b["beta"], b["gamma"], b["b"]))


NAIVE = {"power": naive_power, "gaussian": naive_gaussian, "nonanalytic": naive_nonanalytic, "gao_b": naive_gao_b}


def naive_ideal(blocks, delta, tau):
    """Span (2000): ln delta + a1 + a2 tau + a ln tau + sum n tau^t + sum n ln(1 - e^(-t tau))."""
    total = math.log(delta)
    for b in blocks:
        if b["type"] in ("lead", "offset"):
            total += b["a1"] + b["a2"] * tau
        elif b["type"] == "log_tau":
            total += b["a"] * math.log(tau)
        elif b["type"] == "power":
            total += sum(n * tau**t for n, t in zip(b["n"], b["t"]))
        else:
            total += sum(n * math.log(1 - math.exp(-t * tau)) for n, t in zip(b["n"], b["t"]))
    return total


def finite_differences(f, delta, tau):
    """(f, f_d, f_dd, f_t, f_tt, f_dt) by fourth-order central differences."""
    hd, ht = 2e-4 * delta, 2e-4 * tau

    def d1(g, x, h):
        return (g(x - 2 * h) - 8 * g(x - h) + 8 * g(x + h) - g(x + 2 * h)) / (12 * h)

    def d2(g, x, h):
        return (-g(x + 2 * h) + 16 * g(x + h) - 30 * g(x) + 16 * g(x - h) - g(x - 2 * h)) / (12 * h * h)

    return (f(delta, tau), d1(lambda x: f(x, tau), delta, hd), d2(lambda x: f(x, tau), delta, hd),
            d1(lambda y: f(delta, y), tau, ht), d2(lambda y: f(delta, y), tau, ht),
            d1(lambda y: d1(lambda x: f(x, y), delta, hd), tau, ht))


def blocks_of(kind):
    return [pytest.param(key, i, id=f"{key}-{kind}{i}") for key in fluids()
            for i, b in enumerate(load_data(key)["eos"]["residual"]) if b["type"] == kind]


@pytest.mark.parametrize("kind", sorted(RESIDUAL_FAMILIES))
def test_every_family_is_used_by_some_fluid(kind):
    assert blocks_of(kind)


@pytest.mark.parametrize("key, index", [p for kind in RESIDUAL_FAMILIES for p in blocks_of(kind)])
def test_vectorized_family_matches_naive_reimplementation(key, index):
    block = load_data(key)["eos"]["residual"][index]
    naive = NAIVE[block["type"]]
    fast = ResidualHelmholtz([block]).derivatives(DELTA, TAU)
    assert np.allclose(fast.alphar, [naive(block, d, t) for d, t in zip(DELTA, TAU)], rtol=1e-12, atol=1e-14)
    for i, (d, t) in enumerate(zip(DELTA[:4], TAU[:4])):
        reference = finite_differences(lambda x, y: naive(block, x, y), d, t)
        got = [v[i] for v in fast]
        assert np.allclose(got, reference, rtol=1e-6, atol=1e-7), (d, t, got, reference)


@pytest.mark.parametrize("key", fluids())
def test_ideal_part_matches_naive_reimplementation(key):
    blocks = load_data(key)["eos"]["ideal"]
    a, at, att = IdealHelmholtz(blocks).scaled(DELTA, TAU)
    for i, (d, t) in enumerate(zip(DELTA[:4], TAU[:4])):
        ref = finite_differences(lambda x, y: naive_ideal(blocks, x, y), d, t)
        assert np.allclose([a[i], at[i] / t, att[i] / t**2], [ref[0], ref[3], ref[4]], rtol=1e-7)


@pytest.mark.parametrize("key", fluids())
def test_residual_and_ideal_match_coolprop(key):
    """CoolProp AbstractState (reference library from the registry): all derivatives, every fluid."""
    data = load_data(key)
    reducing = data["eos"]["reducing"]
    state = CP.AbstractState("HEOS", data["cas"])
    residual, ideal = ResidualHelmholtz(data["eos"]["residual"]), IdealHelmholtz(data["eos"]["ideal"])
    delta, tau = RNG.uniform(1e-3, 3.5, 40), RNG.uniform(0.3, 3.0, 40)
    ours = residual.derivatives(delta, tau)
    a0, a0t, a0tt = ideal.scaled(delta, tau)
    for i, (d, t) in enumerate(zip(delta, tau)):
        state.update(CP.DmolarT_INPUTS, d * reducing["rho_molar"], reducing["T"] / t)
        ref = [state.alphar(), state.dalphar_dDelta(), state.d2alphar_dDelta2(), state.dalphar_dTau(),
               state.d2alphar_dTau2(), state.d2alphar_dDelta_dTau()]
        assert np.allclose([v[i] for v in ours], ref, rtol=1e-11, atol=1e-13)
        assert np.allclose([a0[i], a0t[i] / t, a0tt[i] / t**2],
                           [state.alpha0(), state.dalpha0_dTau(), state.d2alpha0_dTau2()], rtol=1e-12)


def test_iapws95_verification_values_at_500K():
    """Wagner & Pruss (2002), Table 6.6 (IAPWS-95 release, Table 6), from memory:
    T = 500 K, rho = 838.025 kg/m3."""
    data = load_data("H2O")
    delta, tau = np.array([838.025 / 322.0]), np.array([647.096 / 500.0])
    r = ResidualHelmholtz(data["eos"]["residual"]).derivatives(delta, tau)
    expected = [-0.342693206e1, -0.364366650, 0.856063701, -0.581403435e1, -0.223440737e1, -0.112176915e1]
    assert np.allclose([v[0] for v in r], expected, rtol=2e-9)
    a0, a0t, a0tt = IdealHelmholtz(data["eos"]["ideal"]).scaled(delta, tau)
    assert np.allclose([a0[0], a0t[0] / tau[0], a0tt[0] / tau[0] ** 2], [0.204797733e1, 0.904611106e1, -0.193249185e1],
                       rtol=2e-9)


def test_nonanalytic_terms_left_out_are_negligible():
    """The skip rule of NonAnalyticTerms: every scaled derivative below 1e-15 where it applies."""
    for key in ("CO2", "H2O"):
        block = next(b for b in load_data(key)["eos"]["residual"] if b["type"] == "nonanalytic")
        terms = NonAnalyticTerms(block)
        delta, tau = RNG.uniform(1e-3, 4.0, 200_000), RNG.uniform(0.2, 2.5, 200_000)
        c = {k: np.asarray(block[k])[:, None] for k in ("C", "D")}
        skipped = (-c["C"] * (delta - 1) ** 2 - c["D"] * (tau - 1) ** 2).max(axis=0) <= terms.NEGLIGIBLE_EXPONENT
        assert skipped.sum() > 1000
        assert np.abs(np.array(terms._terms(delta[skipped], tau[skipped]))).max() < 1e-15


def test_nonanalytic_terms_are_finite_at_delta_one():
    block = next(b for b in load_data("CO2")["eos"]["residual"] if b["type"] == "nonanalytic")
    r = ResidualHelmholtz([block]).derivatives(np.array([1.0, 1.0 + 1e-7]), np.array([1.05, 1.05]))
    assert np.all(np.isfinite(r))
    assert np.allclose([v[0] for v in r], [v[1] for v in r], rtol=1e-4, atol=1e-9)


def test_any_shape_and_nan_propagate():
    residual = ResidualHelmholtz(load_data("N2")["eos"]["residual"])
    delta = np.array([[0.5, np.nan], [1.5, 2.0]])
    r = residual.derivatives(delta, 1.2)
    assert all(v.shape == (2, 2) for v in r)
    assert np.isnan(r.alphar[0, 1]) and np.all(np.isfinite(np.delete(r.alphar.ravel(), 1)))
    assert float(residual.derivatives(0.5, 1.2).alphar) == pytest.approx(r.alphar[0, 0], rel=1e-15)


def test_unknown_block_type_lists_the_allowed_ones():
    with pytest.raises(ValueError, match="allowed: power, gaussian, nonanalytic, gao_b"):
        ResidualHelmholtz([{"type": "polynomial", "n": [1.0]}])
    with pytest.raises(ValueError, match="allowed: " + ", ".join(IDEAL_FAMILIES)):
        IdealHelmholtz([{"type": "lead", "a1": 0, "a2": 0}, {"type": "cp0", "c": 1}])


def test_blocks_are_checked_before_use():
    with pytest.raises(ValueError, match="differ in length"):
        ResidualHelmholtz([{"type": "power", "n": [1.0, 2.0], "d": [1, 2], "t": [0.5], "l": [0, 0]}])
    with pytest.raises(ValueError, match="lacks l"):
        ResidualHelmholtz([{"type": "power", "n": [1.0], "d": [1], "t": [0.5]}])
    with pytest.raises(ValueError, match="non-negative integers"):
        ResidualHelmholtz([{"type": "power", "n": [1.0], "d": [1.5], "t": [0.5], "l": [0]}])
    with pytest.raises(ValueError, match="lead"):
        IdealHelmholtz([{"type": "log_tau", "a": 2.5}])
