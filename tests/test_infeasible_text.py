"""The diagnosis of an infeasible case reads consistently and names bounds as the user wrote them
(issue 10, part 1f).

Behaviour a user relies on: the text never claims both that a bound "cannot be moved far enough
on its own" and that "each move makes the case feasible on its own"; every move it gives does
make the case feasible when made alone (checked here by re-solving the edited case); a bound
that cannot be moved alone really cannot; and a scale-effect threshold enforced with
``--enforce-thresholds`` is named after its phenomenon, not after an internal group.
"""

from __future__ import annotations

import copy
import json
import tomllib
from pathlib import Path
from typing import Any

import pytest
from typer.testing import CliRunner

from compromise.casefile.load import case_from_dict
from compromise.cli import app
from compromise.review.answer import solve

ROOT = Path(__file__).resolve().parent.parent
PUMP = ROOT / "tests" / "data" / "solver_pump_conflict.toml"
OLD_CONTRADICTION = "Each move given makes the case feasible on its own."


@pytest.fixture(scope="module")
def runner() -> CliRunner:
    return CliRunner()


def _data(path: Path) -> dict[str, Any]:
    return tomllib.loads(path.read_text(encoding="utf-8"))


def test_pump_conflict_moves_each_make_the_case_feasible(runner: CliRunner) -> None:
    res = runner.invoke(app, ["solve", str(PUMP), "--json"])
    assert res.exit_code == 1, res.output
    out = json.loads(res.output)
    assert out["conflict"] == [
        "limits.discharge.max",
        "limits.depth.min",
        "groups.froude.exact",
        "model.distortion",
    ]
    assert out["sides"] == {
        "limits.discharge.max": "max",
        "limits.depth.min": "min",
        "groups.froude.exact": "exact",
        "model.distortion": "exact",
    }
    # the case file's own worked numbers: Q_r = L_r^(5/2) under Froude, so the depth floor of
    # 5 cm (L_r = 1:80) needs 8.73 L/s, and the 5 L/s pump allows L_r = 1:100, depth 4 cm
    assert out["relaxation"]["limits.discharge.max"] == pytest.approx(8.7346e-3, rel=1e-4)
    assert out["relaxation"]["limits.depth.min"] == pytest.approx(0.04, rel=1e-6)
    data = _data(PUMP)
    for quantity, kind in (("discharge", "max"), ("depth", "min")):
        moved = copy.deepcopy(data)
        value = out["relaxation"][f"limits.{quantity}.{kind}"]
        moved["limits"][quantity][kind] = (
            f"{value} m^3/s" if quantity == "discharge" else (f"{value} m")
        )
        assert solve(case_from_dict(moved), alternatives=False).feasible, quantity
    text = runner.invoke(app, ["solve", str(PUMP)]).output
    assert "cannot make the case feasible" not in text and OLD_CONTRADICTION not in text
    assert "makes the case feasible when it alone is moved that far" in text
    assert "Traceback" not in text


def test_enforced_threshold_is_named_after_its_phenomenon(runner: CliRunner) -> None:
    river = ROOT / "cases" / "river_bend.toml"
    res = runner.invoke(app, ["solve", str(river), "--enforce-thresholds", "--json"])
    assert res.exit_code == 1, res.output
    out = json.loads(res.output)
    key = "phenomena.surface_tension.capillary_speed"
    assert key in out["conflict"]
    assert out["labels"][key] == "phenomena.surface_tension: capillary_speed >= 1"
    assert not any(k.startswith("groups.surface_tension") for k in out["conflict"])
    text = runner.invoke(app, ["solve", str(river), "--enforce-thresholds"]).output
    assert "phenomena.surface_tension: capillary_speed >= 1 (in condition 'low')" in text
    assert "groups.surface_tension" not in text and OLD_CONTRADICTION not in text
    # both kinds of bound in one set: each sentence speaks only of its own kind
    stuck = [k for k in out["conflict"] if out["sides"][k] != "exact"]
    stuck = [k for k in stuck if out["relaxation"][k] is None]
    assert "limits.discharge.max" in stuck
    assert "needs another bound of this set to move with it" in text
    # and the claim holds: a pump a thousand times larger alone does not make it feasible
    data = _data(river)
    data["limits"]["discharge"]["max"] = "150 m^3/s"
    bigger = solve(case_from_dict(data), enforce_thresholds=True, alternatives=False)
    assert not bigger.feasible


def test_spillway_chute_aeration_threshold_label(runner: CliRunner) -> None:
    spill = ROOT / "cases" / "spillway.toml"
    res = runner.invoke(app, ["solve", str(spill), "--enforce-thresholds"])
    assert res.exit_code == 1, res.output
    assert "phenomena.chute_aeration: weber >= 140" in res.output
    assert "groups.chute_aeration" not in res.output
    assert OLD_CONTRADICTION not in res.output
    assert "enforced only with --enforce-thresholds" in res.output
