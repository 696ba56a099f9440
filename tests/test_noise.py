"""Numerical noise is never shown as a result; ties are reported as ties (issue 10, part 1g).

What a user relies on here: a design that matches every group reads 0, not 1e-20; designs that
are equally good are called tied and listed in the case's own order, not in the order the
solver's residue happens to give; a binding cost whose first-order estimate does not hold says
why; a weight-sensitivity run says "tied" rather than "wins 100 %", and says when it cannot
change the answer at all. Where the output makes a claim (degenerate, non-smooth), the test
checks the claim by re-solving the case, independently of the code that made it.
"""

from __future__ import annotations

import copy
import json
import math
import tomllib
from pathlib import Path
from typing import Any

import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.casefile.load import case_from_dict, load_case
from compromise.cli import app
from compromise.explore.sensitivity import weight_sensitivity, weights_note
from compromise.review.answer import solve
from compromise.solving.result import (
    NOISE,
    Alternative,
    BindingCost,
    denoise,
    explain_costs,
    order_alternatives,
    tied,
)

ROOT = Path(__file__).resolve().parent.parent
CASES = ROOT / "cases"


def _data(name: str) -> dict[str, Any]:
    return tomllib.loads((CASES / f"{name}.toml").read_text(encoding="utf-8"))


@pytest.fixture(scope="module")
def runner() -> CliRunner:
    return CliRunner()


@pytest.fixture(scope="module")
def wind() -> dict[str, Any]:
    return solve(load_case(CASES / "wind_tunnel.toml")).to_dict()


# --------------------------------------------------------------------------------------------
# the helpers


def test_denoise_and_tied_draw_the_line_at_the_noise_tolerance() -> None:
    assert denoise(0.5 * NOISE) == 0.0 and denoise(-0.5 * NOISE) == 0.0
    assert denoise(2 * NOISE) == 2 * NOISE
    assert math.isinf(denoise(math.inf))
    assert tied(1.4e-20, 8.3e-18) and not tied(0.0, 10 * NOISE)
    assert tied(100.0, 100.0 + 1e-7) and not tied(100.0, 100.001)
    assert not tied(math.inf, math.inf)


def test_tied_alternatives_keep_the_case_order() -> None:
    case = load_case(CASES / "wind_tunnel.toml")  # fluids air, nitrogen, sf6; ratios 1:4, 1:5
    alts = [
        Alternative("ratio", "1:5", None, 5.5e-21, ""),
        Alternative("fluid", "sf6", None, 8.3e-18, ""),
        Alternative("ratio", "1:4", None, 1.4e-20, ""),
        Alternative("fluid", "nitrogen", None, 1.7e-17, ""),
        Alternative("fluid", "air", None, 1.4e-20, ""),
    ]
    out = order_alternatives(alts, case, best=1.4e-20)
    assert [a.label for a in out] == ["air", "nitrogen", "sf6", "1:4", "1:5"]
    assert all(a.tied for a in out)
    # not tied: by objective, then the infeasible ones in the case's order
    alts = [
        Alternative("ratio", "1:5", None, math.inf, "x"),
        Alternative("ratio", "1:4", None, 3.0, ""),
        Alternative("fluid", "sf6", None, math.inf, "x"),
        Alternative("fluid", "air", None, 2.0, ""),
    ]
    out = order_alternatives(alts, case, best=2.0)
    assert [a.label for a in out] == ["air", "1:4", "sf6", "1:5"]
    assert [a.tied for a in out] == [True, False, False, False]


# --------------------------------------------------------------------------------------------
# solve


def test_a_matched_design_reads_zero_in_json_and_text(runner: CliRunner, wind: dict) -> None:
    assert wind["objective"] == 0.0
    for g in wind["groups"].values():  # Reynolds and Mach both kept by pressurising
        assert g["mismatch"] == 0.0 and g["factor"] == 1.0
    for b in wind["binding"].values():
        assert b["multiplier"] == 0.0 and b["estimate"] == 0.0 and b["drop"] == 0.0
    for lim in wind["limits"].values():
        assert lim["margin"] == 0.0 or lim["margin"] > NOISE
    res = runner.invoke(app, ["solve", str(CASES / "wind_tunnel.toml")])
    assert res.exit_code == 0, res.output
    assert "Best design (weighted mismatch 0):" in res.output
    assert "e-1" not in res.output and "e-2" not in res.output  # no 1e-18, 1e-20 anywhere


def test_equal_designs_are_tied_and_listed_in_the_case_order(wind: dict) -> None:
    alts = wind["alternatives"]
    assert [(a["kind"], a["label"]) for a in alts] == [
        ("fluid", "air"),
        ("fluid", "nitrogen"),
        ("fluid", "sf6"),
        ("ratio", "1:4"),
        ("ratio", "1:5"),
    ]
    assert all(a["tied"] and a["objective"] == 0.0 for a in alts)
    assert wind["design"]["fluid"] == "air"  # the first of the tied fluids, as the case lists


def test_pipe_rig_ties_are_said_in_the_text(runner: CliRunner) -> None:
    res = runner.invoke(app, ["solve", str(CASES / "pipe_rig.toml")])
    assert res.exit_code == 0 and "Traceback" not in res.output
    table = res.output.split("Alternatives")[1]
    rows = [line.split() for line in table.splitlines()[3:8]]
    assert rows[0][:2] == ["fluid", "water"] and rows[0][-1] == "chosen"
    assert [r[-1] for r in rows[1:]] == ["tied"] * 4
    assert "tied: the same weighted mismatch as the chosen design" in res.output


def test_degenerate_costs_are_explained_and_the_claim_holds() -> None:
    # breakwater: the wave-height ceiling and the structure length both fix the scale
    data = _data("breakwater")
    sol = solve(case_from_dict(data, path="breakwater.toml"))
    notes = {k: b.note for k, b in sol.binding.items()}
    assert notes == {
        "limits.wave_height.max": "degenerate",
        "limits.structure_length.max": ("degenerate"),
    }
    out = sol.to_dict()
    assert all(b["note"] == "degenerate" for b in out["binding"].values())
    # each alone gains nothing ...
    for b in sol.binding.values():
        assert b.drop <= NOISE
    # ... both together do: relax both by 10 % and re-solve
    both = copy.deepcopy(data)
    for q in ("wave_height", "structure_length"):
        value, unit = both["limits"][q]["max"].split()
        both["limits"][q]["max"] = f"{float(value) * 1.1} {unit}"
    relaxed = solve(case_from_dict(both, path="both.toml"), alternatives=False)
    assert sol.objective - relaxed.objective > 0.1


def test_non_smooth_cost_is_explained_and_the_claim_holds(runner: CliRunner) -> None:
    # towing tank: a 10 % longer model meets the beam limit first
    data = _data("towing_tank")
    sol = solve(case_from_dict(data, path="towing_tank.toml"))
    cost = sol.binding["limits.length.max"]
    assert cost.note == "non-smooth"
    assert cost.drop < 0.9 * cost.estimate
    longer = copy.deepcopy(data)
    longer["limits"]["length"]["max"] = f"{cost.relaxed_bound} m"
    re = solve(case_from_dict(longer, path="longer.toml"), alternatives=False, effects=False)
    assert re.evaluation is not None
    assert re.evaluation.worst_limits()["beam.max"][1].binding  # another limit starts to bind
    assert_allclose(sol.objective - re.objective, cost.drop, rtol=1e-6)
    res = runner.invoke(app, ["solve", str(CASES / "towing_tank.toml")])
    assert "limits.length.max: non-smooth." in res.output
    assert "read the re-solved drop" in res.output


def test_explain_costs_agrees_when_estimate_and_resolve_agree() -> None:
    base = BindingCost("limits.q.max", None, 23.6, 2.25, 2.24, 0.165)
    other = BindingCost("limits.r.max", None, 4.2, 0.4, 0.0, 1.0)
    out = explain_costs({"a": base})
    assert out["a"].note == "" and out["a"].estimate_holds
    out = explain_costs({"a": base, "b": other})
    assert out["b"].note == "degenerate"
    out = explain_costs({"b": other})  # alone it binds, yet relaxing it gains nothing
    assert out["b"].note == "non-smooth"


def test_river_cost_estimate_holds(runner: CliRunner) -> None:
    res = runner.invoke(app, ["solve", str(CASES / "river_bend.toml"), "--json"])
    b = json.loads(res.output)["binding"]["limits.discharge.max"]
    assert b["note"] == "" and b["estimate"] == pytest.approx(b["multiplier"] * math.log(1.1))


# --------------------------------------------------------------------------------------------
# weight sensitivity


def test_sensitivity_says_tied_not_wins(runner: CliRunner, tmp_path: Path) -> None:
    sens = weight_sensitivity(load_case(CASES / "wind_tunnel.toml"), samples=40, seed=2)
    assert sens.tied_samples == 40
    assert all(c.wins == 0 and c.ties == 40 for c in sens.candidates)
    assert len(sens.nominal_tied) == len(sens.candidates)
    assert all(c.to_dict()["nominal_objective"] == 0.0 for c in sens.candidates)
    res = runner.invoke(
        app,
        ["sensitivity", str(CASES / "wind_tunnel.toml"), "--samples", "40", "-o", str(tmp_path)],
    )
    assert res.exit_code == 0, res.output
    assert "tied best at the case's weights" in res.output
    assert "In 40 of 40 samples two or more candidates tie for" in res.output
    rows = res.output.split("candidate ")[1].split("\n\n")[0].splitlines()[2:]
    assert len(rows) == 6
    for row in rows:  # "air 1:4  0  0.0  40  100.0 ...": nobody is best alone
        label, best_alone, share = row.split()[:2], row.split()[2], row.split()[3]
        assert (best_alone, share) == ("0", "0.0"), label


def _breakwater_without_armour(tmp_path: Path) -> Path:
    """The breakwater case without its armour layer ([sediment] and the stability number): a
    case with one weighted group left."""
    text = (CASES / "breakwater.toml").read_text(encoding="utf-8")
    head, rest = text.split("[sediment]", 1)
    head = "\n".join(ln for ln in head.splitlines() if not ln.startswith("stability_number"))
    path = tmp_path / "breakwater_trunk.toml"
    path.write_text(head + "\n[model]" + rest.split("[model]", 1)[1], encoding="utf-8")
    return path


def test_sensitivity_with_one_weighted_group_cannot_change_the_answer(
    runner: CliRunner, tmp_path: Path
) -> None:
    case = str(_breakwater_without_armour(tmp_path))
    res = runner.invoke(app, ["sensitivity", case, "--samples", "20", "-o", str(tmp_path)])
    assert res.exit_code == 0, res.output
    assert "One weighted group only (armour_reynolds)" in res.output
    assert "cannot change the answer" in " ".join(res.output.split())
    res = runner.invoke(
        app,
        [
            "sensitivity",
            case,
            "--samples",
            "20",
            "-o",
            str(tmp_path),
            "--json",
        ],
    )
    assert "cannot change the answer" in json.loads(res.output)["note"]
    assert weights_note(()).startswith("No weighted group")
    assert weights_note(("a", "b")) == ""


def test_non_smooth_when_the_limit_stops_binding() -> None:
    # the design example: with 10 % more hall length the best model does not use all of it
    data = tomllib.loads((ROOT / "tests" / "data" / "design_example.toml").read_text("utf-8"))
    sol = solve(case_from_dict(data, path="example.toml"))
    cost = sol.binding["limits.reach.max"]
    assert cost.note == "non-smooth"
    longer = copy.deepcopy(data)
    longer["limits"]["reach"]["max"] = f"{cost.relaxed_bound} m"
    re = solve(case_from_dict(longer, path="longer.toml"), alternatives=False, effects=False)
    assert re.evaluation is not None
    assert not re.evaluation.worst_limits()["reach.max"][1].binding  # it stops binding
    assert_allclose(sol.objective - re.objective, cost.drop, rtol=1e-6)
