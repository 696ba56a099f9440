"""The answer of a case with ``[sediment]``: the best fluid, material and grain size, the binding
costs, the alternatives per fluid, per material and per preferred ratio, and the granular
account (relative densities, Shields values, time scales, the path the solve took).

See :mod:`compromise.solving.granular` for the mathematics.
"""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CompromiseError
from compromise.solving.design import Design, Evaluation, evaluator
from compromise.solving.diagnose import Conflict, relaxed_bound
from compromise.solving.granular import (
    GrainEngine,
    GrainState,
    GranularProblem,
    all_grain_states,
    grain_jobs,
    lockstep,
    polish_nonlinear,
)
from compromise.solving.grid import N_TEMPERATURES
from compromise.solving.result import (
    NOISE,
    RELAXATION,
    Alternative,
    BindingCost,
    SedimentAnswer,
    Solution,
    tied,
    what_separates,
)

GrainStates = dict[tuple[str, str], GrainState | None]


def pick(states: GrainStates, case: Case) -> GrainState | None:
    """The least objective; ties go to the fluid, then the material, listed first."""
    found = [s for s in states.values() if s is not None]
    if not found:
        return None
    low = min(s.objective for s in found)
    best = [s for s in found if s.objective <= low or tied(s.objective, low)]
    assert case.sediment is not None
    mats = case.sediment.materials
    return min(best, key=lambda s: (case.model.fluids.index(s.fluid), mats.index(s.material)))


def polished(
    gp: GranularProblem,
    states: GrainStates,
    extra: tuple[np.ndarray, np.ndarray] | None = None,
) -> GrainStates:
    """The states with the nonlinear groups' polish (:func:`~compromise.solving.granular.
    polish_nonlinear`); unchanged when every group is linear in the decisions."""
    if not gp.nonlinear:
        return states

    fss = {f: gp.states(f) for f in gp.case.model.fluids}
    out: GrainStates = {}
    for k, st in states.items():
        st = None if st is None else polish_nonlinear(gp, fss[k[0]], st, extra)
        out[k] = st if st is not None and math.isfinite(st.objective) else None
    return out


def design_of_grain(gp: GranularProblem, s: GrainState) -> Design:
    x, z, v, w = (math.exp(float(a)) for a in s.u)
    return Design(s.fluid, s.temperature, s.pressure, x, z, v, s.material, gp.d0 * w)


def granular_optimum(
    case: Case, *, n_temperatures: int = N_TEMPERATURES, alternatives: bool = True
) -> Solution:
    """The optimum of a case with ``[sediment]`` (see :func:`compromise.solving.optimum.
    find_optimum`, which hands such cases here)."""
    gp = GranularProblem(case)
    engine = GrainEngine(gp)
    states = polished(gp, all_grain_states(engine, case, n_temperatures=n_temperatures))
    best = pick(states, case)
    if best is None:
        alts = _alternatives(case, gp, states, None, n_temperatures) if alternatives else ()
        conflict = granular_conflict(case, gp, engine)
        return Solution(case, "infeasible", math.inf, None, None, {}, alts, conflict)
    if not math.isfinite(best.objective):  # pragma: no cover - as find_optimum
        raise CompromiseError(f"{case.path}: the weighted mismatch of the best design is inf")
    design = design_of_grain(gp, best)
    evaluate = evaluator(case)
    evaluation = evaluate(design)
    floors = {k: s.critical_shields for k, s in states.items() if s and s.critical_shields}
    binding = (
        _binding_costs(case, gp, engine, best, floors, n_temperatures)
        if alternatives and not gp.nonlinear  # multipliers of the QP would not be the answer's
        else {}
    )
    alts = _alternatives(case, gp, states, best, n_temperatures, evaluate) if alternatives else ()
    account = sediment_account(case, gp, best, design, evaluation)
    return Solution(
        case, "optimal", best.objective, design, evaluation, binding, alts, sediment=account
    )


N_DIAGNOSIS_TEMPERATURES = 6
UNBOUND = 1e6  # a right-hand-side shift that takes a row out of play


def granular_conflict(case: Case, gp: GranularProblem, engine: GrainEngine) -> Conflict:
    """A smallest set of bounds that cannot hold together, by a deletion filter: each row in
    turn is taken out of play, and stays out while the rest is still infeasible for every
    fluid, material and temperature of a coarse grid (the moving-bed floor is left out of the
    diagnosis: its bound depends on the answer)."""
    from compromise.physics.materials import get_material
    from compromise.solving.grid import FluidStates, grid_points

    batches = []
    for f in case.model.fluids:
        fs = gp.states(f) if case is gp.case else FluidStates(case, f, gp.used)
        T = grid_points(*fs.t_range, N_DIAGNOSIS_TEMPERATURES)
        p = fs.p(T, float(fs.pressures()[0]))
        for mat in gp.sed.materials:
            batches.append((p, gp.constants(p, get_material(mat).density)))
    p_all = np.vstack([b[0] for b in batches])
    c_all = np.vstack([b[1] for b in batches])
    m = gp.G.shape[0]

    def infeasible(out: np.ndarray) -> bool:
        _, obj = engine.solve(p_all, c_all, None, h_shift=np.where(out, UNBOUND, 0.0))
        return not np.isfinite(obj).any()

    out = np.zeros(m, dtype=bool)
    if gp.floor_row is not None:
        out[gp.floor_row] = True
    if not infeasible(out):  # only the equalities, or the floor: nothing to name
        kept: list[int] = []
    else:
        for i in range(m):
            if out[i]:
                continue
            out[i] = True
            if not infeasible(out):
                out[i] = False
        kept = [i for i in range(m) if not out[i]]
    h_all = gp.h0 + c_all @ gp.Hc.T + p_all @ gp.P.T
    e_all = gp.e0 + c_all @ gp.Ec.T + p_all @ gp.Q.T
    rows = [i for i in range(m) if i != gp.floor_row]
    keys: list[str] = []
    relaxation: dict[str, float | None] = {}
    conditions: dict[str, str | None] = {}
    units: dict[str, str] = {}
    for i in kept:
        row = gp.rows[i]
        if row.key in relaxation:
            continue
        keys.append(row.key)
        conditions[row.key] = row.condition
        if row.kind == "limit":
            units[row.key] = case.quantities[row.name].unit
        elif row.name == "grain_size":
            units[row.key] = "m"
        elif row.kind == "bound" and row.name != "distortion":
            units[row.key] = "ratio"
        else:
            units[row.key] = "-"
        relaxation[row.key] = _relaxation(gp, i, rows, h_all, e_all)
    if not keys:
        keys = [f"groups.{n}.exact" if n in case.groups else f"model.{n}" for n in gp.exact]
        relaxation = dict.fromkeys(keys)
        conditions = dict.fromkeys(keys)
    return Conflict(tuple(keys), relaxation, conditions, units)


def _relaxation(
    gp: GranularProblem, i: int, rows: list[int], h_all: np.ndarray, e_all: np.ndarray
) -> float | None:
    """The bound of row ``i`` that makes the case feasible with every other row kept (as
    :func:`compromise.solving.diagnose.diagnose` finds it): the least ``G_i u`` over the rest,
    by linear programming, over the diagnosis states; None where no bound helps."""
    from scipy.optimize import linprog

    others = [j for j in rows if j != i]
    best = math.inf
    for hh, ee in zip(h_all, e_all, strict=True):
        if not (np.all(np.isfinite(hh)) and np.all(np.isfinite(ee))):
            continue
        r = linprog(
            gp.G[i],
            A_ub=gp.G[others] if others else None,
            b_ub=hh[others] if others else None,
            A_eq=gp.E if gp.E.shape[0] else None,
            b_eq=ee if gp.E.shape[0] else None,
            bounds=[(None, None)] * gp.G.shape[1],
            method="highs",
        )
        if r.status == 0:
            best = min(best, float(r.fun) - float(hh[i]))
        elif r.status == 3:
            best = min(best, 0.0)
    if not math.isfinite(best):
        return None
    return relaxed_bound(gp.rows[i], max(best, 0.0) * (1 + 1e-9))


def sediment_account(
    case: Case, gp: GranularProblem, best: GrainState, design: Design, ev: Evaluation
) -> SedimentAnswer:
    """Relative densities, Shields values, critical values and time scales of the answer."""
    from compromise.physics.materials import get_material
    from compromise.physics.sediment import (
        critical_shields_soulsby_whitehouse,
        dimensionless_grain_size,
        morphological_time_ratio,
        relative_density,
        transport_rate_mpm,
    )

    sed = case.sediment
    assert sed is not None and design.grain_size is not None
    first = ev.conditions[0]
    q = first.quantities
    from compromise.solving.design import property_environments

    penv, menv = property_environments(case, design.fluid, design.temperature, design.pressure)
    rho_p, rho_m = penv["rho"], menv["rho"]
    R_p = float(relative_density(q[sed.density].prototype, rho_p))
    R_m = float(relative_density(get_material(design.material or "").density, rho_m))
    d_p, d_m = q[sed.grain].prototype, design.grain_size
    crit = critical_shields_soulsby_whitehouse
    cr_p = float(crit(dimensionless_grain_size(d_p, R_p, penv["nu"])))
    cr_m = float(crit(dimensionless_grain_size(d_m, R_m, menv["nu"])))
    shields = None
    morph = None
    if "shields" in first.groups:
        g = first.groups["shields"]
        shields = (g.prototype, g.model)
        qs_p = float(transport_rate_mpm(g.prototype, cr_p, R_p, d_p))
        qs_m = float(transport_rate_mpm(g.model, cr_m, R_m, d_m))
        if qs_p > 0 and qs_m > 0:
            morph = float(
                morphological_time_ratio(
                    design.vertical_ratio, design.horizontal_ratio, qs_m / qs_p
                )
            )
    path = (
        "exact: convex QP over the length, velocity and grain-size log-ratios, per fluid "
        "state and material"
    )
    if gp.nonlinear:
        path = (
            f"nonlinear: {', '.join(gp.nonlinear)} not a power product (the settling velocity, "
            "Ferguson & Church 2004, depends on the grain nonlinearly); a local SLSQP solve "
            "from the exact QP optimum without it, per fluid and material, at the QP's fluid "
            "state"
        )
    if gp.floor_row is not None:
        if best.rounds > 0:
            path += (
                f"; moving-bed floor at the critical Shields value of the answer's own grain "
                f"(a fixed point, {best.rounds} round{'s' if best.rounds != 1 else ''})"
            )
        else:
            path += "; moving-bed floor held at the largest critical value seen (no fixed point)"
    return SedimentAnswer(
        design.material or "",
        d_m,
        d_p,
        (R_p, R_m),
        shields,
        (cr_p, cr_m) if gp.floor_row is not None or shields is not None else None,
        design.horizontal_ratio / design.velocity_ratio,
        morph,
        path,
    )


def _binding_costs(
    case: Case,
    gp: GranularProblem,
    engine: GrainEngine,
    best: GrainState,
    floors: dict[tuple[str, str], float],
    n_temperatures: int,
) -> dict[str, BindingCost]:
    """Multipliers and re-solved drops of the rows binding at the optimum (as
    :func:`compromise.solving.optimum.find_optimum` does for a case without sediment)."""
    from compromise.solving.grid import FluidStates
    from compromise.solving.lsq import nnls

    fs = gp.states(best.fluid) if case is gp.case else FluidStates(case, best.fluid, gp.used)
    from compromise.physics.materials import get_material

    rho_s = get_material(best.material).density
    p = fs.exact_p(best.temperature, best.pressure)[None]
    c = gp.constants(p, rho_s)
    h = gp.h0 + c @ gp.Hc.T + p @ gp.P.T
    if gp.floor_row is not None and best.critical_shields:
        h[:, gp.floor_row] -= math.log(best.critical_shields)
    u = best.u
    slack = h[0] - gp.G @ u
    active = np.flatnonzero(np.abs(slack) <= 1e-8 * (1 + np.abs(h[0])))
    out: dict[str, BindingCost] = {}
    if active.size == 0:
        return out
    cA = c[:, gp.sel]
    grad = 2.0 * (gp.A.T * gp.W) @ (gp.A @ u + cA[0]) + 2.0 * engine.eps * (u - engine.u0)
    M = np.vstack([gp.G[active], gp.E, -gp.E]).T
    # where more rows bind than the optimum needs the multipliers are not unique: a tiny
    # ridge picks the least-norm ones, which share the cost among the rows that hold the
    # design together (each then reads as degenerate), rather than an arbitrary vertex
    ridge = math.sqrt(1e-12 * max(1.0, float(np.sum(M**2))))
    k = M.shape[1]
    sol, _ = nnls(np.vstack([M, ridge * np.eye(k)]), np.concatenate([-grad, np.zeros(k)]))
    lam = sol[: active.size]
    shift = math.log(1.0 + RELAXATION)
    # the re-solve with each binding row relaxed: all of them side by side (one lockstep)
    resolved: dict[int, float] = {}
    if best.objective >= NOISE:
        sets = []
        for i in active:
            hs = np.zeros(gp.G.shape[0])
            hs[i] = shift
            sets.append(grain_jobs(engine, case, n_temperatures, hs, None, floors))
        found = lockstep(engine, [job for _, jobs in sets for job in jobs])
        a = 0
        for i, (keys, _) in zip(active, sets, strict=True):
            objs = [s.objective for s in found[a : a + len(keys)] if s is not None]
            resolved[int(i)] = min(objs) if objs else best.objective
            a += len(keys)
    for i, li in zip(active, lam, strict=True):
        row = gp.rows[i]
        new = resolved.get(int(i), best.objective)
        relaxed = (
            (best.critical_shields or math.nan) * math.exp(-shift)
            if row.key == "sediment.moving_bed"
            else relaxed_bound(row, shift)
        )
        out[row.key] = BindingCost(
            row.key,
            row.condition,
            float(li),
            float(li * shift),
            max(0.0, best.objective - new),
            relaxed,
        )
    return out


def _alternatives(
    case: Case,
    gp: GranularProblem,
    states: GrainStates,
    best: GrainState | None,
    n_temperatures: int,
    evaluate: Callable[[Design], Evaluation] | None = None,
) -> tuple[Alternative, ...]:
    from compromise.units import format_ratio

    evaluate = evaluate or evaluator(case)
    best_eval = evaluate(design_of_grain(gp, best)) if best else None
    sed = case.sediment
    assert sed is not None
    alts: list[Alternative] = []

    def alt(kind: str, label: str, s: GrainState | None) -> Alternative:
        if s is None:
            return Alternative(kind, label, None, math.inf, "infeasible")
        d = design_of_grain(gp, s)
        return Alternative(
            kind, label, d, s.objective, what_separates(case, best_eval, evaluate(d))
        )

    if len(case.model.fluids) > 1 or len(sed.materials) == 1:
        for f in case.model.fluids:
            alts.append(alt("fluid", f, pick({k: v for k, v in states.items() if k[0] == f}, case)))
    for m in sed.materials:
        alts.append(alt("material", m, pick({k: v for k, v in states.items() if k[1] == m}, case)))
    if case.model.preferred_ratios:
        engine = GrainEngine(gp, extra_E=np.array([[1.0, 0.0, 0.0, 0.0]]))
        for r in case.model.preferred_ratios:
            fixed = np.array([math.log(r)])
            found = all_grain_states(engine, case, n_temperatures=n_temperatures, extra_e=fixed)
            found = polished(gp, found, (engine.extra, fixed))
            s = pick(found, case)
            a = alt("ratio", format_ratio(r), s)
            if s is None:
                lo, hi = case.model.horizontal_ratio
                why = (
                    "outside model.horizontal_ratio"
                    if not lo * (1 - 1e-12) <= r <= hi * (1 + 1e-12)
                    else "infeasible"
                )
                a = Alternative("ratio", format_ratio(r), None, math.inf, why)
            alts.append(a)
    alts.sort(key=lambda a: (a.objective, a.kind, a.label))
    return tuple(alts)
