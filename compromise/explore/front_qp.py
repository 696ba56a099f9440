"""The front's subproblems in the null space of their equality rows, sharing the fluid state.

A sweep of :mod:`compromise.explore.tradeoffs` solves, for every candidate fluid, epsilon value
and temperature of the search, the convex QP of one epsilon-constraint family
(:class:`~compromise.explore.tradeoffs.Scalarised`):

    minimise  1/2 y'Hy + f'y   subject to  G y <= h,  E y = e

with the Hessian ``H`` fixed; ``f``, ``h`` and ``e`` are linear in the property log-ratios ``p``,
and the epsilon values only shift the right-hand sides of the epsilon rows. Many epsilon values
meet the same fluid state (the grid's temperatures are shared, and a zoom's points repeat), so
what depends on the state alone is computed once per distinct state (:meth:`FrontQP.states`).

Where the equality rows leave two of the three log-ratios free (an exact Froude group: most
cases), ``y = y_p + D t`` as in :mod:`compromise.explore.reduced_qp`: ``y_p`` the least-norm
solution of the equalities and ``D`` an orthonormal basis of their null space. The objective is
``1/2 t'Qt + b't`` plus a constant with the fixed ``Q = D'HD`` and ``b = D'(H y_p + f)``, so
the unconstrained minimiser ``t* = -Q^-1 b`` depends on the state only. A pair (state,
epsilon) takes it where it meets every row; otherwise the optimum lies on a row that ``t*``
violates, at the minimiser along that row's line clipped to the segment the other rows leave,
on the row where the objective is least (Nocedal & Wright 2006, sections 16.2 and 16.5, from
memory: a strictly convex QP has one minimiser). This is the optimum the enumeration of active
sets (:class:`compromise.solving.qp.SmallQP`) finds; ``tests/test_front_qp.py`` checks one
against the other. Other cases (no equality, or more than one) keep the enumeration.

A row is met within the enumeration's tolerance (:data:`compromise.solving.qp.FEASIBILITY_TOL`,
relative to the row's right-hand side, epsilon included).

References
----------
Nocedal, J., Wright, S. J. (2006). *Numerical Optimization*, 2nd ed., sections 16.2 (the
null-space method) and 16.5 (active sets), from memory.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from compromise.explore.reduced_qp import PARALLEL, NullSpace
from compromise.solving.qp import FEASIBILITY_TOL


@dataclass(frozen=True)
class FrontStates:
    """What the subproblems owe to the fluid state alone, per distinct state (U of them).

    ``ok`` (U,): the equalities and the rows without epsilon can all be met; ``b`` (U, 2): the
    linear term in ``t``; ``t0``, ``t1`` (U,): the optimum under the rows without epsilon;
    ``hT``, ``GypT``, ``g0T``, ``gT`` (m, U): each row's right-hand side without epsilon, its
    value at ``y_p``, its room at ``t = 0``, and that room within tolerance (rows without
    epsilon); ``yp`` (U, 3). Stored row-major, so that a gather by state is one contiguous
    vector per row. With one free variable, ``t0`` is the unconstrained minimiser and
    ``interval`` the rows' interval ``(lo0, hi0, lo, hi)`` (exact, and within tolerance).
    """

    ok: np.ndarray
    b: np.ndarray
    t0: np.ndarray
    t1: np.ndarray
    hT: np.ndarray
    GypT: np.ndarray
    g0T: np.ndarray
    gT: np.ndarray
    yp: np.ndarray
    interval: tuple[np.ndarray, ...] = ()


class FrontQP(NullSpace):
    """The QPs of one epsilon-constraint family, for many states and epsilon values.

    Parameters
    ----------
    H : (3, 3) array
        The Hessian (the tie-break included).
    F, f0 : (3, 6) and (3,) arrays
        The linear term ``f = F p + f0``.
    G, h0, P : (m, 3), (m,), (m, 6) arrays
        The rows ``G y <= h0 + P p`` (epsilon not included).
    E, e0, Qe : (q, 3), (q,), (q, 6) arrays
        The equalities ``E y = e0 + Qe p``.
    slots : list of list of int
        The rows of each epsilon column (its value is added to their right-hand sides).
    """

    def __init__(
        self,
        H: np.ndarray,
        F: np.ndarray,
        f0: np.ndarray,
        G: np.ndarray,
        h0: np.ndarray,
        P: np.ndarray,
        E: np.ndarray,
        e0: np.ndarray,
        Qe: np.ndarray,
        slots: list[list[int]],
    ) -> None:
        super().__init__(E, G)
        self.H, self.F, self.f0 = H, F, f0
        self.G, self.h0, self.P = G, h0, P
        self.e0, self.Qe = e0, Qe
        self.slots = slots
        if not self.supported:
            return
        self.Q = self.D.T @ H @ self.D  # (k, k)
        if self.k == 2:
            self.Qinv = np.linalg.inv(self.Q)
            QU, QN = self.U @ self.Q, self.N @ self.Q
            self.uQu = np.sum(QU * self.U, axis=1)
            self.uQn = np.sum(QU * self.N, axis=1)
            self.nQn = np.sum(QN * self.N, axis=1)
        self.eps_rows = np.zeros(G.shape[0], dtype=int)  # epsilon column + 1 of each row
        for j, rows in enumerate(slots):
            self.eps_rows[rows] = j + 1
        self.eps_col = np.maximum(self.eps_rows - 1, 0)
        self.eps_all = np.flatnonzero(self.eps_rows > 0)  # every epsilon row

    def states(self, p: np.ndarray) -> FrontStates:
        """The state rows of property log-ratios ``p`` (U, 6): among them the optimum under
        the rows without epsilon (the epsilon rows only cut that polygon further)."""
        e = self.e0 + p @ self.Qe.T
        yp, ok = self.point(e)
        f = p @ self.F.T + self.f0
        b = (yp @ self.H + f) @ self.D  # (U, k)
        h = self.h0 + p @ self.P.T
        Gyp = yp @ self.G.T
        g0 = h - Gyp
        g = h + FEASIBILITY_TOL * (1.0 + np.abs(h)) - Gyp
        plain = self.eps_rows == 0
        if (self.fixed & plain).any():
            ok &= np.all(g[:, self.fixed & plain] >= 0.0, axis=1)
        rows = self.live[plain[self.live]]  # the live rows without epsilon
        U = p.shape[0]
        interval: tuple[np.ndarray, ...] = ()
        if self.k < 2:
            t = np.zeros((U, 2))
            if self.k == 1:
                t[:, 0] = -b[:, 0] / self.Q[0, 0]  # the unconstrained minimiser
                a = self.GD[rows, 0]
                up, down = a > 0, a < 0
                inf = np.full(U, np.inf)
                interval = (
                    np.max(g0[:, rows[down]] / a[down], axis=1) if down.any() else -inf,
                    np.min(g0[:, rows[up]] / a[up], axis=1) if up.any() else inf,
                    np.max(g[:, rows[down]] / a[down], axis=1) if down.any() else -inf,
                    np.min(g[:, rows[up]] / a[up], axis=1) if up.any() else inf,
                )
                ok &= interval[2] <= interval[3]
        else:
            t = -b @ self.Qinv.T  # the unconstrained minimiser
            GD = self.GD[rows]
            violated = t[:, 0:1] * GD[:, 0] + t[:, 1:2] * GD[:, 1] > g[:, rows]
            out = np.flatnonzero(violated.any(axis=1))
            if out.size:
                t_out, found = self._edges(
                    b[out], g0[out][:, rows], g[out][:, rows], violated[out], rows
                )
                t[out] = t_out
                ok[out] &= found
        return FrontStates(
            ok,
            b,
            np.ascontiguousarray(t[:, 0]),
            np.ascontiguousarray(t[:, 1]),
            np.ascontiguousarray(h.T),
            np.ascontiguousarray(Gyp.T),
            np.ascontiguousarray(g0.T),
            np.ascontiguousarray(g.T),
            yp,
            interval,
        )

    def solve(self, st: FrontStates, state: np.ndarray, eps: np.ndarray) -> np.ndarray:
        """Optimal ``y`` (N, 3; nan where infeasible) for the pairs of states ``state``
        (N,; rows of ``st``) and epsilon values ``eps`` (N, columns).

        Where the optimum without the epsilon rows meets them, it is the answer; otherwise one
        of the epsilon rows it violates is active at the optimum (else that point, feasible
        for a larger set, would be optimal there too), and the optimum is the best clipped
        minimiser along those rows' lines."""
        ok = st.ok.take(state)
        t0, t1 = st.t0.take(state), st.t1.take(state)
        # every epsilon row's room at t = 0, exact and within tolerance, and whether the
        # optimum without them violates it
        g0e, ge, viol = {}, {}, {}
        any_viol = np.zeros(state.size, dtype=bool)
        for r in self.eps_all:
            he = st.hT[r].take(state) + eps[:, self.eps_col[r]]
            gyp = st.GypT[r].take(state)
            g0e[r] = he - gyp
            ge[r] = he + FEASIBILITY_TOL * (1.0 + np.abs(he)) - gyp
            if self.fixed[r]:
                ok &= ge[r] >= 0.0
            elif self.k == 2:
                gd = self.GD[r]
                viol[r] = t0 * gd[0] + t1 * gd[1] > ge[r]
                any_viol |= viol[r]
        if self.k == 1:
            return self._one(st, state, ok, t0, g0e, ge)
        out = np.flatnonzero(any_viol & ok)
        if out.size:
            so = state[out]
            best = np.full(out.size, np.inf)
            found = np.zeros(out.size, dtype=bool)
            T0, T1 = t0[out], t1[out]
            b0, b1 = st.b[:, 0].take(so), st.b[:, 1].take(so)
            for i, r in enumerate(self.live):  # the epsilon rows' lines, in the rows' order
                if r not in viol:
                    continue
                sel = np.flatnonzero(viol[r][out])
                if sel.size == 0:
                    continue
                us = so[sel]
                d = g0e[r][out[sel]] / self.norms[i]  # the line's point nearest the origin
                inf = np.full(sel.size, np.inf)
                shi0, shi, slo0, slo = inf, inf, -inf, -inf
                edge = np.ones(sel.size, dtype=bool)
                for j, rj in enumerate(self.live):
                    if j == i:
                        continue
                    if rj in g0e:
                        a0, a = g0e[rj][out[sel]], ge[rj][out[sel]]
                    else:
                        a0, a = st.g0T[rj].take(us), st.gT[rj].take(us)
                    gn, gu = self.Gn[i, j], self.Gu[i, j]
                    room0, room = a0 - d * gn, a - d * gn
                    if gu > PARALLEL:
                        shi0, shi = np.minimum(shi0, room0 / gu), np.minimum(shi, room / gu)
                    elif gu < -PARALLEL:
                        slo0, slo = np.maximum(slo0, room0 / gu), np.maximum(slo, room / gu)
                    else:
                        edge &= room >= 0.0
                edge &= slo <= shi
                un, nn = self.U[i], self.N[i]
                bs0, bs1 = b0[sel], b1[sel]
                ub = bs0 * un[0] + bs1 * un[1]
                nb = bs0 * nn[0] + bs1 * nn[1]
                uQu, uQn, nQn = self.uQu[i], self.uQn[i], self.nQn[i]
                # along t = d n + s u: psi = s^2 u'Qu/2 + s (d u'Qn + u'b) + d^2 n'Qn/2 + d n'b
                sv = np.minimum(np.maximum(-(d * uQn + ub) / uQu, slo0), shi0)
                psi = 0.5 * (d * d * nQn + sv * sv * uQu) + d * sv * uQn + d * nb + sv * ub
                better = edge & (psi < best[sel])  # the first row of equals
                upd = sel[better]
                best[upd] = psi[better]
                T0[upd] = d[better] * nn[0] + sv[better] * un[0]
                T1[upd] = d[better] * nn[1] + sv[better] * un[1]
                found[upd] = True
            t0[out], t1[out] = T0, T1
            ok[out] &= found
        return self._y(st, state, t0, t1, ok)

    def _one(
        self,
        st: FrontStates,
        state: np.ndarray,
        ok: np.ndarray,
        tstar: np.ndarray,
        g0e: dict[int, np.ndarray],
        ge: dict[int, np.ndarray],
    ) -> np.ndarray:
        """One free variable: the minimiser ``tstar`` clipped to the interval the rows leave,
        the epsilon rows' bounds added to the state's; ``y`` (nan where infeasible: not ``ok``
        so far, or an empty interval)."""
        lo0, hi0, lo, hi = (x.take(state) for x in st.interval)
        for r in self.eps_all:
            if self.fixed[r]:
                continue
            a = self.GD[r, 0]
            if a > 0:
                hi0, hi = np.minimum(hi0, g0e[r] / a), np.minimum(hi, ge[r] / a)
            else:
                lo0, lo = np.maximum(lo0, g0e[r] / a), np.maximum(lo, ge[r] / a)
        ok &= lo <= hi
        t = np.minimum(np.maximum(tstar, lo0), hi0)
        return self._y(st, state, t, t, ok)

    def _y(
        self, st: FrontStates, state: np.ndarray, t0: np.ndarray, t1: np.ndarray, ok: np.ndarray
    ) -> np.ndarray:
        y = st.yp[state].copy()
        if self.k >= 1:
            y += t0[:, None] * self.D[:, 0]
        if self.k == 2:
            y += t1[:, None] * self.D[:, 1]
        y[~ok] = np.nan
        return y

    def _edges(
        self,
        b: np.ndarray,
        g0: np.ndarray,
        g: np.ndarray,
        violated: np.ndarray,
        rows: np.ndarray,
    ) -> tuple[np.ndarray, np.ndarray]:
        """Along each violated row's line, the minimiser clipped to the segment the other rows
        leave; the row of least objective (the first of equals). ``rows`` (L,): the live rows
        (of ``G``) that the columns of ``g0``, ``g`` and ``violated`` (P, L) stand for; ``b``
        (P, 2)."""
        P, L = violated.shape
        pos_ = np.searchsorted(self.live, rows)  # their places among the live rows
        Gn = self.Gn[np.ix_(pos_, pos_)]
        Gu = self.Gu[np.ix_(pos_, pos_)]
        norms, Nr, Ur = self.norms[pos_], self.N[pos_], self.U[pos_]
        uQu_, uQn_, nQn_ = self.uQu[pos_], self.uQn[pos_], self.nQn[pos_]
        pi, pj = np.nonzero(violated)  # row-major: by subproblem
        d = g0[pi, pj] / norms[pj]  # the line's point nearest the origin: d n
        room0 = g0[pi] - d[:, None] * Gn[pj]  # (pairs, L)
        room = g[pi] - d[:, None] * Gn[pj]
        Gup = Gu[pj]
        pos, neg = Gup > PARALLEL, Gup < -PARALLEL
        with np.errstate(divide="ignore", invalid="ignore"):
            r0, r1 = room0 / Gup, room / Gup
        shi0 = np.min(np.where(pos, r0, np.inf), axis=1)
        shi = np.min(np.where(pos, r1, np.inf), axis=1)
        slo0 = np.max(np.where(neg, r0, -np.inf), axis=1)
        slo = np.max(np.where(neg, r1, -np.inf), axis=1)
        edge = (slo <= shi) & np.all(pos | neg | (room >= 0.0), axis=1)
        un, nn = Ur[pj], Nr[pj]
        bo = b[pi]
        ub = bo[:, 0] * un[:, 0] + bo[:, 1] * un[:, 1]
        nb = bo[:, 0] * nn[:, 0] + bo[:, 1] * nn[:, 1]
        uQu, uQn, nQn = uQu_[pj], uQn_[pj], nQn_[pj]
        # along t = d n + s u: psi = s^2 u'Qu/2 + s (d u'Qn + u'b) + d^2 n'Qn/2 + d n'b
        sv = np.minimum(np.maximum(-(d * uQn + ub) / uQu, slo0), shi0)
        psi = 0.5 * (d * d * nQn + sv * sv * uQu) + d * sv * uQn + d * nb + sv * ub
        psi = np.where(edge, psi, np.inf)
        grid = np.full(P * L, np.inf)
        flat = pi * L + pj
        grid[flat] = psi
        chosen = np.arange(P) * L + np.argmin(grid.reshape(P, L), axis=1)
        found = np.isfinite(grid[chosen])
        k = np.searchsorted(flat, chosen[found])
        t = np.zeros((P, 2))
        t[found] = d[k, None] * nn[k] + sv[k, None] * un[k]
        return t, found
