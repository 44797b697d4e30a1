"""Benchmark of the saturation curve: the fast path on 1 M states against CoolProp per call.

p_sat(T), T_sat(p) and the slope dp_sat/dT from thermo.saturation.SaturationCurve on 1 M random
states, the precise solver on 10 k, and CoolProp (reference library from the registry)
PropsSI('P', 'T', T, 'Q', 0, fluid) called once per state on 2 000 states and scaled. Budget of
the classifier: 0.3 us/state for everything, so each curve must stay well under 0.05 us/state.

    python tests/benchmarks/bench_saturation.py [KEY ...]
"""

from __future__ import annotations

import sys
import time

import CoolProp.CoolProp as CP
import numpy as np

from thermo import fluid
from thermo.saturation import solve

STATES = 1_000_000
SOLVER_STATES = 10_000
COOLPROP_STATES = 2_000
COOLPROP_NAMES = {"CO2": "CarbonDioxide", "H2O": "Water", "NH3": "Ammonia", "R134a": "R134a", "C3H8": "n-Propane"}


def per_state(call, values, repeat: int = 5) -> float:
    """Best wall time of call(values) over `repeat` runs [us per state]."""
    best = np.inf
    for _ in range(repeat):
        start = time.perf_counter()
        call(values)
        best = min(best, time.perf_counter() - start)
    return best / len(values) * 1e6


def main(keys: list[str]) -> None:
    rng = np.random.default_rng(1)
    print(f"{'fluid':6s} {'p_sat(T)':>9s} {'T_sat(p)':>9s} {'dp/dT':>9s} {'rho(T)':>9s} {'solver':>9s} "
          f"{'CoolProp':>9s} {'ratio':>7s}   [us/state]")
    for key in keys or list(COOLPROP_NAMES):
        f = fluid(key)
        curve = f.saturation
        T = rng.uniform(curve.T_min, curve.T_max, STATES)
        p = np.exp(rng.uniform(np.log(curve.p_min), np.log(curve.p_max), STATES))
        fast_p = per_state(curve.pressure, T)
        fast_T = per_state(curve.temperature, p)
        fast_slope = per_state(curve.dpdT, T)
        fast_rho = per_state(curve.densities, T, repeat=3)
        precise = per_state(lambda x: solve(f.eos, x), T[:SOLVER_STATES], repeat=1)
        name = COOLPROP_NAMES[key]
        reference = per_state(lambda x: [CP.PropsSI("P", "T", t, "Q", 0, name) for t in x], T[:COOLPROP_STATES],
                              repeat=1)
        print(f"{key:6s} {fast_p:9.4f} {fast_T:9.4f} {fast_slope:9.4f} {fast_rho:9.4f} {precise:9.2f} "
              f"{reference:9.2f} {reference / fast_p:7.0f}x")


if __name__ == "__main__":
    main(sys.argv[1:])
