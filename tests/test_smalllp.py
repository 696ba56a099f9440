"""Least violation and feasibility of small linear systems (compromise.solving.smalllp).

Oracle: scipy's HiGHS linear-programming solver (``scipy.optimize.linprog``, method "highs";
Huangfu, Q., Hall, J. A. J. (2018), Parallelizing the dual revised simplex method,
*Mathematical Programming Computation* 10, 119-142), solving the elastic phase-1 programme
``min sum(s) + sum(t+ + t-)`` subject to ``G y - s <= h``, ``E y - t+ + t- = e``, ``s, t >= 0``.
Random systems in three variables, as in the diagnosis of an infeasible case, with rank-deficient
normals and many-right-hand-side batches included.
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy.optimize import linprog

from compromise.solving.smalllp import feasible, least_violation


def phase1_highs(G: np.ndarray, h: np.ndarray, E: np.ndarray, e: np.ndarray) -> float:
    m, q = G.shape[0], E.shape[0]
    n = 3 + m + 2 * q
    c = np.r_[np.zeros(3), np.ones(m + 2 * q)]
    A_ub = np.hstack([G, -np.eye(m), np.zeros((m, 2 * q))]) if m else None
    A_eq = np.hstack([E, np.zeros((q, m)), -np.eye(q), np.eye(q)]) if q else None
    bounds = [(None, None)] * 3 + [(0, None)] * (n - 3)
    r = linprog(
        c,
        A_ub=A_ub,
        b_ub=h if m else None,
        A_eq=A_eq,
        b_eq=e if q else None,
        bounds=bounds,
        method="highs",
    )
    assert r.status == 0
    return float(r.fun)


def random_system(rng: np.random.Generator, m: int, q: int, rank: int) -> tuple[np.ndarray, ...]:
    basis = rng.normal(size=(rank, 3))
    G = rng.normal(size=(m, rank)) @ basis
    E = rng.normal(size=(q, rank)) @ basis
    return G, rng.normal(size=m) * 2.0, E, rng.normal(size=q)


@pytest.mark.parametrize("seed", range(40))
def test_least_violation_equals_highs_phase1(seed: int) -> None:
    rng = np.random.default_rng(seed)
    m, q = int(rng.integers(0, 9)), int(rng.integers(0, 3))
    rank = int(rng.integers(1, 4))
    G, h, E, e = random_system(rng, m, q, rank)
    got = float(least_violation(G, h, E, e)[0])
    assert_allclose(got, phase1_highs(G, h, E, e), rtol=1e-7, atol=1e-8)
    assert feasible(G, h, E, e) == (phase1_highs(G, h, E, e) <= 1e-8)


def test_batch_of_right_hand_sides_matches_one_by_one() -> None:
    rng = np.random.default_rng(7)
    G, _, E, _ = random_system(rng, 7, 1, 3)
    H = rng.normal(size=(25, 7)) * 2.0
    e = rng.normal(size=(25, 1))
    batch = least_violation(G, H, E, e)
    one = [phase1_highs(G, H[i], E, e[i]) for i in range(25)]
    assert_allclose(batch, one, rtol=1e-7, atol=1e-8)


def test_empty_system_is_feasible_common_practice() -> None:
    assert feasible(np.zeros((0, 3)), np.zeros(0), np.zeros((0, 3)), np.zeros(0))


def test_large_systems_go_to_highs_and_agree() -> None:
    rng = np.random.default_rng(11)
    G, h, E, e = random_system(rng, 60, 1, 3)  # C(61, 3) vertices: past the enumeration cap
    assert_allclose(least_violation(G, h, E, e)[0], phase1_highs(G, h, E, e), rtol=1e-7, atol=1e-8)


def test_duplicate_normals_do_not_change_feasibility() -> None:
    rng = np.random.default_rng(5)
    G, h, E, e = random_system(rng, 6, 0, 3)
    many = np.vstack([G] + [G[:1]] * 300)  # 300 copies of one normal, looser and looser
    bounds = np.concatenate([h, h[0] + np.arange(1, 301)])
    assert feasible(many, bounds, E, e) == feasible(G, h, E, e)
