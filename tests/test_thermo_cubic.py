"""Custom fluids (thermo.cubic): Peng-Robinson and Lee-Kesler against their papers and CoolProp."""

import CoolProp.CoolProp as CP
import numpy as np
import pytest

import thermo
from thermo.cubic import OMEGA_A, OMEGA_B, R, Z_CRITICAL

#: CoolProp name -> (Tc [K], pc [Pa], acentric factor, M [kg/mol], T_triple [K]), from CoolProp itself
REFERENCE = {name: tuple(CP.PropsSI(key, name) for key in ("Tcrit", "pcrit", "acentric", "molar_mass", "Ttriple"))
             for name in ("CarbonDioxide", "n-Propane", "Nitrogen", "R134a")}


def custom(name: str, **kwargs):
    Tc, pc, omega, M, T_t = REFERENCE[name]
    return thermo.custom_fluid(name, Tc, pc, omega, M, **({"triple_T": T_t} | kwargs))


def test_constants_are_the_papers_rounded_ones():
    # Peng & Robinson (1976), eqs. 9-10: Omega_a = 0.45724, Omega_b = 0.07780, Z_c = 0.307
    assert round(OMEGA_A, 5) == 0.45724 and round(OMEGA_B, 5) == 0.07780 and round(Z_CRITICAL, 3) == 0.307


@pytest.mark.parametrize("name", sorted(REFERENCE))
def test_the_critical_point_is_reproduced(name):
    f = custom(name)
    eos, Tc, pc = f.eos, f.critical.T, f.critical.p
    v_c = f.molar_mass / f.critical.rho
    assert eos.pressure(v_c, Tc) == pytest.approx(pc, rel=1e-12)
    h = 1e-4 * v_c
    p = [eos.pressure(v_c + i * h, Tc) for i in (-2, -1, 0, 1, 2)]
    dp_dv = (p[3] - p[1]) / (2 * h)
    d2p_dv2 = (p[3] - 2 * p[2] + p[1]) / h**2
    assert abs(dp_dv) * v_c / pc < 1e-7 and abs(d2p_dv2) * v_c**2 / pc < 1e-4
    liquid, vapor = eos.compressibility_roots(Tc, pc)  # a triple root: found to about cbrt(1e-16)
    assert liquid == pytest.approx(Z_CRITICAL, rel=1e-4) and vapor == pytest.approx(Z_CRITICAL, rel=1e-4)
    # Lee & Kesler (1975): the correlation passes through the critical point (f0(1) = f1(1) = 0 to 1e-4)
    assert f.saturation_pressure(Tc) == pytest.approx(pc, rel=1e-4)
    assert f.classify(Tc, pc, 0.01, 100.0).phase == "critical"


@pytest.mark.parametrize("name", sorted(REFERENCE))
def test_lee_kesler_vapor_pressure_is_within_a_few_percent_of_coolprop(name):
    f = custom(name)
    Tc = f.critical.T
    # from T_r = 0.6 up (nonpolar and weakly polar fluids; the correlation is poorer for water)
    T = np.linspace(max(0.6 * Tc, f.triple.T), 0.98 * Tc, 25)
    reference = np.array([CP.PropsSI("P", "T", t, "Q", 0, name) for t in T])  # CoolProp (registry)
    assert np.asarray(f.saturation_pressure(T)) == pytest.approx(reference, rel=0.03)


def test_lee_kesler_honours_the_definition_of_the_acentric_factor():
    # Pitzer's definition (common practice): log10(p_sat/pc) at T = 0.7 Tc equals -1 - w
    f = custom("n-Propane")
    omega = REFERENCE["n-Propane"][2]
    assert np.log10(f.saturation_pressure(0.7 * f.critical.T) / f.critical.p) == pytest.approx(-1 - omega, abs=0.01)


def test_saturation_inverse_and_slope_are_consistent():
    f = custom("R134a")
    T = np.linspace(f.triple.T, f.critical.T, 50)
    p = np.asarray(f.saturation_pressure(T))
    assert np.asarray(f.saturation_temperature(p)) == pytest.approx(T, rel=1e-10)
    h = 1e-5 * T
    numeric = (f.saturation.pressure(T[1:-1] + h[1:-1]) - f.saturation.pressure(T[1:-1] - h[1:-1])) / (2 * h[1:-1])
    assert f.saturation.dpdT(T[1:-1]) == pytest.approx(numeric, rel=1e-6)


@pytest.mark.parametrize(("T", "p", "rel"), [(300.0, 1e5, 0.002), (350.0, 10e6, 0.03), (250.0, 5e6, 0.05)])
def test_densities_are_close_to_coolprops(T, p, rel):
    # CoolProp (registry) for CO2; a two-constant cubic is good to about 1 % for the gas and a
    # few percent for the liquid (common practice)
    f = custom("CarbonDioxide")
    assert f.density(T, p) == pytest.approx(CP.PropsSI("D", "T", T, "P", p, "CarbonDioxide"), rel=rel)


def test_expansivity_and_compressibility_match_finite_differences_of_the_density():
    f = custom("CarbonDioxide")
    T, p = np.array([300.0, 250.0]), np.array([1e6, 5e6])
    props = f.properties(T, p)
    rho = lambda t, q: np.asarray(f.density(t, q))  # noqa: E731
    alpha = -(rho(T + 1e-3, p) - rho(T - 1e-3, p)) / 2e-3 / rho(T, p)
    kappa = (rho(T, p * (1 + 1e-6)) - rho(T, p * (1 - 1e-6))) / (2e-6 * p) / rho(T, p)
    assert props["alpha_p"] == pytest.approx(alpha, rel=1e-5)
    assert props["kappa_T"] == pytest.approx(kappa, rel=1e-5)
    assert props["Z"] == pytest.approx(p * props["molar_volume"] / (R * T))
    assert np.isnan(props["cp"]).all() and np.isnan(props["enthalpy"]).all()


def test_a_custom_fluid_says_it_is_approximate_everywhere():
    f = custom("CarbonDioxide")
    assert f.name == "CarbonDioxide (approximate, Peng–Robinson)" and f.approximate
    c = f.classify(np.array([250.0, 300.0, 200.0, 150.0]), np.array([5e6, 1e5, 1e5, 1e7]), 0.1, 1e3)
    assert c.phase.tolist() == ["liquid", "vapor", "vapor", "solid"]
    assert c.approximate.all()
    assert not c.melting_published and not c.sublimation_published


def test_without_a_triple_point_no_solid_is_reported():
    f = custom("CarbonDioxide", triple_T=None)
    assert f.triple.T == pytest.approx(0.3 * f.critical.T)
    c = f.classify(np.array([150.0, 150.0, 80.0]), np.array([1e7, 1e3, 1e5]))
    assert c.phase.tolist() == ["liquid", "vapor", "out-of-range"]
    assert np.isnan(c.dT_solid).all() and c.approximate[:2].all()


@pytest.mark.parametrize(("kwargs", "message"), [
    ({"Tc": -1.0}, "Tc must be a positive number"),
    ({"pc": float("nan")}, "pc must be a positive number"),
    ({"molar_mass": 0.0}, "molar_mass must be a positive number"),
    ({"acentric_factor": float("inf")}, "acentric_factor must be a number"),
    ({"triple_T": 400.0}, "triple_T must lie between 0 and Tc"),
])
def test_bad_constants_are_refused_with_the_reason(kwargs, message):
    constants = {"Tc": 304.13, "pc": 7.3773e6, "acentric_factor": 0.22, "molar_mass": 0.044, "triple_T": 216.6}
    with pytest.raises(ValueError, match=message):
        thermo.custom_fluid("x", **(constants | kwargs))
