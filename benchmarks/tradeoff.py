"""Pareto front speed and quality against NSGA-II (a benchmark, not a test).

On the bundled river case, the front between the weighted mismatch and the model discharge
(the pump limit lifted), traced in one run by

* ``compromise.explore.tradeoffs.trace_front`` (exact epsilon-constraint, 100 points), and
* NSGA-II from pymoo (Deb, K., Pratap, A., Agarwal, S., Meyarivan, T. (2002). A fast and elitist
  multiobjective genetic algorithm: NSGA-II. IEEE Trans. Evol. Comput. 6(2), 182-197), with a
  population of 100 for 200 generations, over (ln X, ln distortion, temperature), the velocity
  ratio following from the exact Froude group and every limit a constraint.

Both fronts are measured against a reference: the same exact sweep with 2000 points, taken as
the piecewise-linear curve through them. In axes normalised to the reference's range (ideal 0,
nadir 1), it prints each method's time, hypervolume (reference point (1.1, 1.1)) and GD+ (to the
curve, :func:`compromise.explore.pareto.gd_plus_polyline`), and the ratios. Targets: 100 points in
under
0.3 s, a hypervolume at least NSGA-II's, GD+ under 1e-6.

pymoo is installed for this script only (``.venv/bin/pip install pymoo``); it is not a
dependency of compromise.

Then the same 100-point front with 1, 6, 24 and 96 candidate model fluids (water, seawater and
glycerol-water mixtures): time, peak traced memory (tracemalloc) and the ratio to one fluid.
Targets (issue 18): 96 fluids under 1 s, under 20x the one-fluid front, under 250 MB, growth at
most linear. ``--fluids`` runs only this part (no pymoo needed).

Run: ``.venv/bin/python benchmarks/tradeoff.py`` (``--fluids`` for the fluid scaling alone)
"""

from __future__ import annotations

import math
import sys
import time
import tomllib
import tracemalloc
from pathlib import Path

import numpy as np

from compromise.casefile.load import case_from_dict, load_case
from compromise.explore.axes import axes_for, state_spaces
from compromise.explore.pareto import gd_plus_polyline, hypervolume, nondominated
from compromise.explore.tradeoffs import trace_front

ROOT = Path(__file__).resolve().parents[1]
AXES = ["total", "discharge"]
POINTS = 100


def timed(fn, repeat: int = 5):
    best, out = math.inf, None
    for _ in range(repeat):
        t = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t)
    return best, out


def nsga2(case, seed: int = 1) -> tuple[float, np.ndarray]:
    """NSGA-II on the same problem; returns its time and its front, re-evaluated with the
    source property models (the exact sweep's values use them too)."""
    from pymoo.algorithms.moo.nsga2 import NSGA2
    from pymoo.core.problem import Problem
    from pymoo.optimize import minimize

    problem, axes = axes_for(case, AXES)
    fs = state_spaces(case, problem, axes)[0]
    E, lnp = problem.E[0], fs.lnp[:1]
    m = case.model
    lo = [math.log(m.horizontal_ratio[0]), math.log(m.distortion[0]), fs.t_range[0]]
    hi = [math.log(m.horizontal_ratio[1]), math.log(m.distortion[1]), fs.t_range[1]]

    def decode(u: np.ndarray, p: np.ndarray) -> np.ndarray:
        x, z = u[:, 0], u[:, 0] + u[:, 1]
        e = problem.e0[0] + p @ problem.Q[0]
        return np.column_stack([x, z, (e - E[0] * x - E[1] * z) / E[2]])

    def evaluate(u: np.ndarray, p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        y = decode(u, p)
        f = np.column_stack([ax.values(problem, y, p) for ax in axes])
        g = y @ problem.G.T - (problem.h0 + p @ problem.P.T)
        return f, g

    class River(Problem):
        def __init__(self) -> None:
            super().__init__(
                n_var=3, n_obj=2, n_ieq_constr=problem.G.shape[0], xl=np.array(lo), xu=np.array(hi)
            )

        def _evaluate(self, u, out, *args, **kwargs):
            p = fs.p(u[:, 2], np.broadcast_to(lnp, u[:, 2].shape))
            out["F"], out["G"] = evaluate(u, p)

    t = time.perf_counter()
    res = minimize(River(), NSGA2(pop_size=100), ("n_gen", 200), seed=seed, verbose=False)
    elapsed = time.perf_counter() - t
    u = np.atleast_2d(res.X)
    p = np.array([fs.exact_p(float(T), float(fs.pressures[0])) for T in u[:, 2]])
    f, g = evaluate(u, p)
    ok = np.all(g <= 1e-9, axis=1)
    f = f[ok]
    return elapsed, f[nondominated(f)]


def main() -> None:
    case = load_case(ROOT / "cases" / "river_bend.toml")
    trace_front(case, AXES, points=POINTS)  # builds and caches the property tables
    t_exact, front = timed(lambda: trace_front(case, AXES, points=POINTS))
    ours = front.values
    reference = trace_front(case, AXES, points=2000).values
    t_ga, theirs = nsga2(case)
    lo, span = reference.min(axis=0), np.ptp(reference, axis=0)

    def norm(v: np.ndarray) -> np.ndarray:
        return (v - lo) / span

    ref_point = np.array([1.1, 1.1])
    rows = []
    for name, t, v in (("exact (compromise)", t_exact, ours), ("NSGA-II (pymoo)", t_ga, theirs)):
        rows.append(
            (
                name,
                t,
                len(v),
                hypervolume(norm(v), ref_point),
                gd_plus_polyline(norm(v), norm(reference)),
            )
        )
    hv_ref = hypervolume(norm(reference), ref_point)
    print(
        f"river case, front of {' vs '.join(AXES)} (pump limit lifted); reference: exact "
        f"sweep of {len(reference)} points, hypervolume {hv_ref:.6f}"
    )
    print(f"{'method':20s} {'time [s]':>9s} {'points':>7s} {'hypervolume':>12s} {'GD+':>10s}")
    for name, t, n, hv, gd in rows:
        print(f"{name:20s} {t:9.3f} {n:7d} {hv:12.6f} {gd:10.2e}")
    (_, t0, _, hv0, gd0), (_, t1, _, hv1, gd1) = rows
    print(
        f"\ntime: exact / NSGA-II = {t0 / t1:.4f}   (target: exact under 0.3 s: "
        f"{'met' if t0 < 0.3 else 'MISSED'})"
    )
    print(
        f"hypervolume: exact / NSGA-II = {hv0 / hv1:.6f}   (target >= 1: "
        f"{'met' if hv0 >= hv1 else 'MISSED'})"
    )
    print(
        f"GD+: exact {gd0:.2e}, NSGA-II {gd1:.2e}   (target: exact under 1e-6: "
        f"{'met' if gd0 < 1e-6 else 'MISSED'})"
    )


def fluid_names(n: int) -> list[str]:
    """``n`` distinct liquids of the catalogue: water, seawater, then glycerol-water by 1 %."""
    names = ["water", "seawater"] + [f"glycerol-water {k}%" for k in range(1, 100)]
    return names[:n]


def many_fluids() -> None:
    """The 100-point front against the number of candidate fluids (time, peak memory)."""
    data = tomllib.loads((ROOT / "cases" / "river_bend.toml").read_text())
    print(f"\nfront of {' vs '.join(AXES)} with many candidate fluids (river case, 100 points)")
    print(
        f"{'fluids':>7s} {'time [s]':>9s} {'x 1 fluid':>10s} {'per fluid':>10s} {'peak [MB]':>10s}"
    )
    base = None
    for n in (1, 6, 24, 96):
        data["model"]["fluids"] = fluid_names(n)
        case = case_from_dict(data, path="river_bend.toml")
        trace_front(case, AXES, points=POINTS)  # tables built and cached
        t, _ = timed(lambda case=case: trace_front(case, AXES, points=POINTS), repeat=3)
        tracemalloc.start()
        trace_front(case, AXES, points=POINTS)
        peak = tracemalloc.get_traced_memory()[1]
        tracemalloc.stop()
        base = base or t
        print(f"{n:7d} {t:9.3f} {t / base:10.1f} {t / base / n:10.2f} {peak / 2**20:10.1f}")
    print("targets: 96 fluids under 1 s, under 20x one fluid, under 250 MB")


if __name__ == "__main__":
    if "--fluids" not in sys.argv:
        main()
    many_fluids()
