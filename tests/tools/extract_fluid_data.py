"""Write thermo/data/<key>.json from the fluid data that CoolProp (a general reference library
from the package registry) exposes, renaming its blocks into rigside's own format.

The coefficients are the published figures of each fluid's reference equation; every file
cites the original paper. Blocks that CoolProp does not carry (sublimation curves, for
instance) are kept from the existing file: re-running this script never drops them.

    python tests/tools/extract_fluid_data.py
"""

from __future__ import annotations

import json
from pathlib import Path

import CoolProp.CoolProp as CP

DATA = Path(__file__).resolve().parents[2] / "thermo" / "data"

#: our key -> (CoolProp name, display name, extra aliases, citation of the equation of state)
FLUIDS = {
    "CO2": ("CarbonDioxide", "carbon dioxide", ["carbon dioxide", "carbon-dioxide", "R744", "R-744"],
            "Span, R.; Wagner, W. A New Equation of State for Carbon Dioxide Covering the Fluid Region "
            "from the Triple-Point Temperature to 1100 K at Pressures up to 800 MPa. "
            "J. Phys. Chem. Ref. Data 25 (1996) 1509-1596. doi:10.1063/1.555991"),
    "H2O": ("Water", "water", ["water", "steam", "R718", "R-718"],
            "Wagner, W.; Pruss, A. The IAPWS Formulation 1995 for the Thermodynamic Properties of Ordinary "
            "Water Substance for General and Scientific Use (IAPWS-95). "
            "J. Phys. Chem. Ref. Data 31 (2002) 387-535. doi:10.1063/1.1461829"),
    "N2": ("Nitrogen", "nitrogen", ["nitrogen", "R728", "R-728"],
           "Span, R.; Lemmon, E. W.; Jacobsen, R. T; Wagner, W.; Yokozeki, A. A Reference Equation of State "
           "for the Thermodynamic Properties of Nitrogen for Temperatures from 63.151 to 1000 K and Pressures "
           "to 2200 MPa. J. Phys. Chem. Ref. Data 29 (2000) 1361-1433. doi:10.1063/1.1349047"),
    "Ar": ("Argon", "argon", ["argon", "R740", "R-740"],
           "Tegeler, Ch.; Span, R.; Wagner, W. A New Equation of State for Argon Covering the Fluid Region "
           "for Temperatures from the Melting Line to 700 K at Pressures up to 1000 MPa. "
           "J. Phys. Chem. Ref. Data 28 (1999) 779-850. doi:10.1063/1.556037"),
    "O2": ("Oxygen", "oxygen", ["oxygen", "R732", "R-732"],
           "Schmidt, R.; Wagner, W. A New Form of the Equation of State for Pure Substances and its "
           "Application to Oxygen. Fluid Phase Equilib. 19 (1985) 175-200. doi:10.1016/0378-3812(85)87016-3"),
    "CH4": ("Methane", "methane", ["methane", "R50", "R-50"],
            "Setzmann, U.; Wagner, W. A New Equation of State and Tables of Thermodynamic Properties for "
            "Methane Covering the Range from the Melting Line to 625 K at Pressures up to 1000 MPa. "
            "J. Phys. Chem. Ref. Data 20 (1991) 1061-1155. doi:10.1063/1.555898"),
    "C2H6": ("Ethane", "ethane", ["ethane", "R170", "R-170"],
             "Buecker, D.; Wagner, W. A Reference Equation of State for the Thermodynamic Properties of "
             "Ethane for Temperatures from the Melting Line to 675 K and Pressures up to 900 MPa. "
             "J. Phys. Chem. Ref. Data 35 (2006) 205-266. doi:10.1063/1.1859286"),
    "C3H8": ("n-Propane", "propane", ["propane", "n-propane", "R290", "R-290"],
             "Lemmon, E. W.; McLinden, M. O.; Wagner, W. Thermodynamic Properties of Propane. III. A Reference "
             "Equation of State for Temperatures from the Melting Line to 650 K and Pressures up to 1000 MPa. "
             "J. Chem. Eng. Data 54 (2009) 3141-3180. doi:10.1021/je900217v"),
    "NH3": ("Ammonia", "ammonia", ["ammonia", "R717", "R-717"],
            "Gao, K.; Wu, J.; Bell, I. H.; Harvey, A. H.; Lemmon, E. W. A Reference Equation of State with an "
            "Associating Term for the Thermodynamic Properties of Ammonia. "
            "J. Phys. Chem. Ref. Data 52 (2023) 013102. doi:10.1063/5.0128269"),
    "R134a": ("R134a", "R-134a", ["R134a", "R-134a", "HFC-134a", "1,1,1,2-tetrafluoroethane"],
              "Tillner-Roth, R.; Baehr, H. D. An International Standard Formulation for the Thermodynamic "
              "Properties of 1,1,1,2-Tetrafluoroethane (HFC-134a) for Temperatures from 170 K to 455 K and "
              "Pressures up to 70 MPa. J. Phys. Chem. Ref. Data 23 (1994) 657-729. doi:10.1063/1.555958"),
}

MELTING_SOURCES = {
    "Span-JPCRD-1996": FLUIDS["CO2"][3],
    "IAPWS-Melting-2011": "Wagner, W.; Riethmann, T.; Feistel, R.; Harvey, A. H. New Equations for the Sublimation "
    "Pressure and Melting Pressure of H2O Ice Ih. J. Phys. Chem. Ref. Data 40 (2011) 043103. "
    "doi:10.1063/1.3657937; IAPWS R14-08(2011)",
    "Span-JPCRD-2000": FLUIDS["N2"][3],
    "Tegeler-JPCRD-1999": FLUIDS["Ar"][3],
    "Younglove-NIST-1982": "Younglove, B. A. Thermophysical Properties of Fluids. I. Argon, Ethylene, Parahydrogen, "
    "Nitrogen, Nitrogen Trifluoride, and Oxygen. J. Phys. Chem. Ref. Data 11, Suppl. 1 (1982)",
    "Abramson-HPR-2011": "Abramson, E. H. Melting curves of argon and methane. High Pressure Res. 31 (2011) "
    "549-554. doi:10.1080/08957959.2011.618127",
    "Buecker-JPCRD-2006": FLUIDS["C2H6"][3],
    "Reeves-JCP-1964": "Reeves, L. E.; Scott, G. J.; Babb, S. E. Melting Curves of Pressure-Transmitting Fluids. "
    "J. Chem. Phys. 40 (1964) 3662-3666. doi:10.1063/1.1725068",
}

#: validity stated in each reference paper (T_max [K], p_max [Pa]); CoolProp extends some of them
PUBLISHED_RANGE = {
    "CO2": (1100.0, 800e6), "H2O": (1273.0, 1000e6), "N2": (1000.0, 2200e6), "Ar": (700.0, 1000e6),
    "O2": (300.0, 82e6), "CH4": (625.0, 1000e6), "C2H6": (675.0, 900e6), "C3H8": (650.0, 1000e6),
    "NH3": (725.0, 1000e6), "R134a": (455.0, 70e6),
}

RESIDUAL = {  # CoolProp block type -> (our type, fields)
    "ResidualHelmholtzPower": ("power", ["n", "d", "t", "l"]),
    "ResidualHelmholtzGaussian": ("gaussian", ["n", "d", "t", "eta", "epsilon", "beta", "gamma"]),
    "ResidualHelmholtzNonAnalytic": ("nonanalytic", ["n", "a", "b", "beta", "A", "B", "C", "D"]),
    "ResidualHelmholtzGaoB": ("gao_b", ["n", "d", "t", "eta", "epsilon", "beta", "gamma", "b"]),
}


def ideal_block(block: dict, Tc: float) -> dict:
    kind = block["type"]
    if kind == "IdealGasHelmholtzLead":
        return {"type": "lead", "a1": block["a1"], "a2": block["a2"]}
    if kind == "IdealGasHelmholtzEnthalpyEntropyOffset":
        return {"type": "offset", "a1": block["a1"], "a2": block["a2"], "reference": block["reference"]}
    if kind == "IdealGasHelmholtzLogTau":
        return {"type": "log_tau", "a": block["a"]}
    if kind == "IdealGasHelmholtzPower":
        return {"type": "power", "n": block["n"], "t": block["t"]}
    if kind == "IdealGasHelmholtzPlanckEinstein":
        return {"type": "planck_einstein", "n": block["n"], "t": block["t"]}
    if kind == "IdealGasHelmholtzPlanckEinsteinFunctionT":
        return {"type": "planck_einstein", "n": block["n"], "t": [v / Tc for v in block["v"]]}
    raise ValueError(f"unhandled ideal-gas block {kind}")


#: (fluid, part index) -> fields that differ from the original publication in CoolProp's data
MELTING_CORRECTIONS = {
    # IAPWS R14-08(2011) eq. (4): ice VI melts from p* = 632.4 MPa at T* = 273.31 K, where ice V
    # ends (CoolProp 8 carries 623.4 MPa, which leaves a 9 MPa step between the two ices)
    ("H2O", 3): {"p_0": 632.4e6},
}


def melting_block(key: str, line: dict | None) -> dict:
    if line is None:
        return {"published": False, "type": "triple_temperature",
                "note": "no melting equation in the reference paper; the melting temperature is taken as the "
                        "triple-point temperature at every pressure (approximate: real melting curves rise "
                        "with pressure, so solid may form above the triple-point temperature at high pressure)"}
    kinds = {"polynomial_in_Tr": "reduced_power_sum", "polynomial_in_Theta": "theta_power_sum",
             "Simon": "simon_glatzel"}
    parts = []
    for index, part in enumerate(line["parts"]):
        out = {"T_min": min(part["T_min"], part["T_max"]), "T_max": max(part["T_min"], part["T_max"]),
               "T_0": part["T_0"], "p_0": part["p_0"]}
        if line["type"] == "Simon":
            out.update(a=part["a"], c=part["c"])
        else:
            out.update(a=part["a"], t=part["t"])
        out.update(MELTING_CORRECTIONS.get((key, index), {}))
        parts.append(out)
    return {"published": True, "type": kinds[line["type"]], "source": MELTING_SOURCES[line["BibTeX"]],
            "units": {"T": "K", "p": "Pa"}, "parts": parts}


def ancillary(block: dict) -> dict:
    return {"form": block["description"], "type": block["type"], "n": block["n"], "t": block["t"],
            "T_r": block["T_r"], "reducing_value": block["reducing_value"], "using_tau_r": block["using_tau_r"],
            "T_min": block["Tmin"], "T_max": block["Tmax"],
            "max_error_percent": block["max_abserror_percentage"]}


def extract(key: str) -> dict:
    cp_name, name, aliases, source = FLUIDS[key]
    raw = json.loads(CP.get_fluid_param_string(cp_name, "JSON"))
    raw = raw[0] if isinstance(raw, list) else raw
    eos = raw["EOS"][0]
    M = eos["molar_mass"]
    crit, trip_l, trip_v = (raw["STATES"][k] for k in ("critical", "triple_liquid", "triple_vapor"))
    reducing = eos["STATES"]["reducing"]
    residual = []
    for block in eos["alphar"]:
        kind, fields = RESIDUAL[block["type"]]
        residual.append({"type": kind, **{f: block[f] for f in fields}})
    anc = raw["ANCILLARIES"]
    return {
        "key": key,
        "name": name,
        "aliases": sorted({key, *aliases, *raw["INFO"]["ALIASES"]}, key=lambda s: (s.lower(), s)),
        "cas": raw["INFO"]["CAS"],
        "molar_mass": M, "molar_mass_unit": "kg/mol",
        "acentric_factor": eos["acentric"],
        "critical": {"T": crit["T"], "p": crit["p"], "rho": crit["rhomolar"] * M, "units": {"T": "K", "p": "Pa", "rho": "kg/m3"}},
        "triple": {"T": eos["Ttriple"], "p": trip_v["p"], "rho_liquid": trip_l["rhomolar"] * M,
                   "rho_vapor": trip_v["rhomolar"] * M, "units": {"T": "K", "p": "Pa", "rho": "kg/m3"}},
        "range": {"T_min": eos["Ttriple"], "T_max": PUBLISHED_RANGE[key][0], "p_max": PUBLISHED_RANGE[key][1],
                  "units": {"T": "K", "p": "Pa"}, "note": "fluid region stated in the equation's source"},
        "eos": {
            "source": source,
            "form": "a/(RT) = alpha0(delta, tau) + alphar(delta, tau), delta = rho/rho_r, tau = T_r/T",
            "gas_constant": eos["gas_constant"], "gas_constant_unit": "J/(mol K)",
            "reducing": {"T": reducing["T"], "rho_molar": reducing["rhomolar"], "units": {"T": "K", "rho_molar": "mol/m3"}},
            "ideal": [ideal_block(b, reducing["T"]) for b in eos["alpha0"]],
            "residual": residual,
        },
        "ancillaries": {
            "source": "fitted to the equation of state (CoolProp ancillaries); used only as starting values",
            "vapor_pressure": ancillary(anc["pS"]),
            "liquid_density": ancillary(anc["rhoL"]),
            "vapor_density": ancillary(anc["rhoV"]),
        },
        "melting": melting_block(key, anc.get("melting_line")),
    }


def main() -> None:
    DATA.mkdir(parents=True, exist_ok=True)
    for key in FLUIDS:
        path = DATA / f"{key}.json"
        data = extract(key)
        if path.exists():  # keep blocks this script does not produce
            old = json.loads(path.read_text())
            for block, value in old.items():
                data.setdefault(block, value)
        path.write_text(json.dumps(data, indent=1) + "\n")
        print(f"wrote {path.relative_to(DATA.parents[1])}")


if __name__ == "__main__":
    main()
