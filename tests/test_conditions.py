"""One model, several flows: a design must hold at low flow and at the flood.

Behaviour tests (what a modeller relies on): designing for the mean flow alone can break the
low-flow depth floor (surface tension and gauge precision, 3 cm, common practice), which the
multi-condition design respects; each limit reports the condition that makes it bind.
"""

from __future__ import annotations

import copy
import json

import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.casefile.load import case_from_dict
from compromise.cli import app
from compromise.review.answer import solve
from compromise.solving.design import evaluate_design

BASE = {
    "title": "two-flow river",
    "prototype": {
        "fluid": "water",
        "temperature": "10 degC",
        "quantities": {
            "depth": {"value": "3.0 m", "axis": "vertical"},
            "width": "85 m",
            "reach": "3 km",
            "velocity": "1.4 m/s",
            "discharge": "360 m^3/s",
        },
    },
    "conditions": {
        "low": {"depth": "1.1 m", "velocity": "0.6 m/s", "discharge": "45 m^3/s"},
        "mean": {},
        "flood": {"depth": "6.5 m", "velocity": "2.2 m/s", "discharge": "1400 m^3/s"},
    },
    "groups": {
        "froude": {"exact": True},
        "reynolds": {"weight": 1},
        "aspect": {"expr": "width / depth", "weight": 50},
    },
    "model": {
        "horizontal_ratio": {"min": "1:500", "max": "1:30"},
        "distortion": {"min": 1, "max": 5},
        "fluids": ["water"],
        "temperature": "20 degC",
    },
    "limits": {
        "reach": {"max": "40 m"},
        "discharge": {"max": "0.15 m^3/s"},
        "depth": {"min": "3 cm"},
    },
}


def _case(data: dict):
    return case_from_dict(data, path="two_flow.toml")


@pytest.fixture(scope="module")
def full():
    return _case(BASE), solve(_case(BASE))


@pytest.fixture(scope="module")
def mean_only():
    data = copy.deepcopy(BASE)
    data["conditions"] = {"mean": {}}
    return solve(_case(data))


def test_single_condition_design_breaks_low_flow_depth(full, mean_only):
    case, _ = full
    assert mean_only.status == "optimal"
    ev = evaluate_design(case, mean_only.design)
    low = next(c for c in ev.conditions if c.name == "low")
    assert low.limits["depth.min"].violated
    assert not ev.feasible


def test_multi_condition_design_holds_in_every_condition(full):
    _, sol = full
    assert sol.status == "optimal"
    for cond in sol.evaluation.conditions:
        for lim in cond.limits.values():
            assert lim.margin >= -1e-9, (cond.name, lim)
        assert abs(cond.groups["froude"].mismatch) < 1e-9


def test_binding_limits_name_their_condition(full):
    _, sol = full
    d = sol.to_dict()
    assert d["limits"]["depth.min"]["binding"]
    assert d["limits"]["depth.min"]["condition"] == "low"
    # the depth floor binds at low flow: 1.1 m x Y = 3 cm
    assert_allclose(sol.design.vertical_ratio, 0.03 / 1.1, rtol=1e-9)
    assert sol.binding["limits.depth.min"].condition == "low"
    # the reach binds too, in every condition alike (no condition named)
    assert d["limits"]["reach.max"]["binding"]
    assert sol.binding["limits.reach.max"].condition is None
    # the flood discharge has slack here; it would be the flood that sets it
    assert d["limits"]["discharge.max"]["condition"] == "flood"


def test_objective_sums_condition_weights(full):
    _, sol = full
    # power-product mismatches are the same in every condition; three conditions of weight 1
    one = sol.evaluation.conditions[0].objective
    assert_allclose(sol.objective, 3 * one, rtol=1e-9)


def test_json_has_every_condition(full, tmp_path):
    path = tmp_path / "two_flow.toml"
    path.write_text(_toml(BASE))
    r = CliRunner().invoke(app, ["solve", str(path), "--json"])
    assert r.exit_code == 0, r.output
    d = json.loads(r.output)
    assert set(d["conditions"]) == {"low", "mean", "flood"}
    assert d["conditions"]["low"]["limits"]["depth.min"]["binding"]


def test_infeasible_diagnosis_names_the_condition():
    data = copy.deepcopy(BASE)
    data["model"]["distortion"] = {"min": 1, "max": 1.5}
    sol = solve(_case(data))
    assert sol.status == "infeasible"
    assert "limits.depth.min" in sol.conflict.keys
    assert sol.conflict.conditions["limits.depth.min"] == "low"


def _toml(data: dict, prefix: str = "") -> str:
    """A tiny TOML writer for the nested dicts of this test."""
    lines, tables = [], []
    for k, v in data.items():
        if isinstance(v, dict) and not _inline(v):
            tables.append((k, v))
        else:
            lines.append(f"{k} = {_val(v)}")
    out = ([f"[{prefix}]"] if prefix and lines else []) + lines
    for k, v in tables:
        out.append(_toml(v, f"{prefix}.{k}" if prefix else k) or f"[{prefix}.{k}]")
    return "\n".join(out)


def _inline(v: dict) -> bool:
    return all(not isinstance(x, dict) for x in v.values()) and (
        "value" in v or "min" in v or "max" in v or "weight" in v or "exact" in v or "expr" in v
    )


def _val(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, str):
        return json.dumps(v)
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{k} = {_val(x)}" for k, x in v.items()) + " }"
    if isinstance(v, list):
        return "[" + ", ".join(_val(x) for x in v) + "]"
    return repr(v)
