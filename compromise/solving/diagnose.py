"""Diagnosis of an infeasible case: which bounds conflict, and how far each must move.

An infeasible case is an answer, not an error. The diagnosis finds, at the model fluid state
closest to feasibility, an irreducible infeasible subset of the rows (deletion filter), then for
each of its rows the bound that would make the whole case feasible if that bound alone moved
(a small linear programme per fluid state, minimised over fluids and temperatures).

References
----------
Chinneck, J. W., Dravnieks, E. W. (1991). Locating minimal infeasible constraint sets in linear
programs. *ORSA Journal on Computing* 3(2), 157-168 (the deletion filter), from memory.

The least violation and the feasibility tests are exact vertex enumerations
(:mod:`compromise.solving.smalllp`); only the per-bound relaxations use a linear-programming
solver.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

import numpy as np

from compromise.solving.problem import Problem, Row
from compromise.solving.smalllp import feasible, least_violation

if TYPE_CHECKING:
    from compromise.solving.grid import FluidStates


@dataclass(frozen=True)
class Conflict:
    """Why a case is infeasible: limits that cannot hold together and how far each must move.

    Attributes
    ----------
    keys : tuple of str
        Case-file keys of a smallest set of bounds that cannot hold together.
    relaxation : dict
        For each key, the bound that would make the case feasible on its own [SI]; ``None``
        where relaxing that bound alone cannot help.
    conditions : dict
        For each key, the condition that makes it bind (or ``None``).
    """

    keys: tuple[str, ...]
    relaxation: dict[str, float | None]
    conditions: dict[str, str | None] = field(default_factory=dict)
    units: dict[str, str] = field(default_factory=dict)

    def to_dict(self) -> dict[str, Any]:
        """Plain data."""
        return {
            "conflict": list(self.keys),
            "relaxation": dict(self.relaxation),
            "conditions": dict(self.conditions),
            "units": dict(self.units),
        }


def relaxed_bound(row: Row, shift: float) -> float:
    """The user's bound after a right-hand-side shift ``shift`` of its row (log space)."""
    return row.bound * math.exp(shift) if row.side == "max" else row.bound * math.exp(-shift)


N_DIAGNOSIS_TEMPERATURES = 12
TOL = 1e-9


def _states(states: dict[str, FluidStates]) -> list[tuple[str, float, float, np.ndarray]]:
    out = []
    for name, fs in states.items():
        lo, hi = fs.t_range
        T = np.linspace(lo, hi, N_DIAGNOSIS_TEMPERATURES) if hi > lo else np.array([lo])
        for P in fs.pressures():
            for t, p in zip(T, fs.p(T, P), strict=True):
                out.append((name, float(t), float(P), p))
    return out


#: Above this many inequality rows the deletion filter is guided by a dual certificate.
CERTIFICATE_ROWS = 40


def _certificate_support(
    G: np.ndarray,
    h: np.ndarray,
    E: np.ndarray,
    e: np.ndarray,
    keep_i: list[int],
    keep_e: list[int],
) -> set[int] | None:
    """Rows (indices into ``G``) of a Farkas certificate of the kept system's infeasibility:
    those with a nonzero dual in the phase-1 programme ``min sum(s) + sum(t)`` subject to
    ``G y - s <= h``, ``E y - t+ + t- = e`` (HiGHS). ``None`` when no clear certificate is found
    (then every row is tested, as below the threshold)."""
    from scipy.optimize import linprog

    Gk, hk = G[keep_i], h[keep_i]
    Ek, ek = E[keep_e], e[keep_e]
    m, q, n = Gk.shape[0], Ek.shape[0], G.shape[1]
    if not (np.all(np.isfinite(hk)) and np.all(np.isfinite(ek))):
        return None
    c = np.r_[np.zeros(n), np.ones(m + 2 * q)]
    A_ub = np.hstack([Gk, -np.eye(m), np.zeros((m, 2 * q))])
    A_eq = np.hstack([Ek, np.zeros((q, m)), -np.eye(q), np.eye(q)]) if q else None
    r = linprog(
        c,
        A_ub=A_ub,
        b_ub=hk,
        A_eq=A_eq,
        b_eq=ek if q else None,
        bounds=[(None, None)] * n + [(0, None)] * (m + 2 * q),
        method="highs",
    )
    scale = 1.0 + max(float(np.max(np.abs(hk))), float(np.max(np.abs(ek))) if q else 0.0)
    if r.status != 0 or not float(r.fun) > 1e3 * TOL * scale:
        return None
    duals = np.abs(np.asarray(r.ineqlin.marginals, dtype=float))
    return {keep_i[j] for j in np.flatnonzero(duals > 1e-12)}


def diagnose(problem: Problem, states: dict[str, FluidStates], *, relax: bool = True) -> Conflict:
    """Find the conflicting bounds of an infeasible problem and the relaxation of each.

    Returns
    -------
    Conflict
        ``keys`` lists the case-file keys of an irreducible conflicting set (inequality rows and
        exact groups or fixed ratios); ``relaxation`` gives, for each inequality row, the bound
        that alone would make the case feasible (``None`` where no such bound exists); with
        ``relax=False`` only the conflicting set is found (every relaxation is ``None``).
    """
    G = problem.G
    E = problem.E
    m, q = G.shape[0], E.shape[0]
    cands = _states(states)
    rhs = [problem.rhs(p) for *_, p in cands]
    viol = least_violation(G, np.array([h for h, _ in rhs]), E, np.array([e for _, e in rhs]))
    k = int(np.argmin(viol))
    h, e = rhs[k]
    # deletion filter over inequality rows then equality rows
    keep_e = list(range(q))
    # rows sharing a normal act only through the tightest kept one: dropping a row that is not
    # the tightest of its kind (or ties with another kept row) leaves the system, and so its
    # infeasibility, unchanged, and needs no test
    if m:
        _, kind = np.unique(G, axis=0, return_inverse=True)
        kind = np.asarray(kind).reshape(-1)
    # past CERTIFICATE_ROWS rows, a Farkas certificate of the kept system (the rows with a
    # nonzero dual in its phase-1 programme) proves that dropping any row outside its support
    # leaves the system infeasible, so only rows in the support are tested: a few tests instead
    # of one per row, and the same irreducible set as testing every row
    support: set[int] | None = None
    use_certificate = m > CERTIFICATE_ROWS
    kept = np.ones(m, dtype=bool)  # keep_i as a mask (row i is kept when it is reached)
    for i in range(m):
        same = kept & (kind == kind[i])
        same[i] = False
        if same.any() and np.min(h[same]) <= h[i]:
            kept[i] = False
            continue
        if use_certificate and support is None:
            support = _certificate_support(G, h, E, e, np.flatnonzero(kept).tolist(), keep_e)
        if support is not None and i not in support:
            kept[i] = False
            continue
        kept[i] = False
        trial = np.flatnonzero(kept)
        if feasible(G[trial], h[trial], E[keep_e], e[keep_e]):
            kept[i] = True
        else:
            support = None  # the certificate used row i: find another for what is left
    keep_i = np.flatnonzero(kept).tolist()
    for i in range(q):
        trial = [j for j in keep_e if j != i]
        if not feasible(G[keep_i], h[keep_i], E[trial], e[trial]):
            keep_e = trial
    keys: list[str] = []
    relaxation: dict[str, float | None] = {}
    conditions: dict[str, str | None] = {}
    units: dict[str, str] = {}
    for i in keep_i:
        row: Row = problem.rows[i]
        keys.append(row.key)
        conditions[row.key] = row.condition
        if row.kind == "limit":
            units[row.key] = problem.case.quantities[row.name].unit
        elif row.kind == "bound" and row.name != "distortion":
            units[row.key] = "ratio"
        else:
            units[row.key] = "-"
        if not relax:
            relaxation[row.key] = None
            continue
        from scipy.optimize import linprog  # only here: a conflict alone needs no LP solver

        others = [j for j in range(m) if j != i]
        best = math.inf
        for hh, ee in rhs:
            if not (np.all(np.isfinite(hh)) and np.all(np.isfinite(ee))):
                continue  # a state where a property is undefined: no relaxation from it
            r = linprog(
                G[i],
                A_ub=G[others] if others else None,
                b_ub=hh[others] if others else None,
                A_eq=E if q else None,
                b_eq=ee if q else None,
                bounds=[(None, None)] * 3,
                method="highs",
            )
            if r.status == 0:
                best = min(best, float(r.fun) - float(hh[i]))
            elif r.status == 3:  # unbounded below: any bound works
                best = min(best, 0.0)
        relaxation[row.key] = (
            relaxed_bound(row, max(best, 0.0) * (1 + 1e-9)) if math.isfinite(best) else None
        )
    eq_names = [*problem.exact_groups]
    for j in keep_e:
        name = eq_names[j] if j < len(eq_names) else f"equality {j}"
        key = (
            f"model.{name}"
            if name in ("horizontal_ratio", "distortion", "velocity_ratio")
            else f"groups.{name}.exact"
        )
        keys.append(key)
        relaxation[key] = None
        conditions[key] = None
    return Conflict(tuple(keys), relaxation, conditions, units)
