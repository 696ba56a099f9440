"""Carrying data between model and prototype (compromise.review.convert, .programme, and the
``convert`` command).

Checks and their sources:
* Froude scale ratios of an undistorted 1:25 model (velocity and time L^1/2, discharge L^5/2):
  Chanson, H. (1999), *The Hydraulics of Open Channel Flow*, ch. 14, table of Froude scale
  ratios, from memory; Hughes, S. A. (1993), *Physical Models and Laboratory Techniques in
  Coastal Engineering*, ch. 2, from memory.
* Distorted Froude model, discharge ratio X Y^3/2 (velocity on the vertical scale): Chanson
  (1999) ch. 14 and Novak, P. et al. (2010), *Hydraulic Modelling - an Introduction*, ch. 4, from
  memory.
* The surrogate-fluid chain (Reynolds number kept gives the model velocity; Euler number kept
  carries the pressure drop): the definitions Re = V D / nu and Eu = dp / (rho V^2), worked by
  hand in the test with the catalogue's properties, which are first checked against CoolProp
  (reference library) and, for water at 15 degC, against IAPWS-95 / IAPWS 2008 (Wagner & Pruss
  2002, J. Phys. Chem. Ref. Data 31:387; Huber et al. 2009, J. Phys. Chem. Ref. Data 38:101;
  values computed with CoolProp to the printed digits).
* Round trips, one-line errors, refusing to overwrite, the run sheet: behaviours users rely on
  (common practice).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pandas as pd
import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.casefile.designs import DesignSpec, parse_design_spec
from compromise.casefile.load import case_from_dict, load_case
from compromise.cli import app
from compromise.errors import CaseError
from compromise.physics.fluids import get_fluid
from compromise.review.convert import convert, convert_table, design_for, read_table
from compromise.review.programme import run_sheet
from compromise.review.proposal import design_from_spec

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"
DATA = CASES / "data"


def _river(distortion_max: float = 5.0) -> object:
    return case_from_dict(
        {
            "prototype": {
                "fluid": "water",
                "temperature": "20 degC",
                "quantities": {
                    "depth": {"value": "2 m", "axis": "vertical"},
                    "velocity": "1.5 m/s",
                    "discharge": "300 m^3/s",
                },
            },
            "groups": {"froude": {"exact": True}},
            "model": {
                "horizontal_ratio": {"min": "1:1000", "max": "1:10"},
                "distortion": {"min": 1, "max": distortion_max},
                "temperature": "20 degC",
            },
            "limits": {"discharge": {"max": "0.15 m^3/s"}},
        }
    )


def _froude(case: object, ratio: float, vertical: float | None = None) -> object:
    spec = DesignSpec(ratio=ratio, vertical=vertical, fluid="water", temperature=293.15)
    design, _ = design_from_spec(case, spec)  # type: ignore[arg-type]
    return design


def test_froude_1_to_25_chanson_1999_ch14() -> None:
    case = _river()
    design = _froude(case, 1 / 25)
    frame = pd.DataFrame({"velocity [m/s]": [0.6], "Q [m^3/s]": [0.02], "time [s]": [60.0]})
    out = convert(case, design, frame, to="prototype")  # type: ignore[arg-type]
    # Chanson 1999 ch. 14 (from memory): V and t scale as 25^1/2 = 5, Q as 25^5/2 = 3125
    assert_allclose(out["velocity [m/s]"], [3.0], rtol=1e-12)
    assert_allclose(out["Q [m^3/s]"], [62.5], rtol=1e-12)
    assert_allclose(out["time [s]"], [300.0], rtol=1e-12)


def test_distorted_500_100_discharge_chanson_1999_ch14() -> None:
    case = _river()
    design = _froude(case, 1 / 500, 1 / 100)
    out = convert(case, design, pd.DataFrame({"discharge [m^3/s]": [0.003]}), to="prototype")  # type: ignore[arg-type]
    # Q_p / Q_m = X^-1 Y^-3/2 = 500 x 100^1.5 = 5e5 (Chanson 1999 ch. 14, from memory)
    assert_allclose(out["discharge [m^3/s]"], [1500.0], rtol=1e-12)


def test_distorted_times_follow_horizontal_over_velocity_novak_2010_ch4() -> None:
    case = _river()
    design = _froude(case, 1 / 500, 1 / 100)
    frame = pd.DataFrame({"time [s]": [60.0], "depth [mm]": [10.0], "x [m]": [1.0]})
    out = convert(case, design, frame, to="prototype", columns={"x": "horizontal_length"})  # type: ignore[arg-type]
    # t_r = X / V = X Y^-1/2: 60 s x 500 / 10 = 3000 s; depth on Y, x on X (Novak et al. 2010 ch. 4)
    assert_allclose(out["time [s]"], [3000.0], rtol=1e-12)
    assert_allclose(out["depth [mm]"], [1000.0], rtol=1e-12)
    assert_allclose(out["x [m]"], [500.0], rtol=1e-12)


@pytest.mark.parametrize(("ratio", "vertical"), [(1 / 25, None), (1 / 500, 1 / 100)])
def test_round_trip_prototype_model_prototype(ratio: float, vertical: float | None) -> None:
    """Common practice: carrying a table to the model and back returns it (to 1e-12)."""
    case = _river()
    design = _froude(case, ratio, vertical)
    frame = pd.DataFrame(
        {
            "time [h]": [0.0, 3.0, 7.5],
            "Q [ft^3/s]": [1.0e3, 2.5e4, 3.3e3],
            "depth [m]": [1.1, 3.0, 6.5],
            "velocity [ft/s]": [0.3, 2.0, 9.0],
            "pressure [kPa]": [1.0, 20.0, 63.0],
            "force [kN]": [1.0, 2.0, 3.0],
            "frequency [Hz]": [0.1, 0.2, 0.5],
        }
    )
    model = convert(case, design, frame, to="model")  # type: ignore[arg-type]
    back = convert(case, design, model, to="prototype")  # type: ignore[arg-type]
    assert list(back.columns) == list(frame.columns)
    assert_allclose(back.to_numpy(float), frame.to_numpy(float), rtol=1e-12)


def test_surrogate_fluid_euler_chain_by_hand() -> None:
    """Reynolds number kept gives the model velocity; Euler number kept gives the prototype
    pressure drop. Hand calculation with the catalogue's properties."""
    CP = pytest.importorskip("CoolProp.CoolProp")
    case = load_case(CASES / "pipe_rig.toml")
    design, _ = design_from_spec(case, parse_design_spec("1:1.5@water,15degC"))
    # the catalogue's properties ...
    water = get_fluid("water").properties(288.15, 101325.0)
    decane = get_fluid("n-decane").properties(313.15, 101325.0)
    # ... against IAPWS-95 / IAPWS 2008 at 15 degC (999.103 kg/m^3, 1.1386 mm^2/s, six digits)
    assert_allclose(water.density, 999.103, rtol=1e-6)
    assert_allclose(water.kinematic_viscosity, 1.1386e-6, rtol=1e-4)
    # ... and n-decane at 40 degC against CoolProp's own call (reference library)
    rho_cp = CP.PropsSI("D", "T", 313.15, "P", 101325.0, "n-Decane")
    mu_cp = CP.PropsSI("V", "T", 313.15, "P", 101325.0, "n-Decane")
    assert_allclose(decane.density, rho_cp, rtol=1e-9)
    assert_allclose(decane.dynamic_viscosity, mu_cp, rtol=1e-9)

    # step 1, Reynolds kept on the diameter: V_m D_m / nu_m = V_p D_p / nu_p
    d_p, d_m, v_p = 0.15, 0.15 / 1.5, 1.2
    v_m = v_p * (d_p / d_m) * (water.kinematic_viscosity / decane.kinematic_viscosity)
    out = convert(case, design, pd.DataFrame({"velocity [m/s]": [v_p]}), to="model")
    assert_allclose(out["velocity [m/s]"], [v_m], rtol=1e-12)
    assert_allclose(v_m, 2.1215, rtol=1e-4)  # the arithmetic above, to the digits printed

    # step 2, Euler kept: dp_p / (rho_p V_p^2) = dp_m / (rho_m V_m^2), for a measured run
    measured_v, measured_dp = 2.12, 78.4e3  # [m/s], [Pa]: run 4 of the bundled data
    proto_v = measured_v * (d_m / d_p) * (decane.kinematic_viscosity / water.kinematic_viscosity)
    proto_dp = measured_dp * (decane.density * proto_v**2) / (water.density * measured_v**2)
    frame = pd.DataFrame({"velocity [m/s]": [measured_v], "pressure_drop [kPa]": [78.4]})
    back = convert(case, design, frame, to="prototype")
    assert_allclose(back["velocity [m/s]"], [proto_v], rtol=1e-12)
    assert_allclose(back["pressure_drop [kPa]"], [proto_dp / 1e3], rtol=1e-12)
    assert_allclose(proto_dp, 17.95e3, rtol=1e-3)  # close to the case's 18 kPa design value


def test_bundled_pipe_rig_data_reach_the_product_line() -> None:
    """Common practice: the bundled measurements carried with the case's optimum."""
    case = load_case(CASES / "pipe_rig.toml")
    design, source = design_for(case, None)
    assert design is not None and "optimum" in source
    conv = convert_table(
        case, design, read_table(DATA / "pipe_rig_pressure_drops.csv"), to="prototype"
    )
    kinds = {c.name: c.kind for c in conv.columns}
    assert kinds == {
        "run": "keep",
        "velocity": "quantity:velocity",
        "pressure_drop": "quantity:pressure_drop",
    }
    law = {c.name: c.law for c in conv.columns}
    assert law["pressure_drop"] == "V^2 rho_r"  # the Euler chain
    assert conv.frame["run"].tolist() == ["1", "2", "3", "4", "5", "6"]


def test_units_in_headers_are_read_by_pint() -> None:
    """1 ft^3/s = 0.028316846592 m^3/s exactly (international foot, NIST SP 811, from memory)."""
    case = _river()
    design = _froude(case, 1 / 25)
    frame = pd.DataFrame({"Q [ft^3/s]": [1.0]})
    si = convert(case, design, frame, to="prototype", units="si")  # type: ignore[arg-type]
    assert list(si.columns) == ["Q [m^3/s]"]
    assert_allclose(si["Q [m^3/s]"], [0.028316846592 * 3125], rtol=1e-12)


@pytest.mark.parametrize(
    ("frame", "columns", "match"),
    [
        (pd.DataFrame({"wibble": [1.0]}), None, r"column 'wibble': not a quantity"),
        (
            pd.DataFrame({"stage [m]": [1.0], "reach [m]": [1.0]}),
            None,
            r"column 'reach \[m\]': ambiguous",
        ),
        (
            pd.DataFrame({"velocity [m]": [1.0]}),
            None,
            r"column 'velocity \[m\]': unit 'm' is a length",
        ),
        (pd.DataFrame({"velocity": [1.0]}), None, r"column 'velocity': no unit in the header"),
        (pd.DataFrame({"Q [widgets]": [1.0]}), None, r"unknown unit 'widgets'"),
        (pd.DataFrame({"Q [m^3/s]": ["a lot"]}), None, r"row 1 holds 'a lot'"),
        (pd.DataFrame({"Q [m^3/s]": [1.0]}), {"Q": "speed"}, r"unknown kind 'speed'"),
        (pd.DataFrame({"Q [m^3/s]": [1.0]}), {"P": "pressure"}, r"no column named 'P'"),
    ],
)
def test_bad_columns_are_one_line_errors(
    frame: pd.DataFrame, columns: dict | None, match: str
) -> None:
    """Common practice: an unknown or ambiguous column is refused, naming it."""
    case = _river()
    design = _froude(case, 1 / 500, 1 / 100)  # distorted: a bare length is ambiguous
    with pytest.raises(CaseError, match=match) as info:
        convert(case, design, frame, to="prototype", columns=columns)  # type: ignore[arg-type]
    assert "\n" not in str(info.value)


def test_run_sheet_of_the_bundled_hydrograph() -> None:
    """The hydrograph carried to the model: model minutes by t_r = X / V (Chanson 1999 ch. 14,
    from memory), pump setting = model discharge / the case's pump limit, warnings above it."""
    case = load_case(CASES / "river_bend.toml")
    frame = read_table(DATA / "river_hydrograph.csv")
    # a larger model than the optimum: 1:60 / 1:15, Froude on the vertical
    design, _ = design_from_spec(case, parse_design_spec("1:60/1:15@water,20degC"))
    conv = convert_table(case, design, frame, to="model")
    sheet = run_sheet(case, conv, frame)
    t_ratio = (1 / 60) / math.sqrt(1 / 15)
    assert_allclose(sheet.duration, 48 * 3600 * t_ratio, rtol=1e-12)
    q_ratio = (1 / 60) * (1 / 15) ** 1.5
    peak = max(sheet.rows, key=lambda r: r.model_discharge or 0)
    assert_allclose(peak.model_discharge, 1400 * q_ratio, rtol=1e-12)
    assert_allclose(peak.pump_share, 1400 * q_ratio / 0.15, rtol=1e-12)
    over = [r.step for r in sheet.rows if r.model_discharge > 0.15]
    assert over and all(r.warnings for r in sheet.rows if r.step in over)
    assert not any(r.warnings for r in sheet.rows if r.step not in over)
    assert sheet.pump_key == "limits.discharge.max"
    assert f"in {len(over)} of 17 steps" in sheet.warnings[0]


def test_tide_and_sea_states_in_a_distorted_model() -> None:
    """Levels and wave heights follow Y, times and periods X / V (Chanson 1999 ch. 14 and
    Hughes 1993 ch. 2, from memory)."""
    case = _river()
    design = _froude(case, 1 / 500, 1 / 100)
    frame = pd.DataFrame({"time [h]": [12.0], "level [m]": [2.0], "Hs [m]": [1.0], "Tp [s]": [8.0]})
    out = convert(case, design, frame, to="model")  # type: ignore[arg-type]
    assert_allclose(out["level [m]"], [0.02], rtol=1e-12)
    assert_allclose(out["Hs [m]"], [0.01], rtol=1e-12)
    assert_allclose(out["Tp [s]"], [8.0 / 50], rtol=1e-12)
    assert_allclose(out["time [h]"], [12.0 / 50], rtol=1e-12)


def test_towed_hull_resistance_is_not_silently_froude_scaled() -> None:
    """Common practice (ITTC 7.5-02-02-01, from memory): the frictional part of a hull's
    resistance does not follow the force ratio; a force the tool does not extrapolate (the
    ITTC-1978 extrapolation of a resistance: tests/test_ship_resistance.py) must say so."""
    case = load_case(CASES / "towing_tank.toml")
    design, _ = design_from_spec(case, parse_design_spec("1:20@water,20degC"))
    frame = pd.DataFrame({"speed [kn]": [1.5], "resistance [N]": [30.0]})
    conv = convert_table(case, design, frame.rename(columns={"resistance [N]": "tow [N]"}),
                         to="prototype", columns={"tow": "force"})  # fmt: skip
    assert any("ITTC-1978" in n and "tow [N]" in n for n in conv.notes)
    river = convert_table(_river(), _froude(_river(), 1 / 25), frame, to="prototype")
    assert river.notes == ()


# ------------------------------------------------------------------------------------------
# the command


@pytest.fixture
def runner() -> CliRunner:
    return CliRunner()


def test_cli_convert_to_model_prints_the_run_sheet(runner: CliRunner, tmp_path: Path) -> None:
    target = tmp_path / "model.csv"
    args = [
        "convert", str(CASES / "river_bend.toml"), "--input", str(DATA / "river_hydrograph.csv"),
        "--to", "model", "-o", str(target),
    ]  # fmt: skip
    result = runner.invoke(app, args)
    assert result.exit_code == 0, result.output
    assert "Run sheet:" in result.output and "run duration:" in result.output
    assert "Caution:" in result.output
    back = read_table(target)  # the caution and provenance lines are comments
    assert list(back.columns) == ["time [h]", "discharge [m^3/s]"]
    # refused the second time, before any work, unless --force
    again = runner.invoke(app, args)
    assert again.exit_code == 2 and "exists; use --force" in again.output
    assert "Traceback" not in again.output
    assert runner.invoke(app, [*args, "--force"]).exit_code == 0
    sheet = tmp_path / "sheet.csv"
    assert runner.invoke(app, [*args, "--force", "--sheet", str(sheet)]).exit_code == 0
    rows = read_table(sheet)
    assert list(rows.columns)[:4] == [
        "step", "prototype time [h]", "model time [min]", "model discharge [L/s]"
    ]  # fmt: skip
    assert len(rows) == 17
    wrong = runner.invoke(app, [*args[:4], "--to", "prototype", "--sheet", str(sheet)])
    assert wrong.exit_code == 2 and "--sheet: a run sheet comes from a series" in wrong.output


def test_cli_convert_round_trip_through_files(runner: CliRunner, tmp_path: Path) -> None:
    """Common practice: model CSV back to the prototype gives the input to CSV digits."""
    design = tmp_path / "design.json"
    design.write_text(
        json.dumps({"design": {"fluid": "water", "temperature": 20.0, "pressure": 101325.0,
                    "horizontal_ratio": 0.02, "vertical_ratio": 0.1, "velocity_ratio": 0.1 ** 0.5}})
    )  # fmt: skip
    case = str(CASES / "river_bend.toml")
    model, proto = tmp_path / "m.csv", tmp_path / "p.csv"
    for src, to, dst in (
        (DATA / "river_hydrograph.csv", "model", model),
        (model, "prototype", proto),
    ):
        r = runner.invoke(
            app,
            [
                "convert",
                case,
                "--design",
                str(design),
                "--input",
                str(src),
                "--to",
                to,
                "-o",
                str(dst),
            ],
        )
        assert r.exit_code == 0, r.output
    a, b = read_table(DATA / "river_hydrograph.csv"), read_table(proto)
    assert_allclose(b.to_numpy(float), a.to_numpy(float), rtol=1e-11)


def test_cli_convert_bad_input_is_one_line(runner: CliRunner, tmp_path: Path) -> None:
    bad = tmp_path / "bad.csv"
    bad.write_text("time [h],wibble\n0,1\n")
    r = runner.invoke(
        app, ["convert", str(CASES / "river_bend.toml"), "--input", str(bad), "--to", "model"]
    )
    assert r.exit_code == 2
    assert r.output.strip().splitlines() == [
        "error: column 'wibble': not a quantity of the case nor a kind of the scale laws, and no "
        "unit to tell what it is; declare it with --column 'wibble=KIND'"
    ]
    r = runner.invoke(
        app, ["convert", str(CASES / "river_bend.toml"), "--input", str(bad), "--to", "sideways"]
    )
    assert r.exit_code == 2 and "--to: expected 'prototype' or 'model'" in r.output
