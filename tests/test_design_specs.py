"""Reading proposed designs: inline specs and saved answers (behaviour users rely on).

The spec grammar ``RATIO[/VERTICAL][@FLUID[,TEMPERATURE[,PRESSURE]]]`` and the ``design`` object
of a saved ``solve --json`` answer; bad input is one CaseError naming the file or the key.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from numpy.testing import assert_allclose

from compromise.casefile.designs import load_design_file, parse_design_spec
from compromise.errors import CaseError


def test_full_spec_in_si() -> None:
    s = parse_design_spec("1:40/1:10@glycerol-water 10%,30 degC,2 bar")
    assert_allclose([s.ratio, s.vertical], [1 / 40, 1 / 10], rtol=1e-15)
    assert s.fluid == "glycerol-water 10%"
    assert_allclose(s.temperature, 303.15, rtol=1e-15)
    assert_allclose(s.pressure, 2e5, rtol=1e-15)
    assert s.label == "1:40/1:10@glycerol-water 10%,30 degC,2 bar"


def test_temperature_in_degf_common_practice() -> None:
    # 77 degF = 25 degC exactly (the Fahrenheit scale's definition)
    assert_allclose(parse_design_spec("1:25@water,77 degF").temperature, 298.15, rtol=1e-12)


@pytest.mark.parametrize(
    ("text", "match"),
    [
        ("", "expected a design such as"),
        ("1:0", "zero denominator"),
        ("fifty", "expected a ratio"),
        ("1:40@water,25 m", "expected a temperature"),
        ("1:40@water,25 degC,3 m", "expected a pressure"),
        ("1:40@", r"expected FLUID\[,TEMPERATURE\[,PRESSURE\]\]"),
    ],
)
def test_bad_specs_name_the_key(text: str, match: str) -> None:
    with pytest.raises(CaseError, match=match) as info:
        parse_design_spec(text, key="DESIGN")
    assert info.value.key == "DESIGN"


def test_saved_answer_round_trip(tmp_path: Path) -> None:
    answer = {
        "status": "optimal",
        "design": {
            "fluid": "water",
            "temperature": 12.5,
            "pressure": 101325.0,
            "horizontal_ratio": 0.02,
            "vertical_ratio": 0.08,
            "velocity_ratio": 0.2828,
            "distortion": 4.0,
        },
    }
    path = tmp_path / "proposal.json"
    path.write_text(json.dumps(answer))
    s = load_design_file(path)
    assert (s.fluid, s.ratio, s.vertical, s.velocity) == ("water", 0.02, 0.08, 0.2828)
    assert_allclose(s.temperature, 285.65, rtol=1e-15)


def test_saved_answer_errors_name_file_and_key(tmp_path: Path) -> None:
    bad = tmp_path / "bad.json"
    bad.write_text("{not json")
    with pytest.raises(CaseError, match="expected JSON"):
        load_design_file(bad)
    infeasible = tmp_path / "infeasible.json"
    infeasible.write_text(json.dumps({"status": "infeasible", "objective": None}))
    with pytest.raises(CaseError, match="expected an object with a 'design'") as info:
        load_design_file(infeasible)
    assert info.value.file == str(infeasible)
    wrong = tmp_path / "wrong.json"
    wrong.write_text(json.dumps({"design": {"fluid": "water", "horizontal_ratio": -1}}))
    with pytest.raises(CaseError, match="positive") as info:
        load_design_file(wrong)
    assert info.value.key == "design.horizontal_ratio"
