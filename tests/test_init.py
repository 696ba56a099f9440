"""``compromise init``: a commented starting case from a bundled scenario.

Behaviour a user relies on: ``--list`` names every scenario with one line; the file written is
a complete case that ``compromise check`` accepts and that solves as the repository's copy
does; an existing file is never overwritten; an unknown name is one line and exit 2.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from typer.testing import CliRunner

from compromise.cli import app

ROOT = Path(__file__).resolve().parents[1]
CASES = sorted(p.stem for p in (ROOT / "cases").glob("*.toml"))
runner = CliRunner()


def test_list_names_every_scenario_on_one_line() -> None:
    res = runner.invoke(app, ["init", "--list"])
    assert res.exit_code == 0, res.output
    lines = res.output.splitlines()
    assert [line.split()[0] for line in lines] == CASES
    assert all(len(line.split(maxsplit=1)) == 2 for line in lines)  # a name and a description
    assert any("river bend" in line for line in lines)


@pytest.mark.parametrize("name", CASES)
def test_bundled_scenario_is_the_repository_case(name: str) -> None:
    """The package ships the same files as cases/ (so an installed tool starts from them)."""
    from compromise.casefile.scenarios import scenario_text

    assert scenario_text(name) == (ROOT / "cases" / f"{name}.toml").read_text(encoding="utf-8")


def test_written_case_checks_and_solves_like_the_original(tmp_path: Path) -> None:
    target = tmp_path / "my_spillway.toml"
    res = runner.invoke(app, ["init", "spillway", "-o", str(target)])
    assert res.exit_code == 0, res.output
    text = target.read_text(encoding="utf-8")
    assert text.startswith("# Starting case written by 'compromise init spillway'")
    assert text.endswith((ROOT / "cases" / "spillway.toml").read_text(encoding="utf-8"))
    assert runner.invoke(app, ["check", str(target)]).exit_code == 0
    mine = runner.invoke(app, ["solve", str(target), "--json"])
    original = runner.invoke(app, ["solve", str(ROOT / "cases" / "spillway.toml"), "--json"])
    assert mine.exit_code == 0
    assert '"design"' in mine.output
    design = mine.output[mine.output.index('"design"') :]
    assert design == original.output[original.output.index('"design"') :]


def test_refuses_to_overwrite(tmp_path: Path) -> None:
    target = tmp_path / "case.toml"
    target.write_text("# mine\n")
    res = runner.invoke(app, ["init", "river_bend", "-o", str(target)])
    assert res.exit_code == 2
    assert res.output.count("\n") == 1 and "exists" in res.output
    assert target.read_text() == "# mine\n"


def test_default_name_in_the_current_folder(tmp_path: Path, monkeypatch) -> None:
    monkeypatch.chdir(tmp_path)
    res = runner.invoke(app, ["init", "towing_tank"])
    assert res.exit_code == 0, res.output
    assert (tmp_path / "towing_tank.toml").is_file()


def test_unknown_template_is_one_line(tmp_path: Path) -> None:
    res = runner.invoke(app, ["init", "dam_break", "-o", str(tmp_path / "x.toml")])
    assert res.exit_code == 2
    assert res.output.count("\n") == 1
    assert "expected one of breakwater" in res.output and "'dam_break'" in res.output
    assert not (tmp_path / "x.toml").exists()
