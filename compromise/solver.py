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
from compromise.errors import CaseError
from compromise.problem import PROPERTY_NAMES, Problem, Row, build_problem
from compromise.qp import QPBatch, SmallQP

N_TEMPERATURES = 36
N_PRESSURES = 7
N_ZOOM = 33  # temperatures per polish round
N_ZOOM_PRESSURE = 9  # pressures per polish round (source models, not splines)
ZOOM_ROUNDS = 7  # 16-fold per round: ~1e-8 K from a ~1 K grid step
REGULARISATION = 1e-10  # relative weight of the tie-break toward the largest, least distorted model
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
        return {"condition": self.condition, "multiplier": self.multiplier,
                "estimate": self.estimate, "drop": self.drop,
                "relaxed_bound": self.relaxed_bound}


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
        return {"kind": self.kind, "label": self.label,
                "design": self.design.to_dict() if self.design else None,
                "objective": self.objective if math.isfinite(self.objective) else None,
                "feasible": self.feasible, "separator": self.separator}


@dataclass(frozen=True)
class Conflict:
    """Why a case is infeasible: limits that cannot hold together and how far each must move.

    Attributes
    ----------
    keys : tuple of str
        Case-file keys of a smallest set of bounds that cannot hold together.
    relaxation : dict
        For each key, the bound that would make the case feasible on its own [SI]; ``None``
        where relaxing that bound alone cannot help.
    conditions : dict
        For each key, the condition that makes it bind (or ``None``).
    """

    keys: tuple[str, ...]
    relaxation: dict[str, float | None]
    conditions: dict[str, str | None] = field(default_factory=dict)

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {"conflict": list(self.keys), "relaxation": dict(self.relaxation),
                "conditions": dict(self.conditions)}


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
        out: dict[str, Any] = {"title": self.case.title, "status": self.status}
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


# --------------------------------------------------------------------------------------------
# the grid engine


class Engine:
    """Solves the convex subproblems of a problem for batches of fluid states.

    Parameters
    ----------
    problem : Problem
    extra_E, extra_e : optional
        Extra equality rows ``extra_E . y = extra_e`` (used to fix a preferred ratio).
    """

    def __init__(self, problem: Problem, extra_E: np.ndarray | None = None) -> None:
        self.problem = problem
        A, W = problem.A, problem.W
        H = 2.0 * (A.T * W) @ A
        m = problem.case.model
        scale = max(1.0, float(np.trace(H)) / 3.0)
        self.eps = REGULARISATION * scale
        # anchor of the tie-break: the largest model, the least distortion, Froude velocity
        x0 = math.log(m.horizontal_ratio[1])
        z0 = x0 + math.log(m.distortion[0])
        self.y0 = np.array([x0, z0, 0.5 * z0])
        self.H = H + 2.0 * self.eps * np.eye(3)
        self.extra = np.zeros((0, 3)) if extra_E is None else np.atleast_2d(extra_E)
        E = np.vstack([problem.E, self.extra])
        self.qp = SmallQP(self.H, problem.G, E)

    def linear_terms(
        self, p: np.ndarray, h_shift: np.ndarray | None = None, extra_e: np.ndarray | None = None
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """``f``, ``h``, ``e`` and the objective constant for property log-ratios ``p`` (N, 6)."""
        pr = self.problem
        p = np.atleast_2d(p)
        Bp = p @ pr.B.T  # (N, k)
        f = 2.0 * (Bp * pr.W) @ pr.A - 2.0 * self.eps * self.y0
        const = np.sum(pr.W * Bp**2, axis=1) + self.eps * float(self.y0 @ self.y0)
        h, e = pr.rhs(p)
        if h_shift is not None:
            h = h + h_shift
        if self.extra.shape[0]:
            ex_e = np.zeros((p.shape[0], self.extra.shape[0])) if extra_e is None else (
                np.broadcast_to(extra_e, (p.shape[0], self.extra.shape[0])))
            e = np.hstack([e, ex_e])
        return f, h, e, const

    def solve(
        self, p: np.ndarray, h_shift: np.ndarray | None = None, extra_e: np.ndarray | None = None
    ) -> tuple[QPBatch, np.ndarray]:
        """Solve for each row of ``p``; returns the batch and the true objectives (N,)."""
        f, h, e, _ = self.linear_terms(p, h_shift, extra_e)
        batch = self.qp.solve(f, h, e)
        return batch, self.true_objective(batch.y, np.atleast_2d(p))

    def true_objective(self, y: np.ndarray, p: np.ndarray) -> np.ndarray:
        """Weighted sum of squared log-mismatches (without the tie-break term)."""
        pr = self.problem
        r = y @ pr.A.T + p @ pr.B.T
        out = np.sum(pr.W * r**2, axis=1)
        return np.where(np.all(np.isfinite(y), axis=1), out, np.inf)


@dataclass(frozen=True)
class State:
    """A model fluid state and its optimal decision log-ratios."""

    fluid: str
    temperature: float
    pressure: float
    y: np.ndarray
    objective: float


def _grid(lo: float, hi: float, n: int, log: bool = False) -> np.ndarray:
    if hi <= lo:
        return np.array([lo])
    return np.geomspace(lo, hi, n) if log else np.linspace(lo, hi, n)


class FluidStates:
    """Property log-ratios of one model fluid over the case's temperature (and pressure) range."""

    def __init__(self, case: Case, fluid: str, used: frozenset[str]) -> None:
        from compromise.fluids import get_fluid

        self.case = case
        self.fluid = get_fluid(fluid)
        self.name = self.fluid.name
        proto = get_fluid(case.fluid).properties(case.temperature, case.pressure)
        from compromise.problem import property_environment

        penv = property_environment(proto)
        # gravity is the same in model and prototype: its log-ratio is zero
        self.proto_log = np.array([0.0 if n == "g" else math.log(penv[n]) if penv[n] > 0
                                   else np.nan for n in PROPERTY_NAMES])
        self.used = np.array([n in used for n in PROPERTY_NAMES])
        self.gas = self.fluid.phase == "gas"
        m = case.model
        self.t_range = m.temperature
        missing = [n for n in PROPERTY_NAMES[:-1]
                   if n in used and not np.isfinite(self._p(np.array([m.temperature[0]]),
                                                            m.pressure[0])[0][PROPERTY_NAMES.index(n)])]
        if missing:
            raise CaseError(f"'{self.name}' has no {missing[0]} (as the groups or limits need)",
                            file=case.path, key="model.fluids")

    def _p(self, T: np.ndarray, P: float) -> np.ndarray:
        tab = self.fluid.table(P)(np.asarray(T, dtype=float))
        logs = np.column_stack([np.log(tab[k]) if k != "g" else np.zeros(len(T))
                                for k in ("rho", "mu", "nu", "sigma", "c", "g")])
        p = logs - self.proto_log
        p[:, ~self.used] = 0.0
        return p

    def p(self, T: np.ndarray, P: float) -> np.ndarray:
        """Property log-ratios (N, 6) at temperatures ``T`` [K] and pressure ``P`` [Pa]."""
        return self._p(np.atleast_1d(T), P)

    def exact_p(self, T: float, P: float) -> np.ndarray:
        """Property log-ratios from the source models (not the splines)."""
        from compromise.problem import property_environment

        env = property_environment(self.fluid.properties(T, P))
        with np.errstate(invalid="ignore", divide="ignore"):
            logs = np.array([0.0 if n == "g" else math.log(env[n]) if env[n] > 0 else np.nan
                             for n in PROPERTY_NAMES])
        p = logs - self.proto_log
        p[~self.used] = 0.0
        return p

    def pressures(self) -> np.ndarray:
        """The pressure grid [Pa] (one value for a liquid)."""
        lo, hi = self.case.model.pressure
        return _grid(lo, hi, N_PRESSURES, log=True) if self.gas else np.array([lo])


def best_state(
    engine: Engine,
    fs: FluidStates,
    *,
    n_temperatures: int = N_TEMPERATURES,
    h_shift: np.ndarray | None = None,
    extra_e: np.ndarray | None = None,
    polish: bool = True,
) -> State | None:
    """The optimal state of one fluid: grid over temperature (and pressure), then polish.

    The polish zooms: a fine grid of :data:`N_ZOOM` temperatures over the two grid cells around
    the best point, solved in one batch, repeated :data:`ZOOM_ROUNDS` times (each round shrinks
    the interval about 16-fold). Unlike a parabolic line search it is not misled by the kinks
    where the active set changes. For a gas, log-pressure is zoomed the same way with the
    source property models.
    """
    t_lo, t_hi = fs.t_range
    T = _grid(t_lo, t_hi, n_temperatures)
    best: tuple[float, float, float] | None = None  # (objective, T, P)
    for P in fs.pressures():
        _, obj = engine.solve(fs.p(T, P), h_shift, extra_e)
        k = int(np.argmin(obj))
        if np.isfinite(obj[k]) and (best is None or obj[k] < best[0] - 1e-15):
            best = (float(obj[k]), float(T[k]), float(P))
    if best is None:
        return None
    obj0, t_best, p_best = best
    Ps = fs.pressures()
    for _ in range(2 if fs.gas and Ps.size > 1 else 1):
        if polish and len(T) > 1:
            half = T[1] - T[0]
            for _ in range(ZOOM_ROUNDS):
                Tz = np.linspace(max(t_lo, t_best - half), min(t_hi, t_best + half), N_ZOOM)
                _, obj = engine.solve(fs.p(Tz, p_best), h_shift, extra_e)
                k = int(np.argmin(obj))
                if obj[k] < obj0:
                    obj0, t_best = float(obj[k]), float(Tz[k])
                half = 2.0 * (Tz[1] - Tz[0])
        if polish and fs.gas and Ps.size > 1:
            half = math.log(Ps[1] / Ps[0])
            lp_lo, lp_hi = math.log(Ps[0]), math.log(Ps[-1])
            for _ in range(ZOOM_ROUNDS):
                lp = np.linspace(max(lp_lo, math.log(p_best) - half),
                                 min(lp_hi, math.log(p_best) + half), N_ZOOM_PRESSURE)
                pz = np.array([fs.exact_p(t_best, math.exp(v)) for v in lp])
                _, obj = engine.solve(pz, h_shift, extra_e)
                k = int(np.argmin(obj))
                if obj[k] < obj0:
                    obj0, p_best = float(obj[k]), math.exp(float(lp[k]))
                half = 2.0 * (lp[1] - lp[0])
    step = (T[1] - T[0]) / 16.0**ZOOM_ROUNDS if len(T) > 1 else 0.0
    return _finish(engine, fs, t_best, p_best, step, h_shift, extra_e)


def _finish(
    engine: Engine,
    fs: FluidStates,
    t: float,
    P: float,
    step: float,
    h_shift: np.ndarray | None,
    extra_e: np.ndarray | None,
) -> State | None:
    """Re-solve at the polished state with the source property models (not the splines).

    Where the splines (relative error ~1e-8) put the state just inside a bound that the source
    models put just outside, step back into the feasible side in growing steps.
    """
    batch, obj = engine.solve(fs.exact_p(t, P)[None], h_shift, extra_e)
    if batch.feasible[0]:
        return State(fs.name, t, P, batch.y[0], float(obj[0]))
    lo, hi = fs.t_range
    for k in range(1, 12):
        cands = [c for c in (t - step * 4.0**k, t + step * 4.0**k) if lo <= c <= hi]
        if not cands:
            break
        ps = np.array([fs.exact_p(c, P) for c in cands])
        batch, obj = engine.solve(ps, h_shift, extra_e)
        if batch.feasible.any():
            j = int(np.argmin(obj))
            return State(fs.name, cands[j], P, batch.y[j], float(obj[j]))
    return None


def best_states(
    engine: Engine,
    fss: list[FluidStates],
    *,
    n_temperatures: int = N_TEMPERATURES,
    h_shift: np.ndarray | None = None,
    extra_e: np.ndarray | None = None,
) -> list[State | None]:
    """:func:`best_state` for several fluids, batching the liquids into shared solves.

    Every liquid's temperature grid goes into one batched solve, and so does every zoom round;
    gases with a pressure range take the one-fluid path.
    """
    out: list[State | None] = [None] * len(fss)
    liquids = [i for i, fs in enumerate(fss) if fs.pressures().size == 1]
    for i, fs in enumerate(fss):
        if i not in liquids:
            out[i] = best_state(engine, fs, n_temperatures=n_temperatures, h_shift=h_shift,
                                extra_e=extra_e)
    if not liquids:
        return out
    P = {i: float(fss[i].pressures()[0]) for i in liquids}
    grids = {i: _grid(*fss[i].t_range, n_temperatures) for i in liquids}
    p_all = np.vstack([fss[i].p(grids[i], P[i]) for i in liquids])
    _, obj = engine.solve(p_all, h_shift, extra_e)
    best: dict[int, list[float]] = {}
    half: dict[int, float] = {}
    start = 0
    for i in liquids:
        n = grids[i].size
        o = obj[start:start + n]
        start += n
        k = int(np.argmin(o))
        if np.isfinite(o[k]):
            best[i] = [float(o[k]), float(grids[i][k])]
            half[i] = float(grids[i][1] - grids[i][0]) if n > 1 else 0.0
    zoom = [i for i in best if half[i] > 0]
    for _ in range(ZOOM_ROUNDS if zoom else 0):
        Tz = {}
        for i in zoom:
            lo, hi = fss[i].t_range
            Tz[i] = np.linspace(max(lo, best[i][1] - half[i]), min(hi, best[i][1] + half[i]),
                                N_ZOOM)
        p_all = np.vstack([fss[i].p(Tz[i], P[i]) for i in zoom])
        _, obj = engine.solve(p_all, h_shift, extra_e)
        for j, i in enumerate(zoom):
            o = obj[j * N_ZOOM:(j + 1) * N_ZOOM]
            k = int(np.argmin(o))
            if o[k] < best[i][0]:
                best[i] = [float(o[k]), float(Tz[i][k])]
            half[i] = 2.0 * float(Tz[i][1] - Tz[i][0])
    for i in best:
        out[i] = _finish(engine, fss[i], best[i][1], P[i], half[i] / 2.0, h_shift, extra_e)
    return out


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

        return solve_nonlinear(case, problem, n_temperatures=n_temperatures,
                               alternatives=alternatives)
    engine = Engine(problem)
    states = {f: FluidStates(case, f, problem.used_properties) for f in case.model.fluids}
    per_fluid = dict(zip(states, best_states(engine, list(states.values()),
                                             n_temperatures=n_temperatures), strict=True))
    feasible = [s for s in per_fluid.values() if s is not None]
    if not feasible:
        from compromise.diagnose import diagnose

        conflict = diagnose(problem, states)
        alts = _alternatives(case, problem, states, per_fluid, None, n_temperatures) if alternatives else ()
        return Solution(case, "infeasible", math.inf, None, None, {}, alts, conflict)
    best = _pick(feasible, case)
    design = _design(best)
    evaluation = evaluate_design(case, design)
    binding = _binding_costs(problem, engine, states[best.fluid], best, n_temperatures) if alternatives else {}
    alts = _alternatives(case, problem, states, per_fluid, best, n_temperatures) if alternatives else ()
    return Solution(case, "optimal", best.objective, design, evaluation, binding, alts)


def relaxed_bound(row: Row, shift: float) -> float:
    """The user's bound after a right-hand-side shift ``shift`` of its row (log space)."""
    return row.bound * math.exp(shift) if row.side == "max" else row.bound * math.exp(-shift)


def _binding_costs(
    problem: Problem, engine: Engine, fs: FluidStates, best: State, n_temperatures: int
) -> dict[str, BindingCost]:
    from scipy.optimize import nnls

    p = fs.exact_p(best.temperature, best.pressure)
    f, h, e, _ = engine.linear_terms(p[None])
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
    all_states = [fs if g == fs.name else FluidStates(problem.case, g, problem.used_properties)
                  for g in problem.case.model.fluids]
    for i, li in zip(active, lam, strict=True):
        row = problem.rows[i]
        hs = np.zeros(problem.G.shape[0])
        hs[i] = shift
        objs = [s.objective for s in best_states(engine, all_states,
                                                 n_temperatures=n_temperatures, h_shift=hs)
                if s is not None]
        new = min(objs) if objs else best.objective
        key = row.key
        out[key] = BindingCost(key, row.condition, float(li), float(li * shift),
                               max(0.0, best.objective - new), relaxed_bound(row, shift))
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
            d = cb.weight * gv.weight * (gv.mismatch**2 - cb.groups[g].mismatch**2)
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
        alts.append(Alternative("fluid", f, d, s.objective,
                                _separator(case, best_eval, evaluate_design(case, d))))
    if case.model.preferred_ratios:
        engine = Engine(problem, extra_E=np.array([[1.0, 0.0, 0.0]]))
        for r in case.model.preferred_ratios:
            cands = [c for c in best_states(engine, list(states.values()),
                                            n_temperatures=n_temperatures,
                                            extra_e=np.array([math.log(r)])) if c is not None]
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
            alts.append(Alternative("ratio", label, d, c.objective,
                                    _separator(case, best_eval, evaluate_design(case, d))))
    alts.sort(key=lambda a: (a.objective, a.kind, a.label))
    return tuple(alts)
