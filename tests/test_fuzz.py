"""Fuzzing the bundled cases (issue 16, item 7): every mutated case ends in exit status 0, 1
or 2 for ``check`` and ``solve``, without a traceback, within 10 s.

Derandomised (the same examples on every run) with a bounded count so the suite stays fast;
``benchmarks/fuzz.py`` runs 10,000 mutations and prints the count of each exit status. The
mutations (tests/fuzzing.py) drop, duplicate and swap keys, and put extreme numbers, hostile
unit strings and random expressions in place of values.
"""

from __future__ import annotations

import random
import tempfile
from pathlib import Path

from fuzzing import mutate, run_case, to_toml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st


@settings(
    derandomize=True,
    max_examples=150,
    deadline=None,
    database=None,
    suppress_health_check=[HealthCheck.too_slow],
)
@given(st.randoms(use_true_random=False))
def test_mutated_cases_end_in_an_answer_or_an_error(rng: random.Random) -> None:
    data = mutate(rng)
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "case.toml"
        path.write_text(to_toml(data), encoding="utf-8")
        for command, status, output in run_case(path, seconds=10):
            assert status in (0, 1, 2), (command, status, output[-400:], to_toml(data)[:2000])
            assert "Traceback" not in output, (command, output[-400:])
            if status == 2:
                lines = [ln for ln in output.splitlines() if ln.strip()]
                assert all(ln.startswith("error: ") for ln in lines), (command, output[-400:])


def test_the_bundled_cases_round_trip_through_the_writer() -> None:
    """The TOML writer of the fuzzer gives back every bundled case unchanged (else the fuzzer
    would test the writer, not the program)."""
    import tomllib

    from fuzzing import BASES

    for base in BASES:
        assert tomllib.loads(to_toml(base)) == base
