"""Figures checked by what they draw (arrays, labels, scales), not by pixels."""

import subprocess
import sys

import CoolProp.CoolProp as CoolProp
import numpy as np
import pytest

import thermo
from thermo.units import PressureUnit, TemperatureUnit
from tui.analysis.display import Units
from tui.analysis.figures import margins_figure, thin, trajectory_figure
from tui.analysis.run import AnalysedRun

pytest.importorskip("matplotlib")

UNITS = Units.of(PressureUnit.from_text("bar(g)"), TemperatureUnit.from_text("degC"))
CO2 = thermo.fluid("CO2")


def _run(n=500):
    t = np.linspace(0.0, 100.0, n)
    T = np.linspace(280.0, 300.0, n)
    p = np.full(n, 5.0e6)
    dT = T - 287.43
    return AnalysedRun(
        source="logs/heating.csv",
        fluid=CO2.name,
        t_s=t,
        pressure_Pa=p,
        temperature_K=T,
        quality=np.array(["ok"] * n),
        phase=np.array(["liquid"] * n),
        margins={"dT_saturation_K": dT, "dp_saturation_Pa": dT * 1.3e5, "critical_distance": np.hypot(T / 304.13 - 1, p / 7.3773e6 - 1)},
    )


def _lines(axes):
    return {line.get_label(): line for line in axes.get_lines()}


def test_the_trajectory_sits_on_a_log_p_diagram_with_the_boundaries_and_special_points():
    run = _run()
    figure = trajectory_figure(run, CO2, UNITS)
    axes = figure.axes[0]
    assert axes.get_yscale() == "log"
    assert axes.get_xlabel() == "temperature [°C]" and axes.get_ylabel() == "pressure [bar(a)]"  # absolute on a log axis
    lines = _lines(axes)
    assert {"saturation curve", "melting curve", "sublimation curve", "critical point", "triple point"} <= set(lines)
    # the saturation curve as drawn, against the reference library (CoolProp, HEOS CO2): 0.1 %
    sat = lines["saturation curve"]
    T_K, p_bar = sat.get_xdata() + 273.15, sat.get_ydata()
    inside = (T_K > CO2.triple.T + 1) & (T_K < CO2.critical.T - 1)
    reference = np.array([CoolProp.PropsSI("P", "T", T, "Q", 0, "CO2") for T in T_K[inside][::20]]) / 1e5
    np.testing.assert_allclose(p_bar[inside][::20], reference, rtol=1e-3)
    # the special points, against CoolProp's constants for CO2
    (Tc,), (pc,) = lines["critical point"].get_data()
    assert Tc + 273.15 == pytest.approx(CoolProp.PropsSI("Tcrit", "CO2"), abs=0.01)
    assert pc == pytest.approx(CoolProp.PropsSI("pcrit", "CO2") / 1e5, rel=1e-4)
    (Tt,), (pt,) = lines["triple point"].get_data()
    assert Tt + 273.15 == pytest.approx(CoolProp.PropsSI("Ttriple", "CO2"), abs=0.01)
    assert pt == pytest.approx(CoolProp.PropsSI("ptriple", "CO2") / 1e5, rel=1e-3)
    # the melting curve starts at the triple point and rises from there (CoolProp's melting line of CO2)
    melt_T, melt_p = lines["melting curve"].get_data()
    assert (melt_T[0], melt_p[0]) == (pytest.approx(Tt, abs=1e-3), pytest.approx(pt, rel=1e-6))
    melting_line = CoolProp.AbstractState("HEOS", "CO2")
    for T_C, p_bar in list(zip(melt_T, melt_p))[::80]:
        assert T_C + 273.15 == pytest.approx(melting_line.melting_line(CoolProp.iT, CoolProp.iP, p_bar * 1e5), abs=0.05)
    # every sublimation point is below the triple pressure
    assert (lines["sublimation curve"].get_ydata() <= pt * (1 + 1e-9)).all()
    # the run: one point per sample, coloured by its time
    points = axes.collections[0]
    np.testing.assert_allclose(points.get_offsets(), np.column_stack([run.temperature_K - 273.15, run.pressure_Pa / 1e5]))
    np.testing.assert_array_equal(points.get_array(), run.t_s)
    assert figure.axes[1].get_ylabel() == "time [s]"  # the colour bar


def test_the_margins_carry_their_limits_boundary_and_alarm_periods():
    run = _run()
    figure = margins_figure(
        run,
        UNITS,
        limits={"dT_saturation_K": [2.0, -2.0], "critical_distance": [0.05]},
        alarms={"dT_saturation_K": {"saturation-temperature": [(30.0, 45.5), (60.0, 70.0)], "two-phase": [(50.0, 55.0)]}},
    )
    panels = figure.axes
    assert [a.get_ylabel() for a in panels] == ["dT_saturation [K]", "dp_saturation [bar]", "critical_distance"]
    sat, dp, crit = (_lines(a) for a in panels)
    np.testing.assert_allclose(sat["dT_saturation"].get_ydata(), run.margins["dT_saturation_K"])
    np.testing.assert_allclose(dp["dp_saturation"].get_ydata(), run.margins["dp_saturation_Pa"] / 1e5)  # a difference: no offset
    limit_lines = [line for line in panels[0].get_lines() if line.get_linestyle() == "--"]
    assert sorted(line.get_ydata()[0] for line in limit_lines) == [-2.0, 2.0]
    assert sat["limit 2, -2 K"] is limit_lines[0]
    assert crit["limit 0.05"].get_ydata()[0] == 0.05
    spans = [(patch.get_x(), patch.get_x() + patch.get_width()) for patch in panels[0].patches]
    assert spans == [(30.0, 45.5), (60.0, 70.0), (50.0, 55.0)]
    colours = [tuple(patch.get_facecolor()[:3]) for patch in panels[0].patches]
    assert colours[0] == colours[1] != colours[2], "one colour per condition"
    assert "alarm: saturation-temperature" in [h.get_label() for h in panels[0].get_legend().legend_handles]
    assert len(panels[1].patches) == 0 and panels[-1].get_xlabel() == "time [s]"


def test_thinning_keeps_every_excursion_of_a_long_run():
    n = 1_000_003
    values = np.sin(np.linspace(0, 20, n))
    values[123_457] = -7.0  # one narrow dip toward a boundary
    values[900_001] = 9.0
    other = np.linspace(0, 1, n)
    other[5] = np.nan
    kept = thin([values, other], max_points=2000)
    assert kept.size <= 2002
    assert {0, n - 1, 123_457, 900_001} <= set(kept.tolist())
    assert np.all(np.diff(kept) > 0)


def test_a_missing_extra_is_named_in_one_line(tmp_path):
    script = (
        "import sys; sys.modules['matplotlib'] = None; sys.modules['matplotlib.figure'] = None\n"
        "from tui.cli import main\n"
        f"sys.exit(main(['analyze', 'fixtures/logs/co2-heating-50bar.csv', '--fluid', 'CO2', '--figures', {str(tmp_path)!r}]))\n"
    )
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=120)
    assert done.returncode == 1
    assert done.stderr.strip().splitlines()[-1] == (
        "rigside analyze: figures need matplotlib: install the optional extra 'figures' (pip install 'rigside[figures]')"
    )
