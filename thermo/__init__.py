"""rigside's thermodynamics: pure-fluid reference equations of state, saturation, phases.

Pure computation (numpy, scipy, stdlib); SI units in and out; scalars or arrays.

>>> from thermo import fluid
>>> round(float(fluid("water").saturation_pressure(373.124)) / 1e5, 3)  # IAPWS-95: normal boiling point
1.013
"""

from thermo.fluid import Fluid, fluid, fluids
from thermo.cubic import custom_fluid

__all__ = ["Fluid", "custom_fluid", "fluid", "fluids"]
