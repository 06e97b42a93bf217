"""Banded symmetric positive-definite solver (Cholesky factor in lower band storage).

A continuous beam with (v, theta) degrees of freedom per node couples each DOF only with
its neighbours within one element, so its stiffness matrix has a half-bandwidth of at most
3. Factorising it as L L^T inside the band costs O(n p^2) and each right-hand side costs
O(n p): linear in the number of spans. All right-hand sides are solved together, one
vectorised row operation per DOF.

Storage (as in LAPACK's lower band form): ``ab[k, j] = A[j + k, j]`` for
``k = 0 .. p`` and ``j + k < n``; entries past the end of the matrix are ignored.

Block-diagonal matrices of many small blocks (a floor of strips: ``analysis.floor``) are
factorised in lockstep: every block padded to the same size, column j of all blocks at once,
so the Python loop runs over the DOFs of one block while numpy runs across the blocks.
Storage ``ab[k, j, b] = A_b[j + k, j]`` for block b.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = [
    "BandedCholesky",
    "BlockBandedCholesky",
    "NotPositiveDefiniteError",
    "band_from_dense",
    "cholesky_banded",
    "cholesky_banded_blocks",
    "solve_banded_spd",
]

# A pivot below this fraction of its original diagonal means the matrix is singular to
# working precision (for a beam: a mechanism).
_PIVOT_RTOL = 1.0e-11


class NotPositiveDefiniteError(ValueError):
    """The banded matrix is not positive definite (a beam model that is a mechanism)."""


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class BandedCholesky:
    """Cholesky factor L of a banded SPD matrix, in lower band storage ``(p + 1, n)``."""

    lower: np.ndarray  # lower[k, j] = L[j + k, j]

    def __post_init__(self) -> None:
        self.lower.setflags(write=False)

    @property
    def n(self) -> int:
        return int(self.lower.shape[1])

    @property
    def bandwidth(self) -> int:
        """Half-bandwidth p (number of sub-diagonals)."""
        return int(self.lower.shape[0]) - 1

    def solve(self, b: np.ndarray) -> np.ndarray:
        """Solve A x = b for one (``(n,)``) or many (``(n, m)``) right-hand sides."""
        b = np.asarray(b, dtype=float)
        single = b.ndim == 1
        if b.ndim not in (1, 2) or b.shape[0] != self.n:
            raise ValueError(f"right-hand side has {b.shape[0]} rows, the matrix has {self.n}")
        y = np.array(b.reshape(self.n, -1), dtype=float, order="C")
        n, p = self.n, self.bandwidth
        low = self.lower
        # Row by row, one sub-diagonal at a time in a fixed order: the same arithmetic as
        # ``BlockBandedCholesky.solve``, so a beam solved alone or in a floor agrees bit
        # for bit.
        for j in range(n):  # forward substitution L y = b
            for k in range(1, min(p, j) + 1):
                y[j] -= low[k, j - k] * y[j - k]
            y[j] /= low[0, j]
        for j in range(n - 1, -1, -1):  # back substitution L^T x = y
            for k in range(1, min(p, n - 1 - j) + 1):
                y[j] -= low[k, j] * y[j + k]
            y[j] /= low[0, j]
        return y[:, 0] if single else y


def cholesky_banded(ab: np.ndarray) -> BandedCholesky:
    """Factorise a banded SPD matrix given in lower band storage ``(p + 1, n)``.

    Raises ``NotPositiveDefiniteError`` on a non-positive pivot.
    """
    ab = np.asarray(ab, dtype=float)
    if ab.ndim != 2 or ab.shape[0] < 1:
        raise ValueError("band storage must be a 2-D array of shape (p + 1, n)")
    p1, n = ab.shape
    p = p1 - 1
    # The band is at most a few entries wide: scalar Python arithmetic on lists beats
    # per-column numpy calls here; the multi-RHS substitution is where numpy pays.
    a = [list(map(float, row)) for row in ab]
    diag0 = a[0][:]
    for j in range(n):
        d = a[0][j]
        if not d > _PIVOT_RTOL * abs(diag0[j]) or not math.isfinite(d):
            raise NotPositiveDefiniteError(
                f"matrix is not positive definite (pivot {j} is {d:.3g})"
            )
        ljj = math.sqrt(d)
        a[0][j] = ljj
        m = min(p, n - 1 - j)
        col = [a[k][j] / ljj for k in range(1, m + 1)]
        for k in range(1, m + 1):
            a[k][j] = col[k - 1]
        # Rank-1 update of the trailing band: A[j+k, j+i] -= L[j+k, j] L[j+i, j].
        for i in range(1, m + 1):
            ci = col[i - 1]
            for k in range(i, m + 1):
                a[k - i][j + i] -= col[k - 1] * ci
    lower = np.array(a, dtype=float).reshape(p1, n)
    for k in range(1, p1):
        lower[k, max(n - k, 0) :] = 0.0  # entries past the end of the matrix
    return BandedCholesky(lower)


@dataclass(frozen=True, slots=True, eq=False)  # holds arrays: identity equality
class BlockBandedCholesky:
    """Cholesky factors of the blocks of a block-diagonal banded SPD matrix, in lockstep
    storage ``(p + 1, n_b, n_blocks)``: ``lower[k, j, b] = L_b[j + k, j]``."""

    lower: np.ndarray

    def __post_init__(self) -> None:
        self.lower.setflags(write=False)

    def solve(self, b: np.ndarray) -> np.ndarray:
        """Solve every block for its right-hand sides ``b`` of shape (n_b, n_blocks, m)."""
        p1, n_b, n_blocks = self.lower.shape
        b = np.asarray(b, dtype=float)
        if b.ndim != 3 or b.shape[:2] != (n_b, n_blocks):
            raise ValueError(f"right-hand sides must have shape ({n_b}, {n_blocks}, m)")
        # Worked as (n_b, m, n_blocks): every operation runs along the blocks (the long
        # axis), each factor entry broadcast over the right-hand sides.
        low = self.lower[:, :, None, :]
        y = np.ascontiguousarray(b.transpose(0, 2, 1))
        for j in range(n_b):  # forward substitution L y = b
            for k in range(1, min(p1, j + 1)):
                y[j] -= low[k, j - k] * y[j - k]
            y[j] /= low[0, j]
        for j in range(n_b - 1, -1, -1):  # back substitution L^T x = y
            for k in range(1, min(p1, n_b - j)):
                y[j] -= low[k, j] * y[j + k]
            y[j] /= low[0, j]
        return y.transpose(0, 2, 1)


def cholesky_banded_blocks(ab: np.ndarray) -> tuple[BlockBandedCholesky, np.ndarray]:
    """Factorise the blocks given in lockstep band storage ``(p + 1, n_b, n_blocks)``.

    Returns the factors and a (n_blocks,) bool array of the blocks with a non-positive pivot
    (the same test as ``cholesky_banded``); their factors are garbage.
    """
    ab = np.asarray(ab, dtype=float)
    if ab.ndim != 3 or ab.shape[0] < 1:
        raise ValueError("block band storage must have shape (p + 1, n_b, n_blocks)")
    p1, n_b, n_blocks = ab.shape
    a = np.array(ab)
    diag0 = np.abs(ab[0])
    bad = np.zeros(n_blocks, dtype=bool)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for j in range(n_b):
            d = a[0, j]
            ok = (d > _PIVOT_RTOL * diag0[j]) & np.isfinite(d)
            if not ok.all():
                bad |= ~ok
                d = np.where(ok, d, 1.0)
            ljj = np.sqrt(d)
            a[0, j] = ljj
            m = min(p1 - 1, n_b - 1 - j)
            col = [a[k, j] / ljj for k in range(1, m + 1)]
            for k in range(1, m + 1):
                a[k, j] = col[k - 1]
            # Rank-1 update of the trailing band: A[j+k, j+i] -= L[j+k, j] L[j+i, j].
            for i in range(1, m + 1):
                ci = col[i - 1]
                for k in range(i, m + 1):
                    a[k - i, j + i] -= col[k - 1] * ci
    for k in range(1, p1):
        a[k, max(n_b - k, 0) :] = 0.0  # entries past the end of each block
    return BlockBandedCholesky(a), bad


def solve_banded_spd(ab: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Solve A x = b with A banded SPD in lower band storage; b is ``(n,)`` or ``(n, m)``."""
    return cholesky_banded(ab).solve(b)


def band_from_dense(a: np.ndarray, bandwidth: int) -> np.ndarray:
    """Lower band storage of the lower triangle of a dense symmetric matrix."""
    a = np.asarray(a, dtype=float)
    n = a.shape[0]
    if a.shape != (n, n) or bandwidth < 0:
        raise ValueError("need a square matrix and a non-negative bandwidth")
    ab = np.zeros((bandwidth + 1, n))
    for k in range(min(bandwidth, n - 1) + 1):
        ab[k, : n - k] = np.diagonal(a, -k)
    return ab
