"""Shaping of coded signals, one chunk of samples at a time, with the state carried between chunks.

Rows are independent signals (one per alarm condition, say), columns are samples. Only
comparisons and copies happen here, so a run fed in one chunk or in a thousand gives the
same result to the bit: the monitor's live path and its batch path are the same code.
"""

from __future__ import annotations

import numpy as np


def last_true_index(mask: np.ndarray) -> np.ndarray:
    """Per row, the column index of the latest True at or before each column; -1 before the first."""
    index = np.where(mask, np.arange(mask.shape[-1]), -1)
    return np.maximum.accumulate(index, axis=-1)


def _fill(values: np.ndarray, index: np.ndarray, before: np.ndarray) -> np.ndarray:
    """values[row, index] where index >= 0, else the carried value `before[row]`."""
    taken = values[np.arange(values.shape[0])[:, None], np.maximum(index, 0)]
    return np.where(index >= 0, taken, before[:, None])


class Hold:
    """Keeps the last decided code where a sample decides nothing (code -1).

    With codes 1 = "beyond the limit", 0 = "past limit + deadband" and -1 for the band in
    between, this is a limit with deadband (hysteresis); with -1 for samples that may not
    be judged (bad quality), it holds the last good judgement.
    """

    def __init__(self, rows: int, initial: int = 0):
        self.state = np.full(rows, initial, dtype=np.int16)

    def __call__(self, decisions: np.ndarray) -> np.ndarray:
        """decisions: int (rows, n) with -1 for "undecided" -> held codes (rows, n)."""
        if decisions.shape[-1] == 0:
            return decisions.astype(np.int16)
        held = _fill(decisions.astype(np.int16), last_true_index(decisions >= 0), self.state)
        self.state = held[:, -1].copy()
        return held


class Settle:
    """Adopts a code only after it has persisted for its delay (on-delay, off-delay, hold time).

    A run is a stretch of equal codes; the settled code becomes the run's code at the first
    sample where the run has lasted its delay (`t - t_run_start >= delay`) and that sample
    is allowed to decide (`gate`). Delays are per row and per code: an array (rows, codes)
    indexed by the code, or (rows, 1) for one delay whatever the code.
    """

    def __init__(self, delays: np.ndarray, initial: int):
        self.delays = np.asarray(delays, dtype=float)
        rows = self.delays.shape[0]
        self.run_code = np.full(rows, -1, dtype=np.int16)
        self.run_start = np.full(rows, np.nan)
        self.settled = np.full(rows, initial, dtype=np.int16)

    def __call__(self, codes: np.ndarray, t: np.ndarray, gate: np.ndarray | None = None) -> np.ndarray:
        """codes: int >= 0 (rows, n); t: sample times (n,) [s]; gate: bool (rows, n) or None."""
        n = codes.shape[-1]
        if n == 0:
            return codes.astype(np.int16)
        previous = np.concatenate([self.run_code[:, None], codes[:, :-1]], axis=1)
        run_start = _fill(np.broadcast_to(t, codes.shape), last_true_index(codes != previous), self.run_start)
        if self.delays.shape[1] == 1:
            delay = self.delays
        else:
            delay = self.delays[np.arange(codes.shape[0])[:, None], codes]
        adopt = (t - run_start) >= delay
        if gate is not None:
            adopt &= gate
        settled = _fill(codes.astype(np.int16), last_true_index(adopt), self.settled)
        self.run_code = codes[:, -1].astype(np.int16)
        self.run_start = run_start[:, -1].copy()
        self.settled = settled[:, -1].copy()
        return settled


def changes(values: np.ndarray, before: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(row, column) indices where values differ from the previous column (the first column
    compares with `before`), in column order within each row."""
    previous = np.concatenate([before[:, None], values[:, :-1]], axis=1)
    return np.nonzero(values != previous)
