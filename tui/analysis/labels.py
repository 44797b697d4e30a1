"""Label arrays (phase, quality) handled through their runs, so the cost follows the number of
changes rather than the number of samples."""

from __future__ import annotations

import numpy as np


def label_runs(labels: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Run-length encoding: the index where each run of equal labels starts, and its label."""
    if labels.size == 0:
        return np.zeros(0, dtype=np.intp), labels
    starts = np.concatenate(([0], np.flatnonzero(labels[1:] != labels[:-1]) + 1))
    return starts, labels[starts]


def encode_labels(labels: np.ndarray) -> tuple[np.ndarray, list]:
    """Integer codes per element and the distinct values they index (sorted, as Python objects)."""
    starts, values = label_runs(labels)
    names, which = np.unique(values, return_inverse=True)
    lengths = np.diff(np.append(starts, labels.size))
    return np.repeat(which, lengths), names.tolist()


def label_totals(labels: np.ndarray, weights: np.ndarray) -> dict[str, float]:
    """Sum of the weights per label (e.g. seconds per phase, samples per quality)."""
    starts, values = label_runs(labels)
    if starts.size == 0:
        return {}
    per_run = np.add.reduceat(weights, starts)
    names, which = np.unique(values, return_inverse=True)
    totals = np.bincount(which, weights=per_run, minlength=names.size)
    return {str(name): float(total) for name, total in zip(names, totals)}


def is_any(labels: np.ndarray, wanted: tuple[str, ...]) -> np.ndarray:
    """Whether each label is one of a few wanted ones (cheaper than np.isin's sort on strings)."""
    mask = np.zeros(labels.shape, dtype=bool)
    for label in wanted:
        mask |= labels == label
    return mask
