"""Weight sensitivity speed (a benchmark, not a test).

For the river and wind-tunnel cases it prints the time of ``weight_sensitivity`` with 2,000 and
20,000 samples, the samples per second, and the ratio to one optimum (``find_optimum`` without
alternatives) measured in the same run, the yardstick on a machine whose speed varies.
Targets (issue 18): 20,000 samples under 1.5 s on the river case (under 450x one optimum) and
under 5 s on the wind tunnel. It also prints a digest of the winners (seed 0: every sample's
winner and tied-best set, the tallies and the fluid shares) so that a change can be checked to
leave them identical. Before the reduced solver (``compromise.explore.reduced_qp``) the digests
were river 2,000 ``abc5edb925ea``, 20,000 ``52158021b723``; wind tunnel 2,000
``1e2f5493213d``, computed with the enumeration in the same way.

Run: ``.venv/bin/python benchmarks/sensitivity.py`` (``--quick``: 2,000 samples only)
"""

from __future__ import annotations

import hashlib
import math
import sys
import time
from pathlib import Path

from compromise.casefile.load import load_case
from compromise.explore.sensitivity import weight_sensitivity
from compromise.solving.optimum import find_optimum

ROOT = Path(__file__).resolve().parents[1]


def winners_digest(result) -> str:
    """A digest of what the issue asks to stay identical: every sample's winner and tied-best
    set, the tallies, the nominal winner and the fluid shares (not the ranges' last digits)."""
    h = hashlib.sha256()
    h.update(result.winners.tobytes())
    h.update(result.best_sets.tobytes())
    tallies = [(c.label, c.wins, c.ties) for c in result.candidates]
    shares = sorted(result.fluid_shares.items())
    h.update(
        repr((result.nominal, result.nominal_tied, result.tied_samples, tallies, shares)).encode()
    )
    return h.hexdigest()[:12]


def best_of(fn, repeat: int) -> float:
    best = math.inf
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best


def main() -> None:
    sizes = (2000,) if "--quick" in sys.argv else (2000, 20000)
    print(
        f"{'case':12s} {'samples':>8s} {'time [s]':>9s} {'samples/s':>10s} {'x optimum':>10s}"
        "  winners"
    )
    for name in ("river_bend", "wind_tunnel"):
        case = load_case(ROOT / "cases" / f"{name}.toml")
        find_optimum(case, alternatives=False)
        t_opt = best_of(lambda case=case: find_optimum(case, alternatives=False), 7)
        for n in sizes:
            result = weight_sensitivity(case, samples=n, seed=0)
            t = best_of(lambda case=case, n=n: weight_sensitivity(case, samples=n, seed=0), 2)
            digest = winners_digest(result)
            print(f"{name:12s} {n:8d} {t:9.3f} {n / t:10.0f} {t / t_opt:10.0f}  {digest}")
        print(f"{'':12s} one optimum: {t_opt * 1e3:.1f} ms")


if __name__ == "__main__":
    main()
