"""The two exact QP modes agree: enumerated active sets and the dual active-set method.

Oracle for the large-row mode: the enumeration of every candidate active set (exact for a
strictly convex QP, see compromise.solving.qp) run on the same subproblems; the dual method is
Goldfarb & Idnani (1983), Math. Programming 27, 1-33, as packaged in ``quadprog``.
"""

from __future__ import annotations

import copy
from typing import Any

import numpy as np
import pytest
from numpy.testing import assert_allclose

import compromise.solving.qp as qp
from compromise.casefile.load import case_from_dict
from compromise.solving.optimum import find_optimum


def test_dual_active_set_equals_enumeration_on_random_subproblems(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    rng = np.random.default_rng(3)
    A = rng.normal(size=(3, 3))
    H = A @ A.T + 0.5 * np.eye(3)
    G = rng.normal(size=(45, 3))
    E = rng.normal(size=(1, 3))
    f = rng.normal(size=(40, 3))
    h = rng.normal(size=(40, 45)) + rng.uniform(0.0, 3.0, size=(40, 1))  # some infeasible
    e = rng.normal(size=(40, 1))
    dual = qp.SmallQP(H, G, E)
    assert not dual.enumerated
    monkeypatch.setattr(qp, "MAX_ENUMERATED_ROWS", 100)
    enum = qp.SmallQP(H, G, E)
    assert enum.enumerated
    a, b = dual.solve(f, h, e), enum.solve(f, h, e)
    assert a.feasible.any() and (~a.feasible).any()
    np.testing.assert_array_equal(a.feasible, b.feasible)
    assert_allclose(a.y[a.feasible], b.y[b.feasible], rtol=1e-8, atol=1e-9)
    assert_allclose(a.objective[a.feasible], b.objective[b.feasible], rtol=1e-9, atol=1e-12)


CASE: dict[str, Any] = {
    "prototype": {
        "fluid": "water",
        "temperature": "15 degC",
        "quantities": {
            "depth": {"value": "2 m", "axis": "vertical"},
            "reach": "1500 m",
            "velocity": "1.5 m/s",
        },
    },
    "groups": {"froude": {"weight": 10}, "reynolds": {"weight": 1}},
    "model": {
        "horizontal_ratio": {"min": "1:1000", "max": "1:10"},
        "distortion": {"min": 1, "max": 6},
        "fluids": ["water"],
        "temperature": {"min": "10 degC", "max": "30 degC"},
    },
    "limits": {"reach": {"max": "40 m"}, "depth": {"min": "2 cm"}},
}


def test_a_case_with_fifty_distinct_limit_normals(monkeypatch: pytest.MonkeyPatch) -> None:
    data = copy.deepcopy(CASE)
    for k in range(50):  # lengths that scale as X^a Y^(1-a): fifty distinct normals
        a = k / 49
        name = f"blend_{k}"
        data["prototype"]["quantities"][name] = {
            "value": "10 m",
            "scales_as": f"horizontal**{a:.6f} * vertical**{1 - a:.6f}",
        }
        data["limits"][name] = {"max": f"{0.15 + 0.001 * k:.3f} m"}
    case = case_from_dict(data)
    dual = find_optimum(case, alternatives=False)
    monkeypatch.setattr(qp, "MAX_ENUMERATED_ROWS", 200)
    enum = find_optimum(case, alternatives=False)
    assert dual.design is not None and enum.design is not None
    assert_allclose(dual.design.logs, enum.design.logs, rtol=1e-7, atol=1e-8)
    assert_allclose(dual.objective, enum.objective, rtol=1e-8)


def test_other_hessians_give_what_a_new_solver_gives() -> None:
    """``SmallQP.with_hessians`` reuses the candidate active sets of the rows and inverts the
    KKT systems of many Hessians in one batch (the granular sensitivity's weight samples): every
    answer and multiplier is the one a solver built afresh for that Hessian gives, bit for bit
    (common practice: a batched inverse is the same LAPACK solve per matrix)."""
    rng = np.random.default_rng(8)
    g = rng.normal(size=(1, 4))
    G = np.vstack([rng.normal(size=(7, 4)), g, -g])  # the last two: a slab, empty when h7 + h8 < 0
    E = rng.normal(size=(1, 4))
    Hs = []
    for _ in range(5):
        A = rng.normal(size=(4, 4))
        Hs.append(A @ A.T + 0.3 * np.eye(4))
    f = rng.normal(size=(30, 4))
    h = rng.normal(size=(30, 9)) + rng.uniform(0.0, 3.0, size=(30, 1))
    h[:10, 8] = -h[:10, 7] - 0.5
    e = rng.normal(size=(30, 1))
    shared = qp.SmallQP(Hs[0], G, E).with_hessians(np.array(Hs))
    for H, other in zip(Hs, shared, strict=True):
        fresh = qp.SmallQP(H, G, E)
        a, b = fresh.solve(f, h, e), other.solve(f, h, e)
        assert a.feasible.any() and (~a.feasible).any()
        np.testing.assert_array_equal(a.y, b.y)
        np.testing.assert_array_equal(a.objective, b.objective)
        i = int(np.flatnonzero(a.feasible)[0])
        np.testing.assert_array_equal(
            fresh.multipliers(int(a.active[i]), f[i], h[i], e[i]),
            other.multipliers(int(b.active[i]), f[i], h[i], e[i]),
        )
