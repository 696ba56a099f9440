"""Carry measured or planned data between model and prototype: a table in, a table out.

Every column of the table is recognised as a kind of quantity: a quantity of the case (its
scaling exponent vector comes from the case file, so a ``depth`` declared on the vertical axis
follows the vertical ratio and a ``pressure_drop`` follows ``rho V^2``), a kind of the scale
laws (:data:`compromise.physics.scaling.DERIVED_KINDS`: ``horizontal_length``,
``vertical_length``, ``discharge``, ``time``, ``pressure``, ...), a common name for one of them
(``Q``, ``level``, ``stage``, ``resistance``), or the kind the user declares. Each column's
header carries its unit in brackets (``discharge [m^3/s]``), read with the one pint registry.

The ratio of a column is the exponential of its exponent vector applied to the design's
log-ratios: the base ratios ``(X, Y, V)`` and the fluid-property ratios of the model fluid at
its temperature over the prototype fluid at its own (:mod:`compromise.solving.design`). For a
surrogate-fluid rig this is the chain of groups: the kept Reynolds number fixes ``V``, and a
pressure carried by ``rho V^2`` is the Euler number kept; in a distorted model times follow
``X / V`` and discharges ``X Y V``. A towed hull's resistance carried to the ship is the
exception: it goes by the ITTC-1978 method (:mod:`compromise.review.resistance`), step by step.

References
----------
Chanson, H. (1999). *The Hydraulics of Open Channel Flow*, ch. 14: Froude scale ratios of
undistorted and distorted models, from memory.
Novak, P., Guinot, V., Jeffrey, A., Reeve, D. E. (2010). *Hydraulic Modelling - an
Introduction*, ch. 4 (distorted models), from memory.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from compromise.casefile.model import Case, scaling_text
from compromise.errors import CaseError
from compromise.physics.scaling import PROPERTY_BASIS, friction_law
from compromise.review.columns import KEEP, recognise, split_header, unit_factor
from compromise.review.resistance import Extrapolation, extrapolate, is_resistance
from compromise.solving.design import Design, property_environments, scaled_log_ratio
from compromise.units import dimension_name, si_unit, to_celsius

if TYPE_CHECKING:  # pandas is imported inside the functions (startup time)
    import pandas as pd

DIRECTIONS = ("prototype", "model")


@dataclass(frozen=True)
class Column:
    """How one column is carried between model and prototype.

    Attributes
    ----------
    header : str
        The column's header as read (``discharge [m^3/s]``).
    name : str
        The header without its unit.
    kind : str
        A kind of the scale laws, ``keep``, or ``quantity:NAME`` for a quantity of the case.
    how : str
        How the kind was found: ``case quantity``, ``kind``, ``common name``, ``unit``,
        ``--column``.
    unit : str
        The unit as written (``""`` for none).
    dimension : tuple of int
        (M, L, T, Theta).
    law : str
        The ratio's law over the base ratios (``X Y V``, ``rho_r V^2``).
    ratio : float
        Model over prototype [-] (1 for a kept column).
    quantity : str or None
        The case quantity the column stands for, when it is one (its limits apply).
    out_header : str
        The header of the converted column.
    """

    header: str
    name: str
    kind: str
    how: str
    unit: str
    dimension: tuple[int, int, int, int]
    law: str
    ratio: float
    quantity: str | None = None
    out_header: str = ""
    scaling: np.ndarray | None = field(default=None, repr=False, compare=False)

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "header": self.header,
            "kind": self.kind,
            "recognised_by": self.how,
            "unit": self.unit,
            "law": self.law,
            "ratio": None if math.isnan(self.ratio) else self.ratio,
            "quantity": self.quantity,
            "out_header": self.out_header,
        }


@dataclass(frozen=True)
class Chain:
    """The base ratios and the two fluids' properties a conversion rests on.

    Attributes
    ----------
    design : Design
    prototype, model : dict
        ``fluid`` name, ``temperature`` [degC], ``rho`` [kg/m^3], ``mu`` [Pa s], ``nu``
        [m^2/s] of each side.
    friction_law : str or None
        Which friction law the design keeps (``open_channel``, ``reynolds``), if any.
    """

    design: Design
    prototype: dict[str, Any]
    model: dict[str, Any]
    friction_law: str | None

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "design": self.design.to_dict(),
            "prototype": dict(self.prototype),
            "model": dict(self.model),
            "friction_law": self.friction_law,
        }


@dataclass(frozen=True)
class Conversion:
    """A table carried from one side to the other, with how each column was carried."""

    to: str
    frame: pd.DataFrame = field(repr=False, compare=False)
    columns: tuple[Column, ...]
    chain: Chain
    #: what a reader must know about a column's law (a resistance carried by the force ratio)
    notes: tuple[str, ...] = ()
    #: a towed hull's resistance carried by the ITTC-1978 method, one per resistance column
    extrapolations: tuple[Extrapolation, ...] = ()
    #: headers of the step columns written beside an extrapolated resistance
    steps: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """Plain data (the table as lists of values)."""
        return {
            "to": self.to,
            "notes": list(self.notes),
            "extrapolations": [e.to_dict() for e in self.extrapolations],
            "chain": self.chain.to_dict(),
            "columns": [c.to_dict() for c in self.columns],
            "table": {
                str(k): [None if _missing(v) else float(v) for v in self.frame[k]]
                if k in self._numeric()
                else [None if _missing(v) else str(v) for v in self.frame[k]]
                for k in self.frame.columns
            },
        }

    def _numeric(self) -> set[str]:
        return {c.out_header for c in self.columns if c.kind != KEEP} | set(self.steps)


def _missing(v: Any) -> bool:
    return v is None or (isinstance(v, float) and math.isnan(v))


def chain_of(case: Case, design: Design) -> tuple[Chain, np.ndarray]:
    """The properties of both fluids at their temperatures and the property log-ratios."""
    proto, model = property_environments(case, design.fluid, design.temperature, design.pressure)
    p = np.array(
        [
            math.log(model[n] / proto[n]) if model[n] > 0 and proto[n] > 0 else math.nan
            for n in PROPERTY_BASIS
        ]
    )

    def side(fluid: str, temperature: float, env: Mapping[str, float]) -> dict[str, Any]:
        return {
            "fluid": fluid,
            "temperature": to_celsius(temperature),
            "rho": env["rho"],
            "mu": env["mu"],
            "nu": env["nu"],
        }

    law = friction_law(design.logs, np.nan_to_num(p))
    chain = Chain(
        design,
        side(case.fluid, case.temperature, proto),
        side(design.fluid, design.temperature, model),
        law,
    )
    return chain, p


def convert_table(
    case: Case,
    design: Design,
    frame: pd.DataFrame,
    *,
    to: str,
    columns: Mapping[str, str] | None = None,
    units: str | Callable[[str], str] | None = None,
) -> Conversion:
    """Carry every column of ``frame`` to the model or to the prototype.

    Parameters
    ----------
    case : Case
    design : Design
        The model design (ratios model/prototype, model fluid state).
    frame : pandas.DataFrame
        Headers ``name [unit]``; numbers in the unit of their header.
    to : {"prototype", "model"}
        The side the values are carried to (from the other one).
    columns : mapping, optional
        Declared kinds by column name (without the unit): a kind, a case quantity or
        ``keep``.
    units : {"si"} or callable, optional
        Units of the output: the input's (None), SI (``"si"``), or a function from the SI
        unit text (``m^3/s``) to the unit wanted.

    Returns
    -------
    Conversion
        The converted frame (same column order, headers with the output's units) and how each
        column was carried.
    """
    import pandas as pd

    if to not in DIRECTIONS:
        raise CaseError(f"expected 'prototype' or 'model', got {to!r}", key="--to")
    declared = dict(columns or {})
    names = [split_header(h)[0] for h in frame.columns]
    seen: set[str] = set()
    for n in names:
        if n in seen:
            raise CaseError("appears twice in the table", key=f"column {n!r}")
        seen.add(n)
    for n in declared:
        if n not in names:
            raise CaseError(
                f"no column named {n!r} in the table (columns: {', '.join(names)})",
                key="--column",
            )
    chain, p = chain_of(case, design)
    y = design.logs
    distorted = abs(design.distortion - 1) > 1e-12
    ship = "ship_resistance" in case.phenomena or case.resistance is not None
    out: dict[str, Any] = {}
    cols: list[Column] = []
    si_values: dict[str, np.ndarray] = {}
    hulls: list[str] = []  # headers of resistance columns carried by the ITTC-1978 method
    for header in frame.columns:
        name, unit = split_header(str(header))
        said = declared.get(name)
        kind, how, vector, dim, quantity = recognise(
            case, str(header), declared="force" if said == "resistance" else said,
            distorted=distorted, law=chain.friction_law,
        )  # fmt: skip
        if kind == KEEP:
            out[str(header)] = frame[header].to_list()
            cols.append(
                Column(str(header), name, KEEP, how, unit, dim, "1", 1.0, None, str(header))
            )
            continue
        factor, unit_dim = unit_factor(unit, str(header))
        if not unit and dim != (0, 0, 0, 0):
            raise CaseError(
                f"no unit in the header; write it in brackets, e.g. '{name} [{si_unit(dim)}]'",
                key=f"column {header!r}",
            )
        if unit_dim != tuple(dim):
            raise CaseError(
                f"unit {unit!r} is a {dimension_name(unit_dim)}; {kind.removeprefix('quantity:')} "
                f"is a {dimension_name(dim)}",
                key=f"column {header!r}",
            )
        assert vector is not None
        if any(math.isnan(v) for v, e in zip(p, vector[3:], strict=True) if e):
            raise CaseError(
                "its law needs a fluid property one of the fluids does not have",
                key=f"column {header!r}",
            )
        ratio = math.exp(scaled_log_ratio(vector, y, p))
        values = _numbers(frame[header], str(header))
        si = values * factor
        si_values[str(header)] = si
        converted = si * ratio if to == "model" else si / ratio
        out_unit, out_factor = _output_unit(unit, factor, dim, units, str(header))
        out_header = f"{name} [{out_unit}]" if out_unit else name
        out[out_header] = converted / out_factor
        law = scaling_text(vector)
        hull = (
            ship and tuple(dim) == (1, 1, -2, 0) and (said == "resistance" or is_resistance(name))
        )
        if hull and to == "prototype":
            hulls.append(str(header))
            law, ratio = "ITTC-1978", math.nan
            out[out_header] = (out_header, out_factor)  # filled in below
        cols.append(
            Column(
                str(header), name, kind, how, unit, tuple(dim),  # type: ignore[arg-type]
                law, ratio, quantity, out_header, vector,
            )
        )  # fmt: skip
    extrapolations: list[Extrapolation] = []
    steps: list[str] = []
    if hulls:
        out, extrapolations, steps = _extrapolate(case, design, chain, cols, si_values, out, hulls)
    result = pd.DataFrame(out, index=frame.index)
    notes = []
    forces = [
        c.header
        for c in cols
        if c.kind != KEEP and c.dimension == (1, 1, -2, 0) and c.header not in hulls
    ]
    if forces and ship:
        notes.append(
            f"{', '.join(forces)}: carried by the force ratio (rho_r V^2 X Y), right for the "
            "wave-making part only; the frictional part of a hull's resistance does not scale "
            "so (the Reynolds number is not kept). A model's resistance goes to the ship by "
            "the ITTC-1978 method with --to prototype, in a column named 'resistance' (or "
            "declared with --column NAME=resistance) beside the model's speed."
        )
    for e in extrapolations:
        k_from = (
            "the case ([resistance] form_factor)"
            if e.form_factor_source == "case"
            else f"a Prohaska fit of rows {', '.join(map(str, e.prohaska['rows']))}"  # type: ignore[index]
        )
        notes.append(
            f"{e.column}: the model's resistance carried to the ship by the ITTC-1978 method "
            f"(k = {e.form_factor:.4f} from {k_from}; ITTC-1957 line; roughness allowance "
            f"{e.roughness_text()}; C_A = {e.inputs.correlation_allowance:g}"
            + ("; air resistance 0.001 A_T / S_S" if e.inputs.air_area is not None else "")
            + "), not by the force ratio; the steps are the columns after it, and the column "
            "itself is R_TS."
        )
    return Conversion(
        to, result, tuple(cols), chain, tuple(notes), tuple(extrapolations), tuple(steps)
    )


def _extrapolate(
    case: Case,
    design: Design,
    chain: Chain,
    cols: list[Column],
    si_values: Mapping[str, np.ndarray],
    out: dict[str, Any],
    hulls: list[str],
) -> tuple[dict[str, Any], list[Extrapolation], list[str]]:
    """Fill each resistance column with R_TS and put its ITTC-1978 steps after it."""
    speeds = [c for c in cols if c.dimension == (0, 1, -1, 0) and c.kind != KEEP]
    if len(speeds) != 1:
        found = ", ".join(repr(c.header) for c in speeds) or "none"
        raise CaseError(
            "the ITTC-1978 extrapolation needs the model's speed in one column of the table "
            f"(e.g. 'velocity [m/s]'); velocity columns: {found}",
            key=f"column {hulls[0]!r}",
        )
    speed = speeds[0]
    extrapolations: list[Extrapolation] = []
    steps: list[str] = []
    new: dict[str, Any] = {}
    for header, values in out.items():
        if not (isinstance(values, tuple) and len(values) == 2 and isinstance(values[0], str)):
            new[header] = values
            continue
        out_header, out_factor = values
        source = next(c.header for c in cols if c.out_header == out_header)
        e = extrapolate(
            case, design, chain, si_values[speed.header], si_values[source],
            column=source, velocity_column=speed.header,
        )  # fmt: skip
        extrapolations.append(e)
        new[out_header] = e.steps["R_TS"] / out_factor
        suffix = "" if len(hulls) == 1 else f" ({split_header(source)[0]})"
        for name, step in e.steps.items():
            if name == "R_TS":
                continue
            label = f"{name}{suffix}"
            if label in new or label in out:
                raise CaseError(
                    f"the table already has a column {label!r}", key=f"column {source!r}"
                )
            new[label] = step
            steps.append(label)
    return new, extrapolations, steps


def convert(
    case: Case,
    design: Design,
    frame: pd.DataFrame,
    to: str = "prototype",
    *,
    columns: Mapping[str, str] | None = None,
    units: str | Callable[[str], str] | None = None,
) -> pd.DataFrame:
    """Carry a table between model and prototype; see :func:`convert_table`.

    Examples
    --------
    >>> import pandas as pd
    >>> from compromise.casefile.load import case_from_dict
    >>> case = case_from_dict({"prototype": {"fluid": "water", "temperature": "20 degC",
    ...     "quantities": {"depth": "2 m", "velocity": "1 m/s"}},
    ...     "groups": {"froude": {"exact": True}}, "model": {"horizontal_ratio": "1:25",
    ...     "temperature": "20 degC"}})
    >>> design = Design("water", 293.15, 101325.0, 1 / 25, 1 / 25, 1 / 5)
    >>> out = convert(case, design, pd.DataFrame({"velocity [m/s]": [0.6]}), to="prototype")
    >>> round(float(out["velocity [m/s]"].iloc[0]), 12)
    3.0
    """
    return convert_table(case, design, frame, to=to, columns=columns, units=units).frame


def _numbers(series: Any, header: str) -> np.ndarray:
    import pandas as pd

    values = pd.to_numeric(series, errors="coerce")
    bad = values.isna() & series.notna() & (series.astype(str).str.strip() != "")
    if bad.any():
        row = int(np.flatnonzero(bad.to_numpy())[0])
        raise CaseError(
            f"expected numbers; row {row + 1} holds {str(series.iloc[row])!r}",
            key=f"column {header!r}",
        )
    return values.to_numpy(dtype=float)


def _output_unit(
    unit: str,
    factor: float,
    dim: tuple[int, ...],
    units: str | Callable[[str], str] | None,
    header: str,
) -> tuple[str, float]:
    if units is None:
        return unit, factor
    si = si_unit(dim)
    wanted = ("" if si == "-" else si) if units == "si" else units(si) if callable(units) else None
    if callable(units) and wanted == si:
        return unit, factor  # the system has no unit of its own for it (time): keep the input's
    if wanted is None:
        raise CaseError(f"expected 'si' or 'us', got {units!r}", key="--units")
    if wanted == "-":
        wanted = ""
    return wanted, unit_factor(wanted, header)[0]


def design_for(case: Case, design_file: str | None) -> tuple[Design | None, str]:
    """The design data are carried with: a saved answer's, else the case's optimum.

    Returns the design (None when the case has no feasible design) and where it came from, in
    words.
    """
    if design_file is not None:
        from compromise.casefile.designs import load_design_file
        from compromise.review.proposal import design_from_spec

        spec = load_design_file(design_file)
        design, _ = design_from_spec(case, spec)
        return design, f"the design saved in {spec.label}"
    from compromise.solving.optimum import find_optimum

    solution = find_optimum(case, alternatives=False)
    if not solution.feasible or solution.design is None:
        return None, "the case has no feasible design (see compromise solve); give --design"
    return solution.design, "the optimum of the case (compromise solve)"


def read_table(path: str | Path) -> pd.DataFrame:
    """Read a CSV table whose headers carry units; ``#`` lines are comments.

    Raises
    ------
    CaseError
        Naming the file when it is missing, unreadable, empty or not a table.
    """
    import pandas as pd

    shown = str(path)
    try:
        frame = pd.read_csv(path, comment="#", skipinitialspace=True, dtype=object)
    except FileNotFoundError:
        raise CaseError("file not found", file=shown) from None
    except IsADirectoryError:
        raise CaseError("expected a CSV file, got a directory", file=shown) from None
    except pd.errors.EmptyDataError:
        raise CaseError("empty; expected a header row and data rows", file=shown) from None
    except (pd.errors.ParserError, UnicodeDecodeError, OSError) as exc:
        raise CaseError(f"cannot read as CSV: {exc}".splitlines()[0], file=shown) from None
    if frame.empty:
        raise CaseError("no data rows under the header", file=shown)
    frame.columns = [str(c).strip() for c in frame.columns]
    for c in frame.columns:
        if c.startswith("Unnamed:"):
            raise CaseError("a column has no header", file=shown)
    return frame
