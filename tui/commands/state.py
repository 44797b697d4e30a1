"""`rigside state`: phase, margins to every boundary and properties at one pressure and temperature.

Values are read and shown in the user's units (the units typed for -p and -t unless
--pressure-unit / --temperature-unit say otherwise); `--json` prints one object in SI.
"""

from __future__ import annotations

import math

import numpy as np

from thermo.units import (
    STANDARD_ATMOSPHERE,
    PressureUnit,
    TemperatureUnit,
    format_number,
    format_pressure,
    format_pressure_difference,
    format_temperature,
    format_temperature_difference,
    parse_atmosphere,
    parse_pressure_difference,
    parse_temperature_difference,
    split_pressure,
    split_temperature,
)
from tui.cli import SAFETY_NOTE
from tui.jsontext import dumps
from tui.commands.fluids import add_fluid_arguments, display_name, range_text, resolve_fluid
from tui.errors import UsageError

#: property name -> (JSON key [SI], label, unit shown, SI value per unit shown, significant digits)
PROPERTIES = {
    "density": ("density_kg_m3", "density", "kg/m³", 1.0, 5),
    "molar_volume": ("molar_volume_m3_mol", "molar volume", "m³/mol", 1.0, 5),
    "Z": ("compressibility_factor", "compressibility factor Z", "", 1.0, 5),
    "alpha_p": ("alpha_p_1_K", "isobaric expansion α_p", "1/K", 1.0, 4),
    "kappa_T": ("kappa_T_1_Pa", "isothermal compressibility κ_T", "1/Pa", 1.0, 4),
    "cp": ("cp_J_kg_K", "isobaric heat capacity cp", "kJ/(kg·K)", 1e3, 5),
    "cv": ("cv_J_kg_K", "isochoric heat capacity cv", "kJ/(kg·K)", 1e3, 5),
    "speed_of_sound": ("speed_of_sound_m_s", "speed of sound", "m/s", 1.0, 5),
    "enthalpy": ("enthalpy_J_kg", "specific enthalpy h", "kJ/kg", 1e3, 5),
    "entropy": ("entropy_J_kg_K", "specific entropy s", "kJ/(kg·K)", 1e3, 5),
}


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser(
        "state",
        help="phase, margins and properties at one pressure and temperature",
        description="Phase of the fluid at the given pressure and temperature, the margins to boiling, "
        "condensing, freezing and the critical point, and its properties.",
        epilog=SAFETY_NOTE,
    )
    add_fluid_arguments(parser)
    parser.add_argument("-p", "--pressure", required=True, metavar="P",
                        help="pressure with unit, gauge or absolute: '58 bar(g)', '5.9 MPa', '850 psig'")
    parser.add_argument("-t", "--temperature", required=True, metavar="T",
                        help="temperature with unit: '19 degC', '292.15 K', '66 degF' (write -t=-40degC for negatives without a space)")
    parser.add_argument("--u-p", default="0 Pa", metavar="DP", help="standard uncertainty of the pressure, e.g. '0.05 bar'")
    parser.add_argument("--u-t", default="0 K", metavar="DT", help="standard uncertainty of the temperature, e.g. '0.1 K'")
    parser.add_argument("--atmosphere", metavar="P", help="local atmosphere for gauge pressures (default 101325 Pa), e.g. '1003 hPa'")
    parser.add_argument("--pressure-unit", metavar="UNIT", help="unit for output pressures (default: the unit of -p), e.g. bar(g), MPa, psia")
    parser.add_argument("--temperature-unit", metavar="UNIT", help="unit for output temperatures (default: the unit of -t), e.g. K, degC")
    parser.add_argument("--json", action="store_true", help="print one JSON object in SI units instead of text")


def run(args) -> int:
    fluid = resolve_fluid(args)
    atmosphere = STANDARD_ATMOSPHERE if args.atmosphere is None else parse_atmosphere(args.atmosphere)
    p_value, p_unit = split_pressure(args.pressure, atmosphere)
    T_value, T_unit = split_temperature(args.temperature)
    u_p, u_T = parse_pressure_difference(args.u_p), parse_temperature_difference(args.u_t)
    if u_p < 0 or u_T < 0:
        raise UsageError("uncertainties --u-p and --u-t must not be negative")
    state = evaluate(fluid, float(p_unit.to_si(p_value)), float(T_unit.to_si(T_value)), u_p, u_T, atmosphere)
    if args.pressure_unit:
        p_unit = PressureUnit.from_text(args.pressure_unit, atmosphere)
    if args.temperature_unit:
        T_unit = TemperatureUnit.from_text(args.temperature_unit)
    if state["phase"] == "out-of-range":
        raise UsageError(f"{fluid.name} at {format_pressure(state['pressure_Pa'], p_unit)} and "
                         f"{format_temperature(state['temperature_K'], T_unit)} is outside the range of its "
                         f"equation of state: {range_text(fluid, p_unit, T_unit)}")
    if args.json:
        print(dumps(state))
    else:
        print("\n".join(describe(fluid, state, p_unit, T_unit)))
    return 0


def evaluate(fluid, pressure_Pa: float, temperature_K: float, u_p: float, u_T: float, atmosphere: float) -> dict:
    """Phase, margins and properties of one state, as a flat mapping in SI (NaN where undefined)."""
    verdict = fluid.classify(temperature_K, pressure_Pa, u_T=u_T, u_p=u_p)
    phase = str(np.ravel(verdict.phase)[0])
    dT_sat, dp_sat, dT_solid, critical = (_scalar(m) for m in (
        verdict.dT_saturation, verdict.dp_saturation, verdict.dT_solid, verdict.critical_distance))
    properties = fluid.properties(temperature_K, pressure_Pa)
    fluid_phase = phase not in ("solid", "out-of-range")
    state = {
        "fluid": fluid.key,
        "fluid_name": fluid.name,
        "phase": phase,
        "pressure_Pa": pressure_Pa,
        "temperature_K": temperature_K,
        "atmosphere_Pa": atmosphere,
        "u_p_Pa": u_p,
        "u_T_K": u_T,
        "dT_saturation_K": dT_sat,
        "dp_saturation_Pa": dp_sat,
        "dT_solid_K": dT_solid,
        "critical_distance": critical,
        "saturation_temperature_K": temperature_K - dT_sat,
        "saturation_pressure_Pa": pressure_Pa - dp_sat,
        "solid_temperature_K": temperature_K - dT_solid,
        **{key: _scalar(properties[name]) if fluid_phase else math.nan for name, (key, *_) in PROPERTIES.items()},
        "approximate": bool(np.ravel(verdict.approximate)[0]),
        "extrapolated": bool(np.ravel(verdict.extrapolated)[0]),
    }
    state["notes"] = notes(fluid, state)
    return state


def notes(fluid, state: dict) -> list[str]:
    """What the reader must know about the values: approximations and extrapolations."""
    found = []
    if fluid.approximate:
        found.append(f"approximate: a custom fluid, estimated from its critical point and acentric factor ({fluid.source})")
    if not math.isnan(state["density_kg_m3"]) and math.isnan(state["cp_J_kg_K"]):
        found.append("no caloric properties (cp, cv, speed of sound, h, s): they need an ideal-gas heat capacity")
    elif state["approximate"]:
        curve = "melting" if state["pressure_Pa"] >= fluid.triple.p else "sublimation"
        found.append(f"approximate margin to solid: no published {curve} equation for {fluid.name}; "
                     "a fallback curve stands in (see `rigside fluids`)")
    if state["extrapolated"]:
        found.append("extrapolated: outside the stated range of the equation of state "
                     "(vapor below the triple-point temperature)")
    if state["phase"] == "solid":
        found.append("no properties: the equation of state describes the fluid phases, not the solid")
    return found


def describe(fluid, state: dict, p_unit: PressureUnit, T_unit: TemperatureUnit) -> list[str]:
    """The state as lines of text in the user's units."""
    T, p = state["temperature_K"], state["pressure_Pa"]
    pressure = format_pressure(p, p_unit)
    if p_unit.is_gauge:
        absolute = PressureUnit(p_unit.symbol, p_unit.factor)
        pressure += f" = {format_pressure(p, absolute)} (atmosphere {format_pressure(state['atmosphere_Pa'], absolute, 6)})"
    lines = [f"{display_name(fluid)}: {state['phase']}",
             f"  at {pressure} and {format_temperature(T, T_unit)}"]
    if state["u_p_Pa"] or state["u_T_K"]:
        lines.append(f"  standard uncertainty ±{format_pressure_difference(state['u_p_Pa'], p_unit)}, "
                     f"±{format_temperature_difference(state['u_T_K'], T_unit)} (boundaries within 2 u count as reached)")
    lines.append("margins")
    lines += [f"  {label:<24}{value:<14}{remark}" for label, value, remark in _margins(fluid, state, p_unit, T_unit)]
    if not math.isnan(state["density_kg_m3"]):
        lines.append("properties")
        for key, label, unit, per_unit, digits in PROPERTIES.values():
            lines.append(f"  {label:<32}{format_number(state[key] / per_unit, digits)} {unit}".rstrip())
    if state["notes"]:
        lines.append("notes")
        lines += [f"  {note}" for note in state["notes"]]
    return lines


def _margins(fluid, state: dict, p_unit: PressureUnit, T_unit: TemperatureUnit) -> list[tuple[str, str, str]]:
    """(label, value, remark) of each margin, worded as on the bench."""
    dT_sat, dp_sat, dT_solid = state["dT_saturation_K"], state["dp_saturation_Pa"], state["dT_solid_K"]
    rows = []
    T, p = state["temperature_K"], state["pressure_Pa"]
    if math.isnan(dT_sat):
        why = "above the critical pressure" if p > fluid.critical.p else "below the triple-point pressure"
        rows.append(("saturation temperature", "n/a", f"no boiling point at this pressure: {why}"))
    else:
        rows.append(("subcooling" if dT_sat < 0 else "superheat",
                     format_temperature_difference(abs(dT_sat), T_unit),
                     f"{'boils' if dT_sat < 0 else 'condenses'} at "
                     f"{format_temperature(state['saturation_temperature_K'], T_unit)} at this pressure"))
    if math.isnan(dp_sat):
        why = "above the critical temperature" if T > fluid.critical.T else "below the triple-point temperature"
        rows.append(("vapor pressure", "n/a", f"no vapor pressure at this temperature: {why}"))
    else:
        rows.append((f"{'above' if dp_sat > 0 else 'below'} vapor pressure",
                     format_pressure_difference(abs(dp_sat), p_unit),
                     f"vapor pressure {format_pressure(state['saturation_pressure_Pa'], p_unit)} at this temperature"))
    if math.isnan(dT_solid):
        rows.append(("margin to solid", "n/a", "no solid boundary known at this pressure"))
    else:
        rows.append(("above solid" if dT_solid > 0 else "below solid line",
                     format_temperature_difference(abs(dT_solid), T_unit),
                     f"solid forms at {format_temperature(state['solid_temperature_K'], T_unit)} at this pressure"))
    rows.append(("critical distance", format_number(state["critical_distance"], 3),
                 f"reduced; 0 at the critical point ({format_temperature(fluid.critical.T, T_unit)}, "
                 f"{format_pressure(fluid.critical.p, p_unit)})"))
    return rows


def _scalar(value) -> float:
    return float(np.ravel(value)[0])
