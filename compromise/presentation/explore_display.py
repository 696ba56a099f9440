"""The trade-off tools' results shown in SI (as computed) or in US customary units.

Presentation only. In SI every function here returns exactly what the tables and figures
showed before units could be chosen (the same object, the same text); in US customary units:

- a front's quantity axes (any unit of :data:`compromise.presentation.display.US`) are scaled
  by the exact factor of their unit, in a smaller unit (inches, gpm) when every value of the
  axis is small (:func:`~compromise.presentation.display.small_unit`), as the text tables of
  ``solve`` do; dimensionless axes (groups, total, distortion) are unchanged, and so are the
  front's designs (SI, for whatever evaluates them);
- a map's limit labels are rebuilt from the bound's parts (quantity, operator, SI bound, unit,
  condition) kept on each :class:`~compromise.explore.map_parts.Boundary`;
- temperatures in degF (``F = C x 9/5 + 32``), pressures in psi.

Grain sizes stay in millimetres in both systems (the unit of sieve analyses).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from compromise.explore.front import Front
from compromise.presentation.display import US, celsius_to, convert, small_unit

if TYPE_CHECKING:
    import numpy as np

    from compromise.explore.designmap import DesignMap
    from compromise.explore.map_parts import Boundary
    from compromise.explore.sensitivity_result import VariableRange

#: Pa in one bar
BAR = 1e5


def fahrenheit_to_celsius(value: float) -> float:
    """The inverse of :func:`~compromise.presentation.display.celsius_to` in US units (for
    placing degF ticks on a degC axis).

    Examples
    --------
    >>> fahrenheit_to_celsius(212.0)
    100.0
    """
    return (value - 32) * 5 / 9


def pascal_to(value: float, system: str) -> tuple[float, str]:
    """A pressure given in Pa, shown in ``system``: ``(value, "Pa")`` or in psi
    (:func:`~compromise.presentation.display.convert`)."""
    shown, unit = convert(value, "Pa", system)
    return float(shown if shown is not None else value), unit


@dataclass(frozen=True)
class ShownFront(Front):
    """A front with its quantity axes in display units, its designs untouched (SI).

    Whether the front has a knee, and whether the solver's design lies on it, are the decisions
    of the computed front ``source``, so a change of units cannot change them.
    """

    source: Front | None = field(default=None, repr=False)

    @property
    def knee_depth(self) -> float:
        """The computed front's (see :attr:`Front.knee_depth`)."""
        return self.source.knee_depth if self.source is not None else super().knee_depth


def axis_factors(front: Front, system: str) -> list[tuple[str, float]]:
    """Per axis of ``front``: the unit it is shown in and the factor from its own unit."""
    out = []
    for j, a in enumerate(front.axes):
        if system != "us" or a.unit not in US:
            out.append((a.unit, 1.0))
            continue
        name, factor = US[a.unit]
        values = [pt.values[j] * factor for pt in front.points]
        if front.chosen is not None:
            values.append(front.chosen.values[j] * factor)
        if a.lifted and a.case_bound is not None:
            values.append(a.case_bound * factor)
        small, f = small_unit(values, name)
        out.append((small, factor * f))
    return out


def shown_front(front: Front, system: str) -> Front:
    """``front`` with its quantity axes in ``system`` units (the very object in SI)."""
    if system != "us" or isinstance(front, ShownFront):
        return front
    units = axis_factors(front, system)
    if all(f == 1.0 and u == a.unit for (u, f), a in zip(units, front.axes, strict=True)):
        return front

    def scale(values: tuple[float, ...]) -> tuple[float, ...]:
        return tuple(v * f for v, (_, f) in zip(values, units, strict=True))

    axes = tuple(
        dataclasses.replace(
            a,
            unit=u,
            case_bound=None if a.case_bound is None else a.case_bound * f,
        )
        for a, (u, f) in zip(front.axes, units, strict=True)
    )
    points = tuple(dataclasses.replace(pt, values=scale(pt.values)) for pt in front.points)
    chosen = (
        None
        if front.chosen is None
        else dataclasses.replace(front.chosen, values=scale(front.chosen.values))
    )
    factors = [f for _, f in units]
    fluid_fronts = {k: v * factors for k, v in front.fluid_fronts.items()}
    return ShownFront(
        case=front.case,
        axes=axes,
        points=points,
        knee=front.knee,
        chosen=chosen,
        fluid_fronts=fluid_fronts,
        primary=front.primary,
        source=front,
    )


def boundary_label(b: Boundary, system: str) -> str:
    """A map's limit label in ``system`` units: ``barrel_width <= 2 ft``; in SI (and for a
    bound that is not a quantity's) the label the map was made with."""
    if system != "us" or b.bound is None or b.unit not in US:
        return b.label
    value, unit = convert(b.bound, b.unit, system)
    assert value is not None
    unit, f = small_unit([value], unit)
    text = f"{b.quantity} {b.op} {value * f:.4g} {unit}"
    return text + (f" ({b.condition})" if b.condition else "")


def map_axis(dmap: DesignMap, which: int, system: str) -> tuple[str, np.ndarray]:
    """A map axis's unit and grid values in ``system`` units: a temperature axis (degC) in
    degF, a pressure axis (bar) in psi in US units; ratios and grain sizes (mm) unchanged."""
    unit, grid = dmap.units[which], dmap.grid(which)
    if system != "us":
        return unit, grid
    if dmap.axes[which] == "temperature":
        shown, unit = celsius_to(grid, system)
        return unit, shown
    if dmap.axes[which] == "pressure":
        return pascal_to(1.0, system)[1], grid * (BAR * US["Pa"][1])
    return unit, grid


def shown_range(r: VariableRange, system: str) -> VariableRange:
    """A sensitivity range (temperature [degC], pressure [Pa]) in ``system`` units."""
    if system != "us" or r.name not in ("temperature", "pressure"):
        return r
    if r.name == "temperature":
        unit = celsius_to(0.0, system)[1]
        conv = [celsius_to(v, system)[0] for v in _range_values(r)]
    else:
        unit = pascal_to(1.0, system)[1]
        conv = [pascal_to(v, system)[0] for v in _range_values(r)]
    return dataclasses.replace(
        r,
        unit=unit,
        nominal=conv[0],
        minimum=conv[1],
        p05=conv[2],
        median=conv[3],
        p95=conv[4],
        maximum=conv[5],
    )


def _range_values(r: VariableRange) -> list[float]:
    return [r.nominal, r.minimum, r.p05, r.median, r.p95, r.maximum]
