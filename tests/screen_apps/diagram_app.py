"""The phase diagram alone, at a known state, for snapshots."""

from __future__ import annotations

import numpy as np
from textual.app import App, ComposeResult

import thermo
from thermo.units import PressureUnit, TemperatureUnit
from tui.screen.curves import fluid_curves, isotherm
from tui.screen.plot import DiagramState
from tui.screen.widgets.phase_diagram import PhaseDiagram


class DiagramApp(App):
    CSS_PATH = "../../tui/screen/app.tcss"

    def __init__(self, fluid: str, T: float, p: float, *, view: str = "pT", zoom: str = "whole",
                 limits: dict | None = None, alarm: bool = False):
        super().__init__()
        f = thermo.fluid(fluid)
        self.curves = fluid_curves(f)
        trail_T = np.linspace(T - 8.0, T, 60)
        trail_p = np.geomspace(p * 0.8, p, 60)
        self.state = DiagramState(
            T=T, p=p, v=1.0 / float(f.density(T, p)), trail_T=trail_T, trail_p=trail_p,
            isotherm=isotherm(f, T, (f.triple.p / 3, f.critical.p * 3)), limits=limits or {}, alarm=alarm,
        )
        self.view, self.zoom = view, zoom

    def compose(self) -> ComposeResult:
        yield PhaseDiagram(id="diagram")

    def on_mount(self) -> None:
        diagram = self.query_one(PhaseDiagram)
        diagram.view, diagram.zoom = self.view, self.zoom
        diagram.show(self.curves, self.state, TemperatureUnit.from_text("degC"), PressureUnit.from_text("bar"))
