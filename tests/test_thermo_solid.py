"""Melting and sublimation curves (thermo.solid) against their publications, reference libraries
and thermodynamic consistency; the fast inverses against the forward equations."""

import json

import CoolProp.CoolProp as CP
import iapws._iapws as iapws
import numpy as np
import pytest

from thermo import fluid, fluids
from thermo.fluid import load_data
from thermo.solid import SolidCurves

COOLPROP_NAMES = {"Ar": "Argon", "C2H6": "Ethane", "C3H8": "n-Propane", "CH4": "Methane", "CO2": "CarbonDioxide",
                  "H2O": "Water", "N2": "Nitrogen", "NH3": "Ammonia", "O2": "Oxygen", "R134a": "R134a"}
PUBLISHED_MELTING = {"Ar", "C2H6", "C3H8", "CH4", "CO2", "H2O", "N2", "O2"}
PUBLISHED_SUBLIMATION = {"Ar", "CH4", "CO2", "H2O", "N2", "NH3"}


# ------------------------------------------------------------ published check values
@pytest.mark.parametrize(("T", "p_MPa"), [
    (260.0, 138.268),  # ice Ih
    (254.0, 268.685),  # ice III
    (265.0, 479.640),  # ice V
    (320.0, 1356.76),  # ice VI
])
def test_water_melting_matches_the_iapws_check_values(T, p_MPa):
    # IAPWS R14-08(2011), check values of the melting-pressure equations (from memory); water's
    # melting temperature is single-valued in p across the ices, so each value is checked by T(p)
    water = fluid("water")
    assert water.melting_temperature(p_MPa * 1e6) == pytest.approx(T, abs=2e-4)


def test_water_melting_pressure_is_the_ice_ih_branch_where_ices_overlap():
    # IAPWS R14-08 check value (from memory): 138.268 MPa at 260 K on ice Ih; CoolProp reports
    # the same branch at that temperature
    water = fluid("water")
    assert water.melting_pressure(260.0) == pytest.approx(138.268e6, rel=1e-5)
    assert water.melting_pressure(260.0) == pytest.approx(
        CP.AbstractState("HEOS", "Water").melting_line(CP.iP, CP.iT, 260.0), rel=1e-6)


def test_water_sublimation_matches_iapws_r14_and_the_iapws_library():
    water = fluid("water")
    # IAPWS R14-08 check value (from memory): 8.947 35e-6 MPa at 230 K; the curve is joined to
    # the IAPWS-95 triple pressure, 4e-6 below R14-08's 611.657 Pa
    assert water.sublimation_pressure(230.0) == pytest.approx(8.94735, rel=1e-5)
    T = np.linspace(50.0, 273.16, 60)
    reference = np.array([iapws._Sublimation_Pressure(t) * 1e6 for t in T])  # iapws (registry)
    assert np.asarray(water.sublimation_pressure(T)) == pytest.approx(reference, rel=1e-5)


def test_water_ices_v_and_vi_meet_at_their_triple_point():
    # IAPWS R14-08: ice V ends and ice VI begins at 273.31 K, 632.4 MPa (CoolProp 8 carries
    # 623.4 MPa for ice VI; the iapws library has 632.4)
    water = fluid("water")
    five, six = water.solid.melting.parts[2:4]
    assert float(five.pressure(273.31)) == pytest.approx(632.4e6, rel=2e-6)
    assert float(six.pressure(273.31)) == pytest.approx(632.4e6, rel=1e-12)
    assert water.melting_pressure(320.0) == pytest.approx(iapws._Melting_Pressure(320.0) * 1e6, rel=1e-9)


def test_co2_normal_sublimation_temperature():
    # Span & Wagner (1996): 194.686 K at 101.325 kPa (from memory)
    assert fluid("CO2").sublimation_temperature(101325.0) == pytest.approx(194.686, abs=2e-3)


def test_co2_curves_meet_at_the_triple_point():
    # Span & Wagner (1996): T_t = 216.592 K, p_t = 0.51795 MPa (from memory)
    co2 = fluid("CO2")
    assert co2.triple.T == 216.592
    assert co2.triple.p == pytest.approx(517950.0, rel=5e-5)
    p_t = co2.saturation.pressure(216.592)  # the curves are joined where the saturation curve starts
    assert p_t == pytest.approx(co2.triple.p, rel=1e-7)
    assert co2.sublimation_pressure(216.592) == pytest.approx(p_t, rel=1e-12)
    assert co2.melting_pressure(216.592) == pytest.approx(p_t, rel=1e-12)
    assert co2.melting_temperature(p_t) == pytest.approx(216.592, abs=5e-9)  # inverse: 1e-11 relative
    assert co2.sublimation_temperature(p_t) == pytest.approx(216.592, abs=5e-9)


def test_co2_sublimation_agrees_with_fray_and_schmitt_down_to_154_K():
    # Fray, N.; Schmitt, B. Planet. Space Sci. 57 (2009) 2053, CO2 fit for 40-194.7 K:
    # ln(p/bar) = sum A_i T^-i (coefficients of that paper, from memory); an independent
    # compilation of the same sublimation data
    A = [1.476e1, -2.571e3, -7.781e4, 4.325e6, -1.207e8, 1.350e9]
    T = np.linspace(154.0, 194.0, 9)
    theirs = 1e5 * np.exp(sum(a * T ** -i for i, a in enumerate(A)))
    assert np.asarray(fluid("CO2").sublimation_pressure(T)) == pytest.approx(theirs, rel=0.03)


@pytest.mark.parametrize("key", sorted(PUBLISHED_MELTING))
def test_melting_curves_are_coolprops_joined_to_the_triple_point(key):
    # CoolProp (registry) evaluates the same published melting equations; ours are shifted by
    # the constant that joins them to the equation of state's triple point
    state = CP.AbstractState("HEOS", COOLPROP_NAMES[key])
    f = fluid(key)
    first = f.solid.melting.parts[0]
    T = np.linspace(first.T_min, min(first.T_max, 273.30), 25)
    if key == "H2O":  # ice Ih only: CoolProp has a misprint in ice VI
        T = np.linspace(252.0, 273.15, 25)
    theirs = np.array([state.melting_line(CP.iP, CP.iT, t) for t in T])
    ours = np.asarray(f.melting_pressure(T))
    shift = first.shift
    assert abs(shift / first.dpdT(f.triple.T)) < 5e-3  # the join moves the curve by less than 5 mK
    assert ours - theirs == pytest.approx(np.full(T.size, shift), abs=1e-6 * np.abs(theirs).max())


# ------------------------------------------------------------ thermodynamic consistency
#: enthalpies of fusion at the triple point [kJ/mol], from memory (standard compilations)
FUSION_ENTHALPY = {"H2O": 6.01, "CO2": 9.0, "Ar": 1.18, "N2": 0.72, "CH4": 0.94, "NH3": 5.66}


@pytest.mark.parametrize("key", sorted(PUBLISHED_SUBLIMATION))
def test_published_sublimation_is_steeper_than_vaporization_by_the_fusion_enthalpy(key):
    # Clausius-Clapeyron at the triple point: dp/dT = dH/(T dv) with dH_sub = dH_vap + dH_fus,
    # the vapor volume common to both; the condensed volumes are left out (a 0.1 % effect here)
    f = fluid(key)
    T_t, p_t = f.triple
    sub = f.solid.sublimation.dpdT(T_t)
    vap = f.saturation.dpdT(T_t)
    assert sub > vap
    rho_vapor = load_data(key)["triple"]["rho_vapor"] / f.molar_mass
    fusion = T_t / rho_vapor * (sub - vap)
    assert fusion / 1e3 == pytest.approx(FUSION_ENTHALPY[key], rel=0.25)


@pytest.mark.parametrize("key", sorted(set(fluids()) - PUBLISHED_SUBLIMATION))
def test_fallback_sublimation_continues_the_vapor_pressure_slope(key):
    # the Clausius-Clapeyron fallback uses the vaporization enthalpy at the triple point: its
    # slope there is that of the vapor-pressure curve (ideal vapor: below 0.1 % at these p_t)
    f = fluid(key)
    T_t = f.triple.T
    assert f.solid.sublimation.dpdT(T_t) == pytest.approx(f.saturation.dpdT(T_t), rel=2e-3)
    assert not f.solid.sublimation_published
    assert "approximate" in f.solid.sublimation.source


@pytest.mark.parametrize("key", fluids())
def test_curves_rise_away_from_the_triple_point_and_join_there(key):
    f = fluid(key)
    sub = f.solid.sublimation
    T = np.linspace(sub.T_min, f.triple.T, 200)
    assert np.all(np.diff(np.asarray(sub.pressure(T))) > 0)
    p_t = f.saturation.pressure(f.triple.T)
    assert sub.pressure(f.triple.T) == pytest.approx(p_t, rel=1e-12)
    assert f.solid.solid_temperature(p_t) == pytest.approx(f.triple.T, abs=1e-8)
    assert f.solid.solid_temperature(p_t * (1 - 1e-9)) == pytest.approx(f.triple.T, abs=1e-7)


# ------------------------------------------------------------ fast inverses
@pytest.mark.parametrize("key", fluids())
def test_inverses_reproduce_the_forward_equations(key):
    solid = fluid(key).solid
    for curve in (solid.melting, solid.sublimation):
        for part in curve.parts:
            # away from the ends, where neighbouring ices of water overlap by a few hundred Pa
            T = np.linspace(part.T_min + 1e-3, part.T_max - 1e-3, 301)
            p = np.asarray(part.pressure(T))
            assert np.asarray(curve.temperature(p)) == pytest.approx(T, rel=2e-11, abs=0)
            assert np.asarray(curve.dTdp(p)) * np.asarray(part.dpdT(T)) == pytest.approx(1.0, rel=1e-5)


def test_slopes_match_finite_differences():
    for key in ("H2O", "CO2", "NH3", "C3H8"):
        for part in (*fluid(key).solid.melting.parts, *fluid(key).solid.sublimation.parts):
            T = np.linspace(part.T_min + 0.1, part.T_max - 0.1, 7)
            h = 1e-6 * T
            numeric = (part.pressure(T + h) - part.pressure(T - h)) / (2 * h)
            assert np.asarray(part.dpdT(T)) == pytest.approx(numeric, rel=1e-6)


# ------------------------------------------------------------ fallbacks and flags
@pytest.mark.parametrize("key", sorted(set(fluids()) - PUBLISHED_MELTING))
def test_fallback_melting_is_the_triple_point_temperature(key):
    f = fluid(key)
    assert not f.solid.melting_published
    assert "approximate" in f.solid.melting.source
    p = np.array([f.triple.p, 1e7, f.range.p_max])
    assert np.asarray(f.melting_temperature(p)) == pytest.approx(np.full(3, f.triple.T))
    assert np.isnan(f.melting_pressure(f.triple.T + 1.0))
    assert np.isnan(f.melting_temperature(2 * f.range.p_max))


@pytest.mark.parametrize("key", fluids())
def test_flags_and_sources_follow_the_data(key):
    solid = fluid(key).solid
    assert solid.melting_published == (key in PUBLISHED_MELTING)
    assert solid.sublimation_published == (key in PUBLISHED_SUBLIMATION)
    for curve in (solid.melting, solid.sublimation):
        assert ("approximate" in curve.source) != curve.published  # a citation, or the fallback's note
        assert len(curve.source) > 60


# ------------------------------------------------------------ shapes and NaN
def test_any_shape_and_nan_in_nan_out():
    co2 = fluid("CO2")
    T = np.array([[200.0, np.nan], [210.0, 100.0]])
    p = co2.sublimation_pressure(T)
    assert p.shape == (2, 2)
    assert np.isnan(p[0, 1]) and np.isnan(p[1, 1])  # NaN in; below the curve's 154 K
    assert np.asarray(co2.sublimation_temperature(p)) == pytest.approx(np.where(T > 154, T, np.nan), nan_ok=True)
    scalar = co2.melting_temperature(1e8)
    assert np.ndim(scalar) == 0 and isinstance(float(scalar), float)
    assert np.isnan(co2.melting_temperature(np.nan)) and np.isnan(co2.sublimation_temperature(-1.0))
    assert co2.solid.solid_temperature(np.empty((0, 3))).shape == (0, 3)


# ------------------------------------------------------------ data checks
def _data_with(key: str, block: str, **changes) -> dict:
    data = json.loads(json.dumps(load_data(key)))
    data[block]["parts"][0].update(changes)
    return data


def test_unknown_types_and_bad_parts_are_refused_with_the_reason():
    data = json.loads(json.dumps(load_data("CO2")))
    data["sublimation"]["type"] = "spline"
    with pytest.raises(ValueError, match="unknown solid-curve type 'spline'; allowed: reduced_power_sum"):
        SolidCurves.from_data(data)
    with pytest.raises(ValueError, match="differ in length"):
        SolidCurves.from_data(_data_with("CO2", "sublimation", a=[1.0, 2.0]))
    with pytest.raises(ValueError, match="no sublimation part ends at the triple-point temperature"):
        SolidCurves.from_data(_data_with("CO2", "sublimation", T_max=200.0))
    with pytest.raises(ValueError, match="needs the vaporization enthalpy"):
        SolidCurves.from_data(load_data("O2"))

