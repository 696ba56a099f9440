"""The sort-based non-dominated filters (two and three axes) equal the pairwise definition.

Oracle: the definition itself (every pair compared, with the same relative tolerance), written
out here; random fronts with ties, near-ties and duplicates. Behaviour the trade-off explorer
relies on: a faster filter must keep exactly the same points.
"""

from __future__ import annotations

import numpy as np
import pytest

from compromise.explore.pareto import nondominated


def pairwise(values: np.ndarray, tol: float) -> np.ndarray:
    v = np.asarray(values, float)
    t = tol * (1.0 + np.abs(v))
    le = np.all(v[:, None, :] <= v[None, :, :] + t[None, :, :], axis=2)
    lt = np.any(v[:, None, :] < v[None, :, :] - t[None, :, :], axis=2)
    dominated = np.any(le & lt, axis=0)
    first = np.argmax(le & le.T, axis=0)
    return np.flatnonzero(~dominated & (first == np.arange(v.shape[0])))


@pytest.mark.parametrize("seed", range(20))
def test_two_axis_filter_equals_the_pairwise_definition(seed: int) -> None:
    rng = np.random.default_rng(seed)
    for _ in range(100):
        n = int(rng.integers(1, 80))
        v = rng.integers(0, 6, size=(n, 2)).astype(float) * rng.choice([1.0, 1e-10, 0.5])
        v += rng.normal(size=v.shape) * rng.choice([0.0, 1e-12, 1e-9, 1e-3])
        for tol in (1e-9, 1e-6, 0.3):
            np.testing.assert_array_equal(nondominated(v, tol), pairwise(v, tol))


@pytest.mark.parametrize("seed", range(20))
def test_three_axis_filter_equals_the_pairwise_definition(seed: int) -> None:
    rng = np.random.default_rng(100 + seed)
    for _ in range(60):
        n = int(rng.integers(1, 120))
        v = rng.integers(0, 5, size=(n, 3)).astype(float) * rng.choice([1.0, 1e-10, 0.5])
        v += rng.normal(size=v.shape) * rng.choice([0.0, 1e-12, 1e-9, 1e-3])
        for tol in (0.0, 1e-9, 1e-6, 0.3, 0.7):
            np.testing.assert_array_equal(nondominated(v, tol), pairwise(v, tol))


@pytest.mark.parametrize("seed", range(3))
def test_three_axis_filter_on_a_large_front(seed: int) -> None:
    """A few thousand points, most on a curved surface (non-dominated), some behind it."""
    rng = np.random.default_rng(seed)
    u = rng.uniform(0.0, 1.0, size=(1500, 2))
    on = np.column_stack([u[:, 0], u[:, 1], 2.0 - u.sum(axis=1) ** 0.5])
    behind = on[:600] + rng.uniform(0.0, 0.1, size=(600, 3))
    v = np.vstack([on, behind, on[:50]])[rng.permutation(2150)]
    for tol in (1e-9, 1e-3):
        np.testing.assert_array_equal(nondominated(v, tol), pairwise(v, tol))
