"""The compromise solver: the model design with the least weighted mismatch inside the limits.

For each candidate model fluid the solver evaluates the convex subproblem (see
:mod:`compromise.solving.problem`) on a grid of temperatures (and pressures, for a gas) exactly,
with
:class:`compromise.solving.qp.SmallQP`, polishes the best grid point with a bounded scalar search,
and
re-solves at the polished state with the fluid's source property models. Groups that are not
power products are handled by a general nonlinear solve started from the convex optimum of every
fluid and verified from several starts (:mod:`compromise.solving.nonlinear`).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import replace

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CompromiseError
from compromise.solving.design import Design, Evaluation, evaluator
from compromise.solving.diagnose import diagnose, relaxed_bound
from compromise.solving.grid import (
    N_TEMPERATURES,
    Engine,
    FluidStates,
    State,
    best_states,
    best_states_scenarios,
)
from compromise.solving.nonlinear import solve_nonlinear
from compromise.solving.problem import PROPERTY_NAMES, Problem, build_problem
from compromise.solving.result import (
    NOISE,
    RELAXATION,
    Alternative,
    BindingCost,
    Solution,
    design_of,
    pick_state,
    what_separates,
)


def find_optimum(
    case: Case,
    *,
    n_temperatures: int = N_TEMPERATURES,
    alternatives: bool = True,
) -> Solution:
    """Find the model design with the least weighted squared log-mismatch within every limit.

    This is the optimum alone; :func:`compromise.review.answer.solve` adds the scale effects
    and the words a user reads.

    Parameters
    ----------
    case : Case
        A loaded case (:func:`compromise.casefile.load.load_case`).
    n_temperatures : int
        Temperature grid size per fluid before the polish.
    alternatives : bool
        Also solve restricted to each fluid and each preferred ratio, and price binding rows.

    Returns
    -------
    Solution
    """
    if case.sediment is not None:  # the material and grain size are decisions too
        from compromise.solving.granular_answer import granular_optimum

        return granular_optimum(case, n_temperatures=n_temperatures, alternatives=alternatives)
    problem = build_problem(case)
    if problem.nonlinear_groups:
        return solve_nonlinear(
            case, problem, n_temperatures=n_temperatures, alternatives=alternatives
        )
    engine = Engine(problem)
    states = {f: FluidStates(case, f, problem.used_properties) for f in case.model.fluids}
    per_fluid = dict(
        zip(
            states,
            best_states(engine, list(states.values()), n_temperatures=n_temperatures),
            strict=True,
        )
    )
    feasible = [s for s in per_fluid.values() if s is not None]
    if not feasible:
        conflict = diagnose(problem, states)
        alts = (
            _alternatives(case, problem, states, per_fluid, None, n_temperatures)
            if alternatives
            else ()
        )
        return Solution(case, "infeasible", math.inf, None, None, {}, alts, conflict)
    best = pick_state(feasible, case)
    if not math.isfinite(best.objective):  # never shown as a result (issue 16)
        raise CompromiseError(
            f"{case.path}: the weighted mismatch of the best design is {best.objective}; "
            "check the groups' expressions and weights"
        )
    design = design_of(best)
    evaluate = evaluator(case)
    evaluation = evaluate(design)
    binding = _binding_costs(problem, engine, states, best, n_temperatures) if alternatives else {}
    alts = (
        _alternatives(case, problem, states, per_fluid, best, n_temperatures, evaluate)
        if alternatives
        else ()
    )
    return Solution(case, "optimal", best.objective, design, evaluation, binding, alts)


def _binding_costs(
    problem: Problem,
    engine: Engine,
    states: dict[str, FluidStates],
    best: State,
    n_temperatures: int,
) -> dict[str, BindingCost]:
    from compromise.solving.lsq import nnls

    p = states[best.fluid].exact_p(best.temperature, best.pressure)
    f, h, _, _ = engine.linear_terms(p[None])
    y = best.y
    slack = h[0] - problem.G @ y
    active = np.flatnonzero(np.abs(slack) <= 1e-8 * (1 + np.abs(h[0])))
    out: dict[str, BindingCost] = {}
    if active.size == 0:
        return out
    # multipliers: grad + G_A' lam + E' mu = 0, lam >= 0 (equality multipliers free)
    grad = engine.H @ y + f[0]
    E = np.vstack([problem.E, engine.extra]) if engine.extra.size else problem.E
    Ga = problem.G[active]
    M = np.vstack([Ga, E, -E]).T
    sol, _ = nnls(M, -grad)
    lam = sol[: active.size]
    shift = math.log(1.0 + RELAXATION)
    all_states = list(states.values())
    scenarios = []
    for i in active:
        hs = np.zeros(problem.G.shape[0])
        hs[i] = shift
        scenarios.append((hs, None))
    # the weighted mismatch is a sum of squares: at (numerically) zero no relaxation can lower
    # it, so the re-solves are skipped and every drop is exactly zero
    relaxed = (
        best_states_scenarios(engine, all_states, scenarios, n_temperatures=n_temperatures)
        if best.objective >= NOISE
        else [[best]] * len(scenarios)
    )
    for i, li, found in zip(active, lam, relaxed, strict=True):
        row = problem.rows[i]
        objs = [s.objective for s in found if s is not None]
        new = min(objs) if objs else best.objective
        key = row.key
        out[key] = BindingCost(
            key,
            row.condition,
            float(li),
            float(li * shift),
            max(0.0, best.objective - new),
            relaxed_bound(row, shift),
        )
    return out


def _ratio_conflict(problem: Problem, states: dict[str, FluidStates], ratio: float) -> list[str]:
    """The bounds that conflict with a fixed horizontal ratio (keys, ratio itself excluded)."""
    fixed = replace(
        problem,
        E=np.vstack([problem.E, [1.0, 0.0, 0.0]]),
        e0=np.append(problem.e0, math.log(ratio)),
        Q=np.vstack([problem.Q, np.zeros(len(PROPERTY_NAMES))]),
        exact_groups=(*problem.exact_groups, "horizontal_ratio"),
    )
    found = diagnose(fixed, states, relax=False).keys
    keys = [k for k in found if not k.startswith("model.horizontal_ratio")]
    return keys or ["the case's bounds"]


def _alternatives(
    case: Case,
    problem: Problem,
    states: dict[str, FluidStates],
    per_fluid: dict[str, State | None],
    best: State | None,
    n_temperatures: int,
    evaluate: Callable[[Design], Evaluation] | None = None,
) -> tuple[Alternative, ...]:
    from compromise.units import format_ratio

    evaluate = evaluate or evaluator(case)
    best_eval = evaluate(design_of(best)) if best else None
    alts: list[Alternative] = []
    for f, s in per_fluid.items():
        if s is None:
            alts.append(Alternative("fluid", f, None, math.inf, "infeasible"))
            continue
        d = design_of(s)
        alts.append(
            Alternative(
                "fluid",
                f,
                d,
                s.objective,
                what_separates(case, best_eval, evaluate(d)),
            )
        )
    if case.model.preferred_ratios:
        engine = Engine(problem, extra_E=np.array([[1.0, 0.0, 0.0]]))
        ratios = case.model.preferred_ratios
        per_ratio = best_states_scenarios(
            engine,
            list(states.values()),
            [(None, np.array([math.log(r)])) for r in ratios],
            n_temperatures=n_temperatures,
        )
        for r, found in zip(ratios, per_ratio, strict=True):
            cands = [c for c in found if c is not None]
            label = format_ratio(r)
            if not cands:
                lo, hi = case.model.horizontal_ratio
                if not lo * (1 - 1e-12) <= r <= hi * (1 + 1e-12):
                    why = "outside model.horizontal_ratio"
                else:
                    why = "infeasible: " + ", ".join(_ratio_conflict(problem, states, r))
                alts.append(Alternative("ratio", label, None, math.inf, why))
                continue
            c = pick_state(cands, case)
            d = design_of(c)
            alts.append(
                Alternative(
                    "ratio",
                    label,
                    d,
                    c.objective,
                    what_separates(case, best_eval, evaluate(d)),
                )
            )
    alts.sort(key=lambda a: (a.objective, a.kind, a.label))
    return tuple(alts)
