"""Banded Cholesky solver against numpy's dense LAPACK routines (the reference library)."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from analysis.banded import (
    NotPositiveDefiniteError,
    band_from_dense,
    cholesky_banded,
    solve_banded_spd,
)


def _random_spd(n: int, p: int, rng: np.random.Generator) -> np.ndarray:
    """Dense SPD matrix with half-bandwidth p: B B^T for a lower-banded B."""
    b = np.tril(rng.uniform(-1.0, 1.0, (n, n)))
    b[np.tril_indices(n, -p - 1)] = 0.0
    b[np.diag_indices(n)] = rng.uniform(0.5, 2.0, n)
    return b @ b.T


@settings(max_examples=60, deadline=None)
@given(
    n=st.integers(1, 40),
    p=st.integers(0, 4),
    m=st.integers(1, 6),
    stream=st.integers(0, 2**32 - 1),
)
def test_solution_matches_numpy_dense_solve(n: int, p: int, m: int, stream: int) -> None:
    rng = np.random.default_rng(stream)
    a = _random_spd(n, p, rng)
    b = rng.normal(size=(n, m))
    x = solve_banded_spd(band_from_dense(a, p), b)
    np.testing.assert_allclose(x, np.linalg.solve(a, b), rtol=1e-8, atol=1e-10)
    # one right-hand side as a vector
    x1 = solve_banded_spd(band_from_dense(a, p), b[:, 0])
    assert x1.shape == (n,)
    np.testing.assert_allclose(x1, x[:, 0], rtol=1e-12, atol=1e-14)


@settings(max_examples=30, deadline=None)
@given(n=st.integers(1, 25), p=st.integers(0, 3), stream=st.integers(0, 2**32 - 1))
def test_factor_matches_numpy_cholesky(n: int, p: int, stream: int) -> None:
    a = _random_spd(n, p, np.random.default_rng(stream))
    f = cholesky_banded(band_from_dense(a, p))
    ref = np.linalg.cholesky(a)
    np.testing.assert_allclose(f.lower, band_from_dense(ref, p), rtol=1e-10, atol=1e-12)
    assert f.n == n and f.bandwidth == p


def test_not_positive_definite_is_reported() -> None:
    a = np.array([[1.0, 2.0], [2.0, 1.0]])  # eigenvalues 3 and -1
    with pytest.raises(NotPositiveDefiniteError, match="not positive definite"):
        cholesky_banded(band_from_dense(a, 1))
    singular = np.array([[1.0, 1.0], [1.0, 1.0]])
    with pytest.raises(NotPositiveDefiniteError):
        cholesky_banded(band_from_dense(singular, 1))


def test_wrong_right_hand_side_size() -> None:
    f = cholesky_banded(band_from_dense(np.eye(3) * 2.0, 1))
    with pytest.raises(ValueError, match="rows"):
        f.solve(np.ones(4))
