"""The granular material as a decision (issue 14, part B): the solver chooses the model material
and grain size of a movable bed or an armour layer.

Oracles: the definitions of the Shields parameter and particle Reynolds number (Shields 1936,
from memory), the uniform-flow shear velocity u* = (g R S)^1/2 (Chow 1959, from memory), the
critical Shields value of Soulsby & Whitehouse (1997) with its check values (0.0478 at 0.2 mm,
0.0314 at 1 mm for R = 1.65 in water at 20 degC, computed from the published formula), the
armour stability number Hs / (Delta Dn50) (Hudson 1959; Van der Meer 1988, from memory) and
a brute-force search independent of the solver.
"""

from __future__ import annotations

import copy
import itertools
import math
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.casefile.load import case_from_dict, load_case
from compromise.cli import app
from compromise.physics.fluids import get_fluid
from compromise.physics.materials import COHESION_LIMIT, get_material
from compromise.solving.design import Design, evaluate_design
from compromise.solving.optimum import find_optimum

ROOT = Path(__file__).resolve().parents[1]
G = 9.80665


def theta_cr_sw1997(d: float, R: float, nu: float) -> float:
    """Soulsby & Whitehouse (1997), written out here as the oracle."""
    d_star = d * (G * R / nu**2) ** (1 / 3)
    return 0.30 / (1 + 1.2 * d_star) + 0.055 * (1 - math.exp(-0.020 * d_star))


def test_soulsby_whitehouse_1997_oracle_check_values() -> None:
    # the oracle itself against the check values computed from the published formula
    # (R = 1.65, nu = 1.0034e-6 m^2/s): 0.0478 at 0.2 mm, 0.0314 at 1 mm
    assert round(theta_cr_sw1997(2e-4, 1.65, 1.0034e-6), 4) == 0.0478
    assert round(theta_cr_sw1997(1e-3, 1.65, 1.0034e-6), 4) == 0.0314


SMALL = {
    "title": "small movable bed",
    "prototype": {
        "fluid": "water",
        "temperature": "20 degC",
        "quantities": {
            "depth": {"value": "2 m", "axis": "vertical"},
            "velocity": "1 m/s",
            "shear_velocity": "0.06 m/s",
            "grain_size": "0.5 mm",
        },
    },
    "groups": {
        "froude": {"length": "depth", "exact": True},
        "shields": {"weight": 1},
        "particle_reynolds": {"weight": 0.5},
    },
    "sediment": {
        "material": "quartz sand",
        "materials": ["anthracite"],
        "grain_size": {"min": "0.1 mm", "max": "0.6 mm"},
    },
    "model": {
        "horizontal_ratio": {"min": "1:100", "max": "1:20"},
        "distortion": {"min": 1, "max": 3},
        "fluids": ["water"],
        "temperature": "20 degC",
    },
    "limits": {"depth": {"min": "5 cm"}},
}


def _brute_objective(x: float, z: float, w: float, R_p: float, R_m: float, nu: float) -> float:
    """Weighted mismatch from the groups' definitions (Shields 1936; u* = (g R S)^1/2 scales
    as Y / X^1/2 under equal gravity, Chow 1959), independent of the solver's rows."""
    X, Y, dr = math.exp(x), math.exp(z), math.exp(w)
    us_p, d_p = 0.06, 5e-4
    us_m, d_m = us_p * Y / math.sqrt(X), d_p * dr
    theta = (us_m**2 / (R_m * G * d_m)) / (us_p**2 / (R_p * G * d_p))
    rep = (us_m * d_m / nu) / (us_p * d_p / nu)
    return math.log(theta) ** 2 + 0.5 * math.log(rep) ** 2


def test_exact_optimum_matches_a_brute_force_over_grain_size_and_ratios() -> None:
    case = case_from_dict(SMALL)
    sol = find_optimum(case, alternatives=False)
    assert sol.status == "optimal" and sol.design is not None
    rho = get_fluid("water").properties(293.15, 101325.0)
    R_p = 2650.0 / rho.density - 1
    R_m = get_material("anthracite").density / rho.density - 1
    nu = rho.kinematic_viscosity
    # brute force: a dense grid over the feasible (x, distortion, w) box, then the best cell
    # refined by a finer grid around it (the Froude group fixes v)
    xs = np.linspace(math.log(1 / 100), math.log(1 / 20), 81)
    ds = np.linspace(0.0, math.log(3), 61)
    ws = np.linspace(math.log(0.1 / 0.5), math.log(0.6 / 0.5), 81)
    best = (math.inf, 0.0, 0.0, 0.0)
    for x, dd, w in itertools.product(xs, ds, ws):
        z = x + dd
        if z < math.log(0.05 / 2):
            continue
        best = min(best, (_brute_objective(x, z, w, R_p, R_m, nu), x, dd, w))
    for _ in range(6):
        _, x0, d0, w0 = best
        hx, hd, hw = (xs[1] - xs[0]), (ds[1] - ds[0]), (ws[1] - ws[0])
        xs = np.clip(np.linspace(x0 - hx, x0 + hx, 21), math.log(1 / 100), math.log(1 / 20))
        ds = np.clip(np.linspace(d0 - hd, d0 + hd, 21), 0.0, math.log(3))
        ws = np.clip(np.linspace(w0 - hw, w0 + hw, 21), math.log(0.2), math.log(1.2))
        for x, dd, w in itertools.product(xs, ds, ws):
            if x + dd < math.log(0.05 / 2):
                continue
            best = min(best, (_brute_objective(x, x + dd, w, R_p, R_m, nu), x, dd, w))
    assert sol.objective <= best[0] + 1e-12  # the exact solve is never beaten
    assert sol.objective == pytest.approx(best[0], rel=1e-6, abs=1e-10)
    # the grain-size ceiling binds (unconstrained, both groups would want about 0.8 mm)
    assert sol.design.grain_size == pytest.approx(6e-4, rel=1e-9)
    assert sol.design.material == "anthracite"
    assert math.log(sol.design.grain_size / 5e-4) == pytest.approx(best[3], abs=2e-3)


def test_moving_bed_floor_binds_at_the_critical_value_of_the_answers_grain() -> None:
    # a prototype near the threshold of motion (theta 0.049) and a quartz model: the model
    # grain that keeps Shields would be below its own critical value (Soulsby & Whitehouse
    # 1997), so the floor binds at the critical value of the grain the answer chooses
    data = copy.deepcopy(SMALL)
    data["prototype"]["quantities"]["shear_velocity"] = "0.02 m/s"
    data["sediment"]["materials"] = ["quartz sand"]
    data["sediment"]["grain_size"] = {"min": "0.1 mm", "max": "2 mm"}
    sol = find_optimum(case_from_dict(data), alternatives=False)
    d = sol.design
    assert d is not None and d.grain_size is not None and sol.sediment is not None
    rho = get_fluid("water").properties(293.15, 101325.0)
    crit = theta_cr_sw1997(d.grain_size, 2650 / rho.density - 1, rho.kinematic_viscosity)
    theta = evaluate_design(sol.case, d).conditions[0].groups["shields"]
    assert theta.prototype < crit * 1.5  # near the threshold
    assert theta.model == pytest.approx(crit, rel=1e-9)
    assert "fixed point" in sol.sediment.path and "round" in sol.sediment.path
    assert sol.sediment.morphological_time_ratio is None  # at the threshold: no transport


def test_breakwater_armour_size_keeps_the_stability_number_hand_derivation() -> None:
    # hand derivation (Hudson 1959; Van der Meer 1988, from memory): equal Hs / (Delta Dn50)
    # needs Dn_r = H_r / Delta_r. Rock 2650 kg/m^3 in seawater 1025 and in fresh water 998:
    # Delta_p = 2650/1025 - 1 = 1.5854, Delta_m = 2650/998 - 1 = 1.6553, so the model stone is
    # the geometric size times 1.5854/1.6553 = 0.9577 (about 4 % smaller)
    hand = (2650 / 1025 - 1) / (2650 / 998 - 1)
    assert round(hand, 4) == 0.9577
    case = load_case(ROOT / "cases" / "breakwater.toml")
    sol = find_optimum(case)
    d = sol.design
    assert d is not None and d.grain_size is not None and sol.sediment is not None
    assert d.material == "crushed granite"  # the lighter stone: larger units, higher Reynolds
    rho_p = get_fluid("seawater").properties(case.temperature, case.pressure).density
    rho_m = get_fluid(d.fluid).properties(d.temperature, d.pressure).density
    factor = (2650 / rho_p - 1) / (get_material(d.material).density / rho_m - 1)
    Dn_r = d.grain_size / 2.2
    assert_allclose(Dn_r / d.vertical_ratio, factor, rtol=1e-9)  # H scales as Y
    # the basin's densities differ a little from the round 1025 / 998 of the hand example
    assert factor == pytest.approx(hand, rel=5e-3)
    ns = evaluate_design(case, d).conditions[0].groups["stability_number"]
    assert ns.model == pytest.approx(ns.prototype, rel=1e-12)
    # the heavier model stone keeps the number too, with smaller units
    basalt = next(a for a in sol.alternatives if a.label == "crushed basalt")
    assert basalt.design is not None and basalt.design.grain_size is not None
    assert basalt.design.grain_size < d.grain_size


def test_movable_bed_case_chooses_a_lightweight_material_above_the_cohesion_limit() -> None:
    case = load_case(ROOT / "cases" / "heron_reach.toml")
    sol = find_optimum(case)
    d = sol.design
    assert d is not None and d.grain_size is not None and d.material is not None
    # quartz scaled with the depth would be cohesive (below 0.1 mm, common practice)
    assert 6e-4 * d.vertical_ratio < COHESION_LIMIT
    assert get_material(d.material).density < 2000.0
    assert d.grain_size >= COHESION_LIMIT
    # the model bed moves: model Shields above Soulsby & Whitehouse's critical value
    ev = evaluate_design(case, d).conditions[0]
    rho = get_fluid(d.fluid).properties(d.temperature, d.pressure)
    R_m = get_material(d.material).density / rho.density - 1
    theta_m = ev.groups["shields"].model
    crit = theta_cr_sw1997(d.grain_size, R_m, rho.kinematic_viscosity)
    assert theta_m > crit
    assert sol.sediment is not None
    assert sol.sediment.critical_shields is not None
    assert sol.sediment.critical_shields[1] == pytest.approx(crit, rel=1e-9)
    # D*^3 = Re_p^2 / theta (the definitions), so the critical value follows D*
    rep = ev.groups["particle_reynolds"].model
    d_star = d.grain_size * (G * R_m / rho.kinematic_viscosity**2) ** (1 / 3)
    assert d_star**3 == pytest.approx(rep**2 / theta_m, rel=1e-9)
    # every scale-effect check of the bundled case passes
    from compromise.review.answer import solve

    answer = solve(case)
    assert answer.effects.checks and all(c.verdict == "pass" for c in answer.effects.checks)


def test_shields_is_off_by_the_distortion_when_quartz_is_scaled_with_the_depth() -> None:
    # u*_r = Y / X^1/2 (Chow 1959, uniform flow) and d_r = Y with the same grains and water:
    # theta_r = u*_r^2 / d_r = Y / X, the distortion
    case = load_case(ROOT / "cases" / "heron_reach.toml")
    X, Y = 1 / 200, 1 / 40
    design = Design(
        "water", case.temperature, case.pressure, X, Y, math.sqrt(Y), "quartz sand", 6e-4 * Y
    )
    g = evaluate_design(case, design).conditions[0].groups["shields"]
    assert g.model / g.prototype == pytest.approx(Y / X, rel=1e-9)
    assert g.mismatch == pytest.approx(math.log(5.0), rel=1e-9)


def test_unknown_material_is_a_one_line_error(tmp_path: Path) -> None:
    text = (ROOT / "cases" / "heron_reach.toml").read_text()
    bad = tmp_path / "bad.toml"
    bad.write_text(text.replace('"anthracite"', '"unobtainium"'))
    res = CliRunner().invoke(app, ["check", str(bad)])
    assert res.exit_code == 2
    assert "sediment.materials[1]" in res.output and "unobtainium" in res.output
    assert "Traceback" not in res.output


def test_map_draws_grain_size_against_the_horizontal_ratio() -> None:
    # every cell is the solver's problem with X and d fixed: no cell beats the optimum, and
    # the cell nearest the optimum is as good up to the grid's spacing
    from compromise.explore.designmap import design_map

    case = load_case(ROOT / "cases" / "heron_reach.toml")
    dmap = design_map(case, ("horizontal_ratio", "grain_size"), resolution=81, n_temperatures=4)
    assert dmap.axes == ("horizontal_ratio", "grain_size")
    assert dmap.optimum is not None and dmap.optimum.grain_size is not None
    finite = dmap.objective[np.isfinite(dmap.objective)]
    assert finite.size and float(finite.min()) >= dmap.optimum_objective - 1e-9
    x_mm = dmap.coordinates(dmap.optimum)[1]
    assert x_mm == pytest.approx(dmap.optimum.grain_size * 1e3)
    assert dmap.grid(1)[0] == pytest.approx(0.1)  # the cohesion limit, in mm
    res = CliRunner().invoke(app, ["map", str(ROOT / "cases" / "heron_reach.toml"), "--json"])
    assert res.exit_code == 0, res.output


def test_breakwater_map_is_ratio_against_temperature_because_the_grain_is_tied() -> None:
    # the stability number kept exactly ties the armour size to the ratio: the grain-size map
    # would be a line no cell hits, so the default map is X against the temperature with the
    # grain decided in each cell; no cell beats the optimum, and the optimum's own cell (1:20,
    # 22 degC, on the grid's corner) has its mismatch
    from compromise.explore.designmap import default_axes, design_map

    case = load_case(ROOT / "cases" / "breakwater.toml")
    assert default_axes(case) == ("horizontal_ratio", "temperature")
    dmap = design_map(case, resolution=31)  # 1:20 is a grid line (1:80 to 1:10)
    assert dmap.optimum is not None
    finite = np.isfinite(dmap.objective)
    assert 0.2 < finite.mean() < 1.0
    assert float(dmap.objective[finite].min()) >= dmap.optimum_objective - 1e-9
    x, t = dmap.coordinates(dmap.optimum)
    i = int(np.argmin(np.abs(np.log(dmap.grid(0) / x))))
    j = int(np.argmin(np.abs(dmap.grid(1) - t)))
    assert dmap.objective[j, i] == pytest.approx(dmap.optimum_objective, rel=1e-6)
    res = CliRunner().invoke(app, ["map", str(ROOT / "cases" / "breakwater.toml"), "--json"])
    assert res.exit_code == 0, res.output
    res = CliRunner().invoke(
        app,
        [
            "map",
            str(ROOT / "cases" / "breakwater.toml"),
            "--axes",
            "horizontal_ratio",
            "grain_size",
        ],
    )
    assert res.exit_code == 2 and "stability_number" in res.output and "line" in res.output


def test_review_of_the_saved_answer_reproduces_the_optimum(tmp_path: Path) -> None:
    # the review of the solver's own answer (material and grain size read back from the
    # saved JSON) has the optimum's weighted mismatch and breaks nothing
    from compromise.casefile.designs import load_design_file
    from compromise.review.proposal import design_from_spec, evaluate

    path = ROOT / "cases" / "heron_reach.toml"
    saved = tmp_path / "answer.json"
    saved.write_text(CliRunner().invoke(app, ["solve", str(path), "--json"]).stdout)
    case = load_case(path)
    design, notes = design_from_spec(case, load_design_file(saved))
    review = evaluate(case, design, notes=notes)
    assert design.material == "polystyrene" and not any("material" in n for n in notes)
    assert review.holds
    assert review.objective == pytest.approx(review.optimum.objective, rel=1e-6)


def test_text_answer_and_report_show_the_material() -> None:
    # the words a user reads carry the choice and its time scales (common practice: a
    # movable-bed run's duration follows the morphological time scale)
    res = CliRunner().invoke(app, ["solve", str(ROOT / "cases" / "heron_reach.toml")])
    assert res.exit_code == 0, res.output
    assert "model material     polystyrene" in res.output
    assert "Granular material:" in res.output and "morphological time ratio" in res.output
    from compromise.presentation.report import build_document, render_markdown
    from compromise.review.report_data import report_data

    data = report_data(
        load_case(ROOT / "cases" / "heron_reach.toml"), resolution=15, points=8, samples=20
    )
    md = render_markdown(build_document(data))
    assert "| model material | polystyrene | - |" in md
    assert "The granular material." in md


def _ferguson_church_2004(d: Any, R: float, nu: float) -> Any:
    """Ferguson & Church (2004), C1 = 18, C2 = 1, written out here as the oracle."""
    return R * G * d**2 / (18 * nu + np.sqrt(0.75 * R * G * d**3))


def test_suspension_rouse_takes_the_nonlinear_path_and_a_brute_force_agrees(
    tmp_path: Path,
) -> None:
    # Rouse P = w_s / (0.40 u*) (Rouse 1937, from memory) with the settling velocity of Ferguson
    # & Church (2004): not a power product of the grain size, so the solve says it took the
    # nonlinear path; at the answer the length ratios sit on two limits (hall length, least
    # depth), so a dense search over the grain size alone is the oracle
    text = (ROOT / "cases" / "heron_reach.toml").read_text()
    text = text.replace(
        'grain_size     = "0.6 mm"', 'settling_velocity = "0.075 m/s"\ngrain_size     = "0.6 mm"'
    ).replace(
        "particle_reynolds = { weight = 0.2 }",
        "particle_reynolds = { weight = 0.2 }\nrouse             = { weight = 0.5 }",
    )
    path = tmp_path / "suspension.toml"
    path.write_text(text)
    sol = find_optimum(load_case(path))
    d = sol.design
    assert d is not None and d.grain_size is not None and sol.sediment is not None
    assert sol.sediment.path.startswith("nonlinear: rouse")
    wp = get_fluid("water").properties(288.15, 101325.0)
    wm = get_fluid("water").properties(d.temperature, d.pressure)
    R_p = 2650 / wp.density - 1
    R_m = get_material(d.material or "").density / wm.density - 1
    us_p = 0.0767
    us_m = us_p * d.vertical_ratio / math.sqrt(d.horizontal_ratio)
    ws_p = _ferguson_church_2004(6e-4, R_p, wp.kinematic_viscosity)

    def objective(dm: np.ndarray) -> np.ndarray:
        ws_m = 0.075 * _ferguson_church_2004(dm, R_m, wm.kinematic_viscosity) / ws_p
        theta = (us_m**2 / (R_m * G * dm)) / (us_p**2 / (R_p * G * 6e-4))
        rep = (us_m * dm / wm.kinematic_viscosity) / (us_p * 6e-4 / wp.kinematic_viscosity)
        rouse = (ws_m / us_m) / (0.075 / us_p)
        return np.log(theta) ** 2 + 0.2 * np.log(rep) ** 2 + 0.5 * np.log(rouse) ** 2

    grid = np.geomspace(1e-4, 5e-3, 200001)
    values = objective(grid)
    k = int(np.argmin(values))
    assert sol.objective == pytest.approx(float(values[k]), rel=1e-6)
    assert sol.objective <= float(values[k]) + 1e-12
    assert d.grain_size == pytest.approx(float(grid[k]), rel=1e-3)
    ev = evaluate_design(sol.case, d).conditions[0].groups["rouse"]
    ws_m = 0.075 * _ferguson_church_2004(d.grain_size, R_m, wm.kinematic_viscosity) / ws_p
    assert ev.model == pytest.approx(ws_m / (0.40 * us_m), rel=1e-9)


def test_granular_front_ends_at_the_optimum_and_no_sampled_design_dominates_it() -> None:
    # the front's least-total end is the solver's answer (same fixed point of the moving-bed
    # floor); a brute force over random designs of every material at the front's temperature
    # finds no feasible design that beats a front point on both axes
    from compromise.explore.granular_front import StateGrid, _Family
    from compromise.explore.tradeoffs import trace_front
    from compromise.solving.granular import GranularProblem

    case = load_case(ROOT / "cases" / "heron_reach.toml")
    front = trace_front(case, ["total", "particle_reynolds"], points=40)
    sol = find_optimum(case)
    v = front.values
    assert len(front.points) >= 20
    assert v[0, 0] == pytest.approx(sol.objective, rel=1e-6)
    assert np.all(np.diff(v[:, 0]) >= -1e-12) and np.all(np.diff(v[:, 1]) <= 1e-12)
    assert all(pt.design.material in case.sediment.materials for pt in front.points)
    gp = GranularProblem(case)
    st = StateGrid(case, gp, 24)
    fam = _Family(gp, list(front.axes), 0, False)
    floor = sol.sediment.critical_shields[1]
    rng = np.random.default_rng(7)
    T = front.points[0].design.temperature
    u0 = np.append(front.points[0].design.logs, math.log(front.points[0].design.grain_size / gp.d0))
    for k in range(len(st.items)):
        p, c = st.at(k, np.array([T]))
        # the hall pins X near 1:200 from above: sample smaller models, any distortion and grain
        du = rng.uniform([-0.1, -0.1, -0.1, -0.6], [0.0, 0.1, 0.1, 0.6], size=(20000, 4))
        u = u0 + du
        e = (gp.e0 + c @ gp.Ec.T + p @ gp.Q.T)[0]  # onto the exact groups' plane (Froude)
        E = gp.E
        u -= (u @ E.T - e) @ np.linalg.solve(E @ E.T, E)
        h = gp.h0 + c @ gp.Hc.T + p @ gp.P.T
        h[:, gp.floor_row] -= math.log(floor)
        ok = np.all(u @ gp.G.T <= h + 1e-9, axis=1)
        assert ok.sum() > 100
        vals = fam.values(u[ok], np.repeat(c, ok.sum(), axis=0))
        for fv in v:
            beats = np.all(vals < fv - 1e-6, axis=1)
            assert not beats.any()


def test_granular_front_cli_table_and_refused_axes(tmp_path: Path) -> None:
    path = str(ROOT / "cases" / "heron_reach.toml")
    res = CliRunner().invoke(
        app, ["tradeoff", path, "--between", "shields", "particle_reynolds", "-o", str(tmp_path)]
    )
    assert res.exit_code == 0, res.output
    assert "material" in res.output and "polystyrene" in res.output
    res = CliRunner().invoke(
        app, ["tradeoff", path, "--between", "shields", "reach_length", "-o", str(tmp_path / "q")]
    )
    assert res.exit_code == 2
    assert "reach_length" in res.output and "Traceback" not in res.output


def test_granular_sensitivity_winners_agree_with_the_solver_at_the_sampled_weights() -> None:
    # candidates are the materials; at the case's weights the winner and its mismatch are the
    # solver's; for sampled weights the winner is the material the solver itself chooses when
    # the case is given those weights (a full solve per sample, the moving-bed floor iterated)
    import tomllib

    from compromise.explore.sensitivity import weight_sensitivity

    path = ROOT / "cases" / "heron_reach.toml"
    case = load_case(path)
    sens = weight_sensitivity(case, spread=30.0, samples=40, seed=3)
    sol = find_optimum(case)
    labels = [c.label for c in sens.candidates]
    assert labels == list(case.sediment.materials)
    assert labels[sens.nominal] == sol.design.material
    assert sens.candidates[sens.nominal].nominal_objective == pytest.approx(sol.objective, rel=1e-6)
    assert sens.ranges[-1].name == "grain_size"
    assert sens.ranges[-1].nominal == pytest.approx(sol.design.grain_size * 1e3, rel=1e-6)
    data = tomllib.loads(path.read_text())
    for i in (0, 17, 39):
        d = copy.deepcopy(data)
        for g, fac in zip(sens.groups, sens.factors[i], strict=True):
            d["groups"][g]["weight"] = d["groups"][g]["weight"] * float(fac)
        mine = find_optimum(case_from_dict(d, path=path), alternatives=False)
        assert labels[int(sens.winners[i])] == mine.design.material
    again = weight_sensitivity(case, spread=30.0, samples=40, seed=3)
    assert np.array_equal(again.winners, sens.winners)
    res = CliRunner().invoke(app, ["sensitivity", str(path), "--samples", "50", "--json"])
    assert res.exit_code == 0, res.output


def test_scales_of_a_sediment_case_choose_the_solvers_material_and_grain() -> None:
    # at the solver's own ratios and fluid state, the least-mismatch grain for those ratios is
    # the optimum's grain (the optimum minimises over the grain too; its floor does not bind
    # here: common practice, the model bed must move, and it does at 2.1 mm)
    case = load_case(ROOT / "cases" / "heron_reach.toml")
    sol = find_optimum(case, alternatives=False)
    d = sol.design
    assert d is not None and d.grain_size is not None
    from compromise.solving.scales import scale_table

    table = scale_table(
        case,
        d.horizontal_ratio,
        vertical=d.vertical_ratio,
        fluid=d.fluid,
        temperature=d.temperature,
    )
    assert table.design.material == d.material == "polystyrene"
    # (to the solver's 1e-10 tie-break regularisation, which leans the grain a little)
    assert table.design.grain_size == pytest.approx(d.grain_size, rel=1e-6)
    res = CliRunner().invoke(
        app,
        [
            "scales",
            str(ROOT / "cases" / "heron_reach.toml"),
            "--ratio",
            "1:200",
            "--vertical",
            "1:42.857142857142854",
            "--temperature",
            "12 degC",
        ],
    )
    assert res.exit_code == 0, res.output
    assert "model material     polystyrene" in res.output
    assert "model grain size   2.108 mm" in res.output
