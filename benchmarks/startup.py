"""Start-up time of the command line (a benchmark, not a test).

Prints the wall time of ``compromise --help`` and of ``compromise check`` on a bundled case,
each as the best of several runs, beside a reference run of a bare ``python -c pass`` in the
same process, and the ratio of each to its target (0.3 s and 1.5 s on the 2-core machine).

Run: ``.venv/bin/python benchmarks/startup.py``
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXE = [sys.executable, "-m", "compromise"]
RUNS = 5


def best(cmd: list[str]) -> float:
    times = []
    for _ in range(RUNS):
        t = time.perf_counter()
        subprocess.run(cmd, cwd=ROOT, check=True, capture_output=True)
        times.append(time.perf_counter() - t)
    return min(times)


def main() -> None:
    ref = best([sys.executable, "-c", "pass"])
    rows = [
        ("compromise --help", [*EXE, "--help"], 0.3),
        ("compromise check cases/river_bend.toml", [*EXE, "check", "cases/river_bend.toml"], 1.5),
    ]
    print(f"reference: python -c pass          {ref * 1e3:8.1f} ms")
    for label, cmd, target in rows:
        t = best(cmd)
        print(
            f"{label:40s} {t * 1e3:8.1f} ms  = {t / ref:5.1f} x reference,"
            f" {t / target:4.2f} of the {target} s target"
        )


if __name__ == "__main__":
    main()
