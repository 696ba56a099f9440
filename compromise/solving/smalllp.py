"""Exact least violation of small systems of linear rows, by enumerating vertices.

The diagnosis of an infeasible case asks two questions many times over systems in the three
decision log-ratios: is ``G y <= h, E y = e`` feasible, and what is the least total violation
``min_y sum(max(0, G y - h)) + sum(|E y - e|)``? The second is a convex piecewise-linear function
bounded below by zero. Restricted to the row space of the stacked normals (the function does
not change along directions orthogonal to every normal), it has no line of constancy, so its
minimum is attained at a vertex of the arrangement of the rows' hyperplanes: a point where
``r`` linearly independent rows hold with equality, ``r`` being the rank of the normals (the
basic solutions of the equivalent linear programme). With at most three variables there are few
such vertices, and every right-hand side is answered by one batched matrix product, with no
iterative solver and its tolerances.

References
----------
Bertsimas, D., Tsitsiklis, J. N. (1997). *Introduction to Linear Optimization*, ch. 2
(polyhedra, basic solutions and the existence of an optimal vertex), from memory.
"""

from __future__ import annotations

import itertools
import math

import numpy as np

FEASIBILITY_TOL = 1e-9  # [-] least violation below this (plus relative) counts as feasible
MAX_VERTICES = 20000  # larger arrangements go to a linear-programming solver


def least_violation(G: np.ndarray, h: np.ndarray, E: np.ndarray, e: np.ndarray) -> np.ndarray:
    """Least total violation of ``G y <= h`` and ``E y = e`` for one or many right-hand sides.

    Parameters
    ----------
    G : (m, n) array
    h : (m,) or (N, m) array
    E : (q, n) array
    e : (q,) or (N, q) array

    Returns
    -------
    numpy.ndarray
        (N,) least violations (log space, [-]); zero where the system is feasible.

    Examples
    --------
    >>> import numpy as np
    >>> G = np.array([[1.0, 0, 0], [-1.0, 0, 0]])   # y0 <= 1 and y0 >= 3
    >>> float(least_violation(G, np.array([1.0, -3.0]), np.zeros((0, 3)), np.zeros(0))[0])
    2.0
    """
    G = np.asarray(G, dtype=float)
    E = np.asarray(E, dtype=float).reshape(-1, G.shape[1])
    m, q = G.shape[0], E.shape[0]
    h = np.atleast_2d(np.asarray(h, dtype=float).reshape(-1, m) if m else np.zeros((1, 0)))
    e = np.atleast_2d(np.asarray(e, dtype=float).reshape(-1, q) if q else np.zeros((1, 0)))
    N = max(h.shape[0], e.shape[0])
    h = np.broadcast_to(h, (N, m))
    e = np.broadcast_to(e, (N, q))
    A = np.vstack([G, E])
    b = np.hstack([h, e])  # (N, k)
    if A.shape[0] == 0:
        return np.zeros(N)
    geometry = _geometry(A)
    if geometry is None:
        return np.sum(np.maximum(-h, 0.0), axis=1) + np.sum(np.abs(e), axis=1)
    if geometry is _TOO_MANY:
        return np.array([_phase1_highs(G, h[i], E, e[i]) for i in range(N)])
    B, combos, Minv = geometry
    u = np.einsum("cij,ncj->cni", Minv, b[:, combos])  # (c, N, r) vertices
    res = u @ B.T - b[None]  # (c, N, k)
    viol = np.sum(np.maximum(res[:, :, :m], 0.0), axis=2) + np.sum(np.abs(res[:, :, m:]), axis=2)
    return viol.min(axis=0)


_TOO_MANY = (np.zeros((0, 0)), np.zeros((0, 0), dtype=int), np.zeros((0, 0, 0)))
_GEOMETRIES: dict[tuple[tuple[int, ...], bytes], tuple[np.ndarray, ...] | None] = {}
_GEOMETRY_CACHE = 256  # arrangements kept (a deletion filter asks for the same ones again)


def _geometry(A: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
    """The vertex geometry of the rows ``A`` (k, n): the rows in coordinates of their span
    ``B`` (k, r), the independent r-subsets ``combos`` (c, r) and their inverses ``Minv``
    (c, r, r); None when every normal is zero, ``_TOO_MANY`` past :data:`MAX_VERTICES`.

    It depends on the normals only, not on the right-hand sides, so it is kept per matrix:
    the diagnosis tests the same subsets of rows for every fixed ratio and every re-solve.
    """
    key = (A.shape, A.tobytes())
    if key in _GEOMETRIES:
        return _GEOMETRIES[key]  # type: ignore[return-value]
    _, s, vt = np.linalg.svd(A)
    r = int(np.sum(s > 1e-10 * max(float(s[0]), 1.0)))
    out: tuple[np.ndarray, np.ndarray, np.ndarray] | None
    if r == 0:
        out = None
    elif math.comb(A.shape[0], r) > MAX_VERTICES:
        out = _TOO_MANY
    else:
        B = A @ vt[:r].T  # (k, r): the rows in coordinates of their own span
        combos = np.array(list(itertools.combinations(range(A.shape[0]), r)), dtype=int)
        M = B[combos]  # (c, r, r)
        sv = np.linalg.svd(M, compute_uv=False)
        keep = sv[:, -1] > 1e-10 * np.maximum(sv[:, 0], 1.0)
        combos, M = combos[keep], M[keep]
        out = (B, combos, np.linalg.inv(M))  # inverses (c, r, r)
        for a in out:
            a.flags.writeable = False
    if len(_GEOMETRIES) >= _GEOMETRY_CACHE:
        _GEOMETRIES.clear()
    _GEOMETRIES[key] = out
    return out


def _phase1_highs(G: np.ndarray, h: np.ndarray, E: np.ndarray, e: np.ndarray) -> float:
    """The same least violation by a linear programme (HiGHS), for systems too large to
    enumerate."""
    from scipy.optimize import linprog

    m, q, n = G.shape[0], E.shape[0], G.shape[1]
    if not (np.all(np.isfinite(h)) and np.all(np.isfinite(e))):
        return math.inf  # HiGHS refuses nan and inf right-hand sides; no finite violation
    c = np.r_[np.zeros(n), np.ones(m + 2 * q)]
    A_ub = np.hstack([G, -np.eye(m), np.zeros((m, 2 * q))]) if m else None
    A_eq = np.hstack([E, np.zeros((q, m)), -np.eye(q), np.eye(q)]) if q else None
    bounds = [(None, None)] * n + [(0, None)] * (m + 2 * q)
    r = linprog(
        c,
        A_ub=A_ub,
        b_ub=h if m else None,
        A_eq=A_eq,
        b_eq=e if q else None,
        bounds=bounds,
        method="highs",
    )
    return float(r.fun) if r.status == 0 else math.inf


#: The distinct normals of a matrix of rows and each row's kind, by matrix (see _collapse).
_KINDS: dict[tuple[tuple[int, ...], bytes], tuple[np.ndarray, np.ndarray]] = {}


def _collapse(G: np.ndarray, h: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Rows with the same normal reduced to the tightest (the feasible set is unchanged)."""
    if G.shape[0] < 2:
        return G, h
    key = (G.shape, G.tobytes())
    found = _KINDS.get(key)
    if found is None:
        unique, inverse = np.unique(G, axis=0, return_inverse=True)
        found = (unique, np.asarray(inverse).reshape(-1))
        if len(_KINDS) >= _GEOMETRY_CACHE:
            _KINDS.clear()
        _KINDS[key] = found
    unique, inverse = found
    if unique.shape[0] == G.shape[0]:
        return G, h
    tight = np.full(unique.shape[0], np.inf)
    np.minimum.at(tight, inverse, h)
    return unique, tight


def feasible(G: np.ndarray, h: np.ndarray, E: np.ndarray, e: np.ndarray) -> bool:
    """Whether ``G y <= h, E y = e`` has a solution (to :data:`FEASIBILITY_TOL`)."""
    G, h = _collapse(np.asarray(G, dtype=float), np.asarray(h, dtype=float).reshape(-1))
    scale = 1.0 + max(
        float(np.max(np.abs(h))) if np.size(h) else 0.0,
        float(np.max(np.abs(e))) if np.size(e) else 0.0,
    )
    return bool(least_violation(G, h, E, e)[0] <= FEASIBILITY_TOL * scale)
