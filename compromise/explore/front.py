"""The result of a trade-off: a Pareto front of designs and its points (:class:`Front`).

Traced by :func:`compromise.explore.tradeoffs.trace_front` (and, for a case with
``[sediment]``, :func:`compromise.explore.granular_front.trace_granular_front`).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

from compromise.casefile.model import Case
from compromise.explore.axes import Axis
from compromise.explore.pareto import knee_depth
from compromise.solving.design import Design

#: A front whose knee stands out less than this (:func:`knee_depth`, a share of the line through
#: the extremes) is called nearly straight and gets no knee; common practice for a visible bend.
KNEE_MIN_DEPTH = 0.05


@dataclass(frozen=True)
class FrontPoint:
    """A design and its value on every axis.

    Attributes
    ----------
    values : tuple of float
        One per axis, in the axes' units.
    design : Design
    """

    values: tuple[float, ...]
    design: Design

    def to_dict(self) -> dict[str, Any]:
        """``{"values": [...], "design": {...}}`` (the design as ``compromise solve`` gives)."""
        return {"values": list(self.values), "design": self.design.to_dict()}


@dataclass(frozen=True)
class Front:
    """An exact Pareto front (see the module docstring).

    Attributes
    ----------
    axes : tuple of Axis
    points : tuple of FrontPoint
        Non-dominated designs, sorted by the first axis.
    knee : int
        Index of the knee point (:func:`knee_index`), -1 when there is no point.
    chosen : FrontPoint or None
        The solver's design (:func:`compromise.solving.optimum.solve`) and its axis values.
    fluid_fronts : dict
        Each fluid's own front (array (n, axes)), dominated points of other fluids included.
    primary : str
        The axis minimised by the epsilon-constraint subproblems.
    """

    case: Case = field(repr=False)
    axes: tuple[Axis, ...]
    points: tuple[FrontPoint, ...]
    knee: int
    chosen: FrontPoint | None
    fluid_fronts: dict[str, np.ndarray] = field(repr=False)
    primary: str = ""

    @property
    def names(self) -> tuple[str, ...]:
        """Axis names."""
        return tuple(a.name for a in self.axes)

    @property
    def values(self) -> np.ndarray:
        """(n, axes) array of the points' values."""
        return np.array([pt.values for pt in self.points]).reshape(len(self.points), len(self.axes))

    @property
    def knee_depth(self) -> float:
        """How far the knee stands out from the line through the extremes (:func:`knee_depth`)."""
        return knee_depth(self.values, self.knee)

    @property
    def has_knee(self) -> bool:
        """Whether the front bends enough to have a knee worth marking: three points or more
        and a knee depth of at least :data:`KNEE_MIN_DEPTH`."""
        return len(self.points) >= 3 and self.knee_depth >= KNEE_MIN_DEPTH

    def to_dict(self) -> dict[str, Any]:
        """Plain data following the output contract of ``compromise tradeoff --json``; a
        mismatch (a dimensionless axis) below the solver's noise is 0."""
        from compromise.solving.result import denoise

        def shown(values: tuple[float, ...]) -> list[float]:
            return [
                denoise(v) if a.unit == "-" else v for a, v in zip(self.axes, values, strict=True)
            ]

        return {
            "title": self.case.title,
            "axes": list(self.names),
            "units": [a.unit for a in self.axes],
            "labels": [a.label for a in self.axes],
            "minimised": self.primary,
            "lifted": {a.name: a.case_bound for a in self.axes if a.lifted},
            "points": [{**pt.to_dict(), "values": shown(pt.values)} for pt in self.points],
            "knee": self.knee if self.knee >= 0 else None,
            "chosen": self.chosen.design.to_dict() if self.chosen else None,
            "chosen_values": shown(self.chosen.values) if self.chosen else None,
        }

    def to_frame(self) -> Any:
        """The points as a pandas DataFrame (one column per axis, then the design)."""
        import pandas as pd

        rows = []
        for i, pt in enumerate(self.points):
            row = {f"{a.name} [{a.unit}]": v for a, v in zip(self.axes, pt.values, strict=True)}
            row.update(pt.design.to_dict())
            row["knee"] = i == self.knee
            rows.append(row)
        return pd.DataFrame(rows)
