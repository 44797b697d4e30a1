"""Classification stage: thermo's phase and margins for the samples that may be classified.

A sample whose quality forbids classification (NAMUR NE 107 failure or function check), or
whose values are missing, gets the label `unclassified` and NaN margins: it is recorded, never
judged as if it were good. The gauge's standard uncertainties go with every state, so a state
within their reach of a curve is classified as on it.
"""

from __future__ import annotations

import numpy as np

from tui.monitor.config import MonitorConfig
from tui.monitor.frame import CLASSIFIABLE, PhaseCodes
from tui.monitor.model import MARGINS

_FIELDS = ("dT_saturation", "dp_saturation", "dT_solid", "critical_distance")  # thermo's names of MARGINS


class Classifier:
    """Phase codes (PhaseCodes) and MARGINS of arrays of states of one fluid."""

    def __init__(self, config: MonitorConfig, phases: PhaseCodes):
        self.fluid = config.thermo_fluid
        self.phases = phases
        self.u_T = config.u_temperature_K
        self.u_p, self.u_p_fraction = config.u_pressure_Pa, config.u_pressure_fraction

    def __call__(self, pressure_Pa: np.ndarray, temperature_K: np.ndarray, quality: np.ndarray):
        """(valid, phase, margins): which samples were classified, their phase codes (int16,
        `unclassified` elsewhere) and margins (MARGINS x n, NaN elsewhere). thermo's own codes
        are translated by one table lookup: no label strings are compared."""
        valid = CLASSIFIABLE[quality] & np.isfinite(pressure_Pa) & np.isfinite(temperature_K)
        n = pressure_Pa.size
        phase = np.empty(n, dtype=np.int16)
        phase.fill(self.phases.unclassified)
        margins = np.empty((len(MARGINS), n))
        margins.fill(np.nan)
        chosen = np.flatnonzero(valid)
        if chosen.size:
            p, T = pressure_Pa[chosen], temperature_K[chosen]
            result = self.fluid.classify(T, p, self.u_T, self.u_p + self.u_p_fraction * p)
            phase[chosen] = self.phases.of_thermo(result.code)
            for row, name in enumerate(_FIELDS):
                margins[row, chosen] = getattr(result, name)
        return valid, phase, margins
