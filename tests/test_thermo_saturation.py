"""Saturation: the precise solver, the piecewise Chebyshev machinery and the fast curve.

Outside checks name their source beside them: CoolProp and iapws (reference libraries from the
package registry), the IAPWS-95 release and Span & Wagner (1996) (quoted from memory), and
common practice.
"""

from __future__ import annotations

import json
from importlib import resources

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from iapws import IAPWS95

from thermo import fluid
from thermo.chebyshev import ChebyshevPieces, fit_pieces
from thermo.eos import HelmholtzEOS
from thermo.fluid import fluids, load_data
from thermo.saturation import SaturationCurve, equation_fingerprint, fit_curve, solve

COOLPROP_NAMES = {"Ar": "Argon", "C2H6": "Ethane", "C3H8": "n-Propane", "CH4": "Methane", "CO2": "CarbonDioxide",
                  "H2O": "Water", "N2": "Nitrogen", "NH3": "Ammonia", "O2": "Oxygen", "R134a": "R134a"}
ALL = sorted(COOLPROP_NAMES)


@pytest.fixture(scope="module", params=ALL)
def key(request) -> str:
    return request.param


def eos_of(key: str) -> HelmholtzEOS:
    return HelmholtzEOS(load_data(key))


def curve_of(key: str) -> SaturationCurve:
    return SaturationCurve.for_fluid(key, eos_of(key))


def along(key: str, below_Tc: float, count: int = 120) -> np.ndarray:
    """Temperatures [K] from the triple point to below_Tc under the critical point."""
    data = load_data(key)
    return np.linspace(data["triple"]["T"], data["critical"]["T"] - below_Tc, count)


# ---------------------------------------------------------------- piecewise Chebyshev machinery
def test_fit_pieces_meets_its_tolerance_and_matches_a_naive_evaluation():
    f = lambda x: np.exp(-3000.0 / x) * (1 + 0.01 * np.sin(x))  # noqa: E731
    pieces, errors = fit_pieces(f, 216.0, 304.0, degree=8, rtol=1e-12)
    assert errors.max() <= 1e-12 and len(errors) > 1
    x = np.random.default_rng(1).uniform(216.0, 304.0, 5000)
    np.testing.assert_allclose(pieces(x), f(x), rtol=3e-12)
    # naive reference: find the piece by a linear scan, then numpy's chebval on the local variable
    naive = []
    for value in x:
        i = max(j for j, edge in enumerate(pieces.edges[:-1]) if edge <= value)
        lo, hi = pieces.edges[i], pieces.edges[i + 1]
        naive.append(np.polynomial.chebyshev.chebval((2 * value - lo - hi) / (hi - lo), pieces.coefficients[i]))
    np.testing.assert_allclose(pieces(x), naive, rtol=1e-14)


def test_chebyshev_derivative_and_round_trip_through_a_dict():
    pieces, _ = fit_pieces(np.exp, 0.0, 3.0, degree=10, rtol=1e-13)
    x = np.linspace(0.0, 3.0, 301)
    np.testing.assert_allclose(pieces.derivative()(x), np.exp(x), rtol=1e-10)
    again = ChebyshevPieces.from_dict(json.loads(json.dumps(pieces.to_dict())))
    np.testing.assert_allclose(again(x), pieces(x), rtol=1e-15)


def test_chebyshev_edges_nan_and_shapes():
    pieces, _ = fit_pieces(np.sqrt, 1.0, 2.0, degree=6, rtol=1e-12)
    assert isinstance(pieces(1.0), float) and pieces(1.0) == pytest.approx(1.0, rel=1e-12)
    assert pieces(2.0) == pytest.approx(np.sqrt(2.0), rel=1e-12)
    assert np.isnan(pieces(0.999)) and np.isnan(pieces(2.001)) and np.isnan(pieces(np.nan))
    grid = np.array([[1.5, np.nan, 3.0], [1.25, -np.inf, np.inf]])
    out = pieces(grid)
    assert out.shape == grid.shape
    np.testing.assert_array_equal(np.isnan(out), [[False, True, True], [False, True, True]])
    assert pieces(np.empty((0, 4))).shape == (0, 4)


@pytest.mark.parametrize("key", ["CO2", "H2O"])
def test_a_few_points_give_the_same_bits_as_an_array(key):
    """A live chunk of a sample or two is summed in Python floats: the same values to the bit as
    the array path, so a live run and its batch replay classify alike."""
    curve = fluid(key).saturation
    rng = np.random.default_rng(3)
    T = np.concatenate([rng.uniform(curve.T_min - 5.0, curve.T_max + 5.0, 4000),
                        [curve.T_min, curve.T_max, np.nan, np.inf, -np.inf]])
    pieces = (curve._pressure, curve._slope, curve._liquid)
    for series in pieces:
        together = series(T)
        one_by_one = np.array([series(np.array([value]))[0] for value in T])
        two_by_two = np.concatenate([series(pair) for pair in T[:4000].reshape(-1, 2)])
        assert np.array_equal(together, one_by_one, equal_nan=True)
        assert np.array_equal(together[:4000], two_by_two, equal_nan=True)
        assert np.isnan(one_by_one[-3:]).all()


def test_fit_pieces_refuses_what_it_cannot_fit_and_pieces_check_their_edges():
    with pytest.raises(ValueError, match="not met"):
        fit_pieces(np.sqrt, 0.0, 1.0, degree=6, rtol=1e-12, max_depth=4)
    kept, errors = fit_pieces(np.sqrt, 0.0, 1.0, degree=6, rtol=1e-12, max_depth=4, strict=False)
    assert np.all(np.diff(kept.edges)[errors > 1e-12] == 1 / 16)  # only pieces of the last halving fail
    with pytest.raises(ValueError, match="grid"):
        ChebyshevPieces(np.array([0.0, 0.3, 1.0]), np.ones((2, 3)))
    with pytest.raises(ValueError, match="increase"):
        ChebyshevPieces(np.array([0.0, 1.0, 0.5]), np.ones((2, 3)))


# ---------------------------------------------------------------- the precise solver
def test_solver_equalizes_pressure_and_gibbs_energy_of_our_equation(key):
    eos = eos_of(key)
    T = along(key, 0.1)
    p, rho_liquid, rho_vapor = solve(eos, T)
    liquid, vapor = eos.state(rho_liquid, T), eos.state(rho_vapor, T)
    far = T < 0.99 * load_data(key)["critical"]["T"]
    # relative 1e-12 where the Newton steps converge that far (1 % below Tc and lower)
    np.testing.assert_allclose((liquid.g - vapor.g) / (eos.R * T), 0.0, atol=1e-11)
    np.testing.assert_allclose(vapor.p[far], p[far], rtol=1e-13)
    bulk = rho_liquid * liquid.dp_drho  # a liquid's pressure is resolved to ~1e-16 of its bulk modulus
    assert np.all(np.abs(liquid.p - vapor.p) <= 1e-10 * vapor.p + 1e-13 * bulk)


def test_solver_matches_coolprop_equation_at_our_densities(key):
    # CoolProp (registry): its equation of state at our densities with imposed phases, so that
    # no saturation solver of CoolProp takes part; pressures and Gibbs energies must agree
    T = along(key, 0.01, 60)
    p, rho_liquid, rho_vapor = solve(eos_of(key), T)
    state = CP.AbstractState("HEOS", COOLPROP_NAMES[key])
    values = []
    for phase, rho in ((CP.iphase_liquid, rho_liquid), (CP.iphase_gas, rho_vapor)):
        state.specify_phase(phase)
        rows = []
        for t, r in zip(T, rho):
            state.update(CP.DmolarT_INPUTS, r, t)
            rows.append((state.p(), state.gibbsmolar()))
        values.append(np.array(rows))
    (p_liquid, g_liquid), (p_vapor, g_vapor) = values[0].T, values[1].T
    np.testing.assert_allclose(p_vapor, p, rtol=1e-9)
    np.testing.assert_allclose((g_liquid - g_vapor) / (8.314462618 * T), 0.0, atol=1e-9)
    bulk = rho_liquid * np.array([CP.PropsSI("d(P)/d(Dmolar)|T", "T", t, "Dmolar", r, COOLPROP_NAMES[key])
                                  for t, r in zip(T, rho_liquid)])
    assert np.all(np.abs(p_liquid - p) <= 1e-9 * p + 1e-13 * bulk)  # see the test above for the bulk term


def test_solver_matches_coolprop_saturation(key):
    # CoolProp (registry) PropsSI('P','T',T,'Q',0): within 1e-6 from the triple point to 10 mK
    # below Tc. Exception: at vapor pressures under 1 Pa (propane below 104 K, down to 0.17 mPa)
    # CoolProp's own saturation routine drifts (6e-4 at propane's triple point, where its pressure
    # disagrees with its own equation at its own saturated vapor density); the test above covers
    # those states through CoolProp's equation of state.
    name = COOLPROP_NAMES[key]
    T = along(key, 0.01)
    p, _, _ = solve(eos_of(key), T)
    reference = np.array([CP.PropsSI("P", "T", t, "Q", 0, name) for t in T])
    measurable = reference >= 1.0
    assert measurable.sum() > 0.8 * T.size
    np.testing.assert_allclose(p[measurable], reference[measurable], rtol=1e-6)
    # saturated densities: CoolProp (registry) within 1e-5 up to 0.1 K below Tc
    T = along(key, 0.1, 60)
    _, rho_liquid, rho_vapor = solve(eos_of(key), T)
    np.testing.assert_allclose(rho_liquid, [CP.PropsSI("Dmolar", "T", t, "Q", 0, name) for t in T], rtol=1e-5)
    np.testing.assert_allclose(rho_vapor, [CP.PropsSI("Dmolar", "T", t, "Q", 1, name) for t in T], rtol=1e-5)


@pytest.mark.parametrize("T, p_MPa, rho_liquid, rho_vapor", [
    # IAPWS-95 release (IAPWS R6-95), two-phase verification table; Wagner & Pruss (2002)
    # doi:10.1063/1.1461829 (from memory): T [K], p_sat [MPa], rho' and rho'' [kg/m3]
    (275.0, 0.698451167e-3, 0.999887406e3, 0.550664919e-2),
    (450.0, 0.932203564e0, 0.890341250e3, 0.481200360e1),
    (625.0, 0.169082693e2, 0.567090385e3, 0.118290280e3),
])
def test_water_saturation_check_values(T, p_MPa, rho_liquid, rho_vapor):
    eos = eos_of("H2O")
    p, liquid, vapor = solve(eos, T)
    assert isinstance(p, float)
    np.testing.assert_allclose([p / 1e6, liquid * eos.M, vapor * eos.M], [p_MPa, rho_liquid, rho_vapor], rtol=1e-8)
    water = fluid("water")  # the fast curve gives the same figures
    np.testing.assert_allclose([water.saturation_pressure(T) / 1e6, *water.saturated_densities(T)],
                               [p_MPa, rho_liquid, rho_vapor], rtol=1e-8)


def test_water_against_the_iapws_library():
    # iapws (registry) IAPWS-95 implementation, saturated liquid (x=0) and vapor (x=1)
    T = np.array([273.16, 300.0, 373.124, 500.0, 600.0, 640.0, 646.0])
    reference = np.array([(IAPWS95(T=t, x=0).P * 1e6, IAPWS95(T=t, x=0).rho, IAPWS95(T=t, x=1).rho) for t in T]).T
    water = fluid("water")
    np.testing.assert_allclose(water.saturation_pressure(T), reference[0], rtol=1e-9)
    np.testing.assert_allclose(water.saturated_densities(T), reference[1:], rtol=1e-8)


def test_carbon_dioxide_triple_and_critical_points():
    co2 = fluid("CO2")
    # Span & Wagner (1996), doi:10.1063/1.555991 (from memory): triple point 216.592 K at
    # 0.51795 MPa, critical point 304.1282 K at 7.3773 MPa; the equation meets them within 3e-5
    assert co2.saturation_pressure(216.592) == pytest.approx(0.51795e6, rel=5e-5)
    assert co2.saturation_pressure(304.1282) == pytest.approx(7.3773e6, rel=1e-5)
    assert np.isnan(co2.saturation_temperature(0.5179e6))  # under the triple point: no liquid
    # common practice: a CO2 cylinder at 20 degC holds liquid under roughly 55-65 bar
    assert 55e5 < co2.saturation_pressure(293.15) < 65e5


@pytest.mark.parametrize("key", fluids())
def test_triple_point_is_where_the_saturation_curve_starts(key):
    """Fluid.triple is the one triple point of classify, the saturation curve and the solid curves;
    its pressure is within the equation's tolerance of the published one in the data file
    (CoolProp's triple pressure, reference library: propane 0.12 %, ammonia 0.04 %)."""
    f = fluid(key)
    assert f.triple.T == f.saturation.T_min == f.solid.triple[0]
    assert f.triple.p == f.saturation.p_min == f.solid.triple[1] == f.saturation_pressure(f.triple.T)
    assert f.triple.p == pytest.approx(load_data(key)["triple"]["p"], rel=2e-3)
    assert f.classify(f.triple.T, f.triple.p).phase == "triple"


def test_water_boils_at_100_degc_under_one_atmosphere():
    # IAPWS-95 (from memory): normal boiling point 373.124 K at 101.325 kPa; common practice: 100 degC
    assert fluid("water").saturation_temperature(101325.0) == pytest.approx(373.124, abs=1e-3)


def test_solver_nan_and_outside_range_and_shapes():
    eos = eos_of("CO2")
    T = np.array([[np.nan, 200.0, 250.0], [304.2, 216.592, 304.1282]])
    p, rho_liquid, rho_vapor = solve(eos, T)
    for values in (p, rho_liquid, rho_vapor):
        assert values.shape == T.shape
        np.testing.assert_array_equal(np.isnan(values), [[True, True, False], [True, False, False]])
    assert all(isinstance(v, float) and np.isnan(v) for v in solve(eos, np.nan))


def test_solver_reaches_the_critical_point_continuously(key):
    # next to Tc the densities close in on each other and the pressure on p(Tc): no gap, no NaN
    eos = eos_of(key)
    Tc = load_data(key)["critical"]["T"]
    theta = np.logspace(-2, -12, 41)
    p, rho_liquid, rho_vapor = solve(eos, Tc * (1 - theta))
    assert np.all(np.isfinite(p)) and np.all(rho_liquid > rho_vapor)
    assert np.all(np.diff(p) > 0) and np.all(np.diff(rho_liquid) < 0) and np.all(np.diff(rho_vapor) > 0)


# ---------------------------------------------------------------- the fast curve
def test_fast_curve_agrees_with_the_solver(key):
    eos, curve = eos_of(key), curve_of(key)
    rng = np.random.default_rng(7)
    T = np.concatenate([rng.uniform(curve.T_min, curve.T_max, 3000), curve.T_max - rng.uniform(0, 1e-3, 300)])
    p, rho_liquid, rho_vapor = solve(eos, T)
    liquid, vapor = curve.densities(T)
    np.testing.assert_allclose(curve.pressure(T), p, rtol=1e-8)
    np.testing.assert_allclose(liquid, rho_liquid, rtol=1e-6)
    np.testing.assert_allclose(vapor, rho_vapor, rtol=1e-6)


def test_fast_curve_round_trips_and_ends(key):
    curve = curve_of(key)
    T = np.random.default_rng(3).uniform(curve.T_min, curve.T_max, 20000)
    np.testing.assert_allclose(curve.temperature(curve.pressure(T)), T, rtol=1e-10)
    assert curve.temperature(curve.p_min) == pytest.approx(curve.T_min, rel=1e-12)
    assert curve.temperature(curve.p_max) == pytest.approx(curve.T_max, rel=1e-10)
    assert np.all(curve.temperature(np.linspace(curve.p_min, curve.p_max, 1001)) <= curve.T_max)
    assert curve.pressure(curve.T_min) == curve.p_min and curve.pressure(curve.T_max) == curve.p_max
    data = load_data(key)
    assert (curve.T_min, curve.T_max) == (data["triple"]["T"], data["critical"]["T"])
    assert curve.p_max == pytest.approx(data["critical"]["p"], rel=5e-5)


def test_fast_curve_slope_is_the_clapeyron_slope(key):
    # Clapeyron equation (common practice): dp/dT = (h'' - h') / (T (v'' - v')), from our equation
    eos, curve = eos_of(key), curve_of(key)
    T = along(key, 1.0, 50)
    p, rho_liquid, rho_vapor = solve(eos, T)
    h_liquid, h_vapor = eos.state(rho_liquid, T).h, eos.state(rho_vapor, T).h
    clapeyron = (h_vapor - h_liquid) / (T * (1 / rho_vapor - 1 / rho_liquid))
    np.testing.assert_allclose(curve.dpdT(T), clapeyron, rtol=1e-7)


def test_fast_curve_nan_outside_and_shapes():
    curve = curve_of("CO2")
    assert isinstance(curve.pressure(250.0), float) and isinstance(curve.temperature(2e6), float)
    T = np.array([[np.nan, 216.0], [304.2, 250.0]])
    for values in (curve.pressure(T), curve.dpdT(T), *curve.densities(T)):
        assert values.shape == T.shape
        np.testing.assert_array_equal(np.isnan(values), [[True, True], [True, False]])
    p = np.array([np.nan, -1.0, 0.0, 0.5e6, 2e6, 7.4e6, np.inf])
    np.testing.assert_array_equal(np.isnan(curve.temperature(p)), [True, True, True, True, False, True, True])
    assert curve.temperature(p.reshape(7, 1)).shape == (7, 1)


def test_shipped_fits_are_current_and_say_what_they_are():
    assert sorted(fluids()) == ALL
    for key in ALL:
        text = resources.files("thermo").joinpath(f"data/saturation/{key}.json").read_text(encoding="utf-8")
        header = json.loads(text)["header"]
        assert header["equation_sha256"] == equation_fingerprint(load_data(key)), f"rerun build for {key}"
        assert "Akasaka" in header["solver"] and "Bell" in header["fit"]
        assert header["equation"] == load_data(key)["eos"]["source"]
        measured = header["measured_error"]
        assert measured["away_from_Tc"]["pressure"] < 1e-9 and measured["last_mK_below_Tc"]["vapor_density"] < 1e-6


def test_shipped_fit_is_what_the_fitter_makes_now():
    eos = eos_of("O2")
    fresh = SaturationCurve(fit_curve(eos))
    T = np.linspace(fresh.T_min, fresh.T_max, 2001)
    np.testing.assert_allclose(curve_of("O2").pressure(T), fresh.pressure(T), rtol=1e-15)
    np.testing.assert_allclose(curve_of("O2").densities(T), fresh.densities(T), rtol=1e-15)


def test_fluid_uses_the_fast_curve():
    co2 = fluid("CO2")
    curve = SaturationCurve.for_fluid("CO2", co2.eos)
    assert curve is co2.saturation
    T = np.array([220.0, 280.0, 304.0])
    np.testing.assert_array_equal(co2.saturation_pressure(T), curve.pressure(T))
    np.testing.assert_array_equal(co2.saturation_temperature(curve.pressure(T)), curve.temperature(curve.pressure(T)))
    np.testing.assert_allclose(co2.saturated_densities(T), np.array(curve.densities(T)) * co2.molar_mass)
