"""Case files: load a TOML case, check every value's units and meaning, convert to SI.

The contract is documented key by key in ``docs/case-format.md``. Every problem found is
reported as a :class:`~compromise.errors.CaseError` that names the file, the key and what was
expected; all problems of one file are gathered into one :class:`~compromise.errors.CaseErrors`.
"""

from __future__ import annotations

import difflib
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from compromise import expr as ex
from compromise.errors import (
    CaseError,
    CaseErrors,
    FluidRangeError,
    UnknownFluidError,
)
from compromise.scaling import BASIS, INDEX
from compromise.units import dimension_name, to_celsius

ATMOSPHERE = 101325.0  # [Pa]
DEFAULT_MODEL_TEMPERATURE = 293.15  # [K], a laboratory at 20 degC (common practice)
#: Quantity names tried, in order, as the characteristic length ``L`` of a built-in group.
LENGTH_NAMES = ("depth", "diameter", "length", "height", "chord", "thickness", "width")

TOP_KEYS = (
    "title",
    "description",
    "prototype",
    "groups",
    "model",
    "limits",
    "conditions",
    "phenomena",
)
PROTOTYPE_KEYS = ("fluid", "temperature", "pressure", "quantities")
QUANTITY_KEYS = ("value", "axis", "scales_as", "description")
GROUP_KEYS = ("weight", "exact", "min", "max", "expr", "length", "description")
MODEL_KEYS = (
    "horizontal_ratio",
    "distortion",
    "velocity_ratio",
    "fluids",
    "temperature",
    "pressure",
    "preferred_ratios",
)
LIMIT_KEYS = ("min", "max")
SCALES_AS_NAMES = ("horizontal", "vertical", "velocity", "rho", "mu", "nu", "sigma", "c", "g")


@dataclass(frozen=True)
class Quantity:
    """A characteristic prototype quantity and how it scales.

    Attributes
    ----------
    name : str
    value : float
        Prototype value [SI units of ``unit``] (the base value; conditions may override it).
    dimension : tuple of int
        (mass, length, time, temperature) exponents.
    unit : str
        SI unit text.
    scaling : numpy.ndarray
        Exponents of the quantity's ratio over :data:`compromise.scaling.BASIS`.
    axis : str
        ``"horizontal"``, ``"vertical"`` or ``"section"`` (areas); only meaningful for lengths.
    scales_as : str or None
        The user's scaling expression, when one was given.
    """

    name: str
    value: float
    dimension: tuple[int, int, int, int]
    unit: str
    scaling: np.ndarray = field(repr=False, compare=False)
    axis: str = "horizontal"
    scales_as: str | None = None
    description: str = ""

    def scaling_text(self) -> str:
        """The scaling as a readable product of base ratios, e.g. ``X^1 Y^1 V^1``."""
        return scaling_text(self.scaling)


@dataclass(frozen=True)
class Condition:
    """A named prototype condition (a flow) that overrides some quantity values."""

    name: str
    weight: float
    values: Mapping[str, float]


@dataclass(frozen=True)
class Group:
    """A dimensionless group of the case, with its weight and model-value bounds.

    Attributes
    ----------
    text : str
        The expression after substitution of the characteristic length.
    power : tuple or None
        ``(coefficient, {name: exponent})`` when the expression is a power product.
    """

    name: str
    expression: ex.Expr = field(repr=False, compare=False)
    text: str
    weight: float
    exact: bool = False
    min: float | None = None
    max: float | None = None
    builtin: bool = False
    power: tuple[float, dict[str, float]] | None = field(default=None, compare=False)
    description: str = ""
    #: a scale-effect threshold turned into a bound (reported as a limit, not as a group)
    threshold: bool = False


@dataclass(frozen=True)
class Limit:
    """A laboratory bound on the model value of a prototype quantity [SI]."""

    quantity: str
    kind: str  # "min" or "max"
    bound: float


@dataclass(frozen=True)
class ModelChoices:
    """The designer's choices and their bounds (ratios model/prototype, SI)."""

    horizontal_ratio: tuple[float, float]
    distortion: tuple[float, float]
    velocity_ratio: tuple[float, float] | None
    fluids: tuple[str, ...]
    temperature: tuple[float, float]  # [K]
    pressure: tuple[float, float]  # [Pa]
    preferred_ratios: tuple[float, ...] = ()


@dataclass(frozen=True)
class Case:
    """A loaded, checked case in SI units (see ``docs/case-format.md``)."""

    path: str
    title: str
    fluid: str
    temperature: float  # [K]
    pressure: float  # [Pa]
    quantities: Mapping[str, Quantity]
    conditions: tuple[Condition, ...]
    groups: Mapping[str, Group]
    model: ModelChoices
    limits: tuple[Limit, ...]
    description: str = ""
    #: phenomenon -> {conventional quantity name: the case's quantity name}
    phenomena: Mapping[str, Mapping[str, str]] = field(default_factory=dict)

    def values(self, condition: int | str = 0) -> dict[str, float]:
        """Prototype quantity values [SI] in one condition (by index or name)."""
        cond = self.condition(condition)
        out = {name: q.value for name, q in self.quantities.items()}
        out.update(cond.values)
        return out

    def condition(self, which: int | str) -> Condition:
        """One condition by index or name."""
        if isinstance(which, int):
            return self.conditions[which]
        for c in self.conditions:
            if c.name == which:
                return c
        raise KeyError(f"no condition named {which!r}")

    @property
    def distorted(self) -> bool:
        """Whether the vertical ratio may differ from the horizontal one."""
        return self.model.distortion[1] > self.model.distortion[0] or self.model.distortion[0] != 1

    def summary(self) -> dict[str, Any]:
        """A plain-data summary for ``compromise check``."""
        from compromise.units import format_ratio

        m = self.model
        return {
            "title": self.title,
            "prototype": {
                "fluid": self.fluid,
                "temperature": to_celsius(self.temperature),
                "pressure": self.pressure,
            },
            "quantities": {
                n: {
                    "value": q.value,
                    "unit": q.unit,
                    "kind": dimension_name(q.dimension),
                    "scales_as": q.scaling_text(),
                }
                for n, q in self.quantities.items()
            },
            "conditions": {
                c.name: {"weight": c.weight, "values": dict(c.values)} for c in self.conditions
            },
            "groups": {
                n: {
                    "expression": g.text,
                    "weight": g.weight,
                    "exact": g.exact,
                    "min": g.min,
                    "max": g.max,
                    "power_product": g.power is not None,
                }
                for n, g in self.groups.items()
            },
            "model": {
                "horizontal_ratio": [format_ratio(r) for r in m.horizontal_ratio],
                "distortion": list(m.distortion),
                "velocity_ratio": list(m.velocity_ratio) if m.velocity_ratio else None,
                "fluids": list(m.fluids),
                "temperature": [to_celsius(t) for t in m.temperature],
                "pressure": list(m.pressure),
                "preferred_ratios": [format_ratio(r) for r in m.preferred_ratios],
            },
            "limits": [
                {"quantity": lim.quantity, "kind": lim.kind, "bound": lim.bound}
                for lim in self.limits
            ],
            "phenomena": {k: dict(v) for k, v in self.phenomena.items()},
        }


def scaling_text(s: np.ndarray) -> str:
    """Readable product of base ratios for an exponent vector.

    Examples
    --------
    >>> from compromise.scaling import vec
    >>> scaling_text(vec(horizontal=1, vertical=1, velocity=1))
    'X Y V'
    >>> scaling_text(vec(vertical=1, horizontal=-1))
    'X^-1 Y'
    """
    symbols = {"horizontal": "X", "vertical": "Y", "velocity": "V"}
    parts = []
    for name in BASIS:
        e = float(s[INDEX[name]])
        if abs(e) < 1e-12:
            continue
        sym = symbols.get(name, f"{name}_r")
        if abs(e - 1) < 1e-12:
            parts.append(sym)
        else:
            parts.append(f"{sym}^{fraction_text(e)}")
    return " ".join(parts) or "1"


def fraction_text(e: float) -> str:
    from fractions import Fraction

    f = Fraction(e).limit_denominator(12)
    if abs(float(f) - e) < 1e-9:
        return str(f) if f.denominator != 1 else str(f.numerator)
    return f"{e:.4g}"


def load_case(path: str | Path) -> Case:
    """Load and check a case file.

    Parameters
    ----------
    path : str or pathlib.Path
        The TOML case file.

    Returns
    -------
    Case

    Raises
    ------
    CaseErrors
        With one :class:`CaseError` per problem found (file, key, what was expected).
    """
    shown = str(path)
    p = Path(path)
    try:
        raw = p.read_bytes()
    except FileNotFoundError:
        raise CaseErrors([CaseError("file not found", file=shown)]) from None
    except IsADirectoryError:
        raise CaseErrors([CaseError("expected a case file, got a directory", file=shown)]) from None
    except OSError as exc:
        raise CaseErrors([CaseError(f"cannot read: {exc.strerror}", file=shown)]) from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise CaseErrors([CaseError("expected UTF-8 text (TOML)", file=shown)]) from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise CaseErrors([CaseError(f"TOML syntax error: {exc}", file=shown)]) from None
    return case_from_dict(data, path=shown)


def case_from_dict(data: Mapping[str, Any], *, path: str = "<case>") -> Case:
    """Check a case given as a dictionary (as parsed from TOML) and convert it to SI.

    See :func:`load_case`.
    """
    from compromise.case_checks import (
        Loader,
        check_groups,
        check_model,
        check_phenomena,
        check_quantity,
        show,
    )
    from compromise.fluids import get_fluid

    L = Loader(path)
    L.keys(data, TOP_KEYS, "")
    title = data.get("title", Path(path).stem)
    if not isinstance(title, str):
        L.error("title", f"expected a string, got {show(title)}")
        title = Path(path).stem
    description = data.get("description", "")
    if not isinstance(description, str):
        L.error("description", f"expected a string, got {show(description)}")
        description = ""

    # prototype ---------------------------------------------------------------------------
    proto = L.table(data.get("prototype", None), "prototype") if "prototype" in data else {}
    if "prototype" not in data:
        L.error("prototype", "missing table; expected the prototype's fluid and quantities")
    L.keys(proto, PROTOTYPE_KEYS, "prototype")
    fluid_name = proto.get("fluid", "water")
    fluid = None
    if not isinstance(fluid_name, str):
        L.error("prototype.fluid", f"expected a fluid name, got {show(fluid_name)}")
    else:
        try:
            fluid = get_fluid(fluid_name)
            fluid_name = fluid.name
        except (UnknownFluidError, FluidRangeError) as exc:
            L.error("prototype.fluid", str(exc))
    temperature = 288.15
    if "temperature" in proto:
        t = L.quantity(
            proto["temperature"],
            "prototype.temperature",
            (0, 0, 0, 1),
            what="a temperature such as '12 degC'",
        )
        if t:
            temperature = t[0]
    else:
        L.error("prototype.temperature", "missing; expected a temperature such as '12 degC'")
    pressure = ATMOSPHERE
    if "pressure" in proto:
        pq = L.quantity(proto["pressure"], "prototype.pressure", (1, -1, -2, 0))
        if pq:
            pressure = pq[0]
    if fluid is not None and "temperature" in proto:
        try:
            fluid.check(temperature, pressure)
        except FluidRangeError as exc:
            L.error("prototype.temperature", f"{fluid_name}: {exc}")

    # quantities --------------------------------------------------------------------------
    quantities: dict[str, Quantity] = {}
    qdata = L.table(proto.get("quantities", {}), "prototype.quantities")
    if not qdata:
        L.error("prototype.quantities", "expected at least one characteristic quantity")
    for name, entry in qdata.items():
        key = f"prototype.quantities.{name}"
        if not name.isidentifier() or name.startswith("_"):
            L.error(key, "expected a name of letters, digits and underscores")
            L.rejected.add(name)
            continue
        if name in ex.PROPERTY_NAMES or name == "L" or name in ex.CONSTANTS or name in ex.FUNCTIONS:
            L.error(
                key,
                f"'{name}' is reserved (fluid property, characteristic length, constant "
                "or function of the expression language); rename it",
            )
            L.rejected.add(name)
            continue
        q = check_quantity(L, name, entry, key)
        if q is not None:
            quantities[name] = q
        else:
            L.rejected.add(name)

    # conditions --------------------------------------------------------------------------
    conditions: list[Condition] = []
    cdata = L.table(data.get("conditions", {}), "conditions")
    for cname, entry in cdata.items():
        key = f"conditions.{cname}"
        entry = L.table(entry, key)
        weight = 1.0
        values: dict[str, float] = {}
        for k, v in entry.items():
            if k == "weight":
                w = L.positive(v, f"{key}.weight", "a positive weight")
                weight = w if w is not None else 1.0
            elif k == "description":
                continue
            elif k in L.rejected:
                continue
            elif k in quantities:
                q = quantities[k]
                parsed = L.quantity(
                    v,
                    f"{key}.{k}",
                    q.dimension,
                    positive=q.dimension != (0, 0, 0, 0) or q.value > 0,
                )
                if parsed:
                    values[k] = parsed[0]
            else:
                near = difflib.get_close_matches(k, [*quantities, "weight"], n=1)
                hint = f"; did you mean '{near[0]}'?" if near else ""
                L.error(f"{key}.{k}", f"not a prototype quantity{hint}")
        conditions.append(Condition(cname, weight, values))
    if not conditions:
        conditions.append(Condition("design", 1.0, {}))

    # groups ------------------------------------------------------------------------------
    groups = check_groups(L, data.get("groups"), quantities)

    # model -------------------------------------------------------------------------------
    model = check_model(
        L, data.get("model", {}), fluid_name if isinstance(fluid_name, str) else "water"
    )

    # limits ------------------------------------------------------------------------------
    limits: list[Limit] = []
    ldata = L.table(data.get("limits", {}), "limits")
    for name, entry in ldata.items():
        key = f"limits.{name}"
        if name in L.rejected:
            continue
        if name not in quantities:
            near = difflib.get_close_matches(name, list(quantities), n=1)
            hint = f"; did you mean '{near[0]}'?" if near else ""
            L.error(
                key,
                f"not a prototype quantity{hint} (limits bound model values of "
                "prototype.quantities)",
            )
            continue
        if not isinstance(entry, dict):
            L.table(entry, key)
            continue
        L.keys(entry, LIMIT_KEYS, key)
        if not entry:
            L.error(key, "expected 'min' and/or 'max'")
        q = quantities[name]
        parsed: dict[str, float] = {}
        for kind in ("min", "max"):
            if kind in entry:
                v = L.quantity(entry[kind], f"{key}.{kind}", q.dimension)
                if v:
                    parsed[kind] = v[0]
                    limits.append(Limit(name, kind, v[0]))
        if "min" in parsed and "max" in parsed and parsed["min"] > parsed["max"]:
            L.error(key, "min is greater than max")

    if L.errors:
        raise CaseErrors(L.errors)
    phenomena = check_phenomena(L, data.get("phenomena", []), quantities)
    if L.errors:
        raise CaseErrors(L.errors)
    return Case(
        phenomena=phenomena,
        path=path,
        title=title,
        description=description,
        fluid=str(fluid_name),
        temperature=temperature,
        pressure=pressure,
        quantities=quantities,
        conditions=tuple(conditions),
        groups=groups,
        model=model,
        limits=tuple(limits),
    )
