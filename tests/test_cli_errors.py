"""Tests of ``compromise check`` and the command's handling of bad input.

The contract checked here is the project's (design notes, "The output contract"; style notes,
"Results and errors"): bad input exits with status 2 and prints one line per problem,
``error: FILE: KEY: message``, with no traceback; a good case exits with status 0. The exit
codes follow the common Unix habit of 2 for a usage error (common practice). The version printed
is compared with the one in ``pyproject.toml`` (PyPA core metadata, PEP 621).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest
from numpy.testing import assert_allclose
from typer.testing import CliRunner

from compromise.cli import app

ROOT = Path(__file__).parent.parent
EXAMPLE = ROOT / "tests" / "data" / "design_example.toml"
EXAMPLE_TEXT = EXAMPLE.read_text(encoding="utf-8")


def edit(*pairs: tuple[str, str]) -> str:
    text = EXAMPLE_TEXT
    for old, new in pairs:
        assert text.count(old) == 1, f"{old!r} is not in the example exactly once"
        text = text.replace(old, new)
    return text


@pytest.fixture
def runner() -> CliRunner:
    return CliRunner()


# Bad files, each with the keys of the problems it holds (None: the file itself).
BAD_CASES: dict[str, tuple[str, list[str | None]]] = {
    "unknown_key": (edit(("[limits]", "[limts]")), ["limts"]),
    "three_problems": (
        edit(
            ("froude   = { weight = 100 }", "froude   = { wieght = 100 }"),
            ('depth     = { min = "3 cm" }', "depth     = { min = 3 }"),
            ('temperature = "12 degC"', 'temperature = "-10 degC"'),
        ),
        ["prototype.temperature", "groups.froude.wieght", "limits.depth.min"],
    ),
    "wrong_dimension": (
        edit(('depth     = { min = "3 cm" }', 'depth     = { min = "3 m/s" }')),
        ["limits.depth.min"],
    ),
    "syntax_error": (edit(('fluid = "water"', "fluid = water")), [None]),
    "fluid_fraction": (
        edit(('"glycerol-water 20%"', '"glycerol-water 120%"')),
        ["model.fluids[2]"],
    ),
    "bad_expression": (
        edit(('expr = "width / depth"', 'expr = "__import__(width)"')),
        ["groups.aspect.expr"],
    ),
    "min_above_max": (
        edit(('{ min = "1:1000", max = "1:20" }', '{ min = "1:20", max = "1:1000" }')),
        ["model.horizontal_ratio"],
    ),
}


@pytest.mark.parametrize("name", sorted(BAD_CASES))
def test_check_bad_case_exits_2_with_one_line_per_problem(
    runner: CliRunner, tmp_path: Path, name: str
) -> None:
    text, keys = BAD_CASES[name]
    path = tmp_path / f"{name}.toml"
    path.write_text(text, encoding="utf-8")
    result = runner.invoke(app, ["check", str(path)])
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    assert result.exception is None or isinstance(result.exception, SystemExit)
    assert result.stdout == ""
    lines = result.stderr.splitlines()
    assert len(lines) == len(keys), lines
    for line in lines:
        assert line.startswith(f"error: {path}: ")
    found = sorted(k for k in keys if k is not None)
    named = sorted(key for key in found if any(f"{path}: {key}: " in line for line in lines))
    assert named == found


def test_check_bad_case_in_json_mode_prints_no_json(runner: CliRunner, tmp_path: Path) -> None:
    path = tmp_path / "bad.toml"
    path.write_text(BAD_CASES["three_problems"][0], encoding="utf-8")
    result = runner.invoke(app, ["check", "--json", str(path)])
    assert result.exit_code == 2
    assert result.stdout == ""
    assert len(result.stderr.splitlines()) == 3
    assert "Traceback" not in result.output


def test_check_missing_file_and_directory(runner: CliRunner, tmp_path: Path) -> None:
    missing = tmp_path / "nowhere.toml"
    result = runner.invoke(app, ["check", str(missing)])
    assert result.exit_code == 2
    assert result.stderr == f"error: {missing}: file not found\n"
    result = runner.invoke(app, ["check", str(tmp_path)])
    assert result.exit_code == 2
    assert result.stderr == f"error: {tmp_path}: expected a case file, got a directory\n"
    assert "Traceback" not in result.output


def test_check_does_not_modify_the_bad_file(runner: CliRunner, tmp_path: Path) -> None:
    path = tmp_path / "bad.toml"
    path.write_text(BAD_CASES["three_problems"][0], encoding="utf-8")
    before = path.read_bytes()
    stamp = path.stat().st_mtime_ns
    for args in (["check", str(path)], ["check", "--json", str(path)]):
        assert runner.invoke(app, args).exit_code == 2
    assert path.read_bytes() == before
    assert path.stat().st_mtime_ns == stamp
    assert sorted(p.name for p in tmp_path.iterdir()) == ["bad.toml"]


def test_check_good_example_exits_0_and_lists_quantities(runner: CliRunner) -> None:
    result = runner.invoke(app, ["check", str(EXAMPLE)])
    assert result.exit_code == 0, result.output
    assert result.stderr == ""
    out = result.stdout
    assert out.startswith(f"{EXAMPLE}: OK")
    assert "Heron Creek bend: flood scoping model" in out
    for name in ("depth", "width", "reach", "velocity", "discharge", "slope"):
        assert any(line.split()[:1] == [name] for line in out.splitlines()), name
    assert "2500" in out  # reach, 2.5 km in metres (BIPM 2019, Table 7: kilo = 1e3)
    assert "velocity / sqrt(g * depth)" in out


def test_check_good_example_json(runner: CliRunner) -> None:
    result = runner.invoke(app, ["check", "--json", str(EXAMPLE)])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    q = data["quantities"]
    assert list(q) == ["depth", "width", "reach", "velocity", "discharge", "slope"]
    assert_allclose(q["reach"]["value"], 2500.0, rtol=1e-12)
    assert q["discharge"]["unit"] == "m^3/s"
    assert_allclose(data["prototype"]["temperature"], 12.0, rtol=1e-12)  # shown in degC
    assert data["model"]["preferred_ratios"][0] == "1:25"


def test_help_lists_check(runner: CliRunner) -> None:
    result = runner.invoke(app, ["--help"])
    assert result.exit_code == 0
    assert "check" in result.stdout
    result = runner.invoke(app, ["check", "--help"])
    assert result.exit_code == 0
    assert "Validate a case file" in result.stdout


def test_version_matches_pyproject_pep621(runner: CliRunner) -> None:
    version = tomllib.loads((ROOT / "pyproject.toml").read_text())["project"]["version"]
    result = runner.invoke(app, ["--version"])
    assert result.exit_code == 0
    assert result.stdout == f"compromise {version}\n"


def test_importing_the_cli_is_light() -> None:
    # Heavy libraries are imported only by the commands that need them.
    code = (
        "import sys, compromise.cli\n"
        "heavy = sorted(m for m in sys.modules if m.split('.')[0] in "
        "('CoolProp', 'pandas', 'matplotlib'))\n"
        "print(','.join(heavy))\n"
    )
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    done = subprocess.run(
        [sys.executable, "-c", code],
        cwd=ROOT,
        env=env,
        capture_output=True,
        text=True,
        timeout=120,
        check=False,
    )
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == ""
