"""Exact solution of many small convex quadratic programs that share their matrices.

Every subproblem of the solver (one model fluid at one temperature) is

    minimise   1/2 y' H y + f' y
    subject to G y <= h,   E y = e

with the same ``H``, ``G`` and ``E`` and only ``f``, ``h`` and ``e`` changing. With three
variables the optimum's active set has at most three independent rows, so all candidate active
sets can be enumerated once; for each, the KKT system is inverted once, and the solution of a
subproblem for that active set is a matrix-vector product. The optimum of each subproblem is the
best candidate that is feasible: for a strictly convex QP the optimum is the minimiser over the
affine set of some linearly independent subset of its active rows (Caratheodory's theorem applied
to the KKT conditions), so the search is exact, not heuristic.

References
----------
Nocedal, J., Wright, S. J. (2006). *Numerical Optimization*, 2nd ed., ch. 16 (KKT conditions of
quadratic programs, active sets), from memory.
Goldfarb, D., Idnani, A. (1983). A numerically stable dual method for solving strictly convex
quadratic programs. *Mathematical Programming* 27, 1-33 (the method of the ``quadprog``
package, used past :data:`MAX_ENUMERATED_ROWS` distinct rows), from memory.
"""

from __future__ import annotations

import copy
import itertools
from dataclasses import dataclass, field

import numpy as np

FEASIBILITY_TOL = 1e-9  # [-] on log-ratios
CHUNK = 20000  # subproblems per batch (bounds the memory of the enumeration)
MAX_ENUMERATED_ROWS = 40  # distinct inequality normals up to which active sets are enumerated
BLOCK_VALUES = 2**16  # row values (candidates x rows x columns) checked per block of columns


def independent_rows(E: np.ndarray) -> list[int]:
    """Indices of a linearly independent subset of the rows of ``E``, first rows first."""
    keep: list[int] = []
    for j in range(E.shape[0]):
        if np.linalg.matrix_rank(E[[*keep, j]], tol=1e-10) == len(keep) + 1:
            keep.append(j)
    return keep


@dataclass(frozen=True)
class QPBatch:
    """Solutions of a batch of subproblems.

    Attributes
    ----------
    y : numpy.ndarray
        (N, n) optimal points (nan where infeasible).
    objective : numpy.ndarray
        (N,) optimal values of ``1/2 y'Hy + f'y`` (inf where infeasible).
    active : numpy.ndarray
        (N,) index of the optimal candidate active set (-1 where infeasible).
    """

    y: np.ndarray
    objective: np.ndarray
    active: np.ndarray
    feasible: np.ndarray = field(repr=False)


class SmallQP:
    """Enumerated active-set solver for a family of small strictly convex QPs.

    Parameters
    ----------
    H : (n, n) array
        Positive definite Hessian.
    G : (m, n) array
        Inequality normals.
    E : (q, n) array
        Equality normals.
    """

    def __init__(self, H: np.ndarray, G: np.ndarray, E: np.ndarray) -> None:
        self.H = np.asarray(H, dtype=float)
        G = np.asarray(G, dtype=float).reshape(-1, self.H.shape[0])
        self.E = np.asarray(E, dtype=float)
        n = self.H.shape[0]
        # rows with the same normal (limits on quantities that scale alike, such as several
        # lengths) collapse to one row whose bound is, per subproblem, the tightest of theirs:
        # the feasible set is the same, and the enumeration grows with distinct normals only
        self.m_rows = G.shape[0]
        self.G, group = G, np.arange(G.shape[0])
        if G.shape[0]:
            unique, inverse = np.unique(G, axis=0, return_inverse=True)
            if unique.shape[0] < G.shape[0]:
                self.G, group = unique, np.asarray(inverse).reshape(-1)
        self._order = np.argsort(group, kind="stable")
        counts = np.bincount(group, minlength=self.G.shape[0])
        self._starts = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(int)
        self._collapsed = self.G.shape[0] < self.m_rows
        #: the input rows of each distinct normal, by distinct normal
        self._members = np.split(self._order, self._starts[1:])
        m, q = self.G.shape[0], self.E.shape[0]
        self.n, self.m, self.q = n, m, q
        # an independent subset of the equality rows; the others are checked as feasibility
        eq_keep = independent_rows(self.E)
        self.eq_keep = eq_keep
        self._check_eq = len(eq_keep) < q
        # past MAX_ENUMERATED_ROWS distinct normals the candidate active sets grow as m^3 (200
        # rows: 1.3 million KKT systems): each subproblem then goes to a dual active-set solver
        self.enumerated = m <= MAX_ENUMERATED_ROWS
        if not self.enumerated:
            return
        free = n - len(eq_keep)
        ne = len(eq_keep)
        Ek = self.E[eq_keep]
        # the candidate active sets (those whose rows, with the kept equalities, are
        # independent) depend on the rows alone; their KKT maps on the Hessian too
        self._sets: list[tuple[int, np.ndarray, np.ndarray]] = []  # (k, combos, C)
        for k in range(0, min(free, m) + 1):
            tuples = list(itertools.combinations(range(m), k))
            combos = np.array(tuples, dtype=int).reshape(len(tuples), k)
            nc = ne + k
            C = np.concatenate(
                [np.broadcast_to(Ek, (len(combos), ne, n)), self.G[combos]], axis=1
            )  # (s, nc, n)
            if nc:
                sv = np.linalg.svd(C, compute_uv=False)  # (s, nc)
                ok = sv[:, -1] > 1e-10 * np.maximum(sv[:, 0], 1.0)
                combos, C = combos[ok], C[ok]
            if len(combos) == 0:
                continue
            self._sets.append((k, combos, C))
        self.subsets = [tuple(int(v) for v in c) for _, combos, _ in self._sets for c in combos]
        self._kkt()

    def with_hessians(self, Hs: np.ndarray) -> list[SmallQP]:
        """The same rows with other Hessians ``Hs`` (S, n, n): the candidate active sets are
        reused, and the KKT systems of all of them inverted in one batch (each one the same
        numbers as in a new :class:`SmallQP`)."""
        Hs = np.asarray(Hs, dtype=float)
        out = []
        parts = self._kkt_batch(Hs) if self.enumerated else None
        for s in range(Hs.shape[0]):
            other = copy.copy(self)
            other.H = Hs[s]
            if parts is not None:
                other._set_kkt([(k, combos, M[s]) for k, combos, M in parts])
            out.append(other)
        return out

    def _kkt(self) -> None:
        """The map from the right-hand side ``[-f, e, h]`` to every candidate's point."""
        parts = self._kkt_batch(self.H[None])
        self._set_kkt([(k, combos, M[0]) for k, combos, M in parts])

    def _kkt_batch(self, Hs: np.ndarray) -> list[tuple[int, np.ndarray, np.ndarray]]:
        """Per candidate size ``k``: the candidates and their maps (S, ns, n + nc, r) for the
        Hessians ``Hs`` (S, n, n)."""
        n, m, q = self.n, self.m, self.q
        eq_keep = self.eq_keep
        ne = len(eq_keep)
        r = n + q + m  # full right-hand side: [-f, e, h]
        S = Hs.shape[0]
        parts = []
        for k, combos, C in self._sets:
            nc = ne + k
            ns = len(combos)
            K = np.zeros((S, ns, n + nc, n + nc))
            K[:, :, :n, :n] = Hs[:, None]
            K[:, :, :n, n:] = C.transpose(0, 2, 1)
            K[:, :, n:, :n] = C
            Kinv = np.linalg.inv(K)
            # scatter the columns of Kinv into the full right-hand-side layout [-f, e, h]
            M = np.zeros((S, ns, n + nc, r))
            M[..., :n] = Kinv[..., :n]
            for i, j in enumerate(eq_keep):
                M[..., n + j] = Kinv[..., n + i]
            rows = np.arange(ns)
            for i in range(k):
                # advanced indices around a slice come first: (ns, S, n + nc)
                M[:, rows, :, n + q + combos[:, i]] = Kinv[..., n + ne + i].transpose(1, 0, 2)
            parts.append((k, combos, M))
        return parts

    def _set_kkt(self, parts: list[tuple[int, np.ndarray, np.ndarray]]) -> None:
        n, r = self.n, self.n + self.q + self.m
        self._kkt_parts = parts
        allmaps = np.concatenate([M[:, :n, :] for _, _, M in parts], axis=0)  # (s, n, r)
        self._maps = allmaps.reshape(len(self.subsets) * n, r)
        self._mults_cache: np.ndarray | None = None

    @property
    def _mults(self) -> np.ndarray:
        """Per candidate, the map from the right-hand side to the inequality multipliers
        (built on first use: only the binding costs need it)."""
        if self._mults_cache is None:
            n, m, ne = self.n, self.m, len(self.eq_keep)
            r = n + self.q + m
            mults = []
            for k, combos, M in self._kkt_parts:
                rows = np.arange(len(combos))
                L = np.zeros((len(combos), m, r))
                for i in range(k):
                    L[rows, combos[:, i], :] = M[:, n + ne + i, :]
                mults.append(L)
            self._mults_cache = np.concatenate(mults, axis=0)
        return self._mults_cache

    def solve(self, f: np.ndarray, h: np.ndarray, e: np.ndarray) -> QPBatch:
        """Solve the subproblems with linear terms ``f`` (N, n), ``h`` (N, m), ``e`` (N, q)."""
        f = np.atleast_2d(np.asarray(f, dtype=float))
        N = f.shape[0]
        # (the broadcasts are views of the same numbers, skipped where the shape is right)
        h = np.asarray(h, dtype=float).reshape(-1, self.m_rows) if self.m_rows else np.zeros((1, 0))
        if h.shape[0] != N:
            h = np.broadcast_to(h, (N, self.m_rows))
        h = self._tightest(h)
        e = np.asarray(e, dtype=float).reshape(-1, self.q) if self.q else np.zeros((1, 0))
        if e.shape[0] != N:
            e = np.broadcast_to(e, (N, self.q))
        solve = self._solve if self.enumerated else self._solve_active_set
        if N <= CHUNK:  # one chunk: its arrays as they are (fresh, C-ordered), no copies
            y, obj, active = solve(f, h, e)
            if y.flags.c_contiguous and active.dtype == np.dtype(int):
                return QPBatch(y=y, objective=obj, active=active, feasible=np.isfinite(obj))
        y, obj = np.empty((N, self.n)), np.empty(N)
        active = np.empty(N, dtype=int)
        for a in range(0, N, CHUNK):
            b = min(N, a + CHUNK)
            y[a:b], obj[a:b], active[a:b] = solve(f[a:b], h[a:b], e[a:b])
        feasible = np.isfinite(obj)
        return QPBatch(y=y, objective=obj, active=active, feasible=feasible)

    def _tightest(self, h: np.ndarray) -> np.ndarray:
        """Right-hand sides (N, rows) -> (N, distinct normals): the smallest of each group."""
        if not self._collapsed:
            return h
        out = np.empty((h.shape[0], len(self._members)))
        for u, members in enumerate(self._members):
            if members.size == 1:
                out[:, u] = h[:, members[0]]
            else:
                np.min(h[:, members], axis=1, out=out[:, u])
        return out

    def _solve_active_set(
        self, f: np.ndarray, h: np.ndarray, e: np.ndarray
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """One subproblem at a time with the Goldfarb-Idnani dual active-set method (quadprog).

        The same feasibility test as the enumeration is applied to its answer, so both modes
        report a subproblem infeasible alike. ``active`` is 0 for a solved subproblem.
        """
        import quadprog

        N, n = f.shape[0], self.n
        keep = self.eq_keep
        C = np.vstack([self.E[keep], -self.G]).T  # quadprog: C' y >= b, equalities first
        y = np.full((N, n), np.nan)
        val = np.full(N, np.inf)
        for i in range(N):
            b = np.concatenate([e[i, keep], -h[i]])
            try:
                yi = quadprog.solve_qp(self.H, -f[i], C, b, len(keep))[0]
            except ValueError:  # "constraints are inconsistent, no solution"
                continue
            ok = np.all(self.G @ yi <= h[i] + FEASIBILITY_TOL * (1.0 + np.abs(h[i])))
            if self._check_eq:
                ok &= np.all(np.abs(self.E @ yi - e[i]) <= FEASIBILITY_TOL * (1.0 + np.abs(e[i])))
            if ok:
                y[i], val[i] = yi, 0.5 * yi @ self.H @ yi + f[i] @ yi
        return y, val, np.where(np.isfinite(val), 0, -1)

    def _solve(
        self, f: np.ndarray, h: np.ndarray, e: np.ndarray
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        N, ns, n = f.shape[0], len(self.subsets), self.n
        rhs = np.hstack([-f, e, h]).T  # (r, N)
        Y = (self._maps @ rhs).reshape(ns, n, N)
        # the checks and values by blocks of columns whose row values stay in the cache; a
        # block of one column would take another BLAS routine, so the last one never is
        width = max(256, BLOCK_VALUES // max(1, ns * max(self.m, self.q)))
        ht, et = h.T, e.T
        top = ht + FEASIBILITY_TOL * (1.0 + np.abs(ht))  # (m, N)
        etol = FEASIBILITY_TOL * (1.0 + np.abs(et))  # (q, N)
        if N <= width:
            return self._block(Y, f, top, et, etol)
        y = np.empty((N, n))
        v = np.empty(N)
        active = np.empty(N, dtype=int)
        edges = [*range(0, N, width), N]
        if len(edges) > 2 and edges[-1] - edges[-2] < 2:
            edges.pop(-2)
        for a, b in itertools.pairwise(edges):
            y[a:b], v[a:b], active[a:b] = self._block(
                Y[:, :, a:b], f[a:b], top[:, a:b], et[:, a:b], etol[:, a:b]
            )
        return y, v, active

    def _block(
        self, Y: np.ndarray, f: np.ndarray, top: np.ndarray, et: np.ndarray, etol: np.ndarray
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """The best feasible candidate of each column of one block: candidates' points ``Y``
        (ns, n, N), linear terms ``f`` (N, n), row bounds with their tolerance ``top``
        (m, N), equality right-hand sides ``et`` (q, N) and their tolerance ``etol``."""
        ns, _, N = Y.shape
        # the rows' values at every candidate's point, from the points themselves (n products
        # a row, not r): they only decide feasibility, against a tolerance far above their
        # rounding, and the points and values are the products' own
        if self.m:
            ok = np.all(np.matmul(self.G, Y) <= top[None], axis=1)
        else:
            ok = np.ones((ns, N), dtype=bool)
        if self._check_eq:
            EY = np.matmul(self.E, Y)
            ok &= np.all(np.abs(EY - et[None]) <= etol[None], axis=1)
        # the values only of candidates feasible somewhere (each candidate's products are its
        # own: the same numbers as over all of them); the least of them, the first of equals
        # (the candidates in their order, as an argmin over all of them would take it)
        some = np.flatnonzero(ok.any(axis=1))
        if some.size == 0:
            return np.full((N, self.n), np.nan), np.full(N, np.inf), np.full(N, -1)
        Ys = Y[some]
        vs = np.einsum("sin,sin->sn", Ys, 0.5 * np.matmul(self.H, Ys) + f.T[None])
        vs = np.where(ok[some], vs, np.inf)
        k = np.argmin(vs, axis=0)
        idx = np.arange(N)
        v = vs[k, idx]
        y = Ys[k, :, idx]
        feasible = np.isfinite(v)
        y[~feasible] = np.nan
        return y, v, np.where(feasible, some[k], -1)

    def multipliers(self, active: int, f: np.ndarray, h: np.ndarray, e: np.ndarray) -> np.ndarray:
        """Multipliers (rows,) of the inequality rows for one solved subproblem (zero if inactive).

        A multiplier is the rate at which the optimal value falls as that row's right-hand side
        is raised. Of rows sharing a normal, the tightest carries the multiplier. Only for an
        enumerating solver (``enumerated``).
        """
        if not self.enumerated:
            raise ValueError("multipliers need the enumerated active sets")
        h = np.asarray(h, float).reshape(-1)
        hu = self._tightest(h[None])[0]
        rhs = np.concatenate([-np.asarray(f, float), np.asarray(e, float), hu])
        mu = self._mults[active] @ rhs
        out = np.zeros(self.m_rows)
        for u, members in enumerate(self._members):
            out[members[np.argmin(h[members])]] = mu[u]
        return out
