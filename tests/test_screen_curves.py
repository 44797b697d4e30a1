"""The boundaries the screen (and the analysis figures) draw."""

import numpy as np
import pytest

import thermo
from tui.screen.curves import fluid_curves


def test_water_melting_curve_starts_at_the_triple_point_and_passes_one_atmosphere():
    water = thermo.fluid("water")
    melting = fluid_curves(water).melting
    assert melting.p.min() == pytest.approx(water.triple.p, rel=1e-9)
    assert np.all(np.diff(melting.p) > 0)
    # the foot below 30 bar is drawn, densely enough to be a line
    assert np.count_nonzero(melting.p < 30e5) >= 100
    # ice melts at 273.152 K under 1 atm (IAPWS R14-08, from memory; common practice: 0 °C)
    assert np.interp(101325.0, melting.p, melting.T) == pytest.approx(273.152, abs=0.005)


def test_co2_melting_curve_rises_from_the_triple_point():
    co2 = thermo.fluid("CO2")
    melting = fluid_curves(co2).melting
    assert melting.p[0] == pytest.approx(co2.triple.p, rel=1e-9)
    assert melting.T[0] == pytest.approx(co2.triple.T, abs=0.01)
    assert np.all(np.diff(melting.T) > 0)
