"""The layer contract of the package (behaviour the maintainers rely on, not a physics check).

``lint-imports`` reads the contracts in ``pyproject.toml``: each sub-package imports only the
layers below it, no modules import each other in a circle, only the CLI knows typer, only
presentation draws (matplotlib) and renders templates (jinja2). The second test proves the
contract bites: the same check on a copy of the package with one arrow up a floor and one
circle added must fail and name both.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
LINT = Path(sys.executable).with_name("lint-imports")


def _lint(cwd: Path) -> subprocess.CompletedProcess[str]:
    env = {**os.environ, "PYTHONPATH": str(cwd)}
    return subprocess.run(
        [str(LINT), "--config", str(cwd / "pyproject.toml"), "--no-cache"],
        cwd=cwd,
        env=env,
        capture_output=True,
        text=True,
        timeout=120,
    )


def test_layer_contract_is_kept() -> None:
    run = _lint(ROOT)
    assert run.returncode == 0, run.stdout + run.stderr
    assert "BROKEN" not in run.stdout
    assert run.stdout.count("KEPT") == 5


def test_layer_contract_catches_an_arrow_up_and_a_circle(tmp_path: Path) -> None:
    shutil.copytree(ROOT / "compromise", tmp_path / "compromise")
    shutil.copy(ROOT / "pyproject.toml", tmp_path / "pyproject.toml")
    with open(tmp_path / "compromise" / "physics" / "friction.py", "a") as f:
        f.write("\n\ndef _upward():\n    from compromise.solving import grid  # noqa: F401\n")
    with open(tmp_path / "compromise" / "solving" / "design.py", "a") as f:
        f.write("\n\ndef _circle():\n    from compromise.solving import optimum  # noqa: F401\n")
    run = _lint(tmp_path)
    assert run.returncode != 0
    assert "compromise.physics.friction -> compromise.solving.grid" in run.stdout
    assert ".design -> .optimum" in run.stdout
