"""A towed hull's resistance carried to the ship by the ITTC-1978 method
(compromise.physics.ship, compromise.review.resistance, ``convert --to prototype``).

No published worked example of the method with checkable numbers was at hand, so every step is
checked against a hand calculation from the published formulas, written out in the test:
* ITTC-1957 model-ship correlation line C_F = 0.075 / (log10 Re - 2)^2: ITTC (1957), Proc. 8th
  ITTC, Madrid; ITTC Recommended Procedure 7.5-02-02-02 (formula from memory); check values at
  Re = 1e6, 1e7, 1e9 computed from the formula (0.004687, 0.003000, 0.001531).
* ITTC-1978 performance prediction method, C_R = C_TM - (1 + k) C_FM and
  C_TS = (1 + k) C_FS + dC_F + C_A + C_R + C_AAS, C_AAS = 0.001 A_T / S_S: ITTC (1978, rev.
  1984, 1987, 1999), Recommended Procedure 7.5-02-03-01.4, section 2 (from memory).
* Roughness allowance dC_F = [105 (k_s/L)^(1/3) - 0.64] 1e-3: Bowden & Davison (1974), as adopted
  in the ITTC-1978 method (from memory); dC_F = 0.044 [(k_s/L)^(1/3) - 10 Re^(-1/3)] + 0.000125:
  Townsin (1985), as in later revisions of 7.5-02-03-01.4 (from memory).
* Prohaska's plot C_TM/C_FM = (1 + k) + c Fn^4/C_FM: Prohaska (1966), Proc. 11th ITTC; ITTC
  Recommended Procedure 7.5-02-02-01 (from memory). Checked on SYNTHETIC data generated in the
  test from a known k (not measurements).
* Fresh water and seawater at 15 degC from the fluid catalogue against ITTC Recommended Procedure
  7.5-02-01-03 (2011), fresh water and seawater properties: fresh water rho 999.10 kg/m^3,
  nu 1.1386e-6 m^2/s; seawater rho 1025.9 kg/m^3, nu 1.1892e-6 m^2/s (from memory).
"""

from __future__ import annotations

import copy
import json
import math
import tomllib
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd
import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.casefile.designs import parse_design_spec
from compromise.casefile.load import case_from_dict
from compromise.cli import app
from compromise.errors import CaseError, CaseErrors
from compromise.physics.friction import ittc_1957
from compromise.physics.ship import (
    air_resistance_coefficient,
    prohaska_form_factor,
    roughness_allowance,
)
from compromise.review.convert import convert_table, read_table
from compromise.review.proposal import design_from_spec

ROOT = Path(__file__).resolve().parents[1]
CASE = ROOT / "cases" / "towing_tank.toml"
DATA = ROOT / "cases" / "data" / "ferry_resistance.csv"
G = 9.80665


def _data(**resistance: Any) -> dict[str, Any]:
    data = tomllib.loads(CASE.read_text(encoding="utf-8"))
    data["resistance"].update(resistance)
    return data


def _case_and_design(spec: str = "1:20@water,15degC", **resistance: Any) -> tuple[Any, Any]:
    case = case_from_dict(_data(**resistance), path="towing_tank.toml")
    design, _ = design_from_spec(case, parse_design_spec(spec))
    return case, design


def _cf(re: float) -> float:
    """The ITTC-1957 line, written out (ITTC 1957)."""
    return 0.075 / (math.log10(re) - 2.0) ** 2


def test_ittc_1957_line_check_values() -> None:
    # ITTC (1957) formula; values computed from it to the digits printed
    assert_allclose(ittc_1957(1e6), 0.004687, atol=5e-7)
    assert_allclose(ittc_1957(1e7), 0.003000, atol=5e-7)
    assert_allclose(ittc_1957(1e9), 0.001531, atol=5e-7)


def test_bowden_davison_1974_roughness_allowance() -> None:
    # k_s = 150 um on a 96 m ship: (1.5625e-6)^(1/3) = 0.0116040 (0.011604^3 = 1.5625e-6)
    assert_allclose(
        roughness_allowance("bowden-davison", 150e-6, 96.0), (105 * 0.0116040 - 0.64) * 1e-3,
        rtol=2e-5,
    )  # fmt: skip
    # 200 m: (7.5e-7)^(1/3) = 0.0090856, dC_F = 0.31399e-3
    assert_allclose(roughness_allowance("bowden-davison", 150e-6, 200.0), 0.31399e-3, rtol=2e-5)


def test_townsin_1985_roughness_allowance() -> None:
    # 0.044 [(k_s/L)^(1/3) - 10 Re^(-1/3)] + 0.000125 with Re = 1e9 (Re^(-1/3) = 1e-3)
    expected = 0.044 * (0.0116040 - 10 * 1e-3) + 0.000125
    assert_allclose(roughness_allowance("townsin", 150e-6, 96.0, 1e9), expected, rtol=2e-5)
    with pytest.raises(ValueError, match="Reynolds"):
        roughness_allowance("townsin", 150e-6, 96.0)
    with pytest.raises(ValueError, match="unknown method"):
        roughness_allowance("wibble", 150e-6, 96.0)


def test_ittc_1978_air_resistance_coefficient() -> None:
    # C_AAS = 0.001 A_T / S_S (ITTC 1978): 220 m^2 over 1530 m^2
    assert_allclose(air_resistance_coefficient(220.0, 1530.0), 0.001 * 220 / 1530, rtol=1e-15)


def test_prohaska_1966_fit_recovers_a_known_form_factor_synthetic() -> None:
    """SYNTHETIC data: C_TM = (1 + k) C_FM + c Fn^4 with k = 0.15, c = 0.05, exactly on the
    Prohaska line; the fit must return k and c."""
    fn = np.array([0.10, 0.12, 0.14, 0.16, 0.18, 0.20])
    re = fn * math.sqrt(G * 5.0) * 5.0 / 1.1386e-6
    cf = np.array([_cf(r) for r in re])
    ct = 1.15 * cf + 0.05 * fn**4
    k, c, rms = prohaska_form_factor(fn, ct, cf)
    assert_allclose(k, 0.15, atol=1e-12)
    assert_allclose(c, 0.05, rtol=1e-9)
    assert rms < 1e-12
    with pytest.raises(ValueError, match="three"):
        prohaska_form_factor(fn[:2], ct[:2], cf[:2])


def test_catalogue_fresh_and_sea_water_at_15_degc_ittc_7_5_02_01_03() -> None:
    case, design = _case_and_design()
    conv = convert_table(case, design, pd.DataFrame({"velocity [m/s]": [1.0]}), to="prototype")
    fresh, sea = conv.chain.model, conv.chain.prototype
    assert (fresh["fluid"], sea["fluid"]) == ("water", "seawater")
    assert_allclose(fresh["rho"], 999.10, rtol=2e-5)
    assert_allclose(fresh["nu"], 1.1386e-6, rtol=1e-4)
    assert_allclose(sea["rho"], 1025.9, rtol=2e-4)
    assert_allclose(sea["nu"], 1.1892e-6, rtol=3e-4)


def test_ittc_1978_steps_by_hand() -> None:
    """Every step of the ITTC-1978 extrapolation (7.5-02-03-01.4, section 2), by hand with the
    catalogue's properties, for a 1:20 model in fresh water at 15 degC and k from the case."""
    case, design = _case_and_design(
        form_factor=0.15, correlation_allowance=0.0002, roughness_allowance="bowden-davison"
    )
    vm, rm = 1.840, 40.0  # [m/s], [N]: one invented run near the ship's 16 knots
    conv = convert_table(
        case, design, pd.DataFrame({"velocity [m/s]": [vm], "resistance [N]": [rm]}),
        to="prototype",
    )  # fmt: skip
    out = conv.frame.iloc[0]
    fresh, sea = conv.chain.model, conv.chain.prototype
    lam, length_s, surface_s, area = 20.0, 96.0, 1530.0, 220.0
    length_m, surface_m = length_s / lam, surface_s / lam**2  # 4.8 m, 3.825 m^2
    vs = vm * math.sqrt(lam)  # Froude: equal Fn

    c_tm = rm / (0.5 * fresh["rho"] * vm**2 * surface_m)
    re_m = vm * length_m / fresh["nu"]
    c_fm = _cf(re_m)
    c_r = c_tm - 1.15 * c_fm
    re_s = vs * length_s / sea["nu"]
    c_fs = _cf(re_s)
    d_cf = (105 * (150e-6 / length_s) ** (1 / 3) - 0.64) * 1e-3
    c_aas = 0.001 * area / surface_s
    c_ts = 1.15 * c_fs + d_cf + 0.0002 + c_r + c_aas
    r_ts = c_ts * 0.5 * sea["rho"] * vs**2 * surface_s

    # the arithmetic above, to the digits printed (so the hand calculation is itself pinned)
    assert_allclose([c_tm, c_fm, c_r], [6.1832e-3, 3.1369e-3, 2.5758e-3], rtol=1e-4)
    assert_allclose([re_m, re_s], [7.757e6, 6.6416e8], rtol=1e-4)
    assert_allclose([c_fs, d_cf, c_aas, c_ts], [1.6114e-3, 5.784e-4, 1.438e-4, 5.3511e-3],
                    rtol=1e-4)  # fmt: skip
    assert_allclose(r_ts, 284.38e3, rtol=1e-4)

    assert_allclose(out["Fn"], vm / math.sqrt(G * length_m), rtol=1e-12)
    for name, value in [
        ("Re_M", re_m), ("C_TM", c_tm), ("C_FM", c_fm), ("k", 0.15), ("C_R", c_r),
        ("Re_S", re_s), ("C_FS", c_fs), ("dC_F", d_cf), ("C_A", 0.0002), ("C_AAS", c_aas),
        ("C_TS", c_ts),
    ]:  # fmt: skip
        assert_allclose(out[name], value, rtol=1e-12, err_msg=name)
    assert_allclose(out["resistance [N]"], r_ts, rtol=1e-12)
    assert_allclose(out["velocity [m/s]"], vs, rtol=1e-12)
    # not the force ratio (rho_r lambda^3 would give 40 N x 1.0268 x 8000 = 328.6 kN)
    force_ratio = rm * sea["rho"] / fresh["rho"] * lam**3
    assert abs(r_ts / force_ratio - 1) > 0.1
    assert [c.law for c in conv.columns] == ["V", "ITTC-1978"]
    assert conv.extrapolations[0].form_factor_source == "case"
    assert any("ITTC-1978" in n and "R_TS" in n for n in conv.notes)


def test_prohaska_fit_through_convert_synthetic() -> None:
    """SYNTHETIC runs generated from k = 0.12 on the Prohaska line below Fn 0.2 and with a wave
    hump above: the fit uses the low-speed rows only and returns k."""
    case, design = _case_and_design()
    conv0 = convert_table(case, design, pd.DataFrame({"velocity [m/s]": [1.0]}), to="prototype")
    fresh = conv0.chain.model
    length_m, surface_m = 96.0 / 20, 1530.0 / 400
    fn = np.array([0.10, 0.13, 0.16, 0.19, 0.24, 0.27])
    vm = fn * math.sqrt(G * length_m)
    cf = np.array([_cf(v * length_m / fresh["nu"]) for v in vm])
    ct = 1.12 * cf + 0.07 * fn**4 + np.where(fn > 0.2, 2e-4, 0.0)
    rm = ct * 0.5 * fresh["rho"] * vm**2 * surface_m
    frame = pd.DataFrame({"run": list("abcdef"), "speed [m/s]": vm, "drag [kN]": rm / 1e3})
    conv = convert_table(case, design, frame, to="prototype")
    e = conv.extrapolations[0]
    assert e.form_factor_source == "prohaska"
    assert e.prohaska is not None and e.prohaska["rows"] == [1, 2, 3, 4]
    assert_allclose(e.form_factor, 0.12, atol=1e-9)
    assert_allclose(conv.frame["C_R"], ct - 1.12 * cf, atol=1e-12)
    assert list(conv.frame.columns)[:3] == ["run", "speed [m/s]", "drag [kN]"]


def test_bundled_ferry_runs_give_the_form_factor_they_were_made_with() -> None:
    """The bundled runs are INVENTED, made from k = 0.18 plus a wave term growing as Fn^8 and
    rounded to 0.01 N; the Prohaska fit of the runs below Fn 0.2 comes back close to 0.18."""
    case, design = _case_and_design("1:13.714285714285714@water,22degC")
    conv = convert_table(case, design, read_table(DATA), to="prototype")
    e = conv.extrapolations[0]
    assert e.prohaska is not None and e.prohaska["rows"] == [1, 2, 3, 4, 5, 6]
    assert abs(e.form_factor - 0.18) < 0.002
    c = conv.frame
    assert_allclose(
        c["C_TS"], (1 + c["k"]) * c["C_FS"] + c["dC_F"] + c["C_A"] + c["C_R"] + c["C_AAS"],
        rtol=1e-12,
    )  # fmt: skip


@pytest.mark.parametrize(
    ("frame", "resistance", "match"),
    [
        (
            pd.DataFrame({"resistance [N]": [30.0]}),
            {"form_factor": 0.1},
            r"column 'resistance \[N\]': the ITTC-1978 extrapolation needs the model's speed",
        ),
        (
            pd.DataFrame({"velocity [m/s]": [1.8, 2.0], "resistance [N]": [30.0, 36.0]}),
            {},
            r"fewer than three rows are at Froude numbers up to 0.2 .*\(0 are\)",
        ),
        (
            pd.DataFrame({"velocity [m/s]": [1e-6], "resistance [N]": [1.0]}),
            {"form_factor": 0.1},
            r"row 1: the model's Reynolds number 4.\d+ is below 1e\+05",
        ),
    ],
)
def test_one_line_errors(frame: pd.DataFrame, resistance: dict[str, Any], match: str) -> None:
    case, design = _case_and_design(**resistance)
    with pytest.raises(CaseError, match=match):
        convert_table(case, design, frame, to="prototype")


def test_a_ship_case_without_resistance_table_says_what_to_add() -> None:
    data = _data()
    del data["resistance"]
    case = case_from_dict(data, path="t.toml")
    design, _ = design_from_spec(case, parse_design_spec("1:20@water,15degC"))
    frame = pd.DataFrame({"velocity [m/s]": [1.8], "resistance [N]": [30.0]})
    with pytest.raises(CaseError, match=r"add a \[resistance\] table with wetted_surface"):
        convert_table(case, design, frame, to="prototype")


@pytest.mark.parametrize(
    ("change", "match"),
    [
        ({"roughness_allowance": "wibble"}, "resistance.roughness_allowance: expected"),
        ({"wetted_surface": "1530 m"}, "resistance.wetted_surface: expected an area"),
        ({"form_factor": 3.0}, "resistance.form_factor: expected a number between 0 and 1"),
        ({"hull_roughness": 150}, "resistance.hull_roughness: expected a length with units"),
        ({"colour": "red"}, "resistance.colour: unknown key"),
    ],
)
def test_bad_resistance_table_is_refused(change: dict[str, Any], match: str) -> None:
    data = _data()
    data["resistance"].update(change)
    with pytest.raises(CaseErrors, match=match):
        case_from_dict(data, path="t.toml")
    data = copy.deepcopy(_data())
    del data["resistance"]["wetted_surface"]
    with pytest.raises(CaseErrors, match=r"resistance\.wetted_surface: missing"):
        case_from_dict(data, path="t.toml")


def test_to_model_keeps_the_force_ratio_and_says_so() -> None:
    """Common practice: the method runs model -> ship; a ship series carried to the model
    follows the force ratio, with a note."""
    case, design = _case_and_design()
    frame = pd.DataFrame({"velocity [m/s]": [8.23], "resistance [kN]": [300.0]})
    conv = convert_table(case, design, frame, to="model")
    assert conv.extrapolations == ()
    assert any("force ratio" in n and "--to prototype" in n for n in conv.notes)


def test_declared_resistance_column_and_the_command(tmp_path: Path) -> None:
    out = tmp_path / "ship.csv"
    res = CliRunner().invoke(
        app,
        ["convert", str(CASE), "--input", str(DATA), "--to", "prototype", "-o", str(out),
         "--json"],
    )  # fmt: skip
    assert res.exit_code == 0, res.output
    data = json.loads(res.output)
    (e,) = data["extrapolations"]
    assert e["method"] == "ITTC-1978" and e["form_factor_source"] == "prohaska"
    assert set(e["steps"]) >= {"C_TM", "C_FM", "C_R", "C_FS", "dC_F", "C_TS", "R_TS"}
    text = out.read_text(encoding="utf-8")
    assert "run,velocity [m/s],resistance [N],Fn,Re_M,C_TM,C_FM,k,C_R" in text
    res = CliRunner().invoke(app, ["convert", str(CASE), "--input", str(DATA), "--to", "prototype"])
    assert res.exit_code == 0, res.output
    assert "ITTC-1978 method" in res.output
    assert "Prohaska fit of rows 1, 2, 3, 4, 5, 6" in res.output
    # a column the tool would not read as a resistance, declared as one
    frame = pd.DataFrame({"velocity [m/s]": [1.8], "R_hull [N]": [30.0]})
    case, design = _case_and_design(form_factor=0.1)
    conv = convert_table(case, design, frame, to="prototype", columns={"R_hull": "resistance"})
    assert conv.extrapolations[0].column == "R_hull [N]"


def test_command_refuses_a_table_without_speed_in_one_line(tmp_path: Path) -> None:
    """Common practice (the project's error convention): one line, exit status 2."""
    table = tmp_path / "runs.csv"
    table.write_text("run,resistance [N]\n1,30\n", encoding="utf-8")
    res = CliRunner().invoke(
        app, ["convert", str(CASE), "--input", str(table), "--to", "prototype"]
    )
    assert res.exit_code == 2
    lines = res.output.strip().splitlines()
    assert len(lines) == 1 and "needs the model's speed" in lines[0]
