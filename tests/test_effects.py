"""Scale effects: friction laws, thresholds, regimes, consequences and the tolerance search.

Validation tests name their source beside each check and say how it was seen: the ``fluids``
library (Bell, C.) for Colebrook-White and Haaland; White, F. M., Fluid Mechanics, eq. 6.63
table (figures as printed there) for the fully rough limit; laws evaluated by hand (the
ITTC-1957 line, isentropic flow, capillary-gravity waves). The threshold table is not retyped
here: its rows are checked for sources, for tags the answer's legend explains, for source text
that states the number enforced, and for the physics their sources claim.
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
def test_ittc_1957_line_formula_by_hand(re, cf):
    # ITTC (1957) line C_F = 0.075 / (log10 Re - 2)^2 (formula from ITTC procedure 7.5-02-02-02,
    # from memory), evaluated by hand and rounded to 4 significant digits: atol half a unit
    assert_allclose(ittc_1957(re), cf, atol=5e-7)


def test_strickler_law_gives_a_median_grain_size():
    # Strickler (1923), from memory: n = d50^(1/6) / 21.1 with d50 in metres. The function
    # returns the d50 that gives n, so the law must hold at its answer; n = 0.020 is d50 = 5.6
    # mm by hand ((21.1 x 0.020)^6 = 0.4220^6 m)
    d50 = strickler_roughness(0.020)
    assert_allclose(d50 ** (1 / 6) / 21.1, 0.020, rtol=1e-12)
    assert_allclose(d50, 0.4220**6, rtol=1e-3)


# --- the threshold library -------------------------------------------------------------------


def test_every_threshold_has_a_source_and_a_tag_the_legend_explains():
    # the answer prints TAG_LEGEND once to explain the tags: every row's tag must be one of them
    from compromise.review.wording import TAG_LEGEND, TAGS

    assert all(f"{tag} =" in TAG_LEGEND for tag in TAGS)
    for t in THRESHOLDS:
        assert t.source and t.status in TAGS, t.name
        assert t.phenomenon in PHENOMENA
        assert (t.failing <= t.passing) if t.kind == "min" else (t.failing >= t.passing)
    names = [(t.phenomenon, t.name) for t in THRESHOLDS]
    assert len(names) == len(set(names))


def _spellings(value: float, unit: str) -> list[str]:
    """How a source sentence may write a threshold value: 2000, 4e4, 0.35, 2 cm."""
    exponent = math.floor(math.log10(value))
    mantissa = value / 10**exponent
    out = [f"{value:g}", f"{mantissa:g}e{exponent}"]
    if unit == "m":
        out.append(f"{value * 100:g} cm")
    return out


@pytest.mark.parametrize(
    "threshold",
    [t for t in THRESHOLDS if t.status in ("found", "from memory")],
    ids=lambda t: f"{t.phenomenon}.{t.name}",
)
def test_threshold_source_states_the_numbers_enforced(threshold):
    # A reviewer reads the source beside the verdict: the figures it cites must be the ones the
    # check enforces (a cited 0.008 beside an enforced 0.009 is the contradiction to catch).
    # Physics rows are computed and common-practice rows state a range in words; both skipped.
    import re

    t = threshold
    for value in {t.failing, t.passing}:
        pattern = "|".join(
            rf"(?<![\d.]){re.escape(s)}(?![\d]|\.\d|e\d)" for s in _spellings(value, t.unit)
        )
        assert re.search(pattern, t.source), (value, t.source)


def test_wave_basin_limit_is_a_water_depth_hughes1993():
    # Hughes (1993) as listed in Heller (2011), Table 2 (from memory): the 2 cm floor is a
    # water depth, not a wave height; the period floor is 0.35 s
    rows = {t.name: t for t in thresholds_for("waves")}
    assert rows["depth"].expression == "water_depth" and rows["depth"].unit == "m"
    assert rows["period"].expression == "wave_period" and rows["period"].unit == "s"
    assert "wave_height" not in {n for t in rows.values() for n in t.expression.split()}


def test_compressibility_threshold_keeps_density_within_5_percent_isentropic():
    # physics the row's source claims: isentropic perfect gas, gamma = 1.4, rho0/rho =
    # (1 + (gamma - 1)/2 M^2)^(1/(gamma - 1)); at the enforced Mach number the density change
    # is 4.56 % (by hand: 1.018^2.5 = 1.0456), within the 5 % the source names
    (t,) = thresholds_for("compressibility")
    gamma = 1.4
    change = (1 + (gamma - 1) / 2 * t.passing**2) ** (1 / (gamma - 1)) - 1
    assert_allclose(change, 0.0456, atol=5e-5)
    assert "1.0456" in t.source
    assert change < 0.05


def test_capillary_threshold_is_one_at_the_minimum_wave_speed_lamb1932():
    # Linear capillary-gravity waves (Lamb 1932, from memory): c_min = (4 g sigma / rho)^(1/4),
    # 0.231 m/s at wavelength 2 pi (sigma / (rho g))^(1/2) = 17.1 mm for water at 20 degC
    # (IAPWS properties; figures by hand, rounded). The code's threshold expression must give
    # 1 at that speed, its passing value.
    from compromise import expressions as ex
    from compromise.physics.fluids import get_fluid

    (t,) = [t for t in thresholds_for("surface_tension") if t.name == "capillary_speed"]
    p = get_fluid("water").properties(293.15)
    env = {"velocity": 0.231, "g": 9.80665, "sigma": p.surface_tension, "rho": p.density}
    assert_allclose(float(ex.evaluate(ex.parse(t.expression), env)), t.passing, atol=2.5e-3)
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
    assert "phenomena.chute_aeration.weber" in sol.conflict.keys


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


def test_distorted_model_needs_added_grains_and_agrees_with_the_scales():
    # X = 1:500, Y = 1:100, prototype n = 0.021: the model needs a rougher bed than acrylic or
    # glass (normal values 0.009-0.010, Chow 1959 Table 5-6, from memory). The consequence and
    # the quantities table must give the same model n (one answer, two places); the grains
    # follow Strickler's law on d50 (from memory).
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
    quantity = sol.evaluation.conditions[0].quantities["manning_n"]
    assert_allclose(man.values["n_model"], quantity.model, rtol=1e-12)
    assert man.values["n_model"] > 0.010
    assert man.flag == "warning"
    assert_allclose(man.values["added_roughness"], strickler_roughness(quantity.model), rtol=1e-12)
    assert "d50 =" in man.message and "ks =" not in man.message


def test_model_smoother_than_acrylic_is_flagged():
    # an undistorted model of a very smooth prototype: n_m = n_p * X^(1/6) = 0.0056, below the
    # normal value of acrylic, 0.009 (Chow 1959, Table 5-6, from memory); the message names
    # which of the table's values it uses
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
    assert "normal values" in man.message and "0.009" in man.message


def test_glycerol_model_fluid_surface_tension_is_reported_as_an_estimate():
    # glycerol-water surface tension is an estimate (no published mixture data checked): the
    # answer names it and every group and threshold whose value uses it
    case = case_from_dict(
        {
            "prototype": {
                "fluid": "water",
                "temperature": "20 degC",
                "quantities": {
                    "depth": {"value": "0.5 m", "axis": "vertical"},
                    "velocity": "1.2 m/s",
                },
            },
            "groups": {"froude": {"exact": True}, "weber": {"weight": 1}},
            "model": {
                "horizontal_ratio": "1:10",
                "distortion": 1,
                "fluids": ["glycerol-water 20%"],
                "temperature": "20 degC",
            },
            "phenomena": ["surface_tension"],
        },
        path="glycerol.toml",
    )
    eff = solve(case, alternatives=False).effects
    (note,) = eff.estimates
    assert note.startswith("model fluid glycerol-water 20%: surface tension is an estimate")
    assert "group weber" in note and "threshold surface_tension.capillary_speed" in note
    assert "surface_tension.min_depth" not in note  # a depth, no surface tension in it
    d = eff.to_dict()
    assert d["estimates"] == [note]
    from compromise.review.wording import TAG_LEGEND

    assert d["tag_legend"] == TAG_LEGEND


def test_solve_text_explains_the_tags_once():
    # the effects section shows source tags (from memory, found, ...): one line explains them
    from typer.testing import CliRunner

    from compromise.cli import app
    from compromise.review.wording import TAG_LEGEND

    out = CliRunner().invoke(app, ["solve", "cases/spillway.toml"]).output
    assert "from memory" in out and out.count(TAG_LEGEND) == 1


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
    # USBR research project 21200 (project summary seen): distorted models below 5, up to 10
    # judged feasible for quantitative results; verdicts pass / marginal / fail around them
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
