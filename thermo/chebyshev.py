"""Piecewise Chebyshev expansions: adaptive fit and fast vectorized evaluation.

A smooth function on [a, b] is approximated by one Chebyshev series per piece; the pieces come
from halving [a, b] until every piece meets the tolerance, so they are finer where the function
is hard (near the critical point for saturation curves). This is the construction of the
"superancillary" equations of Bell and Deiters, here used for any smooth curve:

    Bell, I. H.; Deiters, U. K. Superancillary Equations for Cubic Equations of State.
    Ind. Eng. Chem. Res. 60 (2021) 9983-9994. doi:10.1021/acs.iecr.1c00847
    (interval bisection, Chebyshev expansions, Clenshaw evaluation)

The series on a piece [lo, hi] is f(x) = sum_k c_k T_k(t), t = (2x - lo - hi) / (hi - lo), with
coefficients from the values at the Chebyshev points of the first kind (Trefethen, L. N.
Approximation Theory and Approximation Practice, SIAM 2013, ch. 3-4; doi:10.1137/1.9781611975949).

Evaluation finds the piece in O(1): every edge lies on the grid of the finest piece (the pieces
are dyadic), so a lookup table indexed by the grid cell gives the piece. A binary search
(`numpy.searchsorted`) would cost more than the whole Clenshaw sum on 10^6 points.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

#: points evaluated per chunk: keeps the temporaries of the Clenshaw sum in the CPU cache
CHUNK = 16384
#: up to this many points are evaluated one by one in Python floats (cheaper than numpy's calls)
FEW = 4
#: largest lookup table (grid cells of the finest piece) accepted
MAX_CELLS = 1 << 16


def _clenshaw(c, t):
    """sum_k c[k] T_k(t) by Clenshaw's recurrence; t and the c[k] are floats or arrays alike
    (Clenshaw, C. W. A note on the summation of Chebyshev series. Math. Comp. 9 (1955) 118-120)."""
    if len(c) == 1:
        return c[0]
    two_t = t + t
    b1, b2 = c[-1], 0.0
    for k in range(len(c) - 2, 0, -1):
        b1, b2 = c[k] + two_t * b1 - b2, b1
    return c[0] + t * b1 - b2


def chebyshev_nodes(lo: np.ndarray, hi: np.ndarray, count: int) -> np.ndarray:
    """Chebyshev points of the first kind on each interval, shape (len(lo), count), increasing."""
    t = -np.cos(np.pi * (np.arange(count) + 0.5) / count)
    lo, hi = np.asarray(lo, float)[:, None], np.asarray(hi, float)[:, None]
    return 0.5 * (lo + hi) + 0.5 * (hi - lo) * t


def coefficients_from_nodes(values: np.ndarray) -> np.ndarray:
    """Chebyshev coefficients (rows) interpolating values given at `chebyshev_nodes` (rows)."""
    count = values.shape[-1]
    k = np.arange(count)
    # the nodes run from t = -1 upward, i.e. theta_k = pi (1 - (k + 1/2)/count)
    theta = np.pi * (1.0 - (k + 0.5) / count)
    basis = np.cos(np.outer(k, theta))  # basis[j, k] = T_j(t_k)
    c = values @ basis.T * (2.0 / count)
    c[..., 0] *= 0.5
    return c


@dataclass(frozen=True, eq=False)
class ChebyshevPieces:
    """Piecewise Chebyshev series on [edges[0], edges[-1]]; NaN outside, and for NaN input.

    `edges` [same unit as x] increase and lie on the grid of the narrowest piece; `coefficients`
    has one row of Chebyshev coefficients per piece (all pieces share one degree).
    """

    edges: np.ndarray
    coefficients: np.ndarray
    _lookup: dict = field(init=False, repr=False, compare=False)
    _points: tuple = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        edges = np.asarray(self.edges, float)
        coefficients = np.asarray(self.coefficients, float)
        if edges.ndim != 1 or coefficients.ndim != 2 or len(edges) != len(coefficients) + 1:
            raise ValueError("ChebyshevPieces needs n + 1 edges and an (n, degree + 1) coefficient table")
        if np.any(np.diff(edges) <= 0):
            raise ValueError("ChebyshevPieces edges must increase")
        a, b = edges[0], edges[-1]
        cells = (b - a) / np.diff(edges).min()
        grid = (edges - a) / (b - a) * round(cells)
        if round(cells) > MAX_CELLS or np.abs(grid - np.round(grid)).max() > 1e-6:
            raise ValueError("ChebyshevPieces edges must lie on a grid of at most 65536 cells (dyadic pieces)")
        cells = round(cells)
        piece_of_cell = np.repeat(np.arange(len(coefficients)), np.diff(np.round(grid).astype(int)))
        object.__setattr__(self, "edges", edges)
        object.__setattr__(self, "coefficients", coefficients)
        scalar = np.array  # 0-d arrays: cheaper numpy operands than Python floats on small arrays
        mid, inv_half = 0.5 * (edges[1:] + edges[:-1]), 2.0 / np.diff(edges)
        object.__setattr__(self, "_lookup", {
            "a": scalar(a), "b": scalar(b), "last_cell": scalar(cells - 1.0), "scale": scalar(cells / (b - a)),
            "piece": piece_of_cell, "mid": mid, "inv_half": inv_half, "columns": np.ascontiguousarray(coefficients.T),
        })
        object.__setattr__(self, "_points", (  # the same tables as Python numbers, for `_point`
            float(a), float(b), float(cells - 1.0), float(cells / (b - a)), piece_of_cell.tolist(),
            mid.tolist(), inv_half.tolist(), coefficients.tolist(),
        ))

    @property
    def degree(self) -> int:
        return self.coefficients.shape[1] - 1

    def __call__(self, x):
        """Value of the series at x (scalar -> float, array -> array of the same shape)."""
        x = np.asarray(x, dtype=float)
        flat = x.reshape(-1)
        if flat.size <= FEW:  # a live chunk of a sample or two: Python numbers beat numpy's fixed cost
            out = np.array([self._point(value) for value in flat.tolist()], dtype=float)
        elif flat.size <= CHUNK:  # no copy into an output array
            out = self._evaluate(flat)
        else:
            out = np.empty_like(flat)
            for start in range(0, flat.size, CHUNK):
                out[start:start + CHUNK] = self._evaluate(flat[start:start + CHUNK])
        return float(out[0]) if x.ndim == 0 else out.reshape(x.shape)

    def _evaluate(self, x: np.ndarray) -> np.ndarray:
        """Clenshaw sum over a chunk, every point in its own piece.

        x is first clipped onto [a, b] (NaN stays NaN), so no step meets an infinity and no
        floating-point state needs guarding; the points the clip moved are NaN at the end.
        Few numpy calls, none in place (an in-place ufunc on a one-element array costs about
        three times a new one): their fixed cost is what a small chunk pays.
        """
        lk = self._lookup
        inside = np.minimum(np.maximum(x, lk["a"]), lk["b"])
        cell = np.fmin((inside - lk["a"]) * lk["scale"], lk["last_cell"])  # fmin maps NaN to a valid cell
        piece = lk["piece"].take(cell.astype(np.intp))
        t = (inside - lk["mid"].take(piece)) * lk["inv_half"].take(piece)
        result = _clenshaw([column.take(piece) for column in lk["columns"]], t)
        result[inside != x] = np.nan  # outside [a, b], and NaN input
        return result

    def _point(self, x: float) -> float:
        """`_evaluate` for one point in Python floats: the same IEEE operations in the same order,
        so the same value to the bit, without numpy's cost per call."""
        a, b, last_cell, scale, piece_of_cell, mid, inv_half, rows = self._points
        if not a <= x <= b:  # outside, or NaN
            return math.nan
        piece = piece_of_cell[int(min((x - a) * scale, last_cell))]
        return _clenshaw(rows[piece], (x - mid[piece]) * inv_half[piece])

    def derivative(self) -> ChebyshevPieces:
        """The series of df/dx on the same pieces."""
        scale = (2.0 / np.diff(self.edges))[:, None]
        d = np.polynomial.chebyshev.chebder(self.coefficients, axis=1) * scale
        if d.shape[1] == 0:
            d = np.zeros((len(self.coefficients), 1))
        return ChebyshevPieces(self.edges, d)

    def to_dict(self) -> dict:
        """Edges and coefficients as lists; each coefficient keeps the digits that matter at
        1e-17 of its piece's largest one (shorter files; the series moves by < 1e-16)."""
        scale = np.abs(self.coefficients).max(axis=1, keepdims=True)
        with np.errstate(divide="ignore"):
            digits = 17 + np.floor(np.log10(np.abs(self.coefficients) / scale))
        digits = np.clip(np.nan_to_num(digits, neginf=1.0), 1, 17).astype(int)
        rows = [[float(f"{c:.{n - 1}e}") for c, n in zip(row, row_digits, strict=True)]
                for row, row_digits in zip(self.coefficients, digits, strict=True)]
        return {"edges": self.edges.tolist(), "coefficients": rows}

    @classmethod
    def from_dict(cls, data: dict) -> ChebyshevPieces:
        return cls(np.array(data["edges"], float), np.array(data["coefficients"], float))


def fit_pieces(f: Callable[[np.ndarray], np.ndarray], a: float, b: float, *, degree: int = 12,
               rtol: float = 1e-11, max_depth: int = 14,
               strict: bool = True) -> tuple[ChebyshevPieces, np.ndarray]:
    """Fit f on [a, b] by halving intervals until each series meets rtol.

    f is called with 2-D arrays of points (one row per interval) and must return values of the
    same shape; all intervals of one halving level go in one call. Each series interpolates f at
    degree + 1 Chebyshev points and is checked at 2 degree + 3 other points. Returns the pieces
    and each piece's error, the worst |fit - f| / |f| at its checks. A piece that still fails
    after max_depth halvings raises ValueError when `strict`, and is kept otherwise (for a
    function that is singular at an end, like saturated densities at the critical point).

    >>> pieces, errors = fit_pieces(np.exp, 0.0, 1.0, degree=12, rtol=1e-14)
    >>> bool(abs(pieces(0.5) / np.exp(0.5) - 1) < 1e-14), len(errors)
    (True, 1)
    """
    done: list[tuple[float, float, np.ndarray, float]] = []
    pending = np.array([[a, b]], float)
    for depth in range(max_depth + 1):
        lo, hi = pending[:, 0], pending[:, 1]
        nodes = chebyshev_nodes(lo, hi, degree + 1)
        checks = chebyshev_nodes(lo, hi, 2 * degree + 3)
        values = np.asarray(f(np.concatenate([nodes, checks], axis=1)), float)
        c = coefficients_from_nodes(values[:, : degree + 1])
        t = (2.0 * checks - (lo + hi)[:, None]) / (hi - lo)[:, None]
        fitted = np.stack([np.polynomial.chebyshev.chebval(row_t, row_c) for row_t, row_c in zip(t, c, strict=True)])
        exact = values[:, degree + 1:]
        error = np.max(np.abs(fitted - exact) / np.abs(exact), axis=1)
        if not np.all(np.isfinite(error)):
            raise ValueError("fit_pieces: the function returned NaN or zero inside the interval")
        good = (error <= rtol) | (depth == max_depth and not strict)
        done.extend(zip(lo[good], hi[good], c[good], error[good], strict=True))
        if good.all():
            done.sort(key=lambda piece: piece[0])
            edges = np.array([piece[0] for piece in done] + [done[-1][1]])
            pieces = ChebyshevPieces(edges, np.array([piece[2] for piece in done]))
            return pieces, np.array([piece[3] for piece in done])
        mid = 0.5 * (lo[~good] + hi[~good])
        pending = np.concatenate([np.column_stack([lo[~good], mid]), np.column_stack([mid, hi[~good]])])
    raise ValueError(f"fit_pieces: tolerance {rtol:g} not met after {max_depth} halvings "
                     f"near x = {pending[0, 0]:.10g}")
