"""The sensitivity's subproblems solved in the null space of their equality rows.

``compromise.explore.reduced_qp.ReducedQP`` (closed forms in one or two free variables) is
checked against the enumeration of active sets (``WeightedQP``), an independent exact method
for the same strictly convex QPs (Nocedal & Wright 2006, ch. 16, from memory: a strictly convex
QP has one minimiser), on every bundled case it applies to, at random weights and fluid
states. And the user-visible contract of the issue that introduced it: with a fixed seed the
sensitivity's winners, ties and fluid shares are the enumeration's, sample by sample, also
where candidates that match every weighted group are settled at zero without being solved.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

import compromise.explore.sensitivity as sensitivity
from compromise.casefile.load import load_case
from compromise.explore.reduced_qp import ReducedQP
from compromise.explore.sensitivity import WeightedQP
from compromise.solving.grid import FluidStates
from compromise.solving.problem import build_problem

ROOT = Path(__file__).resolve().parents[1]
CASES = ["river_bend", "wind_tunnel", "culvert_si", "pipe_rig", "spillway", "towing_tank"]


@pytest.mark.parametrize("name", CASES)
@pytest.mark.parametrize("fixed", [False, True])
def test_reduced_optimum_equals_the_enumerated_one(name: str, fixed: bool) -> None:
    case = load_case(ROOT / "cases" / f"{name}.toml")
    problem = build_problem(case)
    extra = np.array([[1.0, 0.0, 0.0]]) if fixed else None
    reduced, enumerated = ReducedQP(problem, extra), WeightedQP(problem, extra)
    assert reduced.supported
    rng = np.random.default_rng(11)
    S, R = 40, 16
    W = problem.W * np.exp(rng.uniform(-np.log(10), np.log(10), (S, problem.A.shape[0])))
    fs = FluidStates(case, case.model.fluids[0], problem.used_properties)
    lo, hi = fs.t_range
    T = rng.uniform(lo, hi, (S, R))
    P = float(fs.pressures()[0])
    p = fs.p(T.ravel(), P).reshape(S, R, -1)
    ratios = case.model.preferred_ratios or (case.model.horizontal_ratio[1],)
    ex = None
    if fixed:
        ex = np.log(np.array(ratios))[rng.integers(0, len(ratios), (S, R))][..., None]
    y1, J1 = reduced.solve(W, reduced.prepare(W), p, ex)
    y2, J2 = enumerated.solve(W, enumerated.prepare(W), p, ex)
    assert np.array_equal(np.isfinite(J1), np.isfinite(J2))
    both = np.isfinite(J1)
    assert both.sum() > 0.2 * both.size  # the comparison is not empty
    np.testing.assert_allclose(J1[both], J2[both], rtol=1e-9, atol=1e-12)
    np.testing.assert_allclose(y1[both], y2[both], rtol=1e-7, atol=1e-9)


def _winners(result: sensitivity.Sensitivity) -> tuple:
    return (
        result.winners.tolist(),
        result.best_sets.tolist(),
        result.nominal,
        result.nominal_tied,
        result.tied_samples,
        [(c.label, c.wins, c.ties) for c in result.candidates],
        sorted(result.fluid_shares.items()),
    )


@pytest.mark.parametrize(
    ("name", "samples"), [("river_bend", 1500), ("wind_tunnel", 300), ("pipe_rig", 300)]
)
def test_sensitivity_winners_equal_the_enumerations(
    name: str, samples: int, monkeypatch: pytest.MonkeyPatch
) -> None:
    """The reduced solver and the settled candidates (tied at zero in every sample, not
    re-solved) against the enumeration solving every candidate of every sample."""
    case = load_case(ROOT / "cases" / f"{name}.toml")
    fast = sensitivity.weight_sensitivity(case, samples=samples, seed=0)
    monkeypatch.setattr(sensitivity, "weighted_qp", WeightedQP)
    monkeypatch.setattr(sensitivity, "ZERO_BAND", -1.0)  # nothing settled
    slow = sensitivity.weight_sensitivity(case, samples=samples, seed=0)
    assert _winners(fast) == _winners(slow)
    if name != "river_bend":  # every candidate there matches every weighted group
        assert fast.tied_samples == samples


def test_no_free_variable_left_is_the_one_point_if_feasible() -> None:
    """Froude kept, the distortion fixed and the ratio fixed: nothing is free (k = 0), and the
    one point is the enumeration's answer where it is feasible (and infeasible alike)."""
    import tomllib

    from compromise.casefile.load import case_from_dict

    data = tomllib.loads((ROOT / "cases" / "river_bend.toml").read_text(encoding="utf-8"))
    data["model"]["distortion"] = 4
    case = case_from_dict(data, path="river_fixed_distortion.toml")
    problem = build_problem(case)
    extra = np.array([[1.0, 0.0, 0.0]])
    reduced, enumerated = ReducedQP(problem, extra), WeightedQP(problem, extra)
    assert reduced.k == 0
    rng = np.random.default_rng(5)
    S, R = 20, 12
    W = problem.W * np.exp(rng.uniform(-np.log(10), np.log(10), (S, problem.A.shape[0])))
    fs = FluidStates(case, case.model.fluids[0], problem.used_properties)
    p = fs.p(rng.uniform(*fs.t_range, S * R), float(fs.pressures()[0])).reshape(S, R, -1)
    ex = np.log(rng.uniform(1 / 200, 1 / 40, (S, R, 1)))
    y1, J1 = reduced.solve(W, reduced.prepare(W), p, ex)
    y2, J2 = enumerated.solve(W, enumerated.prepare(W), p, ex)
    assert np.array_equal(np.isfinite(J1), np.isfinite(J2))
    assert 0 < np.isfinite(J1).sum() < J1.size  # both outcomes occur
    ok = np.isfinite(J1)
    np.testing.assert_allclose(J1[ok], J2[ok], rtol=1e-9)
    np.testing.assert_allclose(y1[ok], y2[ok], rtol=1e-9, atol=1e-12)
