"""The axes of a trade-off front, as linear forms in the log-ratios.

An axis is something to keep small: a group's absolute log-mismatch, the weighted total
mismatch, a model quantity (its value in the condition with the largest prototype value), the
plan area (reach or length times width) or the distortion. For one model fluid state, with
``y = (ln X, ln Y, ln V)`` and the property log-ratios ``p`` fixed
(:mod:`compromise.solving.problem`), a
group's log-mismatch is ``a.y + b.p`` and the log of a model quantity is ``a.y + b.p + c0``:
linear, so a bound on either is one or two linear rows. A quantity's own laboratory maximum (and
the distortion's ``[model]`` maximum) can be lifted, so that a front shows what relaxing it
would buy.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field

import numpy as np

from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.explore.envelope import StateSpace
from compromise.physics.scaling import N_DECISION
from compromise.solving.grid import FluidStates
from compromise.solving.problem import PROPERTY_NAMES, Problem, build_problem, group_exponents

LINEAR = ("quantity", "plan_area", "distortion")


@dataclass(frozen=True)
class Axis:
    """One axis of a front: what it measures, and its linear form in ``(y, p)``.

    Attributes
    ----------
    name : str
        As given (a group, ``total``, a quantity, ``plan_area`` or ``distortion``).
    kind : str
        ``"total"``, ``"group"``, ``"quantity"``, ``"plan_area"`` or ``"distortion"``.
    label, unit : str
        For tables and plots (``"model discharge"``, ``"m^3/s"``).
    a, b, c0 :
        A group's log-mismatch is ``a.y + b.p``; a linear axis's log value is
        ``a.y + b.p + c0``.
    lifted : tuple of int
        Rows of the problem that the axis replaces (its own laboratory maxima).
    case_bound : float or None
        The case's bound on the axis value, when a row was lifted [axis unit].
    """

    name: str
    kind: str
    label: str
    unit: str
    a: np.ndarray = field(repr=False)
    b: np.ndarray = field(repr=False)
    c0: float = 0.0
    lifted: tuple[int, ...] = ()
    case_bound: float | None = None

    @property
    def linear(self) -> bool:
        """Whether the axis is a model quantity (its log is linear in ``y``)."""
        return self.kind in LINEAR

    def values(self, problem: Problem, y: np.ndarray, p: np.ndarray) -> np.ndarray:
        """The axis value at decision log-ratios ``y`` (N, 3) and property log-ratios (N, 6)."""
        if self.kind == "total":
            r = y @ problem.A.T + p @ problem.B.T
            return np.sum(problem.W * r**2, axis=1)
        lin = y @ self.a + p @ self.b
        return np.abs(lin) if self.kind == "group" else np.exp(lin + self.c0)

    def constraint_value(self, v: np.ndarray) -> np.ndarray:
        """The value in the space of the epsilon rows: ``|r|`` or ``ln(quantity)``."""
        return np.log(v) if self.linear else v


def _quantity_row(case: Case, name: str) -> tuple[np.ndarray, float, str]:
    q = case.quantities[name]
    vals = np.array([case.values(i)[name] for i in range(len(case.conditions))])
    i = int(np.argmax(vals))
    where = case.conditions[i].name if np.any(vals != vals[0]) else ""
    return q.scaling, math.log(vals[i]), where


def _axis(case: Case, problem: Problem, name: str, lift: bool) -> Axis:
    nd = N_DECISION
    zero3, zero6 = np.zeros(nd), np.zeros(len(PROPERTY_NAMES))
    key = f"axis '{name}'"
    kind, _, rest = name.partition(":")
    if rest and kind in ("group", "quantity"):
        name = rest
    else:
        kind = ""
        if name in case.groups and name in case.quantities:
            raise CaseError(
                f"'{name}' is both a group and a quantity; write group:{name} or quantity:{name}",
                key=key,
            )
    if name == "total" and not kind:
        if problem.A.shape[0] == 0:
            raise CaseError(
                "the case has no weighted group, so the total mismatch is always 0",
                file=case.path,
                key=key,
            )
        return Axis("total", "total", "weighted mismatch", "-", zero3, zero6)
    if name in case.groups and kind in ("", "group"):
        g = case.groups[name]
        if g.power is None:
            raise CaseError(
                f"group '{name}' is not a power product; trade-off fronts need "
                "mismatches that are linear in the log-ratios",
                file=case.path,
                key=f"groups.{name}",
            )
        if g.exact:
            raise CaseError(
                f"group '{name}' is kept exactly (exact = true): its mismatch is always 0",
                file=case.path,
                key=f"groups.{name}",
            )
        s = group_exponents(case, g)
        return Axis(name, "group", f"{name} mismatch |ln(model/prototype)|", "-", s[:nd], s[nd:])
    rows = problem.rows
    if name == "plan_area" and not kind:
        length = next((n for n in ("reach", "length") if n in case.quantities), None)
        if length is None or "width" not in case.quantities:
            raise CaseError(
                "plan_area needs a quantity named 'reach' or 'length' and one named 'width'",
                file=case.path,
                key=key,
            )
        s1, c1, _ = _quantity_row(case, length)
        s2, c2, _ = _quantity_row(case, "width")
        s = s1 + s2
        lifted = [
            i
            for i, r in enumerate(rows)
            if r.kind == "limit" and r.name in (length, "width") and r.side == "max"
        ]
        bound = None
        if len(lifted) == 2:
            bound = math.prod(rows[i].bound for i in lifted)
        return Axis(
            "plan_area",
            "plan_area",
            f"model plan area ({length} x width)",
            "m^2",
            s[:nd],
            s[nd:],
            c1 + c2,
            tuple(lifted) if lift else (),
            bound,
        )
    if name == "distortion" and not kind:
        lo, hi = case.model.distortion
        if hi <= lo:
            raise CaseError(
                f"the case fixes the distortion at {lo:g}", file=case.path, key="model.distortion"
            )
        lifted = [
            i
            for i, r in enumerate(rows)
            if r.kind == "bound" and r.name == "distortion" and r.side == "max"
        ]
        return Axis(
            "distortion",
            "distortion",
            "distortion (vertical / horizontal ratio)",
            "-",
            np.array([-1.0, 1.0, 0.0]),
            zero6,
            0.0,
            tuple(lifted) if lift else (),
            hi,
        )
    if name in case.quantities and kind in ("", "quantity"):
        s, c0, where = _quantity_row(case, name)
        q = case.quantities[name]
        lifted = [
            i
            for i, r in enumerate(rows)
            if r.kind == "limit" and r.name == name and r.side == "max"
        ]
        bound = rows[lifted[0]].bound if lifted else None
        label = f"model {name}" + (f" ({where})" if where else "")
        return Axis(
            name,
            "quantity",
            label,
            q.unit,
            s[:nd],
            s[nd:],
            c0,
            tuple(lifted) if lift else (),
            bound,
        )
    known = ["total", *case.groups, *case.quantities, "distortion"]
    if "width" in case.quantities and ("reach" in case.quantities or "length" in case.quantities):
        known.append("plan_area")
    raise CaseError(
        f"unknown axis {name!r}; expected one of: {', '.join(known)}",
        file=case.path,
        key="--between",
    )


def axes_for(
    case: Case, names: list[str] | tuple[str, ...], *, lift: bool = True
) -> tuple[Problem, list[Axis]]:
    """The case's problem (with lifted rows removed) and the :class:`Axis` of every name."""
    if len(names) not in (2, 3):
        raise CaseError(f"expected two or three axes, got {len(names)}", key="--between")
    if len(set(names)) != len(names):
        raise CaseError(f"an axis is given twice: {', '.join(names)}", key="--between")
    problem = build_problem(case)
    if problem.nonlinear_groups:
        raise CaseError(
            f"group '{problem.nonlinear_groups[0]}' is not a power product; the "
            "trade-off tools need every group to be one",
            file=case.path,
            key=f"groups.{problem.nonlinear_groups[0]}",
        )
    axes = [_axis(case, problem, n, lift) for n in names]
    drop = sorted({i for ax in axes for i in ax.lifted})
    if drop:
        keep = [i for i in range(len(problem.rows)) if i not in drop]
        problem = dataclasses.replace(
            problem,
            G=problem.G[keep],
            h0=problem.h0[keep],
            P=problem.P[keep],
            rows=tuple(problem.rows[i] for i in keep),
        )
    return problem, axes


def state_spaces(case: Case, problem: Problem, axes: list[Axis]) -> list[StateSpace]:
    """A :class:`StateSpace` per candidate fluid, with every property the axes need."""
    used = set(problem.used_properties)
    for ax in axes:
        used.update(PROPERTY_NAMES[i] for i in np.flatnonzero(ax.b))
    return [StateSpace(FluidStates(case, f, frozenset(used))) for f in case.model.fluids]
