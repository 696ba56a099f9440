"""Start-up time of the command line (a benchmark, not a test).

Prints the wall time of ``compromise --help``, ``check``, ``evaluate``-free ``solve`` on the
river case and ``solve`` on the wind tunnel (three gases), each as the best of several runs,
beside two reference runs in the same process: a bare ``python -c pass`` and the import floor
``python -c "import numpy, pint"``. Targets (issue 18): ``solve`` at most 2.5x the floor,
``check`` at most 2x; ``--help`` under 0.3 s. The commands run with the user's cache (pint's
parsed definitions, the fluid tables) warm, as every run after the first; the last lines show
the first run with an empty cache (``COMPROMISE_NO_CACHE`` set, nothing read or written).

Every run, the floor's too, may keep Python's compiled bytecode (``__pycache__``), as after
any installation: a ``PYTHONDONTWRITEBYTECODE`` in the caller's environment is left out, or
each run would compile compromise's modules again (a tenth of a second). Run with
``--no-bytecode`` to keep it (and measure that case).

Run: ``.venv/bin/python benchmarks/startup.py``
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXE = [sys.executable, "-m", "compromise"]
RUNS = 7


BYTECODE = "--no-bytecode" not in sys.argv[1:]
ENV = {k: v for k, v in os.environ.items() if not (BYTECODE and k == "PYTHONDONTWRITEBYTECODE")}


def best(cmd: list[str], env: dict[str, str] | None = None) -> float:
    times = []
    for _ in range(RUNS):
        t = time.perf_counter()
        subprocess.run(cmd, cwd=ROOT, check=False, capture_output=True, env=env or ENV)
        times.append(time.perf_counter() - t)
    return min(times)


def main() -> None:
    ref = best([sys.executable, "-c", "pass"])
    floor = best([sys.executable, "-c", "import numpy, pint"])
    rows = [
        ("compromise --help", [*EXE, "--help"], None),
        ("check cases/river_bend.toml", [*EXE, "check", "cases/river_bend.toml"], 2.0),
        ("solve cases/river_bend.toml", [*EXE, "solve", "cases/river_bend.toml"], 2.5),
        ("solve cases/wind_tunnel.toml", [*EXE, "solve", "cases/wind_tunnel.toml"], 2.5),
    ]
    kept = "kept" if BYTECODE or "PYTHONDONTWRITEBYTECODE" not in os.environ else "not kept"
    print(f"compiled bytecode (__pycache__): {kept}")
    print(f"reference: python -c pass                {ref * 1e3:8.1f} ms")
    print(f"floor: python -c 'import numpy, pint'    {floor * 1e3:8.1f} ms")
    for row in rows:  # warm the caches (and write the bytecode)
        subprocess.run(row[1], cwd=ROOT, check=False, capture_output=True, env=ENV)
    for label, cmd, target in rows:
        t = best(cmd)
        verdict = (
            ""
            if target is None
            else f"  target {target} x: {'met' if t / floor <= target else 'NOT met'}"
        )
        print(f"{label:40s} {t * 1e3:8.1f} ms  = {t / floor:5.2f} x floor{verdict}")
    cold = {**ENV, "COMPROMISE_NO_CACHE": "1"}
    print("without the cache (as a first run):")
    for label, cmd, _ in rows[1:]:
        t = best(cmd, env=cold)
        print(f"{label:40s} {t * 1e3:8.1f} ms  = {t / floor:5.2f} x floor")


if __name__ == "__main__":
    main()
