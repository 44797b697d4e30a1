"""Robust rate of change of the margins, and the predicted time until each reaches zero.

Method: the samples are first averaged in equal time slots (`window / bins` wide, counted
from the run's first sample); the rate at a sample is the Theil-Sen slope, the median of the
slopes between every pair of slot means, over the `bins` completed slots before the
sample's own slot (Theil, Proc. K. Ned. Akad. Wet. 53 (1950) 386; Sen, J. Am. Stat. Assoc.
63 (1968) 1379, doi:10.1080/01621459.1968.10480934). The median ignores up to about 29 %
of outlying slots (a spike, a burst of noise); averaging in slots keeps the cost per slot,
not per sample, so a million-sample log costs tens of thousands of small medians.

A slot counts only once it is complete, and its mean is summed in sample order from its own
samples, so the live path (many small chunks) and the batch path (one big chunk) agree to
the bit. The rate lags by up to one slot width; it is NaN until the run has lasted a full
window and wherever fewer than half of the window's slots hold valid data.
"""

from __future__ import annotations

import numpy as np

#: batch work on at most this many slots at a time (bounds memory on long logs)
_SLOT_BLOCK = 4096


class Trend:
    """Rates of several margins (rows) over a sliding window, fed chunk by chunk."""

    def __init__(self, window_s: float, bins: int, rows: int):
        self.width = window_s / bins
        self.bins = bins
        self.min_valid = (bins + 1) // 2
        self._t0: float | None = None
        self._last_slot = -1
        self._open_slot = np.empty(0, dtype=np.int64)
        self._open_t = np.empty(0)
        self._open_y = np.empty((rows, 0))
        self._hist_slot = np.empty(0, dtype=np.int64)
        self._hist_t = np.empty((rows, 0))
        self._hist_y = np.empty((rows, 0))
        first, second = np.triu_indices(bins, k=1)
        self._pair_first, self._pair_second = first, second
        self._known_slot, self._known_rates = -1, np.full((rows, 1), np.nan)
        """The rates of the newest slot: they hold for every sample in it, so compute them once."""

    def __call__(self, t: np.ndarray, values: np.ndarray) -> np.ndarray:
        """t: sample times (n,) [s]; values: margins (rows, n), NaN where undefined -> rates (rows, n) [unit/s]."""
        rows, n = values.shape
        if n == 0:
            return np.empty((rows, 0))
        if self._t0 is None:
            self._t0 = float(t[0])
        slot = np.floor((t - self._t0) / self.width).astype(np.int64)
        slot = np.maximum.accumulate(np.maximum(slot, self._last_slot))  # a clock stepping back stays in its slot
        self._last_slot = int(slot[-1])
        self._close_slots(slot, t, values)
        if slot[0] == self._last_slot == self._known_slot:  # the common live case: one slot, already known
            return np.repeat(self._known_rates, n, axis=1)
        wanted, where = np.unique(slot, return_inverse=True)
        rates = np.concatenate(
            [self._rates(wanted[i:i + _SLOT_BLOCK]) for i in range(0, wanted.size, _SLOT_BLOCK)], axis=1
        )
        self._known_slot, self._known_rates = int(wanted[-1]), rates[:, -1:]
        return rates[:, where]

    def _close_slots(self, slot: np.ndarray, t: np.ndarray, values: np.ndarray) -> None:
        """Add the chunk to the open slot; every slot before the newest one is complete: average it."""
        all_slot = np.concatenate([self._open_slot, slot])
        all_t = np.concatenate([self._open_t, t])
        all_y = np.concatenate([self._open_y, values], axis=1)
        done = int(np.searchsorted(all_slot, all_slot[-1], side="left"))
        self._open_slot, self._open_t, self._open_y = all_slot[done:], all_t[done:], all_y[:, done:]
        if done == 0:
            return
        closed, member = np.unique(all_slot[:done], return_inverse=True)
        rows, count = all_y.shape[0], closed.size
        valid = ~np.isnan(all_y[:, :done])
        bins = (member[None, :] + count * np.arange(rows)[:, None]).ravel()
        size = rows * count

        def slot_sums(weights: np.ndarray) -> np.ndarray:
            return np.bincount(bins, weights=weights.ravel(), minlength=size).reshape(rows, count)

        counts = slot_sums(valid.astype(float))
        with np.errstate(invalid="ignore", divide="ignore"):
            mean_t = slot_sums(np.where(valid, all_t[None, :done], 0.0)) / counts
            mean_y = slot_sums(np.where(valid, all_y[:, :done], 0.0)) / counts
        keep = self._hist_slot >= slot[0] - self.bins  # what this chunk's windows still need
        self._hist_slot = np.concatenate([self._hist_slot[keep], closed])
        self._hist_t = np.concatenate([self._hist_t[:, keep], mean_t], axis=1)
        self._hist_y = np.concatenate([self._hist_y[:, keep], mean_y], axis=1)

    def _rates(self, wanted: np.ndarray) -> np.ndarray:
        """Theil-Sen slope over the `bins` slots before each wanted slot -> (rows, wanted)."""
        rows = self._hist_y.shape[0]
        window = wanted[:, None] - self.bins + np.arange(self.bins)  # (wanted, bins) slot numbers
        position = np.searchsorted(self._hist_slot, window).clip(0, max(self._hist_slot.size - 1, 0))
        if self._hist_slot.size == 0:
            return np.full((rows, wanted.size), np.nan)
        found = self._hist_slot[position] == window
        t = np.where(found, self._hist_t[:, position], np.nan)  # (rows, wanted, bins)
        y = np.where(found, self._hist_y[:, position], np.nan)
        with np.errstate(invalid="ignore", divide="ignore"):
            slopes = (y[..., self._pair_second] - y[..., self._pair_first]) / (
                t[..., self._pair_second] - t[..., self._pair_first]
            )
        rates = _nan_median(slopes)
        enough = (np.count_nonzero(~np.isnan(y), axis=-1) >= self.min_valid) & (window[:, 0] >= 0)
        return np.where(enough, rates, np.nan)


def _nan_median(values: np.ndarray) -> np.ndarray:
    """Median over the last axis ignoring NaN (NaN where all are NaN); sorting puts NaN last."""
    ordered = np.sort(values, axis=-1)
    valid = np.count_nonzero(~np.isnan(ordered), axis=-1)
    low = np.take_along_axis(ordered, ((valid - 1) // 2).clip(0)[..., None], axis=-1)[..., 0]
    high = np.take_along_axis(ordered, (valid // 2).clip(0, ordered.shape[-1] - 1)[..., None], axis=-1)[..., 0]
    return np.where(valid > 0, (low + high) / 2.0, np.nan)


def time_to_zero(margins: np.ndarray, rates: np.ndarray) -> np.ndarray:
    """Time until each margin reaches zero at its rate [s]: inf when it is not closing, NaN when unknown."""
    with np.errstate(invalid="ignore", divide="ignore"):
        closing = margins * rates < 0.0
        return np.where(closing, -margins / rates, np.where(np.isnan(margins * rates), np.nan, np.inf))
