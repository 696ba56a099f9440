"""How much Reynolds mismatch is acceptable: the smallest model Reynolds number that keeps the
bias of a friction-controlled quantity inside a tolerance, and that floor applied to a case.

The answer is given on the same basis as the case's Reynolds group (its length: depth,
hydraulic radius or diameter), so it can be compared with the group's values and used as its
floor directly. Colebrook-White describes turbulent flow only: an answer that would fall in the
laminar-turbulent transition is raised to the turbulent limit and flagged.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from typing import Any

from compromise import expressions as ex
from compromise.casefile.model import Case, Group
from compromise.errors import CaseError
from compromise.physics.friction import friction_factor
from compromise.review.context import is_reynolds, length_of, viscous_limits
from compromise.solving.design import Evaluation

#: Exponent of the friction factor's bias in each quantity's bias: head loss, friction slope
#: and pressure drop at a given velocity follow f; the depth of a wide channel at a given
#: discharge follows f^(1/3) (Darcy-Weisbach with q = V h).
TOLERANCE_QUANTITIES = {
    "head_loss": 1.0,
    "slope": 1.0,
    "pressure_drop": 1.0,
    "friction": 1.0,
    "depth": 1 / 3,
}

#: Lengths a Reynolds number may be taken on for the friction factor: a pipe's diameter (the
#: hydraulic diameter itself) or an open channel's depth or hydraulic radius (a quarter of it).
BASIS_LENGTHS = ("diameter", "hydraulic_radius", "depth")


@dataclass(frozen=True)
class Tolerance:
    """The smallest model Reynolds number that keeps a friction bias inside a tolerance.

    Attributes
    ----------
    reynolds_prototype, reynolds_min : float
        Prototype Reynolds number and the smallest admissible model one, both on ``length``
        (the case's Reynolds group's length) [-].
    length : str
        The length the Reynolds numbers are taken on.
    turbulent_limit : float
        The Reynolds number on ``length`` above which the flow is turbulent (below it
        Colebrook-White does not apply) [-].
    limited_by : str
        ``"tolerance"``, or ``"turbulent_limit"`` where the bias would stay inside the
        tolerance into the laminar-turbulent transition: the answer is then the turbulent
        limit, not a friction result.
    """

    quantity: str
    within: float
    condition: str
    reynolds_prototype: float
    reynolds_min: float
    relative_roughness: float
    basis: str
    length: str = "depth"
    turbulent_limit: float = 0.0
    limited_by: str = "tolerance"

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return dataclasses.asdict(self)


def _reynolds_group(case: Case) -> Group | None:
    """The case's Reynolds group: the one named ``reynolds``, else the first Reynolds-type."""
    g = case.groups.get("reynolds")
    if g is not None and is_reynolds(g) and not g.threshold:
        return g
    return next((g for g in case.groups.values() if is_reynolds(g) and not g.threshold), None)


def _basis_length(case: Case, vals: dict[str, float]) -> str:
    """The length of the case's Reynolds group, else the first of :data:`BASIS_LENGTHS`."""
    g = _reynolds_group(case)
    if g is not None:
        length = length_of(g, case)
        if length is not None and length not in BASIS_LENGTHS:
            raise CaseError(
                f"the Reynolds group '{g.name}' is taken on '{length}'; the friction factor "
                f"needs it on one of {', '.join(BASIS_LENGTHS)}",
                file=case.path,
                key=f"groups.{g.name}",
            )
        if length is not None:
            return length
    for name in BASIS_LENGTHS:
        if name in vals:
            return name
    raise CaseError(
        "needs a prototype 'depth', 'hydraulic_radius' or 'diameter'",
        file=case.path,
        key="prototype.quantities",
    )


def reynolds_tolerance(case: Case, quantity: str, within: float, condition: int = 0) -> Tolerance:
    """Smallest model Reynolds number for which ``quantity``'s bias stays within ``within``.

    The bias comes from the Darcy friction factor (Colebrook-White) at the same relative
    roughness: ``f(Re_m) / f(Re_p) - 1`` for head loss, slope and pressure drop, its cube root
    for the depth at a given discharge (wide channel). ``f`` falls as Re rises, so the answer
    is the root of ``bias(Re) = within``, found by bracketing between the turbulent limit and
    the prototype's Reynolds number. The friction factor is computed on the hydraulic diameter
    (the diameter, or four times a depth or hydraulic radius); the Reynolds numbers returned
    are on the case's Reynolds group's length.

    Raises
    ------
    CaseError
        A bad quantity or tolerance, missing quantities, or a prototype flow that is not
        turbulent (Colebrook-White does not apply).

    References
    ----------
    Colebrook, C. F. (1939). J. Inst. Civ. Eng. 11, 133-156. Turbulent limits: 4000 on a pipe
    diameter (White, F. M., Fluid Mechanics, ch. 6, from memory); 2000 on the depth or
    hydraulic radius of an open channel (Chow, V. T. (1959), Open-Channel Hydraulics, ch. 1,
    state of flow, from memory; section not checked).
    """
    from scipy.optimize import brentq

    from compromise.solving.problem import prototype_environment

    if quantity not in TOLERANCE_QUANTITIES:
        raise CaseError(
            f"expected one of {', '.join(TOLERANCE_QUANTITIES)}, got {quantity!r}", key="--quantity"
        )
    if not 0 < within < 1:
        raise CaseError(
            f"expected a tolerance between 0 and 100 %, got {within:.4g}", key="--within"
        )
    vals = case.values(condition)
    env = prototype_environment(case, condition)
    if "roughness" not in vals or "velocity" not in vals:
        raise CaseError(
            "needs prototype quantities 'velocity' and 'roughness' (and 'depth', "
            "'hydraulic_radius' or 'diameter')",
            file=case.path,
            key="prototype.quantities",
        )
    length = _basis_length(case, vals)
    to_dh = 1.0 if length == "diameter" else 4.0  # hydraulic diameter over the basis length
    pipe = length == "diameter" or "pipe_flow" in case.phenomena
    _, turbulent = viscous_limits(case, length, pipe)
    dh = to_dh * vals[length]
    rel = vals["roughness"] / dh
    re_p = vals["velocity"] * vals[length] / env["nu"]
    cond_name = case.conditions[condition].name
    if re_p < turbulent:
        raise CaseError(
            f"the prototype flow is not turbulent in condition '{cond_name}' (Reynolds number "
            f"{re_p:.4g} on {length}, below {turbulent:.4g}): Colebrook-White does not apply",
            file=case.path,
            key="prototype.quantities.velocity",
        )
    power = TOLERANCE_QUANTITIES[quantity]
    f_p = friction_factor(re_p * to_dh, rel)

    def bias(log_re: float) -> float:
        return (friction_factor(math.exp(log_re) * to_dh, rel) / f_p) ** power - 1.0 - within

    lo = math.log(turbulent)
    limited = bias(lo) <= 0
    re_min = turbulent if limited else math.exp(brentq(bias, lo, math.log(re_p), xtol=1e-12))
    basis = (
        f"Darcy friction factor by Colebrook-White at relative roughness {rel:.3g} on the "
        f"hydraulic diameter ({'D' if to_dh == 1 else f'4 x {length}'}); {quantity} bias = "
        f"(f_model / f_prototype)^{power:.3g} - 1 <= {within:.1%}; Reynolds numbers on "
        f"{length}, as the case's Reynolds group"
    )
    if limited:
        basis += f"; the answer is the turbulent limit ({turbulent:.4g} on {length})"
    return Tolerance(
        quantity,
        within,
        cond_name,
        re_p,
        re_min,
        rel,
        basis,
        length,
        turbulent,
        "turbulent_limit" if limited else "tolerance",
    )


@dataclass(frozen=True)
class ReynoldsFloor:
    """A tolerance's Reynolds number applied as a floor on the case's Reynolds group.

    Attributes
    ----------
    case : Case
        The case with the floor in force.
    group : str
        The Reynolds group that carries the floor.
    tolerance_floor : float
        The tolerance's answer [-].
    case_floor : float or None
        The group's own ``min`` in the case file [-].
    in_force : float
        The floor the solver applies: the larger of the two [-].
    changes_case : bool
        Whether the tolerance raises the floor the case already had.
    exact : bool
        Whether the case keeps the group exactly (then no floor below the prototype's value
        changes anything).
    """

    case: Case
    group: str
    tolerance_floor: float
    case_floor: float | None
    in_force: float
    changes_case: bool
    exact: bool = False

    def outcome(self, evaluation: Evaluation | None) -> str:
        """One sentence: the floor in force, and whether it changed the design."""
        head = f"{self.group} >= {self.in_force:.4g}"
        if self.exact:
            return (
                f"{head}: the case keeps '{self.group}' exactly, at the prototype's value; "
                "the floor changes nothing"
            )
        if not self.changes_case:
            return (
                f"{head}, the case's own floor; the tolerance's {self.tolerance_floor:.4g} is "
                "lower and changes nothing"
            )
        if evaluation is None:
            return f"{head}, the tolerance's floor (no design satisfies every limit with it)"
        lim = evaluation.worst_limits().get(f"{self.group}.min")
        if lim is not None and not lim[1].binding:
            return (
                f"{head}, the tolerance's floor; it does not bind at the optimum, so the "
                "design is the one the case gives without it"
            )
        return f"{head}, the tolerance's floor; it binds and sets the design"

    def to_dict(self) -> dict[str, Any]:
        """Plain data (without the case)."""
        return {
            "group": self.group,
            "tolerance_floor": self.tolerance_floor,
            "case_floor": self.case_floor,
            "in_force": self.in_force,
            "changes_case": self.changes_case,
            "exact": self.exact,
        }


def apply_tolerance(case: Case, tol: Tolerance) -> ReynoldsFloor:
    """The case with the tolerance's Reynolds number as a floor on its Reynolds group.

    The tolerance is on the length of the case's Reynolds group, so it is that group's floor
    as it stands; the group's own ``min`` stays when it is higher. A case without a Reynolds
    group gets one of weight zero on the tolerance's length.
    """
    from compromise.physics.groups import BUILTIN_GROUPS

    g = _reynolds_group(case)
    if g is not None:
        in_force = max(g.min or 0.0, tol.reynolds_min)
        new = dataclasses.replace(g, min=in_force)
        changes = g.min is None or tol.reynolds_min > g.min
        floor = ReynoldsFloor(
            dataclasses.replace(case, groups={**case.groups, g.name: new}),
            g.name,
            tol.reynolds_min,
            g.min,
            in_force,
            changes and not g.exact,
            g.exact,
        )
        return floor
    tree = ex.substitute(
        ex.parse(BUILTIN_GROUPS["reynolds"].expression), {"L": ex.parse(tol.length)}
    )
    new = Group(
        name="reynolds",
        expression=tree,
        text=ex.to_text(tree),
        weight=0.0,
        min=tol.reynolds_min,
        builtin=True,
        power=ex.power_product(tree),
    )
    return ReynoldsFloor(
        dataclasses.replace(case, groups={**case.groups, "reynolds": new}),
        "reynolds",
        tol.reynolds_min,
        None,
        tol.reynolds_min,
        True,
    )
