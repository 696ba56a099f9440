"""Weight sensitivity of a case with ``[sediment]``: would other weights choose another material?

As in :mod:`compromise.explore.sensitivity`, every weight is multiplied by its own factor drawn
log-uniformly from ``[1/spread, spread]`` (numpy's PCG64 generator, seeded). The candidates are
the (model fluid, model material) pairs; for every sample each candidate's best design is the
exact four-variable QP of :mod:`compromise.solving.granular` (the ratios and the grain size)
with the sample's weights, at every temperature of a fine grid, and the candidate of least
weighted mismatch wins the sample (candidates within :data:`TIE_ABS` of each other tie). The
unrestricted optimum of a sample is the winner's design, whose ratios, temperature and grain
size give the ranges.

The rows are the same for every sample (only the weights, and so the Hessian, change): the
candidate active sets of :class:`~compromise.solving.qp.SmallQP` are found once, and the KKT
systems of :data:`CHUNK` samples inverted in one batch (:meth:`SmallQP.with_hessians`, the same
numbers as a solver built per sample).

Two simplifications against the solver's own answer (docs/case-format.md says so too): the
temperature is a grid of :data:`N_GRID` points (no zoom), and the moving-bed floor (model
Shields at or above its critical value) is held at the critical value of the nominal
optimum's grain, as on the map and the front.
"""

from __future__ import annotations

import math

import numpy as np

from compromise.casefile.model import Case
from compromise.explore.granular_front import StateGrid, held_floor
from compromise.explore.sensitivity_result import (
    Sensitivity,
    VariableRange,
    assemble,
    draw_factors,
    ranges_of,
    tally,
)
from compromise.solving.granular import N_U, GranularProblem
from compromise.solving.grid import REGULARISATION
from compromise.solving.qp import SmallQP

N_GRID = 49  # temperatures per fluid (0.25 K over a 12 K range)
CHUNK = 100  # samples whose KKT systems are inverted in one batch


def granular_sensitivity(case: Case, spread: float, samples: int, seed: int) -> Sensitivity:
    """The weight sensitivity of a ``[sediment]`` case (see the module docstring); the
    arguments are those of :func:`compromise.explore.sensitivity.weight_sensitivity`."""
    from compromise.solving.optimum import find_optimum

    sed = case.sediment
    assert sed is not None
    gp = GranularProblem(case)
    K = gp.W.size
    factors = draw_factors(spread, samples, seed, K)
    sol = find_optimum(case, alternatives=False)
    floor = held_floor(sol)
    pairs = [(f, m) for f in case.model.fluids for m in sed.materials]  # StateGrid's order
    several = len(case.model.fluids) > 1
    labels = [f"{m} in {f}" if several else m for f, m in pairs]
    # every (pair, temperature): property log-ratios and the groups' constants, once
    st = StateGrid(case, gp, N_GRID)
    rows = [st.at(k, T) for k, T in enumerate(st.grids)]
    p, c = np.vstack([r[0] for r in rows]), np.vstack([r[1] for r in rows])
    T_all = np.concatenate(st.grids)
    pair = np.concatenate([np.full(T.size, k) for k, T in enumerate(st.grids)])
    press = {it[0]: it[2] for it in st.items}
    h, e = gp.rhs(p, c, floor)
    cA = c[:, gp.sel] if gp.sel.size else np.zeros((c.shape[0], 0))
    u0 = gp.tie_break()
    all_f = np.vstack([np.ones((1, K)), factors])  # row 0: the case's own weights
    n_c = len(pairs)
    S_all = all_f.shape[0]
    J = np.full((S_all, n_c), np.inf)
    best_u = np.full((S_all, n_c, N_U), np.nan)  # each candidate's best design per sample
    best_T = np.full((S_all, n_c), np.nan)
    Hs = np.empty((all_f.shape[0], N_U, N_U))
    regs = np.empty(all_f.shape[0])
    for s, fac in enumerate(all_f):
        W = gp.W * fac
        H = 2.0 * (gp.A.T * W) @ gp.A
        regs[s] = REGULARISATION * max(1.0, float(np.trace(H)) / N_U)
        Hs[s] = H + 2.0 * regs[s] * np.eye(N_U)
    base = SmallQP(Hs[0], gp.G, gp.E)  # the candidate active sets, shared by every sample
    qps: list[SmallQP] = []
    for s, fac in enumerate(all_f):
        if s % CHUNK == 0:  # the samples' KKT systems inverted by batches
            qps = base.with_hessians(Hs[s : s + CHUNK])
        qp = qps[s % CHUNK]
        W = gp.W * fac
        reg = regs[s]
        f_lin = 2.0 * (cA * W) @ gp.A - 2.0 * reg * u0
        batch = qp.solve(f_lin, h, e)
        r = batch.y @ gp.A.T + cA
        obj = np.where(batch.feasible, np.sum(W * r**2, axis=1), np.inf)
        for k in range(n_c):
            mine = np.flatnonzero(pair == k)
            j = mine[int(np.argmin(obj[mine]))]
            J[s, k], best_u[s, k], best_T[s, k] = obj[j], batch.y[j], T_all[j]
    tallied = tally(J, [f for f, _ in pairs], [None] * n_c, labels, samples)
    winners = tallied[1]
    # the unrestricted optimum of each sample: the winner's design (the first of tied ones)
    y = np.full((S_all, 3), np.nan)
    TP = np.full((S_all, 2), np.nan)
    grain = np.full(S_all, np.nan)
    fluid_idx = np.full(S_all, -1)
    for s in range(S_all):
        k = int(winners[s])
        if k < 0:
            continue
        y[s] = best_u[s, k, :3]
        grain[s] = gp.d0 * math.exp(float(best_u[s, k, 3])) * 1e3
        TP[s] = (best_T[s, k], press[pairs[k][0]])
        fluid_idx[s] = case.model.fluids.index(pairs[k][0])
    ranges, optima = ranges_of(y, TP, fluid_idx, False)
    ok = fluid_idx >= 0
    g = grain[1:][ok[1:]]
    q = np.quantile(g, [0.0, 0.05, 0.5, 0.95, 1.0]) if g.size else [math.nan] * 5
    ranges = (
        *ranges,
        VariableRange("grain_size", "mm", float(grain[0]), *(float(x) for x in q)),
    )
    optima = np.column_stack([optima, np.where(ok[1:], grain[1:], np.nan)])
    return assemble(
        case, spread, seed, gp.objective_groups, factors, tallied, ranges, optima, fluid_idx
    )
