"""Exact Pareto fronts between mismatches and model quantities (:func:`trace_front`).

An axis of a front is something to keep small:

* a group's name: its absolute log-mismatch ``|ln(Pi_model / Pi_prototype)|`` [-];
* ``"total"``: the weighted sum of squared log-mismatches that the solver minimises [-];
* a quantity's name: its model value [SI] (in the condition with the largest prototype value);
* ``"plan_area"``: model reach (or length) times model width [m^2];
* ``"distortion"``: vertical ratio over horizontal ratio [-].

How the front is traced exactly
-------------------------------
For one model fluid state (fluid, temperature, pressure), with ``y = (ln X, ln Y, ln V)`` and the
property log-ratios ``p`` fixed (:mod:`compromise.solving.problem`), a group's log-mismatch
``r = a.y + b.p`` and the log of a model quantity ``a.y + b.p + c0`` are linear in ``y``, and the
total is a convex quadratic. The epsilon-constraint method (Haimes, Lasdon & Wismer 1971)
minimises one axis subject to bounds on the others; every bound is linear in ``y``:
``|r| <= eps`` is the two rows ``+-(a.y) <= eps -+ b.p``, and ``quantity <= eps`` is the row
``a.y <= ln eps - c0 - b.p``. The minimised axis is the total when it is an axis, else the first
group axis, whose ``|r|`` has the same minimisers as ``r^2``, else the first quantity axis,
whose log is linear. To that objective a secondary term ``delta x (the other axes)`` is added
(``r^2`` for a group, the log for a quantity) with a tiny positive ``delta``: the minimiser of
the sum subject to the bounds is then Pareto optimal, never merely weakly so (Mavrotas 2009).
Each such subproblem is a convex QP, solved exactly by :class:`compromise.solving.qp.SmallQP`, many
epsilon values and fluid states in one batch (only the right-hand sides differ). Where an exact
group leaves at most two log-ratios free, the sweeps solve them in the equalities' null space
instead (:class:`compromise.explore.front_qp.FrontQP`): the optimum without the epsilon rows
once per distinct fluid state, then each epsilon value's in closed form; the designs of the
front are re-solved by the enumeration. As in the
solver, a tie-break ``1e-10 x |y - y0|^2`` keeps the Hessian positive definite; when every axis
is a quantity the subproblem is an LP, and the tie-break moves its optimum by at most
``1e-10 x (diameter of the feasible set in log-ratios)^2``, about 1e-8. The range of each
bounded axis comes from the lexicographic anchors, one per axis (the payoff table of Mavrotas
2009); minimising a quantity that nothing bounds from below is reported as an error.

A fluid's front is the lower envelope over its temperatures (and pressures), found by a grid and
a zoom (:func:`compromise.explore.envelope.lower_envelope`); the fronts of the fluids are merged and
dominated points removed. Finally every point is re-solved with the fluid's source property models.

The epsilon values are placed at equal arc length along the front, in axes normalised to their
range: a short pilot sweep, then two passes that interpolate epsilon against arc length. Fronts
here are often L-shaped, and evenly spaced epsilon would put most points on one leg.

A quantity's (or distortion's) own laboratory maximum is lifted by default, so that the front
shows what a larger hall, a bigger pump or more distortion would buy; the case's bound is kept in
the result as a reference.

References
----------
Haimes, Y. Y., Lasdon, L. S., Wismer, D. A. (1971). On a bicriterion formulation of the problems
of integrated system identification and system optimization. IEEE Trans. Systems, Man and
Cybernetics 1(3), 296-297, from memory.
Mavrotas, G. (2009). Effective implementation of the epsilon-constraint method in
multi-objective mathematical programming problems. Applied Mathematics and Computation 213,
455-465, from memory.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.explore.axes import Axis, axes_for, state_spaces
from compromise.explore.envelope import StateSpace, lower_envelope
from compromise.explore.front import Front, FrontPoint
from compromise.explore.front_qp import FrontQP
from compromise.explore.pareto import (
    TOL,
    gd_plus,
    hypervolume,
    knee_index,
    nondominated,
)
from compromise.physics.scaling import N_DECISION
from compromise.solving.design import Design
from compromise.solving.grid import REGULARISATION
from compromise.solving.problem import PROPERTY_NAMES, Problem
from compromise.solving.qp import SmallQP
from compromise.solving.threads import one_blas_thread

__all__ = [
    "Axis",
    "Front",
    "FrontPoint",
    "Scalarised",
    "axes_for",
    "gd_plus",
    "hypervolume",
    "knee_index",
    "nondominated",
    "trace_front",
]

SECONDARY = 1e-7  # relative weight of the other axes in the objective (see the module docstring)
N_PILOT = 17
MAX_GRID = 40  # epsilon values per axis, at most, with three axes


class Scalarised:
    """One epsilon-constraint family: minimise one axis (plus ``delta`` x the others) subject
    to epsilon rows on some axes, for batches of fluid states and epsilon values.

    Parameters
    ----------
    problem : Problem
    axes : list of Axis
    primary : int
        The axis minimised.
    constrained : list of int
        The axes bounded by epsilon rows, in the order of the columns of ``eps``.
    """

    def __init__(
        self, problem: Problem, axes: list[Axis], primary: int, constrained: list[int]
    ) -> None:
        self.problem = problem
        nd, npr = N_DECISION, len(PROPERTY_NAMES)
        quad: list[tuple[float, np.ndarray, np.ndarray]] = []
        lin: list[tuple[float, np.ndarray, np.ndarray, float]] = []

        def terms(ax: Axis, w: float) -> None:
            if ax.kind == "total":
                quad.extend(
                    (w * wk, ak, bk)
                    for wk, ak, bk in zip(problem.W, problem.A, problem.B, strict=True)
                )
            elif ax.kind == "group":
                quad.append((w, ax.a, ax.b))
            else:
                lin.append((w, ax.a, ax.b, ax.c0))

        def scale(ax: Axis) -> float:
            if ax.kind == "total":
                return max(1e-12, float(np.sum(problem.W * np.sum(problem.A**2, axis=1))))
            n2 = float(ax.a @ ax.a)
            return max(1e-12, n2 if ax.kind == "group" else math.sqrt(n2))

        terms(axes[primary], 1.0)
        for j, ax in enumerate(axes):
            if j != primary:
                terms(ax, SECONDARY * max(1.0, scale(axes[primary])) / scale(ax))
        self.quad, self.lin = quad, lin
        H = np.zeros((nd, nd))
        F = np.zeros((nd, npr))
        f0 = np.zeros(nd)
        for w, a, b in quad:
            H += 2.0 * w * np.outer(a, a)
            F += 2.0 * w * np.outer(a, b)
        for w, a, _, _ in lin:
            f0 += w * a
        m = problem.case.model
        reg = REGULARISATION * max(1.0, float(np.trace(H)) / nd)
        x0 = math.log(m.horizontal_ratio[1])
        z0 = x0 + math.log(m.distortion[0])
        y0 = np.array([x0, z0, 0.5 * z0])
        self.H = H + 2.0 * reg * np.eye(nd)
        self.F, self.f0 = F, f0 - 2.0 * reg * y0
        G, h0, P = [problem.G], [problem.h0], [problem.P]
        self.slots: list[list[int]] = []
        row = problem.G.shape[0]
        for j in constrained:
            ax = axes[j]
            if ax.linear:
                G.append(ax.a[None]), h0.append([-ax.c0]), P.append(-ax.b[None])
                self.slots.append([row])
                row += 1
            else:
                G.append(np.vstack([ax.a, -ax.a])), h0.append([0.0, 0.0])
                P.append(np.vstack([-ax.b, ax.b]))
                self.slots.append([row, row + 1])
                row += 2
        self.G, self.h0, self.P = np.vstack(G), np.concatenate(h0), np.vstack(P)
        self.qp = SmallQP(self.H, self.G, problem.E)
        fast = FrontQP(
            self.H,
            F,
            self.f0,
            self.G,
            self.h0,
            self.P,
            problem.E,
            problem.e0,
            problem.Q,
            self.slots,
        )
        #: the null-space solver sharing the fluid state (None: the enumeration only)
        self.fast = fast if fast.supported else None

    def solve(self, p: np.ndarray, eps: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
        """Optimal ``y`` (N, 3) and scalarised objective (N,) for property log-ratios ``p``
        (N, 6) and epsilon values ``eps`` (N, number of constrained axes) in the space of
        :meth:`Axis.constraint_value`; ``inf`` where infeasible."""
        p = np.atleast_2d(p)
        pr = self.problem
        h = self.h0 + p @ self.P.T
        if self.slots:
            eps = np.broadcast_to(np.asarray(eps, dtype=float), (p.shape[0], len(self.slots)))
            for j, rows in enumerate(self.slots):
                h[:, rows] += eps[:, j : j + 1]
        e = pr.e0 + p @ pr.Q.T
        y = self.qp.solve(p @ self.F.T + self.f0, h, e).y
        return y, self.objective(y, p)

    def objective(self, y: np.ndarray, p: np.ndarray) -> np.ndarray:
        """The scalarised objective (N,) at designs ``y`` (N, 3; nan: infeasible, giving
        ``inf``) and property log-ratios ``p`` (N, 6)."""
        J = np.zeros(p.shape[0])
        for w, a, b in self.quad:
            J += w * (y @ a + p @ b) ** 2
        for w, a, b, c0 in self.lin:
            J += w * (y @ a + p @ b + c0)
        return np.where(np.isfinite(J), J, np.inf)

    def solve_indexed(self, table: np.ndarray, index: np.ndarray, eps: np.ndarray) -> np.ndarray:
        """The scalarised objective (N,) of :meth:`solve` for property rows ``table[index]``
        (distinct rows ``table`` (U, 6), ``index`` (N,)) and epsilon values ``eps`` (N, c),
        by the null-space solver: what depends on the state alone once per distinct row."""
        assert self.fast is not None
        y = self.fast.solve(self.fast.states(table), index, eps)
        return self.objective(y, table[index])


def check_bounded(scal: Scalarised, axes: list[Axis], primary: int, case: Case) -> None:
    """Raise a :class:`CaseError` when minimising a quantity axis is unbounded.

    The directions along which the feasible set is unbounded, ``G d <= 0, E d = 0``, do not
    depend on the fluid state or the epsilon values, so one LP decides (HiGHS, via scipy).
    """
    ax = axes[primary]
    if not ax.linear:
        return
    from scipy.optimize import linprog

    E = scal.problem.E
    res = linprog(
        ax.a,
        A_ub=scal.G,
        b_ub=np.zeros(scal.G.shape[0]),
        A_eq=E if E.size else None,
        b_eq=np.zeros(E.shape[0]) if E.size else None,
        bounds=[(-1.0, 1.0)] * N_DECISION,
        method="highs",
    )
    if res.status == 0 and res.fun < -1e-9:
        raise CaseError(
            f"nothing in the case bounds the model {ax.name} from below, so it can "
            "be made arbitrarily small; add a limit (a minimum on a quantity, or "
            "model.velocity_ratio)",
            file=case.path,
            key=f"axis '{ax.name}'",
        )


# --------------------------------------------------------------------------------------------
# tracing


@dataclass
class _Sweep:
    fluid: np.ndarray  # (I,) fluid index of every item
    k: np.ndarray  # (I,) epsilon index of every item
    T: np.ndarray
    lnp: np.ndarray
    J: np.ndarray
    eps: np.ndarray  # (K, nc)


class _Tracer:
    """Sweeps of epsilon values over every fluid, and the designs and values they give."""

    def __init__(
        self, problem: Problem, axes: list[Axis], spaces: list[StateSpace], n_temperatures: int
    ) -> None:
        self.problem, self.axes, self.spaces = problem, axes, spaces
        self.n_t = n_temperatures
        self._exact: dict[tuple[int, float, float], np.ndarray] = {}

    def sweep(self, sc: Scalarised, eps: np.ndarray) -> _Sweep:
        eps = np.asarray(eps, dtype=float)
        eps = eps.reshape(max(1, eps.shape[0]) if eps.ndim else 1, len(sc.slots))
        F, K = len(self.spaces), eps.shape[0]
        fluid, kk = np.repeat(np.arange(F), K), np.tile(np.arange(K), F)

        def evaluate(items: np.ndarray, table: np.ndarray, index: np.ndarray) -> np.ndarray:
            if sc.fast is not None:
                return sc.solve_indexed(table, index, eps[kk[items]])
            return sc.solve(table[index], eps[kk[items]])[1]

        T, lnp, J = lower_envelope(
            self.spaces, fluid, evaluate, n_temperatures=self.n_t, indexed=True
        )
        return _Sweep(fluid, kk, T, lnp, J, eps)

    def p(self, sw: _Sweep, items: np.ndarray, exact: bool) -> np.ndarray:
        out = np.empty((items.size, len(PROPERTY_NAMES)))
        for k, sp in enumerate(self.spaces):
            mine = np.flatnonzero(sw.fluid[items] == k)
            if mine.size == 0:
                continue
            its = items[mine]
            if not exact:
                out[mine] = sp.p(sw.T[its], sw.lnp[its])
                continue
            for j, i in zip(mine, its, strict=True):
                key = (k, float(sw.T[i]), self.pressure(sw, i))
                if key not in self._exact:
                    self._exact[key] = sp.exact_p(key[1], key[2])
                out[j] = self._exact[key]
        return out

    def pressure(self, sw: _Sweep, i: int) -> float:
        """The pressure of an item [Pa] (a grid pressure exactly, when it is one)."""
        sp = self.spaces[sw.fluid[i]]
        j = int(np.argmin(np.abs(sp.lnp - sw.lnp[i])))
        return (
            float(sp.pressures[j])
            if abs(sp.lnp[j] - sw.lnp[i]) < 1e-12
            else math.exp(float(sw.lnp[i]))
        )

    def resolve(
        self, sc: Scalarised, sw: _Sweep, items: np.ndarray, exact: bool = False
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Designs ``y``, property log-ratios ``p`` and axis values of some items."""
        items = np.asarray(items, dtype=int)
        p = self.p(sw, items, exact)
        y, _ = sc.solve(p, sw.eps[sw.k[items]])
        if exact:  # feasible by the splines only, at a boundary: keep the spline solution
            bad = ~np.all(np.isfinite(y), axis=1)
            if bad.any():
                p[bad] = self.p(sw, items[bad], False)
                y[bad] = sc.solve(p[bad], sw.eps[sw.k[items[bad]]])[0]
        return y, p, self.values(y, p)

    def values(self, y: np.ndarray, p: np.ndarray) -> np.ndarray:
        return np.column_stack([ax.values(self.problem, y, p) for ax in self.axes])

    def best(self, sw: _Sweep) -> np.ndarray:
        """For every epsilon, the item of the fluid with the least objective (-1: none)."""
        K = sw.eps.shape[0]
        J = sw.J.reshape(len(self.spaces), K)
        j = np.argmin(J, axis=0)
        return np.where(np.isfinite(J[j, np.arange(K)]), j * K + np.arange(K), -1)


def _normalise(values: np.ndarray, lo: np.ndarray, span: np.ndarray) -> np.ndarray:
    return (values - lo) / np.where(span > 0, span, 1.0)


def _equal_arc(eps: np.ndarray, U: np.ndarray, n: int) -> np.ndarray:
    """Epsilon values (n,) at equal arc length along the points ``U`` (normalised) of ``eps``."""
    ok = np.all(np.isfinite(U), axis=1)
    eps, U = eps[ok], U[ok]
    if eps.size < 2:
        return np.linspace(eps.min(), eps.max(), n) if eps.size else eps
    seg = np.linalg.norm(np.diff(U, axis=0), axis=1)
    s = np.concatenate([[0.0], np.cumsum(seg)])
    if s[-1] <= 0:
        return np.linspace(eps[0], eps[-1], n)
    s += np.linspace(0.0, 1e-9 * s[-1], s.size)  # strictly increasing for the interpolation
    return np.interp(np.linspace(0.0, s[-1], n), s, eps)


def _warp(eps: np.ndarray, U: np.ndarray, axis: int, n: int) -> np.ndarray:
    """Epsilon values (n,) of one axis of a grid, at equal mean arc length along that axis."""
    d = np.linalg.norm(np.diff(U, axis=axis), axis=2)  # (.., ..)
    d = np.nanmean(np.where(np.isfinite(d), d, np.nan), axis=1 - axis)
    d = np.where(np.isfinite(d), d, 0.0) + 1e-6
    s = np.concatenate([[0.0], np.cumsum(d)])
    return np.interp(np.linspace(0.0, s[-1], n), s, eps)


@one_blas_thread
def trace_front(
    case: Case,
    axes: list[str] | tuple[str, ...],
    *,
    points: int = 100,
    lift: bool = True,
    n_temperatures: int = 24,
) -> Front:
    """Trace the exact Pareto front between two or three axes (see the module docstring).

    Parameters
    ----------
    case : Case
    axes : list of str
        Two or three axis names: group names, ``total``, quantity names, ``plan_area``,
        ``distortion`` (``group:NAME`` or ``quantity:NAME`` where a name is both).
    points : int
        Number of epsilon values of the final sweep (two axes), or the least number of
        points wanted (three axes); duplicates and dominated points are dropped.
    lift : bool
        Lift the case's maxima on the axes' own quantities (and distortion), so the front shows
        what relaxing them buys.
    n_temperatures : int
        Temperature grid per fluid before the zoom.

    Returns
    -------
    Front
    """
    from compromise.solving.optimum import find_optimum

    if case.sediment is not None:  # the material and grain size are decisions too
        from compromise.explore.granular_front import trace_granular_front

        return trace_granular_front(case, axes, points=points, n_temperatures=n_temperatures)
    problem, ax = axes_for(case, list(axes), lift=lift)
    kinds = [a.kind for a in ax]
    primary = (
        kinds.index("total")
        if "total" in kinds
        else (kinds.index("group") if "group" in kinds else 0)
    )
    constrained = [j for j in range(len(ax)) if j != primary]
    spaces = state_spaces(case, problem, ax)
    tr = _Tracer(problem, ax, spaces, n_temperatures)
    anchors = []
    for j in range(len(ax)):
        sc = Scalarised(problem, ax, j, [])
        check_bounded(sc, ax, j, case)
        sw = tr.sweep(sc, np.zeros((1, 0)))
        i = tr.best(sw)[0]
        if i < 0:
            break
        anchors.append(tr.resolve(sc, sw, np.array([i]))[2][0])
    chosen = _chosen(case, problem, ax, spaces, find_optimum)
    if len(anchors) < len(ax):  # infeasible
        return Front(case, tuple(ax), (), -1, chosen, {}, ax[primary].name)
    main = Scalarised(problem, ax, primary, constrained)
    A = np.array(anchors)
    C = np.column_stack([ax[j].constraint_value(A[:, j]) for j in constrained])
    lo = np.array([C[j, c] for c, j in enumerate(constrained)])
    hi = C.max(axis=0)
    vlo, vspan = A.min(axis=0), np.ptp(A, axis=0)
    hi = np.maximum(hi, lo)
    if len(constrained) == 1:
        eps = np.linspace(lo[0], hi[0], N_PILOT)[:, None]
        sizes = [max(25, points // 2), points] if hi[0] > lo[0] + TOL * (1 + abs(hi[0])) else []
        sw = tr.sweep(main, eps)
        for n in sizes:
            b = tr.best(sw)
            U = np.full((eps.shape[0], len(ax)), np.nan)
            if np.any(b >= 0):
                U[b >= 0] = _normalise(tr.resolve(main, sw, b[b >= 0])[2], vlo, vspan)
            eps = _equal_arc(eps[:, 0], U, n)[:, None]
            sw = tr.sweep(main, eps)
    else:
        g = N_PILOT // 2 + 1
        eb, ec = np.linspace(lo[0], hi[0], g), np.linspace(lo[1], hi[1], g)
        last = 0
        for _ in range(4):
            grid = np.array(np.meshgrid(eb, ec, indexing="ij")).reshape(2, -1).T
            sw = tr.sweep(main, grid)
            b = tr.best(sw)
            U = np.full((grid.shape[0], len(ax)), np.nan)
            if np.any(b >= 0):
                U[b >= 0] = _normalise(tr.resolve(main, sw, b[b >= 0])[2], vlo, vspan)
            count = nondominated(U[np.all(np.isfinite(U), axis=1)]).size
            if eb.size > g and (count >= points or count < 1.3 * last or eb.size >= MAX_GRID):
                break  # enough points, or a front that is a curve (axes that move together)
            last = count
            n_new = min(
                MAX_GRID,
                max(eb.size + 2, math.ceil(eb.size * math.sqrt(1.5 * points / max(count, 1)))),
            )
            U = U.reshape(eb.size, ec.size, len(ax))
            eb, ec = _warp(eb, U, 0, n_new), _warp(ec, U, 1, n_new)
    return _finish(case, problem, ax, tr, main, sw, chosen, ax[primary].name)


def _chosen(
    case: Case, problem: Problem, ax: list[Axis], spaces: list[StateSpace], find_optimum: Any
) -> FrontPoint | None:
    sol = find_optimum(case, alternatives=False)
    if not sol.feasible or sol.design is None:
        return None
    d = sol.design
    k = case.model.fluids.index(d.fluid) if d.fluid in case.model.fluids else 0
    p = spaces[k].exact_p(d.temperature, d.pressure)
    v = np.column_stack([a.values(problem, d.logs[None], p[None]) for a in ax])[0]
    return FrontPoint(tuple(float(x) for x in v), d)


def _finish(
    case: Case,
    problem: Problem,
    ax: list[Axis],
    tr: _Tracer,
    sc: Scalarised,
    sw: _Sweep,
    chosen: FrontPoint | None,
    primary: str,
) -> Front:
    """Merge the fluids' fronts, re-solve the survivors with the source models, filter."""
    live = np.flatnonzero(np.isfinite(sw.J))
    _, _, v = tr.resolve(sc, sw, live)
    fronts = {}
    for k, spc in enumerate(tr.spaces):
        mine = sw.fluid[live] == k
        if mine.any():
            vk = v[mine]
            fronts[spc.name] = vk[nondominated(vk)]
    keep = live[nondominated(v, tol=1e-6)]
    y, _, v = tr.resolve(sc, sw, keep, exact=True)
    ok = np.all(np.isfinite(v), axis=1)
    keep, y, v = keep[ok], y[ok], v[ok]
    sel = nondominated(v)
    keep, y, v = keep[sel], y[sel], v[sel]
    order = np.lexsort(v.T[::-1])
    pts = []
    for i in order:
        it = keep[i]
        x, z, vv = (math.exp(float(c)) for c in y[i])
        d = Design(tr.spaces[sw.fluid[it]].name, float(sw.T[it]), tr.pressure(sw, it), x, z, vv)
        pts.append(FrontPoint(tuple(float(c) for c in v[i]), d))
    vals = np.array([pt.values for pt in pts]).reshape(len(pts), len(ax))
    return Front(case, tuple(ax), tuple(pts), knee_index(vals), chosen, fronts, primary)
