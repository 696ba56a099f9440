"""The solver's answer as frozen dataclasses, and the small helpers every solve path shares.

:mod:`compromise.solving.optimum` (the exact convex path) and :mod:`compromise.solving.nonlinear`
(the fallback for groups that are not power products) both build their answers from here, so
neither imports the other's internals.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from compromise.casefile.model import Case
from compromise.solving.design import Design, Evaluation
from compromise.solving.diagnose import Conflict
from compromise.solving.grid import State

RELAXATION = 0.10  # "what a binding limit costs": relax it by 10 %


@dataclass(frozen=True)
class BindingCost:
    """What a binding row costs: the objective drop if its bound were relaxed by 10 %.

    Attributes
    ----------
    key : str
        Case-file key of the bound (``limits.discharge.max``).
    condition : str or None
        The condition in which it binds.
    multiplier : float
        Lagrange multiplier of the row in log space [-]: the objective falls by about
        ``multiplier x ln(1.1)`` for a 10 % relaxation.
    estimate : float
        ``multiplier x ln(1.1)`` [-].
    drop : float
        The objective drop found by re-solving with the relaxed bound [-].
    relaxed_bound : float
        The relaxed bound [SI].
    """

    key: str
    condition: str | None
    multiplier: float
    estimate: float
    drop: float
    relaxed_bound: float

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "condition": self.condition,
            "multiplier": self.multiplier,
            "estimate": self.estimate,
            "drop": self.drop,
            "relaxed_bound": self.relaxed_bound,
        }


@dataclass(frozen=True)
class Alternative:
    """The best design under one restriction (one fluid, or one preferred ratio)."""

    kind: str  # "fluid" or "ratio"
    label: str
    design: Design | None
    objective: float  # inf when infeasible
    separator: str  # the group or limit that most separates it from the best design

    @property
    def feasible(self) -> bool:
        """Whether any design satisfies the case under this restriction."""
        return self.design is not None

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "kind": self.kind,
            "label": self.label,
            "design": self.design.to_dict() if self.design else None,
            "objective": self.objective if math.isfinite(self.objective) else None,
            "feasible": self.feasible,
            "separator": self.separator,
        }


@dataclass(frozen=True)
class Solution:
    """The solver's answer for a case.

    Attributes
    ----------
    status : str
        ``"optimal"`` or ``"infeasible"``.
    objective : float
        Weighted sum of squared log-mismatches [-] (inf when infeasible).
    design : Design or None
    evaluation : Evaluation or None
        The design in every condition (groups, quantities, limits).
    binding : dict
        :class:`BindingCost` of every binding row, by case-file key.
    alternatives : tuple of Alternative
    conflict : Conflict or None
    """

    case: Case = field(repr=False)
    status: str
    objective: float
    design: Design | None
    evaluation: Evaluation | None
    binding: dict[str, BindingCost]
    alternatives: tuple[Alternative, ...]
    conflict: Conflict | None = None

    @property
    def feasible(self) -> bool:
        """Whether the case has a design that satisfies every limit."""
        return self.status == "optimal"

    def to_dict(self) -> dict[str, Any]:
        """Plain data: the optimum part of ``compromise solve --json`` (the review layer's
        :class:`~compromise.review.answer.Answer` adds the caution and the scale effects)."""
        out: dict[str, Any] = {"title": self.case.title, "status": self.status}
        if not self.feasible or self.evaluation is None or self.design is None:
            out["objective"] = None
            out.update(self.conflict.to_dict() if self.conflict else {})
            out["alternatives"] = [a.to_dict() for a in self.alternatives]
            return out
        ev = self.evaluation
        first = ev.conditions[0]
        worst = ev.worst_limits()
        out["objective"] = self.objective
        out["design"] = self.design.to_dict()
        out["groups"] = {k: v.to_dict() for k, v in first.groups.items()}
        out["limits"] = {k: {**v.to_dict(), "condition": c} for k, (c, v) in worst.items()}
        out["quantities"] = {k: v.to_dict() for k, v in first.quantities.items()}
        out["binding"] = {k: v.to_dict() for k, v in self.binding.items()}
        out["alternatives"] = [a.to_dict() for a in self.alternatives]
        if len(ev.conditions) > 1:
            out["conditions"] = {c.name: c.to_dict() for c in ev.conditions}
        return out

    def to_frame(self) -> Any:
        """The groups of every condition as a pandas DataFrame."""
        import pandas as pd

        if self.evaluation is None:
            return pd.DataFrame()
        rows = []
        for c in self.evaluation.conditions:
            for name, g in c.groups.items():
                rows.append({"condition": c.name, "group": name, **g.to_dict()})
        return pd.DataFrame(rows)


TIE = 1e-12  # [-] objectives closer than this (plus 1e-9 relative) count as equal


def pick_state(states: list[State], case: Case) -> State:
    """The best state; among equal objectives, the fluid listed first in the case."""
    low = min(s.objective for s in states)
    tied = [s for s in states if s.objective <= low + TIE + 1e-9 * abs(low)]
    return min(tied, key=lambda s: case.model.fluids.index(s.fluid))


def design_of(state: State) -> Design:
    x, z, v = (math.exp(float(a)) for a in state.y)
    return Design(state.fluid, state.temperature, state.pressure, x, z, v)


def what_separates(case: Case, best: Evaluation | None, alt: Evaluation) -> str:
    """The group whose weighted mismatch grows most from the best design to an alternative,
    or the limit that binds in the alternative only."""
    if best is None:
        return ""
    diffs: dict[str, float] = {}
    for cb, ca in zip(best.conditions, alt.conditions, strict=True):
        for g, gv in ca.groups.items():
            if gv.exact:
                continue
            d = cb.weight * gv.weight * (gv.mismatch**2 - cb.groups[g].mismatch ** 2)
            diffs[g] = diffs.get(g, 0.0) + d
    if not diffs:
        return ""
    g = max(diffs, key=lambda k: (diffs[k], k))
    if diffs[g] <= 1e-12:
        binding_alt = {k for k, (_, v) in alt.worst_limits().items() if v.binding}
        binding_best = {k for k, (_, v) in best.worst_limits().items() if v.binding}
        new = sorted(binding_alt - binding_best)
        return f"limits.{new[0]}" if new else ""
    return f"groups.{g}"
