"""The monitor configuration: documented defaults, fluid-suited values, SI normalisation, one-line
errors that name the key, and the `rigside config` command."""

from __future__ import annotations

import json
import tomllib

import pytest

from tui.cli import main
from tui.errors import UsageError
from tui.monitor.config import CONDITION_KEYS, SECTION_KEYS, default_text, load_config


def write(tmp_path, text: str):
    path = tmp_path / "rig.toml"
    path.write_text(text)
    return path


def test_the_default_file_sets_every_key_and_loads():
    defaults = tomllib.loads(default_text())
    for section, keys in SECTION_KEYS.items():
        if section == "custom-fluid":  # no default: documented as a commented example
            after = default_text().split("# [custom-fluid]\n")[1].splitlines()
            example = [line.removeprefix("# ") for line in after[:len(keys)]]
            assert set(tomllib.loads("\n".join(example))) == set(keys)
            continue
        assert set(defaults[section]) == set(keys), section
    for name, keys in CONDITION_KEYS.items():
        assert set(defaults["conditions"][name]) == set(keys), name
    config = load_config()
    assert config.fluid == "CO2" and config.origin == "defaults"
    assert config.u_pressure_Pa == pytest.approx(5000.0)  # "0.05 bar"
    assert config.flood_window_s == 600.0 and config.max_shelve_s == 8 * 3600.0


def test_quantities_with_units_are_normalised_to_si(tmp_path):
    config = load_config(write(tmp_path, """
[gauge]
pressure_uncertainty = "2 psi"
temperature_uncertainty = "0.18 degF"
[conditions.saturation-temperature]
limit = "3.6 degF"
deadband = 0.3
on_delay = "500 ms"
horizon = "2 min"
[conditions.saturation-pressure]
enabled = true
limit = "0.5 bar"
deadband = "5 kPa"
"""))
    assert config.u_pressure_Pa == pytest.approx(2 * 6894.757293168)  # 1 psi = 6894.757 Pa (exact definition)
    assert config.u_temperature_K == pytest.approx(0.1)
    saturation = config.conditions["saturation-temperature"]
    assert (saturation.limit, saturation.deadband, saturation.on_delay_s, saturation.horizon_s) == pytest.approx(
        (2.0, 0.3, 0.5, 120.0))
    pressure = config.conditions["saturation-pressure"]
    assert (pressure.limit, pressure.deadband, pressure.relative) == (50000.0, 5000.0, False)
    assert load_config().conditions["saturation-pressure"].relative  # the default is "5 %"


def test_fluid_suited_values_apply_unless_the_file_sets_the_key(tmp_path):
    assert load_config(fluid="CO2").conditions["solid-approach"].limit == 10.0
    assert load_config(fluid="water").conditions["solid-approach"].limit == 3.0
    assert load_config(fluid="R744").conditions["solid-approach"].limit == 10.0  # an alias of CO2
    assert load_config(fluid="propane").conditions["solid-approach"].limit == 5.0  # the general default
    own = write(tmp_path, 'fluid = "H2O"\n[conditions.solid-approach]\nlimit = "1 K"\n')
    assert load_config(own).conditions["solid-approach"].limit == 1.0
    assert load_config(own).fluid == "H2O"
    assert load_config(own, fluid="CO2").fluid == "CO2"
    assert load_config(fallback_fluid="N2").conditions["saturation-temperature"].limit == 1.0
    assert load_config(own, fallback_fluid="N2").fluid == "H2O"


def test_another_fluid_keeps_the_persons_values_and_takes_that_fluids_suited_ones(tmp_path):
    own = load_config(write(tmp_path, '[conditions.two-phase]\npriority = "high"\n'), fluid="CO2")
    water = own.for_fluid("water")
    assert water.fluid == "water" and water.origin == own.origin
    assert water.conditions["two-phase"].priority == "high"
    assert water.conditions["solid-approach"].limit == 3.0


def test_the_effective_configuration_reads_back_as_the_same(tmp_path):
    config = load_config(fluid="water")
    again = load_config(write(tmp_path, config.to_toml()))
    assert again.effective == config.effective
    assert again.conditions == config.conditions


@pytest.mark.parametrize("text, named", [
    ("[conditions.saturation-temperature]\nlimt = 3\n", "conditions.saturation-temperature.limt"),
    ("[conditions.saturation-temperatur]\nlimit = 3\n", "conditions.saturation-temperatur"),
    ("[gauge]\ntemperature_uncertainty = \"3 bar\"\n", "gauge.temperature_uncertainty"),
    ("[trend]\nbins = 2\n", "trend.bins"),
    ("[conditions.two-phase]\npriority = \"urgent\"\n", "conditions.two-phase.priority"),
    ("[conditions.near-critical]\nlimit = -0.1\n", "conditions.near-critical.limit"),
    ("[conditions.saturation-pressure]\nlimit = \"0.5 bar\"\n", "conditions.saturation-pressure.deadband"),
    ("[conditions.sensor-quality]\nqualities = [\"bad\"]\n", "conditions.sensor-quality.qualities"),
    ("[conditions.phase-change]\nhold = \"2 parsecs\"\n", "conditions.phase-change.hold"),
    ("[units]\npressure = \"furlong\"\n", "units.pressure"),
    ("[flood]\nend_alarms = 20\n", "flood.end_alarms"),
    ("fluid = \"unobtainium\"\n", "unobtainium"),
    ("wobble = 1\n", "wobble"),
    ("[fluid-defaults.CO2.conditions.solid-approach]\nlimit = \"x\"\n", "fluid-defaults.CO2.conditions.solid-approach.limit"),
    ("x = [\n", "not valid TOML"),
])
def test_a_bad_key_or_value_is_one_line_naming_it(tmp_path, text, named):
    with pytest.raises(UsageError) as caught:
        load_config(write(tmp_path, text))
    message = str(caught.value)
    assert named in message and "\n" not in message and str(tmp_path) in message


def test_rigside_config_prints_the_default_and_the_effective_configuration(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "nowhere"))
    assert main(["config", "--default"]) == 0
    assert capsys.readouterr().out == default_text()
    own = write(tmp_path, '[conditions.two-phase]\non_delay = "1 min"\n')
    assert main(["config", str(own), "--fluid", "N2"]) == 0
    printed = tomllib.loads(capsys.readouterr().out)
    assert printed["fluid"] == "N2"
    assert printed["conditions"]["two-phase"]["on_delay"] == 60.0
    assert printed["conditions"]["saturation-temperature"]["limit"] == 1.0
    assert main(["config", str(write(tmp_path, "[trend]\nwindow = \"soon\"\n"))]) == 2
    error = capsys.readouterr().err
    assert error.count("\n") == 1 and "trend.window" in error


def test_a_personal_configuration_in_the_usual_place_is_used(tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path))
    (tmp_path / "rigside").mkdir()
    (tmp_path / "rigside" / "monitor.toml").write_text('fluid = "argon"\n')
    assert main(["config"]) == 0
    assert tomllib.loads(capsys.readouterr().out)["fluid"] == "argon"


BUTANE = {"name": "n-butane", "Tc": "425.1 K", "pc": "37.96 bar", "omega": 0.2, "M": "58.12 g/mol", "Tt": "134.9 K"}


def test_a_custom_fluid_from_a_file_is_recorded_in_si_and_rebuilt_from_the_record(tmp_path):
    from tui.monitor.config import config_from_tree

    path = tmp_path / "butane.toml"
    path.write_text("[custom-fluid]\n" + "".join(f"{k} = {json.dumps(v)}\n" for k, v in BUTANE.items()))
    config = load_config(path)
    assert config.fluid == "n-butane" and config.thermo_fluid.approximate
    assert "approximate" in config.thermo_fluid.name
    # hand conversions from the unit definitions (1 bar = 1e5 Pa, 1 g = 1e-3 kg)
    assert config.effective["custom-fluid"] == {"name": "n-butane", "Tc": 425.1, "pc": 3.796e6, "omega": 0.2,
                                                "M": pytest.approx(0.05812), "Tt": 134.9}
    rebuilt = config_from_tree(config.to_json(), "recorded")
    assert rebuilt.thermo_fluid.critical.p == config.thermo_fluid.critical.p == 3.796e6
    assert rebuilt.thermo_fluid.triple.T == 134.9
    assert float(rebuilt.thermo_fluid.saturation_pressure(300.0)) == float(config.thermo_fluid.saturation_pressure(300.0))
    # a built-in fluid chosen later replaces the custom one
    assert config.for_fluid("CO2").thermo_fluid.name == "carbon dioxide"
    assert "custom-fluid" not in config.for_fluid("CO2").effective


def test_a_custom_fluid_object_goes_in_as_its_table_and_a_conflicting_name_is_refused(tmp_path):
    import thermo

    fluid = thermo.custom_fluid("my gas", 304.13, 7.3773e6, -0.01, 0.04401)  # no triple point: no Tt
    config = load_config(None, fluid=fluid)
    assert config.effective["custom-fluid"] == {"name": "my gas", "Tc": 304.13, "pc": 7.3773e6, "omega": -0.01,
                                                "M": 0.04401}
    assert load_config(None, fallback_fluid=fluid).fluid == "my gas"
    path = tmp_path / "both.toml"
    path.write_text('fluid = "CO2"\n[custom-fluid]\nname = "x"\nTc = 300.0\npc = 5e6\nomega = 0.1\nM = 0.03\n')
    with pytest.raises(UsageError, match="name one fluid"):
        load_config(path)
    path.write_text('[custom-fluid]\nTc = "300 K"\n')
    with pytest.raises(UsageError, match="missing pc, omega, M"):
        load_config(path)
