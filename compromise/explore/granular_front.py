"""Trade-off fronts of a case with ``[sediment]``: the material and grain size as decisions.

In a movable-bed or armour case the model material (categorical) and the model grain size
(continuous) are decisions beside the ratios and the fluid state
(:mod:`compromise.solving.granular`). For one fluid state and one material, with
``u = (ln X, ln Y, ln V, ln(d_model / d_prototype))``, every group's log-mismatch is linear in
``u`` (the relative density ``R = rho_s / rho - 1`` is a constant of the material and the
state), so the epsilon-constraint method of :mod:`compromise.explore.tradeoffs` applies
unchanged in four variables: minimise one axis (plus a tiny multiple of the other) subject to
``|r| <= eps`` on the other, a convex QP solved exactly by
:class:`compromise.solving.qp.SmallQP` for every epsilon, material and temperature in one
batch. The front is the lower envelope over a temperature grid with one zoom round around each
epsilon's best temperature, merged over fluids and materials, dominated points removed.

The axes are two: group names (their ``|ln(model/prototype)|``) or ``total`` (the weighted
mismatch the solver minimises). A group that is not a power product (the Rouse number, through
the settling velocity) and quantity axes are refused with a one-line error. The moving-bed
floor (model Shields at or above its critical value) is held at the critical Shields value of
the optimum's grain, as on the grain-size map; the solver's own answer iterates it to a fixed
point, so the chosen design may sit slightly off the front on that account too.

References
----------
Haimes, Y. Y., Lasdon, L. S., Wismer, D. A. (1971). On a bicriterion formulation of the problems
of integrated system identification and system optimization. IEEE Trans. Systems, Man and
Cybernetics 1(3), 296-297, from memory.
"""

from __future__ import annotations

import math

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.explore.axes import Axis
from compromise.explore.front import Front, FrontPoint
from compromise.explore.pareto import knee_index, nondominated
from compromise.solving.design import Design
from compromise.solving.granular import N_U, GranularProblem
from compromise.solving.grid import REGULARISATION, FluidStates, grid_points
from compromise.solving.qp import SmallQP
from compromise.solving.result import Solution

SECONDARY = 1e-7  # relative weight of the other axis in the objective (as in tradeoffs)
#: A group mismatch |ln(model/prototype)| below this is nil: the tie-break toward the largest
#: model moves an exactly matched group by about 1e-9, numerical noise, never a result.
NIL = 1e-8
N_ZOOM = 9


def _axes(case: Case, gp: GranularProblem, names: list[str]) -> list[Axis]:
    if len(names) != 2:
        raise CaseError(
            f"a trade-off of a case with [sediment] takes two axes, got {len(names)}",
            file=case.path,
            key="--between",
        )
    out = []
    zero4, zero6 = np.zeros(N_U), np.zeros(6)
    for name in names:
        key = f"axis '{name}'"
        if name == "total":
            if gp.A.shape[0] == 0:
                raise CaseError(
                    "the case has no weighted group, so the total mismatch is always 0",
                    file=case.path,
                    key=key,
                )
            out.append(Axis("total", "total", "weighted mismatch", "-", zero4, zero6))
            continue
        name = name.removeprefix("group:")
        if name not in case.groups:
            raise CaseError(
                f"a case with [sediment] trades group mismatches and 'total' off; '{name}' is "
                f"neither (groups: {', '.join(case.groups)})",
                file=case.path,
                key=key,
            )
        if case.groups[name].exact:
            raise CaseError(
                f"group '{name}' is kept exactly (exact = true): its mismatch is always 0",
                file=case.path,
                key=f"groups.{name}",
            )
        a = gp.normals[name]
        if a is None:
            raise CaseError(
                f"group '{name}' is not a power product of the ratios and the grain size; "
                "trade-off fronts need mismatches that are linear in the log-ratios",
                file=case.path,
                key=f"groups.{name}",
            )
        label = f"{name} mismatch |ln(model/prototype)|"
        out.append(Axis(name, "group", label, "-", np.asarray(a, dtype=float), zero6))
    if out[0].name == out[1].name:
        raise CaseError("the two axes are the same", file=case.path, key="--between")
    return out


class _Family:
    """Minimise axis ``primary`` (+ SECONDARY x the other) with ``|r_other| <= eps`` when
    ``bounded``, for batches of (state, material) constants and epsilon values."""

    def __init__(self, gp: GranularProblem, ax: list[Axis], primary: int, bounded: bool) -> None:
        self.gp, self.ax, self.primary = gp, ax, primary
        gi = {n: i for i, n in enumerate(gp.groups)}
        self.gi = gi
        other = 1 - primary
        # quadratic terms (weight, normal, column of the constants or -1 for total's rows)
        quad: list[tuple[float, np.ndarray, int]] = []

        def terms(a: Axis, w: float) -> None:
            if a.kind == "total":
                quad.extend((w * float(wk), gp.A[k], int(gp.sel[k])) for k, wk in enumerate(gp.W))
            else:
                quad.append((w, a.a, gi[a.name]))

        def scale(a: Axis) -> float:
            if a.kind == "total":
                return max(1e-12, float(np.sum(gp.W * np.sum(gp.A**2, axis=1))))
            return max(1e-12, float(a.a @ a.a))

        terms(ax[primary], 1.0)
        terms(ax[other], SECONDARY * max(1.0, scale(ax[primary])) / scale(ax[other]))
        self.quad = quad
        H = np.zeros((N_U, N_U))
        for w, a, _ in quad:
            H += 2.0 * w * np.outer(a, a)
        self.reg = REGULARISATION * max(1.0, float(np.trace(H)) / N_U)
        self.u0 = gp.tie_break()
        G = [gp.G]
        self.bounded = bounded
        if bounded:
            a = ax[other].a
            G.append(np.vstack([a, -a]))
        self.qp = SmallQP(H + 2.0 * self.reg * np.eye(N_U), np.vstack(G), gp.E)

    def solve(
        self, p: np.ndarray, c: np.ndarray, floor: float | None, eps: np.ndarray | None
    ) -> tuple[np.ndarray, np.ndarray]:
        """``u`` (N, 4) and the scalarised objective (N,) (``inf`` where infeasible)."""
        gp = self.gp
        f = np.zeros((p.shape[0], N_U)) - 2.0 * self.reg * self.u0
        for w, a, col in self.quad:
            f += 2.0 * w * c[:, col : col + 1] * a
        h, e = gp.rhs(p, c, floor)
        if self.bounded:
            assert eps is not None
            cb = self.constant(c, 1 - self.primary)
            h = np.hstack([h, (eps - cb)[:, None], (eps + cb)[:, None]])
        batch = self.qp.solve(f, h, e)
        u = batch.y
        J = np.zeros(p.shape[0])
        for w, a, col in self.quad:
            J += w * (u @ a + c[:, col]) ** 2
        return u, np.where(batch.feasible & np.isfinite(J), J, np.inf)

    def constant(self, c: np.ndarray, j: int) -> np.ndarray:
        return c[:, self.gi[self.ax[j].name]]

    def values(self, u: np.ndarray, c: np.ndarray) -> np.ndarray:
        """(N, 2) axis values: ``|r|`` of a group, the weighted mismatch of ``total``."""
        gp = self.gp
        cols = []
        for j, a in enumerate(self.ax):
            if a.kind == "total":
                r = u @ gp.A.T + c[:, gp.sel]
                cols.append(np.sum(gp.W * r**2, axis=1))
            else:
                cols.append(np.abs(u @ a.a + self.constant(c, j)))
        return np.column_stack(cols)


def held_floor(sol: Solution) -> float | None:
    """The moving-bed floor an exploration holds: the critical Shields value of the grain of
    the solver's answer (None without a moving bed or an answer)."""
    sed = sol.sediment
    return sed.critical_shields[1] if sed is not None and sed.critical_shields else None


class StateGrid:
    """Every (fluid, material) of a ``[sediment]`` case, with its temperature grid; the
    property log-ratios and the groups' constants at any temperatures (:meth:`at`)."""

    def __init__(self, case: Case, gp: GranularProblem, n_temperatures: int) -> None:
        from compromise.physics.materials import get_material

        sed = case.sediment
        assert sed is not None
        self.gp = gp
        self.items: list[tuple[str, str, float, FluidStates, float]] = []
        for fluid in case.model.fluids:
            fs = FluidStates(case, fluid, gp.used)
            P = float(fs.pressures()[0])
            for material in sed.materials:
                self.items.append((fluid, material, P, fs, get_material(material).density))
        self.grids = [grid_points(*it[3].t_range, n_temperatures) for it in self.items]

    def at(self, k: int, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        _, _, P, fs, rho_s = self.items[k]
        p = fs.p(np.asarray(T, dtype=float), P)
        return p, self.gp.constants(p, rho_s)


def _best(
    fam: _Family, st: StateGrid, floor: float | None, eps: np.ndarray | None
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """For every epsilon (or once, without), the best item over states: objective, item
    index, temperature and ``u``; a grid, then one zoom round around each best temperature."""
    K = 1 if eps is None else eps.size
    best_J = np.full(K, np.inf)
    best_k = np.full(K, -1)
    best_T = np.full(K, np.nan)
    best_u = np.full((K, N_U), np.nan)

    def run(k: int, T: np.ndarray, rows: np.ndarray) -> None:
        # T: (R, M) temperatures for each epsilon row of ``rows`` (R,)
        R, M = T.shape
        p, c = st.at(k, T.ravel())
        E = None if eps is None else np.repeat(eps[rows], M)
        u, J = fam.solve(p, c, floor, E)
        J = J.reshape(R, M)
        j = np.argmin(J, axis=1)
        Jb = J[np.arange(R), j]
        better = Jb < best_J[rows]
        sel = rows[better]
        best_J[sel] = Jb[better]
        best_k[sel] = k
        best_T[sel] = T[np.arange(R), j][better]
        best_u[sel] = u.reshape(R, M, N_U)[np.arange(R), j][better]

    all_rows = np.arange(K)
    for k, grid in enumerate(st.grids):
        run(k, np.broadcast_to(grid, (K, grid.size)), all_rows)
    for k, grid in enumerate(st.grids):
        mine = np.flatnonzero(best_k == k)
        if grid.size < 2 or mine.size == 0:
            continue
        half = float(grid[1] - grid[0])
        lo, hi = float(grid[0]), float(grid[-1])
        t = best_T[mine][:, None]  # one zoom round around each epsilon's best temperature
        a, b = np.maximum(lo, t - half), np.minimum(hi, t + half)
        run(k, a + (b - a) * np.linspace(0.0, 1.0, N_ZOOM)[None, :], mine)
    return best_J, best_k, best_T, best_u


def trace_granular_front(
    case: Case, axes: list[str] | tuple[str, ...], *, points: int = 100, n_temperatures: int = 24
) -> Front:
    """The Pareto front of a ``[sediment]`` case between two axes (see the module docstring).

    Returns
    -------
    compromise.explore.tradeoffs.Front
    """
    from compromise.solving.optimum import find_optimum

    gp = GranularProblem(case)
    ax = _axes(case, gp, list(axes))
    primary = 0 if ax[0].kind == "total" else (1 if ax[1].kind == "total" else 0)
    other = 1 - primary
    sol = find_optimum(case, alternatives=False)
    floor = held_floor(sol)
    st = StateGrid(case, gp, n_temperatures)

    def design(k: int, T: float, u: np.ndarray) -> Design:
        fluid, material, P, _, _ = st.items[k]
        x, z, v, w = (math.exp(float(q)) for q in u)
        return Design(fluid, float(T), P, x, z, v, material=material, grain_size=gp.d0 * w)

    chosen = None
    if sol.feasible and sol.design is not None and sol.design.material is not None:
        d = sol.design
        k = next(i for i, it in enumerate(st.items) if it[0] == d.fluid and it[1] == d.material)
        _, c = st.at(k, np.array([d.temperature]))
        u = np.append(d.logs, math.log(float(d.grain_size or gp.d0) / gp.d0))[None]
        fam0 = _Family(gp, ax, primary, False)
        chosen = FrontPoint(tuple(float(q) for q in fam0.values(u, c)[0]), d)
    # anchors: each axis minimised alone
    anchor_vals = []
    for j in (primary, other):
        fam = _Family(gp, ax, j, False)
        J, kk, TT, uu = _best(fam, st, floor, None)
        if kk[0] < 0:
            return Front(case, tuple(ax), (), -1, chosen, {}, ax[primary].name)
        anchor_vals.append(fam.values(uu, st.at(int(kk[0]), TT)[1]))
    lo = float(anchor_vals[1][0, other])  # the other axis at its own minimum
    if ax[other].kind == "group" and lo < NIL:
        lo = 0.0
    hi = float(anchor_vals[0][0, other])  # ... and where the primary is least
    main = _Family(gp, ax, primary, True)
    eps = np.linspace(lo, max(hi, lo), max(2, points)) if hi > lo * (1 + 1e-9) else np.array([lo])
    J, kk, TT, uu = _best(main, st, floor, eps)
    live = np.flatnonzero(np.isfinite(J))
    vals = np.full((eps.size, 2), np.nan)
    for k in range(len(st.items)):
        mine = live[kk[live] == k]
        if mine.size:
            vals[mine] = main.values(uu[mine], st.at(k, TT[mine])[1])
    for j, a in enumerate(ax):
        if a.kind == "group":
            col = vals[:, j]
            col[col < NIL] = 0.0
    fronts: dict[str, np.ndarray] = {}
    for k, (fluid, material, *_rest) in enumerate(st.items):
        mine = live[kk[live] == k]
        if mine.size:
            v = vals[mine]
            fronts[f"{fluid}, {material}"] = v[nondominated(v)]
    keep = live[nondominated(vals[live], tol=1e-9)] if live.size else live
    order = keep[np.lexsort(vals[keep].T[::-1])]
    pts = tuple(
        FrontPoint(tuple(float(q) for q in vals[i]), design(int(kk[i]), float(TT[i]), uu[i]))
        for i in order
    )
    arr = np.array([pt.values for pt in pts]).reshape(len(pts), 2)
    return Front(case, tuple(ax), pts, knee_index(arr), chosen, fronts, ax[primary].name)
