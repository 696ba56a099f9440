"""The fluid x temperature grid: exact convex subproblems for batches of model fluid states.

:class:`Engine` holds a problem's :class:`~compromise.solving.qp.SmallQP`; :class:`FluidStates`
gives
the property log-ratios of one model fluid over its temperature (and pressure) range;
:func:`best_state` and :func:`best_states` find each fluid's optimal state by a grid, a zooming
polish and a final re-solve with the fluids' source property models.
"""

from __future__ import annotations

import math
from collections.abc import Generator
from dataclasses import dataclass

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.solving.problem import PROPERTY_NAMES, Problem
from compromise.solving.qp import QPBatch, SmallQP

N_TEMPERATURES = 36
N_PRESSURES = 7
N_ZOOM = 33  # temperatures per polish round
N_ZOOM_PRESSURE = 9  # pressures per polish round (source models, not splines)
ZOOM_ROUNDS = 7  # 16-fold per round: ~1e-8 K from a ~1 K grid step
REGULARISATION = 1e-10  # relative weight of the tie-break toward the largest, least distorted model


# --------------------------------------------------------------------------------------------
# the grid engine


def _weight_scale(W: np.ndarray) -> float:
    """1, or the power of two nearest the largest weight when it lies outside 2^-20..2^20."""
    top = float(np.max(W)) if W.size else 1.0
    if not math.isfinite(top) or top <= 0 or 2.0**-20 <= top <= 2.0**20:
        return 1.0
    return math.ldexp(1.0, math.frexp(top)[1] - 1)


class Engine:
    """Solves the convex subproblems of a problem for batches of fluid states.

    Parameters
    ----------
    problem : Problem
    extra_E, extra_e : optional
        Extra equality rows ``extra_E . y = extra_e`` (used to fix a preferred ratio).
    """

    def __init__(self, problem: Problem, extra_E: np.ndarray | None = None) -> None:
        self.problem = problem
        A, W = problem.A, problem.W
        #: Weights are divided by a power of two that brings the largest near 1 when they are
        #: extreme, so squares and sums of extreme (legal) weights cannot overflow; a power of
        #: two is exact, and ordinary weights (within 2^-20..2^20) are left as they are.
        self.weight_scale = _weight_scale(W)
        W = W / self.weight_scale
        self.W = W
        H = 2.0 * (A.T * W) @ A
        m = problem.case.model
        scale = max(1.0, float(np.trace(H)) / 3.0)
        self.eps = REGULARISATION * scale
        # anchor of the tie-break: the largest model, the least distortion, Froude velocity
        x0 = math.log(m.horizontal_ratio[1])
        z0 = x0 + math.log(m.distortion[0])
        self.y0 = np.array([x0, z0, 0.5 * z0])
        self.H = H + 2.0 * self.eps * np.eye(3)
        self.extra = np.zeros((0, 3)) if extra_E is None else np.atleast_2d(extra_E)
        E = np.vstack([problem.E, self.extra])
        self.qp = small_qp(self.H, problem.G, E)

    def linear_terms(
        self, p: np.ndarray, h_shift: np.ndarray | None = None, extra_e: np.ndarray | None = None
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """``f``, ``h``, ``e`` and the objective constant for property log-ratios ``p`` (N, 6)."""
        pr = self.problem
        p = np.atleast_2d(p)
        Bp = p @ pr.B.T  # (N, k)
        f = 2.0 * (Bp * self.W) @ pr.A - 2.0 * self.eps * self.y0
        const = np.sum(self.W * Bp**2, axis=1) + self.eps * float(self.y0 @ self.y0)
        h, e = pr.rhs(p)
        if h_shift is not None:
            h = h + h_shift
        if self.extra.shape[0]:
            ex_e = (
                np.zeros((p.shape[0], self.extra.shape[0]))
                if extra_e is None
                else (np.broadcast_to(extra_e, (p.shape[0], self.extra.shape[0])))
            )
            e = np.hstack([e, ex_e])
        return f, h, e, const

    def solve(
        self, p: np.ndarray, h_shift: np.ndarray | None = None, extra_e: np.ndarray | None = None
    ) -> tuple[QPBatch, np.ndarray]:
        """Solve for each row of ``p``; returns the batch and the true objectives (N,)."""
        f, h, e, _ = self.linear_terms(p, h_shift, extra_e)
        batch = self.qp.solve(f, h, e)
        return batch, self.true_objective(batch.y, np.atleast_2d(p))

    def true_objective(self, y: np.ndarray, p: np.ndarray) -> np.ndarray:
        """Weighted sum of squared log-mismatches (without the tie-break term)."""
        pr = self.problem
        r = y @ pr.A.T + p @ pr.B.T
        out = np.sum(pr.W * r**2, axis=1)
        return np.where(np.all(np.isfinite(y), axis=1), out, np.inf)


_QPS: dict[tuple[bytes, ...], SmallQP] = {}


def small_qp(H: np.ndarray, G: np.ndarray, E: np.ndarray) -> SmallQP:
    """``SmallQP(H, G, E)``, kept per exact bytes of the three matrices: the optimum, each
    relaxed limit and each preferred ratio of a case (and every later solve of it) build the
    same enumeration; it is read-only once built, so a kept one answers as a fresh one."""
    from compromise.solving import qp

    parts = [str(qp.MAX_ENUMERATED_ROWS).encode()]
    for a in (H, G, E):
        parts += [f"{a.dtype} {a.shape} {a.strides}".encode(), a.tobytes()]
    key = tuple(parts)
    found = _QPS.get(key)
    if found is None:
        if len(_QPS) >= 64:
            _QPS.clear()
        found = _QPS[key] = SmallQP(H, G, E)
    return found


@dataclass(frozen=True)
class State:
    """A model fluid state and its optimal decision log-ratios."""

    fluid: str
    temperature: float
    pressure: float
    y: np.ndarray
    objective: float


def grid_points(lo: float, hi: float, n: int, log: bool = False) -> np.ndarray:
    if hi <= lo:
        return np.array([lo])
    return np.geomspace(lo, hi, n) if log else linspace(lo, hi, n)


def linspace(start: float, stop: float, num: int) -> np.ndarray:
    """``np.linspace(start, stop, num)`` for two floats and ``num >= 2``, bit for bit (the same
    operations in the same order: steps of ``(stop - start) / (num - 1)``, the last point set to
    ``stop``) without its generic dispatch, which costs more than the points in a zoom round."""
    if num < 2:
        return np.linspace(start, stop, num)
    div = num - 1
    delta = float(stop) - float(start)
    step = delta / div
    y = np.arange(num, dtype=float)
    if step == 0:  # numpy's handling of denormal steps
        y /= div
        y *= delta
    else:
        y *= step
    y += float(start)
    y[-1] = float(stop)
    return y


def source_logs(fluid: object, T: float, P: float) -> np.ndarray:
    """``ln`` of rho, mu, nu, sigma, c (and 0 for g) from a fluid's source models at (T, P),
    kept on the fluid like its properties, so later solves ask for the same state at no cost."""
    from compromise.solving.problem import property_environment

    cache = fluid.__dict__.setdefault("_source_logs", {})
    key = (float(T), float(P))
    hit = cache.get(key)
    if hit is None:
        if len(cache) >= 20000:
            cache.clear()
        env = property_environment(fluid.properties(T, P))  # type: ignore[attr-defined]
        hit = np.array(
            [
                0.0 if n == "g" else math.log(env[n]) if env[n] > 0 else np.nan
                for n in PROPERTY_NAMES
            ]
        )
        hit.flags.writeable = False
        cache[key] = hit
    return hit


#: (fluid, prototype logs, used properties, spline pressure) -> (exact rows, spline grids)
_SHARED: dict[tuple[object, ...], tuple[dict, dict]] = {}


class FluidStates:
    """Property log-ratios of one model fluid over the case's temperature (and pressure) range."""

    def __init__(self, case: Case, fluid: str, used: frozenset[str]) -> None:
        from compromise.physics.fluids import get_fluid

        self.case = case
        self.fluid = get_fluid(fluid)
        self.name = self.fluid.name
        proto = get_fluid(case.fluid).properties(case.temperature, case.pressure)
        from compromise.solving.problem import property_environment

        penv = property_environment(proto)
        # gravity is the same in model and prototype: its log-ratio is zero
        self.proto_log = np.array(
            [
                0.0 if n == "g" else math.log(penv[n]) if penv[n] > 0 else np.nan
                for n in PROPERTY_NAMES
            ]
        )
        self.used = np.array([n in used for n in PROPERTY_NAMES])
        self.gas = self.fluid.phase == "gas"
        #: whether the pressure is searched: a gas's properties depend on it; a liquid's ambient
        #: pressure matters where a group names it (the cavitation index)
        self.pressure_searched = self.gas or "p_ambient" in used
        # the memos of property rows, shared by every FluidStates of the same fluid, prototype
        # state, used properties and (for a liquid) spline pressure: the optimum, the relaxed
        # limits, the preferred ratios and later solves of the case ask for the same rows
        identity = (
            self.name,
            self.proto_log.tobytes(),
            self.used.tobytes(),
            None if self.gas else float(case.model.pressure[0]),
        )
        if identity not in _SHARED and len(_SHARED) >= 256:
            _SHARED.clear()
        self._exact, self._grid_p = _SHARED.setdefault(identity, ({}, {}))
        m = case.model
        self.t_range = m.temperature
        missing = [
            n
            for n in PROPERTY_NAMES[:-1]
            if n in used
            and not np.isfinite(
                self._p(np.array([m.temperature[0]]), m.pressure[0])[0][PROPERTY_NAMES.index(n)]
            )
        ]
        if missing:
            raise CaseError(
                f"'{self.name}' has no {missing[0]} (as the groups or limits need)",
                file=case.path,
                key="model.fluids",
            )

    def _p(self, T: np.ndarray, P: float) -> np.ndarray:
        T = np.asarray(T, dtype=float).reshape(-1)
        p = np.empty((T.size, 6))
        # a liquid's properties hardly depend on pressure (water: ~5e-10 /Pa); its splines are
        # built once, at the lowest model pressure, the source models are asked at the state.
        # ln rho, mu, nu, sigma, c from the splines; gravity's log is 0 in model and prototype
        table = self.fluid.table(P if self.gas else self.case.model.pressure[0])
        np.subtract(table.logs(T), self.proto_log[:5], out=p[:, :5])
        p[:, 5] = 0.0 - self.proto_log[5]
        p[:, ~self.used] = 0.0
        return p

    def p(self, T: np.ndarray, P: float) -> np.ndarray:
        """Property log-ratios (N, 6) at temperatures ``T`` [K] and pressure ``P`` [Pa].

        Memoised per (temperatures, pressure): the searches of several scenarios (relaxed
        limits, fixed ratios) often ask for the same zoom grid.
        """
        T = np.atleast_1d(np.asarray(T, dtype=float))
        key = (T.tobytes(), float(P))
        hit = self._grid_p.get(key)
        if hit is None:
            if len(self._grid_p) >= 4096:
                self._grid_p.clear()
            hit = self._grid_p[key] = self._p(T, P)
            hit.flags.writeable = False
        return hit

    def exact_p(self, T: float, P: float) -> np.ndarray:
        """Property log-ratios from the source models (not the splines), memoised per state."""
        key = (float(T), float(P))
        hit = self._exact.get(key)
        if hit is None:
            if len(self._exact) >= 20000:
                self._exact.clear()
            hit = self._exact[key] = self._exact_p(T, P)
            hit.flags.writeable = False
        return hit

    def exact_ps(self, T: float, pressures: list[float]) -> np.ndarray:
        """:meth:`exact_p` at one temperature and several pressures, as rows (the same values:
        one subtraction over the stacked source logs instead of one per state)."""
        T = float(T)
        rows = [self._exact.get((T, float(P))) for P in pressures]
        if all(r is not None for r in rows):
            return np.array(rows)
        out = np.array([source_logs(self.fluid, T, P) for P in pressures]) - self.proto_log
        out[:, ~self.used] = 0.0
        out.flags.writeable = False  # its rows are kept as they are (read-only views)
        if len(self._exact) >= 20000:
            self._exact.clear()
        for P, row in zip(pressures, out, strict=True):
            self._exact.setdefault((T, float(P)), row)
        return out

    def _exact_p(self, T: float, P: float) -> np.ndarray:
        p = source_logs(self.fluid, T, P) - self.proto_log
        p[~self.used] = 0.0
        return p

    def pressures(self) -> np.ndarray:
        """The pressure grid [Pa] (one value for a liquid whose pressure no group names),
        computed once (read-only)."""
        grid = self.__dict__.get("_pressures")
        if grid is None:
            lo, hi = self.case.model.pressure
            grid = (
                grid_points(lo, hi, N_PRESSURES, log=True)
                if self.pressure_searched
                else np.array([lo])
            )
            grid.flags.writeable = False
            self._pressures = grid
        return grid

    def state_environment(self, T: float, P: float) -> dict[str, float]:
        """``p_ambient`` and ``p_vapour`` [Pa] of the model fluid at (T, P), source models."""
        vp = self.fluid.properties(T, P).vapour_pressure
        return {"p_ambient": float(P), "p_vapour": math.nan if vp is None else float(vp)}


# --------------------------------------------------------------------------------------------
# the search for each fluid's best state, as jobs that share batched solves
#
# A job is a generator: it yields the property log-ratios (k, 6) it wants solved and receives
# ``(y, feasible, objective)`` for them. :func:`_drive` runs many jobs (several fluids, and
# several scenarios: relaxed bounds, fixed ratios) in lockstep, stacking every pending request
# into one solve per step. Each job's own arithmetic is unchanged by the company it keeps, so a
# batched search returns exactly what the job would return alone.

Reply = tuple[np.ndarray, np.ndarray, np.ndarray]
Job = Generator[np.ndarray, Reply, "State | None"]
Scenario = tuple["np.ndarray | None", "np.ndarray | None"]  # (h_shift, extra_e)


def _drive(engine: Engine, jobs: list[tuple[Job, Scenario]]) -> list[State | None]:
    """Run jobs to completion, one batched solve per round of requests."""
    out: list[State | None] = [None] * len(jobs)
    pending: dict[int, np.ndarray] = {}

    def advance(i: int, reply: Reply | None) -> None:
        try:
            req = jobs[i][0].send(reply)  # type: ignore[arg-type]
        except StopIteration as stop:
            out[i] = stop.value
            pending.pop(i, None)
        else:
            pending[i] = np.atleast_2d(req)

    for i in range(len(jobs)):
        advance(i, None)
    m, k = engine.problem.G.shape[0], engine.extra.shape[0]
    zeros_m, zeros_k = np.zeros(m), np.zeros(k)
    while pending:
        order = list(pending)
        sizes = [pending[i].shape[0] for i in order]
        p_all = np.vstack([pending[i] for i in order])
        shifted = any(jobs[i][1][0] is not None for i in order)
        # each job's scenario row repeated for its requests (exact copies, one call)
        h_shift = (
            np.repeat(
                np.array([zeros_m if jobs[i][1][0] is None else jobs[i][1][0] for i in order]),
                sizes,
                axis=0,
            ).reshape(-1, m)
            if shifted
            else None
        )
        extra_e = (
            np.repeat(
                np.array([zeros_k if jobs[i][1][1] is None else jobs[i][1][1] for i in order]),
                sizes,
                axis=0,
            ).reshape(-1, k)
            if k
            else None
        )
        batch, obj = engine.solve(p_all, h_shift, extra_e)
        start = 0
        for i, n in zip(order, sizes, strict=True):
            sl = slice(start, start + n)
            start += n
            advance(i, (batch.y[sl], batch.feasible[sl], obj[sl]))
    return out


def _single_job(
    fs: FluidStates, n_temperatures: int, polish: bool
) -> Generator[np.ndarray, Reply, State | None]:
    """One fluid's search: grid over temperature (and pressure), zoom, exact finish."""
    t_lo, t_hi = fs.t_range
    T = grid_points(t_lo, t_hi, n_temperatures)
    best: tuple[float, float, float] | None = None  # (objective, T, P)
    _, _, grid_obj = yield np.vstack([fs.p(T, P) for P in fs.pressures()])
    for j, P in enumerate(fs.pressures()):
        obj = grid_obj[j * T.size : (j + 1) * T.size]
        k = int(np.argmin(obj))
        if np.isfinite(obj[k]) and (best is None or obj[k] < best[0] - 1e-15):
            best = (float(obj[k]), float(T[k]), float(P))
    if best is None:
        return None
    obj0, t_best, p_best = best
    Ps = fs.pressures()
    for _ in range(2 if fs.gas and Ps.size > 1 else 1):
        if polish and len(T) > 1:
            half = T[1] - T[0]
            for _ in range(ZOOM_ROUNDS):
                Tz = linspace(max(t_lo, t_best - half), min(t_hi, t_best + half), N_ZOOM)
                _, _, obj = yield fs.p(Tz, p_best)
                k = int(np.argmin(obj))
                if obj[k] < obj0:
                    obj0, t_best = float(obj[k]), float(Tz[k])
                half = 2.0 * (Tz[1] - Tz[0])
        if polish and fs.gas and Ps.size > 1:
            half = math.log(Ps[1] / Ps[0])
            lp_lo, lp_hi = math.log(Ps[0]), math.log(Ps[-1])
            for _ in range(ZOOM_ROUNDS):
                lp = linspace(
                    max(lp_lo, math.log(p_best) - half),
                    min(lp_hi, math.log(p_best) + half),
                    N_ZOOM_PRESSURE,
                )
                _, _, obj = yield fs.exact_ps(t_best, [math.exp(v) for v in lp])
                k = int(np.argmin(obj))
                if obj[k] < obj0:
                    obj0, p_best = float(obj[k]), math.exp(float(lp[k]))
                half = 2.0 * (lp[1] - lp[0])
    step = (T[1] - T[0]) / 16.0**ZOOM_ROUNDS if len(T) > 1 else 0.0
    return (yield from _finish(fs, t_best, p_best, step))


def _liquid_job(fs: FluidStates, n_temperatures: int) -> Generator[np.ndarray, Reply, State | None]:
    """A liquid's search (one pressure): temperature grid, zoom, exact finish."""
    P = float(fs.pressures()[0])
    grid = grid_points(*fs.t_range, n_temperatures)
    _, _, o = yield fs.p(grid, P)
    k = int(np.argmin(o))
    if not np.isfinite(o[k]):
        return None
    best = [float(o[k]), float(grid[k])]
    half = float(grid[1] - grid[0]) if grid.size > 1 else 0.0
    for _ in range(ZOOM_ROUNDS if half > 0 else 0):
        lo, hi = fs.t_range
        Tz = linspace(max(lo, best[1] - half), min(hi, best[1] + half), N_ZOOM)
        _, _, o = yield fs.p(Tz, P)
        k = int(np.argmin(o))
        if o[k] < best[0]:
            best = [float(o[k]), float(Tz[k])]
        half = 2.0 * float(Tz[1] - Tz[0])
    return (yield from _finish(fs, best[1], P, half / 2.0))


def _finish(
    fs: FluidStates, t: float, P: float, step: float
) -> Generator[np.ndarray, Reply, State | None]:
    """Re-solve at the polished state with the source property models (not the splines).

    Where the splines (relative error ~1e-8) put the state just inside a bound that the source
    models put just outside, step back into the feasible side in growing steps.
    """
    y, feasible, obj = yield fs.exact_p(t, P)[None]
    if feasible[0]:
        return State(fs.name, t, P, y[0], float(obj[0]))
    lo, hi = fs.t_range
    for k in range(1, 12):
        cands = [c for c in (t - step * 4.0**k, t + step * 4.0**k) if lo <= c <= hi]
        if not cands:
            break
        y, feasible, obj = yield np.array([fs.exact_p(c, P) for c in cands])
        if feasible.any():
            j = int(np.argmin(obj))
            return State(fs.name, cands[j], P, y[j], float(obj[j]))
    return None


def best_state(
    engine: Engine,
    fs: FluidStates,
    *,
    n_temperatures: int = N_TEMPERATURES,
    h_shift: np.ndarray | None = None,
    extra_e: np.ndarray | None = None,
    polish: bool = True,
) -> State | None:
    """The optimal state of one fluid: grid over temperature (and pressure), then polish.

    The polish zooms: a fine grid of :data:`N_ZOOM` temperatures over the two grid cells around
    the best point, solved in one batch, repeated :data:`ZOOM_ROUNDS` times (each round shrinks
    the interval about 16-fold). Unlike a parabolic line search it is not misled by the kinks
    where the active set changes. For a gas, log-pressure is zoomed the same way with the
    source property models.
    """
    return _drive(engine, [(_single_job(fs, n_temperatures, polish), (h_shift, extra_e))])[0]


def best_states(
    engine: Engine,
    fss: list[FluidStates],
    *,
    n_temperatures: int = N_TEMPERATURES,
    h_shift: np.ndarray | None = None,
    extra_e: np.ndarray | None = None,
) -> list[State | None]:
    """:func:`best_state` for several fluids, their searches sharing batched solves."""
    return best_states_scenarios(engine, fss, [(h_shift, extra_e)], n_temperatures=n_temperatures)[
        0
    ]


def best_states_scenarios(
    engine: Engine,
    fss: list[FluidStates],
    scenarios: list[Scenario],
    *,
    n_temperatures: int = N_TEMPERATURES,
) -> list[list[State | None]]:
    """Every fluid's best state under each scenario ``(h_shift, extra_e)``, in shared batches.

    A scenario shifts the right-hand sides of the inequality rows (a relaxed bound) and/or sets
    the engine's extra equality rows (a fixed ratio). Liquids take the one-pressure search,
    gases with a pressure range the two-dimensional one.
    """
    jobs: list[tuple[Job, Scenario]] = []
    for sc in scenarios:
        for fs in fss:
            job = (
                _liquid_job(fs, n_temperatures)
                if fs.pressures().size == 1
                else _single_job(fs, n_temperatures, True)
            )
            jobs.append((job, sc))
    flat = _drive(engine, jobs)
    n = len(fss)
    return [flat[i * n : (i + 1) * n] for i in range(len(scenarios))]
