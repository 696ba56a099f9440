"""The compromise solver: the model design with the least weighted mismatch inside the limits.

For each candidate model fluid the solver evaluates the convex subproblem (see
:mod:`compromise.problem`) on a grid of temperatures (and pressures, for a gas) exactly, with
:class:`compromise.qp.SmallQP`, polishes the best grid point with a bounded scalar search, and
re-solves at the polished state with the fluid's source property models. Groups that are not
power products are handled by a general nonlinear solve started from the convex optimum of every
fluid and verified from several starts (:mod:`compromise.nonlinear`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Any

import numpy as np

from compromise.case import Case
from compromise.design import Design, Evaluation, evaluate_design
from compromise.diagnose import Conflict, relaxed_bound
from compromise.grid import (  # noqa: F401  (re-exported: the grid engine is part of the API)
    N_PRESSURES,
    N_TEMPERATURES,
    N_ZOOM,
    REGULARISATION,
    ZOOM_ROUNDS,
    Engine,
    FluidStates,
    State,
    _grid,
    best_state,
    best_states,
)
from compromise.problem import PROPERTY_NAMES, Problem, build_problem

RELAXATION = 0.10  # "what a binding limit costs": relax it by 10 %


@dataclass(frozen=True)
class BindingCost:
    """What a binding row costs: the objective drop if its bound were relaxed by 10 %.

    Attributes
    ----------
    key : str
        Case-file key of the bound (``limits.discharge.max``).
    condition : str or None
        The condition in which it binds.
    multiplier : float
        Lagrange multiplier of the row in log space [-]: the objective falls by about
        ``multiplier x ln(1.1)`` for a 10 % relaxation.
    estimate : float
        ``multiplier x ln(1.1)`` [-].
    drop : float
        The objective drop found by re-solving with the relaxed bound [-].
    relaxed_bound : float
        The relaxed bound [SI].
    """

    key: str
    condition: str | None
    multiplier: float
    estimate: float
    drop: float
    relaxed_bound: float

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "condition": self.condition,
            "multiplier": self.multiplier,
            "estimate": self.estimate,
            "drop": self.drop,
            "relaxed_bound": self.relaxed_bound,
        }


@dataclass(frozen=True)
class Alternative:
    """The best design under one restriction (one fluid, or one preferred ratio)."""

    kind: str  # "fluid" or "ratio"
    label: str
    design: Design | None
    objective: float  # inf when infeasible
    separator: str  # the group or limit that most separates it from the best design

    @property
    def feasible(self) -> bool:
        """Whether any design satisfies the case under this restriction."""
        return self.design is not None

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "kind": self.kind,
            "label": self.label,
            "design": self.design.to_dict() if self.design else None,
            "objective": self.objective if math.isfinite(self.objective) else None,
            "feasible": self.feasible,
            "separator": self.separator,
        }


@dataclass(frozen=True)
class Solution:
    """The solver's answer for a case.

    Attributes
    ----------
    status : str
        ``"optimal"`` or ``"infeasible"``.
    objective : float
        Weighted sum of squared log-mismatches [-] (inf when infeasible).
    design : Design or None
    evaluation : Evaluation or None
        The design in every condition (groups, quantities, limits).
    binding : dict
        :class:`BindingCost` of every binding row, by case-file key.
    alternatives : tuple of Alternative
    conflict : Conflict or None
    """

    case: Case = field(repr=False)
    status: str
    objective: float
    design: Design | None
    evaluation: Evaluation | None
    binding: dict[str, BindingCost]
    alternatives: tuple[Alternative, ...]
    conflict: Conflict | None = None
    effects: Any = None  # compromise.effects.Effects of the design, when assessed

    @property
    def feasible(self) -> bool:
        """Whether the case has a design that satisfies every limit."""
        return self.status == "optimal"

    def to_dict(self) -> dict[str, Any]:
        """Plain data following the output contract of ``compromise solve --json``."""
        from compromise.report import CAUTION

        out: dict[str, Any] = {
            "title": self.case.title,
            "status": self.status,
            "caution": " ".join(CAUTION.split()),
        }
        if not self.feasible or self.evaluation is None or self.design is None:
            out["objective"] = None
            out.update(self.conflict.to_dict() if self.conflict else {})
            out["alternatives"] = [a.to_dict() for a in self.alternatives]
            return out
        ev = self.evaluation
        first = ev.conditions[0]
        worst = ev.worst_limits()
        out["objective"] = self.objective
        out["design"] = self.design.to_dict()
        out["groups"] = {k: v.to_dict() for k, v in first.groups.items()}
        out["limits"] = {k: {**v.to_dict(), "condition": c} for k, (c, v) in worst.items()}
        out["quantities"] = {k: v.to_dict() for k, v in first.quantities.items()}
        out["binding"] = {k: v.to_dict() for k, v in self.binding.items()}
        out["alternatives"] = [a.to_dict() for a in self.alternatives]
        if len(ev.conditions) > 1:
            out["conditions"] = {c.name: c.to_dict() for c in ev.conditions}
        if self.effects is not None:
            out["effects"] = self.effects.to_dict()
        return out

    def to_frame(self) -> Any:
        """The groups of every condition as a pandas DataFrame."""
        import pandas as pd

        if self.evaluation is None:
            return pd.DataFrame()
        rows = []
        for c in self.evaluation.conditions:
            for name, g in c.groups.items():
                rows.append({"condition": c.name, "group": name, **g.to_dict()})
        return pd.DataFrame(rows)


TIE = 1e-12  # [-] objectives closer than this (plus 1e-9 relative) count as equal


def _pick(states: list[State], case: Case) -> State:
    """The best state; among equal objectives, the fluid listed first in the case."""
    low = min(s.objective for s in states)
    tied = [s for s in states if s.objective <= low + TIE + 1e-9 * abs(low)]
    return min(tied, key=lambda s: case.model.fluids.index(s.fluid))


def _design(state: State) -> Design:
    x, z, v = (math.exp(float(a)) for a in state.y)
    return Design(state.fluid, state.temperature, state.pressure, x, z, v)


def solve(
    case: Case,
    *,
    n_temperatures: int = N_TEMPERATURES,
    alternatives: bool = True,
    enforce_thresholds: bool = False,
    effects: bool = True,
) -> Solution:
    """Find the model design with the least weighted squared log-mismatch within every limit.

    Parameters
    ----------
    case : Case
        A loaded case (:func:`compromise.case.load_case`).
    n_temperatures : int
        Temperature grid size per fluid before the polish.
    alternatives : bool
        Also solve restricted to each fluid and each preferred ratio, and price binding rows.
    enforce_thresholds : bool
        Turn the scale-effect thresholds of the case's phenomena into bounds on model values.
    effects : bool
        Assess the design's scale effects (regimes, thresholds, consequences).

    Returns
    -------
    Solution
    """
    if enforce_thresholds:
        from compromise.effects import with_thresholds

        case = with_thresholds(case)
    sol = _solve(case, n_temperatures, alternatives)
    if effects and sol.evaluation is not None:
        from compromise.effects import assess

        sol = replace(sol, effects=assess(case, sol.evaluation))
    return sol


def _solve(case: Case, n_temperatures: int, alternatives: bool) -> Solution:
    problem = build_problem(case)
    if problem.nonlinear_groups:
        from compromise.nonlinear import solve_nonlinear

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
        from compromise.diagnose import diagnose

        conflict = diagnose(problem, states)
        alts = (
            _alternatives(case, problem, states, per_fluid, None, n_temperatures)
            if alternatives
            else ()
        )
        return Solution(case, "infeasible", math.inf, None, None, {}, alts, conflict)
    best = _pick(feasible, case)
    design = _design(best)
    evaluation = evaluate_design(case, design)
    binding = (
        _binding_costs(problem, engine, states[best.fluid], best, n_temperatures)
        if alternatives
        else {}
    )
    alts = (
        _alternatives(case, problem, states, per_fluid, best, n_temperatures)
        if alternatives
        else ()
    )
    return Solution(case, "optimal", best.objective, design, evaluation, binding, alts)


def _binding_costs(
    problem: Problem, engine: Engine, fs: FluidStates, best: State, n_temperatures: int
) -> dict[str, BindingCost]:
    from scipy.optimize import nnls

    p = fs.exact_p(best.temperature, best.pressure)
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
    all_states = [
        fs if g == fs.name else FluidStates(problem.case, g, problem.used_properties)
        for g in problem.case.model.fluids
    ]
    for i, li in zip(active, lam, strict=True):
        row = problem.rows[i]
        hs = np.zeros(problem.G.shape[0])
        hs[i] = shift
        objs = [
            s.objective
            for s in best_states(engine, all_states, n_temperatures=n_temperatures, h_shift=hs)
            if s is not None
        ]
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


def _separator(case: Case, best: Evaluation | None, alt: Evaluation) -> str:
    """The group whose weighted mismatch grows most from the best design to an alternative,
    or the limit that binds in the alternative only."""
    if best is None:
        return ""
    diffs: dict[str, float] = {}
    for cb, ca in zip(best.conditions, alt.conditions, strict=True):
        for g, gv in ca.groups.items():
            if gv.exact:
                continue
            d = cb.weight * gv.weight * (gv.mismatch**2 - cb.groups[g].mismatch ** 2)
            diffs[g] = diffs.get(g, 0.0) + d
    if not diffs:
        return ""
    g = max(diffs, key=lambda k: (diffs[k], k))
    if diffs[g] <= 1e-12:
        binding_alt = {k for k, (_, v) in alt.worst_limits().items() if v.binding}
        binding_best = {k for k, (_, v) in best.worst_limits().items() if v.binding}
        new = sorted(binding_alt - binding_best)
        return f"limits.{new[0]}" if new else ""
    return f"groups.{g}"


def _ratio_conflict(problem: Problem, states: dict[str, FluidStates], ratio: float) -> list[str]:
    """The bounds that conflict with a fixed horizontal ratio (keys, ratio itself excluded)."""
    from compromise.diagnose import diagnose

    fixed = replace(
        problem,
        E=np.vstack([problem.E, [1.0, 0.0, 0.0]]),
        e0=np.append(problem.e0, math.log(ratio)),
        Q=np.vstack([problem.Q, np.zeros(len(PROPERTY_NAMES))]),
        exact_groups=(*problem.exact_groups, "horizontal_ratio"),
    )
    keys = [k for k in diagnose(fixed, states).keys if not k.startswith("model.horizontal_ratio")]
    return keys or ["the case's bounds"]


def _alternatives(
    case: Case,
    problem: Problem,
    states: dict[str, FluidStates],
    per_fluid: dict[str, State | None],
    best: State | None,
    n_temperatures: int,
) -> tuple[Alternative, ...]:
    from compromise.units import format_ratio

    best_eval = evaluate_design(case, _design(best)) if best else None
    alts: list[Alternative] = []
    for f, s in per_fluid.items():
        if s is None:
            alts.append(Alternative("fluid", f, None, math.inf, "infeasible"))
            continue
        d = _design(s)
        alts.append(
            Alternative(
                "fluid", f, d, s.objective, _separator(case, best_eval, evaluate_design(case, d))
            )
        )
    if case.model.preferred_ratios:
        engine = Engine(problem, extra_E=np.array([[1.0, 0.0, 0.0]]))
        for r in case.model.preferred_ratios:
            cands = [
                c
                for c in best_states(
                    engine,
                    list(states.values()),
                    n_temperatures=n_temperatures,
                    extra_e=np.array([math.log(r)]),
                )
                if c is not None
            ]
            label = format_ratio(r)
            if not cands:
                lo, hi = case.model.horizontal_ratio
                if not lo * (1 - 1e-12) <= r <= hi * (1 + 1e-12):
                    why = "outside model.horizontal_ratio"
                else:
                    why = "infeasible: " + ", ".join(_ratio_conflict(problem, states, r))
                alts.append(Alternative("ratio", label, None, math.inf, why))
                continue
            c = _pick(cands, case)
            d = _design(c)
            alts.append(
                Alternative(
                    "ratio",
                    label,
                    d,
                    c.objective,
                    _separator(case, best_eval, evaluate_design(case, d)),
                )
            )
    alts.sort(key=lambda a: (a.objective, a.kind, a.label))
    return tuple(alts)
