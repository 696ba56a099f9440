"""Searches run side by side give the answers they give alone, to the last bit.

The granular solver runs the temperature searches of every (fluid, material), and of every
relaxed binding row, in lockstep (``compromise.solving.granular.lockstep``): each round, their
subproblems share batched QP calls. A user relies on an answer that does not depend on how
the work was batched (the byte-identical ``solve --json`` of ``test_regression_outputs``);
this checks the states themselves against each search run alone (common practice: a
regression of the project's own arithmetic, not an independent source).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from compromise.casefile.load import load_case
from compromise.solving.granular import (
    LOCKSTEP_COLUMNS,
    GrainEngine,
    GranularProblem,
    all_grain_states,
    best_grain_state,
)
from compromise.solving.threads import blas_single_thread

ROOT = Path(__file__).resolve().parents[1]


@pytest.mark.parametrize("name", ["heron_reach", "breakwater"])
def test_lockstep_states_equal_each_search_run_alone(name: str) -> None:
    case = load_case(ROOT / "cases" / f"{name}.toml")
    gp = GranularProblem(case)
    engine = GrainEngine(gp)
    with blas_single_thread():
        together = all_grain_states(engine, case)
        assert len(together) >= 2  # several searches really shared the rounds
        for (fluid, material), state in together.items():
            alone = best_grain_state(engine, gp.states(fluid), material)
            assert (state is None) == (alone is None)
            if state is None or alone is None:
                continue
            assert state.objective == alone.objective
            assert state.temperature == alone.temperature
            assert state.critical_shields == alone.critical_shields
            assert state.rounds == alone.rounds
            assert np.array_equal(state.u, alone.u)


def test_relaxed_rows_side_by_side_equal_one_at_a_time() -> None:
    """The binding costs' re-solves (every relaxed row at once) against one row at a time."""
    case = load_case(ROOT / "cases" / "heron_reach.toml")
    gp = GranularProblem(case)
    engine = GrainEngine(gp)
    from compromise.solving.granular import grain_jobs, lockstep

    shifts = []
    for i in range(2):
        hs = np.zeros(gp.G.shape[0])
        hs[i] = 0.01
        shifts.append(hs)
    with blas_single_thread():
        sets = [grain_jobs(engine, case, h_shift=hs) for hs in shifts]
        width = sum(len(keys) for keys, _ in sets)
        assert width * 36 > LOCKSTEP_COLUMNS  # the grid rounds need more than one stack
        found = lockstep(engine, [job for _, jobs in sets for job in jobs])
        a = 0
        for hs, (keys, _) in zip(shifts, sets, strict=True):
            alone = all_grain_states(engine, case, h_shift=hs)
            for key, state in zip(keys, found[a : a + len(keys)], strict=True):
                other = alone[key]
                assert (state is None) == (other is None)
                if state is not None and other is not None:
                    assert state.objective == other.objective
                    assert np.array_equal(state.u, other.u)
            a += len(keys)
