"""The batched search over fluids and scenarios answers what the searches would answer alone.

Behaviour the solver relies on (no external source): the complete answer runs every fluid's
search under several scenarios (each binding limit relaxed by 10 %, each preferred ratio fixed)
in shared batched solves; each (fluid, scenario) result must equal the result of searching that
fluid under that scenario on its own, to rounding.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from numpy.testing import assert_allclose

from compromise.casefile.load import load_case
from compromise.solving.grid import (
    Engine,
    FluidStates,
    best_state,
    best_states_scenarios,
)
from compromise.solving.problem import build_problem

CASES = Path(__file__).resolve().parents[1] / "cases"


@pytest.mark.parametrize("name", ["river_bend", "pipe_rig", "wind_tunnel"])
def test_scenarios_batched_equal_scenarios_alone(name: str) -> None:
    case = load_case(CASES / f"{name}.toml")
    problem = build_problem(case)
    fss = [FluidStates(case, f, problem.used_properties) for f in case.model.fluids]
    m = problem.G.shape[0]
    scenarios = [(None, None)]
    for i in range(min(m, 3)):
        hs = np.zeros(m)
        hs[i] = math.log(1.1)
        scenarios.append((hs, None))
    engine = Engine(problem)
    batched = best_states_scenarios(engine, fss, scenarios)
    for sc, found in zip(scenarios, batched, strict=True):
        for fs, state in zip(fss, found, strict=True):
            alone = best_state(engine, fs, h_shift=sc[0])
            assert (state is None) == (alone is None)
            if state is not None and alone is not None:
                assert_allclose(state.objective, alone.objective, rtol=1e-9, atol=1e-15)
                assert_allclose(state.y, alone.y, rtol=1e-9, atol=1e-12)
