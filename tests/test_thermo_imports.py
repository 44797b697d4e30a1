"""thermo is pure computation: using it loads numpy, scipy and the standard library only."""

import json
import subprocess
import sys

USE_THERMO = """
import json, sys
import thermo
from thermo import units
f = thermo.fluid("CO2")
f.classify(250.0, 2e6, 0.1, 5000.0)
f.properties(300.0, 1e5)
thermo.custom_fluid("test oil", 500.0, 3e6, 0.3, 0.1, triple_T=250.0).classify(300.0, 1e5)
units.parse_pressure("58 bar(g)")
units.parse_temperature("19 degC")
print(json.dumps(sorted({name.split(".")[0] for name in sys.modules})))
"""


def test_thermo_never_loads_the_user_interface_or_the_serial_port():
    done = subprocess.run([sys.executable, "-c", USE_THERMO], capture_output=True, text=True, timeout=120, check=True)
    loaded = set(json.loads(done.stdout))
    assert "thermo" in loaded and "numpy" in loaded
    assert not loaded & {"tui", "textual", "rich", "serial", "pymodbus"}
    # everything else is the standard library, numpy, scipy or the interpreter's own start-up hooks
    others = loaded - set(sys.stdlib_module_names) - {"thermo", "numpy", "scipy", "__main__"}
    assert all(name.startswith("_") for name in others), others
