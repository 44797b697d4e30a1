"""How the virtual gauge speaks: scenario frames -> the bytes a real gauge would send.

The generic voice writes `p=12.3456 bar T=21.300 degC` in the scenario's units; a profile's
voice follows its `emit` template (or its delimited fields) in the profile's units, sending
raw 4-20 mA or counts where the profile scales them, so the reading side exercises exactly
the path a real gauge would.
"""

from __future__ import annotations

from tui.acquire.options import SourceOptions
from tui.acquire.parse import quantity_channel
from tui.acquire.profile import GaugeProfile
from tui.acquire.scenario import GARBAGE, SILENT, Frames, Scenario
from tui.errors import UsageError


class Voice:
    """Renders frames as lines; `profile` None speaks the generic protocol."""

    def __init__(self, scenario: Scenario, profile: GaugeProfile | None = None):
        self.profile = profile if profile is not None and not profile.is_generic else None
        self.terminator = (profile.terminator if profile and profile.terminator else b"\r\n")
        if self.profile is None:
            pu, tu = scenario.pressure_unit, scenario.temperature_unit
            self._p = pu.from_si
            self._T = tu.from_si
            p_unit = _plain(pu.label if pu.is_gauge else pu.symbol)
            self._template = f"p={{pressure:.6g}} {p_unit} T={{temperature:.3f}} {_plain(tu.symbol)}"
        else:
            self._template = self._profile_template(self.profile)
            self._p = self._from_si("pressure")
            self._T = self._from_si("temperature")

    @staticmethod
    def _profile_template(profile: GaugeProfile) -> str:
        if profile.emit:
            return profile.emit
        if profile.delimiter is not None:
            width = max(profile.pressure.field, profile.temperature.field) + 1
            fields = ["0"] * width
            fields[profile.pressure.field] = "{pressure:.6g}"
            fields[profile.temperature.field] = "{temperature:.6g}"
            return profile.delimiter.join(fields)
        raise UsageError(f"profile {profile.origin} has no emit template: the virtual gauge cannot speak it")

    def _from_si(self, kind: str):
        channel = quantity_channel(kind, self.profile.quantity(kind), SourceOptions())
        if isinstance(channel, str):
            raise UsageError(f"profile {self.profile.origin}: {channel}")
        back = channel.to_si.inverse()
        return lambda values: values * back.scale + back.offset

    def lines(self, frames: Frames) -> list[bytes]:
        """One encoded line (with terminator) per sample that is not silent."""
        p = self._p(frames.pressure_Pa).tolist()
        T = self._T(frames.temperature_K).tolist()
        kinds = frames.kind.tolist()
        garbage = iter(frames.garbage)
        template, end = self._template, self.terminator
        out = []
        for i, kind in enumerate(kinds):
            if kind == SILENT:
                continue
            if kind == GARBAGE:
                out.append(next(garbage) + end)
            else:
                out.append(template.format(pressure=p[i], temperature=T[i]).encode("latin-1", "replace") + end)
        return out


def _plain(symbol: str) -> str:
    """Unit symbols in ASCII for the wire (degC rather than °C)."""
    return symbol.replace("°", "deg")
