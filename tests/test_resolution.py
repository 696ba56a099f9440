"""Instrument resolution in prototype terms (compromise.review.resolution, the ``[instruments]``
table and the ``resolution`` command).

Checks and their sources:
* a vertical length carried by the vertical ratio Y of a distorted Froude model (Chanson, H.
  (1999), *The Hydraulics of Open Channel Flow*, ch. 14, from memory): 0.1 mm of model depth
  is 2.0 mm of river level at 1:20, 2.1 mm at the river case's 1:21.45 (the issue's example);
* a resolution in percent of the reading is the same share in both frames (arithmetic);
* the 5 % flag is a trade rule of thumb (common practice); one-line errors and exit codes are
  behaviours users rely on (common practice).
"""

from __future__ import annotations

from pathlib import Path

import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.casefile.designs import parse_design_spec
from compromise.casefile.instruments import parse_instrument
from compromise.casefile.load import case_from_dict, load_case
from compromise.cli import app
from compromise.errors import CaseError, CaseErrors
from compromise.review.proposal import design_from_spec
from compromise.review.resolution import resolution

ROOT = Path(__file__).resolve().parents[1]
RIVER = ROOT / "cases" / "river_bend.toml"


def _river_design(spec: str = "1:100/1:20@water,20degC") -> tuple:
    case = load_case(RIVER)
    design, _ = design_from_spec(case, parse_design_spec(spec))
    return case, design


def test_point_gauge_on_the_vertical_ratio_chanson_1999_ch14() -> None:
    case, design = _river_design()
    report = resolution(case, design, [parse_instrument("point gauge=0.1 mm")])
    (gauge,) = report.instruments
    assert gauge.quantity == "depth" and gauge.law == "Y"
    assert_allclose(gauge.prototype_resolution, 0.1e-3 * 20, rtol=1e-12)
    # per condition: the smallest depth (low flow, 1.1 m) gives the largest share
    shares = {r.condition: r.share for r in gauge.readings}
    assert_allclose(shares["low"], 2.0e-3 / 1.1, rtol=1e-12)
    assert not gauge.flagged


def test_the_issue_example_at_the_river_optimum() -> None:
    """0.1 mm of model depth is 2.1 mm of river level at the optimum's 1:21.45 (Y)."""
    from compromise.review.convert import design_for

    case = load_case(RIVER)
    design, _ = design_for(case, None)
    (gauge,) = resolution(case, design, [parse_instrument("point gauge=0.1 mm")]).instruments
    assert f"{1 / design.vertical_ratio:.2f}" == "21.45"
    assert f"{gauge.prototype_resolution * 1e3:.1f}" == "2.1"


def test_percent_resolution_is_the_same_share_in_both_frames() -> None:
    case, design = _river_design()
    (meter,) = resolution(case, design, [parse_instrument("flow meter=0.5 %")]).instruments
    assert meter.quantity == "discharge"
    for r in meter.readings:
        assert_allclose(r.prototype_resolution, 0.005 * r.prototype_value, rtol=1e-12)
        assert_allclose(r.model_resolution, 0.005 * r.model_value, rtol=1e-12)
    assert_allclose(meter.worst_share, 0.005, rtol=1e-12)


def test_a_coarse_instrument_is_flagged_common_practice() -> None:
    """1 cm/s of model velocity at V = (1/20)^1/2 is 4.47 cm/s in the river, 7.5 % of the low
    flow's 0.6 m/s: above 5 %, flagged; below a 10 % share, not."""
    case, design = _river_design()
    inst = [parse_instrument("current meter=1 cm/s")]
    (meter,) = resolution(case, design, inst).instruments
    assert_allclose(meter.worst_share, 0.01 / 20**-0.5 / 0.6, rtol=1e-12)
    assert meter.flagged and "low" in meter.note
    assert not resolution(case, design, inst, share=0.10).instruments[0].flagged


def test_instruments_table_in_the_case() -> None:
    data = {
        "prototype": {
            "fluid": "water",
            "temperature": "15 degC",
            "quantities": {"depth": {"value": "2 m", "axis": "vertical"}, "velocity": "1 m/s"},
        },
        "groups": {"froude": {"exact": True}},
        "model": {"horizontal_ratio": "1:50", "distortion": {"min": 1, "max": 4}},
        "instruments": {
            "point gauge": "0.1 mm",
            "probe": {"resolution": "0.5 mm", "measures": "depth"},
        },
    }
    case = case_from_dict(data)
    assert [i.name for i in case.instruments] == ["point gauge", "probe"]
    assert case.instruments[1].measures == "depth"
    bad = {**data, "instruments": {"probe": {"resolution": "0.5 mm", "measures": "levle"}}}
    with pytest.raises(CaseErrors, match=r"instruments\.probe\.measures: expected a prototype"):
        case_from_dict(bad)
    bad = {**data, "instruments": {"probe": "fine"}}
    with pytest.raises(CaseErrors, match=r"instruments\.probe: expected a number"):
        case_from_dict(bad)


@pytest.mark.parametrize(
    ("text", "match"),
    [
        ("point gauge", r"expected NAME=RESOLUTION"),
        ("gauge=0.1", r"expected a resolution with a unit"),
        ("gauge=-1 mm", r"expected a positive resolution"),
    ],
)
def test_bad_instrument_text(text: str, match: str) -> None:
    with pytest.raises(CaseError, match=match):
        parse_instrument(text)


def test_ambiguous_and_mismatched_instruments() -> None:
    case, design = _river_design()
    with pytest.raises(CaseError, match=r"instrument 'tape': ambiguous"):
        resolution(case, design, [parse_instrument("tape=1 mm")])
    with pytest.raises(CaseError, match=r"needs to know what it measures"):
        resolution(case, design, [parse_instrument("sensor=1 %")])
    with pytest.raises(CaseError, match=r"cannot resolve a discharge"):
        resolution(case, design, [parse_instrument("flow meter=1 mm")])


def test_cli_resolution(tmp_path: Path) -> None:
    runner = CliRunner()
    args = ["resolution", str(RIVER), "--instrument", "point gauge=0.1 mm"]
    ok = runner.invoke(app, [*args, "--instrument", "flow meter=0.5 %"])
    assert ok.exit_code == 0, ok.output
    assert "Flagged" in ok.output and "none" in ok.output and "Caution:" in ok.output
    flagged = runner.invoke(app, [*args, "--instrument", "current meter=2 cm/s"])
    assert flagged.exit_code == 1 and "FLAG" in flagged.output
    bad = runner.invoke(app, ["resolution", str(RIVER)])
    assert bad.exit_code == 2 and bad.output.startswith("error: --instrument: no instruments")
    assert "Traceback" not in bad.output
