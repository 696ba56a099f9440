"""Wall time of ``compromise report`` (a benchmark, not a test).

Prints the wall time of ``compromise report cases/river_bend.toml`` (a fresh process: imports,
solve, scale effects, the design-space map, the main Pareto front, the weight sensitivity, three
SVG figures, HTML and Markdown), best of three runs, against its target of 5 s on the 2-core
machine without ``--pdf``; then one run with ``--pdf`` (headless Chromium), when installed.

Run: ``.venv/bin/python benchmarks/report.py``
"""

from __future__ import annotations

import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXE = [sys.executable, "-m", "compromise"]
RUNS = 3
TARGET = 5.0  # [s], issue 12


def wall(args: list[str]) -> float:
    t = time.perf_counter()
    subprocess.run([*EXE, *args], cwd=ROOT, check=True, capture_output=True)
    return time.perf_counter() - t


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        base = ["report", "cases/river_bend.toml", "-o", tmp, "--force"]
        best = min(wall(base) for _ in range(RUNS))
        print(
            f"compromise report cases/river_bend.toml        {best:6.2f} s   target {TARGET:.0f} s"
            f"   ({best / TARGET:.0%} of it)"
        )
        if shutil.which("chromium") or shutil.which("chromium-browser"):
            print(f"  ... with --pdf (headless Chromium)          {wall([*base, '--pdf']):6.2f} s")
        else:
            print("  ... with --pdf: skipped, chromium not installed")


if __name__ == "__main__":
    main()
