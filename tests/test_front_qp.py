"""The front's subproblems by the null-space solver that shares the fluid state.

``compromise.explore.front_qp.FrontQP`` (the optimum without the epsilon rows per state, then
the best clipped minimiser along the violated epsilon rows' lines per epsilon value) is checked
against the enumeration of active sets (``compromise.solving.qp.SmallQP``, through
``Scalarised.solve``), an independent exact method for the same strictly convex QPs (Nocedal &
Wright 2006, ch. 16, from memory: a strictly convex QP has one minimiser), on bundled cases
with an exact Froude group, for two- and three-axis families, at random fluid states and
epsilon values around where the epsilon rows bind. And the front a user sees: traced with the
null-space solver or with the enumeration alone, it is the same.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from compromise.casefile.load import load_case
from compromise.explore.axes import axes_for, state_spaces
from compromise.explore.tradeoffs import Scalarised, trace_front

ROOT = Path(__file__).resolve().parents[1]

FAMILIES = [
    ("river_bend", ["total", "discharge"]),
    ("river_bend", ["reynolds", "aspect"]),
    ("river_bend", ["aspect", "weber"]),
    ("river_bend", ["total", "discharge", "distortion"]),
    ("spillway", ["total", "discharge"]),
    ("spillway", ["reynolds", "discharge"]),
    ("culvert_si", ["reynolds", "discharge"]),
    ("towing_tank", ["total", "velocity"]),
    ("culvert_si", ["total", "velocity", "discharge"]),
]


def _family(name: str, axes: list[str]) -> tuple:
    case = load_case(ROOT / "cases" / f"{name}.toml")
    problem, ax = axes_for(case, axes)
    kinds = [a.kind for a in ax]
    primary = kinds.index("total") if "total" in kinds else 0
    constrained = [j for j in range(len(ax)) if j != primary]
    return case, problem, ax, primary, constrained


@pytest.mark.parametrize(("name", "axes"), FAMILIES)
def test_shared_state_solver_equals_the_enumeration(name: str, axes: list[str]) -> None:
    case, problem, ax, primary, constrained = _family(name, axes)
    sc = Scalarised(problem, ax, primary, constrained)
    assert sc.fast is not None  # an exact group: at most two free log-ratios
    rng = np.random.default_rng(23)
    space = state_spaces(case, problem, ax)[0]
    U, N = 20, 600
    table = space.p(np.sort(rng.uniform(*space.t_range, U)), space.lnp[:1])
    index = rng.integers(0, U, N)
    # epsilon values around each axis's value at the optimum without epsilon rows
    loose = np.full((U, len(constrained)), 1e6)
    y_free, _ = sc.solve(table, loose)
    free = np.column_stack(
        [ax[j].constraint_value(ax[j].values(problem, y_free, table)) for j in constrained]
    )
    # and each axis's least value (the family minimising it alone): epsilon values from a
    # little below the least (infeasible) to a little above the free optimum's (loose)
    least = np.column_stack(
        [
            ax[j].constraint_value(
                ax[j].values(problem, Scalarised(problem, ax, j, []).solve(table)[0], table)
            )
            for j in constrained
        ]
    )
    share = rng.uniform(-0.1, 1.1, (N, len(constrained)))
    eps = least[index] + share * (free[index] - least[index])
    J_fast = sc.solve_indexed(table, index, eps)
    _, J_enum = sc.solve(table[index], eps)
    assert np.array_equal(np.isfinite(J_fast), np.isfinite(J_enum))
    ok = np.isfinite(J_fast)
    assert 0.2 * N < ok.sum()  # the comparison is not empty
    binding = ok & np.any(eps < free[index] - 1e-6 * (1 + np.abs(free[index])), axis=1)
    assert binding.sum() > 0.2 * N  # and the epsilon rows bind in much of it
    np.testing.assert_allclose(J_fast[ok], J_enum[ok], rtol=1e-8, atol=1e-12)


@pytest.mark.parametrize(
    ("name", "axes"), [("river_bend", ["total", "discharge"]), ("spillway", ["reynolds", "weber"])]
)
def test_front_is_the_enumerations(
    name: str, axes: list[str], monkeypatch: pytest.MonkeyPatch
) -> None:
    """The front traced with the null-space solver equals the one traced by the enumeration
    alone: the same points, designs and values."""
    case = load_case(ROOT / "cases" / f"{name}.toml")
    fast = trace_front(case, axes, points=40).to_dict()
    original = Scalarised.__init__

    def enumeration_only(self, *args, **kwargs) -> None:  # type: ignore[no-untyped-def]
        original(self, *args, **kwargs)
        self.fast = None

    monkeypatch.setattr(Scalarised, "__init__", enumeration_only)
    slow = trace_front(case, axes, points=40).to_dict()
    assert fast["points"] and len(fast["points"]) == len(slow["points"])
    for a, b in zip(fast["points"], slow["points"], strict=True):
        assert a["design"]["fluid"] == b["design"]["fluid"]
        np.testing.assert_allclose(a["values"], b["values"], rtol=1e-7, atol=1e-10)
        for key in ("horizontal_ratio", "vertical_ratio", "velocity_ratio", "temperature"):
            np.testing.assert_allclose(a["design"][key], b["design"][key], rtol=1e-6)
