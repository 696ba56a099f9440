"""Case files: load a TOML case, check every value's units and meaning, convert to SI.

The contract is documented key by key in ``docs/case-format.md``. Every problem found is
reported as a :class:`~compromise.errors.CaseError` that names the file, the key and what was
expected; all problems of one file are gathered into one :class:`~compromise.errors.CaseErrors`.
"""

from __future__ import annotations

import difflib
import hashlib
import json
import tomllib
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from compromise import expressions as ex
from compromise.casefile.checks import (
    Loader,
    check_groups,
    check_model,
    check_phenomena,
    check_quantity,
    show,
)
from compromise.casefile.facility import check_facility, check_facility_needs, facility_bounds
from compromise.casefile.instruments import check_instruments
from compromise.casefile.model import (
    ATMOSPHERE,
    DISPLAY_UNITS,
    LIMIT_KEYS,
    PROTOTYPE_KEYS,
    TOP_KEYS,
    Case,
    Condition,
    Limit,
    Quantity,
)
from compromise.casefile.physics_checks import check_physics
from compromise.casefile.resistance import check_resistance
from compromise.casefile.sediment import check_sediment, sediment_density_entry
from compromise.errors import CaseError, CaseErrors, FluidRangeError, UnknownFluidError
from compromise.physics.fluids import get_fluid
from compromise.physics.groups import STATE_DIMENSIONS


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
    except ValueError:  # an integer literal beyond Python's digit limit escapes TOMLDecodeError
        raise CaseErrors(
            [
                CaseError(
                    "an integer literal of more than 4300 digits; expected a number", file=shown
                )
            ]
        ) from None
    return case_from_dict(data, path=shown, source_sha256=hashlib.sha256(raw).hexdigest())


def canonical_sha256(data: Mapping[str, Any]) -> str:
    """SHA-256 (hex) of a case dictionary's canonical JSON: keys sorted, no spaces, UTF-8.

    Two dictionaries with the same content give the same hash whatever their key order; values
    JSON cannot hold (TOML dates) are written as their text.

    Examples
    --------
    >>> canonical_sha256({"b": 1, "a": [1, 2]}) == canonical_sha256({"a": [1, 2], "b": 1})
    True
    """
    text = json.dumps(data, sort_keys=True, separators=(",", ":"), ensure_ascii=False, default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def case_from_dict(
    data: Mapping[str, Any], *, path: str = "<case>", source_sha256: str | None = None
) -> Case:
    """Check a case given as a dictionary (as parsed from TOML) and convert it to SI.

    See :func:`load_case`. ``source_sha256`` is the hash of the file the dictionary came from;
    without it the case carries :func:`canonical_sha256` of the dictionary.
    """

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
    display_units = data.get("display_units", "si")
    if display_units not in DISPLAY_UNITS:
        L.error("display_units", f"expected 'si' or 'us', got {show(display_units)}")
        display_units = "si"

    # prototype ---------------------------------------------------------------------------
    proto = L.table(data.get("prototype", None), "prototype") if "prototype" in data else {}
    if "prototype" not in data:
        L.error("prototype", "missing table; expected the prototype's fluid and quantities")
    L.keys(proto, PROTOTYPE_KEYS, "prototype")
    fluid_name = proto.get("fluid", "water")
    fluid = None
    errors_before = len(L.errors)
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
    prototype_ok = fluid is not None and len(L.errors) == errors_before

    # quantities --------------------------------------------------------------------------
    quantities: dict[str, Quantity] = {}
    qdata = L.table(proto.get("quantities", {}), "prototype.quantities")
    if "sediment" in data:  # the prototype material's density, unless the case gives one
        qdata = {**qdata, **sediment_density_entry(L, data["sediment"], qdata)}
    if not qdata:
        L.error("prototype.quantities", "expected at least one characteristic quantity")
    for name, entry in qdata.items():
        key = f"prototype.quantities.{name}"
        if not name.isidentifier() or name.startswith("_"):
            L.error(key, "expected a name of letters, digits and underscores")
            L.rejected.add(name)
            continue
        if (
            name in ex.PROPERTY_NAMES
            or name in STATE_DIMENSIONS
            or name == "L"
            or name in ex.CONSTANTS
            or name in ex.FUNCTIONS
        ):
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

    # phenomena (checked with the rest, so every problem of the file is reported in one pass)
    phenomena = check_phenomena(L, data.get("phenomena", []), quantities)
    instruments = check_instruments(L, data.get("instruments", {}), quantities)
    facility = check_facility(L, data.get("facility"))
    check_facility_needs(L, facility, phenomena)
    groups = {**groups, **facility_bounds(facility, phenomena)}
    sediment = check_sediment(L, data.get("sediment"), quantities, groups)
    resistance = check_resistance(L, data["resistance"]) if "resistance" in data else None
    case = Case(
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
        source_sha256=source_sha256 or canonical_sha256(data),
        display_units=display_units,
        instruments=instruments,
        facility=facility,
        sediment=sediment,
        resistance=resistance,
    )
    # what the solver would refuse (group values, fluid properties), in the same pass
    check_physics(
        L.error,
        case,
        prototype_ok=prototype_ok,
        model_fluids=_model_fluid_indices(data.get("model", {}), model.fluids),
    )
    if L.errors:
        raise CaseErrors(L.errors)
    return case


def _model_fluid_indices(model: Any, accepted: tuple[str, ...]) -> list[tuple[int, str]]:
    """(index in ``model.fluids``, catalogue name) of every model fluid that was accepted."""
    raw = model.get("fluids") if isinstance(model, dict) else None
    if isinstance(raw, str):
        raw = [raw]
    if not isinstance(raw, list):
        return list(enumerate(accepted))
    out: list[tuple[int, str]] = []
    for i, name in enumerate(raw):
        if not isinstance(name, str):
            continue
        try:
            canonical = get_fluid(name).name
        except (UnknownFluidError, FluidRangeError):
            continue
        if canonical in accepted and all(c != canonical for _, c in out):
            out.append((i, canonical))
    return out
