"""Checks of each section of a case file, gathering every problem found.

:func:`compromise.casefile.load.case_from_dict` walks a case with a :class:`Loader`; the functions
here
check one section each and report problems as :class:`~compromise.errors.CaseError` lines that
name the file, the key and what was expected.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Callable, Mapping
from typing import Any

import numpy as np

from compromise import expressions as ex
from compromise.casefile.model import (
    ATMOSPHERE,
    DEFAULT_MODEL_TEMPERATURE,
    GROUP_KEYS,
    LENGTH_NAMES,
    MODEL_KEYS,
    QUANTITY_KEYS,
    SCALES_AS_NAMES,
    Group,
    ModelChoices,
    Quantity,
    fraction_text,
)
from compromise.errors import CaseError, ExpressionError, FluidRangeError, UnknownFluidError
from compromise.physics.scaling import BASIS, INDEX, default_scaling, named_scaling
from compromise.units import (
    checked_number,
    dimension_name,
    number_text,
    parse_quantity,
    parse_ratio,
    si_unit,
)


class Loader:
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
            self.error(key, f"expected a table, got {show(data)}")
            return {}
        return data

    def keys(self, data: Mapping[str, Any], allowed: tuple[str, ...], prefix: str) -> None:
        for k in data:
            if k not in allowed:
                near = difflib.get_close_matches(k, allowed, n=1)
                hint = (
                    f"; did you mean '{near[0]}'?"
                    if near
                    else f"; expected one of {', '.join(allowed)}"
                )
                self.error(join(prefix, k), f"unknown key{hint}")

    def positive(self, value: Any, key: str, what: str = "a positive number") -> float | None:
        if isinstance(value, bool) or not isinstance(value, int | float):
            self.error(key, f"expected {what}, got {show(value)}")
            return None
        if isinstance(value, float) and not math.isfinite(value):
            self.error(key, f"expected {what}, got {show(value)}")
            return None
        try:
            v = checked_number(value)
        except ValueError as exc:
            self.error(key, f"{exc} ({what})")
            return None
        if v <= 0:
            self.error(key, f"expected {what}, got {show(value)}")
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
                self.error(key, f"expected {want} with units{example}, got the bare number {value}")
            else:
                self.error(key, f"expected {want}, got {show(value)} (a {dimension_name(got)})")
            return None
        if not math.isfinite(si):
            self.error(key, f"expected a finite value, got {show(value)}")
            return None
        if positive and si <= 0:
            self.error(key, f"expected a positive value, got {show(value)}")
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
            lo = parse(data["min"], join(key, "min"))
            hi = parse(data["max"], join(key, "max"))
            if lo is None or hi is None:
                return None
            if lo > hi:
                self.error(key, f"min {show(data['min'])} is greater than max {show(data['max'])}")
                return None
            return lo, hi
        v = parse(data, key)
        return None if v is None else (v, v)


def dimension_text(d: tuple[float, ...]) -> str:
    """'a length', or the exponents when some are not integers ('the dimension L^1/2')."""
    if all(abs(x - round(x)) < 1e-9 for x in d):
        return f"a {dimension_name(tuple(round(x) for x in d))}"
    parts = [f"{sym}^{fraction_text(x)}" for sym, x in zip("MLTK", d, strict=True) if abs(x) > 1e-9]
    return "the dimension " + " ".join(parts)


def join(prefix: str, key: str) -> str:
    return f"{prefix}.{key}" if prefix else key


def show(value: Any) -> str:
    if isinstance(value, str):
        return repr(value if len(value) <= 60 else value[:57] + "...")
    if isinstance(value, int | float) and not isinstance(value, bool):
        return number_text(value)
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "a list"
    return repr(value)


def check_quantity(L: Loader, name: str, entry: Any, key: str) -> Quantity | None:
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
            L.error(
                f"{key}.axis", f"expected 'horizontal', 'vertical' or 'section', got {show(axis)}"
            )
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
        L.error(vkey, f"expected a positive finite value, got {show(value)}")
        return None
    if scales_as is not None:
        if not isinstance(scales_as, str):
            L.error(f"{key}.scales_as", f"expected an expression string, got {show(scales_as)}")
            return None
        scaling = check_scales_as(L, scales_as, f"{key}.scales_as")
        if scaling is None:
            return None
    else:
        if axis == "vertical" and dim not in ((0, 1, 0, 0),):
            L.error(f"{key}.axis", "only a length can have axis 'vertical'; use scales_as")
            return None
        if axis == "section" and dim != (0, 2, 0, 0):
            L.error(f"{key}.axis", "only an area can have axis 'section'; use scales_as")
            return None
        # a bare slope, Manning n or a shear velocity scales by its law, not by its dimension
        # (physics.scaling.NAMED_QUANTITY_LAWS)
        scaling = named_scaling(name, dim)
        if scaling is None:
            scaling = default_scaling(dim, axis)
        if scaling is None:
            L.error(key, f"cannot scale a {dimension_name(dim)} by its dimension; give scales_as")
            return None
    return Quantity(name, si, dim, si_unit(dim), scaling, axis, scales_as, description)


def check_scales_as(L: Loader, text: str, key: str) -> np.ndarray | None:
    try:
        tree = ex.parse(text)
    except ExpressionError as exc:
        L.error(key, str(exc))
        return None
    unknown = sorted(ex.names(tree) - set(SCALES_AS_NAMES))
    if unknown:
        L.error(
            key,
            f"unknown name '{unknown[0]}'; expected products of powers of "
            f"{', '.join(SCALES_AS_NAMES)}",
        )
        return None
    pp = ex.power_product(tree)
    if pp is None or abs(pp[0] - 1) > 1e-12:
        L.error(key, "expected a product of powers of base ratios, e.g. 'vertical / horizontal'")
        return None
    out = np.zeros(len(BASIS))
    for n, e in pp[1].items():
        out[INDEX[n]] = e
    return out


def check_groups(L: Loader, data: Any, quantities: Mapping[str, Quantity]) -> dict[str, Group]:
    from compromise.physics.groups import BUILTIN_GROUPS

    groups: dict[str, Group] = {}
    if data is None:
        L.error("groups", "missing table; expected at least one dimensionless group")
        return groups
    data = L.table(data, "groups")
    dims = {n: q.dimension for n, q in quantities.items()}
    dims.update({n: tuple(d) for n, d in ex.PROPERTY_DIMENSIONS.items()})
    from compromise.physics.groups import STATE_DIMENSIONS

    dims.update(STATE_DIMENSIONS)
    for name, entry in data.items():
        key = f"groups.{name}"
        entry = L.table(entry, key)
        L.keys(entry, GROUP_KEYS, key)
        builtin = name in BUILTIN_GROUPS and "expr" not in entry
        if "expr" in entry:
            text = entry["expr"]
            if not isinstance(text, str):
                L.error(f"{key}.expr", f"expected an expression string, got {show(text)}")
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
                length = next(
                    (
                        n
                        for n in LENGTH_NAMES
                        if n in L.rejected
                        or (n in quantities and quantities[n].dimension == (0, 1, 0, 0))
                    ),
                    None,
                )
                if length in L.rejected:
                    continue
                if length is None:
                    L.error(
                        key,
                        "needs a characteristic length: add 'length = \"<quantity>\"' "
                        f"or define one of {', '.join(LENGTH_NAMES)}",
                    )
                    continue
            elif isinstance(length, str) and length in L.rejected:
                continue
            elif (
                not isinstance(length, str)
                or length not in quantities
                or quantities[length].dimension != (0, 1, 0, 0)
            ):
                L.error(
                    f"{key}.length",
                    "expected the name of a prototype quantity that is a "
                    f"length, got {show(length)}",
                )
                continue
            tree = ex.substitute(tree, {"L": ex.parse(length)})
        try:
            d = ex.dimension(tree, dims)
        except ExpressionError as exc:
            L.error(
                ekey,
                f"{exc}"
                + (
                    ""
                    if not builtin
                    else f" (built-in '{name}' is {BUILTIN_GROUPS[name].expression})"
                ),
            )
            continue
        if any(abs(x) > 1e-9 for x in d):
            L.error(
                ekey,
                f"expected a dimensionless expression, got {dimension_text(d)}: {ex.to_text(tree)}",
            )
            continue
        weight = entry.get("weight", 1.0)
        w = (
            0.0
            if weight == 0 and not isinstance(weight, bool)
            else L.positive(weight, f"{key}.weight", "a weight >= 0")
        )
        exact = entry.get("exact", False)
        if not isinstance(exact, bool):
            L.error(f"{key}.exact", f"expected true or false, got {show(exact)}")
            exact = False
        lo = hi = None
        if "min" in entry:
            lo = L.positive(
                entry["min"], f"{key}.min", "a positive number (the model value's floor)"
            )
        if "max" in entry:
            hi = L.positive(
                entry["max"], f"{key}.max", "a positive number (the model value's ceiling)"
            )
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


def check_model(L: Loader, data: Any, prototype_fluid: str) -> ModelChoices:
    from compromise.physics.fluids import get_fluid

    data = L.table(data, "model")
    L.keys(data, MODEL_KEYS, "model")
    h = (1e-4, 1.0)
    if "horizontal_ratio" in data:
        h = L.bounds(data["horizontal_ratio"], "model.horizontal_ratio", L.ratio) or h
    else:
        L.error(
            "model.horizontal_ratio",
            'missing; expected bounds such as {min = "1:500", max = "1:20"}',
        )
    d = (1.0, 1.0)
    if "distortion" in data:
        d = L.bounds(data["distortion"], "model.distortion", L.positive) or d
        if d[0] < 1:
            L.error(
                "model.distortion",
                "expected values >= 1 (vertical ratio / horizontal ratio; 1 means undistorted)",
            )
        elif d[1] > 1e12:
            L.error("model.distortion", f"expected values up to 1e12, got {show(d[1])}")
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
                L.error(f"model.fluids[{i}]", f"expected a fluid name, got {show(name)}")
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
        L.error("model.preferred_ratios", 'expected a list of ratios such as ["1:50", "1:100"]')
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


def check_phenomena(
    L: Loader, data: Any, quantities: Mapping[str, Quantity]
) -> dict[str, dict[str, str]]:
    """``phenomena``: a list of names, or a table of names each mapping conventional quantity
    names onto the case's own (``[phenomena.hydraulic_jump] depth = "toe_depth"``)."""
    from compromise.physics.thresholds import PHENOMENA, conventional_names

    if isinstance(data, list):
        entries: dict[str, Any] = {}
        for i, name in enumerate(data):
            if not isinstance(name, str):
                L.error(f"phenomena[{i}]", f"expected a phenomenon name, got {show(name)}")
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
                L.error(
                    f"{key}.{conv}",
                    f"'{name}' uses no quantity '{conv}'; it uses {', '.join(needed)}",
                )
                continue
            if isinstance(target, str) and target in L.rejected:
                aliases[conv] = target  # already reported where it is defined
                continue
            if not isinstance(target, str) or target not in quantities:
                L.error(
                    f"{key}.{conv}",
                    f"expected the name of a prototype quantity, got {show(target)}",
                )
                continue
            aliases[conv] = target
        for conv in needed:
            target = aliases.get(conv, conv)
            if target in L.rejected:
                break  # the quantity itself was reported; one problem, one message
            if target not in quantities:
                L.error(
                    key,
                    f"needs the quantity '{conv}'; define it under "
                    f'prototype.quantities or map it: [{key}] {conv} = "<quantity>"',
                )
                break
            aliases[conv] = target
        else:
            out[name] = aliases
    return out
