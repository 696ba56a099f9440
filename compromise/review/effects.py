"""Scale effects: what the unmatched groups do, judged against published thresholds.

* :func:`check_thresholds` applies the thresholds of the phenomena a case names
  (:mod:`compromise.physics.thresholds`) in every condition: pass, marginal or fail, with margins.
* :func:`~compromise.review.regimes.regimes` classifies prototype and model flow for every
  group (laminar, transitional or turbulent smooth / rough; sub- or supercritical; capillary or
  gravity waves; incompressible or compressible). A regime change is the main risk.
* :func:`~compromise.review.consequences.consequences` quantifies the remaining bias in
  prototype terms (friction, Manning n, the ITTC-1957 line).
* :func:`~compromise.review.tolerance.reynolds_tolerance` finds the smallest model Reynolds
  number that keeps the bias of a friction-controlled quantity inside a tolerance.

:func:`assess` puts them together for one design, risks first.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field
from typing import Any

from compromise import expressions as ex
from compromise.casefile.model import Case, Group
from compromise.physics.thresholds import (
    DESIGN_NAMES,
    FACILITY_NAMES,
    THRESHOLDS,
    Threshold,
    thresholds_for,
)
from compromise.review.consequences import Consequence, consequences
from compromise.review.context import condition_environments, evaluate_text
from compromise.review.regimes import Regime, regimes
from compromise.review.tolerance import (
    ReynoldsFloor,
    Tolerance,
    apply_tolerance,
    reynolds_tolerance,
)
from compromise.review.wording import TAG_LEGEND
from compromise.solving.design import Evaluation

VERDICTS = ("pass", "marginal", "fail")


@dataclass(frozen=True)
class ThresholdCheck:
    """One threshold checked in one condition.

    ``margin`` is ``ln(model / passing)`` for a floor and ``ln(passing / model)`` for a ceiling:
    positive on the safe side, negative where the check is not passed.
    """

    threshold: Threshold
    condition: str
    prototype: float
    model: float
    verdict: str
    margin: float

    def to_dict(self) -> dict[str, Any]:
        """Plain data, with the threshold's source."""
        t = self.threshold
        return {
            "phenomenon": t.phenomenon,
            "name": t.name,
            "label": t.label,
            "condition": self.condition,
            "prototype": self.prototype,
            "model": self.model,
            "kind": t.kind,
            "failing": t.failing,
            "passing": t.passing,
            "unit": t.unit,
            "verdict": self.verdict,
            "margin": self.margin,
            "source": t.source,
            "status": t.status,
        }


@dataclass(frozen=True)
class Effects:
    """Everything :func:`assess` found for one design."""

    checks: tuple[ThresholdCheck, ...]
    regimes: tuple[Regime, ...]
    consequences: tuple[Consequence, ...]
    risks: tuple[str, ...] = field(default=())
    estimates: tuple[str, ...] = field(default=())
    """Where the answer rests on a fluid property that is an estimate (:func:`estimates`)."""

    def to_dict(self) -> dict[str, Any]:
        """Plain data: risks first (regime changes, failed thresholds); the legend of the
        source tags (``status``) last."""
        return {
            "risks": list(self.risks),
            "regimes": [r.to_dict() for r in self.regimes],
            "thresholds": [c.to_dict() for c in self.checks],
            "consequences": [c.to_dict() for c in self.consequences],
            "estimates": list(self.estimates),
            "tag_legend": TAG_LEGEND,
        }


# --------------------------------------------------------------------------------------------
# thresholds


def _verdict(t: Threshold, value: float) -> tuple[str, float]:
    if not math.isfinite(value) or value <= 0:
        return "fail", -math.inf
    if t.kind == "min":
        margin = math.log(value / t.passing)
        verdict = "pass" if value >= t.passing else ("marginal" if value >= t.failing else "fail")
    else:
        margin = math.log(t.passing / value)
        verdict = "pass" if value <= t.passing else ("marginal" if value <= t.failing else "fail")
    return verdict, margin


def check_thresholds(case: Case, evaluation: Evaluation) -> tuple[ThresholdCheck, ...]:
    """Apply the thresholds of the case's phenomena in every condition."""
    out = []
    for cond in evaluation.conditions:
        penv, menv = condition_environments(case, evaluation, cond)
        for phen, aliases in case.phenomena.items():
            for t in thresholds_for(phen):
                mv = evaluate_text(t.expression, menv, aliases)
                pv = evaluate_text(t.expression, penv, aliases)
                verdict, margin = _verdict(t, mv)
                out.append(ThresholdCheck(t, cond.name, pv, mv, verdict, margin))
    return tuple(out)


def assess(case: Case, evaluation: Evaluation) -> Effects:
    """Thresholds, regimes and consequences of a design; risks listed first."""
    checks = check_thresholds(case, evaluation)
    regs = regimes(case, evaluation)
    cons = consequences(case, evaluation)
    risks = [
        f"regime change in '{r.condition}': {r.group} is {r.prototype} in the prototype "
        f"but {r.model} in the model"
        for r in regs
        if r.changed
    ]
    risks += [
        f"{c.threshold.label} fails in '{c.condition}': model {c.model:.4g} "
        f"{'<' if c.threshold.kind == 'min' else '>'} {c.threshold.failing:.4g} "
        f"({c.threshold.source}; {c.threshold.status})"
        for c in checks
        if c.verdict == "fail"
    ]
    risks += [f"{c.message} [{c.condition}]" for c in cons if c.flag == "infeasible"]
    return Effects(checks, regs, cons, tuple(risks), estimates(case, evaluation))


def estimates(case: Case, evaluation: Evaluation) -> tuple[str, ...]:
    """Which parts of the answer use a fluid property that is an estimate, not a published model.

    A property listed in the fluid's ``estimated`` (glycerol-water's surface tension) is named
    with why it is an estimate and the groups, thresholds and regimes whose values use it.
    """
    from compromise.physics.fluids import PROPERTY_SYMBOLS, get_fluid

    fluids = {"prototype": case.fluid, "model": evaluation.design.fluid}
    out = []
    for role, name in fluids.items():
        for prop, why in get_fluid(name).estimated.items():
            symbol = PROPERTY_SYMBOLS[prop]
            users = [
                f"group {n}"
                for n, g in case.groups.items()
                if not g.threshold and symbol in ex.names(g.expression)
            ]
            users += [
                f"threshold {phen}.{t.name}"
                for phen in case.phenomena
                for t in thresholds_for(phen)
                if symbol in ex.names(ex.parse(t.expression))
            ]
            if symbol == "sigma" and any(
                "wave_period" in c.quantities for c in evaluation.conditions
            ):
                users.append("regime of wave_period")
            if users:
                out.append(
                    f"{role} fluid {name}: {prop.replace('_', ' ')} is {why}; used by "
                    + ", ".join(users)
                )
    return tuple(out)


# --------------------------------------------------------------------------------------------
# thresholds as constraints


def with_thresholds(case: Case) -> Case:
    """A copy of the case whose phenomena's thresholds are floors or ceilings on model values.

    Each threshold becomes a group of weight 0 named ``<phenomenon>.<name>`` with ``min`` (or
    ``max``) at its passing value, so the solver treats it like any group bound. Thresholds on
    the design itself (the distortion) are left to the case's ``[model]`` bounds.
    """
    groups = dict(case.groups)
    for phen, aliases in case.phenomena.items():
        for t in thresholds_for(phen):
            if set(ex.names(ex.parse(t.expression))) & set(DESIGN_NAMES):
                continue  # a bound on the design itself: the case's [model] bounds hold it
            if set(ex.names(ex.parse(t.expression))) & set(FACILITY_NAMES):
                continue  # a bound already: the loader put the facility's values in
            tree = ex.substitute(
                ex.parse(t.expression), {k: ex.parse(v) for k, v in aliases.items()}
            )
            name = f"{phen}.{t.name}"
            groups[name] = Group(
                name=name,
                expression=tree,
                text=ex.to_text(tree),
                weight=0.0,
                min=t.passing if t.kind == "min" else None,
                max=t.passing if t.kind == "max" else None,
                power=ex.power_product(tree),
                description=t.label,
                threshold=True,
            )
    return dataclasses.replace(case, groups=groups)


__all__ = [
    "THRESHOLDS",
    "VERDICTS",
    "Consequence",
    "Effects",
    "Regime",
    "ReynoldsFloor",
    "ThresholdCheck",
    "Tolerance",
    "apply_tolerance",
    "assess",
    "check_thresholds",
    "consequences",
    "regimes",
    "reynolds_tolerance",
    "with_thresholds",
]
