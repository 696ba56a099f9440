"""Checks that need the physics: what ``solve`` would refuse about a case, found by ``check``.

A group's prototype value must be a positive finite number in every condition (the solver works
on the logarithm of model over prototype), and every fluid must have each property the groups
and limits use (air has no surface tension, so it cannot be the fluid of a Weber group). These
checks run in the same pass as every other check of :func:`compromise.casefile.load.case_from_dict`,
so ``check`` reports them beside the rest, with file and key.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from typing import Any

import numpy as np

from compromise import expressions as ex
from compromise.casefile.model import Case, Group
from compromise.errors import CompromiseError, FluidRangeError, UnknownFluidError
from compromise.physics.scaling import N_DECISION
from compromise.units import number_text

#: The property names of the expression language and what a message calls them.
PROPERTY_WORDS: dict[str, str] = {
    "rho": "density (rho)",
    "mu": "dynamic viscosity (mu)",
    "nu": "kinematic viscosity (nu)",
    "sigma": "surface tension (sigma)",
    "c": "speed of sound (c)",
    "p_vapour": "vapour pressure (p_vapour)",
}

_ATTRIBUTES = {
    "rho": "density",
    "mu": "dynamic_viscosity",
    "nu": "kinematic_viscosity",
    "sigma": "surface_tension",
    "c": "speed_of_sound",
    "p_vapour": "vapour_pressure",
}


def _property_values(props: object) -> dict[str, float]:
    """``rho, mu, nu, sigma, c, g`` of a fluid state; nan where the property does not apply."""
    out: dict[str, float] = {}
    for name, attr in _ATTRIBUTES.items():
        v = getattr(props, attr, None)
        out[name] = math.nan if v is None else float(v)
    out["g"] = 9.80665
    out["p_ambient"] = float(getattr(props, "pressure", math.nan))
    return out


def group_properties(case: Case, group: Group) -> set[str]:
    """Fluid properties a group's model value depends on: named in the expression, or carried
    by the scaling law of a quantity it names (a quantity that ``scales_as`` a property)."""
    from compromise.expressions import PROPERTY_NAMES

    out: set[str] = set()
    for n in ex.names(group.expression):
        if n in PROPERTY_NAMES or n in PROPERTY_WORDS:
            out.add(n)
        elif n in case.quantities:
            s = case.quantities[n].scaling[N_DECISION:]
            out.update(PROPERTY_NAMES[i] for i in np.flatnonzero(s))
    out.discard("g")
    return out


def _needs(case: Case) -> dict[str, str]:
    """Every property the case's groups and limits need, with the first key that needs it."""
    from compromise.expressions import PROPERTY_NAMES

    needs: dict[str, str] = {}
    for name, g in case.groups.items():
        for p in sorted(group_properties(case, g)):
            needs.setdefault(p, f"groups.{name}")
    for lim in case.limits:
        q = case.quantities.get(lim.quantity)
        if q is None:
            continue
        for i in np.flatnonzero(q.scaling[N_DECISION:]):
            p = PROPERTY_NAMES[i]
            if p != "g":
                needs.setdefault(p, f"limits.{lim.quantity}")
    return needs


def _positive_values(
    error: Any, case: Case, name: str, g: Group, envs: list[dict[str, float]]
) -> None:
    key = f"groups.{name}"
    for i, env in enumerate(envs):
        cond = case.conditions[i].name
        where = f" in condition '{cond}'" if len(envs) > 1 else ""
        try:
            value = float(ex.evaluate(g.expression, env))
        except (CompromiseError, ArithmeticError, ValueError) as exc:
            error(key, f"cannot evaluate the group at the prototype{where}: {exc}")
            return
        if not math.isfinite(value):
            error(
                key,
                f"the prototype value is {value}{where} (outside the domain of a function such "
                "as log or sqrt, or a division by zero); expected a positive finite number",
            )
            return
        if value <= 0:
            error(
                key,
                f"the prototype value is {number_text(value)}{where}; a group must be positive "
                "(the solver compares model and prototype by the logarithm of their ratio)",
            )
            return


def check_physics(
    error: Any, case: Case, *, prototype_ok: bool, model_fluids: Iterable[tuple[int, str]]
) -> None:
    """Report, through ``error(key, message)``, what the solver would refuse.

    Parameters
    ----------
    error : callable
        ``Loader.error``: records one problem with its key.
    case : Case
        The case as far as it was read (groups and quantities that passed their own checks).
    prototype_ok : bool
        Whether the prototype fluid, temperature and pressure were valid (else its group values
        are not computed: the problem is already reported).
    model_fluids : iterable of (int, str)
        Index in ``model.fluids`` and name of each model fluid that was recognised.
    """
    from compromise.physics.fluids import get_fluid

    if prototype_ok:
        try:
            props = _property_values(
                get_fluid(case.fluid).properties(case.temperature, case.pressure)
            )
        except (UnknownFluidError, FluidRangeError) as exc:
            error("prototype.pressure", str(exc))
            props = None
        if props is not None:
            envs = []
            for i in range(len(case.conditions)):
                env: dict[str, float] = dict(case.values(i))
                env.update(props)
                envs.append(env)
            for name, g in case.groups.items():
                direct = sorted(
                    n
                    for n in ex.names(g.expression)
                    if n in PROPERTY_WORDS and math.isnan(props[n])
                )
                if direct:
                    error(
                        f"groups.{name}",
                        f"the prototype fluid '{case.fluid}' has no {PROPERTY_WORDS[direct[0]]}, "
                        "which this group needs (prototype.fluid)",
                    )
                    continue
                _positive_values(error, case, name, g, envs)
    needs = _needs(case)
    if not needs:
        return
    t0, p0 = case.model.temperature[0], case.model.pressure[0]
    for index, fname in model_fluids:
        try:
            fluid = get_fluid(fname)
            fluid.check(t0, p0)
        except (UnknownFluidError, FluidRangeError):
            continue  # reported with model.temperature
        try:
            mprops = _property_values(fluid.properties(t0, p0))
        except FluidRangeError as exc:
            error(f"model.fluids[{index}]", str(exc))
            continue
        missing = [p for p in sorted(needs) if p in PROPERTY_WORDS and math.isnan(mprops[p])]
        if missing:
            p = missing[0]
            error(
                f"model.fluids[{index}]",
                f"'{fname}' has no {PROPERTY_WORDS[p]}, which {needs[p]} needs",
            )
