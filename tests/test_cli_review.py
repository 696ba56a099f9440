"""The review commands and display units from the command line (behaviour users rely on).

``evaluate`` and ``compare`` on the bundled cases (text, JSON, CSV), exit statuses, violations
with amounts, and ``--units us``. The conversion factors are checked against pint's own
definitions (an independent library: its registry defines the foot, the pound-force, the psi
and the US gallon from the 1959 international yard and pound).
"""

from __future__ import annotations

import json
from pathlib import Path

import pint
import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.cli import app
from compromise.presentation.display import SMALL, US

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"
RIVER = str(CASES / "river_bend.toml")
runner = CliRunner()


def run(*args: str):
    result = runner.invoke(app, list(args))
    assert "Traceback" not in result.output
    return result


@pytest.mark.parametrize("si", sorted(US))
def test_display_factors_match_pint(si: str) -> None:
    ureg = pint.UnitRegistry()
    us, factor = US[si]
    names = {"cfs": "ft**3/s", "lbf s/ft^2": "lbf*s/ft**2", "Pa s": "Pa*s", "Hz": "1/s"}
    expected = ureg.Quantity(1.0, names.get(si, si.replace("^", "**"))).to(
        names.get(us, us.replace("^", "**"))
    )
    assert_allclose(factor, expected.magnitude, rtol=1e-12)


def test_small_units_match_pint() -> None:
    ureg = pint.UnitRegistry()
    assert_allclose(SMALL["ft"][1], ureg.Quantity(1, "ft").to("inch").magnitude, rtol=1e-12)
    gpm = ureg.Quantity(1, "ft**3/s").to("gallon/minute").magnitude
    assert_allclose(SMALL["cfs"][1], gpm, rtol=1e-12)


def test_evaluate_a_design_that_holds_exits_0() -> None:
    r = run("evaluate", RIVER, "--ratio", "1:100", "--vertical", "1:25")
    assert r.exit_code == 0, r.output
    assert "holds every limit" in r.output
    assert "Distance from the optimum" in r.output
    assert "lowest the case allows" in r.output  # the default temperature is stated
    assert "Caution" in r.output


def test_evaluate_a_design_that_breaks_limits_exits_1_with_amounts() -> None:
    r = run("evaluate", RIVER, "--ratio", "1:40", "--distortion", "4", "--json")
    assert r.exit_code == 1
    data = json.loads(r.stdout)
    assert data["status"] == "violates"
    reach = next(v for v in data["violations"] if v["key"] == "limits.reach.max")
    # the river is 3000 m long: 1:40 puts 75 m in a 40 m hall, 35 m over
    assert_allclose([reach["value"], reach["excess"]], [75.0, 35.0], rtol=1e-12)
    assert reach["unit"] == "m"
    assert data["objective_ratio"] is not None and data["differences"]


def test_evaluate_outside_model_bounds_is_an_answer_not_an_error() -> None:
    r = run("evaluate", RIVER, "--ratio", "1:2000", "--fluid", "seawater")
    assert r.exit_code == 1
    assert "model.horizontal_ratio: 1:2000 is below its minimum 1:500" in r.output
    assert "model.fluids: seawater is not among the case's model fluids" in r.output


def test_evaluate_bad_input_is_one_line_exit_2() -> None:
    r = run("evaluate", RIVER, "--ratio", "fifty")
    assert r.exit_code == 2
    assert r.output.count("error:") == 1 and "--ratio" in r.output
    r = run("evaluate", RIVER, "--ratio", "1:40", "--units", "imperial")
    assert r.exit_code == 2 and "--units: expected 'si' or 'us'" in r.output


def test_compare_saved_answer_and_specs(tmp_path: Path) -> None:
    solved = run("solve", RIVER, "--json")
    saved = tmp_path / "optimum.json"
    saved.write_text(solved.stdout)
    r = run(
        "compare",
        RIVER,
        str(saved),
        "1:40/1:10@water,25degC",
        "1:100/1:25",
        "--csv",
        str(tmp_path / "out"),
        "--json",
    )
    assert r.exit_code == 0, r.output
    data = json.loads(r.stdout)
    assert [d["label"] for d in data["designs"]] == [
        "optimum.json",
        "1:40/1:10@water,25degC",
        "1:100/1:25",
    ]
    assert data["designs"][1]["status"] == "violates"  # compared all the same
    objective = next(row for row in data["rows"] if row["section"] == "objective")
    assert objective["best"] == [0]  # the optimum, among the designs that hold
    text = (tmp_path / "out" / "comparison.csv").read_text()
    assert text.splitlines()[0] == (
        'section,row,unit,optimum.json,"1:40/1:10@water,25degC",1:100/1:25,best'
    )
    table = run("compare", RIVER, str(saved), "1:100/1:25")
    assert " *" in table.output and "[limit margin]" in table.output


def test_units_us_changes_text_not_json() -> None:
    si = run("solve", RIVER, "--json").stdout
    us_json = run("solve", RIVER, "--json", "--units", "us").stdout
    assert si == us_json
    text = run("solve", RIVER, "--units", "us").output
    assert "unit [US]" in text and "cfs" in text and "degF" in text
    assert "m^3/s" not in text.split("Limits")[1].split("What each")[0]


def test_csv_follows_only_an_explicit_units_choice(tmp_path: Path) -> None:
    case = str(CASES / "culvert_us.toml")  # display_units = "us"
    run("solve", case, "--csv", str(tmp_path / "default"))
    run("solve", case, "--csv", str(tmp_path / "us"), "--units", "us")
    default = (tmp_path / "default" / "limits.csv").read_text()
    us = (tmp_path / "us" / "limits.csv").read_text()
    assert ",m^3/s" in default and ",cfs" in us
    assert "temperature [degF]" in (tmp_path / "us" / "design.csv").read_text()


def test_us_case_shows_its_own_values_back() -> None:
    text = run("solve", str(CASES / "culvert_us.toml")).output
    limits = text.split("Limits (worst condition):")[1].split("\n\n")[0]
    assert "unit [US]" in limits
    for name, bound, unit in [
        ("barrel_width.max", "2", "ft"),
        ("apron_length.max", "12", "ft"),
        ("discharge.max", "3", "cfs"),
        ("depth.min", "1.5", "in"),
    ]:
        line = next(x for x in limits.splitlines() if x.startswith(name))
        assert line.split()[2] == bound and unit in line.split()


def test_bad_display_units_key_is_one_line(tmp_path: Path) -> None:
    case = tmp_path / "bad.toml"
    case.write_text((CASES / "culvert_us.toml").read_text().replace('"us"', '"metric"', 1))
    r = run("check", str(case))
    assert r.exit_code == 2
    assert "display_units: expected 'si' or 'us', got 'metric'" in r.output


@pytest.mark.parametrize("name", sorted(p.stem for p in CASES.glob("*.toml")))
def test_evaluate_and_compare_on_every_bundled_case(name: str, tmp_path: Path) -> None:
    case = str(CASES / f"{name}.toml")
    saved = tmp_path / "answer.json"
    saved.write_text(run("solve", case, "--json").stdout)
    best = json.loads(saved.read_text())["design"]
    ratio = f"1:{1 / best['horizontal_ratio'] * 1.25:.6g}"  # a smaller model than the optimum
    ev = run("evaluate", case, "--ratio", ratio, "--json")
    assert ev.exit_code in (0, 1), ev.output
    data = json.loads(ev.stdout)
    assert data["status"] == ("holds" if ev.exit_code == 0 else "violates")
    assert data["optimum"]["status"] == "optimal"
    text = run("evaluate", case, "--ratio", ratio)
    assert text.exit_code == ev.exit_code and "Distance from the optimum" in text.output
    cmp = run("compare", case, str(saved), ratio, "--csv", str(tmp_path / "csv"))
    assert cmp.exit_code == 0, cmp.output
    assert (tmp_path / "csv" / "comparison.csv").is_file()
