"""The solver's answer as frozen dataclasses, and the small helpers every solve path shares.

:mod:`compromise.solving.optimum` (the exact convex path) and :mod:`compromise.solving.nonlinear`
(the fallback for groups that are not power products) both build their answers from here, so
neither imports the other's internals.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any

from compromise.casefile.model import Case
from compromise.solving.design import Design, Evaluation
from compromise.solving.diagnose import Conflict
from compromise.solving.grid import State

RELAXATION = 0.10  # "what a binding limit costs": relax it by 10 %

#: Objectives, costs and multipliers smaller than this are numerical noise and are reported as
#: 0 [-]. A weighted squared log-mismatch of 1e-9 is a 0.003 % mismatch of a group of weight 1,
#: thirty times below the 0.1 % the tables print; the solver's own residuals (the tie-break
#: regularisation, the property splines) are far below it.
NOISE = 1e-9
#: Relative part of the tolerance within which two objectives are tied [-] (the tie-break
#: regularisation toward the largest model moves an objective by about 1e-10 of its size).
TIE_REL = 1e-8
#: An estimate ``multiplier x ln(1.1)`` and the re-solved drop agree when they differ by less
#: than this share of the larger [-]; beyond it the curvature alone cannot explain the gap.
AGREEMENT = 0.10


def denoise(value: float) -> float:
    """``value`` with numerical noise reported as 0 (``abs(value) < NOISE``); inf and nan stay.

    Examples
    --------
    >>> denoise(1.4e-20), denoise(0.25), denoise(-3e-12)
    (0.0, 0.25, 0.0)
    """
    return 0.0 if math.isfinite(value) and abs(value) < NOISE else float(value)


def tied(a: float, b: float) -> bool:
    """Whether two objectives are equal within the solver's noise (``NOISE`` + ``TIE_REL``).

    Examples
    --------
    >>> tied(1.4e-20, 8.3e-18), tied(99.85, 99.95), tied(math.inf, math.inf)
    (True, False, False)
    """
    if not (math.isfinite(a) and math.isfinite(b)):
        return False
    return abs(a - b) <= NOISE + TIE_REL * max(abs(a), abs(b))


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
    #: ``""`` when the estimate and the re-solve agree; ``"degenerate"`` when other binding
    #: rows hold the design too (the multipliers are not unique and relaxing this row alone
    #: gains nothing); ``"non-smooth"`` when, within the 10 %, the set of binding rows changes
    #: (this row stops binding or another starts to) or the best fluid or temperature changes.
    #: Set by :func:`explain_costs`.
    note: str = ""

    @property
    def estimate_holds(self) -> bool:
        """Whether the first-order estimate may be read as the cost (else use ``drop``)."""
        return self.note == ""

    def to_dict(self) -> dict[str, Any]:
        """Plain data; noise below :data:`NOISE` is 0 (a multiplier whose estimate is noise
        is noise too)."""
        estimate = denoise(self.estimate)
        return {
            "condition": self.condition,
            "multiplier": denoise(self.multiplier) if estimate else 0.0,
            "estimate": estimate,
            "drop": denoise(self.drop),
            "relaxed_bound": self.relaxed_bound,
            "note": self.note,
        }


def explain_costs(costs: Mapping[str, BindingCost]) -> dict[str, BindingCost]:
    """The binding costs with :attr:`BindingCost.note` set where estimate and re-solve disagree.

    The estimate ``multiplier x ln(1.1)`` is a first-order (tangent) prediction; it holds when
    the optimum moves smoothly with the bound. It fails in two ways: several binding rows hold
    the design at once, so the multipliers are not unique and relaxing one row alone gains
    nothing (degenerate); or, within the 10 %, the active set (this row stops binding, or
    another starts to), the fluid or the temperature changes, so the gain is not the tangent's
    (non-smooth). Either way the re-solved drop is the figure.
    """
    out: dict[str, BindingCost] = {}
    for key, c in costs.items():
        est, drop = denoise(c.estimate), denoise(c.drop)
        note = ""
        if abs(est - drop) > NOISE + AGREEMENT * max(abs(est), abs(drop)):
            note = "degenerate" if drop == 0.0 and len(costs) > 1 else "non-smooth"
        out[key] = dataclasses.replace(c, note=note)
    return out


@dataclass(frozen=True)
class Alternative:
    """The best design under one restriction (one fluid, or one preferred ratio)."""

    kind: str  # "fluid" or "ratio"
    label: str
    design: Design | None
    objective: float  # inf when infeasible
    separator: str  # the group or limit that most separates it from the best design
    #: its objective equals the best design's within the noise (:func:`tied`); set by
    #: :func:`order_alternatives`
    tied: bool = False

    @property
    def feasible(self) -> bool:
        """Whether any design satisfies the case under this restriction."""
        return self.design is not None

    def to_dict(self) -> dict[str, Any]:
        """Plain data; an objective below :data:`NOISE` is 0."""
        return {
            "kind": self.kind,
            "label": self.label,
            "design": self.design.to_dict() if self.design else None,
            "objective": denoise(self.objective) if math.isfinite(self.objective) else None,
            "feasible": self.feasible,
            "tied": self.tied,
            "separator": self.separator,
        }


def order_alternatives(
    alternatives: Iterable[Alternative], case: Case, best: float = math.inf
) -> tuple[Alternative, ...]:
    """Alternatives from the least objective up; tied objectives keep the case's own order.

    Objectives that are :func:`tied` with the least of their run form one class, listed in the
    case's order: fluids as ``model.fluids`` lists them, then preferred ratios as
    ``model.preferred_ratios`` lists them. Infeasible alternatives come last, in the same order.
    Each alternative's ``tied`` says whether its objective equals ``best`` (the chosen design's).
    """
    from compromise.units import format_ratio

    fluids = list(case.model.fluids)
    ratios = [format_ratio(r) for r in case.model.preferred_ratios]
    materials = list(case.sediment.materials) if case.sediment is not None else []
    kinds = {"fluid": (0, fluids), "material": (1, materials)}

    def preference(a: Alternative) -> tuple[int, int, str]:
        order, names = kinds.get(a.kind, (2, ratios))
        rank = names.index(a.label) if a.label in names else len(names)
        return (order, rank, a.label)

    items = sorted(alternatives, key=lambda a: (a.objective, preference(a)))
    finite = [a for a in items if math.isfinite(a.objective)]
    out: list[Alternative] = []
    i = 0
    while i < len(finite):
        j = i + 1
        while j < len(finite) and tied(finite[i].objective, finite[j].objective):
            j += 1
        out += sorted(finite[i:j], key=preference)
        i = j
    out += sorted((a for a in items if not math.isfinite(a.objective)), key=preference)
    return tuple(dataclasses.replace(a, tied=tied(a.objective, best)) for a in out)


@dataclass(frozen=True)
class SedimentAnswer:
    """The granular material of the answer (a case with ``[sediment]``).

    Attributes
    ----------
    material : str
        The chosen model material (catalogue name).
    grain_size : float
        Model grain size [m].
    prototype_grain_size : float
        Prototype grain size [m] (the first condition's).
    relative_density : tuple of float
        ``R = rho_s / rho - 1`` of the prototype and of the model grains [-].
    shields : tuple of float or None
        Prototype and model Shields values [-] (a case with a ``shields`` group).
    critical_shields : tuple of float or None
        Critical Shields values of the prototype and model grains (Soulsby & Whitehouse
        1997) [-].
    hydraulic_time_ratio : float
        ``X / V`` [-].
    morphological_time_ratio : float or None
        Bed-change time ratio from Meyer-Peter & Mueller transport and the Exner equation
        [-]; None where a bed does not move.
    path : str
        How the answer was found (exact QP, rounds of the Shields floor).
    """

    material: str
    grain_size: float
    prototype_grain_size: float
    relative_density: tuple[float, float]
    shields: tuple[float, float] | None
    critical_shields: tuple[float, float] | None
    hydraulic_time_ratio: float
    morphological_time_ratio: float | None
    path: str

    def to_dict(self) -> dict[str, Any]:
        """Plain data (SI)."""

        def pair(v: tuple[float, float] | None) -> dict[str, float] | None:
            return None if v is None else {"prototype": v[0], "model": v[1]}

        return {
            "material": self.material,
            "grain_size": self.grain_size,
            "prototype_grain_size": self.prototype_grain_size,
            "grain_size_ratio": self.grain_size / self.prototype_grain_size,
            "relative_density": pair(self.relative_density),
            "shields": pair(self.shields),
            "critical_shields": pair(self.critical_shields),
            "hydraulic_time_ratio": self.hydraulic_time_ratio,
            "morphological_time_ratio": self.morphological_time_ratio,
            "path": self.path,
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
    #: the granular material's account (a case with ``[sediment]``), or None
    sediment: SedimentAnswer | None = None

    def __post_init__(self) -> None:
        # every solve path reports alternatives in one order (ties in the case's order) and
        # says where a binding cost's estimate does not hold
        object.__setattr__(
            self,
            "alternatives",
            order_alternatives(self.alternatives, self.case, self.objective),
        )
        object.__setattr__(self, "binding", explain_costs(self.binding))

    @property
    def feasible(self) -> bool:
        """Whether the case has a design that satisfies every limit."""
        return self.status == "optimal"

    def to_dict(self) -> dict[str, Any]:
        """Plain data: the optimum part of ``compromise solve --json`` (the review layer's
        :class:`~compromise.review.answer.Answer` adds the caution and the scale effects).
        Objectives and costs below :data:`NOISE` are 0."""
        out: dict[str, Any] = {"title": self.case.title, "status": self.status}
        if not self.feasible or self.evaluation is None or self.design is None:
            out["objective"] = None
            if self.conflict:
                out.update(self.conflict.to_dict())
                out["sides"] = {k: bound_side(self.case, k) for k in self.conflict.keys}
                out["labels"] = {k: bound_label(self.case, k) for k in self.conflict.keys}
            out["alternatives"] = [a.to_dict() for a in self.alternatives]
            return out
        ev = self.evaluation
        first = ev.conditions[0]
        worst = ev.worst_limits()
        out["objective"] = denoise(self.objective)
        out["design"] = self.design.to_dict()
        out["groups"] = {k: _quiet(v.to_dict()) for k, v in first.groups.items()}
        out["limits"] = {k: _quiet({**v.to_dict(), "condition": c}) for k, (c, v) in worst.items()}
        out["quantities"] = {k: v.to_dict() for k, v in first.quantities.items()}
        out["binding"] = {k: v.to_dict() for k, v in self.binding.items()}
        out["alternatives"] = [a.to_dict() for a in self.alternatives]
        if self.sediment is not None:
            out["sediment"] = self.sediment.to_dict()
        if len(ev.conditions) > 1:
            conditions = {c.name: c.to_dict() for c in ev.conditions}
            for c in conditions.values():
                for part in ("groups", "limits"):
                    c[part] = {k: _quiet(v) for k, v in c.get(part, {}).items()}
            out["conditions"] = conditions
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


def _quiet(item: dict[str, Any]) -> dict[str, Any]:
    """A group's or limit's plain data with numerical noise as nothing: a log-mismatch or a
    margin below :data:`NOISE` is 0 (and the factor 1), so a matched group reads +0 and a
    binding limit is not a hair outside its bound."""
    out = dict(item)
    if "mismatch" in out and isinstance(out["mismatch"], float):
        if abs(out["mismatch"]) < NOISE:
            out["mismatch"] = 0.0
            if "factor" in out:
                out["factor"] = 1.0
    if "margin" in out and isinstance(out["margin"], float) and abs(out["margin"]) < NOISE:
        out["margin"] = 0.0
    return out


def pick_state(states: list[State], case: Case) -> State:
    """The best state; among objectives :func:`tied` with the least, the fluid listed first in
    the case (the order :func:`order_alternatives` keeps)."""
    low = min(s.objective for s in states)
    best = [s for s in states if s.objective <= low or tied(s.objective, low)]
    return min(best, key=lambda s: case.model.fluids.index(s.fluid))


def bound_side(case: Case, key: str) -> str:
    """``"min"``, ``"max"`` or ``"exact"``: which side of a bound a conflict key names."""
    last = key.rsplit(".", 1)[-1]
    if last in ("min", "max", "exact"):
        return last
    if key.startswith("phenomena."):
        g = case.groups.get(key.removeprefix("phenomena."))
        return "max" if g is not None and g.max is not None else "min"
    return "exact"  # a ratio fixed by the case (model.distortion = 1)


def bound_label(case: Case, key: str) -> str:
    """A conflict key as the user wrote it; an enforced threshold (``phenomena.P.N``) as
    ``"phenomena.P: N >= 140"``."""
    if key.startswith("phenomena."):
        g = case.groups.get(key.removeprefix("phenomena."))
        if g is not None:
            phenomenon, _, name = g.name.partition(".")
            side = bound_side(case, key)
            value = g.min if side == "min" else g.max
            sign = ">=" if side == "min" else "<="
            return f"phenomena.{phenomenon}: {name} {sign} {value:g}"
    return key


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
    if diffs[g] <= NOISE:
        binding_alt = {k for k, (_, v) in alt.worst_limits().items() if v.binding}
        binding_best = {k for k, (_, v) in best.worst_limits().items() if v.binding}
        new = sorted(binding_alt - binding_best)
        return f"limits.{new[0]}" if new else ""
    return f"groups.{g}"
