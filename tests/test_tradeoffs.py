"""Tests of the trade-off tools: Pareto fronts, the design-space map, weight sensitivity.

Oracles, all outside the code under test:

* fronts derived by hand (below) for a small Froude case whose groups' log-mismatches are linear
  in ``x = ln X`` and ``z = ln Y``: the epsilon-constraint problem (Haimes, Y. Y., Lasdon, L. S.,
  Wismer, D. A. (1971). IEEE Trans. SMC 1(3), 296-297; from memory) is solved on paper;
* on the bundled river case, a reference front from scipy's SLSQP (Kraft, D. (1988). A software
  package for sequential quadratic programming. DFVLR-FB 88-28), a general nonlinear solver that
  shares nothing with the enumerated active sets, and the designs checked with
  ``compromise.solving.design.evaluate_design``, which computes groups and limits from the
  expressions;
* GD+ as defined by Ishibuchi, H., Masuda, H., Tanigaki, Y., Nojima, Y. (2015). Modified
  distance calculation in generational distance and inverted generational distance. EMO 2015,
  LNCS 9019, 110-125 (from memory), and the hypervolume (Zitzler, E., Thiele, L. (1999). IEEE
  Trans. Evol. Comput. 3(4), 257-271; from memory), both checked on hand-computed sets;
* the knee as the point farthest from the chord through the extremes (Das, I. (1999).
  Structural Optimization 18, 107-115; from memory);
* the solver itself (``compromise.solving.optimum.solve``) on re-weighted cases, as a cross-check
of the
  batched weight sensitivity (a different code path: one solve per case).

The hand-derived case
---------------------
Water at 20 degC in model and prototype, so every property ratio is 1 and ``p = 0``. Froude is
kept exactly, so ``ln V = z / 2``. The groups are ``aspect = width / depth`` (log-mismatch
``m1 = x - z``, weight 2) and ``re = velocity * depth / nu`` (``m2 = v + z = 1.5 z``, weight 1).
Bounds: ``X`` in [1:1000, 1:10], distortion ``d = z - x`` in [0, ln 5]; limits: reach (1 km
prototype) at most 40 m, depth (2 m prototype) at least 8 mm.

* Total ``J = 2 m1^2 + m2^2`` against model reach ``R = 1000 e^x`` (reach limit lifted): at fixed
  x the best z is ``z = 2x / 4.25`` with ``J = k x^2``, ``k = 2 x 2.25 / 4.25``, while the
  distortion it needs, ``d = -x 2.25 / 4.25``, is at most ln 5; beyond, ``d = ln 5`` and
  ``J = 2 ln^2 5 + 2.25 (x + ln 5)^2``. J falls as x grows, so ``x = ln(R / 1000)`` on the
  front, for R from 1 m (X = 1:1000) to 100 m (X = 1:10).
* ``|m1|`` against ``|m2|`` (reach limit kept, so ``x <= ln(1/25)``): the front is the line
  ``|m1| + |m2| / 1.5 = ln 25`` for ``|m2|`` in ``[1.5 ln 5, 1.5 ln 25]``.
* Reach against distortion (both lifted): depth >= 8 mm gives ``z >= ln 0.004``, so
  ``R = 1000 e^x >= 1000 x 0.004 / D``: the front is ``R D = 4 m`` for D from 1 to 4 (X = 1:1000).
"""

from __future__ import annotations

import copy
import json
import math
import tomllib
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.casefile.load import case_from_dict, load_case
from compromise.casefile.model import Case
from compromise.cli import app
from compromise.errors import CaseError
from compromise.explore.designmap import default_axes, design_map
from compromise.explore.pareto import (
    gd_plus,
    gd_plus_polyline,
    hypervolume,
    knee_index,
    nondominated,
)
from compromise.explore.sensitivity import weight_sensitivity
from compromise.explore.tradeoffs import Front, trace_front
from compromise.review.answer import solve
from compromise.solving.design import Design, evaluate_design

ROOT = Path(__file__).resolve().parent.parent
RIVER = ROOT / "cases" / "river_bend.toml"
EXACT = 1e-6  # [-] the brief's agreement with an exact front

HAND: dict[str, Any] = {
    "title": "hand-derived fronts",
    "prototype": {
        "fluid": "water",
        "temperature": "20 degC",
        "quantities": {
            "depth": {"value": "2 m", "axis": "vertical"},
            "width": "40 m",
            "reach": "1 km",
            "velocity": "1 m/s",
        },
    },
    "groups": {
        "fr": {"expr": "velocity / sqrt(g * depth)", "exact": True},
        "aspect": {"expr": "width / depth", "weight": 2},
        "re": {"expr": "velocity * depth / nu", "weight": 1},
    },
    "model": {
        "horizontal_ratio": {"min": "1:1000", "max": "1:10"},
        "distortion": {"min": 1, "max": 5},
        "fluids": ["water"],
        "temperature": {"min": "20 degC", "max": "20 degC"},
    },
    "limits": {"reach": {"max": "40 m"}, "depth": {"min": "8 mm"}},
}


@pytest.fixture(scope="module")
def hand() -> Case:
    return case_from_dict(HAND, path="hand.toml")


@pytest.fixture(scope="module")
def river() -> Case:
    return load_case(RIVER)


@pytest.fixture(scope="module")
def river_front(river: Case) -> Front:
    return trace_front(river, ["total", "discharge"])


# --------------------------------------------------------------------------------------------
# fronts against hand-derived curves


def test_front_total_vs_reach_matches_the_hand_derived_curve(hand: Case) -> None:
    front = trace_front(hand, ["total", "reach"])
    v = front.values
    assert len(front.points) >= 50
    x = np.log(v[:, 1] / 1000.0)
    k = 2.0 * 2.25 / 4.25
    ln5 = math.log(5.0)
    free = -x * 2.25 / 4.25 <= ln5
    expected = np.where(free, k * x**2, 2.0 * ln5**2 + 2.25 * (x + ln5) ** 2)
    assert_allclose(v[:, 0], expected, rtol=EXACT)
    assert free.any() and (~free).any()  # both branches of the front are traced
    assert_allclose([v[:, 1].min(), v[:, 1].max()], [1.0, 100.0], rtol=EXACT)
    assert v[:, 1].max() > 40.0  # the reach limit is lifted ...
    kept = trace_front(hand, ["total", "reach"], points=50, lift=False)
    assert kept.values[:, 1].max() <= 40.0 * (1 + 1e-9)  # ... unless it is kept


def test_front_between_two_groups_is_the_hand_derived_line(hand: Case) -> None:
    front = trace_front(hand, ["aspect", "re"], points=60)
    v = front.values
    assert len(front.points) >= 50
    assert_allclose(v[:, 0] + v[:, 1] / 1.5, math.log(25.0), rtol=EXACT)
    assert_allclose(
        [v[:, 1].min(), v[:, 1].max()], [1.5 * math.log(5.0), 1.5 * math.log(25.0)], rtol=EXACT
    )


def test_front_reach_vs_distortion_is_the_hand_derived_hyperbola(hand: Case) -> None:
    front = trace_front(hand, ["reach", "distortion"], points=60)
    v = front.values
    assert len(front.points) >= 50
    assert_allclose(v[:, 0] * v[:, 1], 4.0, rtol=EXACT)
    assert_allclose([v[:, 1].min(), v[:, 1].max()], [1.0, 4.0], rtol=EXACT)


# --------------------------------------------------------------------------------------------
# metrics on hand-computed sets


def test_nondominated_drops_dominated_points_and_duplicates() -> None:
    pts = np.array([[1.0, 3.0], [2.0, 2.0], [2.0, 2.0], [3.0, 3.0], [3.0, 1.0]])
    assert nondominated(pts).tolist() == [0, 1, 4]


def test_gd_plus_ishibuchi2015_definition() -> None:
    ref = np.array([[1.0, 1.0]])
    assert_allclose(gd_plus(np.array([[2.0, 2.0]]), ref), math.sqrt(2.0), rtol=1e-15)
    assert_allclose(gd_plus(np.array([[0.5, 3.0]]), ref), 2.0, rtol=1e-15)  # better in x: 0
    assert gd_plus(np.array([[0.5, 0.5]]), ref) == 0.0


def test_gd_plus_to_a_polyline_hand_computed() -> None:
    ref = np.array([[0.0, 1.0], [1.0, 0.0]])  # the segment x + y = 1
    assert gd_plus_polyline(np.array([[0.5, 0.5], [0.2, 0.3]]), ref) == 0.0
    # (0.6, 0.6) is worse than (0.5, 0.5) by 0.1 on both axes
    assert_allclose(gd_plus_polyline(np.array([[0.6, 0.6]]), ref), 0.1 * math.sqrt(2), rtol=1e-14)


def test_hypervolume_hand_computed() -> None:
    assert_allclose(
        hypervolume(np.array([[1.0, 2.0], [2.0, 1.0]]), np.array([3.0, 3.0])), 3.0, rtol=1e-15
    )
    pts = np.array([[1.0, 1.0, 2.0], [2.0, 2.0, 1.0]])
    # union of two boxes to (3, 3, 3): 2*2*1 + 1*1*2 - overlap 1*1*1 = 5
    assert_allclose(hypervolume(pts, np.array([3.0, 3.0, 3.0])), 5.0, rtol=1e-15)


def test_knee_is_farthest_from_the_chord_das1999() -> None:
    theta = np.linspace(0.0, math.pi / 2, 91)
    pts = np.column_stack([1 - np.sin(theta), 1 - np.cos(theta)])  # convex quarter circle
    assert knee_index(pts) == 45  # theta = pi/4
    assert knee_index(np.array([[0.0, 1.0], [0.1, 0.2], [1.0, 0.0]])) == 1


# --------------------------------------------------------------------------------------------
# the bundled river case against an independent reference


def _slsqp_reference(case: Case, eps: np.ndarray) -> np.ndarray:
    """Minimise the total subject to model discharge <= eps with SLSQP, over (x, z, T)."""
    from scipy.optimize import minimize

    from compromise.explore.axes import axes_for, state_spaces

    problem, axes = axes_for(case, ["total", "discharge"])
    fs = state_spaces(case, problem, axes)[0]
    assert problem.E.shape[0] == 1 and abs(problem.E[0, 2]) > 0  # froude: v from x and z
    E = problem.E[0]
    ax = axes[1]
    lo, hi = fs.t_range
    exact_cache: dict[float, np.ndarray] = {}

    def parts(u: np.ndarray, p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        x, z = u[0], u[1]
        e = problem.e0[0] + problem.Q[0] @ p
        y = np.array([x, z, (e - E[0] * x - E[1] * z) / E[2]])
        return y, p

    def solve_one(
        q: float, with_t: bool, t_fixed: float, starts: list[list[float]]
    ) -> tuple[float, np.ndarray]:
        def p_of(u: np.ndarray) -> np.ndarray:  # u[2]: temperature scaled to [0, 1]
            if with_t:
                return fs.p(np.array([lo + u[2] * (hi - lo)]), np.array([fs.lnp[0]]))[0]
            return exact_cache[t_fixed]

        def total(u: np.ndarray) -> float:
            y, p = parts(u, p_of(u))
            r = problem.A @ y + problem.B @ p
            return float(problem.W @ r**2)

        def cons(u: np.ndarray) -> np.ndarray:
            y, p = parts(u, p_of(u))
            h = problem.h0 + problem.P @ p
            lq = ax.a @ y + ax.b @ p + ax.c0
            return np.concatenate([h - problem.G @ y, [math.log(q) - lq]])

        best = (math.inf, np.array(starts[0]))
        bounds = [(-9.0, 0.0), (-9.0, 0.0)] + ([(0.0, 1.0)] if with_t else [])
        for u0 in starts:
            r = minimize(
                total,
                u0,
                method="SLSQP",
                bounds=bounds,
                constraints=[{"type": "ineq", "fun": cons}],
                options={"ftol": 1e-15, "maxiter": 1000},
            )
            # at this ftol SLSQP often ends on "positive directional derivative" at the
            # optimum: accept any end point that satisfies the constraints
            if np.all(cons(r.x) >= -1e-9) and r.fun < best[0]:
                best = (float(r.fun), r.x)
        return best

    out = []
    for q in eps:
        x0 = math.log(1 / 120)
        _, u = solve_one(q, True, 0.0, [[x0, x0 + 1.2, 0.5], [x0 + 0.7, x0 + 1.9, 1.0]])
        t_star = lo + float(u[2]) * (hi - lo)  # where the temperature optimum is (splines)
        t_star = hi if abs(t_star - hi) < 1e-3 else round(t_star, 6)
        if t_star not in exact_cache:
            exact_cache[t_star] = fs.exact_p(t_star, float(fs.pressures[0]))
        # then at that temperature with the source property models
        out.append([solve_one(q, False, t_star, [list(u[:2])])[0], q])
    return np.array(out)


def test_river_front_points_are_feasible_and_non_dominated(river: Case, river_front: Front) -> None:
    v = river_front.values
    assert len(v) >= 50
    assert nondominated(v).size == len(v)
    for pt in river_front.points:
        ev = evaluate_design(river, pt.design)
        for key, (_, lim) in ev.worst_limits().items():
            if key != "discharge.max":  # lifted: the front's own axis
                assert lim.margin >= -1e-6, (key, lim.margin)
        m = river.model
        assert m.horizontal_ratio[0] * (1 - 1e-9) <= pt.design.horizontal_ratio
        assert pt.design.horizontal_ratio <= m.horizontal_ratio[1] * (1 + 1e-9)
        assert m.distortion[0] - 1e-9 <= pt.design.distortion <= m.distortion[1] + 1e-9
        assert_allclose(ev.objective, pt.values[0], rtol=1e-9)  # the total, from expressions
        worst = max(c.quantities["discharge"].model for c in ev.conditions)
        assert_allclose(worst, pt.values[1], rtol=1e-9)


def test_river_front_gd_plus_against_slsqp_reference(river: Case, river_front: Front) -> None:
    v = river_front.values
    dense = np.geomspace(v[:, 1].min(), v[:, 1].max(), 40)
    ref_here = _slsqp_reference(river, v[:, 1])
    # at the front's own discharges, the reference total agrees with the front's
    assert_allclose(v[:, 0], ref_here[:, 0], rtol=EXACT)
    ref = np.vstack([ref_here, _slsqp_reference(river, dense)])
    ref = ref[nondominated(ref)]
    lo, span = ref.min(axis=0), np.ptp(ref, axis=0)
    assert gd_plus((v - lo) / span, (ref - lo) / span) < 1e-6


def test_l_shaped_front_is_spaced_at_equal_arc_length(river: Case) -> None:
    front = trace_front(river, ["total", "reach"])
    v = front.values
    u = (v - v.min(axis=0)) / np.ptp(v, axis=0)
    seg = np.linalg.norm(np.diff(u, axis=0), axis=1)
    assert seg.max() / np.median(seg) < 1.5
    vertical = v[:, 0] < v[:, 0].min() + 0.02 * np.ptp(v[:, 0])  # the steep leg of the L
    assert vertical.sum() >= 5


def test_front_merges_fluids_by_dominance(river: Case) -> None:
    data = tomllib.loads(RIVER.read_text(encoding="utf-8"))
    data["model"]["fluids"] = ["seawater", "water"]
    front = trace_front(case_from_dict(data, path="two.toml"), ["total", "discharge"], points=50)
    v = front.values
    assert set(front.fluid_fronts) == {"seawater", "water"}
    for fv in front.fluid_fronts.values():  # no fluid's own front beats the merged one
        both = np.vstack([v, fv])
        assert set(nondominated(both).tolist()) <= set(range(len(v)))


def test_three_axes_front(river: Case) -> None:
    front = trace_front(river, ["total", "reach", "discharge"], points=60)
    v = front.values
    assert v.shape[1] == 3 and len(v) >= 50
    assert nondominated(v).size == len(v)
    assert 0 <= front.knee < len(v)
    d = front.to_dict()
    assert len(d["points"][0]["values"]) == 3


def test_single_point_front_when_nothing_trades(river: Case) -> None:
    # the pipe rig matches every weighted group at every scale: the total is 0 everywhere
    front = trace_front(load_case(ROOT / "cases" / "pipe_rig.toml"), ["total", "discharge"])
    assert len(front.points) == 1 and front.knee == 0
    assert front.points[0].values[0] <= 1e-12


@pytest.mark.parametrize(
    ("case", "axes", "match"),
    [
        ("river_bend", ["total", "depthh"], "unknown axis"),
        ("river_bend", ["froude", "total"], "kept exactly"),
        ("river_bend", ["total"], "two or three axes"),
        ("river_bend", ["total", "total"], "given twice"),
        ("towing_tank", ["total", "plan_area"], "plan_area needs"),
        ("spillway", ["total", "distortion"], "fixes the distortion"),
        ("pipe_rig", ["total", "roughness"], "both a group and a quantity"),
        ("wind_tunnel", ["total", "velocity"], "bounds the model velocity"),
    ],
)
def test_axis_errors(case: str, axes: list[str], match: str) -> None:
    with pytest.raises(CaseError, match=match):
        trace_front(load_case(ROOT / "cases" / f"{case}.toml"), axes, points=10)


# --------------------------------------------------------------------------------------------
# the design-space map


@pytest.fixture(scope="module")
def river_map(river: Case) -> Any:
    return design_map(river, resolution=41)


def test_map_reach_boundary_is_the_hand_derived_line(river_map: Any) -> None:
    # reach <= 40 m with a 3 km prototype: ln X <= ln(40 / 3000), whatever the distortion
    b = next(b for b in river_map.boundaries if b.key == "limits.reach.max")
    X = river_map.x[None, :] * np.ones_like(river_map.y)[:, None]
    assert_allclose(b.violation, np.log(X * 3000.0 / 40.0), rtol=1e-9, atol=1e-12)
    assert b.label == "reach <= 40 m"


def test_map_agrees_with_solver_and_evaluate_design(river: Case, river_map: Any) -> None:
    sol = solve(river, alternatives=False)
    assert river_map.axes == ("horizontal_ratio", "distortion")
    assert_allclose(river_map.optimum_objective, sol.objective, rtol=1e-9)
    obj = river_map.objective
    assert np.nanmin(obj) >= sol.objective * (1 - 1e-9)  # no cell beats the optimum
    binding = {b.key for b in river_map.boundaries if b.binding}
    assert binding == {"limits.discharge.max"}
    rows, cols = np.nonzero(np.isfinite(obj))
    assert rows.size > 10
    for r, c in list(zip(rows, cols, strict=True))[:: max(1, rows.size // 8)]:
        X, d = river_map.x[c], river_map.y[r]
        Y = X * d
        design = Design("water", river_map.temperature[r, c], 101325.0, X, Y, math.sqrt(Y))
        ev = evaluate_design(river, design)  # froude kept: V = Y^1/2 (Chanson 1999, ch. 14)
        assert_allclose(ev.objective, obj[r, c], rtol=1e-4)
        assert ev.feasible


def test_map_default_axes_and_errors() -> None:
    spill = load_case(ROOT / "cases" / "spillway.toml")
    assert default_axes(spill) == ("horizontal_ratio", "temperature")
    with pytest.raises(CaseError, match="fixes distortion"):
        design_map(spill, ["horizontal_ratio", "distortion"], resolution=11)
    with pytest.raises(CaseError, match="two different axes"):
        design_map(spill, ["temperature", "temperature"], resolution=11)
    with pytest.raises(CaseError, match="not independent"):
        design_map(spill, ["horizontal_ratio", "vertical_ratio"], resolution=11)


# --------------------------------------------------------------------------------------------
# weight sensitivity


def test_sensitivity_is_reproducible_with_a_seed(river: Case) -> None:
    a = weight_sensitivity(river, samples=150, seed=7)
    b = weight_sensitivity(river, samples=150, seed=7)
    c = weight_sensitivity(river, samples=150, seed=8)
    assert np.array_equal(a.factors, b.factors) and np.array_equal(a.winners, b.winners)
    assert json.dumps(a.to_dict()) == json.dumps(b.to_dict())
    assert not np.array_equal(a.factors, c.factors)
    assert sum(x.wins for x in a.candidates) == 150
    assert np.all((a.factors >= 0.1) & (a.factors <= 10.0))


def test_sensitivity_without_spread_gives_the_solver_answer(river: Case) -> None:
    sens = weight_sensitivity(river, spread=1.0, samples=20)
    sol = solve(river)
    best_ratio = min(
        (a for a in sol.alternatives if a.kind == "ratio" and a.feasible), key=lambda a: a.objective
    )
    assert sens.candidates[sens.nominal].label == f"water {best_ratio.label}"
    assert sens.candidates[sens.nominal].share == 1.0
    assert_allclose(
        sens.candidates[sens.nominal].nominal_objective, best_ratio.objective, rtol=1e-6
    )
    x = next(r for r in sens.ranges if r.name == "horizontal_ratio")
    assert_allclose([x.minimum, x.maximum], sol.design.horizontal_ratio, rtol=1e-6)


def _reweighted(factors: np.ndarray, groups: tuple[str, ...]) -> Case:
    data = tomllib.loads(RIVER.read_text(encoding="utf-8"))
    data = copy.deepcopy(data)
    for g, f in zip(groups, factors, strict=True):
        data["groups"][g]["weight"] = data["groups"][g]["weight"] * float(f)
    return case_from_dict(data, path="reweighted.toml")


def test_sensitivity_samples_agree_with_the_solver_on_reweighted_cases(river: Case) -> None:
    sens = weight_sensitivity(river, samples=40, seed=3)
    names = [r.name for r in sens.ranges]
    for i in (0, 7, 19, 33):
        case = _reweighted(sens.factors[i], sens.groups)
        sol = solve(case)
        assert_allclose(
            sens.optima[i, names.index("horizontal_ratio")], sol.design.horizontal_ratio, rtol=1e-5
        )
        assert_allclose(sens.optima[i, names.index("distortion")], sol.design.distortion, rtol=1e-5)
        best = min(
            (a for a in sol.alternatives if a.kind == "ratio" and a.feasible),
            key=lambda a: a.objective,
        )
        assert sens.candidates[sens.winners[i]].label == f"water {best.label}"


def test_sensitivity_rejects_bad_input(river: Case) -> None:
    with pytest.raises(CaseError, match="spread >= 1"):
        weight_sensitivity(river, spread=0.5)
    with pytest.raises(CaseError, match="at least one sample"):
        weight_sensitivity(river, samples=0)


# --------------------------------------------------------------------------------------------
# the commands


@pytest.fixture(scope="module")
def runner() -> CliRunner:
    return CliRunner()


def test_cli_tradeoff_json_contract(runner: CliRunner, tmp_path: Path) -> None:
    res = runner.invoke(
        app,
        [
            "tradeoff",
            str(RIVER),
            "--between",
            "total",
            "discharge",
            "--points",
            "60",
            "--json",
            "-o",
            str(tmp_path),
        ],
    )
    assert res.exit_code == 0, res.output
    data = json.loads(res.stdout)
    assert data["axes"] == ["total", "discharge"]
    assert len(data["points"]) >= 50
    assert isinstance(data["knee"], int) and 0 <= data["knee"] < len(data["points"])
    first = data["points"][0]
    assert len(first["values"]) == 2
    assert set(first["design"]) >= {
        "fluid",
        "temperature",
        "horizontal_ratio",
        "vertical_ratio",
        "velocity_ratio",
        "distortion",
    }
    assert data["chosen"]["fluid"] == "water"
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "tradeoff_total_discharge.csv",
        "tradeoff_total_discharge.png",
        "tradeoff_total_discharge.svg",
    ]


def test_cli_map_and_sensitivity(runner: CliRunner, tmp_path: Path) -> None:
    res = runner.invoke(
        app,
        [
            "map",
            str(RIVER),
            "--axes",
            "horizontal_ratio",
            "distortion",
            "--resolution",
            "21",
            "--json",
            "-o",
            str(tmp_path),
        ],
    )
    assert res.exit_code == 0, res.output
    data = json.loads(res.stdout)
    assert data["axes"] == ["horizontal_ratio", "distortion"]
    assert len(data["objective"]) == 21 and len(data["objective"][0]) == 21
    assert "limits.discharge.max" in data["limits"]
    args = ["sensitivity", str(RIVER), "--samples", "50", "--seed", "5", "-o", str(tmp_path)]
    one = runner.invoke(app, args)
    two = runner.invoke(app, args)
    assert one.exit_code == 0, one.output
    assert one.stdout == two.stdout
    assert "water 1:100" in one.stdout and "Traceback" not in one.stdout


def test_cli_bad_axis_exits_2_with_one_line(runner: CliRunner, tmp_path: Path) -> None:
    res = runner.invoke(
        app, ["tradeoff", str(RIVER), "--between", "total", "nonsense", "-o", str(tmp_path)]
    )
    assert res.exit_code == 2
    lines = [ln for ln in res.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and lines[0].startswith("error:") and "unknown axis" in lines[0]
    assert "Traceback" not in res.output
