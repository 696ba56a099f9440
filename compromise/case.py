"""Case files: load a TOML case, check every value's units and meaning, convert to SI.

The contract is documented key by key in ``docs/case-format.md``. Every problem found is
reported as a :class:`~compromise.errors.CaseError` that names the file, the key and what was
expected; all problems of one file are gathered into one :class:`~compromise.errors.CaseErrors`.
"""

from __future__ import annotations

import difflib
import math
import tomllib
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from compromise import expr as ex
from compromise.errors import (
    CaseError,
    CaseErrors,
    ExpressionError,
    FluidRangeError,
    UnknownFluidError,
)
from compromise.scaling import BASIS, INDEX, default_scaling
from compromise.units import dimension_name, parse_quantity, parse_ratio, si_unit, to_celsius

ATMOSPHERE = 101325.0  # [Pa]
DEFAULT_MODEL_TEMPERATURE = 293.15  # [K], a laboratory at 20 degC (common practice)
#: Quantity names tried, in order, as the characteristic length ``L`` of a built-in group.
LENGTH_NAMES = ("depth", "diameter", "length", "height", "chord", "thickness", "width")

TOP_KEYS = (
    "title", "description", "prototype", "groups", "model", "limits", "conditions", "phenomena",
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
            parts.append(f"{sym}^{_num(e)}")
    return " ".join(parts) or "1"


def _num(e: float) -> str:
    from fractions import Fraction

    f = Fraction(e).limit_denominator(12)
    if abs(float(f) - e) < 1e-9:
        return str(f) if f.denominator != 1 else str(f.numerator)
    return f"{e:.4g}"


class _Loader:
    """Collects problems while walking a case file."""

    def __init__(self, path: str) -> None:
        self.path = path
        self.errors: list[CaseError] = []
        #: Quantities given in the file but rejected; later references to them are not reported
        #: again (one problem, one message).
        self.rejected: set[str] = set()

    def error(self, key: str, message: str) -> None:
        self.errors.append(CaseError(message, file=self.path, key=key))

    def table(self, data: Any, key: str) -> dict[str, Any]:
        if not isinstance(data, dict):
            self.error(key, f"expected a table, got {_show(data)}")
            return {}
        return data

    def keys(self, data: Mapping[str, Any], allowed: tuple[str, ...], prefix: str) -> None:
        for k in data:
            if k not in allowed:
                near = difflib.get_close_matches(k, allowed, n=1)
                hint = f"; did you mean '{near[0]}'?" if near else f"; expected one of {', '.join(allowed)}"
                self.error(_join(prefix, k), f"unknown key{hint}")

    def positive(self, value: Any, key: str, what: str = "a positive number") -> float | None:
        if isinstance(value, bool) or not isinstance(value, int | float):
            self.error(key, f"expected {what}, got {_show(value)}")
            return None
        v = float(value)
        if not math.isfinite(v) or v <= 0:
            self.error(key, f"expected {what}, got {_show(value)}")
            return None
        return v

    def quantity(
        self,
        value: Any,
        key: str,
        dim: tuple[int, ...] | None = None,
        *,
        what: str | None = None,
        positive: bool = True,
    ) -> tuple[float, tuple[int, int, int, int]] | None:
        """Parse a value with units; check its dimension (when given) and sign."""
        try:
            si, got, _ = parse_quantity(value)
        except ValueError as exc:
            self.error(key, str(exc))
            return None
        if dim is not None and tuple(got) != tuple(dim):
            want = what or f"a {dimension_name(dim)}"
            if tuple(got) == (0, 0, 0, 0) and isinstance(value, int | float):
                unit = "degC" if tuple(dim) == (0, 0, 0, 1) else si_unit(dim)
                example = "" if what else f" (e.g. '{value} {unit}')"
                self.error(key, f"expected {want} with units{example}, "
                           f"got the bare number {value}")
            else:
                self.error(key, f"expected {want}, got {_show(value)} (a {dimension_name(got)})")
            return None
        if not math.isfinite(si):
            self.error(key, f"expected a finite value, got {_show(value)}")
            return None
        if positive and si <= 0:
            self.error(key, f"expected a positive value, got {_show(value)}")
            return None
        return si, got

    def ratio(self, value: Any, key: str) -> float | None:
        try:
            return parse_ratio(value)
        except ValueError as exc:
            self.error(key, str(exc))
            return None

    def bounds(
        self, data: Any, key: str, parse: Callable[[Any, str], float | None]
    ) -> tuple[float, float] | None:
        """A ``{min, max}`` table or a single fixed value, parsed with ``parse``."""
        if isinstance(data, dict):
            self.keys(data, ("min", "max"), key)
            if "min" not in data or "max" not in data:
                self.error(key, "expected both 'min' and 'max' (or a single fixed value)")
                return None
            lo = parse(data["min"], _join(key, "min"))
            hi = parse(data["max"], _join(key, "max"))
            if lo is None or hi is None:
                return None
            if lo > hi:
                self.error(key, f"min {_show(data['min'])} is greater than max {_show(data['max'])}")
                return None
            return lo, hi
        v = parse(data, key)
        return None if v is None else (v, v)


def _dimension_text(d: tuple[float, ...]) -> str:
    """'a length', or the exponents when some are not integers ('the dimension L^1/2')."""
    if all(abs(x - round(x)) < 1e-9 for x in d):
        return f"a {dimension_name(tuple(round(x) for x in d))}"
    parts = [f"{sym}^{_num(x)}" for sym, x in zip("MLTK", d, strict=True) if abs(x) > 1e-9]
    return "the dimension " + " ".join(parts)


def _join(prefix: str, key: str) -> str:
    return f"{prefix}.{key}" if prefix else key


def _show(value: Any) -> str:
    if isinstance(value, str):
        return repr(value)
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "a list"
    return repr(value)


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
    from compromise.fluids import get_fluid

    L = _Loader(path)
    L.keys(data, TOP_KEYS, "")
    title = data.get("title", Path(path).stem)
    if not isinstance(title, str):
        L.error("title", f"expected a string, got {_show(title)}")
        title = Path(path).stem
    description = data.get("description", "")
    if not isinstance(description, str):
        L.error("description", f"expected a string, got {_show(description)}")
        description = ""

    # prototype ---------------------------------------------------------------------------
    proto = L.table(data.get("prototype", None), "prototype") if "prototype" in data else {}
    if "prototype" not in data:
        L.error("prototype", "missing table; expected the prototype's fluid and quantities")
    L.keys(proto, PROTOTYPE_KEYS, "prototype")
    fluid_name = proto.get("fluid", "water")
    fluid = None
    if not isinstance(fluid_name, str):
        L.error("prototype.fluid", f"expected a fluid name, got {_show(fluid_name)}")
    else:
        try:
            fluid = get_fluid(fluid_name)
            fluid_name = fluid.name
        except (UnknownFluidError, FluidRangeError) as exc:
            L.error("prototype.fluid", str(exc))
    temperature = 288.15
    if "temperature" in proto:
        t = L.quantity(proto["temperature"], "prototype.temperature", (0, 0, 0, 1),
                       what="a temperature such as '12 degC'")
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
            L.error(key, f"'{name}' is reserved (fluid property, characteristic length, constant "
                    "or function of the expression language); rename it")
            L.rejected.add(name)
            continue
        q = _quantity(L, name, entry, key)
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
                parsed = L.quantity(v, f"{key}.{k}", q.dimension,
                                    positive=q.dimension != (0, 0, 0, 0) or q.value > 0)
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
    groups = _groups(L, data.get("groups"), quantities)

    # model -------------------------------------------------------------------------------
    model = _model(L, data.get("model", {}), fluid_name if isinstance(fluid_name, str) else "water")

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
            L.error(key, f"not a prototype quantity{hint} (limits bound model values of "
                    "prototype.quantities)")
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
    phenomena = _phenomena(L, data.get("phenomena", []), quantities)
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


def _quantity(L: _Loader, name: str, entry: Any, key: str) -> Quantity | None:
    axis = "horizontal"
    scales_as = None
    description = ""
    if isinstance(entry, dict):
        L.keys(entry, QUANTITY_KEYS, key)
        if "value" not in entry:
            L.error(key, "expected a 'value' with units")
            return None
        value = entry["value"]
        axis = entry.get("axis", "horizontal")
        if axis not in ("horizontal", "vertical", "section"):
            L.error(f"{key}.axis", f"expected 'horizontal', 'vertical' or 'section', got {_show(axis)}")
            return None
        scales_as = entry.get("scales_as")
        description = str(entry.get("description", ""))
    else:
        value = entry
    vkey = f"{key}.value" if isinstance(entry, dict) else key
    try:
        si, dim, _ = parse_quantity(value)
    except ValueError as exc:
        L.error(vkey, str(exc))
        return None
    if not math.isfinite(si) or si <= 0:
        L.error(vkey, f"expected a positive finite value, got {_show(value)}")
        return None
    if scales_as is not None:
        if not isinstance(scales_as, str):
            L.error(f"{key}.scales_as", f"expected an expression string, got {_show(scales_as)}")
            return None
        scaling = _scales_as(L, scales_as, f"{key}.scales_as")
        if scaling is None:
            return None
    else:
        if axis == "vertical" and dim not in ((0, 1, 0, 0),):
            L.error(f"{key}.axis", "only a length can have axis 'vertical'; use scales_as")
            return None
        if axis == "section" and dim != (0, 2, 0, 0):
            L.error(f"{key}.axis", "only an area can have axis 'section'; use scales_as")
            return None
        scaling = default_scaling(dim, axis)
        if scaling is None:
            L.error(key, f"cannot scale a {dimension_name(dim)} by its dimension; give scales_as")
            return None
    return Quantity(name, si, dim, si_unit(dim), scaling, axis, scales_as, description)


def _scales_as(L: _Loader, text: str, key: str) -> np.ndarray | None:
    try:
        tree = ex.parse(text)
    except ExpressionError as exc:
        L.error(key, str(exc))
        return None
    unknown = sorted(ex.names(tree) - set(SCALES_AS_NAMES))
    if unknown:
        L.error(key, f"unknown name '{unknown[0]}'; expected products of powers of "
                f"{', '.join(SCALES_AS_NAMES)}")
        return None
    pp = ex.power_product(tree)
    if pp is None or abs(pp[0] - 1) > 1e-12:
        L.error(key, "expected a product of powers of base ratios, e.g. 'vertical / horizontal'")
        return None
    out = np.zeros(len(BASIS))
    for n, e in pp[1].items():
        out[INDEX[n]] = e
    return out


def _groups(L: _Loader, data: Any, quantities: Mapping[str, Quantity]) -> dict[str, Group]:
    from compromise.groups import BUILTIN_GROUPS

    groups: dict[str, Group] = {}
    if data is None:
        L.error("groups", "missing table; expected at least one dimensionless group")
        return groups
    data = L.table(data, "groups")
    dims = {n: q.dimension for n, q in quantities.items()}
    dims.update({n: tuple(d) for n, d in ex.PROPERTY_DIMENSIONS.items()})
    for name, entry in data.items():
        key = f"groups.{name}"
        entry = L.table(entry, key)
        L.keys(entry, GROUP_KEYS, key)
        builtin = name in BUILTIN_GROUPS and "expr" not in entry
        if "expr" in entry:
            text = entry["expr"]
            if not isinstance(text, str):
                L.error(f"{key}.expr", f"expected an expression string, got {_show(text)}")
                continue
            ekey = f"{key}.expr"
        elif builtin:
            text = BUILTIN_GROUPS[name].expression
            ekey = key
        else:
            near = difflib.get_close_matches(name, list(BUILTIN_GROUPS), n=1)
            hint = f" (did you mean '{near[0]}'?)" if near else ""
            L.error(key, f"not a built-in group{hint}; give 'expr' for a custom group")
            continue
        try:
            tree = ex.parse(text)
        except ExpressionError as exc:
            L.error(ekey, str(exc))
            continue
        if ex.names(tree) & L.rejected:
            continue
        if "L" in ex.names(tree):
            length = entry.get("length")
            if length is None:
                length = next((n for n in LENGTH_NAMES if n in L.rejected or (
                    n in quantities and quantities[n].dimension == (0, 1, 0, 0))), None)
                if length in L.rejected:
                    continue
                if length is None:
                    L.error(key, "needs a characteristic length: add 'length = \"<quantity>\"' "
                            f"or define one of {', '.join(LENGTH_NAMES)}")
                    continue
            elif isinstance(length, str) and length in L.rejected:
                continue
            elif (not isinstance(length, str) or length not in quantities
                  or quantities[length].dimension != (0, 1, 0, 0)):
                L.error(f"{key}.length", "expected the name of a prototype quantity that is a "
                        f"length, got {_show(length)}")
                continue
            tree = ex.substitute(tree, {"L": ex.parse(length)})
        try:
            d = ex.dimension(tree, dims)
        except ExpressionError as exc:
            L.error(ekey, f"{exc}" + ("" if not builtin else
                    f" (built-in '{name}' is {BUILTIN_GROUPS[name].expression})"))
            continue
        if any(abs(x) > 1e-9 for x in d):
            L.error(ekey, f"expected a dimensionless expression, got {_dimension_text(d)}: "
                    f"{ex.to_text(tree)}")
            continue
        weight = entry.get("weight", 1.0)
        w = 0.0 if weight == 0 and not isinstance(weight, bool) else L.positive(
            weight, f"{key}.weight", "a weight >= 0")
        exact = entry.get("exact", False)
        if not isinstance(exact, bool):
            L.error(f"{key}.exact", f"expected true or false, got {_show(exact)}")
            exact = False
        lo = hi = None
        if "min" in entry:
            lo = L.positive(entry["min"], f"{key}.min", "a positive number (the model value's floor)")
        if "max" in entry:
            hi = L.positive(entry["max"], f"{key}.max", "a positive number (the model value's ceiling)")
        if lo is not None and hi is not None and lo > hi:
            L.error(key, f"min {lo} is greater than max {hi}")
        if w is None:
            continue
        groups[name] = Group(
            name=name,
            expression=tree,
            text=ex.to_text(tree),
            weight=w,
            exact=exact,
            min=lo,
            max=hi,
            builtin=builtin,
            power=ex.power_product(tree),
            description=str(entry.get("description", "")),
        )
    if not groups and not L.errors:
        L.error("groups", "expected at least one dimensionless group")
    return groups


def _model(L: _Loader, data: Any, prototype_fluid: str) -> ModelChoices:
    from compromise.fluids import get_fluid

    data = L.table(data, "model")
    L.keys(data, MODEL_KEYS, "model")
    h = (1e-4, 1.0)
    if "horizontal_ratio" in data:
        h = L.bounds(data["horizontal_ratio"], "model.horizontal_ratio", L.ratio) or h
    else:
        L.error("model.horizontal_ratio", "missing; expected bounds such as {min = \"1:500\", max = \"1:20\"}")
    d = (1.0, 1.0)
    if "distortion" in data:
        d = L.bounds(data["distortion"], "model.distortion", L.positive) or d
        if d[0] < 1:
            L.error("model.distortion", "expected values >= 1 (vertical ratio / horizontal ratio; "
                    "1 means undistorted)")
    v = None
    if "velocity_ratio" in data:
        v = L.bounds(data["velocity_ratio"], "model.velocity_ratio", L.ratio)
    raw_fluids = data.get("fluids", [prototype_fluid])
    if isinstance(raw_fluids, str):
        raw_fluids = [raw_fluids]
    fluids: list[str] = []
    objs = []
    if not isinstance(raw_fluids, list) or not raw_fluids:
        L.error("model.fluids", "expected a non-empty list of fluid names")
    else:
        for i, name in enumerate(raw_fluids):
            if not isinstance(name, str):
                L.error(f"model.fluids[{i}]", f"expected a fluid name, got {_show(name)}")
                continue
            try:
                f = get_fluid(name)
            except (UnknownFluidError, FluidRangeError) as exc:
                L.error(f"model.fluids[{i}]", str(exc))
                continue
            if f.name in fluids:
                L.error(f"model.fluids[{i}]", f"'{f.name}' is listed twice")
                continue
            fluids.append(f.name)
            objs.append(f)

    def temp(value: Any, key: str) -> float | None:
        q = L.quantity(value, key, (0, 0, 0, 1), what="a temperature such as '20 degC'")
        return q[0] if q else None

    def pres(value: Any, key: str) -> float | None:
        q = L.quantity(value, key, (1, -1, -2, 0))
        return q[0] if q else None

    t = (DEFAULT_MODEL_TEMPERATURE, DEFAULT_MODEL_TEMPERATURE)
    if "temperature" in data:
        t = L.bounds(data["temperature"], "model.temperature", temp) or t
    p = (ATMOSPHERE, ATMOSPHERE)
    if "pressure" in data:
        p = L.bounds(data["pressure"], "model.pressure", pres) or p
    for f in objs:
        for tk in sorted(set(t)):
            for pk in sorted(set(p)):
                try:
                    f.check(tk, pk)
                except FluidRangeError as exc:
                    L.error("model.temperature", f"{f.name}: {exc}")
    preferred: list[float] = []
    raw_pref = data.get("preferred_ratios", [])
    if not isinstance(raw_pref, list):
        L.error("model.preferred_ratios", "expected a list of ratios such as [\"1:50\", \"1:100\"]")
        raw_pref = []
    for i, r in enumerate(raw_pref):
        val = L.ratio(r, f"model.preferred_ratios[{i}]")
        if val is not None:
            preferred.append(val)
    return ModelChoices(
        horizontal_ratio=h,
        distortion=d,
        velocity_ratio=v,
        fluids=tuple(fluids),
        temperature=t,
        pressure=p,
        preferred_ratios=tuple(preferred),
    )


def _phenomena(
    L: _Loader, data: Any, quantities: Mapping[str, Quantity]
) -> dict[str, dict[str, str]]:
    """``phenomena``: a list of names, or a table of names each mapping conventional quantity
    names onto the case's own (``[phenomena.hydraulic_jump] depth = "toe_depth"``)."""
    from compromise.thresholds import PHENOMENA, conventional_names

    if isinstance(data, list):
        entries: dict[str, Any] = {}
        for i, name in enumerate(data):
            if not isinstance(name, str):
                L.error(f"phenomena[{i}]", f"expected a phenomenon name, got {_show(name)}")
                continue
            entries[name] = {}
    elif isinstance(data, dict):
        entries = data
    else:
        L.error("phenomena", "expected a list of phenomenon names or a table of them")
        return {}
    out: dict[str, dict[str, str]] = {}
    for name, mapping in entries.items():
        key = f"phenomena.{name}"
        if name not in PHENOMENA:
            near = difflib.get_close_matches(name, list(PHENOMENA), n=1)
            hint = f"; did you mean '{near[0]}'?" if near else f"; known: {', '.join(PHENOMENA)}"
            L.error(key, f"unknown phenomenon{hint}")
            continue
        mapping = L.table(mapping, key)
        needed = conventional_names(name)
        aliases: dict[str, str] = {}
        for conv, target in mapping.items():
            if conv not in needed:
                L.error(f"{key}.{conv}", f"'{name}' uses no quantity '{conv}'; it uses "
                        f"{', '.join(needed)}")
                continue
            if not isinstance(target, str) or target not in quantities:
                L.error(f"{key}.{conv}", f"expected the name of a prototype quantity, got "
                        f"{_show(target)}")
                continue
            aliases[conv] = target
        for conv in needed:
            target = aliases.get(conv, conv)
            if target not in quantities:
                L.error(key, f"needs the quantity '{conv}'; define it under "
                        f"prototype.quantities or map it: [{key}] {conv} = \"<quantity>\"")
                break
            aliases[conv] = target
        else:
            out[name] = aliases
    return out
