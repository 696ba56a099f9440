"""Regression tests (the project's own earlier output, not an independent source).

``compromise solve CASE --json`` on every bundled case must stay byte-identical to the answer
stored in ``tests/data/regression/``. The stored answers were written by the release before the
package was split into layer sub-packages; a deliberate change of an answer updates the stored
file in the same commit, with the reason in the commit message.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from typer.testing import CliRunner

from compromise.cli import app

ROOT = Path(__file__).resolve().parents[1]
STORED = ROOT / "tests" / "data" / "regression"
CASES = sorted(p.stem for p in (ROOT / "cases").glob("*.toml"))


@pytest.mark.parametrize("name", CASES)
def test_solve_json_matches_stored_answer_regression(name: str) -> None:
    result = CliRunner().invoke(app, ["solve", str(ROOT / "cases" / f"{name}.toml"), "--json"])
    assert result.exit_code in (0, 1), result.output
    expected = (STORED / f"solve_{name}.json").read_text()
    assert result.stdout == expected
