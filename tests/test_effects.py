"""Scale effects: friction laws, thresholds, regimes, consequences and the tolerance search.

Validation tests name their source beside each check.
"""

from __future__ import annotations

import math

import pytest
from numpy.testing import assert_allclose

from compromise.casefile.load import case_from_dict, load_case
from compromise.physics.friction import (
    friction_factor,
    friction_factor_colebrook,
    friction_factor_fully_rough,
    friction_factor_haaland,
    ittc_1957,
    strickler_roughness,
)
from compromise.physics.thresholds import PHENOMENA, THRESHOLDS, thresholds_for
from compromise.review.answer import solve
from compromise.review.effects import reynolds_tolerance

# --- friction laws ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("re", "rr"),
    [(1e4, 0.0), (1e5, 1e-4), (1e5, 0.0), (1e6, 1e-4), (1e6, 1e-3), (1e8, 1e-2), (3e3, 5e-2)],
)
def test_colebrook_against_fluids_library(re, rr):
    fluids = pytest.importorskip("fluids")
    # fluids.friction.Colebrook (Bell, C., fluids library) solves the same equation exactly
    assert_allclose(
        friction_factor_colebrook(re, rr), fluids.friction.Colebrook(re, rr), rtol=1e-12
    )


def test_colebrook_1939_check_value():
    # Re 1e5, ks/D 1e-4 -> 0.018514 (fluids library, printed to 6 digits)
    assert round(friction_factor_colebrook(1e5, 1e-4), 6) == 0.018514


@pytest.mark.parametrize(
    ("rr", "f"),
    [(0.00001, 0.00806), (0.0001, 0.0120), (0.001, 0.0196), (0.01, 0.0379), (0.05, 0.0716)],
)
def test_fully_rough_white_fluid_mechanics_eq_6_63(rr, f):
    # White, F. M., Fluid Mechanics, eq. 6.63 table, printed to 3 significant digits
    assert_allclose(friction_factor_fully_rough(rr), f, rtol=6e-3)


def test_haaland_1983_against_fluids_library():
    fluids = pytest.importorskip("fluids")
    for re, rr in [(1e5, 1e-4), (1e6, 1e-3), (1e4, 0.0)]:
        assert_allclose(
            friction_factor_haaland(re, rr), fluids.friction.Haaland(re, rr), rtol=1e-12
        )


def test_laminar_hagen_poiseuille():
    assert friction_factor(1000.0, 1e-3) == pytest.approx(0.064, rel=1e-15)


@pytest.mark.parametrize(
    ("re", "cf"),
    [(1e6, 0.004687), (3e6, 0.003742), (5e6, 0.003397), (1e7, 0.003000), (1e9, 0.001531)],
)
def test_ittc_1957_line(re, cf):
    # ITTC (1957), C_F = 0.075 / (log10 Re - 2)^2, values printed to 4 significant digits
    assert_allclose(ittc_1957(re), cf, atol=5e-7)


def test_strickler_roughness_inverse():
    # Strickler: n = ks^(1/6) / 21.1 (SI), from memory; round trip
    ks = strickler_roughness(0.020)
    assert_allclose(ks ** (1 / 6) / 21.1, 0.020, rtol=1e-12)


# --- the threshold library -------------------------------------------------------------------


def test_every_threshold_has_a_source_and_status():
    for t in THRESHOLDS:
        assert t.source and t.status in {"found", "from memory", "common practice", "physics"}
        assert t.phenomenon in PHENOMENA
        assert (t.failing <= t.passing) if t.kind == "min" else (t.failing >= t.passing)


@pytest.mark.parametrize(
    ("phenomenon", "name", "failing", "passing"),
    [
        ("open_channel", "turbulent", 500.0, 2000.0),  # Chow (1959)
        ("rough_wall", "fully_rough", 5.0, 70.0),  # Nikuradse (1933)
        ("surface_tension", "min_depth", 0.015, 0.03),  # common practice
        ("waves", "period", 0.35, 0.35),  # Hughes (1993) via Heller (2011)
        ("waves", "height", 0.02, 0.02),
        ("hydraulic_jump", "reynolds", 4e4, 1e5),  # Wang & Chanson 2016; Chanson & Murzyn 2008
        ("chute_aeration", "weber", 140.0, 140.0),  # Pfister & Chanson (2014)
        ("intake_vortex", "radial_reynolds", 3e4, 3e4),  # Anwar, Weller & Amphlett (1978)
        ("intake_vortex", "weber", 1e4, 1e4),
        ("rubble_mound", "reynolds", 3e4, 3e4),  # Dai & Kamel (1969)
        ("ship_resistance", "reynolds", 2e6, 5e6),  # common practice
        ("compressibility", "mach", 0.3, 0.3),
        ("distortion", "ratio", 10.0, 5.0),  # USBR research project 21200 (found)
    ],
)
def test_threshold_values(phenomenon, name, failing, passing):
    t = next(t for t in thresholds_for(phenomenon) if t.name == name)
    assert (t.failing, t.passing) == (failing, passing)


def test_capillary_wave_minimum_speed_dispersion_relation():
    # c_min = (4 g sigma / rho)^(1/4) = 0.231 m/s for water at 20 degC (computed, physics)
    from compromise.physics.fluids import get_fluid

    p = get_fluid("water").properties(293.15)
    c_min = (4 * 9.80665 * p.surface_tension / p.density) ** 0.25
    assert_allclose(c_min, 0.231, atol=5e-4)
    lam = 2 * math.pi * math.sqrt(p.surface_tension / (p.density * 9.80665))
    assert_allclose(lam, 0.0171, atol=1e-4)


# --- assessment of bundled cases -------------------------------------------------------------


@pytest.fixture(scope="module")
def spillway():
    return solve(load_case("cases/spillway.toml"))


def test_spillway_thresholds_judged_per_condition(spillway):
    eff = spillway.effects
    jump = {
        c.condition: c
        for c in eff.checks
        if c.threshold.name == "reynolds" and c.threshold.phenomenon == "hydraulic_jump"
    }
    assert set(jump) == {"low", "mean", "flood"}
    # verdicts follow the band 4e4 (fail below) .. 1e5 (pass at or above)
    for c in jump.values():
        expect = "pass" if c.model >= 1e5 else "marginal" if c.model >= 4e4 else "fail"
        assert c.verdict == expect
    # the model value is V d / nu of the model: check one against the evaluation
    low = next(c for c in spillway.evaluation.conditions if c.name == "low")
    assert_allclose(jump["low"].model, low.groups["reynolds"].model, rtol=1e-12)
    assert any("fails" in r for r in eff.risks)


def test_enforce_thresholds_makes_them_hold():
    case = load_case("cases/breakwater.toml")
    sol = solve(case, enforce_thresholds=True)
    assert sol.status == "optimal"
    for c in sol.effects.checks:
        assert c.verdict == "pass"


def test_enforce_thresholds_can_make_a_case_infeasible():
    # the spillway's aeration floor (We^0.5 >= 140) cannot hold with its pump: an answer
    sol = solve(load_case("cases/spillway.toml"), enforce_thresholds=True)
    assert sol.status == "infeasible"
    assert any(k.startswith("groups.chute_aeration.weber") for k in sol.conflict.keys)


def test_regime_change_is_the_first_risk():
    case = case_from_dict(
        {
            "prototype": {
                "fluid": "water",
                "temperature": "20 degC",
                "quantities": {
                    "depth": {"value": "0.5 m", "axis": "vertical"},
                    "velocity": "0.4 m/s",
                    "reach": "100 m",
                },
            },
            "groups": {"froude": {"exact": True}, "reynolds": {"weight": 1}},
            "model": {"horizontal_ratio": {"min": "1:500", "max": "1:200"}, "distortion": 1},
            "phenomena": ["open_channel"],
        },
        path="laminar.toml",
    )
    sol = solve(case)
    eff = sol.effects
    reg = next(r for r in eff.regimes if r.group == "reynolds")
    assert (reg.prototype, reg.model) == ("turbulent", "laminar")
    assert eff.risks[0].startswith("regime change")


def test_distorted_manning_needs_rougher_model_chow1959():
    # X = 1:500, Y = 1:100, prototype n = 0.021: wide-channel model n = 0.0218 (printed)
    case = case_from_dict(
        {
            "prototype": {
                "fluid": "water",
                "temperature": "20 degC",
                "quantities": {
                    "depth": {"value": "5 m", "axis": "vertical"},
                    "width": "120 m",
                    "velocity": "2.5 m/s",
                    "manning_n": 0.021,
                },
            },
            "groups": {"froude": {"exact": True}},
            "model": {"horizontal_ratio": "1:500", "distortion": 5},
        },
        path="distorted.toml",
    )
    sol = solve(case)
    man = next(c for c in sol.effects.consequences if c.kind == "manning")
    assert_allclose(man.values["n_model"], 0.0218, atol=5e-5)
    assert man.flag == "warning"  # rougher than glass or acrylic (0.009-0.010, Chow 1959)


def test_model_smoother_than_glass_is_flagged():
    # an undistorted model of a very smooth prototype: n_m = n_p * X^(1/6) < 0.009
    case = case_from_dict(
        {
            "prototype": {
                "fluid": "water",
                "temperature": "20 degC",
                "quantities": {
                    "depth": {"value": "3 m", "axis": "vertical"},
                    "velocity": "2 m/s",
                    "manning_n": 0.012,
                },
            },
            "groups": {"froude": {"exact": True}},
            "model": {"horizontal_ratio": "1:100", "distortion": 1},
        },
        path="smooth.toml",
    )
    man = next(c for c in solve(case).effects.consequences if c.kind == "manning")
    assert_allclose(man.values["n_model"], 0.012 * 100 ** (-1 / 6), rtol=1e-9)
    assert man.flag == "infeasible"


def test_towing_tank_ittc_correction():
    sol = solve(load_case("cases/towing_tank.toml"))
    itt = next(c for c in sol.effects.consequences if c.kind == "ittc")
    assert_allclose(itt.values["cf_model"], ittc_1957(itt.values["reynolds_model"]), rtol=1e-12)
    assert itt.values["correction"] > 0


def test_tolerance_pipe_rig_bias_at_the_answer():
    case = load_case("cases/pipe_rig.toml")
    tol = reynolds_tolerance(case, "pressure_drop", 0.02)
    rr = tol.relative_roughness
    f = friction_factor(tol.reynolds_min, rr) / friction_factor(tol.reynolds_prototype, rr)
    assert_allclose(f - 1, 0.02, rtol=1e-8)
    assert tol.reynolds_min < tol.reynolds_prototype


def test_tolerance_river_depth_uses_cube_root():
    case = load_case("cases/river_bend.toml")
    t5 = reynolds_tolerance(case, "head_loss", 0.05)
    td = reynolds_tolerance(case, "depth", 0.05)
    assert td.reynolds_min <= t5.reynolds_min  # depth ~ f^(1/3) tolerates more
    assert "Colebrook" in t5.basis


def test_every_bundled_case_reports_effects():
    from pathlib import Path

    for path in sorted(Path("cases").glob("*.toml")):
        sol = solve(load_case(path), alternatives=False)
        d = sol.to_dict()
        assert "effects" in d, path
        assert d["effects"]["thresholds"], path


def test_tolerance_command(tmp_path):
    import json

    from typer.testing import CliRunner

    from compromise.cli import app

    r = CliRunner().invoke(
        app,
        [
            "tolerance",
            "cases/pipe_rig.toml",
            "--quantity",
            "pressure_drop",
            "--within",
            "2%",
            "--json",
        ],
    )
    assert r.exit_code == 0, r.output
    d = json.loads(r.output)
    assert d["tolerance"]["reynolds_min"] < d["tolerance"]["reynolds_prototype"]
    r = CliRunner().invoke(app, ["tolerance", "cases/pipe_rig.toml", "--quantity", "speed"])
    assert r.exit_code == 2
    assert "--quantity" in r.output and "Traceback" not in r.output
    r = CliRunner().invoke(
        app,
        ["tolerance", "cases/river_bend.toml", "--quantity", "depth", "--within", "5%", "--apply"],
    )
    assert r.exit_code == 0, r.output
    assert "With the floor reynolds >=" in r.output


def test_regimes_only_where_they_mean_something():
    # a towed hull: Reynolds on its length against the towing-tank range (2e6-5e6, common
    # practice); no sub/supercritical label for a Froude number on a horizontal length
    sol = solve(load_case("cases/towing_tank.toml"), alternatives=False)
    kinds = {(r.group, r.kind) for r in sol.effects.regimes}
    assert ("reynolds", "viscous") in kinds
    assert ("froude", "froude") not in kinds
    # a spillway's Froude number on the toe depth is supercritical in model and prototype
    sol = solve(load_case("cases/spillway.toml"), alternatives=False)
    froude = [r for r in sol.effects.regimes if r.group == "froude"]
    assert froude and all(r.prototype == r.model == "supercritical" for r in froude)


@pytest.mark.parametrize(
    ("distortion", "verdict"), [(3.0, "pass"), (7.0, "marginal"), (12.0, "fail")]
)
def test_distortion_threshold_usbr(distortion, verdict):
    # USBR research project 21200: quantitative data below 5, up to 10 feasible
    case = case_from_dict(
        {
            "prototype": {
                "fluid": "water",
                "temperature": "15 degC",
                "quantities": {
                    "depth": {"value": "4 m", "axis": "vertical"},
                    "velocity": "1.5 m/s",
                },
            },
            "groups": {"froude": {"exact": True}},
            "model": {"horizontal_ratio": "1:400", "distortion": distortion},
            "phenomena": ["distortion"],
        },
        path="distorted.toml",
    )
    sol = solve(case, alternatives=False)
    check = next(c for c in sol.effects.checks if c.threshold.phenomenon == "distortion")
    assert check.model == pytest.approx(distortion, rel=1e-12)
    assert check.verdict == verdict
    # the design bound stays the case's: enforcing thresholds adds no group for it
    assert solve(case, enforce_thresholds=True, alternatives=False).status == "optimal"
