"""The weight-sensitivity subproblems in the null space of their equality rows.

For every weight sample, :mod:`compromise.explore.sensitivity` solves the convex subproblem of
each candidate at many fluid states:

    minimise  sum_k W_k (a_k . y + r_k)^2 + reg |y - y0|^2   subject to  G y <= h,  E y = e

over the three log-ratios ``y`` (the weights ``W`` and the regularisation ``reg`` per sample;
``r``, ``h`` and ``e`` per fluid state). The equality rows (a group kept exactly, a fixed
preferred ratio, a fixed distortion) leave ``y = y_p + D t``: ``y_p`` the least-norm solution of
the equalities, ``D`` an orthonormal basis of their null space, and only ``k = 3 - rank(E)``
free variables ``t``. The objective is ``t' Q t + 2 b' t`` plus a constant, with
``Q = (A D)' W (A D) + reg I`` per sample, and the rows ``(G D) t <= h - G y_p``.

* ``k = 1`` (a candidate at a fixed ratio in a Froude model): the unconstrained minimiser,
  clipped to the interval the rows leave.
* ``k = 2``: the unconstrained minimiser where it is feasible; otherwise the optimum lies on the
  boundary of the feasible polygon, on the edge where the objective is least: along each edge's
  line, the minimiser clipped to the segment the other rows leave.
* ``k = 0``: the one point, if feasible.

A strictly convex QP has one minimiser, so this is the optimum the enumeration of active sets
(:class:`compromise.explore.sensitivity.WeightedQP`) finds, in a few array operations per
sample and state instead of one product per candidate active set. A row is met within the
solver's tolerance (:data:`compromise.solving.qp.FEASIBILITY_TOL`); a point on a row's boundary
is placed on the exact boundary, as the enumeration's active rows are. Three free variables
(no equality row) stay with the enumeration.

References
----------
Nocedal, J., Wright, S. J. (2006). *Numerical Optimization*, 2nd ed., sections 16.2 (the
null-space method for equality-constrained quadratic programs) and 16.5 (active sets), from
memory.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from compromise.solving.grid import REGULARISATION
from compromise.solving.problem import Problem
from compromise.solving.qp import FEASIBILITY_TOL, independent_rows

PARALLEL = 1e-12  # |G_j D| below this (relative to |G_j|): the row is fixed by the equalities


def tie_break_point(problem: Problem) -> np.ndarray:
    """The point ``y0`` the regularisation leans toward: the largest, least distorted model
    with Froude velocities (as the solver's tie-break)."""
    m_ = problem.case.model
    x0 = math.log(m_.horizontal_ratio[1])
    z0 = x0 + math.log(m_.distortion[0])
    return np.array([x0, z0, 0.5 * z0])


@dataclass(frozen=True)
class States:
    """What the subproblems owe to the fluid state alone, per distinct state (rows).

    ``betaT`` (K, U): the groups' residuals at ``t = 0``; ``c`` (U, k): ``(y_p - y0) D``, the
    regularisation's pull; ``ok`` (U,): the other equalities and the fixed rows are met (and,
    with one free variable, the interval is not empty). One free variable: the interval
    ``[lo0, hi0]`` the rows leave. Two: the live rows' room ``g`` (U, L) within tolerance,
    and along each row's line the point ``d n``, the segment ``[slo0, shi0]`` the other rows
    leave and whether it is not empty (``edge``); ``yp`` (U, 3): the equalities' point. The
    residuals are stored group-major, so that a gather by state is one contiguous vector per
    group.
    """

    betaT: np.ndarray
    c: np.ndarray
    ok: np.ndarray
    lo0: np.ndarray
    hi0: np.ndarray
    g: np.ndarray
    d: np.ndarray
    slo0: np.ndarray
    shi0: np.ndarray
    edge: np.ndarray
    yp: np.ndarray


class NullSpace:
    """Equality rows ``E y = e`` as ``y = y_p + D t`` and inequality rows ``G y <= h`` in the
    free variables ``t``: what the sensitivity's and the front's null-space solvers share.

    Parameters
    ----------
    E : (q, 3) array
        Equality normals (dependent rows are checked, not used, see :meth:`point`).
    G : (m, 3) array
        Inequality normals. A row whose normal the equalities fix (``|G_j D|`` below
        :data:`PARALLEL` of ``|G_j|``) is ``fixed``: it holds or not whatever ``t``. With two
        free variables, each live row's line has the unit normal ``N``, the direction ``U``,
        and the other live rows' normals along them ``Gn`` and ``Gu`` (L, L).
    """

    def __init__(self, E: np.ndarray, G: np.ndarray) -> None:
        keep = independent_rows(E)
        self.E, self.keep = E, keep
        self.others = [j for j in range(E.shape[0]) if j not in keep]
        if keep:
            Ek = E[keep]
            self.pinv = Ek.T @ np.linalg.inv(Ek @ Ek.T)  # (3, rank)
            self.D = np.linalg.svd(Ek)[2][len(keep) :].T  # (3, k), orthonormal
        else:
            self.pinv = np.zeros((3, 0))
            self.D = np.eye(3)
        self.k = self.D.shape[1]
        self.GD = G @ self.D  # (m, k)
        scale = np.maximum(1.0, np.linalg.norm(G, axis=1))
        self.fixed = np.linalg.norm(self.GD, axis=1) <= PARALLEL * scale
        self.live = np.flatnonzero(~self.fixed)
        if self.k == 2:
            self.GD_live = self.GD[self.live]
            self.norms = np.linalg.norm(self.GD_live, axis=1)
            self.N = self.GD_live / self.norms[:, None]
            self.U = np.column_stack([-self.N[:, 1], self.N[:, 0]])
            self.Gn = self.N @ self.GD_live.T  # (L, L): row i's n against every live row
            self.Gu = self.U @ self.GD_live.T

    @property
    def supported(self) -> bool:
        """Whether at most two variables are free (else the enumeration is used)."""
        return self.k <= 2

    def point(self, e: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """The least-norm solutions ``y_p`` (U, 3) of the independent equality rows for
        right-hand sides ``e`` (U, q), and whether the other rows hold there within the
        solver's tolerance (U,)."""
        yp = e[:, self.keep] @ self.pinv.T
        ok = np.ones(e.shape[0], dtype=bool)
        if self.others:
            eo = e[:, self.others]
            gap = np.abs(yp @ self.E[self.others].T - eo)
            ok &= np.all(gap <= FEASIBILITY_TOL * (1.0 + np.abs(eo)), axis=1)
        return yp, ok


class ReducedQP(NullSpace):
    """The subproblems of a problem for many weight vectors, in the equalities' null space.

    Parameters
    ----------
    problem : Problem
    extra_E : (j, 3) array, optional
        Extra equality rows (a fixed horizontal ratio).
    """

    def __init__(self, problem: Problem, extra_E: np.ndarray | None = None) -> None:
        self.problem = problem
        self.extra = np.zeros((0, 3)) if extra_E is None else np.atleast_2d(extra_E)
        super().__init__(np.vstack([problem.E, self.extra]), problem.G)
        self.alpha = problem.A @ self.D  # (K, k)
        self.y0 = tie_break_point(problem)

    def prepare(self, W: np.ndarray) -> tuple[np.ndarray, ...]:
        """Per-sample ``Q`` (S, k, k) and regularisation (S,) for weights ``W`` (S, K)."""
        A = self.problem.A
        H = 2.0 * np.einsum("ki,sk,kj->sij", A, W, A)
        reg = REGULARISATION * np.maximum(1.0, np.trace(H, axis1=1, axis2=2) / 3.0)
        Q = np.einsum("ki,sk,kj->sij", self.alpha, W, self.alpha)
        Q = Q + reg[:, None, None] * np.eye(self.k)
        if self.k != 2:
            return Q, reg
        # along each live row's line (for :meth:`values`): u'Qu, u'Qn, n'Qn (S, L)
        QU, QN = Q @ self.U.T, Q @ self.N.T  # (S, 2, L)
        uQu = np.einsum("sal,la->sl", QU, self.U)
        uQn = np.einsum("sal,la->sl", QU, self.N)
        nQn = np.einsum("sal,la->sl", QN, self.N)
        return Q, reg, uQu, uQn, nQn

    def states(self, p: np.ndarray, extra_e: np.ndarray | None = None) -> States:
        """What the subproblems owe to the fluid state alone, for property rows ``p`` (U, 6)
        (and the extra equalities' right-hand sides ``extra_e`` (U, j)): computed once per
        distinct state, then shared by every weight sample (:meth:`values`)."""
        pr = self.problem
        r = p @ pr.B.T  # (U, K)
        h = pr.h0 + p @ pr.P.T  # (U, m)
        e = pr.e0 + p @ pr.Q.T
        if self.extra.shape[0]:
            e = np.concatenate([e, extra_e], axis=1)
        yp, ok = self.point(e)
        Gyp = yp @ pr.G.T
        g0 = h - Gyp  # the rows' room at t = 0
        g = h + FEASIBILITY_TOL * (1.0 + np.abs(h)) - Gyp  # within tolerance
        if self.fixed.any():
            ok &= np.all(g[:, self.fixed] >= 0.0, axis=1)
        beta = yp @ pr.A.T + r  # the residuals at t = 0
        c = (yp - self.y0) @ self.D  # the regularisation's pull at t = 0, per unit reg
        U = p.shape[0]
        empty = np.zeros((U, 0))
        lo0 = hi0 = np.zeros(U)
        g_live = d = slo0 = shi0 = empty
        edge = np.zeros((U, 0), dtype=bool)
        is_live = ~self.fixed
        if self.k == 1:
            a = self.GD[:, 0]
            up, down = is_live & (a > 0), is_live & (a < 0)
            inf = np.full(U, np.inf)
            hi0 = np.min(g0[:, up] / a[up], axis=1) if up.any() else inf
            hi = np.min(g[:, up] / a[up], axis=1) if up.any() else inf
            lo0 = np.max(g0[:, down] / a[down], axis=1) if down.any() else -inf
            lo = np.max(g[:, down] / a[down], axis=1) if down.any() else -inf
            ok &= lo <= hi
        elif self.k == 2:
            g_live = g[:, is_live]
            d = g0[:, is_live] / self.norms  # each row's line: the point d n nearest the origin
            # for every line i, the other rows j along it: room (U, i, j) and direction Gu (i, j)
            room0 = g0[:, None, is_live] - d[:, :, None] * self.Gn
            room = g_live[:, None, :] - d[:, :, None] * self.Gn
            pos, neg = self.Gu > PARALLEL, self.Gu < -PARALLEL
            par = ~pos & ~neg
            with np.errstate(divide="ignore", invalid="ignore"):
                up0, up1 = room0 / self.Gu, room / self.Gu
            shi0 = np.min(np.where(pos, up0, np.inf), axis=2)
            shi = np.min(np.where(pos, up1, np.inf), axis=2)
            slo0 = np.max(np.where(neg, up0, -np.inf), axis=2)
            slo = np.max(np.where(neg, up1, -np.inf), axis=2)
            edge = (slo <= shi) & np.all(~par | (room >= 0.0), axis=2)
        return States(
            np.ascontiguousarray(beta.T),
            c,
            ok,
            lo0,
            hi0,
            g_live,
            d,
            slo0,
            shi0,
            edge,
            yp,
        )

    def values(
        self,
        W: np.ndarray,
        prep: tuple[np.ndarray, ...],
        states: States,
        sample: np.ndarray,
        state: np.ndarray,
    ) -> np.ndarray:
        """Weighted mismatch (N,) of the subproblems of samples ``sample`` (N,; rows of ``W``
        (S, K) and ``prep``) at states ``state`` (N,; rows of ``states``); ``inf`` where
        infeasible. What depends on the state alone comes from the shared state rows.

        Every quantity is gathered as one contiguous vector per group (or row), and the sums
        over groups are written out term by term in the groups' order."""
        return self._optimum(W, prep, states, sample, state)[1]

    def _optimum(
        self,
        W: np.ndarray,
        prep: tuple[np.ndarray, ...],
        states: States,
        sample: np.ndarray,
        state: np.ndarray,
    ) -> tuple[list[np.ndarray], np.ndarray]:
        """The optimum's free variables ``t`` (k vectors (N,)) and weighted mismatch (N,;
        ``inf`` where infeasible) of :meth:`values`."""
        Q, reg = prep[0], prep[1]
        K = W.shape[1]
        WT = np.ascontiguousarray(W.T)
        Wn = [WT[i].take(sample) for i in range(K)]
        beta = [states.betaT[i].take(state) for i in range(K)]
        wb = [Wn[i] * beta[i] for i in range(K)]
        ok = states.ok.take(state)
        t: list[np.ndarray] = []
        if self.k == 0:
            res = beta
        elif self.k == 1:
            a = self.alpha[:, 0]
            b = _dot(wb, a) + reg.take(sample) * states.c[:, 0].take(state)
            t0 = -b / Q[:, 0, 0].take(sample)
            t = [np.minimum(np.maximum(t0, states.lo0.take(state)), states.hi0.take(state))]
            res = [beta[i] + t[0] * a[i] for i in range(K)]
        else:
            t0, t1, inside = self._two_values(prep, wb, reg, states, sample, state)
            ok &= inside
            t = [t0, t1]
            res = [beta[i] + (t0 * self.alpha[i, 0] + t1 * self.alpha[i, 1]) for i in range(K)]
        J = Wn[0] * (res[0] * res[0])
        for i in range(1, K):
            J += Wn[i] * (res[i] * res[i])
        J[~ok] = np.inf
        return t, J

    def _two_values(
        self,
        prep: tuple[np.ndarray, ...],
        wb: list[np.ndarray],
        reg: np.ndarray,
        states: States,
        sample: np.ndarray,
        state: np.ndarray,
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Two free variables: the unconstrained minimiser where it meets every row, else the
        best edge (see the module docstring); the point ``t`` (two vectors (N,)) and whether
        the subproblem is feasible."""
        Q = prep[0]
        rg = reg.take(sample)
        b0 = _dot(wb, self.alpha[:, 0]) + rg * states.c[:, 0].take(state)
        b1 = _dot(wb, self.alpha[:, 1]) + rg * states.c[:, 1].take(state)
        q00, q01, q11 = (Q[:, i, j].take(sample) for i, j in ((0, 0), (0, 1), (1, 1)))
        det = q00 * q11 - q01 * q01
        t0 = (q01 * b1 - q11 * b0) / det
        t1 = (q01 * b0 - q00 * b1) / det
        L = self.GD_live.shape[0]
        GD = self.GD_live
        violated = t0[:, None] * GD[:, 0] + t1[:, None] * GD[:, 1] > states.g[state]  # (N, L)
        found = ~violated.any(axis=1)
        out = np.flatnonzero(~found)
        if out.size == 0:
            return t0, t1, found
        # along each violated row's line, the minimiser clipped to its segment;
        # computed for the (subproblem, row) pairs where that segment is not empty
        uQu, uQn, nQn = prep[2], prep[3], prep[4]  # (S, L)
        every = out.size == found.size
        so, uo = (sample, state) if every else (sample[out], state[out])
        pi, pj = np.nonzero((violated if every else violated[out]) & states.edge[uo])
        ks = so[pi] * L + pj  # flat indices into (S, L) and (U, L)
        ku = uo[pi] * L + pj
        rows = pi if every else out[pi]
        b0o, b1o = b0.take(rows), b1.take(rows)
        un0, un1, nn0, nn1 = (
            self.U[:, 0].take(pj),
            self.U[:, 1].take(pj),
            self.N[:, 0].take(pj),
            self.N[:, 1].take(pj),
        )
        ub = b0o * un0 + b1o * un1
        nb = b0o * nn0 + b1o * nn1
        d = states.d.take(ku)
        uqn, uqu = uQn.take(ks), uQu.take(ks)
        sv = np.minimum(
            np.maximum(-(d * uqn + ub) / uqu, states.slo0.take(ku)), states.shi0.take(ku)
        )
        psi = d * d * nQn.take(ks) + 2.0 * d * sv * uqn + sv * sv * uqu + 2.0 * (d * nb + sv * ub)
        # the least psi of each subproblem (the first row of equals)
        flat = pi * L + pj  # increasing: the pairs are in row-major order
        grid = np.full(out.size * L, np.inf)
        grid[flat] = psi
        chosen = np.arange(out.size) * L + np.argmin(grid.reshape(out.size, L), axis=1)
        hit = np.zeros(out.size, dtype=bool)
        hit[pi] = True
        k = np.searchsorted(flat, chosen[hit])
        where = out[hit]
        t0[where] = d[k] * nn0[k] + sv[k] * un0[k]
        t1[where] = d[k] * nn1[k] + sv[k] * un1[k]
        found[out] = hit
        return t0, t1, found

    def solve(
        self,
        W: np.ndarray,
        prep: tuple[np.ndarray, ...],
        p: np.ndarray,
        extra_e: np.ndarray | None = None,
    ) -> tuple[np.ndarray, np.ndarray]:
        """Optimal ``y`` (S, R, 3) and weighted mismatch (S, R) for weights ``W`` (S, K) and
        property log-ratios ``p`` (S, R, 6); ``inf`` where infeasible (``y`` then nan)."""
        S, R = p.shape[0], p.shape[1]
        ex = None
        if self.extra.shape[0]:
            ex = np.broadcast_to(extra_e, (S, R, self.extra.shape[0])).reshape(S * R, -1)
        states = self.states(p.reshape(S * R, -1), ex)
        state = np.arange(S * R)
        t, J = self._optimum(W, prep, states, np.repeat(np.arange(S), R), state)
        y = states.yp.copy()
        for i, ti in enumerate(t):
            y += ti[:, None] * self.D[:, i]
        y[~np.isfinite(J)] = np.nan
        return y.reshape(S, R, 3), J.reshape(S, R)


def _dot(terms: list[np.ndarray], coef: np.ndarray) -> np.ndarray:
    """``sum_i terms[i] * coef[i]``, term by term in order."""
    out = terms[0] * coef[0]
    for i in range(1, len(terms)):
        out += terms[i] * coef[i]
    return out
