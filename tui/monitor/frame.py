"""A chunk of samples as arrays, the form every monitor stage works on, and the integer codes of
phases and qualities that let those stages compare labels at numpy speed."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from thermo.classify import LABELS as THERMO_LABELS
from tui.acquire.sample import QUALITY_SEVERITY, Quality
from tui.monitor.model import UNCLASSIFIED

#: quality code -> Quality (codes are positions in this tuple)
QUALITIES: tuple[Quality, ...] = QUALITY_SEVERITY
QUALITY_CODE = {quality: code for code, quality in enumerate(QUALITIES)} | {
    quality.value: code for code, quality in enumerate(QUALITIES)
}
OK_CODE = QUALITY_CODE[Quality.OK]
CLASSIFIABLE = np.array([quality.classifiable for quality in QUALITIES])
#: codes (of phases or qualities) are below this, so lookup tables can replace set tests
CODE_LIMIT = 256


class PhaseCodes:
    """Phase label <-> integer code; labels thermo adds later get the next free codes."""

    KNOWN = (
        "solid", "liquid", "vapor", "gas", "supercritical", "liquid+vapor", "solid+vapor",
        "solid+liquid", "triple", "critical", "out-of-range", UNCLASSIFIED,
    )

    def __init__(self) -> None:
        self.labels: list[str] = list(self.KNOWN)
        self._code = {label: code for code, label in enumerate(self.labels)}
        self._of_thermo = np.array([self.code(label) for label in THERMO_LABELS], dtype=np.int16)
        self.unclassified = self._code[UNCLASSIFIED]

    def code(self, label: str) -> int:
        if label not in self._code:
            if len(self.labels) >= CODE_LIMIT:
                raise ValueError(f"more than {CODE_LIMIT} phase labels; {label!r} is one too many")
            self._code[label] = len(self.labels)
            self.labels.append(label)
        return self._code[label]

    def of_thermo(self, codes: np.ndarray) -> np.ndarray:
        """thermo's phase codes (``Classification.code``) -> int16 codes, one table lookup."""
        return self._of_thermo.take(codes)

    def decode(self, codes: np.ndarray) -> np.ndarray:
        """int16 codes -> array of labels."""
        return np.array(self.labels).take(codes)


@dataclass(frozen=True, slots=True)
class Frame:
    """One chunk of samples after classification and trend; arrays of n samples (margins: rows x n)."""

    t_s: np.ndarray
    """Time since the start of the run [s]."""
    t_wall: np.ndarray
    pressure_Pa: np.ndarray
    temperature_K: np.ndarray
    quality: np.ndarray
    """Quality codes (positions in QUALITIES)."""
    valid: np.ndarray
    """Whether each sample was classified (its quality allows it and its values are finite)."""
    phase: np.ndarray
    """Phase codes (PhaseCodes)."""
    margins: np.ndarray
    """MARGINS rows x samples, NaN where undefined."""
    rates: np.ndarray
    """Rates of the margins, same shape [unit/s]."""
    reasons: tuple[tuple[str, ...], ...] | None = None
    """Why each sample's quality is not ok (None when not known, as in a log without them)."""
    raw: tuple[str, ...] | None = None
    """Each sample's record as received (None when not known)."""

    @property
    def size(self) -> int:
        return int(self.t_s.size)
