"""Phase of a pure fluid at (T, p), with the margins to its boundaries, given the gauges' uncertainty.

Labels (DESIGN.md, section 3): ``solid``, ``liquid``, ``vapor`` (below T_c), ``gas`` (T >= T_c,
p < p_c), ``supercritical`` (T >= T_c, p >= p_c); a liquid below T_c at p > p_c is ``liquid``.
A state within k u of a boundary is on it: ``liquid+vapor``, ``solid+vapor``, ``solid+liquid``,
``triple`` (close to the triple point, or to two curves at once) or ``critical``, where
u = sqrt(u_p^2 + (u_T dp/dT)^2) combines the gauges' standard uncertainties through the curve's
slope (k = 2, about 95 %). ``out-of-range`` marks states the equations do not cover: above
T_max or p_max, p <= 0, NaN input, above the top of the melting curve, and below the lowest
temperature of the solid curves unless the curves show the state is solid there.

Vapor below the triple-point temperature, under the sublimation curve, is ``vapor`` (a CO2 vent
passes through such states) with ``extrapolated`` set: the equation of state's stated range
starts at T_t. ``extrapolated`` follows each equation's stated range (``thermo.fluid.Range``):
IAPWS-95 covers the whole stable fluid region from the melting curve, so liquid water under
pressure beside the ices below 273.16 K is in range. ``approximate`` marks answers that rest on
a fallback solid curve (no published equation) or on a custom, approximate fluid.

Margins (NaN where undefined):

- dT_saturation = T - T_sat(p) [K] for p_t <= p <= p_c (> 0 superheat, < 0 subcooling)
- dp_saturation = p - p_sat(T) [Pa] for T_t <= T <= T_c
- dT_solid = T - T_solid(p) [K], melting curve from p_t up, sublimation curve below:
  the cooling left before solid forms (< 0: solid)
- critical_distance = sqrt((T/T_c - 1)^2 + (p/p_c - 1)^2) [-]
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: coverage factor of the boundary bands (about 95 % for normal errors)
K_COVERAGE = 2.0
#: phase labels in rising priority: where several apply, the last one listed wins
#: (the index of each is its code in the vectorized work)
LABELS = ("vapor", "liquid", "gas", "supercritical", "solid", "liquid+vapor", "solid+vapor", "solid+liquid",
          "triple", "critical", "out-of-range")
(VAPOR, LIQUID, GAS, SUPERCRITICAL, SOLID, LIQUID_VAPOR, SOLID_VAPOR, SOLID_LIQUID, TRIPLE, CRITICAL,
 OUT_OF_RANGE) = range(len(LABELS))
_LABEL_ARRAY = np.array(LABELS)
#: states classified per block: keeps every temporary in the CPU cache
CHUNK = 1 << 15


@dataclass(frozen=True)
class Classification:
    """Phases and margins of a batch of states; arrays of the input shape (numpy scalars for scalar input)."""

    phase: np.ndarray  #: labels (str), see LABELS
    dT_saturation: np.ndarray  #: T - T_sat(p) [K]
    dp_saturation: np.ndarray  #: p - p_sat(T) [Pa]
    dT_solid: np.ndarray  #: T - T_solid(p) [K]
    critical_distance: np.ndarray  #: [-]
    extrapolated: np.ndarray  #: fluid state outside the equation of state's stated range (bool)
    approximate: np.ndarray  #: answer rests on a fallback curve or an approximate fluid (bool)
    melting_published: bool  #: False: the melting curve is a documented fallback
    sublimation_published: bool  #: False: the sublimation curve is a documented fallback
    code: np.ndarray  #: the phases as indices into LABELS (uint8), for callers that compare many of them


def classify(fluid, T, p, u_T=0.0, u_p=0.0, *, k: float = K_COVERAGE) -> Classification:
    """Classify states of ``fluid`` at T [K], p [Pa] with standard uncertainties u_T [K], u_p [Pa].

    All four broadcast together; any shape. ``fluid`` needs critical, range (T_max, p_max and
    ``extrapolated``), saturation (pressure(T), temperature(p), dpdT(T) and its ends T_min,
    T_max, p_min, p_max, the lower end being the triple point), solid (a ``thermo.solid.SolidCurves`` joined
    there) and approximate, as ``thermo.Fluid`` and custom fluids have.

    >>> from thermo import fluid
    >>> str(classify(fluid("CO2"), 203.15, 101325.0).phase)  # common practice: CO2 at 1 atm, -70 C
    'vapor'
    """
    values = [np.asarray(x, dtype=float) for x in (T, p, u_T, u_p)]
    shape = np.broadcast_shapes(*(v.shape for v in values))  # cheaper than np.broadcast_arrays on a live chunk
    T, p, u_T, u_p = (v.ravel() if v.shape == shape else np.broadcast_to(v, shape).ravel() for v in values)
    n = T.size
    code = np.empty(n, np.uint8)
    margins = np.empty((4, n))
    flags = np.empty((2, n), bool)
    with np.errstate(invalid="ignore", divide="ignore"):
        for start in range(0, n, CHUNK):
            s = slice(start, start + CHUNK)
            code[s], margins[:, s], flags[:, s] = _classify_block(fluid, T[s], p[s], u_T[s], u_p[s], k)

    def shaped(values):
        values = values.reshape(shape)
        return values[()] if values.ndim == 0 else values

    return Classification(shaped(_LABEL_ARRAY[code]), *(shaped(m) for m in margins), *(shaped(f) for f in flags),
                          fluid.solid.melting_published, fluid.solid.sublimation_published, shaped(code))


def _classify_block(fluid, T, p, u_T, u_p, k):
    """(codes, [dT_sat, dp_sat, dT_solid, critical distance], [extrapolated, approximate]) of 1-D states."""
    solid, saturation = fluid.solid, fluid.saturation
    T_c, p_c = fluid.critical.T, fluid.critical.p
    T_t, p_t = saturation.T_min, saturation.p_min  # the triple point where the curves are joined

    # the curve's upper end may differ from the stated T_c, p_c by rounding: clip onto it
    on_T = (T >= T_t) & (T <= T_c)
    T_on = np.clip(T, saturation.T_min, saturation.T_max)
    dp_sat = p - saturation.pressure(T_on)
    dp_sat[~on_T] = np.nan
    on_p = (p >= p_t) & (p <= p_c)
    dT_sat = T - saturation.temperature(np.clip(p, saturation.p_min, saturation.p_max))
    dT_sat[~on_p] = np.nan
    T_solid = solid.solid_temperature(p)
    dT_solid = T - T_solid
    critical_distance = np.hypot(T / T_c - 1.0, p / p_c - 1.0)

    is_solid = dT_solid < 0
    covered = (T >= solid.T_min) | is_solid
    inside = covered & (T <= fluid.range.T_max) & (p > 0) & (p <= fluid.range.p_max) & ~(p > solid.p_top)

    # boundary bands: |distance| <= k u, u through each curve's slope
    u_T2, u_p2 = u_T * u_T, u_p * u_p
    band_sat = u_p2 if not u_T.any() else u_p2 + u_T2 * saturation.dpdT(T_on) ** 2
    near_sat = dp_sat * dp_sat <= k * k * band_sat
    band_solid = u_T2 if not u_p.any() else u_T2 + u_p2 * solid.solid_slope(p) ** 2
    near_solid = dT_solid * dT_solid <= k * k * band_solid
    near_triple = ((np.abs(T - T_t) <= k * u_T) & (np.abs(p - p_t) <= k * u_p)) | (near_sat & near_solid)
    near_critical = (np.abs(T - T_c) <= k * u_T) & (np.abs(p - p_c) <= k * u_p)

    supercritical_T = T >= T_c
    liquid = ~supercritical_T & ((dp_sat > 0) | ((T < T_t) & (p >= p_t)))
    high = p >= p_t
    code = np.zeros(T.size, np.uint8)  # VAPOR
    for label, where in ((LIQUID, liquid), (GAS, supercritical_T), (SUPERCRITICAL, supercritical_T & (p >= p_c)),
                         (SOLID, is_solid), (LIQUID_VAPOR, near_sat), (SOLID_VAPOR, near_solid & ~high),
                         (SOLID_LIQUID, near_solid & high), (TRIPLE, near_triple), (CRITICAL, near_critical),
                         (OUT_OF_RANGE, ~inside)):
        code = np.maximum(code, where.view(np.uint8) * np.uint8(label))  # not in place: cheaper on small chunks

    extrapolated = inside & fluid.range.extrapolated(T, p, p_t) & (code != SOLID)
    if fluid.approximate:
        approximate = inside
    elif solid.melting_published and solid.sublimation_published:
        approximate = np.zeros(T.size, bool)
    else:
        approximate = inside & solid.fallback_at(p)
    return code, (dT_sat, dp_sat, dT_solid, critical_distance), (extrapolated, approximate)
