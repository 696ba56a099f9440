"""Several proposed designs side by side, the best value of each row marked.

Each design is first reviewed (:func:`compromise.review.proposal.evaluate`); a design that breaks
a limit is compared like any other, its violations listed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from compromise.casefile.model import Case
from compromise.review.proposal import DesignReview
from compromise.review.wording import caution_line
from compromise.units import to_celsius

VERDICT_RANK = {"pass": 2, "marginal": 1, "fail": 0}


@dataclass(frozen=True)
class ComparisonRow:
    """One row of a comparison: a value per design and which designs are best.

    ``values`` hold numbers (or text for the fluid); ``best`` the indices of the designs with
    the best value where "best" means something for the row (empty otherwise).
    """

    section: str
    name: str
    unit: str
    values: tuple[Any, ...]
    best: tuple[int, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "section": self.section,
            "name": self.name,
            "unit": self.unit,
            "values": list(self.values),
            "best": list(self.best),
        }


@dataclass(frozen=True)
class Comparison:
    """Designs reviewed side by side."""

    case: Case = field(repr=False)
    reviews: tuple[DesignReview, ...]
    rows: tuple[ComparisonRow, ...]

    def to_dict(self) -> dict[str, Any]:
        """Plain data: the designs (label, status, violations) and the rows."""
        return {
            "title": self.case.title,
            "caution": caution_line(),
            "designs": [
                {
                    "label": r.label,
                    "status": "holds" if r.holds else "violates",
                    "design": r.design.to_dict(),
                    "objective": r.objective,
                    "violations": [v.to_dict() for v in r.violations],
                    "notes": list(r.notes),
                }
                for r in self.reviews
            ],
            "rows": [row.to_dict() for row in self.rows],
        }

    def to_frame(self) -> Any:
        """The rows as a pandas DataFrame, one column per design."""
        import pandas as pd

        labels = [r.label for r in self.reviews]
        return pd.DataFrame(
            [
                {"section": row.section, "name": row.name, "unit": row.unit}
                | dict(zip(labels, row.values, strict=True))
                for row in self.rows
            ]
        )


def _best(values: list[float | None], *, lower: bool) -> tuple[int, ...]:
    """Indices of the best values; none when every design ties (nothing to mark)."""
    finite = [(i, v) for i, v in enumerate(values) if v is not None and math.isfinite(v)]
    if not finite:
        return ()
    target = min(v for _, v in finite) if lower else max(v for _, v in finite)
    tol = 1e-9 * max(1.0, abs(target))
    hits = tuple(i for i, v in finite if abs(v - target) <= tol)
    return () if len(hits) == len(values) else hits


def compare(case: Case, reviews: list[DesignReview]) -> Comparison:
    """Put reviewed designs side by side (see :class:`Comparison`).

    Rows: the design (fluid, temperature, ratios), the objective (lowest best among the designs
    that hold every limit, when any does: a design that breaks a limit buys its low mismatch
    with that), each model
    quantity per condition, each group's mismatch per condition (smallest magnitude best), each
    limit's margin in its worst condition (largest best; negative where broken) and each
    threshold verdict per condition (pass best).
    """
    rows: list[ComparisonRow] = []
    ds = [r.design for r in reviews]
    rows += [
        ComparisonRow("design", "fluid", "-", tuple(d.fluid for d in ds)),
        ComparisonRow(
            "design", "temperature", "degC", tuple(to_celsius(d.temperature) for d in ds)
        ),
        ComparisonRow("design", "horizontal_ratio", "-", tuple(d.horizontal_ratio for d in ds)),
        ComparisonRow("design", "vertical_ratio", "-", tuple(d.vertical_ratio for d in ds)),
        ComparisonRow("design", "distortion", "-", tuple(d.distortion for d in ds)),
        ComparisonRow("design", "velocity_ratio", "-", tuple(d.velocity_ratio for d in ds)),
    ]
    if any(d.material is not None for d in ds):  # a case with [sediment]
        rows += [
            ComparisonRow("design", "material", "-", tuple(d.material or "-" for d in ds)),
            ComparisonRow("design", "grain_size", "m", tuple(d.grain_size for d in ds)),
        ]
    objs = [r.objective for r in reviews]
    holding = [o if r.holds else None for o, r in zip(objs, reviews, strict=True)]
    rows.append(
        ComparisonRow(
            "objective",
            "weighted mismatch",
            "-",
            tuple(objs),
            _best(holding if any(v is not None for v in holding) else objs, lower=True),
        )
    )
    conds = [c.name for c in case.conditions]
    for k, cname in enumerate(conds):
        first = reviews[0].evaluation.conditions[k]
        for q in first.quantities:
            vals = tuple(r.evaluation.conditions[k].quantities[q].model for r in reviews)
            rows.append(ComparisonRow(f"quantities [{cname}]", q, first.quantities[q].unit, vals))
    for k, cname in enumerate(conds):
        first = reviews[0].evaluation.conditions[k]
        for g in first.groups:
            mm = [r.evaluation.conditions[k].groups[g].mismatch for r in reviews]
            best = _best([abs(v) for v in mm], lower=True)
            rows.append(ComparisonRow(f"mismatch [{cname}]", g, "ln", tuple(mm), best))
    worst = [r.evaluation.worst_limits() for r in reviews]
    for key in worst[0]:
        margins = [w[key][1].margin for w in worst]
        rows.append(
            ComparisonRow("limit margin", key, "-", tuple(margins), _best(margins, lower=False))
        )
    checks: dict[str, list[str | None]] = {}
    for i, r in enumerate(reviews):
        for c in r.effects.checks:
            name = f"{c.threshold.phenomenon}.{c.threshold.name} [{c.condition}]"
            checks.setdefault(name, [None] * len(reviews))[i] = c.verdict
    for name, verdicts in checks.items():
        ranks = [VERDICT_RANK.get(v, -1) if v else None for v in verdicts]
        rows.append(
            ComparisonRow("threshold", name, "verdict", tuple(verdicts), _best(ranks, lower=False))
        )
    return Comparison(case, tuple(reviews), tuple(rows))
