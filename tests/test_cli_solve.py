"""The solve command as a user runs it: exit codes, JSON contract, CSV tables, determinism."""

from __future__ import annotations

import csv
import json

import pytest
from typer.testing import CliRunner

from compromise.cli import app

RUNNER = CliRunner()


@pytest.fixture(scope="module")
def river_json():
    r = RUNNER.invoke(app, ["solve", "cases/river_bend.toml", "--json"])
    assert r.exit_code == 0, r.output
    return r.output


def test_json_output_contract(river_json):
    d = json.loads(river_json)
    assert d["status"] == "optimal"
    assert set(d["design"]) >= {
        "fluid",
        "temperature",
        "horizontal_ratio",
        "vertical_ratio",
        "velocity_ratio",
        "distortion",
    }
    for g in d["groups"].values():
        assert set(g) >= {"prototype", "model", "mismatch", "weight"}
    for lim in d["limits"].values():
        assert set(lim) >= {"model", "bound", "kind", "margin", "binding"}
        assert lim["kind"] in ("min", "max")
    for q in d["quantities"].values():
        assert set(q) >= {"prototype", "model", "ratio", "unit"}
    kinds = {a["kind"] for a in d["alternatives"]}
    assert kinds == {"fluid", "ratio"}
    # temperatures in degC
    assert 10.0 <= d["design"]["temperature"] <= 30.0


def test_same_input_same_bytes(river_json):
    again = RUNNER.invoke(app, ["solve", "cases/river_bend.toml", "--json"])
    assert again.output == river_json
    text1 = RUNNER.invoke(app, ["solve", "cases/spillway.toml"]).output
    text2 = RUNNER.invoke(app, ["solve", "cases/spillway.toml"]).output
    assert text1 == text2


def test_text_output_has_reasons_and_caution():
    r = RUNNER.invoke(app, ["solve", "cases/spillway.toml"])
    assert r.exit_code == 0
    for line in (
        "Best design",
        "Groups in condition 'low'",
        "Limits (worst condition)",
        "What each binding limit costs",
        "Alternatives",
        "Scale effects",
        "licensed engineer",
    ):
        assert line in r.output
    assert "Traceback" not in r.output


def test_csv_tables(tmp_path):
    out = tmp_path / "tables"
    r = RUNNER.invoke(app, ["solve", "cases/river_bend.toml", "--csv", str(out)])
    assert r.exit_code == 0, r.output
    names = sorted(p.name for p in out.iterdir())
    assert names == [
        "alternatives.csv",
        "consequences.csv",
        "design.csv",
        "groups.csv",
        "limits.csv",
        "quantities.csv",
        "regimes.csv",
        "thresholds.csv",
    ]
    with (out / "groups.csv").open() as fh:
        rows = list(csv.DictReader(fh))
    assert {r["condition"] for r in rows} == {"low", "mean", "flood"}
    assert {r["group"] for r in rows} >= {"froude", "reynolds"}
    # the mismatch column names its unit; Froude is kept exactly (a log-ratio of 0)
    froude = [r for r in rows if r["group"] == "froude"]
    assert all(abs(float(r["mismatch [ln(model/prototype)]"])) < 1e-12 for r in froude)
    # the scale-effect tables carry what the text report shows (tests/test_effects.py checks
    # the values against their sources)
    answer = json.loads(RUNNER.invoke(app, ["solve", "cases/river_bend.toml", "--json"]).output)
    for name in ("regimes", "thresholds", "consequences"):
        with (out / f"{name}.csv").open() as fh:
            table = list(csv.DictReader(fh))
        assert len(table) == len(answer["effects"][name]), name
    with (out / "thresholds.csv").open() as fh:
        t = next(csv.DictReader(fh))
    first = answer["effects"]["thresholds"][0]
    assert t["source"] == first["source"] and float(t["model"]) == first["model"]


def test_infeasible_exit_status_and_csv(tmp_path):
    r = RUNNER.invoke(
        app, ["solve", "tests/data/solver_pump_conflict.toml", "--csv", str(tmp_path)]
    )
    assert r.exit_code == 1
    assert (tmp_path / "conflict.csv").exists()
    assert "cannot hold together" in r.output


def test_scales_command_json():
    r = RUNNER.invoke(
        app, ["scales", "cases/river_bend.toml", "--ratio", "1:100", "--vertical", "1:25", "--json"]
    )
    assert r.exit_code == 0, r.output
    d = json.loads(r.output)
    assert abs(d["ratios"]["velocity"] - 0.2) < 1e-12  # Y^1/2 at 1:25
    assert set(d["conditions"]) == {"low", "mean", "flood"}
    bad = RUNNER.invoke(app, ["scales", "cases/river_bend.toml", "--ratio", "fifty"])
    assert bad.exit_code == 2 and "--ratio" in bad.output


def test_fluids_command_json():
    r = RUNNER.invoke(app, ["fluids", "--temperature", "20 degC", "--json"])
    assert r.exit_code == 0, r.output
    d = json.loads(r.output)
    water = d["water"]
    # the command lists the catalogue's own values (validated in tests/test_fluids.py)
    from compromise.physics.fluids import get_fluid

    direct = get_fluid("water").properties(293.15).kinematic_viscosity
    assert water["kinematic_viscosity"] == direct
    assert d["air"]["surface_tension"] is None
    # glycerol-water surface tension is an estimate, and both outputs say so
    assert water["estimated"] == {}
    assert "estimate" in d["glycerol-water 20%"]["estimated"]["surface_tension"]
    text = RUNNER.invoke(app, ["fluids", "--temperature", "20 degC"]).output
    row = next(line for line in text.splitlines() if line.startswith("glycerol-water 20%"))
    assert row.rstrip().endswith("-") and " *" in row
    assert "* surface tension of glycerol-water 20%" in text and "from memory =" in text


def test_groups_derive_pipe_flow():
    r = RUNNER.invoke(
        app,
        [
            "groups",
            "--derive",
            "--var",
            "dp=Pa",
            "--var",
            "rho=kg/m^3",
            "--var",
            "mu=Pa*s",
            "--var",
            "V=m/s",
            "--var",
            "D=m",
            "--var",
            "eps=m",
            "--var",
            "L=m",
            "--repeating",
            "rho,V,D",
        ],
    )
    assert r.exit_code == 0, r.output
    assert r.output.count("Pi_") == 4
