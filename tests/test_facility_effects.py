"""Pressure and facility effects: the cavitation index in a depressurised model, blockage of a
test section, and a towing tank's depth and width.

Oracles outside the project:

* water's vapour pressure and density at the saturation line: IAPWS-95 (Wagner, W., Pruss, A.
  (2002), J. Phys. Chem. Ref. Data 31, 387) through the ``iapws`` library;
* the Froude-similarity derivation of the tank pressure, written out in the test;
* hand calculations of the blockage corrections of Barlow, Rae & Pope (1999) and Maskell (1963)
  (formulas from memory, see :mod:`compromise.physics.blockage`).
"""

from __future__ import annotations

import copy
import math
from pathlib import Path
from typing import Any

import iapws
import pytest

from compromise.casefile.load import case_from_dict, load_case
from compromise.errors import CaseErrors
from compromise.physics.blockage import (
    continuity_speed_factor,
    maskell_blockage,
    simple_blockage,
)
from compromise.physics.thresholds import thresholds_for
from compromise.review.answer import solve
from compromise.review.effects import check_thresholds
from compromise.solving.design import Design, evaluate_design
from compromise.solving.grid import FluidStates
from compromise.solving.optimum import find_optimum
from compromise.solving.problem import build_problem

CASES = Path(__file__).resolve().parent.parent / "cases"
G = 9.80665
ATM = 101325.0


def iapws_saturated(t_kelvin: float) -> tuple[float, float]:
    """(vapour pressure [Pa], density of the saturated liquid [kg/m^3]), IAPWS-95."""
    w = iapws.IAPWS95(T=t_kelvin, x=0)
    return w.P * 1e6, w.rho


def froude_cavitation_case(pressure: Any = None) -> dict[str, Any]:
    """An undistorted Froude model at 1:25 in the same water at 20 degC: a chute whose surface
    lies 2 m below the free surface, flow at 12 m/s; the cavitation index weighted."""
    model: dict[str, Any] = {
        "horizontal_ratio": {"min": "1:25", "max": "1:25"},
        "distortion": 1,
        "fluids": ["water"],
        "temperature": "20 degC",
    }
    if pressure is not None:
        model["pressure"] = pressure
    return {
        "title": "1:25 cavitation",
        "prototype": {
            "fluid": "water",
            "temperature": "20 degC",
            "quantities": {
                "depth": {"value": "2 m", "axis": "vertical"},
                "velocity": "12 m/s",
            },
        },
        "groups": {"froude": {"exact": True}, "cavitation": {"weight": 1}},
        "model": model,
    }


def test_cavitation_index_froude_1_to_25_tank_pressure_iapws95() -> None:
    # Derivation. sigma = (p_a + rho g h - p_v) / (rho V^2 / 2). Froude at 1:25 with the same
    # water: V_r = 25^-1/2, rho_r = 1, so the dynamic pressure scales 1:25; the head rho g h
    # scales as h, 1:25. Equal sigma needs (p_a + rho g h - p_v) to scale 1:25, hence
    #   p_a,m = p_v + (p_a,p - p_v) / 25   (the head terms cancel),
    # the absolute pressure above vapour pressure 1/25 of the prototype's.
    p_v, _ = iapws_saturated(293.15)
    expected = p_v + (ATM - p_v) / 25.0
    case = case_from_dict(froude_cavitation_case({"min": "3 kPa", "max": "1 atm"}))
    sol = find_optimum(case)
    assert sol.status == "optimal"
    assert sol.design is not None
    assert sol.design.horizontal_ratio == pytest.approx(1 / 25, rel=1e-9)
    assert sol.design.velocity_ratio == pytest.approx(1 / 5, rel=1e-9)
    # the chosen tank pressure (about 6.3 kPa) against the derivation
    assert sol.design.pressure == pytest.approx(expected, rel=2e-3)
    cav = sol.evaluation.conditions[0].groups["cavitation"]
    assert abs(cav.mismatch) < 1e-3
    # and the prototype index itself, by hand with IAPWS-95 water at 20 degC
    p_v, rho = iapws_saturated(293.15)
    sigma_p = (ATM + rho * G * 2.0 - p_v) / (0.5 * rho * 12.0**2)
    assert cav.prototype == pytest.approx(sigma_p, rel=1e-3)


def test_cavitation_at_atmospheric_pressure_is_not_kept() -> None:
    # Without a pressure range the liquid stays at one atmosphere (the behaviour of every
    # liquid case before the cavitation index): the model's sigma is ~25 times too high
    # (ambient pressure not scaled), by the same derivation as above.
    case = case_from_dict(froude_cavitation_case())
    fs = FluidStates(case, "water", build_problem(case).used_properties)
    assert fs.pressures().tolist() == [ATM]
    sol = find_optimum(case)
    assert sol.design is not None and sol.design.pressure == ATM
    p_v, rho = iapws_saturated(293.15)
    sigma_p = (ATM + rho * G * 2.0 - p_v) / (0.5 * rho * 144.0)
    sigma_m = (ATM + rho * G * 2.0 / 25 - p_v) / (0.5 * rho * 144.0 / 25)
    cav = sol.evaluation.conditions[0].groups["cavitation"]
    assert cav.model / cav.prototype == pytest.approx(sigma_m / sigma_p, rel=1e-3)


def test_liquid_pressure_range_without_cavitation_searches_one_pressure() -> None:
    data = froude_cavitation_case({"min": "3 kPa", "max": "1 atm"})
    data["groups"] = {"froude": {"exact": True}, "reynolds": {"weight": 1}}
    case = case_from_dict(data)
    fs = FluidStates(case, "water", build_problem(case).used_properties)
    assert fs.pressures().size == 1  # no group names the ambient pressure


def test_spillway_cavitation_check_falvey_1990_per_condition() -> None:
    # Falvey (1990), USBR Engineering Monograph 42 (from memory): a chute surface needs no
    # protection above sigma ~1.8 and must change design below ~0.25. The prototype index at
    # the basin entrance is computed by hand from IAPWS-95 water at 8 degC.
    case = load_case(CASES / "spillway.toml")
    (t,) = [t for t in thresholds_for("cavitation") if t.name == "chute_surface"]
    assert (t.failing, t.passing, t.kind) == (0.25, 1.8, "min")
    design = Design("water", 293.15, ATM, 1 / 25, 1 / 25, 0.2)
    ev = evaluate_design(case, design)
    checks = [c for c in check_thresholds(case, ev) if c.threshold.phenomenon == "cavitation"]
    assert [c.condition for c in checks] == [c.name for c in case.conditions]
    p_v, rho = iapws_saturated(281.15)
    p_vm, rho_m = iapws_saturated(293.15)
    for c in checks:
        vals = case.values(c.condition)
        h, v = vals["toe_depth"], vals["velocity"]
        sigma_p = (ATM + rho * G * h - p_v) / (0.5 * rho * v**2)
        sigma_m = (ATM + rho_m * G * h / 25 - p_vm) / (0.5 * rho_m * (v / 5) ** 2)
        assert c.prototype == pytest.approx(sigma_p, rel=2e-3)
        assert c.model == pytest.approx(sigma_m, rel=2e-3)
        assert c.prototype < 1.8  # the prototype chute is in the band that needs protection
        assert c.verdict == "pass"  # the atmospheric model does not cavitate: the scale effect


def test_barlow_rae_pope_1999_simple_blockage_hand_calculation() -> None:
    # eps = S / (4 C) = 0.05 / 4 = 0.0125: V_c = 1.0125 V, q_c = 1.02515625 q
    c = simple_blockage(0.05, 1.0)
    assert c.ratio == pytest.approx(0.05)
    assert c.speed_factor == pytest.approx(1.0125, rel=1e-12)
    assert c.pressure_factor == pytest.approx(1.02515625, rel=1e-12)
    assert c.coefficient_factor == pytest.approx(1 / 1.02515625, rel=1e-12)


def test_maskell_1963_bluff_body_hand_calculation() -> None:
    # C_D = 1.2, S/C = 0.05, m = 5/2: q_c/q = 1 + 2.5 * 1.2 * 0.05 = 1.15; C_Dc = 1.2 / 1.15
    c = maskell_blockage(0.1, 2.0, 1.2)
    assert c.pressure_factor == pytest.approx(1.15, rel=1e-12)
    assert 1.2 * c.coefficient_factor == pytest.approx(1.0434782608695652, rel=1e-12)
    assert c.speed_factor == pytest.approx(math.sqrt(1.15), rel=1e-12)


def test_continuity_speed_factor_mass_conservation() -> None:
    # physics: V C = V_gap (C - S) -> V_gap / V = 1 / (1 - 0.05) = 1.0526315789...
    assert continuity_speed_factor(0.05, 1.0) == pytest.approx(20 / 19, rel=1e-12)
    with pytest.raises(ValueError):
        continuity_speed_factor(1.0, 1.0)


def _wind_tunnel(section: str, ceiling: str | None) -> dict[str, Any]:
    import tomllib

    data = tomllib.loads((CASES / "wind_tunnel.toml").read_text())
    data = copy.deepcopy(data)
    # air at one atmosphere: Reynolds cannot be kept, so the largest model is best
    data["model"]["fluids"] = ["air"]
    data["model"]["pressure"] = "101325 Pa"
    data["facility"] = {"section_area": section}
    if ceiling is not None:
        data["facility"]["blockage_max"] = ceiling
    return data


def test_blockage_ceiling_keeps_the_model_small_enough() -> None:
    # frontal area scales as X Y = X^2 (undistorted): at a ceiling b and section C the largest
    # model has X = sqrt(b C / S_p). With C = 0.4 m^2 and b = 5 %: X = sqrt(0.02 / 0.46)
    # = 1:4.796, below the chord limit's 1:4, so the blockage row binds.
    case = case_from_dict(_wind_tunnel("0.4 m^2", "5 %"))
    sol = find_optimum(case)
    assert sol.design is not None
    assert sol.design.horizontal_ratio == pytest.approx(math.sqrt(0.02 / 0.46), rel=1e-6)
    lim = sol.evaluation.conditions[0].limits["blockage.solid_blockage.max"]
    assert lim.bound == 0.05 and lim.model == pytest.approx(0.05, rel=1e-6)
    # the case's ceiling replaces the published one in the row; 2 % gives X = sqrt(0.008/0.46)
    sol2 = find_optimum(case_from_dict(_wind_tunnel("0.4 m^2", "2 %")))
    assert sol2.design.horizontal_ratio == pytest.approx(math.sqrt(0.008 / 0.46), rel=1e-6)


def test_bundled_wind_tunnel_blockage_and_check() -> None:
    answer = solve(load_case(CASES / "wind_tunnel.toml"))
    d = answer.solution.design
    # frontal area 0.46 m^2 at the solved ratio, over the 0.6 m^2 section
    expected = 0.46 * d.horizontal_ratio * d.vertical_ratio / 0.6
    (check,) = [c for c in answer.effects.checks if c.threshold.phenomenon == "blockage"]
    assert check.model == pytest.approx(expected, rel=1e-9)
    assert check.prototype == 0.0  # the aircraft flies in open air
    assert check.verdict == "pass" and expected <= 0.05


def test_bundled_towing_tank_depth_froude_and_walls() -> None:
    answer = solve(load_case(CASES / "towing_tank.toml"))
    d = answer.solution.design
    got = {
        c.threshold.name: c for c in answer.effects.checks if c.threshold.phenomenon == "tank_walls"
    }
    v_m = 8.23 * d.velocity_ratio
    assert got["depth_froude"].model == pytest.approx(v_m / math.sqrt(G * 4.5), rel=1e-9)
    assert got["depth_draught"].model == pytest.approx(4.5 / (4.2 * d.vertical_ratio), rel=1e-9)
    area = 62.0 * d.horizontal_ratio * d.vertical_ratio
    assert got["blockage"].model == pytest.approx(area / 45.0, rel=1e-9)
    assert all(c.verdict == "pass" for c in got.values())


def test_shallow_tank_binds_the_depth_froude_row() -> None:
    # A tank 1.0 m deep. Froude: V_m = V_p X^1/2. The depth Froude row V_m <= 0.5 (g h)^1/2
    # gives X <= (0.5 (g h)^1/2 / V_p)^2 = 1:27.6; the draught row (T_m <= h/4) allows
    # 0.25 / 4.2 = 1:16.8 and the blockage row (62 X^2 <= 0.01 * 10 m^2) 1:24.9: the depth
    # Froude row binds.
    import tomllib

    data = tomllib.loads((CASES / "towing_tank.toml").read_text())
    data["facility"] = {"depth": "1.0 m", "width": "10 m"}
    sol = find_optimum(case_from_dict(data))
    x = (0.5 * math.sqrt(G * 1.0) / 8.23) ** 2
    assert x < 0.25 / 4.2 and x < math.sqrt(0.1 / 62)
    assert sol.design.horizontal_ratio == pytest.approx(x, rel=1e-6)
    assert "phenomena.tank_walls.depth_froude" in sol.binding


def test_facility_phenomenon_without_facility_is_a_case_error() -> None:
    import tomllib

    data = tomllib.loads((CASES / "wind_tunnel.toml").read_text())
    del data["facility"]
    with pytest.raises(CaseErrors) as err:
        case_from_dict(data, path="wt.toml")
    text = str(err.value)
    assert "phenomena.blockage" in text and "section_area" in text
    data["facility"] = {"section_area": "0.6 m^2", "blockage_max": 1.5}
    with pytest.raises(CaseErrors) as err:
        case_from_dict(data, path="wt.toml")
    assert "facility.blockage_max" in str(err.value)


def test_cli_check_facility_errors_exit_2_one_line_each(tmp_path: Path) -> None:
    from typer.testing import CliRunner

    from compromise.cli import app

    text = (CASES / "wind_tunnel.toml").read_text()
    text = text.replace('section_area = "0.6 m^2"', 'section_area = "0.6 m"')
    text = text.replace('blockage_max = "5 %"', 'blockage_max = "150 %"')
    path = tmp_path / "wt.toml"
    path.write_text(text, encoding="utf-8")
    result = CliRunner().invoke(app, ["check", str(path)])
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    lines = result.stderr.splitlines()
    assert any("facility.section_area" in line and "area" in line for line in lines), lines
    assert any("facility.blockage_max" in line for line in lines), lines
    assert all(str(path) in line for line in lines), lines
    assert len(lines) == 2, lines  # the bad area is not reported again as a missing one
