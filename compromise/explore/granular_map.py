"""The design-space map of a case with ``[sediment]``: the model grain size against a ratio.

Over a grid of the horizontal ratio (or another ratio) and the model grain size, with the map's
fluid and the optimum's material fixed, every other decision (the other ratios and the
temperature) takes its optimum: each cell is the four-variable QP of
:mod:`compromise.solving.granular` with two extra equality rows, solved exactly for every
temperature of a grid. The moving-bed floor is held at the critical Shields value of the
optimum's grain (the map shows the window around the answer, not each grain's own threshold).

Each limit's boundary is, as on the other maps (:mod:`compromise.explore.designmap`), the zero
level of its least log-violation ``G_i u - h_i`` over the free variables subject only to the
exact groups and the bounds: on a temperature axis the fluid state of each cell is its own, so a
limit that depends on the viscosity bends with the temperature; on a grain-size axis the least
violation is taken over the temperature grid.

A ratio against ``temperature`` is the other map of such a case: each cell at its best grain
size (and other ratios). It is the default where a group kept exactly ties the grain size to
the ratios (a breakwater's stability number): there the grain-size map's feasible set is a
line, which no grid cell hits.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.explore.granular_front import held_floor
from compromise.explore.map_parts import Boundary, row_label, row_parts, zoom_ranges
from compromise.solving.granular import GrainEngine, GranularProblem
from compromise.solving.grid import REGULARISATION, FluidStates, grid_points
from compromise.solving.qp import SmallQP

_NORMALS = {
    "horizontal_ratio": [1.0, 0.0, 0.0, 0.0],
    "vertical_ratio": [0.0, 1.0, 0.0, 0.0],
    "distortion": [-1.0, 1.0, 0.0, 0.0],
    "velocity_ratio": [0.0, 0.0, 1.0, 0.0],
}


def granular_map(
    case: Case,
    axes: tuple[str, str],
    *,
    fluid: str | None = None,
    resolution: int = 81,
    n_temperatures: int = 24,
    full_range: bool = False,
) -> dict[str, Any]:
    """The map of a ``[sediment]`` case over a ratio and ``grain_size`` (see the module
    docstring), as the fields of :class:`compromise.explore.designmap.DesignMap`."""
    from compromise.physics.materials import get_material
    from compromise.solving.optimum import find_optimum

    sed = case.sediment
    assert sed is not None
    inner = "grain_size" if "grain_size" in axes else "temperature"
    if inner not in axes or not any(a in _NORMALS for a in axes):
        raise CaseError(
            f"a case with [sediment] maps the model grain size or temperature against a ratio "
            f"(one of {', '.join(_NORMALS)}), got {', '.join(axes)}",
            key="--axes",
        )
    sol = find_optimum(case)
    best = sol.design
    fluid = fluid or (best.fluid if best else case.model.fluids[0])
    if fluid not in case.model.fluids:
        raise CaseError(f"'{fluid}' is not one of model.fluids", file=case.path, key="--fluid")
    material = best.material if best and best.material else sed.materials[0]
    floor = held_floor(sol)
    gp = GranularProblem(case)
    ratio_axis = next(a for a in axes if a != inner)
    if inner == "grain_size":
        tied = gp.grain_ties()
        if tied:
            raise CaseError(
                f"'{tied[0]}' is kept exactly and ties the model grain size to the ratios, so "
                f"the feasible designs over {ratio_axis} and grain_size are a line, not an area;"
                f" map {ratio_axis} against temperature instead (the default of this case)",
                file=case.path,
                key="--axes",
            )
    m = case.model
    if ratio_axis == "horizontal_ratio":
        lo, hi = m.horizontal_ratio
    elif ratio_axis == "distortion":
        lo, hi = m.distortion
    elif ratio_axis == "velocity_ratio" and m.velocity_ratio is not None:
        lo, hi = m.velocity_ratio
    else:  # vertical ratio, or a velocity ratio the case leaves free: around the optimum
        ref = getattr(best, ratio_axis) if best else m.horizontal_ratio[1]
        lo, hi = ref / 10.0, min(1.0, ref * 10.0)
    fs = FluidStates(case, fluid, gp.used)
    P = float(fs.pressures()[0])
    rho_s = get_material(material).density
    if inner == "grain_size":
        i_lo, i_hi = sed.grain_size
        if not math.isfinite(i_hi):
            i_hi = 10.0 * max(i_lo, best.grain_size if best and best.grain_size else i_lo)
        temps = grid_points(*fs.t_range, n_temperatures)
    else:  # temperature: the grain size is decided in every cell
        i_lo, i_hi = fs.t_range
        temps = np.zeros(0)
    u_best = None
    if best is not None and best.grain_size is not None and best.fluid == fluid:
        u_best = (
            np.append(best.logs, math.log(best.grain_size / gp.d0)),
            fs.p(np.array([best.temperature]), P),
        )

    def window(r_range: tuple[float, float], n_grid: int) -> dict[str, Any]:
        r_lo, r_hi = r_range
        r_grid = np.geomspace(r_lo, r_hi, n_grid) if r_hi > r_lo else np.array([r_lo])
        spaced = np.geomspace if inner == "grain_size" else np.linspace
        inner_grid = spaced(i_lo, i_hi, n_grid) if i_hi > i_lo else np.array([i_lo])
        grids = {ratio_axis: r_grid, inner: inner_grid}
        gx, gy = grids[axes[0]], grids[axes[1]]
        cx, cy = np.meshgrid(gx, gy)
        flat = {axes[0]: cx.ravel(), axes[1]: cy.ravel()}
        n = flat[ratio_axis].size
        obj = np.full(n, np.inf)
        tem = np.full(n, np.nan)
        if inner == "grain_size":
            extra = np.array([_NORMALS[ratio_axis], [0.0, 0.0, 0.0, 1.0]])
            cell_e = np.column_stack([np.log(flat[ratio_axis]), np.log(flat[inner] / gp.d0)])
            engine = GrainEngine(gp, extra_E=extra)
            states = [np.repeat(fs.p(np.array([T]), P), n, axis=0) for T in temps]
            for T, p in zip(temps, states, strict=True):
                c = gp.constants(p[:1], rho_s)
                _, o = engine.solve(p, np.repeat(c, n, axis=0), floor, extra_e=cell_e)
                better = o < obj
                obj[better], tem[better] = o[better], T
        else:
            extra = np.array([_NORMALS[ratio_axis]])
            cell_e = np.log(flat[ratio_axis])[:, None]
            engine = GrainEngine(gp, extra_E=extra)
            states = [fs.p(flat[inner], P)]
            c = gp.constants(states[0], rho_s)
            _, obj = engine.solve(states[0], c, floor, extra_e=cell_e)
            tem = flat[inner].copy()
        shape = (gy.size, gx.size)
        return {
            "x": gx,
            "y": gy,
            "objective": np.where(np.isfinite(obj), obj, np.nan).reshape(shape),
            "temperature": tem.reshape(shape),
            "extra": extra,
            "cell_e": cell_e,
            "states": states,
        }

    full = [(lo, hi) if a == ratio_axis else (i_lo, i_hi) for a in axes]
    cells = window((lo, hi), resolution)
    zoomed = [False, False]
    if not full_range and hi > lo:
        ranges, zoomed = zoom_ranges(
            axes, full, [cells["x"], cells["y"]], np.isfinite(cells["objective"])
        )
        zoomed = [z and a == ratio_axis for z, a in zip(zoomed, axes, strict=True)]
        if any(zoomed):  # the ratio axis narrowed onto a sliver of a window
            cells = window(ranges[axes.index(ratio_axis)], resolution)
    shape = cells["objective"].shape
    boundaries = _boundaries(
        gp, axes, cells["extra"], cells["cell_e"], cells["states"], rho_s, floor, shape, u_best
    )
    preferred = tuple(
        (a.label, a.design, a.objective) for a in sol.alternatives if a.kind == "ratio"
    )
    here = best is not None and best.fluid == fluid
    return {
        "case": case,
        "fluid": fluid,
        "axes": axes,
        "x": cells["x"],
        "y": cells["y"],
        "objective": cells["objective"],
        "temperature": cells["temperature"],
        "boundaries": boundaries,
        "optimum": best if here else None,
        "optimum_objective": sol.objective if here else math.inf,
        "preferred": preferred,
        "full_ranges": tuple(full),
        "zoomed": (zoomed[0], zoomed[1]),
    }


def _label(gp: GranularProblem, row: Any, floor: float | None) -> str:
    """``wave_height <= 0.25 m``, ``armour_reynolds >= 3e+04``, ``d >= 10 mm [sediment]``."""

    op = "<=" if row.side == "max" else ">="
    if row.key == "sediment.moving_bed":
        return f"shields {op} {floor:.3g} (moving bed)" if floor else "shields (moving bed)"
    if row.kind == "bound" and row.name == "grain_size":
        return f"d {op} {row.bound * 1e3:g} mm [sediment]"
    if row.kind == "limit" and row.name == gp.sed.grain:
        return f"{row.name} {op} {row.bound * 1e3:g} mm"
    return row_label(gp.case, row)


def _boundaries(
    gp: GranularProblem,
    axes: tuple[str, str],
    extra: np.ndarray,
    cell_e: np.ndarray,
    states: list[np.ndarray],
    rho_s: float,
    floor: float | None,
    shape: tuple[int, int],
    at_best: tuple[np.ndarray, np.ndarray] | None,
) -> tuple[Any, ...]:
    """Every limit's least log-violation over the map (see the module docstring), least over
    the fluid states ``states`` (one (N, 6) array per temperature of the grid, or one with each
    cell's own state)."""

    E = np.vstack([gp.E, extra])
    bounds = [i for i, r in enumerate(gp.rows) if r.kind == "bound"]

    def rhs(p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        c = gp.constants(p, rho_s)
        h = gp.h0 + c @ gp.Hc.T + p @ gp.P.T
        if gp.floor_row is not None:
            h[:, gp.floor_row] -= math.log(floor if floor is not None else 1e-300)
        return h, gp.e0 + c @ gp.Ec.T + p @ gp.Q.T

    rhs_all = [rhs(p) for p in states]
    out = []
    for i, row in enumerate(gp.rows):
        if row.kind == "bound" and row.name in axes:
            continue  # the frame of the map
        if row.key == "sediment.moving_bed" and floor is None:
            continue
        others = [j for j in bounds if j != i]
        qp = SmallQP(2.0 * REGULARISATION * np.eye(gp.G.shape[1]), gp.G[others], E)
        g = np.full(cell_e.shape[0], np.inf)
        for h, e in rhs_all:
            f = np.broadcast_to(gp.G[i], (h.shape[0], gp.G.shape[1]))
            y = qp.solve(f, h[:, others], np.hstack([e, cell_e])).y
            v = y @ gp.G[i] - h[:, i]
            g = np.fmin(g, np.where(np.isfinite(v), v, np.inf))
        binding = False
        if at_best is not None:
            u, p = at_best
            h, _ = rhs(p)
            binding = bool(abs(gp.G[i] @ u - h[0, i]) <= 1e-5 * (1 + abs(h[0, i])))
        own = row.key == "sediment.moving_bed" or row.name == gp.sed.grain  # labelled in mm
        parts = {} if own else row_parts(gp.case, row)
        out.append(Boundary(row.key, _label(gp, row, floor), g.reshape(shape), binding, **parts))
    return tuple(out)
