"""Weight sensitivity: would the decision change if the groups' weights were different?

Every weight is multiplied by its own factor drawn log-uniformly from ``[1/spread, spread]``
(numpy's PCG64 generator, seeded, so a run is reproducible). For every sample the exact optimum
is found twice over: restricted to each candidate design (a model fluid at a preferred ratio, or
each fluid alone when the case lists no preferred ratio), to count how often each candidate is
the best; and unrestricted, to give the range of every decision variable.

Candidates whose mismatches are equal within :data:`TIE_ABS` in a sample are tied there: none
of them wins it. The grid and zoom settle an objective to about 1e-5; every candidate within
:data:`REFINE_BAND` of a sample's best is searched again with a finer zoom before the
comparison, so that candidates that are exactly tied (several fluids that all match every group)
are reported as tied rather than split by the search's residue.

With fewer than two weighted groups, a weight factor scales every candidate's mismatch alike and
cannot change which is best; the result says so (:attr:`Sensitivity.note`).

A candidate that matches every weighted group at the case's weights (its mismatch, solved with
the fine zoom, times the spread below :data:`ZERO_BAND`) matches them at any weights: in every
sample its mismatch lies between the least and the largest weight factor times the nominal
one, a tie at zero. Such candidates are settled once and not re-solved per sample; likewise,
when the unrestricted optimum at the case's weights matches every weighted group, it is every
sample's optimum (among designs that all match, the tie-break's choice).

A sample changes only the weights, so only the Hessian of the convex subproblems
(:mod:`compromise.solving.problem`) changes. Where the equality rows leave at most two of the
three log-ratios free (a group kept exactly, a fixed preferred ratio, a fixed distortion: every
bundled case), each subproblem is solved in closed form in the equalities' null space
(:class:`~compromise.explore.reduced_qp.ReducedQP`): what depends on the fluid state alone
(the residuals at the equalities' point, the interval or polygon the rows leave) is computed
once per distinct state and shared by every sample. Otherwise the KKT systems of every sample
and candidate active set are inverted in one batch, and every subproblem of a sample is then a
matrix product (:class:`WeightedQP`), as in :mod:`compromise.solving.qp`. Both give the one
optimum of a strictly convex QP; their objectives agree to rounding, and with a fixed seed the
winners are the same sample by sample (``tests/test_reduced_qp.py``). Temperature (and a gas's
pressure) is searched by the grid and zoom of :func:`compromise.explore.envelope.lower_envelope`.
"""

from __future__ import annotations

import itertools
import math

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.explore.envelope import StateSpace, lower_envelope
from compromise.explore.reduced_qp import ReducedQP, tie_break_point
from compromise.explore.sensitivity_result import (  # noqa: F401  (re-exported)
    TIE_ABS,
    VARIABLES,
    Candidate,
    Sensitivity,
    VariableRange,
    assemble,
    draw_factors,
    ranges_of,
    tally,
    tied_best,
    weights_note,
    winners_of,
)
from compromise.solving.grid import REGULARISATION, FluidStates
from compromise.solving.problem import Problem, build_problem
from compromise.solving.qp import FEASIBILITY_TOL, independent_rows
from compromise.solving.threads import one_blas_thread

CHUNK = 250  # samples per batch of the enumeration (its KKT maps are per sample)
REDUCED_CHUNK = 2000  # samples per batch of the reduced solver (its state rows are shared)
N_TEMPERATURES = 12
ZOOM_ROUNDS = 3
REFINE_BAND = 1e-4  # [-] candidates this close to a sample's best (plus 1e-3 of it) are refined
REFINE_ZOOM_ROUNDS = 8  # the zoom of the refinement: a 1 K cell resolved to about 2e-5 K
ZERO_BAND = 1e-3 * TIE_ABS  # [-] nominal mismatch x spread below this: a tie at zero always


class WeightedQP:
    """The convex subproblems of a problem for many weight vectors at once.

    Parameters
    ----------
    problem : Problem
    extra_E : (k, 3) array, optional
        Extra equality rows (a fixed horizontal ratio).
    """

    def __init__(self, problem: Problem, extra_E: np.ndarray | None = None) -> None:
        self.problem = problem
        self.extra = np.zeros((0, 3)) if extra_E is None else np.atleast_2d(extra_E)
        E = np.vstack([problem.E, self.extra])
        G = problem.G
        n, m, q = 3, G.shape[0], E.shape[0]
        keep = independent_rows(E)
        self.E, self.keep, self.m, self.q = E, keep, m, q
        self.groups: list[tuple[np.ndarray, np.ndarray]] = []  # (combos (c, k), C (c, ne+k, 3))
        for k in range(min(n - len(keep), m) + 1):
            combos, Cs = [], []
            for combo in itertools.combinations(range(m), k):
                C = np.vstack([E[keep], G[list(combo)]])
                if C.shape[0] and np.linalg.svd(C, compute_uv=False)[-1] <= 1e-10 * max(
                    1.0, float(np.abs(C).max())
                ):
                    continue
                combos.append(combo)
                Cs.append(C)
            if combos:
                self.groups.append(
                    (
                        np.array(combos, dtype=int).reshape(len(combos), k),
                        np.array(Cs).reshape(len(combos), len(keep) + k, n),
                    )
                )
        self.y0 = tie_break_point(problem)
        #: whether the next :meth:`solve` checks every candidate at once (see there)
        self.check_all = False

    def prepare(self, W: np.ndarray) -> tuple[np.ndarray, ...]:
        """Per-sample maps from the right-hand side ``[-f, e, h]`` to the candidates' points
        and row values, the Hessians (S, 3, 3) and the regularisations (S,)."""
        A = self.problem.A
        S, m, q = W.shape[0], self.m, self.q
        H = 2.0 * np.einsum("ki,sk,kj->sij", A, W, A)
        reg = REGULARISATION * np.maximum(1.0, np.trace(H, axis1=1, axis2=2) / 3.0)
        H = H + 2.0 * reg[:, None, None] * np.eye(3)
        r = 3 + q + m
        maps = []
        for combos, C in self.groups:
            c, nc = C.shape[0], C.shape[1]
            K = np.zeros((S, c, 3 + nc, 3 + nc))
            K[:, :, :3, :3] = H[:, None]
            K[:, :, :3, 3:] = C.transpose(0, 2, 1)[None]
            K[:, :, 3:, :3] = C[None]
            Ki = np.linalg.inv(K)[:, :, :3, :]
            M = np.zeros((S, c, 3, r))
            M[..., :3] = Ki[..., :3]
            for i, j in enumerate(self.keep):
                M[..., 3 + j] = Ki[..., 3 + i]
            rows = np.arange(c)
            for i in range(combos.shape[1]):
                # advanced indices around a slice come first: (c, S, 3)
                M[:, rows, :, 3 + q + combos[:, i]] = Ki[:, :, :, 3 + len(self.keep) + i].transpose(
                    1, 0, 2
                )
            maps.append(M)
        M = np.concatenate(maps, axis=1)  # (S, c, 3, r)
        GM = np.einsum("ma,scar->scmr", self.problem.G, M)
        EM = np.einsum("qa,scar->scqr", self.E, M) if len(self.keep) < q else M[:, :, :0]
        c = M.shape[1]
        self.check_all = False  # probe the least candidate first again
        return (M.reshape(S, c * 3, r), GM.reshape(S, c * m, r), EM.reshape(S, -1, r), H, reg)

    def solve(
        self,
        W: np.ndarray,
        prep: tuple[np.ndarray, ...],
        p: np.ndarray,
        extra_e: np.ndarray | None = None,
    ) -> tuple[np.ndarray, np.ndarray]:
        """Optimal ``y`` (S, R, 3) and weighted mismatch (S, R) for weights ``W`` (S, K) and
        property log-ratios ``p`` (S, R, 6); ``inf`` where infeasible.

        The best candidate is the feasible one of least objective (the first of equals, as
        ``argmin`` takes). Where the candidate of least objective is feasible it is the answer;
        so that one is checked first (its row values ``G y``), and only the other subproblems
        check every candidate. Where most subproblems need the full check (the previous call
        of this batch says so), every candidate is checked at once, by the row maps.
        """
        pr = self.problem
        YM, GM, EM, H, reg = prep
        S, R = p.shape[0], p.shape[1]
        c = YM.shape[1] // 3
        r = p @ pr.B.T  # (S, R, K)
        f = 2.0 * ((r * W[:, None, :]) @ pr.A) - 2.0 * reg[:, None, None] * self.y0
        h = pr.h0 + p @ pr.P.T  # (S, R, m)
        e = pr.e0 + p @ pr.Q.T
        if self.extra.shape[0]:
            e = np.concatenate([e, np.broadcast_to(extra_e, (S, R, self.extra.shape[0]))], axis=2)
        rhs = np.concatenate([-f, e, h], axis=2).transpose(0, 2, 1)  # (S, r, R)
        Y = np.matmul(YM, rhs).reshape(S, c, 3, R)
        val = _objective(Y, H, f.transpose(0, 2, 1))  # (S, c, R)
        if self.check_all:
            ok = np.ones((S, c, R), dtype=bool)
            if self.m:
                GY = np.matmul(GM, rhs).reshape(S, c, self.m, R)
                ht = h.transpose(0, 2, 1)[:, None]
                ok &= np.all(GY <= ht + FEASIBILITY_TOL * (1.0 + np.abs(ht)), axis=2)
            if len(self.keep) < self.q:
                EY = np.matmul(EM, rhs).reshape(S, c, self.q, R)
                et = e.transpose(0, 2, 1)[:, None]
                ok &= np.all(np.abs(EY - et) <= FEASIBILITY_TOL * (1.0 + np.abs(et)), axis=2)
            val = np.where(ok, val, np.inf)
            best = np.argmin(val, axis=1)  # (S, R)
            y = np.take_along_axis(Y, best[:, None, None, :], axis=1)[:, 0].transpose(0, 2, 1)
            v = np.take_along_axis(val, best[:, None], axis=1)[:, 0]
        else:
            y, v = self._least_first(Y, val, h, e)
        feasible_ = np.isfinite(v)
        res = y @ pr.A.T + r
        J = np.where(feasible_, np.sum(W[:, None, :] * res**2, axis=2), np.inf)
        return y, J

    def _least_first(
        self, Y: np.ndarray, val: np.ndarray, h: np.ndarray, e: np.ndarray
    ) -> tuple[np.ndarray, np.ndarray]:
        """Best point (S, R, 3) and its objective (S, R; inf: infeasible), checking the
        candidate of least objective first (see :meth:`solve`)."""
        pr = self.problem
        hb = h + FEASIBILITY_TOL * (1.0 + np.abs(h))  # (S, R, m)
        check_e = len(self.keep) < self.q
        GT, ET = np.ascontiguousarray(pr.G.T), np.ascontiguousarray(self.E.T)
        eb = FEASIBILITY_TOL * (1.0 + np.abs(e)) if check_e else e

        def feasible(y: np.ndarray, hb: np.ndarray, e: np.ndarray, eb: np.ndarray) -> np.ndarray:
            """y (..., 3) against rows (..., m) and (..., q)."""
            y2 = y.reshape(-1, 3)
            ok = np.all((y2 @ GT).reshape(*y.shape[:-1], -1) <= hb, axis=-1)
            if check_e:
                ok &= np.all(np.abs((y2 @ ET).reshape(*y.shape[:-1], -1) - e) <= eb, axis=-1)
            return ok

        best = np.argmin(val, axis=1)  # (S, R)
        y = np.take_along_axis(Y, best[:, None, None, :], axis=1)[:, 0].transpose(0, 2, 1)
        v = np.take_along_axis(val, best[:, None], axis=1)[:, 0]
        ok = feasible(y, hb, e, eb) & (v != np.inf)  # a nan objective: argmin takes it first
        si, ri = np.nonzero(~ok)
        self.check_all = si.size > 0.25 * ok.size
        if si.size:
            Yr = Y[si, :, :, ri]  # (P, c, 3)
            okr = feasible(Yr, hb[si, ri][:, None], e[si, ri][:, None], eb[si, ri][:, None])
            vr = np.where(okr, val[si, :, ri], np.inf)
            br = np.argmin(vr, axis=1)
            y[si, ri] = Yr[np.arange(si.size), br]
            v[si, ri] = vr[np.arange(si.size), br]
        return y, v


def weighted_qp(problem: Problem, extra_E: np.ndarray | None = None) -> WeightedQP | ReducedQP:
    """The subproblems' solver: in the equalities' null space when at most two variables are
    free (:class:`~compromise.explore.reduced_qp.ReducedQP`), else the enumeration."""
    reduced = ReducedQP(problem, extra_E)
    return reduced if reduced.supported else WeightedQP(problem, extra_E)


def _objective(Y: np.ndarray, H: np.ndarray, ft: np.ndarray) -> np.ndarray:
    """``1/2 y'Hy + f'y`` of every candidate point: Y (S, c, 3, R), H (S, 3, 3), ft (S, 3, R).

    The products and sums in the order ``sum_a y_a (1/2 sum_b H_ab y_b + f_a)``, into
    buffers reused across the terms."""
    S, c, _, R = Y.shape
    val = np.empty((S, c, R))
    hy = np.empty_like(val)
    tmp = np.empty_like(val)
    for a in range(3):
        np.multiply(H[:, a, 0][:, None, None], Y[:, :, 0], out=hy)
        for b in (1, 2):
            np.multiply(H[:, a, b][:, None, None], Y[:, :, b], out=tmp)
            hy += tmp
        hy *= 0.5
        hy += ft[:, None, a]
        if a == 0:
            np.multiply(Y[:, :, 0], hy, out=val)
        else:
            np.multiply(Y[:, :, a], hy, out=tmp)
            val += tmp
    return val


@one_blas_thread
def weight_sensitivity(
    case: Case, *, spread: float = 10.0, samples: int = 2000, seed: int = 0
) -> Sensitivity:
    """How often each candidate design is the optimum when the weights vary.

    Parameters
    ----------
    case : Case
    spread : float
        Each weight is multiplied by a factor log-uniform in ``[1/spread, spread]`` (>= 1).
    samples : int
        Number of weight samples.
    seed : int
        Seed of the random generator (the same seed gives the same result).

    Returns
    -------
    Sensitivity
    """
    if not (math.isfinite(spread) and spread >= 1):
        raise CaseError(f"expected a spread >= 1, got {spread:g}", key="--spread")
    if samples < 1:
        raise CaseError(f"expected at least one sample, got {samples}", key="--samples")
    if case.sediment is not None:  # the material and grain size are decisions too
        from compromise.explore.granular_sensitivity import granular_sensitivity

        return granular_sensitivity(case, spread, samples, seed)
    problem = build_problem(case)
    if problem.nonlinear_groups:
        raise CaseError(
            f"group '{problem.nonlinear_groups[0]}' is not a power product; the "
            "sensitivity needs every group to be one",
            file=case.path,
            key=f"groups.{problem.nonlinear_groups[0]}",
        )
    K = problem.A.shape[0]
    factors = draw_factors(spread, samples, seed, K)
    spaces = [StateSpace(FluidStates(case, f, problem.used_properties)) for f in case.model.fluids]
    ratios = list(case.model.preferred_ratios) or [None]
    free = weighted_qp(problem)
    fixed = weighted_qp(problem, np.array([[1.0, 0.0, 0.0]])) if ratios[0] is not None else None
    all_f = np.vstack([np.ones((1, K)), factors])  # row 0: the nominal weights
    wins_obj, opt_y, opt_T, opt_fluid = [], [], [], []
    # a candidate that matches every weighted group at the case's weights matches them at any
    # weights: its mismatch in a sample lies between the least and the largest factor times
    # the nominal one (the nominal design stays feasible, and no design does better than the
    # least factor's share of the nominal optimum), a tie at zero in every sample. Such
    # candidates are "settled" by one fine solve at the case's weights and not re-solved.
    J0 = _restricted(
        free, fixed, problem.W * all_f[:1], spaces, ratios, zoom_rounds=REFINE_ZOOM_ROUNDS
    )[0]
    settled = np.isfinite(J0) & (J0 * spread <= ZERO_BAND)
    nominal: tuple[np.ndarray, ...] | None = None
    y, T, P, fl, Jo = _unrestricted(free, problem.W * all_f[:1], spaces)
    if math.isfinite(Jo[0]) and Jo[0] * spread <= ZERO_BAND:
        # likewise the unrestricted optimum: every sample's optimum matches every weighted
        # group, and the case's own optimum is one of them
        nominal = (y[0], T[0], P[0], fl[0])
    chunk = _chunk(free, fixed)
    for a in range(0, all_f.shape[0], chunk):
        f = all_f[a : a + chunk]
        W = problem.W * f
        J = _restricted(free, fixed, W, spaces, ratios, only=~settled)
        J[:, settled] = J0[settled] * np.max(f, axis=1)[:, None]
        if nominal is None:
            y, T, P, fl, Jo = _unrestricted(free, W, spaces)
        else:
            n = W.shape[0]
            y, T, P = np.tile(nominal[0], (n, 1)), np.full(n, nominal[1]), np.full(n, nominal[2])
            fl = np.full(n, nominal[3])
        wins_obj.append(J), opt_y.append(y), opt_T.append(np.column_stack([T, P]))
        opt_fluid.append(fl)
    J = np.vstack(wins_obj)  # (1 + samples, candidates)
    J = _refine(free, fixed, problem.W * all_f, J, spaces, ratios, settled)
    tallied = tally(
        J,
        [f for f in case.model.fluids for _ in ratios],
        ratios * len(case.model.fluids),
        _labels(case, ratios),
        samples,
    )
    y, TP, fl = np.vstack(opt_y), np.vstack(opt_T), np.concatenate(opt_fluid)
    ranges, optima = ranges_of(y, TP, fl, any(sp.variable_pressure for sp in spaces))
    return assemble(
        case, spread, seed, problem.objective_groups, factors, tallied, ranges, optima, fl
    )


def _chunk(free: WeightedQP | ReducedQP, fixed: WeightedQP | ReducedQP | None) -> int:
    """Samples per batch: the enumeration's memory grows with the samples, the reduced
    solver's state rows are shared by them."""
    reduced = isinstance(free, ReducedQP) and (fixed is None or isinstance(fixed, ReducedQP))
    return REDUCED_CHUNK if reduced else CHUNK


def _labels(case: Case, ratios: list[float | None]) -> list[str]:
    from compromise.units import format_ratio

    return [f if r is None else f"{f} {format_ratio(r)}" for f in case.model.fluids for r in ratios]


def _refine(
    free: WeightedQP | ReducedQP,
    fixed: WeightedQP | ReducedQP | None,
    W: np.ndarray,
    J: np.ndarray,
    spaces: list[StateSpace],
    ratios: list[float | None],
    settled: np.ndarray | None = None,
) -> np.ndarray:
    """``J`` (rows, candidates) with every row where two or more candidates are near the best
    solved again with a finer zoom (see the module docstring); candidates ``settled`` (tied at
    zero in every sample, see :func:`weight_sensitivity`) need no finer zoom."""
    low = np.min(J, axis=1, keepdims=True)
    near = np.isfinite(J) & (J <= low + REFINE_BAND + 1e-3 * np.abs(low))
    busy = np.ones(J.shape[1], dtype=bool) if settled is None else ~settled
    rows = np.flatnonzero((near.sum(axis=1) > 1) & (near & busy).any(axis=1))
    if rows.size == 0:
        return J
    out = J.copy()
    chunk = _chunk(free, fixed)
    for a in range(0, rows.size, chunk):
        r = rows[a : a + chunk]
        fine = _restricted(
            free, fixed, W[r], spaces, ratios, zoom_rounds=REFINE_ZOOM_ROUNDS, only=busy
        )
        out[r] = np.minimum(out[r], fine)
    return out


def _by_sample(
    qp: WeightedQP,
    W: np.ndarray,
    prep: tuple[np.ndarray, ...],
    sample: np.ndarray,
    p: np.ndarray,
    extra_e: np.ndarray | None = None,
) -> np.ndarray:
    """Weighted mismatch (N,) of subproblems of samples ``sample`` (N,) at property rows
    ``p`` (N, 6), by :meth:`WeightedQP.solve` on the rows grouped by sample (every sample of a
    batch has as many rows: whether a candidate is feasible does not depend on the weights)."""
    order = np.argsort(sample, kind="stable")
    u = np.unique(sample)
    R = sample.size // u.size
    sub = prep if u.size == W.shape[0] else tuple(x[u] for x in prep)
    ex = None if extra_e is None else extra_e[order].reshape(u.size, R, -1)
    J = qp.solve(W[u], sub, p[order].reshape(u.size, R, -1), ex)[1].ravel()
    out = np.empty_like(J)
    out[order] = J
    return out


def _restricted(
    free: WeightedQP | ReducedQP,
    fixed: WeightedQP | ReducedQP | None,
    W: np.ndarray,
    spaces: list[StateSpace],
    ratios: list[float | None],
    *,
    zoom_rounds: int = ZOOM_ROUNDS,
    only: np.ndarray | None = None,
) -> np.ndarray:
    """Weighted mismatch (S, fluids x ratios) of each candidate's best design (of the
    candidates ``only``, a mask, when given; the others inf)."""
    qp = free if fixed is None else fixed
    n_all = len(spaces) * len(ratios)
    cands = np.arange(n_all) if only is None else np.flatnonzero(only)
    out = np.full((W.shape[0], n_all), np.inf)
    if cands.size == 0:
        return out
    prep = qp.prepare(W)
    n_c, n_r = cands.size, len(ratios)
    lr = np.array([0.0 if r is None else math.log(r) for r in ratios])

    def evaluate(items: np.ndarray, table: np.ndarray, index: np.ndarray) -> np.ndarray:
        sample, ratio = items // n_c, cands[items % n_c] % n_r
        if isinstance(qp, ReducedQP):
            # every (state, ratio) pair once, then shared by the samples
            rows = np.repeat(table, n_r, axis=0) if fixed else table
            ex = np.tile(lr, table.shape[0])[:, None] if fixed else None
            st = qp.states(rows, ex)
            return qp.values(W, prep, st, sample, index * n_r + ratio if fixed else index)
        ex = lr[ratio][:, None] if fixed else None
        return _by_sample(qp, W, prep, sample, table[index], ex)

    fluid = np.tile(cands // len(ratios), W.shape[0])
    _, _, J = lower_envelope(
        spaces,
        fluid,
        evaluate,
        n_temperatures=N_TEMPERATURES,
        zoom_rounds=zoom_rounds,
        indexed=True,
    )
    out[:, cands] = J.reshape(W.shape[0], n_c)
    return out


def _unrestricted(
    qp: WeightedQP | ReducedQP, W: np.ndarray, spaces: list[StateSpace]
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The optimum of each sample: ``y`` (S, 3), temperature (S,) [K], pressure (S,) [Pa],
    fluid index (S,) and weighted mismatch (S,; inf: none feasible)."""
    prep = qp.prepare(W)
    F = len(spaces)

    def sub(u: np.ndarray) -> tuple[np.ndarray, ...]:
        return prep if u.size == W.shape[0] else tuple(x[u] for x in prep)

    def evaluate(items: np.ndarray, table: np.ndarray, index: np.ndarray) -> np.ndarray:
        if isinstance(qp, ReducedQP):
            return qp.values(W, prep, qp.states(table), items // F, index)
        return _by_sample(qp, W, prep, items // F, table[index])

    fluid = np.tile(np.arange(F), W.shape[0])
    T, lnp, J = lower_envelope(
        spaces,
        fluid,
        evaluate,
        n_temperatures=N_TEMPERATURES,
        zoom_rounds=ZOOM_ROUNDS,
        indexed=True,
    )
    J = J.reshape(W.shape[0], F)
    best = winners_of(J)
    S = W.shape[0]
    Jb = np.where(best >= 0, J[np.arange(S), np.maximum(best, 0)], np.inf)
    y = np.full((S, 3), np.nan)
    Tb = np.full(S, np.nan)
    Pb = np.full(S, np.nan)
    for k, sp in enumerate(spaces):
        s = np.flatnonzero(best == k)
        if s.size == 0:
            continue
        i = s * F + k
        p = sp.p(T[i], lnp[i])
        y[s] = qp.solve(W[s], sub(s), p[:, None, :])[0][:, 0]
        Tb[s] = T[i]
        Pb[s] = np.exp(lnp[i])
    return y, Tb, Pb, best, Jb
