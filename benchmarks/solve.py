"""Solver speed and optimality against differential evolution and a dense brute force.

A benchmark, not a test. On the bundled river case with six candidate model fluids over its
temperature range it prints, in one run: the exact solver's time and objective; scipy's
``differential_evolution`` (tol 1e-10) on the same problem; a dense brute force; and the
ratios. Then the solver's time for 6, 24 and 96 candidate fluids (growth should be linear).
Last, for every bundled case, the optimum alone beside the complete answer (alternatives per
fluid and per preferred ratio, the diagnosis of each infeasible preferred ratio, the cost of
every binding limit and the scale effects), against the 30 ms target for the complete answer.
And the time and peak memory of cases with 10, 100 and 500 laboratory limits, both on quantities
that scale alike (lengths: the rows collapse to the tightest) and on quantities with distinct
scale laws (past 40 distinct rows the dual active-set solver takes over from the enumeration).

Run: ``.venv/bin/python benchmarks/solve.py``
"""

from __future__ import annotations

import copy
import math
import time
import tomllib
import tracemalloc
from pathlib import Path

import numpy as np

from compromise.casefile.load import case_from_dict, load_case
from compromise.review.answer import solve
from compromise.solving.grid import FluidStates
from compromise.solving.optimum import find_optimum
from compromise.solving.problem import build_problem

ROOT = Path(__file__).resolve().parents[1]
SIX = [
    "water",
    "seawater",
    "glycerol-water 5%",
    "glycerol-water 10%",
    "seawater 20 g/kg",
    "glycerol-water 2%",
]


def river(fluids: list[str]):
    data = tomllib.loads((ROOT / "cases" / "river_bend.toml").read_text())
    data["model"]["fluids"] = fluids
    return case_from_dict(data, path="river_bend.toml")


def timed(fn, repeat: int = 5):
    best, out = math.inf, None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t)
    return best, out


def penalised(problem, fs: FluidStates):
    """Objective of the full problem over (x, z, v, T) with an exact-penalty for the rows."""
    pr = problem

    def f(u: np.ndarray) -> float:
        y, t = u[:3], u[3]
        p = fs.p(np.array([t]), fs.pressures()[0])[0]
        h, e = pr.rhs(p)
        r = pr.A @ y + pr.B @ p
        viol = np.sum(np.maximum(pr.G @ y - h, 0.0)) + np.sum(np.abs(pr.E @ y - e))
        return float(np.sum(pr.W * r**2) + 1e6 * viol)

    return f


def differential_evolution_run(case) -> float:
    from scipy.optimize import differential_evolution

    problem = build_problem(case)
    m = case.model
    lx = (math.log(m.horizontal_ratio[0]), math.log(m.horizontal_ratio[1]))
    ld = (math.log(m.distortion[0]), math.log(m.distortion[1]))
    best = math.inf
    for fluid in m.fluids:
        fs = FluidStates(case, fluid, problem.used_properties)
        f = penalised(problem, fs)
        bounds = [lx, (lx[0] + ld[0], lx[1] + ld[1]), (lx[0], 0.0), fs.t_range]
        r = differential_evolution(f, bounds, tol=1e-10, seed=1, polish=True, maxiter=3000)
        best = min(best, r.fun)
    return best


def brute_force(case, n_x: int = 160, n_d: int = 80, n_t: int = 36) -> float:
    """Dense grid over (fluid, T, X, distortion); V from the exact Froude group."""
    problem = build_problem(case)
    m = case.model
    X = np.linspace(math.log(m.horizontal_ratio[0]), math.log(m.horizontal_ratio[1]), n_x)
    D = np.linspace(math.log(m.distortion[0]), math.log(m.distortion[1]), n_d)
    x, d = np.meshgrid(X, D, indexing="ij")
    z = x + d
    y = np.stack([x.ravel(), z.ravel(), 0.5 * z.ravel()], axis=1)  # Froude exact: V = Y^1/2
    best = math.inf
    for fluid in m.fluids:
        fs = FluidStates(case, fluid, problem.used_properties)
        T = np.linspace(*fs.t_range, n_t)
        for p in fs.p(T, fs.pressures()[0]):
            h, _ = problem.rhs(p)
            ok = np.all(y @ problem.G.T <= h + 1e-12, axis=1)
            r = y @ problem.A.T + p @ problem.B.T
            obj = np.where(ok, np.sum(problem.W * r**2, axis=1), np.inf)
            best = min(best, float(obj.min()))
    return best


def main() -> None:
    case = river(SIX)
    solve(case, alternatives=False)  # builds and caches the fluid tables
    t_exact, sol = timed(lambda: solve(case, alternatives=False))
    t_de, obj_de = timed(lambda: differential_evolution_run(case), repeat=1)
    t_bf, obj_bf = timed(lambda: brute_force(case), repeat=1)
    print(
        "river case, 6 candidate fluids, temperature range "
        f"{case.model.temperature[0] - 273.15:.0f}-{case.model.temperature[1] - 273.15:.0f} degC"
    )
    print(
        f"{'method':28s} {'time [ms]':>10s} {'objective':>14s} {'time ratio':>11s}"
        f" {'objective ratio':>16s}"
    )
    for name, t, obj in [
        ("exact (compromise)", t_exact, sol.objective),
        ("differential_evolution", t_de, obj_de),
        ("dense brute force", t_bf, obj_bf),
    ]:
        print(
            f"{name:28s} {t * 1e3:10.2f} {obj:14.8f} {t / t_exact:11.1f}"
            f" {obj / sol.objective:16.8f}"
        )
    print()
    print("growth with the number of candidate fluids (solver only, tables cached):")
    base = None
    for n in (6, 24, 96):
        fluids = list(SIX)
        k = 0
        while len(fluids) < n:
            k += 1
            fluids.append(f"glycerol-water {3 + k * 0.21:.2f}%")
        c = river(fluids)
        solve(c, alternatives=False)
        t, _ = timed(lambda c=c: solve(c, alternatives=False), repeat=3)
        base = base or t / n
        print(
            f"  {n:3d} fluids: {t * 1e3:8.2f} ms  ({t / n * 1e3:6.3f} ms per fluid,"
            f" {t / n / base:4.2f} x the 6-fluid rate)"
        )


def bundled() -> None:
    """The optimum alone and the complete answer on every bundled case (tables cached)."""
    print()
    print("bundled cases: the optimum alone and the complete answer (best of 7, tables cached)")
    print(f"{'case':14s} {'optimum [ms]':>13s} {'answer [ms]':>12s} {'ratio':>6s}  target 30 ms")
    for path in sorted((ROOT / "cases").glob("*.toml")):
        case = load_case(path)
        solve(case)
        t_opt, _ = timed(lambda case=case: find_optimum(case, alternatives=False), repeat=7)
        t_all, _ = timed(lambda case=case: solve(case), repeat=7)
        verdict = "met" if t_all < 0.030 else "NOT met"
        print(
            f"{path.stem:14s} {t_opt * 1e3:13.1f} {t_all * 1e3:12.1f} {t_all / t_opt:6.1f}"
            f"  {verdict}"
        )


def limits_case(n: int, distinct: bool):
    data = tomllib.loads((ROOT / "cases" / "river_bend.toml").read_text())
    data = copy.deepcopy(data)
    quantities = data["prototype"]["quantities"]
    for k in range(n):
        name = f"feature_{k}"
        if distinct:
            a = k / max(n - 1, 1)
            quantities[name] = {
                "value": "10 m",
                "scales_as": f"horizontal**{a:.6f} * vertical**{1 - a:.6f}",
            }
            data["limits"][name] = {"max": f"{2.0 + 0.001 * k:.3f} m"}
        else:
            quantities[name] = f"{100 + k} m"
            data["limits"][name] = {"max": f"{20 + k} m"}
    return case_from_dict(data, path=f"{n} limits")


def many_limits() -> None:
    """Time and peak memory (tracemalloc) of the complete answer with many limits."""
    print()
    print("many laboratory limits: the complete answer (targets: 500 limits < 1 s, < 300 MB)")
    print(f"{'limits':>7s} {'kind':>9s} {'time [s]':>9s} {'peak [MB]':>10s}")
    for distinct in (False, True):
        for n in (10, 100, 500):
            case = limits_case(n, distinct)
            solve(case)
            # the time without tracing (tracemalloc slows Python code several fold), then the
            # peak memory of one traced run
            elapsed, _ = timed(lambda case=case: solve(case), repeat=3)
            tracemalloc.start()
            solve(case)
            peak = tracemalloc.get_traced_memory()[1]
            tracemalloc.stop()
            kind = "distinct" if distinct else "alike"
            print(f"{n:7d} {kind:>9s} {elapsed:9.3f} {peak / 2**20:10.1f}")


if __name__ == "__main__":
    main()
    bundled()
    many_limits()
