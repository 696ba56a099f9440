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


@pytest.mark.parametrize("name", CASES)
@pytest.mark.parametrize("fixed", [False, True])
def test_shared_state_rows_give_the_enumerated_optimum(name: str, fixed: bool) -> None:
    """``ReducedQP.values``: what depends on the state alone computed once per distinct state
    (``states``), then gathered for every (sample, state) pair, in any order, against the
    enumeration of active sets on the same subproblems."""
    case = load_case(ROOT / "cases" / f"{name}.toml")
    problem = build_problem(case)
    extra = np.array([[1.0, 0.0, 0.0]]) if fixed else None
    reduced, enumerated = ReducedQP(problem, extra), WeightedQP(problem, extra)
    rng = np.random.default_rng(17)
    S, U, N = 30, 25, 900
    W = problem.W * np.exp(rng.uniform(-np.log(10), np.log(10), (S, problem.A.shape[0])))
    fs = FluidStates(case, case.model.fluids[0], problem.used_properties)
    table = fs.p(np.sort(rng.uniform(*fs.t_range, U)), float(fs.pressures()[0]))
    ratios = case.model.preferred_ratios or (case.model.horizontal_ratio[1],)
    ex = np.log(np.array(ratios))[rng.integers(0, len(ratios), U)][:, None] if fixed else None
    sample, state = rng.integers(0, S, N), rng.integers(0, U, N)  # unordered pairs
    J1 = reduced.values(W, reduced.prepare(W), reduced.states(table, ex), sample, state)
    # the same subproblems, one sample at a time, by the enumeration
    J2 = np.empty(N)
    for s in range(S):
        rows = np.flatnonzero(sample == s)
        e = None if ex is None else ex[state[rows]][None]
        prep = tuple(x[s : s + 1] for x in enumerated.prepare(W))
        J2[rows] = enumerated.solve(W[s : s + 1], prep, table[state[rows]][None], e)[1][0]
    assert np.array_equal(np.isfinite(J1), np.isfinite(J2))
    ok = np.isfinite(J1)
    assert ok.sum() > 0.2 * N
    np.testing.assert_allclose(J1[ok], J2[ok], rtol=1e-9, atol=1e-12)


def test_each_sample_keeps_its_own_weights_with_several_fluids() -> None:
    """With two candidate fluids a batch of weight samples is laid out fluid by fluid; every
    sample's optimum must still be solved with its own weights: the batch gives what each
    sample gives alone (a river with a surrogate fluid added, so that weights matter)."""
    import tomllib

    from compromise.casefile.load import case_from_dict
    from compromise.explore.envelope import StateSpace

    data = tomllib.loads((ROOT / "cases" / "river_bend.toml").read_text(encoding="utf-8"))
    data["model"]["fluids"] = ["water", "glycerol-water 10%"]
    case = case_from_dict(data, path="river_two_fluids.toml")
    problem = build_problem(case)
    spaces = [StateSpace(FluidStates(case, f, problem.used_properties)) for f in case.model.fluids]
    factors = sensitivity.draw_factors(10.0, 8, 3, problem.A.shape[0])
    W = problem.W * factors
    free = sensitivity.weighted_qp(problem)
    fixed = sensitivity.weighted_qp(problem, np.array([[1.0, 0.0, 0.0]]))
    ratios = list(case.model.preferred_ratios)
    batch_J = sensitivity._unrestricted(free, W, spaces)[4]
    batch_R = sensitivity._restricted(free, fixed, W, spaces, ratios)
    assert len(set(np.round(batch_J, 6))) == W.shape[0]  # the weights do matter here
    for s in range(W.shape[0]):
        alone_J = sensitivity._unrestricted(free, W[s : s + 1], spaces)[4]
        alone_R = sensitivity._restricted(free, fixed, W[s : s + 1], spaces, ratios)
        np.testing.assert_allclose(batch_J[s], alone_J[0], rtol=1e-12)
        np.testing.assert_allclose(batch_R[s], alone_R[0], rtol=1e-12)
