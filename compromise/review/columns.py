"""Columns of a data table: what kind of quantity each one is, read from its header.

A header is a name and a unit in brackets (``discharge [m^3/s]``); the unit is read with the
one pint registry. The name is a quantity of the case, a kind of the scale laws
(:data:`compromise.physics.scaling.DERIVED_KINDS` and the friction kinds), a common name or
symbol for one of them, or what the user declares; where none applies, the unit's dimension
decides when it leaves no doubt. See :mod:`compromise.review.convert`.
"""

from __future__ import annotations

import re

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.physics.scaling import FRICTION_LAWS, GEOMETRIC_KINDS
from compromise.units import dimension_name, parse_quantity

#: Kind of a column copied as it is (run numbers, labels, condition names).
KEEP = "keep"

#: Dimension (M, L, T, Theta) of every kind of the scale laws.
KIND_DIMENSIONS: dict[str, tuple[int, int, int, int]] = {
    "horizontal_length": (0, 1, 0, 0),
    "vertical_length": (0, 1, 0, 0),
    "plan_area": (0, 2, 0, 0),
    "cross_section_area": (0, 2, 0, 0),
    "volume": (0, 3, 0, 0),
    "velocity": (0, 1, -1, 0),
    "time": (0, 0, 1, 0),
    "frequency": (0, 0, -1, 0),
    "acceleration": (0, 1, -2, 0),
    "discharge": (0, 3, -1, 0),
    "unit_discharge": (0, 2, -1, 0),
    "mass": (1, 0, 0, 0),
    "force": (1, 1, -2, 0),
    "pressure": (1, -1, -2, 0),
    "power": (1, 2, -3, 0),
    "slope": (0, 0, 0, 0),
    "shear_velocity": (0, 1, -1, 0),
    "bed_shear_stress": (1, -1, -2, 0),
    "hydraulic_gradient": (0, 0, 0, 0),
    "manning_n": (0, 0, 0, 0),
    "chezy_c": (0, 0, 0, 0),
    "darcy_f": (0, 0, 0, 0),
}
#: Friction kinds: their law depends on which friction law the design keeps.
FRICTION_KINDS = (
    "shear_velocity",
    "bed_shear_stress",
    "hydraulic_gradient",
    "manning_n",
    "chezy_c",
    "darcy_f",
)

#: Common header names for kinds (compared after lower-casing, spaces and hyphens as ``_``).
ALIASES: dict[str, str] = {
    "length": "horizontal_length",
    "distance": "horizontal_length",
    "chainage": "horizontal_length",
    "station": "horizontal_length",
    "x": "horizontal_length",
    "depth": "vertical_length",
    "level": "vertical_length",
    "water_level": "vertical_length",
    "stage": "vertical_length",
    "elevation": "vertical_length",
    "height": "vertical_length",
    "wave_height": "vertical_length",
    "hs": "vertical_length",
    "hm0": "vertical_length",
    "h_s": "vertical_length",
    "tp": "time",
    "tz": "time",
    "t_p": "time",
    "t_z": "time",
    "tide": "vertical_length",
    "h": "vertical_length",
    "z": "vertical_length",
    "speed": "velocity",
    "u": "velocity",
    "v": "velocity",
    "t": "time",
    "duration": "time",
    "period": "time",
    "wave_period": "time",
    "flow": "discharge",
    "flow_rate": "discharge",
    "pressure_drop": "pressure",
    "dp": "pressure",
    "drag": "force",
    "resistance": "force",
    "load": "force",
    "thrust": "force",
    "run": KEEP,
    "step": KEEP,
    "test": KEEP,
    "id": KEEP,
    "label": KEEP,
    "name": KEEP,
    "note": KEEP,
    "comment": KEEP,
    "condition": KEEP,
}
#: Header symbols whose case matters: ``Q`` is a discharge, ``q`` a discharge per unit width.
SYMBOLS: dict[str, str] = {"Q": "discharge", "q": "unit_discharge", "F": "force", "p": "pressure"}
#: Kinds a length or an area may be in a distorted model (a header must say which).
AXIS_DEPENDENT = {(0, 1, 0, 0): "a horizontal or a vertical length", (0, 2, 0, 0): "an area"}
#: Kinds a unit alone identifies (when the header names nothing the tool knows).
BY_DIMENSION: dict[tuple[int, int, int, int], str] = {
    (0, 1, -1, 0): "velocity",
    (0, 0, 1, 0): "time",
    (0, 0, -1, 0): "frequency",
    (0, 1, -2, 0): "acceleration",
    (0, 3, -1, 0): "discharge",
    (0, 2, -1, 0): "unit_discharge",
    (0, 3, 0, 0): "volume",
    (1, 0, 0, 0): "mass",
    (1, 1, -2, 0): "force",
    (1, -1, -2, 0): "pressure",
    (1, 2, -3, 0): "power",
}
_HEADER = re.compile(r"^\s*(?P<name>[^\[\]]*?)\s*(?:\[(?P<unit>[^\[\]]*)\])?\s*$")


def split_header(header: str) -> tuple[str, str]:
    """A header's name and the unit in its brackets (``""`` when none).

    Examples
    --------
    >>> split_header("Q [ft^3/s]")
    ('Q', 'ft^3/s')
    >>> split_header("run")
    ('run', '')
    """
    m = _HEADER.match(str(header))
    if not m or not m.group("name"):
        raise CaseError(
            "expected a name and an optional unit in brackets, e.g. 'discharge [m^3/s]'",
            key=f"column {header!r}",
        )
    return m.group("name"), (m.group("unit") or "").strip()


def unit_factor(unit: str, header: str) -> tuple[float, tuple[int, int, int, int]]:
    """SI value of one ``unit`` and its dimension, read as the case files are (the one pint
    registry, :func:`compromise.units.parse_quantity`).

    Examples
    --------
    >>> factor, dim = unit_factor("L/s", "Q [L/s]")
    >>> round(factor, 15), dim
    (0.001, (0, 3, -1, 0))
    >>> unit_factor("-", "n [-]")
    (1.0, (0, 0, 0, 0))
    """
    if unit in ("", "-", "1"):
        return 1.0, (0, 0, 0, 0)
    key = f"column {header!r}"
    if unit.strip().lower() in ("degc", "degf", "k", "kelvin", "celsius", "fahrenheit"):
        raise CaseError("temperatures are not scaled; declare the column 'keep'", key=key)
    try:  # the case files' parser: the same registry, unit checks and range of numbers
        factor, dim, _ = parse_quantity(f"1 {unit}")
    except ValueError as exc:
        message = str(exc).replace(f" in '1 {unit}'", "")
        raise CaseError(message, key=key) from None
    if dim[3]:
        raise CaseError("temperatures are not scaled; declare the column 'keep'", key=key)
    return factor, dim


def _normal(name: str) -> str:
    return re.sub(r"[\s\-]+", "_", name.strip().lower())


def kind_vector(
    kind: str, law: str | None, header: str
) -> tuple[np.ndarray, tuple[int, int, int, int]]:
    if kind in GEOMETRIC_KINDS:
        return GEOMETRIC_KINDS[kind][0], KIND_DIMENSIONS[kind]
    if kind in FRICTION_KINDS:
        if law is None:
            raise CaseError(
                f"a {kind} has no scale law in this design (neither Froude nor Reynolds "
                "similitude holds, so the friction factor depends on the model's own Reynolds "
                "number)",
                key=f"column {header!r}",
            )
        table = FRICTION_LAWS[law][0]
        if kind not in table:
            raise CaseError(f"a {kind} has no law under {law} similitude", key=f"column {header!r}")
        return table[kind][0], KIND_DIMENSIONS[kind]
    raise CaseError(
        f"unknown kind {kind!r}; expected a case quantity, {KEEP!r} or one of "
        + ", ".join(sorted(KIND_DIMENSIONS)),
        key=f"column {header!r}",
    )


def recognise(
    case: Case,
    header: str,
    *,
    declared: str | None = None,
    distorted: bool,
    law: str | None,
) -> tuple[str, str, np.ndarray | None, tuple[int, int, int, int], str | None]:
    """The kind of a column: ``(kind, how, exponent vector, dimension, case quantity)``.

    Order: a kind declared by the user; a quantity of the case named by the header; a kind
    named by the header; a common name or symbol; the unit's dimension where it leaves no
    doubt. A length or an area is ambiguous in a distorted model unless its name says which.
    """
    name, unit = split_header(header)
    key = f"column {header!r}"
    choice, how = declared, "--column"
    if choice is None:
        if name in case.quantities:
            choice, how = name, "case quantity"
        elif _normal(name) in case.quantities:
            choice, how = _normal(name), "case quantity"
        elif _normal(name) in KIND_DIMENSIONS:
            choice, how = _normal(name), "kind"
        elif name in SYMBOLS:
            choice, how = SYMBOLS[name], "common name"
        elif _normal(name) in ALIASES:
            choice, how = ALIASES[_normal(name)], "common name"
    if choice == KEEP:
        return KEEP, how, None, (0, 0, 0, 0), None
    if choice is not None and choice in case.quantities:
        q = case.quantities[choice]
        return f"quantity:{choice}", how, q.scaling, q.dimension, choice
    if choice is None:
        if not unit:
            raise CaseError(
                "not a quantity of the case nor a kind of the scale laws, and no unit to tell "
                f"what it is; declare it with --column '{name}=KIND'",
                key=key,
            )
        _, dim = unit_factor(unit, header)
        if dim in AXIS_DEPENDENT:
            if distorted:
                raise CaseError(
                    f"ambiguous: in a distorted model {AXIS_DEPENDENT[dim]} must say its axis; "
                    f"declare it with --column '{name}=horizontal_length' (or vertical_length, "
                    "plan_area, cross_section_area)",
                    key=key,
                )
            choice = "horizontal_length" if dim == (0, 1, 0, 0) else "plan_area"
        elif dim in BY_DIMENSION:
            choice = BY_DIMENSION[dim]
        else:
            raise CaseError(
                f"not a quantity of the case nor a kind of the scale laws, and a "
                f"{dimension_name(dim)} does not say how it scales; declare it with "
                f"--column '{name}=KIND'",
                key=key,
            )
        how = "unit"
    vector, dim = kind_vector(choice, law, header)
    quantity = _quantity_of(case, vector, dim)
    return choice, how, vector, dim, quantity


def _quantity_of(case: Case, vector: np.ndarray, dim: tuple[int, ...]) -> str | None:
    """The one case quantity with this law and dimension (its limits apply), else None."""
    found = [
        n
        for n, q in case.quantities.items()
        if tuple(q.dimension) == tuple(dim) and np.allclose(q.scaling, vector, atol=1e-12, rtol=0)
    ]
    return found[0] if len(found) == 1 else None


def parse_column_option(text: str) -> tuple[str, str]:
    """``NAME=KIND`` of ``--column``.

    Examples
    --------
    >>> parse_column_option("stage = vertical_length")
    ('stage', 'vertical_length')
    """
    name, sep, kind = text.partition("=")
    if not sep or not name.strip() or not kind.strip():
        raise CaseError(f"expected NAME=KIND, got {text!r}", key="--column")
    return name.strip(), kind.strip()
