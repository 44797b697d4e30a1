"""Benchmark of classify: phase labels and all four margins on 1 M states against CoolProp per call.

    python tests/benchmarks/bench_classify.py [KEY ...]

Both sides get the same random states, spread over the whole phase diagram of each fluid
(solid, liquid, vapor below and above the triple point, gas, supercritical: T from 0.6 T_t to
1.5 T_c, p log-uniform from 1 % of p_t to 100 MPa) with gauge uncertainties u_T = 0.1 K and
u_p = 0.25 % of p. Ours: Fluid.classify on all 1 M states at once. Reference: CoolProp (from the
registry) PhaseSI called once per state, as a script would, on 2 000 of them and scaled; it
gives the phase only, no margins, and refuses states off its range. CPU time of this process,
best of 3, on one core. Target: at most 0.3 us/state.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):  # one core, before numpy loads
    os.environ[_var] = "1"

import sys  # noqa: E402
import time  # noqa: E402

import CoolProp.CoolProp as CP  # noqa: E402
import numpy as np  # noqa: E402

from thermo import fluid  # noqa: E402
from thermo.fluid import load_data  # noqa: E402

STATES = 1_000_000
REFERENCE_STATES = 2_000
TARGET_US = 0.3
DEFAULT_KEYS = ("CO2", "H2O", "NH3", "N2", "C3H8")


def random_states(f, rng, count):
    T = rng.uniform(0.6 * f.triple.T, 1.5 * f.critical.T, count)
    p = np.exp(rng.uniform(np.log(0.01 * f.triple.p), np.log(min(100e6, f.range.p_max)), count))
    return T, p


def cpu_per_state(call, count: int, repeat: int) -> float:
    """Best CPU time of call() over `repeat` runs [us per state]."""
    best = np.inf
    for _ in range(repeat):
        start = time.process_time()
        call()
        best = min(best, time.process_time() - start)
    return best / count * 1e6


def coolprop_phases(cas: str, T: np.ndarray, p: np.ndarray) -> list[str]:
    phases = []
    for t, q in zip(T, p):
        try:
            phases.append(CP.PhaseSI("T", t, "P", q, cas))
        except ValueError:  # off CoolProp's range (below its T_min, above its melting line)
            phases.append("refused")
    return phases


def main(keys: list[str]) -> None:
    rng = np.random.default_rng(11)
    print(f"classify + margins on {STATES:,} states, u_T = 0.1 K, u_p = 0.25 % of p; "
          f"CoolProp PhaseSI per call on {REFERENCE_STATES:,}, scaled")
    print(f"{'fluid':6s} {'ours':>9s} {'CoolProp':>10s} {'ratio':>8s}   [us/state, CPU]   target {TARGET_US} us/state")
    for key in keys or DEFAULT_KEYS:
        f = fluid(key)
        T, p = random_states(f, rng, STATES)
        u_p = 0.0025 * p
        f.classify(T[:1000], p[:1000], 0.1, u_p[:1000])  # load the data and fit the inverses outside the timing
        ours = cpu_per_state(lambda: f.classify(T, p, 0.1, u_p), STATES, repeat=3)
        cas = load_data(key)["cas"]
        theirs = cpu_per_state(lambda: coolprop_phases(cas, T[:REFERENCE_STATES], p[:REFERENCE_STATES]),
                               REFERENCE_STATES, repeat=1)
        verdict = "ok" if ours <= TARGET_US else "OVER TARGET"
        print(f"{key:6s} {ours:9.3f} {theirs:10.2f} {theirs / ours:7.0f}x   {verdict}")


if __name__ == "__main__":
    main(sys.argv[1:])
