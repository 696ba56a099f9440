"""The full answer to a case: the optimum, its scale effects and the caution, composed.

The solving layer finds the optimum and knows nothing of scale effects or of the words a user
reads; :func:`solve` runs it, assesses the design's scale effects and wraps both in an
:class:`Answer` whose ``to_dict()`` is the output contract of ``compromise solve --json``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from compromise.casefile.model import Case
from compromise.review.effects import Effects, assess, with_thresholds
from compromise.review.phenomena_hint import PhenomenaHint, phenomena_hint
from compromise.review.wording import caution_line
from compromise.solving.design import Design, Evaluation
from compromise.solving.diagnose import Conflict
from compromise.solving.grid import N_TEMPERATURES
from compromise.solving.optimum import find_optimum
from compromise.solving.result import Alternative, BindingCost, Solution
from compromise.solving.threads import one_blas_thread


@dataclass(frozen=True)
class Answer:
    """The optimum of a case with its scale effects.

    Attributes
    ----------
    solution : Solution
        The optimum, its alternatives, binding costs or diagnosis.
    effects : Effects or None
        Regimes, threshold checks and consequences of the design (None when infeasible or
        not assessed).
    phenomena_hint : PhenomenaHint or None
        The threshold checks the case does not ask for though its quantities and groups
        suggest them (None: nothing to say).
    """

    solution: Solution
    effects: Effects | None = None
    phenomena_hint: PhenomenaHint | None = None

    # the solution's fields, read through (an answer is a solution with more to say)
    @property
    def case(self) -> Case:
        """The case solved."""
        return self.solution.case

    @property
    def status(self) -> str:
        """``"optimal"`` or ``"infeasible"``."""
        return self.solution.status

    @property
    def feasible(self) -> bool:
        """Whether the case has a design that satisfies every limit."""
        return self.solution.feasible

    @property
    def objective(self) -> float:
        """Weighted sum of squared log-mismatches [-] (inf when infeasible)."""
        return self.solution.objective

    @property
    def design(self) -> Design | None:
        """The optimal design (None when infeasible)."""
        return self.solution.design

    @property
    def evaluation(self) -> Evaluation | None:
        """The design in every condition."""
        return self.solution.evaluation

    @property
    def binding(self) -> dict[str, BindingCost]:
        """What each binding row costs, by case-file key."""
        return self.solution.binding

    @property
    def alternatives(self) -> tuple[Alternative, ...]:
        """The best design per fluid and per preferred ratio."""
        return self.solution.alternatives

    @property
    def conflict(self) -> Conflict | None:
        """The diagnosis of an infeasible case."""
        return self.solution.conflict

    def to_dict(self) -> dict[str, Any]:
        """Plain data following the output contract of ``compromise solve --json``."""
        body = self.solution.to_dict()
        out: dict[str, Any] = {
            "title": body.pop("title"),
            "status": body.pop("status"),
            "caution": caution_line(),
        }
        out.update(body)
        if self.effects is not None:
            out["effects"] = self.effects.to_dict()
        if self.phenomena_hint is not None:
            out["phenomena_hint"] = self.phenomena_hint.to_dict()
        return out

    def to_frame(self) -> Any:
        """The groups of every condition as a pandas DataFrame."""
        return self.solution.to_frame()


@one_blas_thread
def solve(
    case: Case,
    *,
    n_temperatures: int = N_TEMPERATURES,
    alternatives: bool = True,
    enforce_thresholds: bool = False,
    effects: bool = True,
) -> Answer:
    """Find the model design with the least weighted squared log-mismatch within every limit,
    and assess its scale effects.

    Parameters
    ----------
    case : Case
        A loaded case (:func:`compromise.casefile.load.load_case`).
    n_temperatures : int
        Temperature grid size per fluid before the polish.
    alternatives : bool
        Also solve restricted to each fluid and each preferred ratio, and price binding rows.
    enforce_thresholds : bool
        Turn the scale-effect thresholds of the case's phenomena into bounds on model values.
    effects : bool
        Assess the design's scale effects (regimes, thresholds, consequences).

    Returns
    -------
    Answer
    """
    if enforce_thresholds:
        case = with_thresholds(case)
    sol = find_optimum(case, n_temperatures=n_temperatures, alternatives=alternatives)
    assessed = assess(case, sol.evaluation) if effects and sol.evaluation is not None else None
    return Answer(sol, assessed, phenomena_hint(case) if effects else None)
