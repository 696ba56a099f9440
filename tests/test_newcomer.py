"""The newcomer's path (issue 10, part 4): what a first-time user meets must explain itself.

Behaviour a user relies on: a case without phenomena is told that no threshold is checked and
which phenomena to add (and the suggested line, added, does make the checks run); every problem
of a case file comes in one pass; a mistyped unit gets the likely spelling; trade discharge
units are read at their defined size (checked against the ``fluids`` library's constants);
boolean options show as flags in ``--help``; every option appears in the README or the docs;
table headers carry units.
"""

from __future__ import annotations

import json
import re
import tomllib
from pathlib import Path
from typing import Any

import pytest
import typer.main
from fluids import constants as fc
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.casefile.load import case_from_dict, load_case
from compromise.cli import app
from compromise.review.answer import solve
from compromise.review.phenomena_hint import phenomena_hint
from compromise.units import parse_quantity

ROOT = Path(__file__).resolve().parent.parent
EXAMPLE = ROOT / "tests" / "data" / "design_example.toml"  # lists no phenomena


@pytest.fixture(scope="module")
def runner() -> CliRunner:
    return CliRunner()


def _data(path: Path) -> dict[str, Any]:
    return tomllib.loads(path.read_text(encoding="utf-8"))


# --------------------------------------------------------------------------------------------
# phenomena a case does not list


def test_case_without_phenomena_is_told_and_given_the_line(runner: CliRunner) -> None:
    res = runner.invoke(app, ["solve", str(EXAMPLE), "--json"])
    assert res.exit_code == 0, res.output
    out = json.loads(res.output)
    assert out["effects"]["thresholds"] == []
    hint = out["phenomena_hint"]
    assert hint["checked"] == []
    assert [s["phenomenon"] for s in hint["suggested"]] == [
        "open_channel",
        "surface_tension",
        "distortion",
    ]
    assert hint["line"] == ['phenomena = ["open_channel", "surface_tension", "distortion"]']
    text = runner.invoke(app, ["solve", str(EXAMPLE)]).output
    assert "no threshold was checked" in text
    assert "The case lists no phenomena, so no scale-effect threshold is checked." in " ".join(
        text.split()
    )
    assert 'phenomena = ["open_channel", "surface_tension", "distortion"]' in text
    check = runner.invoke(app, ["check", str(EXAMPLE)])
    assert check.exit_code == 0 and "phenomena = [" in check.output


def test_the_suggested_line_makes_the_checks_run(tmp_path: Path) -> None:
    hint = phenomena_hint(load_case(EXAMPLE))
    assert hint is not None
    text = EXAMPLE.read_text(encoding="utf-8")
    head, rest = text.split("\n[prototype]", 1)  # "before the first [table]"
    case_file = tmp_path / "with_phenomena.toml"
    case_file.write_text(f"{head}\n{hint.lines()[0]}\n\n[prototype]{rest}", encoding="utf-8")
    answer = solve(load_case(case_file))
    checked = {c.threshold.phenomenon for c in answer.effects.checks}
    assert checked == {"open_channel", "surface_tension", "distortion"}
    assert answer.phenomena_hint is None
    assert "phenomena_hint" not in answer.to_dict()


@pytest.mark.parametrize(
    "name", ["breakwater", "pipe_rig", "river_bend", "spillway", "towing_tank", "wind_tunnel"]
)
def test_bundled_cases_list_what_their_quantities_suggest(name: str) -> None:
    # each bundled case names its phenomena; the hint has nothing to add
    assert phenomena_hint(load_case(ROOT / "cases" / f"{name}.toml")) is None


def test_hint_for_a_gas_pipe_and_a_mapped_phenomenon() -> None:
    data = _data(ROOT / "cases" / "wind_tunnel.toml")
    del data["phenomena"]
    hint = phenomena_hint(case_from_dict(data))
    assert hint is not None and [s.phenomenon for s in hint.suggested] == ["compressibility"]
    data = _data(ROOT / "cases" / "spillway.toml")
    del data["phenomena"]
    hint = phenomena_hint(case_from_dict(data))
    assert hint is not None
    names = [s.phenomenon for s in hint.suggested]
    # prototype Froude number 14 at the toe (spillway.toml): supercritical flow
    assert {"hydraulic_jump", "chute_aeration"} <= set(names)
    jump = next(s for s in hint.suggested if s.phenomenon == "hydraulic_jump")
    assert jump.missing == ("depth",)  # the spillway has toe_depth, not depth: map it
    lines = hint.lines()
    assert "[phenomena.hydraulic_jump]" in lines
    assert any(line.startswith("depth = ") for line in lines)


# --------------------------------------------------------------------------------------------
# case files: every problem in one pass, helpful unit messages, trade units

BAD = """
title = "bad"
phenomena = ["open_chanel", "surface_tension"]
[prototype]
fluid = "water"
temperature = "12 C"
[prototype.quantities]
depth = "2 m"
velocity = "1 m/s"
discharge = "30 m3/s"
[groups]
froude = { exact = true }
reynold = { weight = 1 }
[model]
horizontal_ratio = { min = "1:100", max = "1:10" }
[limits]
discharge = { max = "3 cfs" }
depth = { min = "2 cm" }
"""


def test_every_problem_is_reported_in_one_pass(runner: CliRunner, tmp_path: Path) -> None:
    path = tmp_path / "bad.toml"
    path.write_text(BAD, encoding="utf-8")
    res = runner.invoke(app, ["check", str(path)])
    assert res.exit_code == 2
    assert "Traceback" not in res.output
    lines = [line for line in res.output.splitlines() if line.startswith("error: ")]
    keys = [line.split(": ")[2] for line in lines]
    assert keys == [
        "prototype.temperature",
        "prototype.quantities.discharge",
        "groups.reynold",
        "phenomena.open_chanel",
    ]
    assert "did you mean '12 degC'?" in lines[0]
    assert "did you mean '30 m^3/s'?" in lines[1]
    assert "did you mean 'open_channel'?" in lines[3]
    # the limit on the rejected discharge is not reported again (one problem, one message)
    assert not any("limits.discharge" in line for line in lines)


@pytest.mark.parametrize(
    ("text", "hint"),
    [
        ("12 C", "'12 degC'"),
        ("12 deg C", "'12 degC'"),
        ("54 F", "'54 degF'"),
        ("30 m3/s", "'30 m^3/s'"),
        ("2 m2", "'2 m^2'"),
        ("1 KG", "'1 kg'"),
    ],
)
def test_unit_messages_suggest_the_spelling(text: str, hint: str) -> None:
    with pytest.raises(ValueError, match=re.escape(f"did you mean {hint}?")):
        parse_quantity(text)


def test_unknown_units_without_a_likely_spelling_get_no_guess() -> None:
    with pytest.raises(ValueError, match=r"unknown unit 'furlongz' in '3 furlongz'$"):
        parse_quantity("3 furlongz")


def test_trade_discharge_units_are_read_at_their_defined_size() -> None:
    # definitions: foot = 0.3048 m and US gallon = 231 in^3 (exact); constants from `fluids`
    cfs = fc.foot**3
    gpm = fc.gallon / fc.minute
    mgd = 1e6 * fc.gallon / fc.day
    for text, want in (
        ("1 cfs", cfs),
        ("1 CFS", cfs),
        ("250 gpm", 250 * gpm),
        ("2 mgd", 2 * mgd),
        ("2 MGD", 2 * mgd),
        ("3 cumec", 3.0),
        ("40 lps", 0.040),
    ):
        value, dim, _ = parse_quantity(text)
        assert dim == (0, 3, -1, 0), text
        assert_allclose(value, want, rtol=1e-12, err_msg=text)
    assert_allclose(fc.gallon, 231 * 0.0254**3, rtol=1e-12)  # the US gallon's definition


def test_a_case_in_trade_units_loads(tmp_path: Path) -> None:
    text = EXAMPLE.read_text(encoding="utf-8").replace(
        'discharge = "760 m^3/s"', 'discharge = "26839 cfs"'
    )
    path = tmp_path / "cfs.toml"
    path.write_text(text, encoding="utf-8")
    case = load_case(path)
    assert_allclose(case.quantities["discharge"].value, 26839 * fc.foot**3, rtol=1e-12)


# --------------------------------------------------------------------------------------------
# the command line: flags, options documented


def _commands() -> dict[str, Any]:
    return typer.main.get_command(app).commands


def test_boolean_options_show_as_flags_in_help(runner: CliRunner) -> None:
    top = runner.invoke(app, ["--help"])
    assert top.exit_code == 0 and "<bool>" not in top.output
    for name, cmd in _commands().items():
        res = runner.invoke(app, [name, "--help"])
        assert res.exit_code == 0, name
        assert "<bool>" not in res.output, name
        flags = [p.opts[0] for p in cmd.params if getattr(p, "is_flag", False)]
        for flag in flags:
            line = next(line for line in res.output.splitlines() if flag in line)
            assert not re.search(re.escape(flag) + r"[\s|-]*<", line), (name, line)


def test_every_option_is_documented() -> None:
    docs = (ROOT / "README.md").read_text(encoding="utf-8")
    docs += "".join(p.read_text(encoding="utf-8") for p in (ROOT / "docs").glob("*.md"))
    for name, cmd in _commands().items():
        assert f"compromise {name}" in docs, name
        for p in cmd.params:
            for opt in p.opts:
                if opt.startswith("--"):
                    assert opt in docs, f"{name} {opt}"
    assert "out/<case file name without .toml>/" in docs  # the default output folder


def test_readme_links_the_reading_guide() -> None:
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    assert "(docs/reading-the-answer.md)" in readme
    guide = (ROOT / "docs" / "reading-the-answer.md").read_text(encoding="utf-8")
    for topic in (
        "weighted mismatch",
        "factor",
        "binds",
        "multiplier",
        "estimate",
        "re-solved drop",
        "separated by",
        "knee",
        "from memory",
        "common practice",
    ):
        assert topic in guide, topic


# --------------------------------------------------------------------------------------------
# units in table headers


def test_table_headers_carry_units(runner: CliRunner) -> None:
    out = runner.invoke(app, ["solve", str(ROOT / "cases" / "river_bend.toml")]).output
    heads = [line for line in out.splitlines() if line.startswith(("group ", "limit ", "binding"))]
    assert heads and all("[" in h for h in heads)
    limits = out.split("Limits (worst condition):")[1].split("\n\n")[0]
    assert "unit [SI]" in limits
    assert re.search(r"discharge\.max .* m\^3/s ", limits)
    thresholds = out.split("\nthreshold ")[1].split("Sources:")[0]
    assert " unit " in thresholds.splitlines()[0]
    depth_row = next(r for r in thresholds.splitlines() if r.startswith("surface_tension.min_d"))
    assert re.search(r">= 0\.03\s+m\s", depth_row)
    check = runner.invoke(app, ["check", str(EXAMPLE)]).output
    assert "bound  unit [SI]" in check
