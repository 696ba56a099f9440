"""Fallback for groups that are not power products (a custom expression with a sum, a log).

Such a group's log-mismatch is not linear in the log-ratios, so the subproblem is no longer a
convex QP. The fallback keeps the exact machinery for everything else: for every fluid and grid
temperature it solves the convex part exactly, ranks those points by the full objective, then
runs SLSQP on the full problem (log-ratios, temperature and log-pressure: a gas's, or a liquid
facility's when a group names its ambient pressure, as the cavitation index does) from the best
few of them, and keeps the best feasible result. Multi-start is the verification: the
answer is the best of several independent local solves.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import numpy as np

from compromise import expressions as ex
from compromise.physics.scaling import N_DECISION
from compromise.solving.design import Design, evaluate_design
from compromise.solving.diagnose import diagnose, relaxed_bound
from compromise.solving.grid import Engine, FluidStates, State, grid_points
from compromise.solving.problem import PROPERTY_NAMES, Problem, property_environment
from compromise.solving.result import (
    RELAXATION,
    Alternative,
    BindingCost,
    Solution,
    design_of,
    pick_state,
    what_separates,
)
from compromise.units import format_ratio

if TYPE_CHECKING:
    from compromise.casefile.model import Case

N_STARTS = 4


class FullObjective:
    """Objective and nonlinear constraints of the full problem for one model fluid."""

    def __init__(
        self,
        case: Case,
        problem: Problem,
        fs: FluidStates,
        *,
        h_shift: np.ndarray | None = None,
        fix_x: float | None = None,
    ) -> None:
        from compromise.physics.fluids import get_fluid

        self.case, self.problem, self.fs = case, problem, fs
        self.h_shift = np.zeros(problem.G.shape[0]) if h_shift is None else h_shift
        self.fix_x = fix_x
        proto = property_environment(
            get_fluid(case.fluid).properties(case.temperature, case.pressure)
        )
        self.proto_props = proto
        self.values = [case.values(i) for i in range(len(case.conditions))]
        self.names = problem.nonlinear_groups
        self.groups = [case.groups[n] for n in self.names]
        self.proto_group = [
            [float(ex.evaluate(g.expression, {**vals, **proto})) for g in self.groups]
            for vals in self.values
        ]
        self.scalings = {n: q.scaling for n, q in case.quantities.items()}

    def group_values(
        self, y: np.ndarray, p: np.ndarray, state: dict[str, float] | None = None
    ) -> list[list[float]]:
        """Model values of the nonlinear groups, per condition; ``state`` gives the model
        fluid's ``p_ambient`` and ``p_vapour`` (:meth:`FluidStates.state_environment`)."""
        out = []
        props = {n: self.proto_props[n] * _exp(p[i]) for i, n in enumerate(PROPERTY_NAMES)}
        props.update(state or {})
        for vals in self.values:
            env = dict(props)
            for n, s in self.scalings.items():
                env[n] = vals[n] * _exp(float(s[:N_DECISION] @ y + s[N_DECISION:] @ p))
            out.append([float(ex.evaluate(g.expression, env)) for g in self.groups])
        return out

    def __call__(
        self, y: np.ndarray, p: np.ndarray, state: dict[str, float] | None = None
    ) -> float:
        """Full objective: convex part plus the nonlinear groups' weighted squared mismatches."""
        pr = self.problem
        r = pr.A @ y + pr.B @ p
        total = float(np.sum(pr.W * r**2))
        for c, (model, proto) in enumerate(
            zip(self.group_values(y, p, state), self.proto_group, strict=True)
        ):
            w = self.case.conditions[c].weight
            for g, mv, pv in zip(self.groups, model, proto, strict=True):
                if g.exact or g.weight == 0:
                    continue
                if not (mv > 0 and pv > 0 and math.isfinite(mv)):  # nan or out of the domain
                    return math.inf
                total += w * g.weight * math.log(mv / pv) ** 2
        return total

    def constraints(
        self, y: np.ndarray, p: np.ndarray, state: dict[str, float] | None = None
    ) -> tuple[np.ndarray, np.ndarray]:
        """(inequalities >= 0, equalities = 0) of the nonlinear groups, in log space."""
        ineq, eq = [], []
        for model, proto in zip(self.group_values(y, p, state), self.proto_group, strict=True):
            for g, mv, pv in zip(self.groups, model, proto, strict=True):
                lm = math.log(mv) if mv > 0 and math.isfinite(mv) else -1e3
                if g.min is not None:
                    ineq.append(lm - math.log(g.min))
                if g.max is not None:
                    ineq.append(math.log(g.max) - lm)
                if g.exact:
                    eq.append(lm - (math.log(pv) if pv > 0 else 0.0))
        return np.array(ineq), np.array(eq)


def _exp(x: float) -> float:
    """``exp`` that gives ``inf`` (not ``OverflowError``) far outside the design space, and
    ``nan`` for ``nan``; the objective then treats the point as out of the domain."""
    return math.exp(x) if x < 700.0 else math.inf


def _local(obj: FullObjective, y0: np.ndarray, t0: float, lp0: float) -> tuple[float, np.ndarray]:
    """SLSQP on (x, z, v, t [, ln P]) from one start; returns (objective, variables)."""
    from scipy.optimize import minimize

    fs, pr = obj.fs, obj.problem
    gas = fs.pressures().size > 1  # the pressure is searched (a gas, or a liquid's tank)
    t_lo, t_hi = fs.t_range
    tscale = max(t_hi - t_lo, 1.0)

    def unpack(u: np.ndarray) -> tuple[np.ndarray, float, float]:
        t = t_lo + u[3] * tscale if t_hi > t_lo else t_lo
        lp = u[4] if gas else lp0
        return u[:3], t, lp

    def p_of(t: float, lp: float) -> np.ndarray:
        return fs.p(np.array([t]), math.exp(lp))[0]

    def state_of(t: float, lp: float) -> dict[str, float]:
        return fs.state_environment(t, math.exp(lp))

    def f(u: np.ndarray) -> float:
        y, t, lp = unpack(u)
        v = obj(y, p_of(t, lp), state_of(t, lp))
        return v if math.isfinite(v) else 1e6

    def g_ineq(u: np.ndarray) -> np.ndarray:
        y, t, lp = unpack(u)
        p = p_of(t, lp)
        h, _ = pr.rhs(p)
        lin = h + obj.h_shift - pr.G @ y
        nl, _ = obj.constraints(y, p, state_of(t, lp))
        return np.r_[lin, nl]

    def g_eq(u: np.ndarray) -> np.ndarray:
        y, t, lp = unpack(u)
        p = p_of(t, lp)
        _, e = pr.rhs(p)
        _, nl = obj.constraints(y, p, state_of(t, lp))
        fixed = [y[0] - obj.fix_x] if obj.fix_x is not None else []
        return np.r_[pr.E @ y - e, nl, fixed]

    u0 = np.r_[y0, (t0 - t_lo) / tscale if t_hi > t_lo else 0.0]
    bounds = [(None, None)] * 3 + [(0.0, 1.0)]
    if gas:
        lo, hi = fs.case.model.pressure
        u0 = np.r_[u0, lp0]
        bounds.append((math.log(lo), math.log(hi)))
    cons = [{"type": "ineq", "fun": g_ineq}]
    if pr.E.shape[0] or any(g.exact for g in obj.groups) or obj.fix_x is not None:
        cons.append({"type": "eq", "fun": g_eq})
    r = minimize(
        f,
        u0,
        method="SLSQP",
        bounds=bounds,
        constraints=cons,
        options={"ftol": 1e-14, "maxiter": 400},
    )
    u = r.x
    ok = np.all(g_ineq(u) >= -1e-8)
    if len(cons) > 1:
        ok = ok and np.all(np.abs(g_eq(u)) <= 1e-8)
    return (float(f(u)) if ok else math.inf), u


def best_nonlinear_state(obj: FullObjective, engine: object, n_temperatures: int):
    """Best state of one fluid for the full problem (or None when infeasible)."""

    fs = obj.fs
    t_lo, t_hi = fs.t_range
    T = grid_points(t_lo, t_hi, n_temperatures)
    starts = []
    for P in fs.pressures():
        p_all = fs.p(T, P)
        extra = None if obj.fix_x is None else np.array([obj.fix_x])
        batch, _ = engine.solve(p_all, obj.h_shift, extra)  # type: ignore[attr-defined]
        for k in np.flatnonzero(batch.feasible):
            state = fs.state_environment(float(T[k]), float(P))
            starts.append((obj(batch.y[k], p_all[k], state), batch.y[k], float(T[k]), math.log(P)))
    if not starts:
        return None
    starts.sort(key=lambda s: s[0])
    best = None
    for _, y0, t0, lp0 in starts[:N_STARTS]:
        val, u = _local(obj, y0, t0, lp0)
        if math.isfinite(val) and (best is None or val < best[0] - 1e-15):
            best = (val, u)
    if best is None:
        return None
    val, u = best
    t = t_lo + u[3] * max(t_hi - t_lo, 1.0) if t_hi > t_lo else t_lo
    P = math.exp(u[4]) if fs.pressures().size > 1 else float(fs.pressures()[0])
    return State(fs.name, float(t), float(P), u[:3].copy(), float(val))


def _all_fluids(
    case: Case,
    problem: Problem,
    engine: object,
    n_temperatures: int,
    *,
    h_shift: np.ndarray | None = None,
    fix_x: float | None = None,
) -> dict:
    """Best nonlinear state of every model fluid (None where infeasible)."""

    out = {}
    for f in case.model.fluids:
        fs = FluidStates(case, f, problem.used_properties)
        obj = FullObjective(case, problem, fs, h_shift=h_shift, fix_x=fix_x)
        out[f] = best_nonlinear_state(obj, engine, n_temperatures)
    return out


def solve_nonlinear(
    case: Case, problem: Problem, *, n_temperatures: int, alternatives: bool
) -> Solution:
    """Solve a case that has groups which are not power products (see the module docstring).

    Binding rows are priced by re-solving with the bound relaxed (10 % for the drop, 0.1 % for
    the marginal rate that stands in for the multiplier); preferred ratios are solved with the
    horizontal ratio fixed.
    """

    engine = Engine(problem)
    per_fluid = _all_fluids(case, problem, engine, n_temperatures)
    feasible = [s for s in per_fluid.values() if s is not None]
    best = pick_state(feasible, case) if feasible else None
    best_eval = evaluate_design(case, design_of(best)) if best else None

    def ranked(states: dict) -> object:
        good = [s for s in states.values() if s is not None]
        return pick_state(good, case) if good else None

    alts: list[Alternative] = []
    if alternatives:
        for f, st in per_fluid.items():
            d = design_of(st) if st else None
            alts.append(
                Alternative(
                    "fluid",
                    f,
                    d,
                    st.objective if st else math.inf,
                    what_separates(case, best_eval, evaluate_design(case, d))
                    if d
                    else "infeasible",
                )
            )
        if case.model.preferred_ratios:
            fixed = Engine(problem, extra_E=np.array([[1.0, 0.0, 0.0]]))
            for r in case.model.preferred_ratios:
                st = ranked(_all_fluids(case, problem, fixed, n_temperatures, fix_x=math.log(r)))
                d = design_of(st) if st else None
                alts.append(
                    Alternative(
                        "ratio",
                        format_ratio(r),
                        d,
                        st.objective if st else math.inf,
                        what_separates(case, best_eval, evaluate_design(case, d))
                        if d
                        else "infeasible",
                    )
                )
        alts.sort(key=lambda a: (a.objective, a.kind, a.label))
    if best is None:
        states = {f: FluidStates(case, f, problem.used_properties) for f in case.model.fluids}
        return Solution(
            case, "infeasible", math.inf, None, None, {}, tuple(alts), diagnose(problem, states)
        )
    design: Design = design_of(best)
    ev = evaluate_design(case, design)
    binding: dict[str, BindingCost] = {}
    if alternatives:
        fs = FluidStates(case, best.fluid, problem.used_properties)
        h, _ = problem.rhs(fs.exact_p(best.temperature, best.pressure))
        slack = h - problem.G @ best.y
        shift, small = math.log(1.0 + RELAXATION), 1e-3
        for i in np.flatnonzero(np.abs(slack) <= 1e-7 * (1 + np.abs(h))):
            row = problem.rows[i]
            objs = []
            for dh in (shift, small):
                hs = np.zeros(problem.G.shape[0])
                hs[i] = dh
                st = ranked(_all_fluids(case, problem, engine, n_temperatures, h_shift=hs))
                objs.append(st.objective if st else best.objective)
            rate = max(0.0, (best.objective - objs[1]) / small)
            binding[row.key] = BindingCost(
                row.key,
                row.condition,
                rate,
                rate * shift,
                max(0.0, best.objective - objs[0]),
                relaxed_bound(row, shift),
            )
    # the objective from the source property models (the SLSQP runs on the splines)
    return Solution(case, "optimal", ev.objective, design, ev, binding, tuple(alts))
