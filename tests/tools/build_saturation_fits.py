"""Write thermo/data/saturation/<key>.json: the fast saturation curve of every fluid.

Each file holds the piecewise Chebyshev series that `thermo.saturation.fit_curve` fits to the
precise solver `thermo.saturation.solve`, with a header naming the solver, the equation's
source, the fingerprint of the coefficients it was fitted to, and the largest error of the
shipped series against the solver, measured at random temperatures (seeded) away from and
next to the critical point.

    python tests/tools/build_saturation_fits.py [KEY ...]
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

import numpy as np

from thermo.eos import HelmholtzEOS
from thermo.fluid import fluids, load_data
from thermo.saturation import SaturationCurve, fit_curve, solve

OUT = Path(__file__).resolve().parents[2] / "thermo" / "data" / "saturation"
#: random temperatures per range of the measurement
SAMPLES = 20000
#: width of the near-critical range measured on its own [K]
NEAR_CRITICAL_K = 1e-3


def _relative(a: np.ndarray, b: np.ndarray) -> float:
    return float(np.max(np.abs(a / b - 1)))


def measure(curve: SaturationCurve, eos: HelmholtzEOS, T: np.ndarray) -> dict:
    """Largest relative deviations of the series from the solver at temperatures T [K]."""
    p, rho_liquid, rho_vapor = solve(eos, T)
    liquid, vapor = curve.densities(T)
    return {"T_K": [float(T.min()), float(T.max())], "pressure": _relative(curve.pressure(T), p),
            "temperature_round_trip": _relative(curve.temperature(curve.pressure(T)), T),
            "liquid_density": _relative(liquid, rho_liquid), "vapor_density": _relative(vapor, rho_vapor)}


def build(key: str) -> dict:
    eos = HelmholtzEOS(load_data(key))
    fit = fit_curve(eos)
    curve = SaturationCurve(fit)
    rng = np.random.default_rng(20261201)
    far = rng.uniform(curve.T_min, curve.T_max - NEAR_CRITICAL_K, SAMPLES)
    near = curve.T_max - rng.uniform(0.0, NEAR_CRITICAL_K, SAMPLES // 10)
    fit["header"]["measured_error"] = {"away_from_Tc": measure(curve, eos, far),
                                       "last_mK_below_Tc": measure(curve, eos, near)}
    return fit


def main(keys: list[str]) -> None:
    OUT.mkdir(parents=True, exist_ok=True)
    for key in keys or fluids():
        fit = build(key)
        path = OUT / f"{key}.json"
        path.write_text(json.dumps(fit, separators=(",", ":")) + "\n", encoding="utf-8")
        errors = fit["header"]["measured_error"]
        print(f"{key:6s} {path.stat().st_size / 1e3:5.0f} kB  " + "  ".join(
            f"{where}: " + " ".join(f"{k}={v:.1e}" for k, v in e.items() if k != "T_K")
            for where, e in errors.items()))


if __name__ == "__main__":
    main(sys.argv[1:])
