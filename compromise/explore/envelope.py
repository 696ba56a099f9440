"""Shared machinery of the trade-off tools: lower envelopes over the model fluid's state.

The subproblems themselves are solved exactly, many at a time, by
:class:`compromise.solving.qp.SmallQP`.

:func:`lower_envelope` minimises a batched objective over a model fluid's temperature (and, for a
gas, log-pressure) for many items at once: a grid, then rounds of a finer grid around the best
point (a zoom, as :func:`compromise.solving.grid.best_state` does), every round one batched call.
Between the pressures of the solver's grid, a gas's property log-ratios are interpolated with a
cubic spline in log-pressure (the tables themselves are splines in temperature at each pressure).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from compromise.solving.grid import FluidStates

N_ZOOM = 9  # points per zoom round; each round shrinks the interval fourfold
ZOOM_ROUNDS = 8  # 4^8: a 1 K grid cell is resolved to about 2e-5 K


class StateSpace:
    """Property log-ratios of one model fluid over its temperature and log-pressure range.

    Parameters
    ----------
    states : FluidStates
        The solver's property tables of the fluid.
    """

    def __init__(self, states: FluidStates) -> None:
        self.fs = states
        self.name = states.name
        self.t_range = (float(states.t_range[0]), float(states.t_range[1]))
        self.pressures = states.pressures()
        self.lnp = np.log(self.pressures)
        self.lnp_range = (float(self.lnp[0]), float(self.lnp[-1]))
        self._weights = None
        if self.lnp.size > 1:
            from scipy.interpolate import CubicSpline

            self._weights = CubicSpline(self.lnp, np.eye(self.lnp.size), axis=0)

    @property
    def variable_pressure(self) -> bool:
        """Whether the pressure is a decision variable (a gas with a pressure range)."""
        return self.lnp.size > 1

    def p(self, T: np.ndarray, lnp: np.ndarray) -> np.ndarray:
        """Property log-ratios (N, 6) at temperatures ``T`` [K] and log-pressures ``lnp`` [ln Pa].

        At a pressure of the grid the solver's table is used as it is; in between, the tables of
        the grid's pressures are combined with cubic-spline weights in log-pressure.
        """
        T = np.atleast_1d(np.asarray(T, dtype=float))
        if self._weights is None:
            table, index = self.p_rows(T, lnp)
            return table[index]
        Tu, back = np.unique(T, return_inverse=True)
        lnp = np.broadcast_to(np.asarray(lnp, dtype=float), T.shape)
        w = self._weights(np.clip(lnp, *self.lnp_range))  # (N, J)
        tabs = np.stack([self.fs.p(Tu, float(P)) for P in self.pressures])[:, back]  # (J, N, 6)
        return np.einsum("nj,jnk->nk", w, tabs)

    def p_rows(self, T: np.ndarray, lnp: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """:meth:`p` as distinct rows and an index: ``p(T, lnp) == table[index]``.

        A liquid's (or fixed-pressure gas's) rows are those of the distinct temperatures; a
        gas with a pressure range gets one row per state."""
        T = np.atleast_1d(np.asarray(T, dtype=float))
        if self._weights is None:
            Tu, back = np.unique(T, return_inverse=True)
            return self.fs.p(Tu, float(self.pressures[0])), back.reshape(-1)
        return self.p(T, lnp), np.arange(T.size)

    def exact_p(self, T: float, P: float) -> np.ndarray:
        """Property log-ratios (6,) from the fluid's source models."""
        return self.fs.exact_p(T, P)


Evaluate = Callable[[np.ndarray, np.ndarray], np.ndarray]


def lower_envelope(
    spaces: list[StateSpace],
    fluid: np.ndarray,
    evaluate: Evaluate,
    *,
    n_temperatures: int = 24,
    temperature: np.ndarray | None = None,
    zoom_rounds: int = ZOOM_ROUNDS,
    log_pressure: np.ndarray | None = None,
    indexed: bool = False,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Minimise ``evaluate`` over the fluid state of every item: grid, then zoom.

    Parameters
    ----------
    spaces : list of StateSpace
        The candidate fluids.
    fluid : (I,) int array
        Index into ``spaces`` of each item's fluid.
    evaluate : callable
        ``evaluate(items, p)`` with item indices (N,) and property log-ratios (N, 6) returns the
        objective (N,), ``inf`` where infeasible.
    n_temperatures : int
        Temperature grid size before the zoom.
    temperature : (I,) array, optional
        A fixed temperature per item [K] (no search over temperature).
    zoom_rounds : int
        Rounds of the zoom; each one shrinks the interval fourfold.
    log_pressure : (I,) array, optional
        A fixed log-pressure per item [ln Pa] (no search over pressure; a map's pressure axis).
    indexed : bool
        Call ``evaluate(items, table, index)`` instead, with the property rows given as distinct
        rows ``table`` (U, 6) and ``index`` (N,) into them (``p == table[index]``): many items
        share a state, and what depends on the state alone can be computed once per row.

    Returns
    -------
    T, lnp, value : (I,) arrays
        The best temperature [K], log-pressure [ln Pa] and objective of every item (``inf``
        where no state is feasible).
    """
    fluid = np.asarray(fluid, dtype=int)
    n_items = fluid.size
    best_t = np.full(n_items, np.nan)
    best_lp = np.full(n_items, np.nan)
    best_v = np.full(n_items, np.inf)
    step_t = np.zeros(n_items)
    step_p = np.zeros(n_items)
    # every fluid's grid in one batched evaluation
    parts = []
    for k, sp in enumerate(spaces):
        items = np.flatnonzero(fluid == k)
        if items.size == 0:
            continue
        lo, hi = sp.t_range
        if temperature is None:
            grid = np.linspace(lo, hi, n_temperatures) if hi > lo else np.array([lo])
        else:
            grid = np.array([0.0])
        gt, gp = np.meshgrid(grid, sp.lnp if log_pressure is None else [0.0], indexing="ij")
        gt, gp = gt.ravel(), gp.ravel()
        ng = gt.size
        it = np.repeat(items, ng)
        T = np.tile(gt, items.size) if temperature is None else np.repeat(temperature[items], ng)
        lp = np.tile(gp, items.size) if log_pressure is None else np.repeat(log_pressure[items], ng)
        if temperature is None and log_pressure is None:
            table = sp.p(gt, gp)
            index = np.tile(np.arange(ng), items.size)
        else:
            table, index = sp.p_rows(T, lp)
        parts.append((items, ng, it, T, lp, (table, index)))
        if temperature is None and grid.size > 1:
            step_t[items] = grid[1] - grid[0]
        if sp.variable_pressure and log_pressure is None:
            step_p[items] = sp.lnp[1] - sp.lnp[0]
    if parts:
        values = _call(
            evaluate, np.concatenate([x[2] for x in parts]), [x[5] for x in parts], indexed
        )
        start = 0
        for items, ng, _, T, lp, _ in parts:
            v = values[start : start + items.size * ng].reshape(items.size, ng)
            start += items.size * ng
            j = np.argmin(v, axis=1)
            rows = np.arange(items.size)
            best_v[items] = v[rows, j]
            best_t[items] = T.reshape(items.size, ng)[rows, j]
            best_lp[items] = lp.reshape(items.size, ng)[rows, j]
    passes = 2 if np.any(step_p > 0) else 1
    for _ in range(passes):
        for which, first in (("t", step_t), ("p", step_p)):
            step = first.copy()
            for _ in range(zoom_rounds):
                live = np.flatnonzero((step > 0) & np.isfinite(best_v))
                if live.size == 0:
                    break
                offsets = np.linspace(-1.0, 1.0, N_ZOOM)
                parts = []
                for k, sp in enumerate(spaces):
                    items = live[fluid[live] == k]
                    if items.size == 0:
                        continue
                    if which == "t":
                        lo, hi = sp.t_range
                        T = np.clip(best_t[items, None] + step[items, None] * offsets, lo, hi)
                        lp = np.broadcast_to(best_lp[items, None], T.shape)
                    else:
                        lo, hi = sp.lnp_range
                        lp = np.clip(best_lp[items, None] + step[items, None] * offsets, lo, hi)
                        T = np.broadcast_to(best_t[items, None], lp.shape)
                    parts.append((items, T, lp, sp.p_rows(T.ravel(), lp.ravel())))
                values = _call(
                    evaluate,
                    np.concatenate([np.repeat(x[0], N_ZOOM) for x in parts]),
                    [x[3] for x in parts],
                    indexed,
                )
                start = 0
                for items, T, lp, _ in parts:
                    v = values[start : start + items.size * N_ZOOM].reshape(items.size, N_ZOOM)
                    start += items.size * N_ZOOM
                    j = np.argmin(v, axis=1)
                    rows = np.arange(items.size)
                    better = v[rows, j] < best_v[items]
                    upd = items[better]
                    best_v[upd] = v[rows, j][better]
                    best_t[upd] = T[rows, j][better]
                    best_lp[upd] = lp[rows, j][better]
                step[live] *= 2.0 / (N_ZOOM - 1)
    return best_t, best_lp, best_v


def _call(
    evaluate: Evaluate,
    items: np.ndarray,
    rows: list[tuple[np.ndarray, np.ndarray]],
    indexed: bool,
) -> np.ndarray:
    """``evaluate`` on the parts' property rows (distinct rows and index per part), stacked."""
    if not indexed:
        return evaluate(items, np.vstack([table[index] for table, index in rows]))
    offsets = np.cumsum([0] + [table.shape[0] for table, _ in rows[:-1]])
    return evaluate(
        items,
        np.vstack([table for table, _ in rows]),
        np.concatenate([index + o for (_, index), o in zip(rows, offsets, strict=True)]),
    )
