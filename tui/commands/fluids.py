"""`rigside fluids`: the built-in fluids with their constants, range and sources; and how every
command picks its fluid (a built-in name, a `--custom` specification or a `--fluid-file`).

A custom fluid is given by its critical point, acentric factor and molar mass, each with a unit:

    --custom "Tc=425.1 K, pc=37.96 bar, omega=0.2, M=58.12 g/mol"      (optional: Tt=134.9 K, name=butane)

or the same keys in a TOML file (`--fluid-file butane.toml`):

    name = "n-butane"
    Tc = "425.1 K"
    pc = "37.96 bar"
    omega = 0.2
    M = "58.12 g/mol"
    Tt = "134.9 K"        # optional triple-point temperature

Such a fluid is evaluated with a cubic equation of state and is labelled approximate.
"""

from __future__ import annotations

import argparse
import tomllib

import thermo
from thermo.units import (
    PressureUnit,
    TemperatureUnit,
    format_number,
    format_pressure,
    format_temperature,
    parse_molar_mass,
    parse_temperature,
    split_pressure,
)
from tui.cli import SAFETY_NOTE
from tui.errors import UsageError
from tui.jsontext import dumps

#: custom-fluid keys (lower case) -> parameter of thermo.custom_fluid
_CUSTOM_KEYS = {
    "name": "name",
    "tc": "Tc",
    "pc": "pc",
    "omega": "acentric_factor",
    "acentric_factor": "acentric_factor",
    "m": "molar_mass",
    "molar_mass": "molar_mass",
    "tt": "triple_T",
    "triple_t": "triple_T",
}
_CUSTOM_HELP = "give Tc, pc, omega and M with units, e.g. \"Tc=425.1 K, pc=37.96 bar, omega=0.2, M=58.12 g/mol\""


KELVIN = TemperatureUnit.from_text("K")
MEGAPASCAL = PressureUnit.from_text("MPa")


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser(
        "fluids",
        help="list the built-in fluids with their constants, range and sources",
        description="The built-in fluids: molar mass, critical and triple points, the range of each "
        "equation of state, and the source of its equation of state, melting and sublimation curves.",
        epilog=SAFETY_NOTE,
    )
    parser.add_argument("--json", action="store_true", help="one JSON object per fluid and line, in SI units")


def run(args) -> int:
    for fluid in map(thermo.fluid, thermo.fluids()):
        if args.json:
            print(dumps(fluid_record(fluid)))
        else:
            print("\n".join(describe_fluid(fluid)), end="\n\n")
    return 0


def fluid_record(fluid) -> dict:
    """Constants, range and sources of a fluid, in SI with unit-suffixed keys."""
    return {
        "key": fluid.key,
        "name": fluid.name,
        "aliases": list(fluid.aliases),
        "molar_mass_kg_mol": fluid.molar_mass,
        "critical_temperature_K": fluid.critical.T,
        "critical_pressure_Pa": fluid.critical.p,
        "critical_density_kg_m3": fluid.critical.rho,
        "triple_temperature_K": fluid.triple.T,
        "triple_pressure_Pa": fluid.triple.p,
        "range_T_min_K": fluid.range.T_min,
        "range_T_max_K": fluid.range.T_max,
        "range_p_max_Pa": fluid.range.p_max,
        "equation_of_state_source": fluid.source,
        "melting_published": fluid.solid.melting.published,
        "melting_source": fluid.solid.melting.source,
        "sublimation_published": fluid.solid.sublimation.published,
        "sublimation_source": fluid.solid.sublimation.source,
    }


def describe_fluid(fluid) -> list[str]:
    """A fluid's constants and sources as lines of text (K and MPa)."""
    aliases = ", ".join(a for a in fluid.aliases if a.lower() not in (fluid.key.lower(), fluid.name.lower()))
    lines = [
        f"{fluid.key}  {fluid.name}" + (f"  (also: {aliases})" if aliases else ""),
        f"  M {format_number(fluid.molar_mass * 1e3, 6)} g/mol"
        f"   Tc {format_temperature(fluid.critical.T, KELVIN, 3)}   pc {format_pressure(fluid.critical.p, MEGAPASCAL)}"
        f"   ρc {format_number(fluid.critical.rho, 5)} kg/m³",
        f"  Tt {format_temperature(fluid.triple.T, KELVIN, 3)}   pt {format_pressure(fluid.triple.p, MEGAPASCAL)}",
        f"  range: {range_text(fluid, MEGAPASCAL, KELVIN)}",
        f"  equation of state: {fluid.source}",
    ]
    for curve in (fluid.solid.melting, fluid.solid.sublimation):
        lines.append(f"  {curve.kind} ({'published' if curve.published else 'fallback, approximate'}): {curve.source}")
    return lines


def display_name(fluid) -> str:
    """'carbon dioxide (CO2)'; a name that already holds the key stays as it is."""
    return fluid.name if fluid.key.lower() in fluid.name.lower() else f"{fluid.name} ({fluid.key})"


def range_text(fluid, p_unit: PressureUnit, T_unit: TemperatureUnit) -> str:
    """The equation of state's stated range, e.g. 'T from 216.59 K to 1100.00 K, p up to 800.00 MPa(a)'."""
    limits = fluid.range
    return (f"T from {format_temperature(limits.T_min, T_unit)} to {format_temperature(limits.T_max, T_unit)}, "
            f"p up to {format_pressure(limits.p_max, p_unit)}")


def add_fluid_arguments(parser: argparse.ArgumentParser) -> None:
    """The FLUID argument and its two custom alternatives, shared by every command that needs a fluid."""
    parser.add_argument("fluid", nargs="?", metavar="FLUID", help="built-in fluid name or alias (see `rigside fluids`)")
    add_custom_fluid_arguments(parser)


def add_custom_fluid_arguments(parser: argparse.ArgumentParser) -> None:
    """--custom and --fluid-file (for commands whose built-in fluid is an option, not FLUID)."""
    parser.add_argument("--custom", metavar="SPEC", help=f"a fluid not built in: {_CUSTOM_HELP} (approximate)")
    parser.add_argument("--fluid-file", metavar="FILE.toml", help="a custom fluid's constants in a TOML file (approximate)")


def resolve_fluid(args: argparse.Namespace, *, name_option: str = "FLUID", required: bool = True):
    """The fluid chosen on the command line: exactly one of FLUID (or `name_option`), --custom
    and --fluid-file; None when none is given and none is `required`."""
    given = [option for option, value in
             ((name_option, args.fluid), ("--custom", args.custom), ("--fluid-file", args.fluid_file)) if value]
    if not given and not required:
        return None
    if len(given) != 1:
        raise UsageError(f"give exactly one of {name_option}, --custom or --fluid-file (got {', '.join(given) or 'none'})")
    if args.custom:
        return custom_fluid(_parse_custom_spec(args.custom), "--custom")
    if args.fluid_file:
        return custom_fluid(_read_fluid_file(args.fluid_file), args.fluid_file)
    return thermo.fluid(args.fluid)


def _parse_custom_spec(spec: str) -> dict[str, str]:
    entries = {}
    for item in filter(None, (part.strip() for part in spec.split(","))):
        key, sep, value = item.partition("=")
        if not sep:
            raise UsageError(f"--custom entry {item!r} is not KEY=VALUE; {_CUSTOM_HELP}")
        entries[key.strip()] = value.strip()
    return entries


def _read_fluid_file(path: str) -> dict:
    """The TOML table of --fluid-file (argparse also takes `--fluid NAME` for it: the hint says so)."""
    try:
        with open(path, "rb") as handle:
            return tomllib.load(handle)
    except OSError as exc:
        raise UsageError(f"cannot read --fluid-file {path!r}: {exc.strerror or exc} "
                         "(a built-in fluid is given as FLUID, without an option)") from None
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as exc:
        raise UsageError(f"fluid file {path}: not valid TOML ({exc})") from None


def custom_fluid(entries: dict, origin: str):
    """Build an approximate fluid from KEY -> value-with-unit entries (from --custom or a TOML file)."""
    unknown = [key for key in entries if key.lower() not in _CUSTOM_KEYS]
    if unknown:
        raise UsageError(f"{origin}: unknown key {unknown[0]!r}; keys are Tc, pc, omega, M, and optionally Tt and name")
    values = {_CUSTOM_KEYS[key.lower()]: value for key, value in entries.items()}
    missing = [key for key, parameter in (("Tc", "Tc"), ("pc", "pc"), ("omega", "acentric_factor"), ("M", "molar_mass"))
               if parameter not in values]
    if missing:
        raise UsageError(f"{origin}: missing {', '.join(missing)}; {_CUSTOM_HELP}")
    pc_value, pc_unit = split_pressure(str(values["pc"]))
    if pc_unit.is_gauge:
        raise UsageError(f"{origin}: the critical pressure must be absolute, not {values['pc']!r}")
    try:
        omega = float(values["acentric_factor"])
    except ValueError:
        raise UsageError(f"{origin}: omega must be a plain number (the acentric factor), not {values['acentric_factor']!r}") from None
    triple = values.get("triple_T")
    return thermo.custom_fluid(
        str(values.get("name", "custom fluid")),
        Tc=parse_temperature(str(values["Tc"])),
        pc=float(pc_unit.to_si(pc_value)),
        acentric_factor=omega,
        molar_mass=parse_molar_mass(str(values["molar_mass"])),
        triple_T=None if triple is None else parse_temperature(str(triple)),
    )
