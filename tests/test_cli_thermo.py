"""`rigside fluids`, `rigside state` and `rigside curve`: through tui.cli.main and as a real process."""

import csv
import io
import json
import math
import re
import shlex
import subprocess
import sys
from pathlib import Path

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from tui.cli import main

ROOT = Path(__file__).resolve().parents[1]
RIGSIDE = Path(sys.executable).with_name("rigside")
BUTANE = "Tc=425.1 K, pc=37.96 bar, omega=0.2, M=58.12 g/mol, Tt=134.9 K, name=n-butane"


def rigside(capsys, *argv: str) -> tuple[int, str, str]:
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def state_json(capsys, *argv: str) -> dict:
    code, out, err = rigside(capsys, "state", *argv, "--json")
    assert code == 0, err
    return json.loads(out)


# ------------------------------------------------------------------ state
def test_co2_at_58_barg_and_19_degC_is_subcooled_liquid(capsys):
    state = state_json(capsys, "CO2", "-p", "58 bar(g)", "-t", "19 degC")
    assert state["phase"] == "liquid"
    assert state["pressure_Pa"] == pytest.approx(58e5 + 101325.0)
    assert state["temperature_K"] == pytest.approx(292.15)
    # common practice: CO2 boils at about 21 °C at 59 bar a, so 19 °C is a few K subcooled
    assert -4.0 < state["dT_saturation_K"] < -1.0
    # CoolProp (reference library from the registry)
    T_sat = CP.PropsSI("T", "P", state["pressure_Pa"], "Q", 0, "CO2")
    p_sat = CP.PropsSI("P", "T", 292.15, "Q", 0, "CO2")
    assert state["dT_saturation_K"] == pytest.approx(292.15 - T_sat, abs=0.01)
    assert state["dp_saturation_Pa"] == pytest.approx(state["pressure_Pa"] - p_sat, rel=1e-3)
    assert state["density_kg_m3"] == pytest.approx(CP.PropsSI("D", "T", 292.15, "P", state["pressure_Pa"], "CO2"), rel=1e-5)
    assert state["dT_solid_K"] > 70.0  # common practice: CO2 freezes near -56 °C
    assert state["approximate"] is False and state["extrapolated"] is False


def test_json_has_the_documented_keys_in_si(capsys):
    state = state_json(capsys, "CO2", "-p", "58 bar(g)", "-t", "19 degC")
    for key in ("phase", "pressure_Pa", "temperature_K", "density_kg_m3", "dT_saturation_K", "dp_saturation_Pa",
                "dT_solid_K", "critical_distance", "alpha_p_1_K", "kappa_T_1_Pa", "cp_J_kg_K", "cv_J_kg_K",
                "speed_of_sound_m_s", "enthalpy_J_kg", "entropy_J_kg_K", "molar_volume_m3_mol",
                "compressibility_factor", "atmosphere_Pa", "approximate", "extrapolated", "notes"):
        assert key in state
    # reduced distance sqrt((T/Tc - 1)^2 + (p/pc - 1)^2), Tc and pc of Span & Wagner (1996)
    expected = math.hypot(292.15 / 304.1282 - 1, (58e5 + 101325) / 7.3773e6 - 1)
    assert state["critical_distance"] == pytest.approx(expected, rel=1e-9)


def test_text_output_speaks_the_users_units(capsys):
    code, out, _ = rigside(capsys, "state", "CO2", "-p", "58 bar(g)", "-t", "19 degC")
    assert code == 0
    assert out.startswith("carbon dioxide (CO2): liquid")
    assert "58.000 bar(g) = 59.013 bar(a)" in out
    assert re.search(r"subcooling\s+2\.2\d K\s+boils at 21\.2\d °C", out)
    assert "above vapor pressure" in out and "density" in out
    code, out, _ = rigside(capsys, "state", "CO2", "-p", "58 bar(g)", "-t", "19 degC",
                           "--pressure-unit", "psig", "--temperature-unit", "degF")
    assert "841.22 psi(g)" in out  # 58e5 Pa / 6894.757 Pa/psi
    assert "66.20 °F" in out
    assert re.search(r"subcooling\s+4\.\d\d °F", out)  # 2.27 K × 9/5


def test_vapor_below_the_triple_point_is_extrapolated_and_undefined_margins_are_null(capsys):
    # common practice: dry ice sublimes at -78.5 °C at 1 atm, so CO2 at 1 atm and -70 °C is vapor
    state = state_json(capsys, "CO2", "-p", "1 atm", "-t", "-70 degC")
    assert state["phase"] == "vapor"
    assert state["extrapolated"] is True
    assert state["dT_saturation_K"] is None and state["dp_saturation_Pa"] is None
    assert state["dT_solid_K"] == pytest.approx(-70 + 78.5, abs=0.3)
    assert any("extrapolated" in note for note in state["notes"])


def test_solid_has_no_fluid_properties(capsys):
    state = state_json(capsys, "CO2", "-p", "1 atm", "-t", "-80 degC")
    assert state["phase"] == "solid"
    assert state["dT_solid_K"] < 0
    assert state["density_kg_m3"] is None
    code, out, _ = rigside(capsys, "state", "CO2", "-p", "1 atm", "-t", "-80 degC")
    assert "below solid line" in out and "\nproperties\n" not in out


def test_uncertainty_puts_a_state_near_the_curve_on_it(capsys):
    p_sat = CP.PropsSI("P", "T", 292.15, "Q", 0, "CO2")  # CoolProp: vapor pressure at 19 °C
    pressure = f"{(p_sat + 0.2e5) / 1e5:.4f} bar"
    assert state_json(capsys, "CO2", "-p", pressure, "-t", "19 degC")["phase"] == "liquid"
    assert state_json(capsys, "CO2", "-p", pressure, "-t", "19 degC", "--u-p", "0.5 bar")["phase"] == "liquid+vapor"


def test_local_atmosphere_shifts_gauge_pressures(capsys):
    state = state_json(capsys, "CO2", "-p", "58 bar(g)", "-t", "19 degC", "--atmosphere", "900 hPa")
    assert state["pressure_Pa"] == pytest.approx(58e5 + 90_000.0)
    assert state["atmosphere_Pa"] == pytest.approx(90_000.0)


def test_fallback_solid_curve_is_flagged_approximate(capsys):
    # the ammonia reference equation (Gao et al. 2023) comes with no melting equation
    state = state_json(capsys, "NH3", "-p", "500 bar", "-t", "-70 degC")
    assert state["phase"] == "liquid"
    assert state["approximate"] is True
    assert any("no published melting equation" in note for note in state["notes"])


# ------------------------------------------------------------------ custom fluids
def test_custom_fluid_from_its_constants(capsys):
    state = state_json(capsys, "--custom", BUTANE, "-p", "3 bar(g)", "-t", "20 degC")
    assert state["phase"] == "liquid"
    assert state["approximate"] is True
    # CoolProp (reference library): n-butane vapor pressure at 20 °C; Lee-Kesler is good to ~1 % here
    p_sat = CP.PropsSI("P", "T", 293.15, "Q", 0, "n-Butane")
    assert state["pressure_Pa"] - state["dp_saturation_Pa"] == pytest.approx(p_sat, rel=0.02)
    assert any("custom fluid" in note for note in state["notes"])


def test_fluid_file_gives_the_same_fluid_as_custom(capsys, tmp_path):
    path = tmp_path / "butane.toml"
    path.write_text('name = "n-butane"\nTc = "425.1 K"\npc = "37.96 bar"\nomega = 0.2\nM = "58.12 g/mol"\nTt = "134.9 K"\n')
    from_file = state_json(capsys, "--fluid-file", str(path), "-p", "3 bar(g)", "-t", "20 degC")
    from_spec = state_json(capsys, "--custom", BUTANE, "-p", "3 bar(g)", "-t", "20 degC")
    assert from_file == from_spec


@pytest.mark.parametrize(
    ("argv", "problem"),
    [
        (["--custom", "Tc=425.1 K, pc=37.96 bar, omega=0.2"], "missing M"),
        (["--custom", "Tc=425.1 K, pc=37.96 bar, omega=0.2, M=58.12 g/mol, colour=blue"], "unknown key 'colour'"),
        (["--custom", "Tc=425.1 K pc=37.96 bar"], "missing pc"),
        (["--custom", "Tc=425.1 K, pc=37.96 barg, omega=0.2, M=58.12 g/mol"], "must be absolute"),
        (["--custom", "Tc=425.1 K, pc=37.96 bar, omega=high, M=58.12 g/mol"], "omega must be a plain number"),
        (["--custom", "Tc=425.1, pc=37.96 bar, omega=0.2, M=58.12 g/mol"], "no unit"),
        (["CO2", "--custom", BUTANE], "exactly one of FLUID, --custom or --fluid-file"),
        ([], "exactly one of FLUID"),
        (["--fluid-file", "/nonexistent/butane.toml"], "No such file"),
        (["--fluid", "CO2"], "cannot read --fluid-file 'CO2': No such file or directory (a built-in fluid is given as FLUID"),
    ],
)
def test_bad_custom_fluids_are_named(capsys, argv, problem):
    code, out, err = rigside(capsys, "state", *argv, "-p", "3 bar(g)", "-t", "20 degC")
    assert code != 0 and out == ""
    assert problem in err and err.count("\n") == 1


def test_bad_fluid_file_syntax_is_a_usage_error(capsys, tmp_path):
    path = tmp_path / "broken.toml"
    path.write_text("Tc = 425.1 K\n")
    code, _, err = rigside(capsys, "state", "--fluid-file", str(path), "-p", "3 bar(g)", "-t", "20 degC")
    assert code == 2 and "not valid TOML" in err


# ------------------------------------------------------------------ bad input
@pytest.mark.parametrize(
    ("argv", "problem"),
    [
        (["CO3", "-p", "58 bar(g)", "-t", "19 degC"], "unknown fluid 'CO3'; known: Ar"),
        (["CO2", "-p", "58 bra", "-t", "19 degC"], "unknown pressure unit 'bra'"),
        (["CO2", "-p", "58", "-t", "19 degC"], "has no unit"),
        (["CO2", "-p", "58 bar", "-t", "19 degrees"], "unknown temperature unit"),
        (["CO2", "-p", "-2 barg", "-t", "19 degC"], "below zero absolute"),
        (["CO2", "-p", "58 bar", "-t", "-300 degC"], "below absolute zero"),
        (["CO2", "-p", "9000 bar", "-t", "19 degC"], "outside the range of its equation of state"),
        (["CO2", "-p", "58 bar", "-t", "2000 K"], "outside the range"),
        (["CO2", "-p", "58 bar", "-t", "19 degC", "--u-p", "-1 bar"], "must not be negative"),
        (["CO2", "-p", "58 bar", "-t", "19 degC", "--atmosphere", "1 barg"], "absolute"),
        (["CO2", "-p", "58 bar", "-t", "19 degC", "--pressure-unit", "furlong"], "unknown pressure unit"),
    ],
)
def test_bad_state_input_is_one_line_and_exit_2(capsys, argv, problem):
    code, out, err = rigside(capsys, "state", *argv)
    assert code == 2 and out == ""
    assert err.startswith("rigside state: ") and problem in err and err.count("\n") == 1


# ------------------------------------------------------------------ fluids
def test_fluids_lists_constants_and_sources(capsys):
    code, out, _ = rigside(capsys, "fluids")
    assert code == 0
    for key in ("CO2", "H2O", "N2", "Ar", "O2", "CH4", "C2H6", "C3H8", "NH3", "R134a"):
        assert re.search(rf"^{key}  ", out, re.MULTILINE)
    assert "Tc 304.128 K" in out and "pc 7.3773 MPa(a)" in out  # Span & Wagner (1996), Table 3
    assert "doi:10.1063/1.555991" in out
    assert "melting (fallback, approximate)" in out  # NH3 and R-134a: no published melting equation


def test_fluids_json_is_one_object_per_line(capsys):
    code, out, _ = rigside(capsys, "fluids", "--json")
    assert code == 0
    records = {record["key"]: record for record in map(json.loads, out.splitlines())}
    assert len(records) == 10
    co2 = records["CO2"]
    assert co2["critical_temperature_K"] == pytest.approx(304.1282)  # Span & Wagner (1996)
    assert co2["critical_pressure_Pa"] == pytest.approx(7.3773e6)
    assert co2["triple_temperature_K"] == pytest.approx(216.592)
    assert co2["molar_mass_kg_mol"] == pytest.approx(0.0440098)
    assert co2["melting_published"] and co2["sublimation_published"]
    assert not records["NH3"]["melting_published"]
    for record in records.values():
        assert record["equation_of_state_source"] and record["melting_source"] and record["sublimation_source"]


# ------------------------------------------------------------------ curve
def curve_csv(capsys, *argv: str) -> list[list[str]]:
    code, out, err = rigside(capsys, "curve", *argv, "--csv")
    assert code == 0, err
    return list(csv.reader(io.StringIO(out)))


def test_saturation_table_matches_coolprop(capsys):
    rows = curve_csv(capsys, "CO2", "saturation", "--from", "-50 degC", "--to", "30 degC", "--points", "9")
    assert rows[0] == ["T [°C]", "p [bar(a)]", "liquid density [kg/m3]", "vapor density [kg/m3]"]
    values = np.array(rows[1:], dtype=float)
    assert values.shape == (9, 4)
    assert values[:, 0] == pytest.approx(np.linspace(-50, 30, 9))
    T = values[:, 0] + 273.15
    # CoolProp (reference library from the registry)
    assert values[:, 1] == pytest.approx(CP.PropsSI("P", "T", T, "Q", 0, "CO2") / 1e5, rel=1e-4)
    assert values[:, 2] == pytest.approx(CP.PropsSI("D", "T", T, "Q", 0, "CO2"), rel=1e-4)
    assert values[:, 3] == pytest.approx(CP.PropsSI("D", "T", T, "Q", 1, "CO2"), rel=1e-4)


def test_saturation_by_pressure_in_gauge_units(capsys):
    rows = curve_csv(capsys, "CO2", "saturation", "--from", "10 bar(g)", "--to", "60 bar(g)", "--points", "6",
                     "--temperature-unit", "degC")
    assert rows[0][:2] == ["T [°C]", "p [bar(g)]"]
    values = np.array(rows[1:], dtype=float)
    assert values[:, 1] == pytest.approx([10, 20, 30, 40, 50, 60])  # evenly spaced: less than a decade
    T_sat = CP.PropsSI("T", "P", values[:, 1] * 1e5 + 101325, "Q", 0, "CO2") - 273.15  # CoolProp
    assert values[:, 0] == pytest.approx(T_sat, abs=2e-3)


def test_sublimation_by_pressure_is_log_spaced(capsys):
    rows = curve_csv(capsys, "CO2", "sublimation", "--from", "0.1 bar", "--to", "5 bar", "--points", "3",
                     "--temperature-unit", "degC")
    values = np.array(rows[1:], dtype=float)
    assert values[:, 1] == pytest.approx(np.geomspace(0.1, 5, 3))
    rows = curve_csv(capsys, "CO2", "sublimation", "--from", "1 atm", "--to", "1 atm", "--points", "2",
                     "--temperature-unit", "degC")
    assert float(rows[1][0]) == pytest.approx(-78.5, abs=0.1)  # common practice: dry ice sublimes at -78.5 °C


def test_a_range_given_by_its_end_alone_takes_that_ends_unit(capsys):
    rows = curve_csv(capsys, "CO2", "saturation", "--to", "0 degC", "--points", "2")
    assert rows[0][0] == "T [°C]"
    assert [float(row[0]) for row in rows[1:]] == pytest.approx([216.592 - 273.15, 0.0])  # from the triple point


def test_default_curve_runs_its_whole_range_as_a_text_table(capsys):
    code, out, _ = rigside(capsys, "curve", "CO2", "melting", "--points", "4")
    assert code == 0
    lines = out.splitlines()
    assert lines[0].startswith("carbon dioxide (CO2), melting curve: Span, R.; Wagner, W.")
    assert lines[1].split() == ["T", "[K]", "p", "[bar(a)]"]
    assert lines[2].split()[0] == "216.59"  # from the triple point, Span & Wagner (1996)
    assert len(lines) == 2 + 4


def test_vertical_fallback_melting_curve_goes_by_pressure(capsys):
    rows = curve_csv(capsys, "NH3", "melting", "--points", "3")
    values = np.array(rows[1:], dtype=float)
    assert values[:, 0] == pytest.approx(195.49, abs=0.01)  # the triple-point temperature at every pressure
    assert values[0, 1] < values[1, 1] < values[2, 1]


def test_custom_fluid_saturation_curve_ends_at_its_critical_point(capsys):
    rows = curve_csv(capsys, "--custom", BUTANE, "saturation", "--points", "3")
    last = np.array(rows[-1], dtype=float)
    assert last[0] == pytest.approx(425.1)
    assert last[1] == pytest.approx(37.96, rel=1e-4)  # Lee & Kesler (1975): p_sat(Tc) is pc to 2e-5


@pytest.mark.parametrize(
    ("argv", "problem"),
    [
        (["CO2", "melting", "--from", "-60 degC"], "the melting curve runs from -56.558 °C"),
        (["CO2", "sublimation", "--from", "1 mbar", "--to", "1 bar"], "the sublimation curve runs from"),
        (["CO2", "saturation", "--from", "-50 degC", "--to", "10 bar"], "both be temperatures or both be pressures"),
        (["CO2", "saturation", "--from", "twenty"], "cannot read a temperature or pressure in 'twenty'"),
        (["CO2", "saturation", "--from", "20 degrees"], "unknown unit 'degrees'"),
        (["CO2", "saturation", "--from", "-300 degC"], "below absolute zero"),
        (["CO2", "saturation", "--points", "1"], "--points must be between 2"),
        (["CO2", "saturation", "--pressure-unit", "K"], "unknown pressure unit"),
        (["--custom", "Tc=425.1 K, pc=37.96 bar, omega=0.2, M=58.12 g/mol", "melting"], "no melting curve is known"),
    ],
)
def test_bad_curve_input_is_one_line_and_exit_2(capsys, argv, problem):
    code, out, err = rigside(capsys, "curve", *argv)
    assert code == 2 and out == ""
    assert problem in err and err.count("\n") == 1


# ------------------------------------------------------------------ as a process
def readme_commands() -> list[list[str]]:
    """The arguments of every `rigside` command in the README's shell blocks, in order."""
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    commands = []
    for block in re.findall(r"```sh\n(.*?)```", readme, re.DOTALL):
        for line in block.splitlines():
            command = line.split("&&")[-1].strip()
            if re.match(r"(\.venv/bin/)?rigside ", command):
                commands.append(shlex.split(command)[1:])
    return commands


def test_readme_set_up_command_names_a_rigside_command():
    first = readme_commands()[0]
    done = subprocess.run([str(RIGSIDE), first[0], "--help"], capture_output=True, text=True, timeout=120, cwd=ROOT)
    assert done.returncode == 0, done.stderr


def test_readme_state_example_runs_as_a_process():
    argv = next(command for command in readme_commands() if command[0] == "state")
    assert argv[:6] == ["state", "CO2", "-p", "58 bar(g)", "-t", "19 degC"]
    done = subprocess.run([str(RIGSIDE), *argv], capture_output=True, text=True, timeout=120, cwd=ROOT)
    assert done.returncode == 0, done.stderr
    assert done.stdout.startswith("carbon dioxide (CO2): liquid")
    assert "subcooling" in done.stdout


def test_every_readme_example_of_these_commands_runs(capsys, tmp_path, monkeypatch):
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    (tmp_path / "butane.toml").write_text(re.search(r"```toml\n(.*?)```", readme, re.DOTALL).group(1))
    monkeypatch.chdir(tmp_path)
    examples = [argv for argv in readme_commands() if argv[0] in ("fluids", "state", "curve")]
    assert len(examples) >= 8
    for argv in examples:
        argv = argv[: argv.index(">")] if ">" in argv else argv
        code, out, err = rigside(capsys, *argv)
        assert code == 0 and out and not err, (argv, err)


def test_bad_input_as_a_process_is_one_line_on_stderr_and_exit_2():
    done = subprocess.run([str(RIGSIDE), "state", "CO2", "-p", "58 bra", "-t", "19 degC"],
                          capture_output=True, text=True, timeout=120, cwd=ROOT)
    assert done.returncode == 2 and done.stdout == ""
    assert done.stderr.startswith("rigside state: unknown pressure unit 'bra'") and done.stderr.count("\n") == 1


def test_json_as_a_process():
    done = subprocess.run([str(RIGSIDE), "state", "water", "-p", "1 atm", "-t", "20 degC", "--json"],
                          capture_output=True, text=True, timeout=120, cwd=ROOT)
    assert done.returncode == 0, done.stderr
    state = json.loads(done.stdout)
    assert state["phase"] == "liquid"
    assert state["density_kg_m3"] == pytest.approx(998.2, abs=0.1)  # IAPWS-95 (common practice: 998.2 kg/m³ at 20 °C)
