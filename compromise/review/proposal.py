"""Review a proposed design: the account `solve` gives, what it breaks, how far from the best.

In a design review the question is often "the laboratory proposes 1:40 with a distortion of 4 in
warm water: is that acceptable, what does it break, and how far is it from the best?".
:func:`evaluate` answers it for any design, feasible or not: the groups and mismatches of every
condition, the limits with their margins, every violated limit or ``[model]`` bound with its
amount in the bound's own unit, the scale effects, and the distance from the optimum (both
objectives, their ratio, and the groups and limits that make the difference, largest first).
:func:`design_from_spec` completes what the user wrote with the case's defaults and says which.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field
from typing import Any

from compromise.casefile.designs import DesignSpec
from compromise.casefile.model import Case
from compromise.errors import CaseError
from compromise.review.effects import Effects, assess
from compromise.review.wording import caution_line
from compromise.solving.design import Design, Evaluation, evaluate_design
from compromise.solving.optimum import find_optimum
from compromise.solving.result import Solution
from compromise.solving.scales import design_by_rule
from compromise.units import format_ratio, to_celsius

NOISE = 1e-12  # [-] objectives and contributions below this are zero, not a result
RATIO_TOL = (
    1e-9  # [-] relative slack on [model] bounds (a ratio written "1:40" is not 1/40.0000001)
)


@dataclass(frozen=True)
class Violation:
    """A limit or ``[model]`` bound the design breaks.

    Attributes
    ----------
    key : str
        Case-file key of the bound (``limits.discharge.max``, ``model.horizontal_ratio.min``,
        ``groups.froude.exact``).
    condition : str or None
        The condition where it is broken worst (None for bounds on the design itself).
    bound, value : float or None
        The bound and the design's value, in ``unit`` [SI; ratios model/prototype; degC].
    excess : float or None
        How far the value lies beyond the bound, in ``unit`` (positive).
    margin : float or None
        Fractional slack, negative [-] (for a kept group: its log-mismatch).
    unit : str
    text : str
        One line for people.
    """

    key: str
    condition: str | None
    bound: float | None
    value: float | None
    excess: float | None
    margin: float | None
    unit: str
    text: str

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "key": self.key,
            "condition": self.condition,
            "bound": self.bound,
            "value": self.value,
            "excess": self.excess,
            "margin": self.margin,
            "unit": self.unit,
            "text": self.text,
        }


@dataclass(frozen=True)
class Difference:
    """What separates the proposal from the optimum on one group or limit.

    For a group, ``proposal`` and ``optimum`` are its weighted squared log-mismatches summed
    over conditions [-] and ``contribution`` their difference (its share of the objective gap).
    For a limit they are the fractional margins in the worst condition [-] and
    ``contribution`` is zero: a limit explains the gap by binding in one design and not in
    the other, which ``text`` says.
    """

    key: str
    proposal: float
    optimum: float
    contribution: float
    text: str

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "key": self.key,
            "proposal": self.proposal,
            "optimum": self.optimum,
            "contribution": self.contribution,
            "text": self.text,
        }


@dataclass(frozen=True)
class DesignReview:
    """A proposed design reviewed against its case.

    Attributes
    ----------
    design : Design
    evaluation : Evaluation
        Groups, quantities and limits in every condition.
    effects : Effects
        Regimes, threshold checks with sources, consequences.
    violations : tuple of Violation
        Every broken limit and ``[model]`` bound (empty when the design holds).
    optimum : Solution
        The case's optimum (without alternatives), for the distance.
    differences : tuple of Difference
        Groups and limits that separate the proposal from the optimum, largest first.
    notes : tuple of str
        The defaults used and the velocity rule, in words.
    label : str
        How the user named the design.
    """

    case: Case = field(repr=False)
    design: Design
    evaluation: Evaluation
    effects: Effects
    violations: tuple[Violation, ...]
    optimum: Solution
    differences: tuple[Difference, ...]
    notes: tuple[str, ...] = ()
    label: str = ""

    @property
    def objective(self) -> float:
        """The proposal's weighted sum of squared log-mismatches [-] (noise shown as 0)."""
        value = self.evaluation.objective
        return 0.0 if abs(value) < NOISE else value

    @property
    def holds(self) -> bool:
        """Whether every limit and ``[model]`` bound holds."""
        return not self.violations

    @property
    def objective_ratio(self) -> float | None:
        """Proposal objective over the optimum's (None when the optimum is 0 or infeasible)."""
        best = self.optimum.objective if self.optimum.feasible else math.inf
        if not math.isfinite(best) or best < NOISE:
            return None
        return self.objective / best

    def to_dict(self) -> dict[str, Any]:
        """Plain data: the account of ``solve --json`` for this design, plus ``violations``,
        ``optimum``, ``objective_ratio`` and ``differences``."""
        ev = self.evaluation
        first = ev.conditions[0]
        worst = ev.worst_limits()
        opt = self.optimum
        out: dict[str, Any] = {
            "title": self.case.title,
            "status": "holds" if self.holds else "violates",
            "caution": caution_line(),
            "label": self.label,
            "notes": list(self.notes),
            "objective": self.objective,
            "design": self.design.to_dict(),
            "groups": {k: v.to_dict() for k, v in first.groups.items()},
            "limits": {k: {**v.to_dict(), "condition": c} for k, (c, v) in worst.items()},
            "quantities": {k: v.to_dict() for k, v in first.quantities.items()},
            "violations": [v.to_dict() for v in self.violations],
            "optimum": {
                "status": opt.status,
                "objective": (0.0 if abs(opt.objective) < NOISE else opt.objective)
                if opt.feasible
                else None,
                "design": opt.design.to_dict() if opt.design else None,
            },
            "objective_ratio": self.objective_ratio,
            "differences": [d.to_dict() for d in self.differences],
        }
        if len(ev.conditions) > 1:
            out["conditions"] = {c.name: c.to_dict() for c in ev.conditions}
        out["effects"] = self.effects.to_dict()
        return out

    def to_frame(self) -> Any:
        """The groups of every condition as a pandas DataFrame."""
        import pandas as pd

        rows = [
            {"condition": c.name, "group": name, **g.to_dict()}
            for c in self.evaluation.conditions
            for name, g in c.groups.items()
        ]
        return pd.DataFrame(rows)


# --------------------------------------------------------------------------------------------
# a design from what the user wrote


def design_from_spec(case: Case, spec: DesignSpec) -> tuple[Design, tuple[str, ...]]:
    """Complete a proposed design with the case's defaults; returns it and the notes saying
    which defaults were used.

    Defaults: the case's first model fluid, at the lowest temperature (and pressure) the case
    allows; undistorted unless a vertical ratio or a distortion is given; the velocity ratio
    from the case's exact group (else Froude).
    """
    notes: list[str] = []
    fluid = spec.fluid
    if fluid is None:
        fluid = case.model.fluids[0]
        notes.append(f"model fluid {fluid}: the case's first model fluid")
    temperature = spec.temperature
    if temperature is None:
        temperature = case.model.temperature[0]
        notes.append(
            f"model temperature {to_celsius(temperature):.1f} degC: the lowest the case allows"
        )
    pressure = case.model.pressure[0] if spec.pressure is None else spec.pressure
    lo_p, hi_p = case.model.pressure
    if spec.pressure is None and hi_p > lo_p:
        notes.append(f"model pressure {pressure:.6g} Pa: the lowest the case allows")
    if spec.vertical is not None and spec.distortion is not None:
        raise CaseError("give a vertical ratio or a distortion, not both", key="--distortion")
    vertical = spec.vertical
    if vertical is None and spec.distortion is not None:
        vertical = spec.ratio * spec.distortion
    velocity = spec.velocity
    if velocity is None and not _has_velocity_law(case):
        velocity = _least_mismatch_velocity(
            case, spec.ratio, vertical or spec.ratio, fluid, temperature, pressure
        )
        notes.append(
            f"velocity ratio {format_ratio(velocity)}: the least weighted mismatch for these "
            "length ratios and this fluid (the case keeps no group exactly)"
        )
    design, rule = design_by_rule(
        case,
        spec.ratio,
        vertical=vertical,
        velocity=velocity,
        fluid=fluid,
        temperature=temperature,
        pressure=pressure,
    )
    if velocity is None or isinstance(velocity, str):
        notes.append(f"velocity ratio {format_ratio(design.velocity_ratio)}: {rule}")
    if case.sediment is not None:
        material, grain = spec.material, spec.grain_size
        if material is None or grain is None:
            from compromise.solving.granular import grain_for_ratios

            material, grain, _ = grain_for_ratios(
                case, design.fluid, design.temperature, design.pressure, design.logs
            )
            notes.append(
                f"model material {material}, grain size {grain * 1e3:.4g} mm: the least "
                "weighted mismatch for these ratios and this fluid"
            )
        design = dataclasses.replace(design, material=material, grain_size=grain)
    return design, tuple(notes)


def _has_velocity_law(case: Case) -> bool:
    """Whether the case names a velocity law: a kept (exact) group or a Froude group."""
    return "froude" in case.groups or any(g.exact for g in case.groups.values())


def _least_mismatch_velocity(
    case: Case, ratio: float, vertical: float, fluid: str, temperature: float, pressure: float
) -> float:
    """The velocity ratio with the least weighted mismatch for given lengths and fluid state.

    With the lengths and the fluid fixed, every power-product group's log-mismatch is affine
    in ``v = ln V``, so the weighted sum of squares is a parabola in ``v`` whose minimum is
    closed-form (limits are not imposed: a proposal is reviewed, not optimised).
    """
    import numpy as np

    from compromise.solving.design import property_log_ratios
    from compromise.solving.problem import build_problem

    pr = build_problem(case)
    p = np.nan_to_num(property_log_ratios(case, fluid, temperature, pressure))
    a_v = pr.A[:, 2]
    rest = pr.A[:, 0] * math.log(ratio) + pr.A[:, 1] * math.log(vertical) + pr.B @ p
    den = float(np.sum(pr.W * a_v**2))
    if den <= 0:
        raise CaseError(
            "no weighted group involves velocity; give the velocity ratio", key="--velocity"
        )
    return math.exp(-float(np.sum(pr.W * a_v * rest)) / den)


# --------------------------------------------------------------------------------------------
# violations


def _limit_unit(case: Case, quantity: str) -> str:
    q = case.quantities.get(quantity)
    return q.unit if q is not None else "-"


def _limit_violations(case: Case, ev: Evaluation) -> list[Violation]:
    out = []
    for key, (cond, v) in ev.worst_limits().items():
        if not v.violated:
            continue
        unit = _limit_unit(case, v.quantity)
        excess = v.model - v.bound if v.kind == "max" else v.bound - v.model
        section = "limits" if v.quantity in case.quantities else "groups"
        threshold = case.groups.get(v.quantity)
        if threshold is not None and threshold.threshold:
            section = "phenomena"  # a threshold held as a bound (a facility's, or enforced)
        where = f" in condition '{cond}'" if cond else ""
        word = "above its maximum" if v.kind == "max" else "below its minimum"
        shown = "" if unit == "-" else f" {unit}"
        out.append(
            Violation(
                f"{section}.{key}",
                cond,
                v.bound,
                v.model,
                excess,
                v.margin,
                unit,
                f"{section}.{key}: model {v.quantity} {v.model:.4g}{shown} is {excess:.4g}{shown} "
                f"{word} {v.bound:.4g}{shown} ({100 * v.margin:+.1f} %){where}",
            )
        )
    return out


def _exact_violations(case: Case, ev: Evaluation) -> list[Violation]:
    out = []
    for c in ev.conditions:
        for name, g in c.groups.items():
            if not g.exact or g.by_construction or abs(g.mismatch) <= 1e-9:
                continue
            if any(v.key == f"groups.{name}.exact" for v in out):
                continue
            out.append(
                Violation(
                    f"groups.{name}.exact",
                    c.name,
                    g.prototype,
                    g.model,
                    abs(g.model - g.prototype),
                    g.mismatch,
                    "-",
                    f"groups.{name}.exact: kept exactly by the case, but the model value is "
                    f"{math.exp(g.mismatch):.4g} times the prototype's "
                    f"({100 * math.expm1(g.mismatch):+.1f} %) in condition '{c.name}'",
                )
            )
    return out


def _range_violation(
    key: str, value: float, lo: float, hi: float, *, unit: str, shown: Any
) -> Violation | None:
    if value < lo * (1 - RATIO_TOL):
        bound, excess, word = lo, lo - value, "below its minimum"
    elif value > hi * (1 + RATIO_TOL):
        bound, excess, word = hi, value - hi, "above its maximum"
    else:
        return None
    margin = (value - bound) / bound if word.startswith("below") else (bound - value) / bound
    return Violation(
        key,
        None,
        bound,
        value,
        excess,
        margin,
        unit,
        f"{key}: {shown(value)} is {word} {shown(bound)}",
    )


def _model_violations(case: Case, d: Design) -> list[Violation]:
    m = case.model
    found = [
        _range_violation(
            "model.horizontal_ratio",
            d.horizontal_ratio,
            *m.horizontal_ratio,
            unit="ratio",
            shown=format_ratio,
        ),
        _range_violation(
            "model.distortion", d.distortion, *m.distortion, unit="-", shown=lambda v: f"{v:.4g}"
        ),
    ]
    if m.velocity_ratio is not None:
        found.append(
            _range_violation(
                "model.velocity_ratio",
                d.velocity_ratio,
                *m.velocity_ratio,
                unit="ratio",
                shown=format_ratio,
            )
        )
    lo, hi = m.temperature
    if not lo - 1e-9 <= d.temperature <= hi + 1e-9:
        t, bound = to_celsius(d.temperature), to_celsius(lo if d.temperature < lo else hi)
        word = "below its minimum" if d.temperature < lo else "above its maximum"
        found.append(
            Violation(
                "model.temperature",
                None,
                bound,
                t,
                abs(t - bound),
                None,
                "degC",
                f"model.temperature: {t:.1f} degC is {abs(t - bound):.1f} K {word} "
                f"{bound:.1f} degC",
            )
        )
    if d.fluid not in m.fluids:
        found.append(
            Violation(
                "model.fluids",
                None,
                None,
                None,
                None,
                None,
                "-",
                f"model.fluids: {d.fluid} is not among the case's model fluids "
                f"({', '.join(m.fluids)})",
            )
        )
    return [v for v in found if v is not None]


# --------------------------------------------------------------------------------------------
# distance from the optimum


def _group_terms(ev: Evaluation) -> dict[str, float]:
    terms: dict[str, float] = {}
    for c in ev.conditions:
        for name, g in c.groups.items():
            if g.exact:
                continue
            terms[name] = terms.get(name, 0.0) + c.weight * g.weight * g.mismatch**2
    return terms


def _differences(ev: Evaluation, best: Evaluation | None) -> tuple[Difference, ...]:
    if best is None:
        return ()
    mine, theirs = _group_terms(ev), _group_terms(best)
    out = []
    for name in mine:
        a, b = mine[name], theirs.get(name, 0.0)
        a, b = (0.0 if abs(a) < NOISE else a), (0.0 if abs(b) < NOISE else b)
        gap = a - b
        if abs(gap) < NOISE:
            continue
        worse = "adds" if gap > 0 else "saves"
        out.append(
            Difference(
                f"groups.{name}",
                a,
                b,
                gap,
                f"groups.{name}: weighted mismatch {a:.4g} against {b:.4g} at the optimum "
                f"({worse} {abs(gap):.4g})",
            )
        )
    out.sort(key=lambda d: (-abs(d.contribution), d.key))
    limits = []
    theirs_l = best.worst_limits()
    for key, (_, v) in ev.worst_limits().items():
        if key not in theirs_l:
            continue
        w = theirs_l[key][1]
        if v.binding == w.binding:
            continue
        if not w.binding:
            text = (
                f"limits.{key}: binds in the proposal, the optimum leaves {100 * w.margin:+.1f} %"
            )
        elif v.violated:
            text = (
                f"limits.{key}: binds at the optimum, the proposal breaks it "
                f"({100 * v.margin:+.1f} %)"
            )
        else:
            text = (
                f"limits.{key}: binds at the optimum, the proposal leaves {100 * v.margin:+.1f} %"
            )
        limits.append(Difference(f"limits.{key}", v.margin, w.margin, 0.0, text))
    limits.sort(key=lambda d: (-abs(d.proposal - d.optimum), d.key))
    return tuple(out + limits)


def evaluate(
    case: Case,
    design: Design,
    *,
    notes: tuple[str, ...] = (),
    label: str = "",
    optimum: Solution | None = None,
) -> DesignReview:
    """Review a design against its case: the account of ``solve``, violations, distance.

    Parameters
    ----------
    case : Case
    design : Design
        Any design, inside the case's bounds or not.
    notes : tuple of str
        Defaults used to complete it (from :func:`design_from_spec`).
    label : str
        How the user named it.
    optimum : Solution, optional
        The case's optimum when already known (it is solved otherwise).

    Returns
    -------
    DesignReview
    """
    ev = evaluate_design(case, design)
    effects = assess(case, ev)
    violations = (
        _model_violations(case, design) + _exact_violations(case, ev) + _limit_violations(case, ev)
    )
    opt = optimum if optimum is not None else find_optimum(case, alternatives=False)
    diffs = _differences(ev, opt.evaluation)
    return DesignReview(
        case, design, ev, effects, tuple(violations), opt, diffs, notes, label or design.label()
    )
