"""What the scale-effect checks share: the environments of a condition and the groups' roles.

* :func:`condition_environments` gives the prototype and model values of every quantity and
  fluid property in one condition, the names a threshold or a regime test evaluates.
* :func:`length_of` and :func:`is_reynolds` read a group's role from its power product: the
  characteristic length of a Reynolds-type group, and whether it is one.
"""

from __future__ import annotations

import math

from compromise import expressions as ex
from compromise.casefile.model import Case, Group
from compromise.solving.design import ConditionResult, Evaluation


def condition_environments(
    case: Case, evaluation: Evaluation, cond: ConditionResult
) -> tuple[dict[str, float], dict[str, float]]:
    """Prototype and model environments (quantities and fluid properties) of one condition.

    The design's distortion is in the model environment as ``distortion`` (1 in the
    prototype's).
    """
    from compromise.solving.design import property_environments

    d = evaluation.design
    proto, model = property_environments(case, d.fluid, d.temperature, d.pressure)
    penv = {n: q.prototype for n, q in cond.quantities.items()} | proto | {"distortion": 1.0}
    menv = {n: q.model for n, q in cond.quantities.items()} | model
    menv["distortion"] = d.distortion
    # the facility's dimensions: the model's; the prototype is in open air or water (infinite)
    facility = case.facility.environment()
    penv |= {n: math.inf for n in facility}
    menv |= facility
    return penv, menv


def evaluate_text(text: str, env: dict[str, float], aliases: dict[str, str]) -> float:
    """Value of an expression over conventional names, mapped to a case's names by ``aliases``.

    Examples
    --------
    >>> evaluate_text("velocity * depth", {"v": 2.0, "depth": 3.0}, {"velocity": "v"})
    6.0
    """
    tree = ex.substitute(ex.parse(text), {k: ex.parse(v) for k, v in aliases.items()})
    return float(ex.evaluate(tree, env))


def length_of(group: Group, case: Case) -> str | None:
    """The characteristic length quantity of a Reynolds-type group (its only length)."""
    if group.power is None:
        return None
    lengths = [
        n
        for n in group.power[1]
        if n in case.quantities and case.quantities[n].dimension == (0, 1, 0, 0)
    ]
    return lengths[0] if len(lengths) == 1 else None


def is_reynolds(group: Group) -> bool:
    """Whether a group is a Reynolds number: velocity to the first power over ``nu``."""
    if group.power is None:
        return False
    e = group.power[1]
    return abs(e.get("nu", 0) + 1) < 1e-12 and abs(e.get("velocity", 0) - 1) < 1e-12


def viscous_limits(case: Case, length: str | None, pipe: bool) -> tuple[float, float]:
    """Reynolds numbers that bound the transitional range for a group's length.

    Pipes (on the diameter): 2300 and 4000; a towed hull (``ship_resistance``, on its
    length): 2e6 and 5e6, the range where laminar flow is a risk even with stimulators (common
    practice); a body in an external flow (a length or chord that is not a depth): 5e5, the
    critical Reynolds number of a flat plate (Schlichting, Boundary-Layer Theory, from memory);
    open channels (on the depth or hydraulic radius): 500 and 2000 (Chow 1959).
    """
    if pipe or length == "diameter":
        return 2300.0, 4000.0
    if length is not None and case.quantities[length].axis != "vertical":
        if "ship_resistance" in case.phenomena:
            return 2.0e6, 5.0e6
        if length in ("length", "chord", "span") or "compressibility" in case.phenomena:
            return 5.0e5, 5.0e5
    return 500.0, 2000.0
