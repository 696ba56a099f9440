"""Reviewing a proposed design: evaluate and compare (compromise.review.proposal, .comparison).

Checks:
* evaluating the optimum gives the solver's own objective (every bundled case) and no violation;
* a design that breaks the pump limit by 20 % reports that limit with a margin of -20 % and its
  excess in m^3/s (arithmetic of the case, common practice);
* a design outside the case's ``[model]`` bounds is reported, not refused;
* compare marks the best value of each row;
* the published worked example on p. 5.76 of a US federal hydraulics manual (seen as reproduced
  by Integrated Publishing, tpub.com document 4_010491; the manual's title was not verified):
  the hall's 60 ft for a half-mile reach proposes L = 60 / (0.5 x 5280) = 2.3e-2, and the check
  of the proposal prints a 0.45 ft model depth for the 20 ft prototype depth. Evaluating the
  proposal reproduces the 0.45 ft and finds the hall exactly full; the proposal written with the
  printed two digits (L = 0.023) overfills the hall by 0.72 ft (1.2 %), which the review reports.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from numpy.testing import assert_allclose

from compromise.casefile.designs import DesignSpec, parse_design_spec
from compromise.casefile.load import load_case
from compromise.review.comparison import compare
from compromise.review.proposal import design_from_spec, evaluate
from compromise.solving.design import Design
from compromise.solving.optimum import find_optimum

CASES = Path(__file__).resolve().parents[1] / "cases"
DATA = Path(__file__).resolve().parent / "data"
FT = 0.3048  # m, exactly (international foot, 1959)
BUNDLED = sorted(p.stem for p in CASES.glob("*.toml"))


@pytest.mark.parametrize("name", BUNDLED)
def test_evaluating_the_optimum_reproduces_the_solver(name: str) -> None:
    case = load_case(CASES / f"{name}.toml")
    opt = find_optimum(case, alternatives=False)
    if not opt.feasible:
        pytest.skip("infeasible case: no optimum to evaluate")
    assert opt.design is not None
    review = evaluate(case, opt.design, optimum=opt)
    assert_allclose(review.evaluation.objective, opt.objective, rtol=1e-12, atol=1e-12)
    assert review.holds, [v.text for v in review.violations]
    assert review.differences == ()


@pytest.fixture(scope="module")
def river():
    return load_case(CASES / "river_bend.toml")


def test_pump_broken_by_20_percent_reports_minus_20_percent(river) -> None:
    opt = find_optimum(river, alternatives=False)
    d = opt.design
    assert d is not None
    # discharge scales as X Y V = X Y^(3/2) with Froude on the vertical: raise X by 1.2
    big = Design(
        d.fluid,
        d.temperature,
        d.pressure,
        d.horizontal_ratio * 1.2,
        d.vertical_ratio,
        d.velocity_ratio,
    )
    review = evaluate(river, big, optimum=opt)
    v = next(v for v in review.violations if v.key == "limits.discharge.max")
    bound = next(lim.bound for lim in river.limits if lim.quantity == "discharge")
    assert_allclose(v.margin, -0.20, rtol=1e-9)
    assert_allclose(v.excess, 0.20 * bound, rtol=1e-9)
    assert v.unit == "m^3/s" and v.condition == "flood"
    assert "above its maximum" in v.text and "-20.0 %" in v.text
    assert not review.holds
    assert review.to_dict()["status"] == "violates"


def test_design_outside_model_bounds_is_reported_not_refused(river) -> None:
    spec = parse_design_spec("1:2000/1:100@seawater,40 degC")
    design, notes = design_from_spec(river, spec)
    review = evaluate(river, design, notes=notes)
    keys = {v.key for v in review.violations}
    assert {
        "model.horizontal_ratio",
        "model.distortion",
        "model.temperature",
        "model.fluids",
    } <= keys
    ratio = next(v for v in review.violations if v.key == "model.horizontal_ratio")
    assert "1:2000 is below its minimum 1:500" in ratio.text  # the case: min "1:500"
    temp = next(v for v in review.violations if v.key == "model.temperature")
    assert_allclose(temp.excess, 10.0, rtol=1e-9)  # 40 degC against the case's 30 degC maximum
    assert temp.unit == "degC"


def test_defaults_are_stated(river) -> None:
    design, notes = design_from_spec(river, DesignSpec(ratio=1 / 40, distortion=4.0))
    assert design.fluid == river.model.fluids[0]
    assert_allclose(design.temperature, river.model.temperature[0])
    assert_allclose(design.vertical_ratio, 0.1, rtol=1e-12)
    assert_allclose(design.velocity_ratio, 0.1**0.5, rtol=1e-12)  # Froude on the vertical
    assert any("first model fluid" in n for n in notes)
    assert any("lowest the case allows" in n for n in notes)
    assert any("froude" in n for n in notes)


def test_compare_marks_the_best_of_each_row(river) -> None:
    opt = find_optimum(river, alternatives=False)
    a = evaluate(river, design_from_spec(river, parse_design_spec("1:40/1:10"))[0], optimum=opt)
    b = evaluate(river, opt.design, optimum=opt)
    c = evaluate(river, design_from_spec(river, parse_design_spec("1:100/1:25"))[0], optimum=opt)
    table = compare(river, [a, b, c])
    rows = {(r.section, r.name): r for r in table.rows}
    objective = rows[("objective", "weighted mismatch")]
    holding = [i for i, r in enumerate((a, b, c)) if r.holds]
    expected = min(holding, key=lambda i: objective.values[i])
    assert objective.best == (expected,)
    for (section, _), row in rows.items():
        if section == "limit margin" and row.best:
            top = max(row.values)
            assert all(row.values[i] == pytest.approx(top, rel=1e-9) for i in row.best)
        if section.startswith("mismatch") and row.best:
            low = min(abs(v) for v in row.values)
            assert all(abs(row.values[i]) == pytest.approx(low, rel=1e-9) for i in row.best)
    assert table.to_dict()["designs"][0]["status"] in ("holds", "violates")


@pytest.fixture(scope="module")
def manual():
    return load_case(DATA / "manual_p576.toml")


def test_manual_p576_proposal_gives_the_printed_depth(manual) -> None:
    ratio = 60 / (0.5 * 5280)
    design, _ = design_from_spec(manual, DesignSpec(ratio=ratio))
    review = evaluate(manual, design)
    depth = review.evaluation.conditions[0].quantities["depth"].model / FT
    assert round(depth, 2) == 0.45  # printed: 0.45 ft
    assert review.holds
    limit = review.evaluation.conditions[0].limits["reach.max"]
    assert limit.binding  # the hall is exactly full


def test_manual_p576_rounded_proposal_overfills_the_hall(manual) -> None:
    design, _ = design_from_spec(manual, DesignSpec(ratio=0.023))
    review = evaluate(manual, design)
    v = next(v for v in review.violations if v.key == "limits.reach.max")
    # 0.023 x 2640 ft = 60.72 ft against 60 ft: 0.72 ft over, 1.2 %
    assert_allclose(v.excess / FT, 0.72, rtol=1e-9)
    assert_allclose(v.margin, -0.012, rtol=1e-9)


def test_without_a_velocity_law_the_default_velocity_has_the_least_mismatch() -> None:
    tunnel = load_case(CASES / "wind_tunnel.toml")  # keeps no group exactly, has no Froude
    design, notes = design_from_spec(tunnel, DesignSpec(ratio=0.25))
    assert any("least weighted mismatch" in n for n in notes)
    best = evaluate(tunnel, design).evaluation.objective
    for f in (0.98, 0.995, 1.005, 1.02):  # a brute-force check around the closed form
        other = Design(
            design.fluid,
            design.temperature,
            design.pressure,
            0.25,
            0.25,
            design.velocity_ratio * f,
        )
        assert evaluate(tunnel, other).evaluation.objective > best
