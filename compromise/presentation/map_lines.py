"""Where a limit's boundary line is drawn on a design-space map: only along its stretch of the
feasible window's edge, where that limit is the one that binds.

A limit's boundary is the zero level of its least violation (:class:`Boundary`); beyond the point
where another limit's boundary crosses it, the line runs through cells that the other limit has
already excluded, and drawing it there suggests a second edge of the window that is not one
(a temperature axis makes this common: a viscous floor that binds in cold water runs on, in warm
water, behind the pump's ceiling). :func:`split_at_other_limits` cuts each contour polyline at
those crossings (linear interpolation of the other limits' fields between the two vertices on
either side) and returns the stretches where every other limit holds.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:
    from compromise.explore.designmap import DesignMap

#: A vertex is on the window's edge when no other limit is violated there by more than this
#: log-ratio (0.2 %, well above the interpolation error of the fields, which are linear in the
#: log-ratios on a Froude map; common practice for near-coincident lines to stay both drawn).
ACTIVE_TOL = 2e-3


def unit_coords(dmap: DesignMap, x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """Points of the map in [0, 1]^2 (log axes for everything but the temperature)."""
    out = []
    for which, v in ((0, x), (1, y)):
        g = dmap.grid(which)
        if dmap.axes[which] == "temperature":
            out.append((np.asarray(v) - g[0]) / (g[-1] - g[0]))
        else:
            out.append(np.log(np.asarray(v) / g[0]) / np.log(g[-1] / g[0]))
    return np.column_stack(out)


def field_at(dmap: DesignMap, field: np.ndarray, u: np.ndarray) -> np.ndarray:
    """Bilinear interpolation of a (ny, nx) grid field at points ``u`` in unit coordinates
    (the grids are evenly spaced in those coordinates)."""
    ny, nx = field.shape
    fx = np.clip(u[:, 0], 0.0, 1.0) * (nx - 1)
    fy = np.clip(u[:, 1], 0.0, 1.0) * (ny - 1)
    i0 = np.clip(np.floor(fx).astype(int), 0, max(nx - 2, 0))
    j0 = np.clip(np.floor(fy).astype(int), 0, max(ny - 2, 0))
    i1, j1 = np.minimum(i0 + 1, nx - 1), np.minimum(j0 + 1, ny - 1)
    tx, ty = fx - i0, fy - j0
    return (
        field[j0, i0] * (1 - tx) * (1 - ty)
        + field[j0, i1] * tx * (1 - ty)
        + field[j1, i0] * (1 - tx) * ty
        + field[j1, i1] * tx * ty
    )


def split_at_other_limits(
    dmap: DesignMap, segs: list[np.ndarray], others: list[np.ndarray], tol: float = ACTIVE_TOL
) -> tuple[list[np.ndarray], list[np.ndarray]]:
    """The stretches of the polylines ``segs`` (data coordinates) where every field of
    ``others`` is at most ``tol`` (the limit binds there), and the stretches where one is
    violated; each cut at the interpolated crossing."""
    active: list[np.ndarray] = []
    inactive: list[np.ndarray] = []
    for seg in segs:
        if not others:
            active.append(seg)
            continue
        u = unit_coords(dmap, seg[:, 0], seg[:, 1])
        m = np.max([field_at(dmap, f, u) for f in others], axis=0) - tol
        ok = m <= 0.0
        pieces: list[tuple[bool, list[np.ndarray]]] = [(bool(ok[0]), [seg[0]])]
        for k in range(1, len(seg)):
            if ok[k] != ok[k - 1]:
                t = m[k - 1] / (m[k - 1] - m[k]) if m[k - 1] != m[k] else 0.5
                # the crossing, linear in the map's unit coordinates
                uc = u[k - 1] + t * (u[k] - u[k - 1])
                cut = _data_coords(dmap, uc)
                pieces[-1][1].append(cut)
                pieces.append((bool(ok[k]), [cut]))
            pieces[-1][1].append(seg[k])
        for good, pts in pieces:
            arr = np.array(pts)
            if len(arr) < 2:
                continue
            (active if good else inactive).append(arr)
    return active, inactive


def _data_coords(dmap: DesignMap, u: np.ndarray) -> np.ndarray:
    out = []
    for which in (0, 1):
        g = dmap.grid(which)
        if dmap.axes[which] == "temperature":
            out.append(g[0] + u[which] * (g[-1] - g[0]))
        else:
            out.append(g[0] * np.exp(u[which] * np.log(g[-1] / g[0])))
    return np.array(out)
