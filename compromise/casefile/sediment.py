"""The ``[sediment]`` table: the granular material the solver chooses.

A movable-bed or armour case names the model materials the solver may choose (catalogue names,
:mod:`compromise.physics.materials`), the model grain-size range (the lower bound defaults to
the cohesion limit, 0.1 mm, common practice), the prototype material (its density becomes the
prototype quantity ``grain_density`` unless the case gives one) and the quantity that holds the
prototype grain size (``grain_size`` by default; ``Dn50`` of armour under any name).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import Any

from compromise.casefile.checks import Loader, show
from compromise.casefile.model import SEDIMENT_KEYS, Quantity, Sediment
from compromise.errors import CaseError


def sediment_density_entry(L: Loader, data: Any, quantities: Mapping[str, Any]) -> dict[str, str]:
    """The prototype ``grain_density`` quantity implied by ``sediment.material``, if needed.

    Returns ``{name: "<density> kg/m^3"}`` to add to the prototype quantities, or ``{}``.
    """
    from compromise.physics.materials import get_material

    if not isinstance(data, dict):
        return {}
    density = data.get("density", "grain_density")
    name = data.get("material")
    if not isinstance(density, str) or density in quantities or not isinstance(name, str):
        return {}
    try:
        mat = get_material(name)
    except CaseError:
        return {}  # reported by check_sediment
    return {density: f"{mat.density!r} kg/m^3"}


def check_sediment(
    L: Loader, data: Any, quantities: Mapping[str, Quantity], groups: Mapping[str, Any]
) -> Sediment | None:
    """Check ``[sediment]``; None when the case has none."""
    from compromise.physics.materials import COHESION_LIMIT, get_material

    if data is None:
        return None
    table = L.table(data, "sediment")
    L.keys(table, SEDIMENT_KEYS, "sediment")
    names: list[str] = []
    raw = table.get("materials")
    if not isinstance(raw, list) or not raw or not all(isinstance(m, str) for m in raw):
        L.error("sediment.materials", f"expected a list of material names, got {show(raw)}")
    else:
        for i, m in enumerate(raw):
            try:
                mat = get_material(m)
            except CaseError as exc:
                L.error(f"sediment.materials[{i}]", str(exc))
                continue
            if mat.name in names:
                L.error(f"sediment.materials[{i}]", f"'{mat.name}' is listed twice")
                continue
            names.append(mat.name)
    proto_material = table.get("material")
    if proto_material is not None:
        if not isinstance(proto_material, str):
            L.error("sediment.material", f"expected a material name, got {show(proto_material)}")
            proto_material = None
        else:
            try:
                proto_material = get_material(proto_material).name
            except CaseError as exc:
                L.error("sediment.material", str(exc))
                proto_material = None
    lo, hi = COHESION_LIMIT, math.inf
    rng = table.get("grain_size", {})
    if not isinstance(rng, dict):
        L.error("sediment.grain_size", f"expected {{ min = ..., max = ... }}, got {show(rng)}")
    else:
        L.keys(rng, ("min", "max"), "sediment.grain_size")
        for side in ("min", "max"):
            if side in rng:
                v = L.quantity(rng[side], f"sediment.grain_size.{side}", (0, 1, 0, 0))
                if v and side == "min":
                    lo = v[0]
                elif v:
                    hi = v[0]
        if lo > hi:
            L.error("sediment.grain_size", "min is greater than max")
    names_of = {}
    for key, default in (("grain", "grain_size"), ("density", "grain_density")):
        q = table.get(key, default)
        want = (0, 1, 0, 0) if key == "grain" else (1, -3, 0, 0)
        if not isinstance(q, str):
            L.error(f"sediment.{key}", f"expected a quantity name, got {show(q)}")
        elif q not in quantities:
            hint = (
                " (or name the prototype material in sediment.material)" if key == "density" else ""
            )
            L.error(
                f"sediment.{key}",
                f"expected a prototype quantity '{q}'{hint}",
            )
        elif tuple(quantities[q].dimension) != want:
            what = "a length" if key == "grain" else "a density"
            L.error(f"sediment.{key}", f"the quantity '{q}' must be {what}")
        names_of[key] = q if isinstance(q, str) else default
    moving = table.get("moving_bed", "shields" in groups)
    if not isinstance(moving, bool):
        L.error("sediment.moving_bed", f"expected true or false, got {show(moving)}")
        moving = False
    if moving and "shields" not in groups:
        L.error("sediment.moving_bed", "needs a 'shields' group (the floor is on its model value)")
    return Sediment(
        tuple(names),
        (lo, hi),
        proto_material,
        names_of.get("grain", "grain_size"),
        names_of.get("density", "grain_density"),
        bool(moving),
    )
