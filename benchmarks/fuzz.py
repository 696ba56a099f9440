"""Fuzz the bundled cases: N mutated cases (default 10,000) through ``check`` and ``solve``.

Prints the count of each exit status per command, and every run that ended otherwise (-1: an
exception escaped the command line, -2: longer than 10 s, 3: an internal error) with the seed
that reproduces it: ``python benchmarks/fuzz.py --seed S --runs 1``. Issue 16, item 7.
"""

from __future__ import annotations

import argparse
import collections
import random
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))

from fuzzing import mutate, run_case, to_toml


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--runs", type=int, default=10_000)
    parser.add_argument("--seed", type=int, default=0, help="first seed (one per run)")
    args = parser.parse_args()
    counts: dict[str, collections.Counter[int]] = {
        "check": collections.Counter(),
        "solve": collections.Counter(),
    }
    bad: list[tuple[int, str, int, str]] = []
    slowest = (0.0, -1)
    start = time.perf_counter()
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "case.toml"
        for seed in range(args.seed, args.seed + args.runs):
            data = mutate(random.Random(seed))
            path.write_text(to_toml(data), encoding="utf-8")
            t0 = time.perf_counter()
            for command, status, output in run_case(path, seconds=10):
                counts[command][status] += 1
                if status not in (0, 1, 2) or "Traceback" in output:
                    bad.append((seed, command, status, output.strip().splitlines()[-1][:200]))
            slowest = max(slowest, (time.perf_counter() - t0, seed))
    elapsed = time.perf_counter() - start
    print(
        f"{args.runs} mutated cases in {elapsed:.0f} s (slowest {slowest[0]:.1f} s, seed "
        f"{slowest[1]})"
    )
    for command, counter in counts.items():
        text = ", ".join(f"exit {k}: {v}" for k, v in sorted(counter.items()))
        print(f"  {command}: {text}")
    print(f"  tracebacks, internal errors or hangs: {len(bad)}")
    for seed, command, status, line in bad[:40]:
        print(f"    seed {seed} {command} -> {status}: {line}")


if __name__ == "__main__":
    main()
