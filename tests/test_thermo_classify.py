"""thermo.classify: labels and margins against the curves, facts of the trade, any shape, NaN, uncertainty."""

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

from thermo import fluid
from thermo.classify import LABELS

ATM = 101325.0
CO2 = fluid("CO2")
BOUNDARY = {"liquid+vapor", "solid+vapor", "solid+liquid", "triple", "critical"}
SOME_FLUIDS = ["CO2", "H2O", "N2", "NH3", "R134a", "C3H8"]


# ------------------------------------------------------------ common practice
def test_co2_is_never_liquid_at_atmospheric_pressure():
    # common practice: CO2 has no liquid below its triple pressure (5.2 bar)
    phase = CO2.classify(np.linspace(150.0, 300.0, 3001), ATM, 0.1, 500.0).phase
    assert not np.isin(phase, ["liquid", "liquid+vapor", "solid+liquid", "triple"]).any()


def test_co2_sublimes_near_minus_78_5_C_at_one_atmosphere():
    # common practice: dry ice sublimes at -78.5 C at 1 atm
    c = CO2.classify(273.15 + np.array([-80.0, -79.0, -78.0, -77.0]), ATM)
    assert c.phase.tolist() == ["solid", "solid", "vapor", "vapor"]
    assert float(CO2.classify(273.15 - 78.5, ATM).dT_solid) == pytest.approx(0.0, abs=0.05)


def test_co2_at_one_atmosphere_and_minus_70_C_is_vapor_on_the_extrapolated_branch():
    # common practice: a CO2 vent at 1 atm and -70 C carries vapor, 8.5 K above the frost point
    c = CO2.classify(273.15 - 70.0, ATM)
    assert c.phase == "vapor" and c.extrapolated and not c.approximate
    assert float(c.dT_solid) == pytest.approx(8.46, abs=0.02)
    assert math.isnan(c.dT_saturation) and math.isnan(c.dp_saturation)


def test_co2_cylinder_at_58_barg_and_19_C_is_liquid_with_a_small_subcooling():
    # common practice: a CO2 cylinder at room temperature holds liquid near its vapor pressure
    c = CO2.classify(273.15 + 19.0, 58e5 + ATM, 0.1, 0.05e5)
    assert c.phase == "liquid"
    assert -5.0 < float(c.dT_saturation) < 0.0 and float(c.dp_saturation) > 0.0
    assert not c.extrapolated


def test_water_at_one_atmosphere():
    # common practice: ice, water and steam at 1 atm; IAPWS-95 normal boiling point 373.124 K
    water = fluid("water")
    c = water.classify(np.array([268.15, 298.15, 373.124, 423.15]), ATM, 0.1, 100.0)
    assert c.phase.tolist() == ["solid", "liquid", "liquid+vapor", "vapor"]


def test_water_stays_liquid_below_0_C_under_pressure():
    # IAPWS R14-08: ice Ih melts at 252.3 K under 200 MPa, so water at 260 K is liquid there
    c = fluid("water").classify(260.0, 200e6)
    assert c.phase == "liquid" and float(c.dT_solid) == pytest.approx(260.0 - 252.32, abs=0.01)


def test_liquid_water_beside_the_ices_is_inside_the_range_of_iapws_95():
    """IAPWS-95 is valid in the whole stable fluid region from the melting-pressure curve (Wagner &
    Pruss 2002, from memory): compressed liquid below 273.16 K is not extrapolated; water vapor
    under the sublimation curve (IAPWS R14-08) still is, as CO2 vapor at a vent is."""
    water = fluid("water")
    c = water.classify(np.array([260.0, 268.0, 250.0, 230.0]), np.array([200e6, 100e6, 50.0, 5.0]))
    assert c.phase.tolist() == ["liquid", "liquid", "vapor", "vapor"]
    assert c.extrapolated.tolist() == [False, False, True, True]
    assert water.classify(260.0, 100e6).phase == "solid"  # ice Ih melts at 138.3 MPa at 260 K (IAPWS R14-08)
    vent = CO2.classify(203.15, ATM)  # common practice: CO2 vapor at 1 atm, -70 C
    assert vent.phase == "vapor" and vent.extrapolated


def test_states_on_special_points():
    Tc, pc = CO2.critical.T, CO2.critical.p
    Tt, pt = CO2.triple
    c = CO2.classify(np.array([Tc, Tt, Tc + 5.0, Tc + 5.0, Tc - 5.0]), np.array([pc, pt, 5e6, 10e6, 10e6]), 0.05, 1e3)
    assert c.phase.tolist() == ["critical", "triple", "gas", "supercritical", "liquid"]
    assert float(c.critical_distance[0]) == 0.0


def test_out_of_range_and_solid_below_the_curves():
    T = np.array([1200.0, 300.0, 300.0, 300.0, 140.0, 140.0, np.nan, 300.0])
    p = np.array([1e5, 900e6, 0.0, -1e5, 1e3, 1e5, 1e5, np.nan])
    c = CO2.classify(T, p)
    # 140 K, 1 bar is solid whatever the curve does below 154 K: the frost point at 1 bar is 194.6 K
    assert c.phase.tolist() == ["out-of-range"] * 4 + ["out-of-range", "solid", "out-of-range", "out-of-range"]


def test_fallback_answers_say_so():
    ammonia = fluid("NH3")
    c = ammonia.classify(np.array([300.0, 190.0]), np.array([20e5, 100.0]))
    assert c.phase.tolist() == ["liquid", "vapor"]
    assert c.approximate.tolist() == [True, False]  # melting is the fallback, sublimation published
    assert not c.melting_published and c.sublimation_published
    assert not CO2.classify(300.0, 1e5).approximate


def test_scalars_give_values_that_behave_like_floats_and_strings():
    c = CO2.classify(250.0, 2e6)
    assert np.ndim(c.phase) == 0 and c.phase == "liquid" and f"{c.phase}" == "liquid"
    assert f"{c.dT_saturation:.2f}" == f"{float(c.dT_saturation):.2f}"
    assert isinstance(c.dT_solid + 1.0, float)


# ------------------------------------------------------------ a naive re-implementation of DESIGN.md section 3
def naive_label(f, T, p, u_T, u_p, k=2.0):
    """One state at a time, the rules as written, scalar calls to the curves."""
    Tc, pc = f.critical.T, f.critical.p
    Tt, pt = f.triple
    if not (math.isfinite(T) and math.isfinite(p)) or p <= 0 or p > f.range.p_max or T > f.range.T_max:
        return "out-of-range"
    if p >= pt:
        T_solid = float(f.melting_temperature(p))
        if math.isnan(T_solid):
            return "out-of-range"
        slope = float(f.solid.melting.dTdp(p))
    else:
        T_solid = float(f.sublimation_temperature(p))
        slope = float(f.solid.sublimation.dTdp(p))
    solid = T < T_solid
    if T < f.solid.T_min and not solid:
        return "out-of-range"
    if abs(T - Tc) <= k * u_T and abs(p - pc) <= k * u_p:
        return "critical"
    on_saturation = False
    if Tt <= T <= Tc:
        band = k * math.sqrt(u_p**2 + (u_T * float(f.saturation.dpdT(T))) ** 2)
        on_saturation = abs(p - float(f.saturation_pressure(T))) <= band
    on_solid = abs(T - T_solid) <= k * math.sqrt(u_T**2 + (u_p * slope) ** 2)
    if (abs(T - Tt) <= k * u_T and abs(p - pt) <= k * u_p) or (on_saturation and on_solid):
        return "triple"
    if on_solid:
        return "solid+liquid" if p >= pt else "solid+vapor"
    if on_saturation:
        return "liquid+vapor"
    if solid:
        return "solid"
    if T >= Tc:
        return "supercritical" if p >= pc else "gas"
    if T < Tt:
        return "liquid" if p >= pt else "vapor"
    return "liquid" if p > float(f.saturation_pressure(T)) else "vapor"


@pytest.mark.parametrize("key", SOME_FLUIDS)
@pytest.mark.parametrize(("u_T", "u_p"), [(0.0, 0.0), (0.2, 0.0), (0.0, 2e4), (0.5, 5e4)])
def test_vectorized_labels_match_the_naive_reimplementation(key, u_T, u_p):
    f = fluid(key)
    rng = np.random.default_rng(7)
    T = rng.uniform(0.6 * f.triple.T, 1.3 * f.critical.T, 400)
    p = np.exp(rng.uniform(np.log(1e-2 * f.triple.p), np.log(1.5 * f.critical.p), 400))
    # and states close to each curve, where the bands matter
    T_sat = rng.uniform(f.triple.T, f.critical.T, 100)
    T = np.concatenate([T, T_sat, f.triple.T * rng.uniform(0.8, 1.0, 100)])
    p = np.concatenate([p, f.saturation_pressure(T_sat) * rng.uniform(0.98, 1.02, 100),
                        f.sublimation_pressure(T[-100:]) * rng.uniform(0.9, 1.1, 100)])
    p[-100:] = np.where(np.isnan(p[-100:]), 1.0, p[-100:])
    c = f.classify(T, p, u_T, u_p)
    expected = [naive_label(f, t, q, u_T, u_p) for t, q in zip(T, p)]
    assert c.phase.tolist() == expected
    assert BOUNDARY & set(expected) or u_T == u_p == 0.0


# ------------------------------------------------------------ properties (hypothesis)
fluids_st = st.sampled_from(SOME_FLUIDS)
unit = st.floats(0.0, 1.0)


@settings(max_examples=60, deadline=None)
@given(fluids_st, unit, st.floats(1e-9, 1e-5))
def test_saturation_margins_change_sign_exactly_at_the_curve(key, share, rel):
    f = fluid(key)
    T = f.triple.T + (0.001 + 0.989 * share) * (f.critical.T - f.triple.T)
    p0 = float(f.saturation_pressure(T))
    below, above = f.classify(T, p0 * (1 - rel)), f.classify(T, p0 * (1 + rel))
    assert (below.phase, above.phase) == ("vapor", "liquid")
    assert below.dp_saturation < 0 < above.dp_saturation
    if f.triple.p <= p0 * (1 - rel):
        assert below.dT_saturation > 0 > above.dT_saturation


@settings(max_examples=60, deadline=None)
@given(fluids_st, unit, st.floats(1e-8, 1e-5))
def test_solid_margin_changes_sign_exactly_at_the_sublimation_curve(key, share, rel):
    f = fluid(key)
    sub = f.solid.sublimation
    T0 = sub.T_min + share * 0.999 * (f.triple.T - sub.T_min)
    p = float(f.sublimation_pressure(T0))
    colder, warmer = f.classify(T0 * (1 - rel), p), f.classify(T0 * (1 + rel), p)
    assert (colder.phase, warmer.phase) == ("solid", "vapor")
    assert colder.dT_solid < 0 < warmer.dT_solid


@settings(max_examples=60, deadline=None)
@given(fluids_st, unit, st.floats(1e-9, 1e-5))
def test_solid_margin_changes_sign_exactly_at_the_melting_curve(key, share, rel):
    f = fluid(key)
    top = min(f.solid.p_top, f.range.p_max)
    p = f.triple.p * (top / f.triple.p) ** (0.001 + 0.998 * share)
    T0 = float(f.melting_temperature(p))
    colder, warmer = f.classify(T0 * (1 - rel), p), f.classify(T0 * (1 + rel), p)
    assert colder.phase == "solid" and warmer.phase in {"liquid", "supercritical", "gas"}
    assert colder.dT_solid < 0 < warmer.dT_solid


shapes = hnp.array_shapes(min_dims=0, max_dims=3, min_side=0, max_side=4)


@settings(max_examples=40, deadline=None)
@given(fluids_st, shapes, st.data())
def test_any_shape_broadcasts_like_numpy_and_matches_flat_evaluation(key, shape, data):
    f = fluid(key)
    T = data.draw(hnp.arrays(float, shape, elements=st.floats(0.5 * f.triple.T, 1.5 * f.critical.T)))
    p_shape = data.draw(hnp.broadcastable_shapes(shape, max_dims=3, max_side=4))
    p = data.draw(hnp.arrays(float, p_shape, elements=st.floats(1.0, 2.0 * f.critical.p)))
    c = f.classify(T, p, 0.1, 1e3)
    T_b, p_b = np.broadcast_arrays(T, p)
    assert c.phase.shape == T_b.shape == c.dT_solid.shape == c.extrapolated.shape
    flat = f.classify(T_b.ravel(), p_b.ravel(), 0.1, 1e3)
    assert np.ravel(c.phase).tolist() == flat.phase.tolist()
    for name in ("dT_saturation", "dp_saturation", "dT_solid", "critical_distance"):
        assert np.array_equal(np.ravel(getattr(c, name)), getattr(flat, name), equal_nan=True)


@settings(max_examples=40, deadline=None)
@given(fluids_st, st.lists(st.sampled_from([np.nan, 1.0]), min_size=1, max_size=8), st.booleans())
def test_nan_in_gives_nan_out(key, mask, in_T):
    f = fluid(key)
    n = len(mask)
    T = np.full(n, 0.9 * f.critical.T)
    p = np.full(n, 0.5 * f.critical.p)
    (T if in_T else p)[:] *= np.array(mask)
    c = f.classify(T, p, 0.1, 1e3)
    missing = np.isnan(np.array(mask))
    assert (c.phase[missing] == "out-of-range").all() and (c.phase[~missing] != "out-of-range").all()
    for name in ("dT_saturation", "dp_saturation", "dT_solid", "critical_distance"):
        assert np.isnan(getattr(c, name)[missing]).all() and not np.isnan(getattr(c, name)[~missing]).any()


@settings(max_examples=40, deadline=None)
@given(fluids_st, st.floats(0.0, 1.0), st.floats(0.0, 3e4), st.floats(1.0, 10.0), st.integers(0, 2**16))
def test_uncertainty_only_widens_the_boundary_labels(key, u_T, u_p, factor, seed):
    f = fluid(key)
    rng = np.random.default_rng(seed)
    T = rng.uniform(0.7 * f.triple.T, 1.2 * f.critical.T, 200)
    p = np.exp(rng.uniform(np.log(0.05 * f.triple.p), np.log(1.5 * f.critical.p), 200))
    exact = f.classify(T, p).phase
    some = f.classify(T, p, u_T, u_p).phase
    more = f.classify(T, p, factor * u_T, factor * u_p).phase
    assume(u_T + u_p > 0)
    for base, wide in ((exact, some), (some, more)):
        changed = base != wide
        assert np.isin(wide[changed], list(BOUNDARY)).all()
        assert not np.isin(base[changed], ["out-of-range"]).any()
    assert set(np.unique(more)) <= set(LABELS)
