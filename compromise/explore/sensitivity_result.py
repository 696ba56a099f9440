"""The result of a weight sensitivity (:class:`Sensitivity`) and the helpers that count
winners and ranges, shared by :mod:`compromise.explore.sensitivity` and, for a case with
``[sediment]``, :mod:`compromise.explore.granular_sensitivity`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from compromise.casefile.model import Case
from compromise.solving.result import denoise

TIE_ABS = 1e-6  # [-] objectives closer than this are equal: a 0.1 % mismatch, below measurement
VARIABLES = (
    ("horizontal_ratio", "-"),
    ("vertical_ratio", "-"),
    ("distortion", "-"),
    ("velocity_ratio", "-"),
    ("temperature", "degC"),
)


@dataclass(frozen=True)
class Candidate:
    """A candidate design and how often it is the best.

    Attributes
    ----------
    fluid : str
    ratio : float or None
        The preferred horizontal ratio [-] (None: free).
    label : str
    wins : int
        Samples in which it alone is the best candidate.
    share : float
        ``wins / samples`` [-].
    nominal_objective : float
        Its weighted mismatch at the case's own weights [-] (inf when infeasible).
    ties : int
        Samples in which it is best together with other candidates (tied within
        :data:`TIE_ABS`).
    tie_share : float
        ``ties / samples`` [-].
    """

    fluid: str
    ratio: float | None
    label: str
    wins: int
    share: float
    nominal_objective: float
    ties: int = 0
    tie_share: float = 0.0

    def to_dict(self) -> dict[str, Any]:
        """Plain data; a mismatch below the noise is 0."""
        obj = self.nominal_objective
        return {
            "fluid": self.fluid,
            "ratio": self.ratio,
            "label": self.label,
            "wins": self.wins,
            "share": self.share,
            "ties": self.ties,
            "tie_share": self.tie_share,
            "nominal_objective": denoise(obj) if math.isfinite(obj) else None,
        }


@dataclass(frozen=True)
class VariableRange:
    """The spread of one decision variable of the optimum over the samples (ratios [-],
    temperature [degC])."""

    name: str
    unit: str
    nominal: float
    minimum: float
    p05: float
    median: float
    p95: float
    maximum: float

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "unit": self.unit,
            "nominal": self.nominal,
            "min": self.minimum,
            "p05": self.p05,
            "median": self.median,
            "p95": self.p95,
            "max": self.maximum,
        }


@dataclass(frozen=True)
class Sensitivity:
    """The result of :func:`weight_sensitivity`.

    Attributes
    ----------
    spread, samples, seed :
        As asked.
    groups : tuple of str
        The weighted groups whose weights vary.
    candidates : tuple of Candidate
    nominal : int
        Index of the best candidate at the case's own weights (-1: none feasible); among tied
        candidates, the one listed first (the solver's choice).
    ranges : tuple of VariableRange
        Of the unrestricted optimum.
    fluid_shares : dict
        How often each fluid is the unrestricted optimum's [-].
    factors : numpy.ndarray
        (samples, groups) the weight factors drawn.
    winners : numpy.ndarray
        (samples,) index of the best candidate in each sample (-1: none).
    optima : numpy.ndarray
        (samples, len(ranges)) the unrestricted optimum's decision variables, in the order
        and units of ``ranges``.
    nominal_tied : tuple of int
        Indices of the candidates tied for best at the case's own weights (one: no tie).
    tied_samples : int
        Samples in which two or more candidates tie for best.
    note : str
        Why the weights cannot change the answer ('' when they can).
    best_sets : numpy.ndarray
        (samples, candidates) which candidates are best (tied for best) in each sample.
    """

    case: Case = field(repr=False)
    spread: float
    samples: int
    seed: int
    groups: tuple[str, ...]
    candidates: tuple[Candidate, ...]
    nominal: int
    ranges: tuple[VariableRange, ...]
    fluid_shares: dict[str, float]
    factors: np.ndarray = field(repr=False)
    winners: np.ndarray = field(repr=False)
    optima: np.ndarray = field(repr=False)
    nominal_tied: tuple[int, ...] = ()
    tied_samples: int = 0
    note: str = ""
    best_sets: np.ndarray | None = field(default=None, repr=False)

    def to_dict(self) -> dict[str, Any]:
        """Plain data (ratios model/prototype, temperatures in degC)."""
        return {
            "title": self.case.title,
            "spread": self.spread,
            "samples": self.samples,
            "seed": self.seed,
            "groups": list(self.groups),
            "note": self.note,
            "candidates": [c.to_dict() for c in self.candidates],
            "nominal": self.candidates[self.nominal].label if self.nominal >= 0 else None,
            "nominal_tied": [self.candidates[i].label for i in self.nominal_tied],
            "tied_samples": self.tied_samples,
            "tie_tolerance": TIE_ABS,
            "ranges": {r.name: r.to_dict() for r in self.ranges},
            "fluid_shares": dict(self.fluid_shares),
        }


def weights_note(groups: tuple[str, ...]) -> str:
    """Why weight factors cannot change the answer ('' when they can).

    Examples
    --------
    >>> weights_note(("reynolds", "weber"))
    ''
    >>> weights_note(("reynolds",))[:35]
    'One weighted group only (reynolds):'
    """
    if len(groups) >= 2:
        return ""
    if not groups:
        return (
            "No weighted group: every group is exact or has weight 0, so there is no weight "
            "to vary and the analysis cannot change the answer."
        )
    return (
        f"One weighted group only ({groups[0]}): a factor on its weight scales every "
        "candidate's mismatch alike, so the analysis cannot change the answer."
    )


def tied_best(J: np.ndarray) -> np.ndarray:
    """(rows, candidates) mask of the candidates tied for best in each row (none if every
    candidate is infeasible)."""
    low = np.min(J, axis=1, keepdims=True)
    return np.isfinite(J) & (J <= low + TIE_ABS + 1e-9 * np.abs(low))


def winners_of(J: np.ndarray) -> np.ndarray:
    """Best candidate per row; among equal objectives the one listed first."""
    tied = tied_best(J)
    return np.where(tied.any(axis=1), np.argmax(tied, axis=1), -1)


def ranges_of(
    y: np.ndarray, TP: np.ndarray, fluid: np.ndarray, gas: bool
) -> tuple[tuple[VariableRange, ...], np.ndarray]:
    ok = fluid >= 0
    vals = {
        "horizontal_ratio": np.exp(y[:, 0]),
        "vertical_ratio": np.exp(y[:, 1]),
        "distortion": np.exp(y[:, 1] - y[:, 0]),
        "velocity_ratio": np.exp(y[:, 2]),
        "temperature": TP[:, 0] - 273.15,
        "pressure": TP[:, 1],
    }
    out = []
    names = VARIABLES + ((("pressure", "Pa"),) if gas else ())
    for name, unit in names:
        v = vals[name]
        s = v[1:][ok[1:]]
        if s.size == 0:
            out.append(VariableRange(name, unit, *([math.nan] * 6)))
            continue
        q = np.quantile(s, [0.0, 0.05, 0.5, 0.95, 1.0])
        out.append(
            VariableRange(name, unit, float(v[0]) if ok[0] else math.nan, *(float(x) for x in q))
        )
    optima = np.column_stack([vals[n] for n, _ in names])[1:]
    return tuple(out), np.where(ok[1:, None], optima, np.nan)


def draw_factors(spread: float, samples: int, seed: int, groups: int) -> np.ndarray:
    """(samples, groups) weight factors, log-uniform in ``[1/spread, spread]`` (PCG64, seeded)."""
    rng = np.random.default_rng(seed)
    return np.exp(rng.uniform(-math.log(spread), math.log(spread), size=(samples, groups)))


def tally(
    J: np.ndarray, fluids: list[str], ratios: list[float | None], labels: list[str], samples: int
) -> tuple[tuple[Candidate, ...], np.ndarray, np.ndarray]:
    """The candidates' wins and ties from the objectives ``J`` (1 + samples, candidates; row 0
    the case's own weights): the candidates, the winner of every row and the tied-best mask.
    Candidate ``c`` is fluid ``fluids[c]`` at ratio ``ratios[c]``."""
    winners = winners_of(J)
    best = tied_best(J)
    alone = best.sum(axis=1) == 1
    counts = best[1:][alone[1:]].sum(axis=0)
    ties = best[1:][~alone[1:]].sum(axis=0)
    cands = tuple(
        Candidate(
            fluids[c],
            ratios[c],
            labels[c],
            int(counts[c]),
            float(counts[c] / samples),
            float(J[0, c]),
            int(ties[c]),
            float(ties[c] / samples),
        )
        for c in range(J.shape[1])
    )
    return cands, winners, best


def assemble(
    case: Case,
    spread: float,
    seed: int,
    groups: tuple[str, ...],
    factors: np.ndarray,
    tallied: tuple[tuple[Candidate, ...], np.ndarray, np.ndarray],
    ranges: tuple[VariableRange, ...],
    optima: np.ndarray,
    fluid_index: np.ndarray,
) -> Sensitivity:
    """The :class:`Sensitivity` of a run: ``tallied`` from :func:`tally`; ``fluid_index``
    (1 + samples,) the fluid of each row's unrestricted optimum (-1: none)."""
    cands, winners, best = tallied
    samples = factors.shape[0]
    shares = {f: float(np.mean(fluid_index[1:] == i)) for i, f in enumerate(case.model.fluids)}
    return Sensitivity(
        case,
        float(spread),
        int(samples),
        int(seed),
        groups,
        cands,
        int(winners[0]),
        ranges,
        shares,
        factors,
        winners[1:],
        optima,
        tuple(int(i) for i in np.flatnonzero(best[0])),
        int(np.sum(best[1:].sum(axis=1) > 1)),
        weights_note(groups),
        best[1:],
    )
