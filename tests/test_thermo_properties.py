"""Single-phase density and properties at (T, p) against published values and reference libraries."""

from __future__ import annotations

import warnings

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from iapws import IAPWS95

from thermo import fluid, fluids
from thermo.eos import HelmholtzEOS
from thermo.fluid import PROPERTY_NAMES, load_data

#: our key -> CoolProp AbstractState getter, for the properties of Fluid.properties
COOLPROP = {"density": "rhomass", "Z": "compressibility_factor", "alpha_p": "isobaric_expansion_coefficient",
            "kappa_T": "isothermal_compressibility", "cp": "cpmass", "cv": "cvmass",
            "speed_of_sound": "speed_sound", "enthalpy": "hmass", "entropy": "smass"}


def sweep_states(f, rng, count=120):
    """Random single-phase states over the equation's range: general, dense liquid, near critical,
    next to the saturation curve."""
    c, t, r = f.critical, f.triple, f.range
    T = rng.uniform(r.T_min, min(r.T_max, 3 * c.T), count)
    p = np.exp(rng.uniform(np.log(t.p), np.log(r.p_max), count))
    liquid_T = rng.uniform(t.T, 0.95 * c.T, 40)
    liquid_p = np.exp(rng.uniform(np.log(1.2 * f.saturation_pressure(liquid_T)), np.log(min(r.p_max, 100e6))))
    near_T = c.T * rng.uniform(0.98, 1.03, 40)
    near_p = c.p * rng.uniform(0.85, 1.2, 40)
    # just off the saturation curve, on both sides (CoolProp's vapor pressure of propane at 89 K
    # is 1.4e-4 below the equal-Gibbs-energy solution, so not closer than 1e-3)
    edge_T = rng.uniform(t.T, 0.999 * c.T, 30)
    edge_p = f.saturation_pressure(edge_T) * (1 + np.repeat([1e-3, -1e-3], 15))
    T = np.concatenate([T, liquid_T, near_T, edge_T])
    p = np.concatenate([p, liquid_p, near_p, edge_p])
    with np.errstate(invalid="ignore"):
        far = ~(np.abs(p / f.saturation_pressure(T) - 1) < 1e-6)  # the branch is decided elsewhere
    return T[far], p[far]


def coolprop_density(f, T, p):
    """CoolProp (reference library from the registry) density [kg/m3] at each (T, p); NaN where it
    refuses (above its melting line, for instance)."""
    state = CP.AbstractState("HEOS", load_data(f.key)["cas"])
    out = np.full(T.size, np.nan)
    for i, (t, q) in enumerate(zip(T, p)):
        try:
            state.update(CP.PT_INPUTS, q, t)
        except ValueError:
            continue
        out[i] = state.rhomass()
    return out


def coolprop_properties(f, rho, T):
    """CoolProp (reference library) properties at each (rho [kg/m3], T): the same state as ours,
    free of the tolerance of its own (T, p) flash, which near the critical point is ~1e-8 in p."""
    state = CP.AbstractState("HEOS", load_data(f.key)["cas"])
    out = np.empty((len(COOLPROP), T.size))
    for i, (d, t) in enumerate(zip(rho, T)):
        # a single phase imposed: next to the curve CoolProp's own test may call the state two-phase
        state.specify_phase(CP.iphase_gas if d < f.critical.rho else CP.iphase_liquid)
        state.update(CP.DmassT_INPUTS, d, t)
        out[:, i] = [getattr(state, name)() for name in COOLPROP.values()]
    return dict(zip(COOLPROP, out))


@pytest.mark.parametrize("key", fluids())
def test_properties_match_coolprop_over_the_range(key):
    f = fluid(key)
    T, p = sweep_states(f, np.random.default_rng(sum(map(ord, key))))
    ours = f.properties(T, p)
    reference_density = coolprop_density(f, T, p)
    known = np.isfinite(reference_density)
    assert known.sum() > 0.8 * T.size
    np.testing.assert_allclose(ours["density"][known], reference_density[known], rtol=1e-10)
    ref = coolprop_properties(f, ours["density"][known], T[known])
    ref["Z"] = p[known] / (ref["density"] / f.molar_mass * f.eos.R * T[known])  # CoolProp's Z uses its own p
    for name in COOLPROP:
        # alpha_p crosses zero in water near 4 degC: an absolute floor of 1e-9 of its usual size
        atol = 1e-12 if name == "alpha_p" else 0.0
        np.testing.assert_allclose(ours[name][known], ref[name], rtol=1e-9, atol=atol, err_msg=name)
    assert not ours["extrapolated"].any()


@pytest.mark.parametrize("key", fluids())
def test_supercritical_states_next_to_the_critical_point_converge(key):
    """CoolProp (reference library): density within 1e-8 just above T_c around p_c."""
    f = fluid(key)
    T, p = np.meshgrid(f.critical.T * np.array([1 + 1e-4, 1.001, 1.005, 1.02]),
                       f.critical.p * np.linspace(0.95, 1.05, 11))
    rho = f.density(T, p)
    state = CP.AbstractState("HEOS", load_data(key)["cas"])
    ref = []
    for t, q in zip(T.ravel(), p.ravel()):
        state.update(CP.PT_INPUTS, q, t)
        ref.append(state.rhomass())
    np.testing.assert_allclose(rho.ravel(), ref, rtol=1e-8)


#: IAPWS R6-95(2018), Table 7 (also Wagner & Pruss 2002, Table 6.6), from memory:
#: T [K], rho [kg/m3], p [MPa], cv [kJ/(kg K)], w [m/s], s [kJ/(kg K)]
IAPWS95_TABLE = np.array([
    [300, 0.9965560e3, 0.992418352e-1, 0.413018112e1, 0.150151914e4, 0.393062643],
    [300, 0.1005308e4, 0.200022515e2, 0.406798347e1, 0.153492501e4, 0.387405401],
    [300, 0.1188202e4, 0.700004704e3, 0.346135580e1, 0.244357992e4, 0.132609616],
    [500, 0.4350000e0, 0.999679423e-1, 0.150817541e1, 0.548314253e3, 0.794488271e1],
    [500, 0.4532000e1, 0.999938125e0, 0.166991025e1, 0.535739001e3, 0.682502725e1],
    [500, 0.8380250e3, 0.100003858e2, 0.322106219e1, 0.127128441e4, 0.256690919e1],
    [500, 0.1084564e4, 0.700000405e3, 0.307437693e1, 0.241200877e4, 0.203237509e1],
    [647, 0.3580000e3, 0.220384756e2, 0.618315728e1, 0.252145078e3, 0.432092307e1],
    [900, 0.2410000e0, 0.100062559e0, 0.175890657e1, 0.724027147e3, 0.916653194e1],
    [900, 0.5261500e2, 0.200000690e2, 0.193510526e1, 0.698445674e3, 0.659070225e1],
    [900, 0.8707690e3, 0.700000006e3, 0.266422350e1, 0.201933608e4, 0.417223802e1],
])


def test_iapws95_verification_table():
    water = HelmholtzEOS(load_data("H2O"))
    T, rho, p, cv, w, s = IAPWS95_TABLE.T
    state = water.state(rho / water.M, T)
    rounding = 6e-9  # nine significant digits
    np.testing.assert_allclose(state.p / 1e6, p, rtol=rounding)
    np.testing.assert_allclose(state.cv * 1e-3 / water.M, cv, rtol=rounding)
    np.testing.assert_allclose(state.w, w, rtol=rounding)
    np.testing.assert_allclose(state.s * 1e-3 / water.M, s, rtol=rounding)
    # and back: the density solver finds the tabulated density from (T, p), within what the
    # rounding of p allows (d rho/rho = kappa_T dp, large next to the critical point)
    allowed = rounding * p * 1e6 * state.kappa_T + 1e-12
    assert np.all(np.abs(fluid("water").density(T, p * 1e6) / rho - 1) < allowed)


def test_water_matches_the_iapws_library():
    """iapws (reference library from the registry), class IAPWS95, over liquid, steam and supercritical."""
    rng = np.random.default_rng(95)
    T = rng.uniform(280.0, 1200.0, 16)
    p = np.exp(rng.uniform(np.log(2e3), np.log(500e6), 16))
    sat = fluid("H2O").saturation_pressure(T)
    far = ~(np.abs(p / sat - 1) < 5e-3)
    T, p = T[far], p[far]
    ours = fluid("H2O").properties(T, p)
    for i, (t, q) in enumerate(zip(T, p)):
        ref = IAPWS95(T=t, P=q / 1e6)
        assert ours["density"][i] == pytest.approx(ref.rho, rel=1e-8)
        assert ours["cp"][i] == pytest.approx(ref.cp * 1e3, rel=1e-7)
        assert ours["speed_of_sound"][i] == pytest.approx(ref.w, rel=1e-7)
        assert ours["alpha_p"][i] == pytest.approx(ref.alfav, rel=1e-7)
        assert ours["kappa_T"][i] == pytest.approx(ref.kappa / 1e6, rel=1e-7)


@pytest.mark.parametrize("key", ["N2", "Ar"])
def test_permanent_gas_molar_volume_at_room_conditions(key):
    """Common practice: an ideal gas occupies 24.79 L/mol at 25 degC and 1 bar; nitrogen and argon
    deviate by less than 0.1 % (Z just below 1)."""
    props = fluid(key).properties(298.15, 1e5)
    assert props["molar_volume"] * 1e3 == pytest.approx(24.79, rel=1e-3)
    assert 0.998 < props["Z"] < 1.0


@pytest.mark.parametrize("key", fluids())
def test_branch_follows_the_saturation_pressure(key):
    """Just above p_sat the liquid root (denser than the saturated liquid), just below it the
    vapor root (lighter than the saturated vapor), up to T_c."""
    f = fluid(key)
    T = np.linspace(f.triple.T, f.critical.T, 60)[1:-1]
    rho_liquid, rho_vapor = f.saturated_densities(T)
    p_sat = f.saturation_pressure(T)
    above, below = f.density(T, p_sat * (1 + 1e-7)), f.density(T, p_sat * (1 - 1e-7))
    assert np.all(above >= rho_liquid * (1 - 1e-9)) and np.all(above < rho_liquid * 1.01)
    assert np.all(below <= rho_vapor * (1 + 1e-9)) and np.all(below > rho_vapor * 0.99)
    # and next to the critical point, where both branches are nearly flat
    T = f.critical.T * (1 - np.array([1e-3, 1e-4, 1e-5]))
    rho_liquid, rho_vapor = f.saturated_densities(T)
    p_sat = f.saturation_pressure(T)
    assert np.all(f.density(T, p_sat * (1 + 1e-6)) >= rho_liquid)
    assert np.all(f.density(T, p_sat * (1 - 1e-6)) <= rho_vapor)


def test_cold_vapor_below_the_triple_point_is_extrapolated():
    """A CO2 vent at 1 atm and -70 degC is vapor (common practice); the equation's vapor branch is
    evaluated there and flagged. CoolProp (reference library) evaluates the same equation at our
    density and must return our pressure."""
    f = fluid("CO2")
    props = f.properties(np.array([203.15, 203.15]), np.array([101325.0, 5e6]))
    assert props["extrapolated"].tolist() == [True, False]
    assert np.isnan(props["density"][1])  # above the sublimation curve: solid, not evaluated
    state = CP.AbstractState("HEOS", "CO2")
    state.update(CP.DmassT_INPUTS, props["density"][0], 203.15)
    assert state.p() == pytest.approx(101325.0, rel=1e-9)
    assert 0.97 < props["Z"][0] < 1.0


def test_liquid_water_beside_ice_below_the_triple_point():
    """Under pressure water stays liquid below 273.16 K down to the ice Ih melting curve (IAPWS
    R14-08), inside the range of IAPWS-95, which runs from the melting-pressure curve (Wagner &
    Pruss 2002, from memory). CoolProp and iapws (reference libraries) give the same density."""
    T, p = np.array([260.0, 268.0, 260.0]), np.array([200e6, 100e6, 100e6])
    props = fluid("H2O").properties(T, p)
    for i in range(2):
        assert props["density"][i] == pytest.approx(CP.PropsSI("D", "T", T[i], "P", p[i], "Water"), rel=1e-10)
        with warnings.catch_warnings():  # iapws warns below 273.16 K whatever the pressure
            warnings.simplefilter("ignore", UserWarning)
            assert props["density"][i] == pytest.approx(IAPWS95(T=T[i], P=p[i] / 1e6).rho, rel=1e-9)
    assert props["extrapolated"].tolist() == [False, False, False]
    assert np.isnan(props["density"][2])  # ice Ih: it melts at about 138 MPa at 260 K


def test_solid_states_give_nan():
    """CO2 freezes above its melting curve (Span & Wagner 1996): 250 K at 1 GPa is solid."""
    f = fluid("CO2")
    assert np.isnan(f.density(250.0, 1e9))
    assert f.density(250.0, f.melting_pressure(250.0) * 0.99) > 1000.0


def test_out_of_range_and_nan_give_nan_not_errors():
    f = fluid("R134a")
    T = np.array([300.0, np.nan, 300.0, 300.0, 500.0, 100.0])
    p = np.array([1e5, 1e5, np.nan, 80e6, 1e5, 1e3])
    props = f.properties(T, p)
    assert np.isfinite(props["density"][0])
    assert np.all(np.isnan(props["density"][1:]))
    assert not props["extrapolated"].any()
    assert np.isnan(f.density(300.0, -1.0))


def test_shapes_scalars_and_broadcasting():
    f = fluid("methane")
    assert isinstance(f.density(300.0, 1e6), float)
    props = f.properties(np.array([[250.0], [300.0], [350.0]]), np.array([1e5, 1e6, 1e7, 3e7]))
    assert set(props) == set(PROPERTY_NAMES) | {"extrapolated"}
    assert all(v.shape == (3, 4) for v in props.values())
    flat = f.properties(np.repeat([250.0, 300.0, 350.0], 4), np.tile([1e5, 1e6, 1e7, 3e7], 3))
    np.testing.assert_array_equal(props["cp"].ravel(), flat["cp"])


def test_names_aliases_and_unknown_fluids():
    assert fluid("carbon dioxide") is fluid("R744") is fluid("co2")
    assert fluid("H2O").key == fluid("water").key == "H2O"
    assert fluid("R-134a").key == "R134a" and fluid("NH3").name == "ammonia"
    assert len(fluids()) == 10
    with pytest.raises(ValueError, match="unknown fluid 'unobtainium'; known: Ar, C2H6"):
        fluid("unobtainium")


def test_fluid_constants():
    """Span & Wagner (1996), CO2 critical and triple points, from memory."""
    f = fluid("CO2")
    assert f.molar_mass == pytest.approx(0.0440098)
    assert (f.critical.T, f.critical.p) == pytest.approx((304.1282, 7.3773e6))
    assert f.critical.rho == pytest.approx(467.6, rel=1e-6)
    assert (f.triple.T, f.triple.p) == pytest.approx((216.592, 0.51795e6), rel=1e-4)
    assert "doi:10.1063/1.555991" in f.source
    assert f.range.p_max == 800e6
