"""Single-phase properties at (T, p): Fluid.properties on 100 k states against CoolProp's PropsSI
called once per state (the usual way a script asks a reference library), on one core.

    python tests/benchmarks/bench_properties.py [FLUID ...]

Both sides compute density, cp, cv, speed of sound, enthalpy, entropy, alpha_p, kappa_T and Z
for the same random single-phase states (liquid, vapor and supercritical over the equation's
range up to 100 MPa). CoolProp is timed on a 2 k subset and scaled. CPU time of this process,
the least of three runs on each side.
Target: at most 3 us/state for Fluid.properties.
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

STATES = 100_000
REFERENCE_CALLS = 2_000
OUTPUTS = ["D", "Cpmass", "Cvmass", "speed_of_sound", "Hmass", "Smass", "isobaric_expansion_coefficient",
           "isothermal_compressibility", "Z"]


def random_states(f, rng, count):
    T = rng.uniform(f.range.T_min, min(f.range.T_max, 2 * f.critical.T), count)
    p = np.exp(rng.uniform(np.log(f.triple.p), np.log(min(f.range.p_max, 100e6)), count))
    with np.errstate(invalid="ignore"):
        away = ~(np.abs(p / f.saturation_pressure(T) - 1) < 1e-3)  # off the saturation curve
        fluid_phase = ~(T < f.solid.solid_temperature(p))  # not solid
    return T[away & fluid_phase], p[away & fluid_phase]


def cpu_seconds(call, *args, repeats=3):
    """Least CPU time of a few runs (the machine is shared) and the last result."""
    best = float("inf")
    for _ in range(repeats):
        start = time.process_time()
        result = call(*args)
        best = min(best, time.process_time() - start)
    return best, result


def bench(key: str) -> None:
    f = fluid(key)
    T, p = random_states(f, np.random.default_rng(7), STATES)
    f.properties(T[:100], p[:100])  # load data, saturation fit and caches outside the timing
    ours, props = cpu_seconds(f.properties, T, p)
    cas = load_data(key)["cas"]

    def one_state(t, q):
        try:
            return CP.PropsSI(OUTPUTS, "T", t, "P", q, cas)
        except ValueError:  # CoolProp refuses states above its melting line
            return np.full(len(OUTPUTS), np.nan)

    def reference(n):
        return [one_state(t, q) for t, q in zip(T[:n], p[:n])]

    theirs, values = cpu_seconds(reference, REFERENCE_CALLS)
    us_ours = ours / T.size * 1e6
    us_theirs = theirs / REFERENCE_CALLS * 1e6
    worst = np.nanmax(np.abs(props["density"][:REFERENCE_CALLS] / np.array(values)[:, 0] - 1))
    print(f"{key:6s} states {T.size:6d}  Fluid.properties {us_ours:6.2f} us/state   "
          f"CoolProp PropsSI {us_theirs:7.1f} us/state   ratio {us_theirs / us_ours:6.1f}x   "
          f"max density deviation {worst:.1e}   failed {int(np.isnan(props['density']).sum())}")


def main(keys: list[str]) -> None:
    for key in keys or ["CO2", "H2O", "N2", "NH3", "R134a"]:
        bench(key)


if __name__ == "__main__":
    main(sys.argv[1:])
