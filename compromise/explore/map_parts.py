"""Parts shared by the design-space maps (:mod:`compromise.explore.designmap`) and the maps of
cases with ``[sediment]`` (:mod:`compromise.explore.granular_map`): a limit's boundary, its label
and the zoom onto a sliver of a feasible window."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from compromise.casefile.model import Case
from compromise.solving.problem import Row

__all__ = ["SLIVER", "Boundary", "row_label", "row_parts", "zoom_ranges"]

#: A feasible window narrower than this share of an axis's range (log for ratios) is a sliver:
#: by default the map zooms that axis onto it (common practice for a readable figure).
SLIVER = 0.2


@dataclass(frozen=True)
class Boundary:
    """One limit on the map.

    Attributes
    ----------
    key : str
        Case-file key of the bound (``limits.reach.max``).
    label : str
        Short text for the plot (``reach <= 40 m``).
    violation : numpy.ndarray
        (n_vertical, n_horizontal) least log-violation ``ln(model / bound)`` (sign so that
        positive means violated) the other variables can reach [-]; its zero level is the
        boundary.
    binding : bool
        Whether the limit binds at the optimum of the map's fluid.
    quantity, op, bound, unit, condition :
        The parts of a limit on a quantity, for showing its label in other units: the
        quantity's name, ``<=`` or ``>=``, the bound [SI unit ``unit``] and the condition
        named in the label (``""`` for none); ``bound`` is None for any other bound.
    """

    key: str
    label: str
    violation: np.ndarray = field(repr=False)
    binding: bool = False
    quantity: str = ""
    op: str = ""
    bound: float | None = None
    unit: str = "-"
    condition: str = ""

    @property
    def excluded(self) -> float:
        """Fraction of the map where this limit alone cannot hold [-]."""
        v = self.violation
        return float(np.mean(~(v <= 1e-9))) if v.size else 0.0


def row_parts(case: Case, row: Row, condition: str | None = None) -> dict[str, Any]:
    """For a limit on a quantity, the fields of :class:`Boundary` that rebuild its label in
    other units (quantity, operator, SI bound, unit, condition); ``{}`` for any other bound."""
    if row.kind != "limit":
        return {}
    return {
        "quantity": row.name,
        "op": "<=" if row.side == "max" else ">=",
        "bound": float(row.bound),
        "unit": case.quantities[row.name].unit,
        "condition": condition or "",
    }


def row_label(case: Case, row: Row) -> str:
    """``reach <= 40 m``, ``reynolds >= 4000``, ``distortion <= 5``."""
    op = "<=" if row.side == "max" else ">="
    if row.kind == "limit":
        unit = case.quantities[row.name].unit
        return f"{row.name} {op} {row.bound:.4g}" + ("" if unit == "-" else f" {unit}")
    if row.kind == "bound" and row.name == "horizontal_ratio":
        from compromise.units import format_ratio

        return f"X {op} {format_ratio(row.bound)}"
    return f"{row.name} {op} {row.bound:.4g}"


def zoom_ranges(
    axes: tuple[str, ...],
    full: list[tuple[float, float]],
    grids: list[np.ndarray],
    feasible: np.ndarray,
) -> tuple[list[tuple[float, float]], list[bool]]:
    """The ranges of the map: an axis on which the feasible cells of the scouting grid span
    less than :data:`SLIVER` of the range is narrowed to them, one scouting cell and half the
    window's width added on either side (within the full range)."""
    ranges, zoomed = list(full), [False, False]
    if not feasible.any():
        return ranges, zoomed
    for which in (0, 1):
        g = grids[which]
        lin = axes[which] == "temperature"
        t = g if lin else np.log(g)
        hit = np.nonzero(feasible.any(axis=0 if which == 0 else 1))[0]
        i0, i1 = max(int(hit[0]) - 1, 0), min(int(hit[-1]) + 1, len(g) - 1)
        span = float(t[-1] - t[0])
        width = float(t[i1] - t[i0])
        if span <= 0 or width >= SLIVER * span:
            continue
        lo, hi = float(t[i0]) - 0.5 * width, float(t[i1]) + 0.5 * width
        lo, hi = max(lo, float(t[0])), min(hi, float(t[-1]))
        ranges[which] = (lo, hi) if lin else (math.exp(lo), math.exp(hi))
        if lo <= t[0] + 1e-12 * max(1.0, abs(t[0])):
            ranges[which] = (full[which][0], ranges[which][1])
        if hi >= t[-1] - 1e-12 * max(1.0, abs(t[-1])):
            ranges[which] = (ranges[which][0], full[which][1])
        zoomed[which] = True
    return ranges, zoomed
