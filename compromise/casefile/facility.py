"""The laboratory facility (``[facility]``): test section, tank depth and width, blockage ceiling.

A facility's dimensions are model values that do not scale: a wind tunnel's test-section area,
a towing tank's depth and width. The thresholds of the phenomena ``blockage`` and ``tank_walls``
(:mod:`compromise.physics.thresholds`) are written over them. With the facility's values put in,
each of those thresholds is a product of powers of the case's quantities (the blockage ratio
``frontal_area / section_area`` scales as X Y), so :func:`facility_bounds` turns it into a bound
on a model value, a linear row of the solver, kept in every solve: the model must fit the
facility. ``[facility] blockage_max`` replaces the published ceiling of the blockage thresholds
in that row; the scale-effect check still reports the published band.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from compromise import expressions as ex
from compromise.casefile.checks import Loader, show
from compromise.casefile.model import FACILITY_KEYS, Facility, Group


def check_facility(L: Loader, data: Any) -> Facility:
    """``[facility]``: ``section_area`` (an area), ``depth`` and ``width`` (lengths),
    ``blockage_max`` (a fraction, 0 < x < 1, or a percentage such as ``"5 %"``)."""
    if data is None:
        return Facility()
    data = L.table(data, "facility")
    L.keys(data, FACILITY_KEYS, "facility")
    values: dict[str, float | None] = {}
    for key, dim in (
        ("section_area", (0, 2, 0, 0)),
        ("depth", (0, 1, 0, 0)),
        ("width", (0, 1, 0, 0)),
    ):
        if key in data:
            q = L.quantity(data[key], f"facility.{key}", dim)
            values[key] = q[0] if q else None
            if q is None:
                L.rejected.add(f"facility.{key}")  # reported here; not again as missing
    if "blockage_max" in data:
        raw = data["blockage_max"]
        q = L.quantity(raw, "facility.blockage_max", (0, 0, 0, 0))
        if q is not None and not 0 < q[0] < 1:
            L.error(
                "facility.blockage_max",
                f"expected a fraction between 0 and 1 (or a percentage such as '5 %'), "
                f"got {show(raw)}",
            )
            q = None
        values["blockage_max"] = q[0] if q else None
    return Facility(**values)


def check_facility_needs(
    L: Loader, facility: Facility, phenomena: Mapping[str, Mapping[str, str]]
) -> None:
    """Every facility value the named phenomena use must be given under ``[facility]``."""
    from compromise.physics.thresholds import facility_names

    have = facility.environment()
    keys = {"section_area": "section_area", "tank_depth": "depth", "tank_width": "width"}
    for phen in phenomena:
        for name in facility_names(phen):
            rejected = {f"facility.{k}" for k in ("section_area", "depth", "width")}
            if name not in have and not rejected & L.rejected:
                extra = " (or its depth and width)" if name == "section_area" else ""
                L.error(
                    f"phenomena.{phen}",
                    f"needs the facility's {keys[name]}{extra}: add [facility] {keys[name]} = ...",
                )
                break


def facility_bounds(
    facility: Facility, phenomena: Mapping[str, Mapping[str, str]]
) -> dict[str, Group]:
    """The thresholds on facility names as bounds on model values (weight-0 groups marked
    ``threshold``, reported as limits under ``phenomena.<phenomenon>.<threshold>``), with the
    facility's values put in and, for a blockage ratio, ``blockage_max`` as the ceiling."""
    from compromise.physics.thresholds import (
        BLOCKAGE_THRESHOLDS,
        FACILITY_NAMES,
        thresholds_for,
    )

    env = facility.environment()
    out: dict[str, Group] = {}
    for phen, aliases in phenomena.items():
        for t in thresholds_for(phen):
            tree = ex.parse(t.expression)
            used = ex.names(tree) & set(FACILITY_NAMES)
            if not used or not used <= set(env):
                continue
            subs: dict[str, ex.Expr] = {k: ex.parse(v) for k, v in aliases.items()}
            subs.update({k: ex.parse(repr(float(env[k]))) for k in used})
            tree = ex.substitute(tree, subs)
            bound = t.passing
            if (phen, t.name) in BLOCKAGE_THRESHOLDS and facility.blockage_max is not None:
                bound = facility.blockage_max
            name = f"{phen}.{t.name}"
            out[name] = Group(
                name=name,
                expression=tree,
                text=ex.to_text(tree),
                weight=0.0,
                min=bound if t.kind == "min" else None,
                max=bound if t.kind == "max" else None,
                power=ex.power_product(tree),
                description=t.label,
                threshold=True,
            )
    return out
