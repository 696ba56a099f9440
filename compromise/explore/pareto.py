"""Pareto dominance, the knee of a front, and two front metrics (GD+ and hypervolume).

Every axis is minimised. Pure numpy; used by :mod:`compromise.explore.tradeoffs`, the tests and the
benchmarks.

References
----------
Das, I. (1999). On characterizing the "knee" of the Pareto curve based on normal-boundary
intersection. Structural Optimization 18, 107-115, from memory.
Kung, H. T., Luccio, F., Preparata, F. P. (1975). On finding the maxima of a set of vectors.
Journal of the ACM 22(4), 469-476, from memory.
Ishibuchi, H., Masuda, H., Tanigaki, Y., Nojima, Y. (2015). Modified distance calculation in
generational distance and inverted generational distance. EMO 2015, LNCS 9019, 110-125, from
memory.
Zitzler, E., Thiele, L. (1999). Multiobjective evolutionary algorithms: a comparative case study
and the strength Pareto approach. IEEE Trans. Evolutionary Computation 3(4), 257-271
(hypervolume), from memory.
"""

from __future__ import annotations

import math

import numpy as np

TOL = 1e-9  # relative tolerance of dominance and of duplicate points


def nondominated(values: np.ndarray, tol: float = TOL) -> np.ndarray:
    """Indices of the points not dominated by another (minimisation), duplicates removed.

    A point dominates another when it is no worse on every axis and better on one, with a
    relative tolerance ``tol``.
    """
    v = np.asarray(values, dtype=float)
    n = v.shape[0]
    if n == 0:
        return np.zeros(0, dtype=int)
    t = tol * (1.0 + np.abs(v))
    if v.shape[1] == 2 and np.all(np.isfinite(v)):
        return _nondominated_2d(v, t)
    if v.shape[1] == 3 and np.all(np.isfinite(v)):
        return _nondominated_3d(v, t, tol)
    le = np.all(v[:, None, :] <= v[None, :, :] + t[None, :, :], axis=2)  # j no worse than i
    lt = np.any(v[:, None, :] < v[None, :, :] - t[None, :, :], axis=2)
    dominated = np.any(le & lt, axis=0)
    same = le & le.T
    first = np.argmax(same, axis=0)  # the first copy of each point
    keep = ~dominated & (first == np.arange(n))
    return np.flatnonzero(keep)


def _nondominated_2d(v: np.ndarray, t: np.ndarray) -> np.ndarray:
    """:func:`nondominated` for two axes in O(n log n) plus the survivors' duplicate check.

    Point ``j`` is dominated when some ``i`` has ``v_i <= v_j + t_j`` on both axes and
    ``v_i < v_j - t_j`` on one. Split by the strict axis: (a) strict on axis 1 needs
    ``v_i0 <= v_j0 + t_j0`` (a prefix of the points sorted on axis 0) and
    ``v_i1 < v_j1 - t_j1``; (b) strict on axis 0 needs ``v_i0 < v_j0 - t_j0`` (a shorter
    prefix) and ``v_i1 <= v_j1 + t_j1``. Both are prefix minima of axis 1, so the same
    comparisons as the pairwise test decide, and the answer is the same.
    """
    order = np.argsort(v[:, 0], kind="stable")
    s0 = v[order, 0]
    pm = np.concatenate([[np.inf], np.minimum.accumulate(v[order, 1])])  # min of the first k
    hi = np.searchsorted(s0, v[:, 0] + t[:, 0], side="right")
    lo = np.searchsorted(s0, v[:, 0] - t[:, 0], side="left")
    dominated = (pm[hi] < v[:, 1] - t[:, 1]) | (pm[lo] <= v[:, 1] + t[:, 1])
    cand = np.flatnonzero(~dominated)
    if cand.size == 0:
        return cand
    # duplicates: keep a survivor only if no earlier point is the same within the tolerance
    vc, tc = v[cand], t[cand]
    le_ij = np.all(v[:, None, :] <= (vc + tc)[None, :, :], axis=2)  # i no worse than j
    le_ji = np.all(vc[None, :, :] <= (v + t)[:, None, :], axis=2)  # j no worse than i
    same = le_ij & le_ji
    first = np.argmax(same, axis=0)
    return cand[first == cand]


def _first_copies(v: np.ndarray, t: np.ndarray, cand: np.ndarray, tol: float) -> np.ndarray:
    """The candidates that no earlier point equals within the tolerance (each no worse than
    the other), the pairwise test's duplicate rule.

    Only points whose first value lies within a window around the candidate's can equal it:
    ``|a_j - a_i| <= tol (1 + |a_i|)`` gives ``a_i >= a_j - tol (1 + |a_j|) / (1 - tol)``; the
    window is that, widened, and every pair in it is compared exactly. Past ``tol = 0.5``
    every point is compared.
    """
    n = v.shape[0]
    order = np.argsort(v[:, 0], kind="stable")
    a = v[order, 0]
    if tol < 0.5:
        lo = np.searchsorted(a, v[cand, 0] - 2.5 * t[cand, 0] - 4 * np.spacing(v[cand, 0]))
        hi = np.searchsorted(a, v[cand, 0] + t[cand, 0], side="right")
    else:
        lo, hi = np.zeros(cand.size, dtype=int), np.full(cand.size, n)
    count = hi - lo
    earlier = np.zeros(cand.size, dtype=bool)
    per = max(1, 4_000_000 // max(1, int(count.mean()) if count.size else 1))
    for s in range(0, cand.size, per):
        c, k = cand[s : s + per], count[s : s + per]
        start = np.repeat(np.cumsum(k) - k, k)
        pos = np.arange(int(k.sum())) - start + np.repeat(lo[s : s + per], k)
        i = order[pos]
        row = np.repeat(np.arange(c.size), k)
        j = c[row]
        same = np.all(v[i] <= v[j] + t[j], axis=1) & np.all(v[j] <= v[i] + t[i], axis=1)
        hit = same & (i < j)
        earlier[s : s + per] = np.bincount(row[hit], minlength=c.size) > 0
    return cand[~earlier]


class _PrefixStaircases:
    """Points sorted on one axis, and for every dyadic block of that order the least third
    value among the block's points up to each rank of the second value: the blocks of the
    binary decomposition of a prefix answer "the least ``c`` among the first ``L`` points
    whose ``b`` rank is below ``R``" in O(log n) searches, all queries of a level at once.
    """

    def __init__(self, b_rank: np.ndarray, c: np.ndarray) -> None:
        n = b_rank.size
        self.n = n
        self.levels: list[tuple[np.ndarray, np.ndarray]] = []
        pos = np.arange(n)
        level = 0
        while (1 << level) <= n:
            block = pos >> level
            order = np.lexsort((b_rank, block))
            keys = block[order] * (n + 1) + b_rank[order]
            m = c[order]
            size = 1 << level
            full = n - n % size  # blocks are contiguous runs of `size` entries: the least so far
            m[:full] = np.minimum.accumulate(m[:full].reshape(-1, size), axis=1).ravel()
            m[full:] = np.minimum.accumulate(m[full:])
            self.levels.append((keys, m))
            level += 1

    def least(self, L: np.ndarray, R: np.ndarray) -> np.ndarray:
        """Least ``c`` among the first ``L`` points with ``b`` rank below ``R`` (inf: none)."""
        out = np.full(L.size, np.inf)
        for level, (keys, m) in enumerate(self.levels):
            has = ((L >> level) & 1).astype(bool)
            if not has.any():
                continue
            q = np.flatnonzero(has)
            block = (L[q] >> (level + 1)) << 1  # the block of bit `level` of L
            i = np.searchsorted(keys, block * (self.n + 1) + R[q], side="left") - 1
            ok = (i >= 0) & (keys[np.maximum(i, 0)] // (self.n + 1) == block)
            out[q[ok]] = np.minimum(out[q[ok]], m[i[ok]])
        return out


def _nondominated_3d(v: np.ndarray, t: np.ndarray, tol: float) -> np.ndarray:
    """:func:`nondominated` for three axes in O(n log^2 n) plus the survivors' duplicate check.

    Point ``j`` is dominated when some ``i`` is no worse within the tolerance on all three
    axes (``v_i <= v_j + t_j``) and better on one (``v_i < v_j - t_j``). Split by the axis
    that is better, each case is an orthant query: does a point lie in a box open towards
    minus infinity? Sorted on the first axis, the box's first side is a prefix; the prefix
    is cut into dyadic blocks, and in each block the least third value below a rank of the
    second is a prefix minimum (a sort and a sweep, in the manner of Kung, Luccio & Preparata
    1975, batched). The comparisons are those of the pairwise test, so the answer is the same.
    """
    n = v.shape[0]
    oa = np.argsort(v[:, 0], kind="stable")
    a_sorted = v[oa, 0]
    ob = np.argsort(v[:, 1], kind="stable")
    b_sorted = v[ob, 1]
    rank = np.empty(n, dtype=np.int64)
    rank[ob] = np.arange(n)
    tree = _PrefixStaircases(rank[oa], v[oa, 2])
    up, down = v + t, v - t
    dominated = np.zeros(n, dtype=bool)
    # (side of the first axis, threshold), (side of the second, threshold), third: strict?
    cases = (
        (("left", down[:, 0]), ("right", up[:, 1]), (False, up[:, 2])),
        (("right", up[:, 0]), ("left", down[:, 1]), (False, up[:, 2])),
        (("right", up[:, 0]), ("right", up[:, 1]), (True, down[:, 2])),
    )
    for (sa, ta), (sb, tb), (strict, tc) in cases:
        L = np.searchsorted(a_sorted, ta, side=sa).astype(np.int64)
        R = np.searchsorted(b_sorted, tb, side=sb).astype(np.int64)
        least = tree.least(L, R)
        dominated |= least < tc if strict else least <= tc
    cand = np.flatnonzero(~dominated)
    return _first_copies(v, t, cand, tol) if cand.size else cand


def knee_index(values: np.ndarray) -> int:
    """The knee of a front: the point farthest from the line (two axes) or plane (three axes)
    through the front's extreme points, toward the ideal point, in axes normalised to [0, 1]
    over the front (Das 1999). ``-1`` for an empty front.

    Examples
    --------
    >>> knee_index(np.array([[0.0, 10.0], [1.0, 2.0], [5.0, 1.0], [10.0, 0.0]]))
    1
    """
    v = np.asarray(values, dtype=float)
    if v.shape[0] == 0:
        return -1
    if v.shape[0] < 3:
        return 0
    lo, span = v.min(axis=0), np.ptp(v, axis=0)
    u = np.where(span > 0, (v - lo) / np.where(span > 0, span, 1.0), 0.0)
    k = u.shape[1]
    ext = np.array([u[np.lexsort((u.sum(axis=1), u[:, j]))[0]] for j in range(k)])
    normal = np.ones(k)
    if np.linalg.matrix_rank(ext) == k:
        normal = np.linalg.solve(ext, np.ones(k))
    offset = float(np.mean(ext @ normal))
    if np.all(normal <= 0) or not np.all(np.isfinite(normal)):
        normal, offset = np.ones(k), float(np.mean(ext.sum(axis=1)))
    dist = (offset - u @ normal) / np.linalg.norm(normal)
    return int(np.argmax(dist))


def knee_depth(values: np.ndarray, knee: int) -> float:
    """How far the knee ``knee`` stands out: its distance from the line (two axes) through the
    front's two extreme points, in axes normalised to [0, 1] over the front, over the length of
    that line (Das 1999). 0 for a straight front; an L-shaped front approaches 0.5 (the corner
    of a unit square over its diagonal). For three axes, the distance from the plane through the
    extremes (the same normalisation as :func:`knee_index`). 0 with fewer than three points.

    Examples
    --------
    >>> round(knee_depth(np.array([[0.0, 1.0], [0.5, 0.5], [1.0, 0.0]]), 1), 12)
    0.0
    >>> round(knee_depth(np.array([[0.0, 1.0], [0.05, 0.05], [1.0, 0.0]]), 1), 6)
    0.45
    """
    v = np.asarray(values, dtype=float)
    if v.shape[0] < 3 or knee < 0:
        return 0.0
    lo, span = v.min(axis=0), np.ptp(v, axis=0)
    if np.count_nonzero(span) < v.shape[1]:
        return 0.0
    u = (v - lo) / span
    k = u.shape[1]
    ext = np.array([u[np.lexsort((u.sum(axis=1), u[:, j]))[0]] for j in range(k)])
    if k == 2:
        d = ext[1] - ext[0]
        length = float(np.hypot(*d))
        if length == 0.0:
            return 0.0
        w = u[knee] - ext[0]
        return abs(float(d[0] * w[1] - d[1] * w[0])) / length**2
    normal = np.ones(k)
    if np.linalg.matrix_rank(ext) == k:
        normal = np.linalg.solve(ext, np.ones(k))
    if not np.all(np.isfinite(normal)) or np.all(normal <= 0):
        normal = np.ones(k)
    offset = float(np.mean(ext @ normal))
    return abs(offset - float(u[knee] @ normal)) / float(np.linalg.norm(normal)) / math.sqrt(k)


def gd_plus(points: np.ndarray, reference: np.ndarray) -> float:
    """Generational distance plus (Ishibuchi et al. 2015) of ``points`` to ``reference``.

    The mean over the points of ``min_z ||max(a - z, 0)||``: the distance that counts only
    where a point is worse than the reference. Both arrays are (n, axes), in the same units.
    """
    a = np.asarray(points, dtype=float)
    z = np.asarray(reference, dtype=float)
    out = np.empty(a.shape[0])
    for i in range(0, a.shape[0], 256):
        d = np.maximum(a[i : i + 256, None, :] - z[None], 0.0)
        out[i : i + 256] = np.sqrt(np.min(np.sum(d * d, axis=2), axis=1))
    return float(np.mean(out)) if out.size else math.nan


def hypervolume(points: np.ndarray, reference: np.ndarray) -> float:
    """Volume dominated by ``points`` and bounded by the ``reference`` point (two or three
    axes, minimisation), by sweeping the last axis.

    Examples
    --------
    >>> hypervolume(np.array([[1.0, 2.0], [2.0, 1.0]]), np.array([3.0, 3.0]))
    3.0
    """
    v = np.asarray(points, dtype=float)
    ref = np.asarray(reference, dtype=float)
    v = v[np.all(v < ref, axis=1)]
    if v.shape[0] == 0:
        return 0.0
    if v.shape[1] == 2:
        v = v[np.argsort(v[:, 0], kind="stable")]
        best, area = ref[1], 0.0
        for x, y in v:
            if y < best:
                area += (ref[0] - x) * (best - y)
                best = y
        return float(area)
    order = np.argsort(v[:, -1], kind="stable")
    v = v[order]
    total = 0.0
    for i in range(v.shape[0]):
        top = v[i + 1, -1] if i + 1 < v.shape[0] else ref[-1]
        total += (top - v[i, -1]) * hypervolume(v[: i + 1, :-1], ref[:-1])
    return float(total)


def gd_plus_polyline(points: np.ndarray, reference: np.ndarray) -> float:
    """GD+ of two-axis ``points`` to the piecewise-linear curve through ``reference``.

    A dense reference front sampled at finitely many points makes GD+ at least the sampling gap
    for a point between two samples; between the samples of a convex front the chord lies on
    the dominated side, so measuring to the curve itself removes that artefact. For every
    segment, ``||max(a - z(t), 0)||^2`` is convex and piecewise quadratic in ``t``: its minimum
    is at an end, where a coordinate of ``z(t)`` crosses ``a``, or at the projection of ``a``.
    """
    a = np.asarray(points, dtype=float)
    z = np.asarray(reference, dtype=float)
    z = z[np.argsort(z[:, 0], kind="stable")]
    P, D = z[:-1], np.diff(z, axis=0)  # segments P + t D
    out = np.empty(a.shape[0])
    for i, pt in enumerate(a):
        cands = [np.zeros(len(P)), np.ones(len(P))]
        with np.errstate(divide="ignore", invalid="ignore"):
            for k in range(2):
                cands.append((pt[k] - P[:, k]) / D[:, k])
            cands.append(np.sum((pt - P) * D, axis=1) / np.sum(D * D, axis=1))
        t = np.clip(np.nan_to_num(np.array(cands), nan=0.0), 0.0, 1.0)  # (5, segments)
        zt = P[None] + t[..., None] * D[None]
        d = np.maximum(pt - zt, 0.0)
        out[i] = math.sqrt(float(np.min(np.sum(d * d, axis=2))))
    return float(np.mean(out)) if out.size else math.nan
