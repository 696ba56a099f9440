"""The design-space map of a case with ``[sediment]``: the model grain size against a ratio.

Over a grid of the horizontal ratio (or another ratio) and the model grain size, with the map's
fluid and the optimum's material fixed, every other decision (the other ratios and the
temperature) takes its optimum: each cell is the four-variable QP of
:mod:`compromise.solving.granular` with two extra equality rows, solved exactly for every
temperature of a grid. The moving-bed floor is held at the critical Shields value of the
optimum's grain (the map shows the window around the answer, not each grain's own threshold).
Limits are not drawn as lines on this map (the feasible window is the region with a value).

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
from compromise.solving.granular import GrainEngine, GranularProblem
from compromise.solving.grid import FluidStates, grid_points

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
    floor = (
        sol.sediment.critical_shields[1]
        if sol.sediment is not None and sol.sediment.critical_shields is not None
        else None
    )
    gp = GranularProblem(case)
    ratio_axis = next(a for a in axes if a != inner)
    if inner == "grain_size":
        tied = [n for n, row in zip(gp.exact, gp.E, strict=True) if abs(row[-1]) > 0.0]
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
    r_grid = np.geomspace(lo, hi, resolution) if hi > lo else np.array([lo])
    fs = FluidStates(case, fluid, gp.used)
    P = float(fs.pressures()[0])
    rho_s = get_material(material).density
    if inner == "grain_size":
        d_lo, d_hi = sed.grain_size
        if not math.isfinite(d_hi):
            d_hi = 10.0 * max(d_lo, best.grain_size if best and best.grain_size else d_lo)
        inner_grid = np.geomspace(d_lo, d_hi, resolution) if d_hi > d_lo else np.array([d_lo])
        temps = grid_points(*fs.t_range, n_temperatures)
    else:  # temperature: the grain size is decided in every cell
        t_lo, t_hi = fs.t_range
        inner_grid = np.linspace(t_lo, t_hi, resolution) if t_hi > t_lo else np.array([t_lo])
    grids = {ratio_axis: r_grid, inner: inner_grid}
    gx, gy = grids[axes[0]], grids[axes[1]]
    cx, cy = np.meshgrid(gx, gy)
    flat = {axes[0]: cx.ravel(), axes[1]: cy.ravel()}
    n = flat[ratio_axis].size
    obj = np.full(n, np.inf)
    tem = np.full(n, np.nan)
    if inner == "grain_size":
        extra = np.array([_NORMALS[ratio_axis], [0.0, 0.0, 0.0, 1.0]])
        extra_e = np.column_stack([np.log(flat[ratio_axis]), np.log(flat[inner] / gp.d0)])
        engine = GrainEngine(gp, extra_E=extra)
        for T in temps:
            p = fs.p(np.array([T]), P)
            c = gp.constants(p, rho_s)
            _, o = engine.solve(
                np.repeat(p, n, axis=0), np.repeat(c, n, axis=0), floor, extra_e=extra_e
            )
            better = o < obj
            obj[better], tem[better] = o[better], T
    else:
        engine = GrainEngine(gp, extra_E=np.array([_NORMALS[ratio_axis]]))
        T_cells = flat[inner]
        p = fs.p(T_cells, P)
        c = gp.constants(p, rho_s)
        _, obj = engine.solve(p, c, floor, extra_e=np.log(flat[ratio_axis])[:, None])
        tem = T_cells.copy()
    shape = (gy.size, gx.size)
    objective = np.where(np.isfinite(obj), obj, np.nan).reshape(shape)
    preferred = tuple(
        (a.label, a.design, a.objective) for a in sol.alternatives if a.kind == "ratio"
    )
    here = best is not None and best.fluid == fluid
    return {
        "case": case,
        "fluid": fluid,
        "axes": axes,
        "x": gx,
        "y": gy,
        "objective": objective,
        "temperature": tem.reshape(shape),
        "boundaries": (),
        "optimum": best if here else None,
        "optimum_objective": sol.objective if here else math.inf,
        "preferred": preferred,
    }
