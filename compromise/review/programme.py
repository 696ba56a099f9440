"""A test programme: a prototype series carried to the model, and the run sheet it gives.

A flood hydrograph (time and discharge), a tide (time and level) or a list of sea states is
carried to the model with :func:`compromise.review.convert.convert_table`; the run sheet then
gives, row by row, the model time in minutes, the model discharge and the pump setting as a
share of the case's discharge limit (the pump's capacity), and warns wherever a model value
would break a limit of the case. The run lasts the model time span of the series.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from compromise.casefile.model import Case
from compromise.review.convert import Column, Conversion
from compromise.units import si_unit

MINUTE = 60.0  # [s]
#: relative slack below which a model value sits on its limit, not beyond it (rounding)
LIMIT_TOL = 1e-9


@dataclass(frozen=True)
class SheetRow:
    """One step of the run sheet [SI].

    Attributes
    ----------
    step : int
        Row number of the series (1-based).
    prototype_time, model_time : float or None
        [s]; None when the series has no time column.
    model_discharge : float or None
        [m^3/s]; None when the series has no discharge column.
    pump_share : float or None
        Model discharge over the case's discharge limit [-].
    warnings : tuple of str
        The limits this step breaks.
    """

    step: int
    prototype_time: float | None
    model_time: float | None
    model_discharge: float | None
    pump_share: float | None
    warnings: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "step": self.step,
            "prototype_time": self.prototype_time,
            "model_time": self.model_time,
            "model_discharge": self.model_discharge,
            "pump_share": self.pump_share,
            "warnings": list(self.warnings),
        }


@dataclass(frozen=True)
class RunSheet:
    """The run sheet of a test programme.

    Attributes
    ----------
    rows : tuple of SheetRow
    duration : float or None
        Model run duration [s] (the model time span of the series).
    prototype_duration : float or None
        [s]
    pump_limit : float or None
        The case's discharge limit (the pump) [m^3/s].
    pump_key : str or None
        Its case-file key (``limits.discharge.max``).
    warnings : tuple of str
        One line per broken limit: how many steps break it and the worst value.
    """

    rows: tuple[SheetRow, ...]
    duration: float | None
    prototype_duration: float | None
    pump_limit: float | None
    pump_key: str | None
    warnings: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "duration": self.duration,
            "duration_minutes": None if self.duration is None else self.duration / MINUTE,
            "prototype_duration": self.prototype_duration,
            "pump_limit": self.pump_limit,
            "pump_key": self.pump_key,
            "warnings": list(self.warnings),
            "rows": [r.to_dict() for r in self.rows],
        }


def _first(columns: tuple[Column, ...], dim: tuple[int, int, int, int]) -> Column | None:
    for c in columns:
        if c.kind != "keep" and tuple(c.dimension) == dim:
            return c
    return None


def _si(conversion: Conversion, column: Column) -> np.ndarray:
    """The converted column back in SI units."""
    from compromise.review.columns import split_header, unit_factor

    _, unit = split_header(column.out_header)
    factor, _ = unit_factor(unit, column.out_header)
    return conversion.frame[column.out_header].to_numpy(dtype=float) * factor


def _source_si(frame: Any, column: Column) -> np.ndarray:
    from compromise.review.columns import unit_factor

    factor, _ = unit_factor(column.unit, column.header)
    return frame[column.header].to_numpy(dtype=float) * factor


def run_sheet(case: Case, conversion: Conversion, source: Any) -> RunSheet:
    """The run sheet of a prototype series carried to the model.

    Parameters
    ----------
    case : Case
    conversion : Conversion
        The series carried to the model (``to="model"``).
    source : pandas.DataFrame
        The prototype series as read.
    """
    if conversion.to != "model":
        raise ValueError("a run sheet is made from a series carried to the model")
    n = len(conversion.frame)
    time_col = _first(conversion.columns, (0, 0, 1, 0))
    q_col = _first(conversion.columns, (0, 3, -1, 0))
    model_t = _si(conversion, time_col) if time_col else None
    proto_t = _source_si(source, time_col) if time_col else None
    model_q = _si(conversion, q_col) if q_col else None
    pump, pump_key = None, None
    if q_col is not None and q_col.quantity is not None:
        for lim in case.limits:
            if lim.quantity == q_col.quantity and lim.kind == "max":
                pump, pump_key = lim.bound, f"limits.{lim.quantity}.max"
    per_row: list[list[str]] = [[] for _ in range(n)]
    summary: list[str] = []
    for col in conversion.columns:
        if col.quantity is None or col.kind == "keep":
            continue
        values = _si(conversion, col)
        unit = si_unit(col.dimension)
        for lim in case.limits:
            if lim.quantity != col.quantity:
                continue
            slack = LIMIT_TOL * abs(lim.bound)
            broken = values > lim.bound + slack if lim.kind == "max" else values < lim.bound - slack
            broken &= ~np.isnan(values)
            if not broken.any():
                continue
            word = "above" if lim.kind == "max" else "below"
            key = f"limits.{lim.quantity}.{lim.kind}"
            for i in np.flatnonzero(broken):
                per_row[i].append(f"{col.name} {values[i]:.4g} {unit} {word} {key}")
            worst_i = int(np.nanargmax(values) if lim.kind == "max" else np.nanargmin(values))
            summary.append(
                f"Warning: model {col.name} {word} {key} ({lim.bound:.4g} {unit}) in "
                f"{int(broken.sum())} of {n} steps; worst {values[worst_i]:.4g} {unit} at step "
                f"{worst_i + 1}"
            )
    rows = tuple(
        SheetRow(
            i + 1,
            None if proto_t is None else _finite(proto_t[i]),
            None if model_t is None else _finite(model_t[i]),
            None if model_q is None else _finite(model_q[i]),
            None if (model_q is None or pump is None) else _finite(model_q[i] / pump),
            tuple(per_row[i]),
        )
        for i in range(n)
    )
    duration = prototype_duration = None
    if model_t is not None and np.isfinite(model_t).any():
        duration = float(np.nanmax(model_t) - np.nanmin(model_t))
        assert proto_t is not None
        prototype_duration = float(np.nanmax(proto_t) - np.nanmin(proto_t))
    return RunSheet(rows, duration, prototype_duration, pump, pump_key, tuple(summary))


def _finite(v: float) -> float | None:
    return float(v) if math.isfinite(v) else None
